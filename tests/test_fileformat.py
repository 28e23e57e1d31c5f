"""Loader: the example cavities and the demo load; defaults and overrides reach the model;
content hash (checked with hashlib's sha256); saving keeps comments and is atomic."""

from __future__ import annotations

import glob
import hashlib
import math
import os
import stat

import pytest
from scipy import constants as sc

from regentime import model as m
from regentime.errors import InputError, InputErrors
from regentime.fileformat import (
    DEMO_PATH, CavityDocument, demo_cavity, load_cavity, load_cavity_text)

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
EXAMPLES = sorted(glob.glob(os.path.join(ROOT, "cavities", "*.yaml")))

MINIMAL = """format: regentime/1
repetition_rate: 1 kHz
seed: {energy: 2 nJ, duration: 150 ps, train_rate: 80 MHz}
gain: {material: ti_sapphire, mode_radius: 0.45 mm}
pump: {mode: pulsed, energy: 9 mJ, wavelength: 527 nm, absorbed_fraction: 0.85, overlap: 0.9, lead: 150 ns}
cavity:
  - mirror: {}
  - space: 250 mm
  - pockels_cell: {crystal: bbo, length: 25 mm, quarter_wave_voltage: 3.4 kV}
  - waveplate: {retardance: quarter}
  - polarizer: {extinction_ratio: 500}
  - space: 500 mm
  - gain_medium: {length: 20 mm}
  - space: 700 mm
  - mirror:
switch: {scheme: quarter-wave, rise_time: 3.5 ns, on_latency: 48 ns}
"""


def test_examples_exist():
    names = {os.path.basename(p) for p in EXAMPLES}
    assert {"ti_sapphire_1khz.yaml", "yb_100khz_cw.yaml", "nd_ylf_ps_10hz.yaml"} <= names


@pytest.mark.parametrize("path", EXAMPLES, ids=os.path.basename)
def test_every_example_loads(path):
    cavity = load_cavity(path)
    assert isinstance(cavity, m.Cavity)
    assert cavity.source == path
    with open(path, "rb") as fh:
        assert cavity.content_hash == hashlib.sha256(fh.read()).hexdigest()[:12]
    kinds = [e.kind for e in cavity.elements]
    assert kinds[0] == kinds[-1] == "mirror"
    assert kinds.count("polarizer") == kinds.count("pockels_cell") == 1
    with open(path, encoding="utf-8") as fh:
        head = fh.read(800)
    assert "INVENTED DEMO" in head and "IEC 60825-1" in head  # marked as invented; caution


def test_demo():
    cavity = demo_cavity()
    assert cavity.source is None
    assert "built-in demo" in cavity.name
    assert os.path.isfile(DEMO_PATH)
    with open(DEMO_PATH, encoding="utf-8") as fh:
        text = fh.read()
    assert "INVENTED SCENARIO" in text
    # the demo is the Ti:sapphire example with another name
    example = load_cavity(os.path.join(ROOT, "cavities", "ti_sapphire_1khz.yaml"))
    assert cavity.elements == example.elements
    assert cavity.pump == example.pump and cavity.switch == example.switch


def test_ti_sapphire_example_values():
    c = load_cavity(os.path.join(ROOT, "cavities", "ti_sapphire_1khz.yaml"))
    assert c.wavelength == 800e-9
    assert c.pump.energy == 9e-3 and c.pump.lead == 150e-9 and c.pump.latency == 210e-9
    cell = c.elements_of(m.PockelsCell)[0]
    assert cell.quarter_wave_voltage == 3400.0 and cell.single_pass_transmission == 0.99
    wp = c.elements_of(m.Waveplate)[0]
    assert wp.retardance == 0.25 and wp.axis_angle == pytest.approx(45 * sc.degree)
    tfp = c.elements_of(m.Polarizer)[0]
    assert (tfp.extinction_ratio, tfp.transmission_p, tfp.reflection_s) == (500, 0.98, 0.995)
    total = sum(e.thickness for e in c.elements)
    assert 1.5 < total < 1.7  # "total cavity ~1.6 m" (brief)
    assert c.generator.resolution == 5e-12
    # solid-PE coax, VF 0.66 -> 5.05 ns/m (amateur-radio handbook tables, +-3 %)
    assert c.cables["pump"].delay / 3.0 == pytest.approx(5.05e-9, rel=0.03)


