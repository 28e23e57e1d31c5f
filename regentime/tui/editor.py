"""The parameter editor: the file's values grouped as the file is, and the element list.

Groups follow the file: general (top-level keys), seed, gain, pump, switch, cables, outputs,
then generator / scope / cleaner / checks when the file has them, and the cavity's elements.
Each group lists the keys present in the file (in the file's order), then the other keys the
format knows, empty with their default as placeholder (typing a value adds the key).
"""

from __future__ import annotations

from typing import Iterator

from textual.containers import VerticalScroll
from textual.widgets import Static

from regentime.fileformat.schema import DRIVES, SECTIONS, TOP, FieldSpec
from regentime.tui.elements import ElementList
from regentime.tui.field_row import FieldRow

GENERAL = ("name", "wavelength", "repetition_rate", "dump", "air")
ALWAYS = ("seed", "gain", "pump", "switch", "cables", "outputs")
WHEN_PRESENT = ("generator", "scope", "cleaner", "checks")


# Examples for rows where the unit's general example would mislead ("e.g. 250 mm" for a
# spectral width).  Plausible orders of magnitude for a regen (common practice), not defaults.
EXAMPLES = {
    "wavelength": "800 nm", "seed.energy": "2 nJ", "seed.duration": "150 ps",
    "seed.train_rate": "80 MHz", "seed.arrival": "7 ns", "seed.bandwidth": "30 nm",
    "gain.mode_radius": "0.5 mm", "gain.pump_radius": "0.6 mm", "pump.wavelength": "532 nm",
    "pump.lead": "150 ns", "pump.latency": "200 ns", "pump.absorbed_fraction": "0.85",
    "pump.overlap": "90 %", "switch.on_latency": "50 ns", "switch.off_latency": "50 ns",
    "switch.jitter": "100 ps", "switch.max_gate": "2 us", "generator.resolution": "5 ps",
    "length": "1.5 m", "aperture": "3 mm", "thickness": "1 mm",
}
# gain: keys that override a property of the gain-medium library entry (same names)
LIBRARY_KEYS = ("emission_cross_section", "absorption_cross_section", "upper_state_lifetime",
                "n2", "damage_fluence", "damage_duration", "doping_density")
# defaults that are another key's value: (this key, the key it follows)
FOLLOWS = {"switch.fall_time": "switch.rise_time", "switch.off_latency": "switch.on_latency",
           "gain.pump_radius": "gain.mode_radius"}
_PRETTY = (("^-3", "⁻³"), ("^2", "²"), ("^3", "³"))  # the unit parser reads both spellings


def example(spec: FieldSpec, path: str = "") -> str:
    """An example value to type in ``path``'s box: the field's own, else the unit's."""
    key = path.rsplit(".", 1)[-1]
    for name in (path, key if path.startswith(("cables.", "cleaner.cable.")) or
                 path.startswith("cavity[") else None):
        if name in EXAMPLES:
            return EXAMPLES[name]
    return spec.unit_hint


def pretty(text: str) -> str:
    for a, b in _PRETTY:
        text = text.replace(a, b)
    return text


def tooltip(spec: FieldSpec, path: str = "") -> str:
    parts = [spec.help]
    hint = example(spec, path)
    if hint:
        parts.append(f"e.g. {hint}")
    rng = spec.range_text()
    if rng:
        parts.append(rng)
    if spec.default:
        parts.append(f"default: {spec.default}")
    return "; ".join(parts)


def placeholder(spec: FieldSpec, path: str = "", doc=None) -> str:
    """Grey text of an empty box: what applies when the box stays empty (the library's value
    for the chosen gain medium, the value of the key a default follows, the default), or an
    example of what to type (never a value the plan uses that is not one)."""
    known = known_default(path, doc) if doc is not None else None
    if known:
        return known
    if path.startswith("outputs."):
        return "default: the next free outN"
    if spec.default:
        return f"default: {spec.default}"
    hint = example(spec, path)
    if spec.required:
        return f"required, e.g. {hint}" if hint else "required"
    return f"e.g. {hint}" if hint else "not set"


