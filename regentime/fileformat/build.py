"""Check a loaded cavity file as a whole and build the :class:`~regentime.model.Cavity`.

Called by :mod:`regentime.fileformat.loader` with the round-trip data of one file.  Field
checks come from the schema (:class:`Checker`); this module adds the cavity list, the
structural rules, the rules between keys (pump mode, cell voltages, outputs) and the
defaults (documented in docs/file-format.md).
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Any, Optional

from regentime import model as m
from regentime.errors import MISSING, InputError, InputErrors
from regentime.fileformat.reading import (
    DEFAULT_CELL_CONTRAST, DEFAULT_VELOCITY_FACTOR, FORMAT_VERSION, Checker, BAD, Shown,
    gain_media_table, key_line, line_of, suggest)
from regentime.fileformat.schema import DRIVES, ELEMENT_KINDS, ELEMENTS, TOP

def validate(data: Any, source: Optional[str], default_name: str) -> m.Cavity:
    """Round-trip data of one file -> Cavity; raises InputErrors listing every problem."""
    where = source
    if data is None:
        raise InputError("", Shown("an empty file"), "a cavity description starting with "
                         f"'format: {FORMAT_VERSION}'", line=1, source=where)
    if not isinstance(data, dict):
        raise InputError("", data if not isinstance(data, list) else Shown("a list"),
                         "a mapping of keys (format, seed, gain, pump, cavity, switch …)",
                         line=1, source=where)
    ck = Checker(source)
    if "format" not in data:
        ck.errors.append(InputError("format", MISSING, f"'format: {FORMAT_VERSION}' at the top "
                                    "of the file", line=1, source=where))
    elif data["format"] != FORMAT_VERSION:
        raise InputErrors([InputError(
            "format", data["format"], f"'{FORMAT_VERSION}' (this version of regentime reads "
            f"format {FORMAT_VERSION} only)", line=line_of(data, "format"), source=where)])
    top = ck.section(data, TOP, "", 1)
    elements = _elements(ck, data)
    if top is BAD:  # pragma: no cover - data is a mapping here
        raise InputErrors(ck.errors)
    _rules(ck, data, top, elements)
    if ck.errors:
        raise InputErrors(ck.errors)
    return _build(ck, data, top, elements, source, default_name)


# ---- the cavity list ----------------------------------------------------------------------

def _elements(ck: Checker, data) -> list[tuple[int, str, dict, Optional[int]]]:
    raw = data.get("cavity", MISSING)
    if raw is MISSING:
        ck.err("cavity", MISSING, "a list of elements from one end mirror to the other", 1)
        return []
    line = line_of(data, "cavity")
    if not isinstance(raw, list) or not raw:
        ck.err("cavity", raw if raw is not None else Shown("nothing"),
               "a list of elements, e.g. '- mirror: {reflectivity: 99.8 %}'", line)
        return []
    out = []
    for i, item in enumerate(raw):
        path = f"cavity[{i}]"
        iline = line_of(raw, i)
        if not isinstance(item, dict) or len(item) != 1:
            ck.err(path, item, "one element: a one-key mapping such as "
                   "'- space: 250 mm' or '- mirror: {reflectivity: 99.8 %}'", iline)
            continue
        kind = next(iter(item))
        if kind not in ELEMENTS:
            ck.err(path, Shown(f"unknown element '{kind}'"),
                   f"one of {', '.join(ELEMENT_KINDS)}{suggest(kind, ELEMENT_KINDS)}", iline)
            continue
        body = item[kind]
        parsed = ck.section(body, ELEMENTS[kind], f"{path}.{kind}", iline)
        if parsed is not BAD:
            out.append((i, kind, parsed, iline))
    return out


# ---- rules between keys -------------------------------------------------------------------

def _rules(ck: Checker, data, top: dict, elements: list) -> None:
    raw = data.get("cavity")
    n = len(raw) if isinstance(raw, list) else 0
    kinds = {i: k for i, k, _, _ in elements}
    if n and len(kinds) == n:  # every item readable: structural rules make sense
        line = key_line(data, "cavity")
        for end in (0, n - 1):
            if kinds[end] != "mirror":
                ck.err(f"cavity[{end}]", Shown(f"a {kinds[end]}"),
                       "an end mirror: the cavity list starts and ends with '- mirror'",
                       line_of(raw, end))
        for kind in ("polarizer", "pockels_cell", "gain_medium"):
            where = [i for i, k in kinds.items() if k == kind]
            if len(where) != 1:
                got = Shown(f"{len(where)} {kind} elements" + (
                    f" (cavity[{where[0]}], cavity[{where[1]}] …)" if len(where) > 1 else ""))
                ck.err(f"cavity[{where[1]}]" if len(where) > 1 else "cavity", got,
                       f"exactly one {kind}", line_of(raw, where[1]) if len(where) > 1 else line)
        names: dict[str, int] = {}
        for i, kind, fields, iline in elements:
            name = fields.get("name")
            if name is not None:
                if name in names:
                    ck.err(f"cavity[{i}].{kind}.name", name,
                           f"a name not used before (cavity[{names[name]}] has it)", iline)
                names[name] = i
    for i, kind, fields, iline in elements:
        if kind == "mirror" and i in (0, n - 1) and fields.get("angle_of_incidence", 0.0):
            ck.err(f"cavity[{i}].mirror.angle_of_incidence", raw[i]["mirror"].get(
                   "angle_of_incidence"), "0 deg on an end mirror (it reflects the beam back "
                   "on itself); the angle belongs to fold mirrors", iline)
        if kind == "pockels_cell" and "quarter_wave_voltage" in fields and \
                "half_wave_voltage" in fields:
            ck.err(f"cavity[{i}].pockels_cell.half_wave_voltage", Shown("both voltages"),
                   "at most one of quarter_wave_voltage and half_wave_voltage", iline)
    pump = top.get("pump")
    praw = data.get("pump")
    if isinstance(pump, dict) and isinstance(praw, dict) and "mode" in pump:
        pulsed = pump["mode"] == "pulsed"
        need = ("energy", "lead") if pulsed else ("power",)
        refuse = ("power",) if pulsed else ("energy", "lead", "latency", "duration")
        for key in need:
            if key not in praw:
                ck.err(f"pump.{key}", MISSING, f"{check_spec('pump', key).expected()} "
                       f"(pump.mode: {pump['mode']} needs it)", line_of(data, "pump"))
        for key in refuse:
            if key in praw:
                other = "continuous" if pulsed else "pulsed"
                ck.err(f"pump.{key}", praw[key], f"no '{key}' with pump.mode: {pump['mode']} "
                       f"(it belongs to mode: {other}; remove it or change the mode)",
                       line_of(praw, key))
    _check_wavelengths(ck, data, top)
    _check_drives(ck, data, top)


def check_spec(section: str, key: str):
    return TOP.sections[section].fields[key]


def _laser_wavelength(top: dict) -> Optional[float]:
    if "wavelength" in top:
        return top["wavelength"]
    gain = top.get("gain") or {}
    media = gain_media_table()
    if media is not None and gain.get("material") in media:
        return media[gain["material"]].wavelength
    return None


def _check_wavelengths(ck: Checker, data, top: dict) -> None:
    lam = _laser_wavelength(top)
    pump = top.get("pump") or {}
    if lam is not None and "wavelength" in pump and pump["wavelength"] >= lam:
        ck.err("pump.wavelength", data["pump"]["wavelength"],
               f"a pump wavelength shorter than the laser wavelength ({lam * 1e9:g} nm)",
               line_of(data["pump"], "wavelength"))
    seed = top.get("seed") or {}
    if lam is not None and "bandwidth" in seed and seed["bandwidth"] >= 0.5 * lam:
        ck.err("seed.bandwidth", data["seed"]["bandwidth"],
               f"a bandwidth well below the wavelength ({lam * 1e9:g} nm)",
               line_of(data["seed"], "bandwidth"))


def _drives(top: dict) -> list[str]:
    """The drives this cavity has, in the order default output names are given."""
    switch = top.get("switch") or {}
    pump = top.get("pump") or {}
    drives = ["gate"] if switch.get("inputs") == "gate" else ["switch_on", "switch_off"]
    if pump.get("mode", "pulsed") == "pulsed":
        drives.append("pump")
    drives.append("scope")
    if "cleaner" in top:
        drives.append("cleaner")
    return drives


def _check_drives(ck: Checker, data, top: dict) -> None:
    drives = _drives(top)
    for section in ("cables", "outputs"):
        given = data.get(section)
        if not isinstance(given, dict):
            continue
        for key in given:
            if key in DRIVES and key not in drives:
                why = {"gate": "switch.inputs is not gate",
                       "switch_on": "switch.inputs is gate",
                       "switch_off": "switch.inputs is gate",
                       "pump": "pump.mode is continuous (nothing to trigger)",
                       "cleaner": "there is no cleaner: section"}[key]
                ck.err(f"{section}.{key}", given[key], f"no '{key}' here: {why}",
                       line_of(given, key))
    outputs = top.get("outputs") or {}
    seen: dict[str, str] = {}
    for drive, name in outputs.items():
        if name in seen:
            ck.err(f"outputs.{drive}", name, f"a name not used for another drive "
                   f"(outputs.{seen[name]} has it)", line_of(data["outputs"], drive))
        seen[name] = drive
    cleaner = top.get("cleaner") or {}
    if "cable" in cleaner and "cleaner" in (top.get("cables") or {}):
        ck.err("cleaner.cable", Shown("a second cable for the cleaner"),
               "the cleaner's cable in one place: cables.cleaner or cleaner.cable",
               line_of(data["cleaner"], "cable"))
    if "output" in cleaner and "cleaner" in outputs and cleaner["output"] != outputs["cleaner"]:
        ck.err("cleaner.output", cleaner["output"],
               f"the same name as outputs.cleaner ('{outputs['cleaner']}'), or only one of them",
               line_of(data["cleaner"], "output"))
    elif "output" in cleaner and cleaner["output"] in seen and seen[cleaner["output"]] != \
            "cleaner":
        ck.err("cleaner.output", cleaner["output"], f"a name not used for another drive "
               f"(outputs.{seen[cleaner['output']]} has it)", line_of(data["cleaner"], "output"))


# ---- building the model -------------------------------------------------------------------

def _build(ck: Checker, data, top: dict, elements: list, source, default_name) -> m.Cavity:
    gain = top["gain"]
    medium = _medium(ck, gain)
    if ck.errors:
        raise InputErrors(ck.errors)
    air = top.get("air", "air")
    seed = top["seed"]
    pump = top["pump"]
    switch = top["switch"]
    cavity = m.Cavity(
        name=top.get("name") or default_name,
        wavelength=top.get("wavelength", medium.wavelength),
        repetition_rate=top["repetition_rate"],
        seed=m.Seed(energy=seed["energy"], duration=seed["duration"],
                    train_rate=seed["train_rate"], arrival=seed.get("arrival", 0.0),
                    bandwidth=seed.get("bandwidth")),
        gain=m.Gain(medium=medium, mode_radius=gain.get("mode_radius"),
                    profile=gain.get("profile", "flat-top"), pump_radius=gain.get("pump_radius"),
                    pump_profile=gain.get("pump_profile", "gaussian"),
                    rings=gain.get("rings", 64), thermal_lens=_thermal_lens(gain)),
        pump=m.Pump(mode=pump["mode"], wavelength=pump["wavelength"],
                    absorbed_fraction=pump["absorbed_fraction"], overlap=pump.get("overlap", 1.0),
                    energy=pump.get("energy"), power=pump.get("power"),
                    lead=pump.get("lead", 0.0), latency=pump.get("latency", 0.0),
                    duration=pump.get("duration", 0.0)),
        elements=_elements_model(elements, air),
        switch=m.Switch(scheme=switch["scheme"], rise_time=switch["rise_time"],
                        fall_time=switch.get("fall_time", switch["rise_time"]),
                        on_latency=switch["on_latency"],
                        off_latency=switch.get("off_latency", switch["on_latency"]),
                        jitter=switch.get("jitter", 0.0),
                        max_gate=switch.get("max_gate", math.inf),
                        min_margin_sigma=switch.get("min_margin_sigma", 3.0),
                        edge=switch.get("edge", "linear"),
                        inputs=switch.get("inputs", "separate")),
        cables=_cables(top),
        outputs=_outputs(top),
        dump=m.DumpRule.of(top.get("dump", "auto")),
        generator=m.Generator(resolution=(top.get("generator") or {}).get("resolution"),
                              insertion_delay=(top.get("generator") or {}).get("insertion_delay", 0.0)),
        scope=m.Scope(lead=(top.get("scope") or {}).get("lead")),
        cleaner=None,
        checks=m.Checks(**{k: v for k, v in (top.get("checks") or {}).items()}),
        air=air,
        source=source,
    )
    if "cleaner" in top:
        c = top["cleaner"]
        cable = cavity.cables.get("cleaner")
        cavity = replace(cavity, cleaner=m.Cleaner(
            extinction_ratio=c["extinction_ratio"], transmission=c.get("transmission", 1.0),
            rise_time=c["rise_time"], fall_time=c.get("fall_time", c["rise_time"]),
            latency=c["latency"], cable=cable, output=cavity.outputs["cleaner"],
            path_delay=c.get("path_delay", 0.0)))
    return cavity


def _thermal_lens(gain: dict):
    """``gain.thermal_lens`` -> ThermalLens (None when not given)."""
    t = gain.get("thermal_lens")
    if t is None:
        return None
    from regentime.fileformat.schema import THERMAL_LENS

    kw = {THERMAL_LENS.fields[k].model or k: v for k, v in t.items()}
    return m.ThermalLens(**kw)


_OVERRIDES = ("emission_cross_section", "absorption_cross_section", "upper_state_lifetime",
              "n2", "damage_fluence", "damage_duration", "doping_density")


def _medium(ck: Checker, gain: dict) -> m.GainMedium:
    media = gain_media_table()
    base = media[gain["material"]]
    changes = {k: gain[k] for k in _OVERRIDES if k in gain}
    if not changes:
        return base
    sources = dict(base.sources)
    sources.update({k: "cavity file (gain." + k + ")" for k in changes})
    return replace(base, sources=sources, **changes)


def _cable(fields: dict) -> m.Cable:
    return m.Cable(length=fields["length"],
                   velocity_factor=fields.get("velocity_factor", DEFAULT_VELOCITY_FACTOR))


def _cables(top: dict) -> dict[str, m.Cable]:
    cables = {k: _cable(v) for k, v in (top.get("cables") or {}).items()}
    if "cable" in (top.get("cleaner") or {}):
        cables["cleaner"] = _cable(top["cleaner"]["cable"])
    return cables


def _outputs(top: dict) -> dict[str, str]:
    given = dict(top.get("outputs") or {})
    cleaner = top.get("cleaner") or {}
    if "cleaner" in top and "cleaner" not in given and "output" in cleaner:
        given["cleaner"] = cleaner["output"]
    used = set(given.values())
    out: dict[str, str] = {}
    counter = 1
    for drive in _drives(top):
        if drive in given:
            out[drive] = given[drive]
            continue
        while f"out{counter}" in used:
            counter += 1
        out[drive] = f"out{counter}"
        used.add(out[drive])
    return out


_MODEL = {"mirror": m.Mirror, "space": m.Space, "plate": m.Plate,
          "pockels_cell": m.PockelsCell, "waveplate": m.Waveplate, "polarizer": m.Polarizer,
          "gain_medium": m.GainElement, "lens": m.Lens}


def _elements_model(elements: list, air: str) -> tuple:
    counts: dict[str, int] = {}
    out = []
    for index, kind, fields, _ in elements:
        counts[kind] = counts.get(kind, 0) + 1
        out.append(_element(index, kind, fields, air, counts[kind]))
    return tuple(out)


def _element(index: int, kind: str, fields: dict, air: str, number: int):
    section = ELEMENTS[kind]
    kw: dict[str, Any] = {}
    for key, value in fields.items():
        if key == "name":
            continue
        kw[section.fields[key].model or key] = value
    if kind == "space":
        kw.setdefault("material", air)
    if kind == "pockels_cell":
        kw.setdefault("contrast", DEFAULT_CELL_CONTRAST)
    name = fields.get("name") or f"{kind.replace('_', ' ')} {number}"
    return _MODEL[kind](index=index, path=f"cavity[{index}].{kind}", name=name, **kw)
