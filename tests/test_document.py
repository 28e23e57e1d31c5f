"""CavityDocument, the TUI's editor: each edit changes only what it must (checked with difflib
against the text before), refuses bad values without touching the text, and the result
still loads."""

from __future__ import annotations

import difflib
import os

import pytest

from regentime.errors import InputError, InputErrors
from regentime.fileformat import CavityDocument, field_spec
from regentime.fileformat.docgen import BEGIN, END, render

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
TI = os.path.join(ROOT, "cavities", "ti_sapphire_1khz.yaml")


def _diff(before: str, after: str) -> tuple[list[str], list[str]]:
    removed, added = [], []
    for line in difflib.unified_diff(before.splitlines(), after.splitlines(), lineterm="",
                                     n=0):
        if line.startswith("-") and not line.startswith("---"):
            removed.append(line[1:])
        elif line.startswith("+") and not line.startswith("+++"):
            added.append(line[1:])
    return removed, added


@pytest.fixture
def doc():
    return CavityDocument.load(TI)


def test_get(doc):
    assert doc.get("pump.energy") == "9 mJ"
    assert doc.get("cavity[1].space.length") == "250 mm"  # shorthand form
    assert doc.get("cavity[1].length") == "250 mm"  # kind looked up
    assert doc.get("cavity[2].pockels_cell.quarter_wave_voltage") == "3.4 kV"
    assert doc.get("pump.power") is None and doc.get("pump.power", "x") == "x"
    assert doc.get("cavity[99].mirror.name") is None
    assert doc.get_si("pump.energy") == 9e-3
    assert doc.get_si("cavity[0].mirror.reflectivity") == 0.998


def test_set_keeps_comment_column(doc):
    before = doc.text()
    doc.set("pump.energy", "10 mJ")
    removed, added = _diff(before, doc.text())
    assert len(removed) == len(added) == 1
    assert added[0].index("#") == removed[0].index("#")  # comment stays in its column
    assert added[0].replace("10 mJ ", "9 mJ  ") == removed[0]


def test_set_si_number_writes_engineering_units(doc):
    doc.set("cavity[2].pockels_cell.length", 0.03)
    assert doc.get("cavity[2].pockels_cell.length") == "30 mm"
    doc.set("cavity[0].mirror.reflectivity", 0.9995)  # written as % like the original
    assert doc.get("cavity[0].mirror.reflectivity") == "99.95 %"
    doc.set("pump.absorbed_fraction", 0.8)  # the original is a bare number
    assert doc.get("pump.absorbed_fraction") == 0.8
    doc.set("dump", 25)
    assert doc.get("dump") == 25
    cavity = doc.to_cavity()
    assert cavity.elements[2].length == pytest.approx(0.03) and cavity.dump.round_trip == 25


def test_shorthand_space_becomes_mapping(doc):
    before = doc.text()
    doc.set("cavity[1].space.group_index", 1)
    removed, added = _diff(before, doc.text())
    assert removed == ["  - space: 250 mm"]
    assert added == ["  - space: {length: 250 mm, group_index: 1}"]
    assert doc.to_cavity().elements[1].group_index == 1.0


def test_add_missing_keys(doc):
    assert doc.delete("seed.bandwidth") is True  # the example gives one; start without it
    before = doc.text()
    doc.set("seed.bandwidth", "30 nm")  # block mapping
    doc.set("cavity[6].polarizer.thickness", "3 mm")  # flow mapping
    doc.set("checks.b_integral_limit", 2)  # absent section
    doc.set("cables.scope.length", "2 m")  # absent sub-section
    removed, added = _diff(before, doc.text())
    assert len(removed) == 1 and "polarizer" in removed[0]
    assert "  bandwidth: 30 nm" in added
    assert any(a.endswith("reflection_s: 99.5 %, thickness: 3 mm}") for a in added)
    assert "checks:" in added and "  b_integral_limit: 2" in added
    assert "  scope:" in added and "    length: 2 m" in added
    c = doc.to_cavity()
    assert c.seed.bandwidth == pytest.approx(30e-9)
    assert c.elements[6].length == pytest.approx(3e-3)
    assert c.checks.b_integral_limit == 2 and c.cables["scope"].length == 2.0
    # the added bandwidth sits with the other seed keys, before the blank line
    lines = doc.text().splitlines()
    i = lines.index("  bandwidth: 30 nm")
    assert lines[i - 1].startswith("  arrival:") and lines[i + 1] == ""


def test_quoting_when_needed(doc):
    doc.set("name", "a: tricky # name")
    assert doc.to_cavity().name == "a: tricky # name"
    doc.set("outputs.scope", "out4, rear")
    assert doc.to_cavity().outputs["scope"] == "out4, rear"