def known_default(path: str, doc) -> str | None:
    """'library: 3e-19 cm²' (the value of the gain-medium library entry that the file's
    gain.material names) for gain-medium overrides and the top-level wavelength, 'default:
    3.5 ns (= rise_time)' for keys that follow another; None when nothing specific is known."""
    from regentime.units import format_quantity

    section, _, key = path.rpartition(".")
    if (section == "gain" and key in LIBRARY_KEYS) or path == "wavelength":
        medium = _medium(doc.get("gain.material"))
        if medium is None:
            return None
        dim = "length" if path == "wavelength" else SECTIONS["gain"].fields[key].dimension
        value = getattr(medium, "wavelength" if path == "wavelength" else key)
        return f"library: {pretty(format_quantity(value, dim))}"
    if path in FOLLOWS:
        other = doc.get(FOLLOWS[path])
        name = FOLLOWS[path].rsplit(".", 1)[-1]
        return f"default: {other} (= {name})" if isinstance(other, (str, int, float)) else None
    return None


def _medium(name):
    """The library entry of the gain medium the file names (None if unknown)."""
    if not isinstance(name, str):
        return None
    from regentime.materials.gain_media import GAIN_MEDIA

    return GAIN_MEDIA.get(name.strip())


def shown(value) -> str:
    if value is None or isinstance(value, (dict, list)):
        return ""
    return str(value)


def _ordered(fields: dict, present) -> list[str]:
    have = [k for k in (present or {}) if k in fields] if isinstance(present, dict) else []
    return have + [k for k in fields if k not in have]


def field_rows(doc) -> Iterator[tuple[str, list[FieldRow]]]:
    """(group title, rows) for every group of the editor, built from the document."""
    rows = [_row(doc, k, k, TOP.fields[k]) for k in GENERAL]
    yield "general", rows
    for name in ALWAYS + WHEN_PRESENT:
        data = doc.get(name)
        if name in WHEN_PRESENT and data is None:
            continue
        section = SECTIONS[name]
        if name == "cables":
            drives = [d for d in (data or {}) if d in DRIVES] if isinstance(data, dict) else []
            rows = []
            for d in drives:
                for key in ("length", "velocity_factor"):
                    spec = section.sections[d].fields[key]
                    label = f"{d} {'length' if key == 'length' else 'vel. factor'}"
                    rows.append(_row(doc, f"cables.{d}.{key}", label, spec))
            yield "cables", rows
            continue
        rows = [_row(doc, f"{name}.{k}", k, section.fields[k]) for k in _ordered(section.fields, data)]
        if name == "cleaner" and isinstance(data, dict) and "cable" in data:
            for key in ("length", "velocity_factor"):
                rows.append(_row(doc, f"cleaner.cable.{key}", f"cable {key}",
                                 section.sections["cable"].fields[key]))
        yield name, rows


def _row(doc, path: str, label: str, spec: FieldSpec) -> FieldRow:
    return FieldRow(path, label.replace("_", " "), shown(doc.get(path)),
                    placeholder(spec, path, doc), f"{path}: {tooltip(spec, path)}")


class ParameterEditor(VerticalScroll):
    """All editable values of the document, and the element list at the end."""

    DEFAULT_CSS = """
    ParameterEditor .group { text-style: bold; color: $accent; padding: 1 0 0 0; }
    ParameterEditor .group.first { padding: 0; }
    ParameterEditor .empty { color: $text-muted; padding: 0 0 0 2; }
    """

    async def load(self, doc) -> None:
        """(Re)build every row from ``doc``."""
        await self.remove_children()
        widgets = []
        for i, (title, rows) in enumerate(field_rows(doc)):
            widgets.append(Static(title, classes="group first" if i == 0 else "group"))
            widgets.extend(rows)
            if not rows:
                widgets.append(Static("none in the file", classes="empty"))
        widgets.append(Static("cavity elements  (+ add, − remove, shift+↑/↓ move, enter edit)",
                              classes="group"))
        elements = ElementList(id="elements")
        widgets.append(elements)
        await self.mount_all(widgets)
        await elements.load(doc)

    def rows(self) -> list[FieldRow]:
        return list(self.query(FieldRow))

    def row(self, path: str) -> FieldRow | None:
        return next((r for r in self.query(FieldRow) if r.path == path), None)

    def refresh_values(self, doc) -> None:
        """Show the document's current values (after a reload or a write-back)."""
        for r in self.query(FieldRow):
            r.set_value(shown(doc.get(r.path)))

    def refresh_hints(self, doc, changed: str) -> None:
        """After ``changed`` was edited: the placeholders that depend on it (the gain medium's
        library values, a default that follows another key)."""
        if changed == "gain.material":
            paths = {"wavelength"} | {f"gain.{k}" for k in LIBRARY_KEYS}
        else:
            paths = {p for p, other in FOLLOWS.items() if other == changed}
        for r in self.query(FieldRow):
            if r.path in paths:
                r.set_placeholder(placeholder(doc.spec(r.path), r.path, doc))