def test_defaults_applied():
    from regentime.materials.gain_media import GAIN_MEDIA

    c = load_cavity_text(MINIMAL, "minimal.yaml")
    assert c.name == "minimal"
    assert c.wavelength == GAIN_MEDIA["ti_sapphire"].wavelength
    assert c.seed.arrival == 0.0 and c.seed.bandwidth is None
    assert c.pump.latency == 0.0
    assert c.switch.fall_time == c.switch.rise_time == 3.5e-9
    assert c.switch.off_latency == c.switch.on_latency == 48e-9
    assert c.switch.jitter == 0.0 and math.isinf(c.switch.max_gate)
    assert (c.switch.edge, c.switch.inputs) == ("linear", "separate")
    assert dict(c.outputs) == {"switch_on": "out1", "switch_off": "out2", "pump": "out3",
                               "scope": "out4"}
    assert dict(c.cables) == {}
    assert c.dump.rule == "auto" and c.air == "air"
    assert c.gain.profile == "flat-top" and c.gain.rings == 64 and c.gain.pump_radius is None
    assert c.checks.b_integral_limit == 1.0 and c.checks.damage_intensity is None
    assert c.cleaner is None and c.scope.lead is None and c.generator.resolution is None
    e = c.elements
    assert [x.name for x in e] == ["mirror 1", "space 1", "pockels cell 1", "waveplate 1",
                                   "polarizer 1", "space 2", "gain medium 1", "space 3",
                                   "mirror 2"]
    assert [x.path for x in e][:3] == ["cavity[0].mirror", "cavity[1].space",
                                       "cavity[2].pockels_cell"]
    assert e[0].reflectivity == 1.0 and e[-1].reflectivity == 1.0
    assert e[2].contrast == 1000.0  # common practice default, documented
    assert e[2].single_pass_transmission == 1.0 and e[6].single_pass_transmission == 1.0
    assert e[3].axis_angle == pytest.approx(math.pi / 4) and e[3].material == "quartz"
    assert e[4].transmission_p == 1.0 and e[4].reflection_s == 1.0
    assert e[1].material == "air" and e[1].group_index is None
    assert c.gain.medium == GAIN_MEDIA["ti_sapphire"]


def test_overrides_land_in_the_model():
    text = MINIMAL.replace(
        "gain: {material: ti_sapphire, mode_radius: 0.45 mm}",
        "gain: {material: ti_sapphire, mode_radius: 0.45 mm, emission_cross_section: "
        "4.1e-19 cm^2, upper_state_lifetime: 3 us, profile: gaussian, pump_radius: 0.5 mm}"
    ).replace("  - space: 250 mm", "  - space: {length: 250 mm, group_index: 1.0003}") + (
        "wavelength: 790 nm\nair: vacuum\ndump: 25\n"
        "switch_extra: x\n").replace("switch_extra: x\n", "") + (
        "cables:\n  pump: {length: 3 m}\n  scope: 2 m\n"
        "checks: {damage_intensity: 5 GW/cm^2, b_integral_limit: 1}\n")
    c = load_cavity_text(text)
    assert c.gain.medium.emission_cross_section == pytest.approx(4.1e-23)
    assert c.gain.medium.upper_state_lifetime == 3e-6
    assert "cavity file" in c.gain.medium.sources["emission_cross_section"]
    assert c.gain.profile == "gaussian" and c.gain.pump_radius == 0.5e-3
    assert c.elements[1].group_index == 1.0003
    assert c.elements[5].material == "vacuum"  # top-level air: vacuum reaches the spaces
    assert c.wavelength == 790e-9 and c.dump.round_trip == 25 and c.air == "vacuum"
    assert c.cables["pump"] == m.Cable(3.0, 0.66) and c.cables["scope"].length == 2.0
    assert c.checks.damage_intensity == pytest.approx(5e13) and c.checks.b_integral_limit == 1
    assert c.source is None and len(c.content_hash) == 12


def test_gate_inputs_and_continuous_pump_outputs():
    c = load_cavity(os.path.join(ROOT, "cavities", "yb_100khz_cw.yaml"))
    assert c.switch.inputs == "gate" and c.pump.mode == "continuous"
    assert dict(c.outputs) == {"gate": "A", "scope": "B"}
    text = MINIMAL.replace("on_latency: 48 ns}", "on_latency: 48 ns, inputs: gate}")
    assert dict(load_cavity_text(text).outputs) == {"gate": "out1", "pump": "out2",
                                                    "scope": "out3"}
    # a name given by the user is skipped when defaults are handed out
    text = MINIMAL + "outputs: {pump: out1}\n"
    assert dict(load_cavity_text(text).outputs) == {"switch_on": "out2", "switch_off": "out3",
                                                    "pump": "out1", "scope": "out4"}


def test_cleaner_section():
    c = load_cavity(os.path.join(ROOT, "cavities", "nd_ylf_ps_10hz.yaml"))
    assert c.cleaner is not None
    assert c.cleaner.extinction_ratio == pytest.approx(1000.0)  # 30 dB
    assert c.cleaner.fall_time == c.cleaner.rise_time == 3e-9
    assert c.cleaner.cable == c.cables["cleaner"] and c.cleaner.output == "out5"
    assert c.outputs["cleaner"] == "out5"