@pytest.mark.parametrize("path,value", [
    ("pump.energy", "9 ns"),
    ("pump.energy", "9 MJ"),
    ("pump.energy", float("nan")),
    ("pump.energy", True),
    ("pump.enrgy", "9 mJ"),
    ("cavity[2].pockels_cell.length", -0.01),
    ("cavity[2].mirror.reflectivity", "99 %"),  # cavity[2] is the cell
    ("gain.profile", "flattop"),
    ("dump", 0),
    ("seed", "2 nJ"),
])
def test_bad_values_are_refused_and_change_nothing(doc, path, value):
    before = doc.text()
    with pytest.raises(InputError):
        doc.set(path, value)
    assert doc.text() == before and not doc.dirty


def test_insert_remove_move(doc):
    n = len(doc.to_cavity().elements)
    doc.insert_element(4, "plate", {"name": "compensator", "material": "fused_silica",
                                    "length": "2 mm"})
    c = doc.to_cavity()
    assert len(c.elements) == n + 1 and c.elements[4].name == "compensator"
    assert "  - plate: {name: compensator, material: fused_silica, length: 2 mm}" in \
        doc.text().splitlines()
    doc.remove_element(4)
    assert doc.text() == CavityDocument.load(TI).text()  # insert + remove = no change
    doc.move_element(1, 2)  # space 250 mm after the waveplate? no: to index 3
    kinds = [e.kind for e in doc.to_cavity().elements]
    assert kinds[:5] == ["mirror", "pockels_cell", "space", "space", "waveplate"]
    doc.move_element(3, -2)
    assert doc.text() == CavityDocument.load(TI).text()  # moved back
    doc.move_element(0, -5)  # clamped: nothing to do
    assert doc.text() == CavityDocument.load(TI).text()


def test_insert_at_end_and_space_shorthand(doc):
    doc.insert_element(99, "space", {"length": "5 mm"})
    lines = doc.text().splitlines()
    i = lines.index("  - space: 5 mm")
    assert lines[i - 1].startswith("  - mirror: {name: end-B")  # right after the last item
    assert lines[i + 1] == ""  # and before the blank line that ends the list
    with pytest.raises(InputErrors):  # the list no longer ends with a mirror
        doc.to_cavity()
    doc.remove_element(11)
    assert doc.text() == CavityDocument.load(TI).text()


def test_insert_refuses_bad_fields(doc):
    before = doc.text()
    with pytest.raises(InputError):
        doc.insert_element(2, "polariser", {})
    with pytest.raises(InputError):
        doc.insert_element(2, "plate", {"lenght": "2 mm"})
    with pytest.raises(InputError):
        doc.insert_element(2, "plate", {"length": "2 ns"})
    assert doc.text() == before


def test_remove_out_of_range(doc):
    with pytest.raises(InputError):
        doc.remove_element(42)


def test_crlf_file_keeps_crlf(tmp_path):
    text = open(TI, encoding="utf-8").read().replace("\n", "\r\n")
    doc = CavityDocument.from_text(text)
    doc.set("checks.b_integral_limit", 2)
    doc.set("pump.energy", "8 mJ")
    assert "\n" not in doc.text().replace("\r\n", "")
    assert doc.to_cavity().pump.energy == 8e-3


def test_syntax_error_file_is_refused(tmp_path):
    path = tmp_path / "bad.yaml"
    path.write_text("format: regentime/1\nseed: {energy: 2 nJ\n")
    with pytest.raises(InputError) as info:
        CavityDocument.load(str(path))
    assert info.value.line is not None


def test_field_spec_for_the_tui():
    spec = field_spec("cavity[2].pockels_cell.length")
    assert spec.dimension == "length" and spec.unit_hint == "250 mm"
    assert spec.in_range(0.025) and not spec.in_range(0.0) and spec.help
    assert field_spec("pump.energy").range_text() == "between 1 µJ and 100 J"
    assert field_spec("cables.pump.velocity_factor").dimension == "ratio"
    assert field_spec("cleaner.cable.length").dimension == "length"
    assert field_spec("outputs.scope").dimension == "name"
    assert field_spec("gain.profile").choices == ("flat-top", "gaussian")
    with pytest.raises(KeyError):
        field_spec("pump.enrgy")


def test_docs_tables_in_step_with_schema():
    with open(os.path.join(ROOT, "docs", "file-format.md"), encoding="utf-8") as fh:
        text = fh.read()
    block = text[text.index(BEGIN):text.index(END) + len(END)]
    assert block == render(), "run: python -m regentime.fileformat.docgen docs/file-format.md"


