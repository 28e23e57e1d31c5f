"""Round-trip time and the cell-arm geometry, against scipy.constants and hand calculations."""

import pytest
from scipy.constants import c  # CODATA/SI value of the speed of light (general-purpose library)

from regentime.fileformat import load_cavity_text
from regentime.planning.optics import cavity_optics

HEADER = """
format: regentime/1
name: test cavity
wavelength: 800 nm
repetition_rate: 1 kHz
air: {air}
seed: {{energy: 1 nJ, duration: 100 ps, train_rate: 80 MHz}}
gain: {{material: ti_sapphire, mode_radius: 0.5 mm}}
pump: {{mode: pulsed, energy: 5 mJ, wavelength: 532 nm, absorbed_fraction: 0.9, overlap: 0.9, lead: 100 ns}}
switch: {{scheme: quarter-wave, rise_time: 3 ns, on_latency: 40 ns}}
"""


def cavity(elements: str, air: str = "vacuum"):
    return load_cavity_text(HEADER.format(air=air) + "cavity:\n" + elements)


VACUUM_1500 = """
  - mirror: {reflectivity: 100 %}
  - space: 200 mm
  - pockels_cell: {crystal: bbo, length: 20 mm, quarter_wave_voltage: 3 kV, group_index: 1}
  - space: 100 mm
  - waveplate: {retardance: quarter, axis: 45 deg}
  - space: 180 mm
  - polarizer: {extinction_ratio: 500, transmission_p: 100 %, reflection_s: 100 %}
  - space: 490 mm
  - gain_medium: {length: 20 mm, group_index: 1}
  - space: 490 mm
  - mirror: {reflectivity: 100 %}
"""


def test_vacuum_round_trip_1p5_m():
    # docs/references.md: a 1.5 m linear cavity in vacuum has T_rt = 2L/c = 10.007 ns (scipy.constants.c)
    o = cavity_optics(cavity(VACUUM_1500))
    assert o.optical_path == pytest.approx(1.5, abs=1e-12)
    assert o.round_trip_time == pytest.approx(2 * 1.5 / c, rel=1e-12)
    assert o.round_trip_time == pytest.approx(10.007e-9, abs=0.5e-12)


def test_crystal_group_index_adds_its_delay():
    # T_rt = 2 Σ n_g L / c: a 20 mm sapphire crystal (extraordinary axis for Ti:sapphire) adds
    # 2·(n_g − 1)·L/c.  n_g from the Malitson–Dodge formula (docs/references.md); vacuum elsewhere.
    from regentime.materials.dispersion import group_index

    el = VACUUM_1500.replace("gain_medium: {length: 20 mm, group_index: 1}", "gain_medium: {length: 20 mm}")
    o = cavity_optics(cavity(el))
    ng = group_index("sapphire", 800e-9, axis="e")
    assert 1.75 < ng < 1.80
    assert o.round_trip_time == pytest.approx(2 * (1.48 + 0.02 * ng) / c, rel=1e-12)


def test_air_group_index_about_1p0003():
    # docs/references.md: group index of air near 1.0003 in the near infrared (Ciddor 1996)
    o_air = cavity_optics(cavity(VACUUM_1500, air="air"))
    o_vac = cavity_optics(cavity(VACUUM_1500, air="vacuum"))
    ratio = o_air.round_trip_time / o_vac.round_trip_time
    assert ratio == pytest.approx(1.0003, abs=5e-5)


def test_cell_crossing_times_by_hand():
    # Hand calculation from the arm lengths (vacuum, cell group index forced to 1):
    # cell centre 100 + 10 + 180 = 290 mm from the polarizer; cell arm 200+20+100+180 = 500 mm.
    o = cavity_optics(cavity(VACUUM_1500))
    t_out, t_back = o.cell_crossings
    assert t_out == pytest.approx(0.290 / c, rel=1e-12)
    assert t_back == pytest.approx((2 * 0.500 - 0.290) / c, rel=1e-12)
    assert o.cell_arm_time == pytest.approx(2 * 0.5 / c, rel=1e-12)
    assert o.gain_arm_time == pytest.approx(2 * 1.0 / c, rel=1e-12)
    assert not o.crystal_in_cell_arm


def test_every_element_crossed_twice_end_mirrors_once():
    # docs/definitions.md "Round trip": every element between the end mirrors twice, each end mirror once,
    # the polarizer twice in transmission.
    o = cavity_optics(cavity(VACUUM_1500))
    names = [p.element.index for p in o.passes]
    for i in range(1, 10):
        assert names.count(i) == 2, i
    assert names.count(0) == 1 and names.count(10) == 1