def test_all_problems_reported_together():
    text = MINIMAL.replace("energy: 9 mJ", "energy: 9 ns").replace("150 ps", "-1 ps") \
        .replace("rise_time: 3.5 ns", "rise_time: 12 nS")
    with pytest.raises(InputErrors) as info:
        load_cavity_text(text, "x.yaml")
    paths = {e.path for e in info.value.errors}
    assert paths == {"pump.energy", "seed.duration", "switch.rise_time"}
    assert all(e.source == "x.yaml" and e.line for e in info.value.errors)
    assert info.value.exit_code == 2


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_cavity(str(tmp_path / "nope.yaml"))
    with pytest.raises(InputError, match="folder"):
        load_cavity(str(tmp_path))


def test_unreadable_file(tmp_path, monkeypatch):
    import regentime.fileformat.reading as loader  # where the file is opened

    path = tmp_path / "secret.yaml"
    path.write_text(MINIMAL)

    def denied(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(loader, "open", denied, raising=False)  # what a chmod 000 file gives
    with pytest.raises(InputError, match="readable file .Permission denied"):
        load_cavity(str(path))


def test_binary_junk_fixture(tmp_path):
    path = tmp_path / "junk.yaml"
    path.write_bytes(os.urandom(64) + b"\x00\xff\xfe")
    with pytest.raises(InputError) as info:
        load_cavity(str(path))
    assert "text file" in str(info.value)


def test_huge_file(tmp_path):
    path = tmp_path / "huge.yaml"
    path.write_text("# " + "x" * 1_100_000 + "\n")
    with pytest.raises(InputError, match="at most"):
        load_cavity(str(path))


def test_not_text():
    with pytest.raises(InputError):
        load_cavity_text(b"format: regentime/1")  # type: ignore[arg-type]


# ---- saving through CavityDocument --------------------------------------------------------

def _example_copy(tmp_path, name="ti_sapphire_1khz.yaml"):
    src = os.path.join(ROOT, "cavities", name)
    dst = tmp_path / name
    with open(src, "rb") as fh:
        dst.write_bytes(fh.read())
    return dst


def test_set_and_save_changes_only_that_line(tmp_path):
    path = _example_copy(tmp_path)
    before = path.read_bytes().splitlines(keepends=True)
    doc = CavityDocument.load(str(path))
    doc.set("cavity[2].pockels_cell.length", "30 mm")
    assert doc.dirty
    doc.save()
    assert not doc.dirty
    after = path.read_bytes().splitlines(keepends=True)
    assert len(after) == len(before)
    changed = [i for i, (a, b) in enumerate(zip(before, after)) if a != b]
    assert len(changed) == 1
    assert b"length: 30 mm" in after[changed[0]]
    assert after[changed[0]].replace(b"30 mm", b"25 mm") == before[changed[0]]
    assert load_cavity(str(path)).elements[2].length == pytest.approx(0.03)


def test_save_keeps_every_comment(tmp_path):
    path = _example_copy(tmp_path, "yb_100khz_cw.yaml")
    comments_before = [ln.split("#", 1)[1] for ln in path.read_text().splitlines() if "#" in ln]
    doc = CavityDocument.load(str(path))
    doc.set("pump.power", 45.0)  # an SI number is written in engineering units
    doc.set("seed.energy", "1.5 nJ")
    doc.save()
    text = path.read_text()
    comments_after = [ln.split("#", 1)[1] for ln in text.splitlines() if "#" in ln]
    assert comments_after == comments_before
    assert "power: 45 W" in text and "energy: 1.5 nJ" in text


def test_save_is_atomic_and_keeps_permissions(tmp_path):
    path = _example_copy(tmp_path)
    os.chmod(path, 0o640)
    doc = CavityDocument.load(str(path))
    doc.set("pump.energy", "10 mJ")
    doc.save()
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o640
    assert sorted(os.listdir(tmp_path)) == [path.name]  # no temporary file left


def test_save_follows_symlinks(tmp_path):
    real = _example_copy(tmp_path)
    link = tmp_path / "link.yaml"
    link.symlink_to(real)
    doc = CavityDocument.load(str(link))
    doc.set("dump", 30)
    doc.save()
    assert link.is_symlink()
    assert "dump: 30" in real.read_text()


def test_failed_save_leaves_the_old_file(tmp_path, monkeypatch):
    path = _example_copy(tmp_path)
    old = path.read_bytes()
    doc = CavityDocument.load(str(path))
    doc.set("pump.energy", "10 mJ")

    def boom(*args, **kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError):
        doc.save()
    assert path.read_bytes() == old
    assert sorted(os.listdir(tmp_path)) == [path.name]
    assert doc.dirty


def test_save_as_new_path(tmp_path):
    doc = CavityDocument.from_text(MINIMAL)
    with pytest.raises(InputError):
        doc.save()  # no file to write back to
    target = tmp_path / "new.yaml"
    doc.save(str(target))
    assert doc.source == str(target)
    assert target.read_text() == MINIMAL