_SCALAR_PATHS = ["pump.energy", "pump.lead", "seed.energy", "seed.duration", "seed.arrival",
                 "switch.rise_time", "switch.jitter", "gain.mode_radius",
                 "cavity[2].pockels_cell.length", "cavity[7].space.length",
                 "cavity[0].mirror.reflectivity", "cables.pump.length"]


def test_random_edits_change_one_line_each():
    """Property check with a fixed seed: any in-range value set on any scalar key changes
    exactly one line, and reads back (through the loader) as the value set, to the six
    significant digits the formatter writes."""
    import random

    from regentime.fileformat.schema import field_spec as spec_of

    rng = random.Random(20240611)
    base = CavityDocument.load(TI)
    for _ in range(25):
        path = rng.choice(_SCALAR_PATHS)
        spec = spec_of(path)
        lo = spec.lo if spec.lo else 1e-12
        hi = min(spec.hi, lo * 1e6) if spec.hi else lo * 1e6
        value = lo + (hi - lo) * rng.uniform(0.01, 0.99)
        doc = CavityDocument.from_text(base.text())
        doc.set(path, value)
        removed, added = _diff(base.text(), doc.text())
        assert len(removed) == len(added) <= 1, (path, value)
        assert doc.get_si(path) == pytest.approx(value, rel=1e-5)
        doc.to_cavity()  # still a valid file


def test_delete_block_key_removes_its_line_only(doc):
    before = doc.text()
    assert doc.delete("pump.latency") is True
    removed, added = _diff(before, doc.text())
    assert removed == ["  latency: 210 ns             # pump trigger input to pump light out"]
    assert added == [] and doc.dirty
    # the schema's default for pump.latency is "0 s" (docs/file-format.md)
    assert doc.to_cavity().pump.latency == 0.0
    doc.set("pump.latency", "210 ns")  # typed back: the same place, without the comment
    removed, added = _diff(before, doc.text())
    assert added == ["  latency: 210 ns"] and removed[0].startswith("  latency: 210 ns ")


def test_delete_flow_keys(doc):
    before = doc.text()
    doc.delete("cavity[6].polarizer.transmission_p")  # a middle key and its comma
    doc.delete("cavity[0].mirror.name")  # the first key
    doc.delete("cables.pump.velocity_factor")  # the last key, after the kind lookup
    removed, added = _diff(before, doc.text())
    assert added == ["  - mirror: {reflectivity: 99.8 %, radius_of_curvature: 6 m}  # cell-side end "
                     "mirror, concave (plano-concave cavity)",
                     "  - polarizer: {name: tfp, extinction_ratio: 500, reflection_s: 99.5 %}",
                     "  pump:       {length: 3 m}"]
    assert len(removed) == 3
    c = doc.to_cavity()
    assert c.elements[6].transmission_p == 1.0  # default "100 %" (file-format.md)
    assert c.cables["pump"].velocity_factor == pytest.approx(0.66)  # default 0.66 (schema)


def test_delete_section_and_crlf(tmp_path):
    text = open(TI, encoding="utf-8").read().replace("\n", "\r\n")
    doc = CavityDocument.from_text(text)
    doc.delete("generator")
    removed, added = _diff(text.replace("\r\n", "\n"), doc.text().replace("\r\n", "\n"))
    assert removed[0] == "generator:" and len(removed) == 2 and added == []
    assert "\n" not in doc.text().replace("\r\n", "")
    doc.to_cavity()


def test_delete_refusals_change_nothing(doc):
    before = doc.text()
    for path in ("seed.energy", "cavity[1].length", "cavity[2].pockels_cell", "cavity[2]",
                 "pump.enrgy"):
        with pytest.raises(InputError):
            doc.delete(path)
    assert doc.delete("generator.insertion_delay") is False  # not in the file: nothing to do
    assert doc.text() == before and not doc.dirty


def test_snapshot_builds_the_same_cavity_as_the_loader(doc):
    """cavity_of(snapshot) and load_cavity_text (the path `regentime plan` takes) agree, and an
    edit leaves an earlier snapshot as it was (the TUI plans it in another thread)."""
    from regentime.fileformat.document import cavity_of
    from regentime.fileformat.loader import load_cavity_text

    text, data = doc.snapshot()
    doc.set("pump.energy", "7 mJ")
    assert doc.snapshot()[0] != text and data["pump"]["energy"] == "9 mJ"
    assert cavity_of(text, data, TI) == load_cavity_text(text, TI)
    assert doc.to_cavity() == load_cavity_text(doc.text(), TI)
