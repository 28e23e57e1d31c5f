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


def tooltip(spec: FieldSpec) -> str:
    parts = [spec.help]
    if spec.unit_hint:
        parts.append(f"e.g. {spec.unit_hint}")
    rng = spec.range_text()
    if rng:
        parts.append(rng)
    if spec.default:
        parts.append(f"default: {spec.default}")
    return "; ".join(parts)


def placeholder(spec: FieldSpec) -> str:
    """Grey text of an empty box: the default, or an example of the unit (never a value)."""
    if spec.default:
        return f"default: {spec.default}"
    if spec.required:
        return f"required, e.g. {spec.unit_hint}" if spec.unit_hint else "required"
    return f"e.g. {spec.unit_hint}" if spec.unit_hint else "not set"


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
    return FieldRow(path, label.replace("_", " "), shown(doc.get(path)), placeholder(spec),
                    f"{path}: {tooltip(spec)}")


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
