"""The cavity mode of whole cavity files (planning/mode_plan.py) against closed forms.

Sources beside each check: Kogelnik & Li, Appl. Opt. 5, 1550 (1966) (two-mirror resonator,
g-parameter stability); Siegman, Lasers (1986), ch. 20-21 (Gaussian beams in resonators);
Innocenzi, Yura, Fincher & Fields, Appl. Phys. Lett. 56, 1831 (1990) and Koechner,
Solid-State Laser Engineering, ch. 7 (thermal lens).  All cavities are invented.
"""

from __future__ import annotations

import json
import math

import pytest

from regentime.cli import main
from regentime.errors import InputError
from regentime.fileformat import load_cavity_text
from regentime.materials.dispersion import refractive_index
from regentime.planning.gainsetup import gain_model
from regentime.planning.mode_plan import (
    absorbed_pump_power, plan_mode, thermal_focal_length)
from regentime.planning.plan import make_plan

LAM = 800e-9


def cavity_text(r1="1 m", r2="1 m", gap1="300 mm", gap2="300 mm", gain_extra="",
                crystal_extra="", fold="", pump="energy: 9 mJ", mode_radius="",
                cell_extra="", end_extra="") -> str:
    fold_lines = f"  - mirror: {{name: fold, {fold}}}\n  - space: 10 mm\n" if fold else ""
    return f"""format: regentime/1
repetition_rate: 1 kHz
seed: {{energy: 2 nJ, duration: 150 ps, train_rate: 80 MHz}}
gain: {{material: ti_sapphire{mode_radius}{gain_extra}}}
pump: {{mode: pulsed, {pump}, wavelength: 527 nm, absorbed_fraction: 0.85, lead: 150 ns}}
cavity:
  - mirror: {{name: end-A, radius_of_curvature: {r1}{end_extra}}}
  - space: {gap1}
  - pockels_cell: {{name: cell, crystal: bbo, length: 20 mm, quarter_wave_voltage: 3.4 kV{cell_extra}}}
  - space: 50 mm
  - waveplate: {{name: qwp, retardance: quarter}}
  - polarizer: {{name: tfp, extinction_ratio: 500}}
  - space: 100 mm
{fold_lines}  - gain_medium: {{name: crystal, length: 10 mm{crystal_extra}}}
  - space: {gap2}
  - mirror: {{name: end-B, radius_of_curvature: {r2}}}
switch: {{scheme: quarter-wave, rise_time: 3.5 ns, on_latency: 48 ns}}
"""


def _effective_length(gap1=0.3, gap2=0.3, fold=0.0) -> float:
    """Air lengths plus L/n of the cell (BBO, o) and the crystal (sapphire, e)."""
    n_bbo = float(refractive_index("bbo", LAM, axis="o"))
    n_sap = float(refractive_index("sapphire", LAM, axis="e"))
    return gap1 + 0.05 + 0.1 + fold + gap2 + 0.02 / n_bbo + 0.01 / n_sap


def test_symmetric_two_mirror_resonator_closed_form():
    # Kogelnik & Li (1966): g = 1 − L/R, half trace 2g² − 1, spot on both mirrors
    # w² = (λL/π)/sqrt(1 − g²), waist w0² = (λ/2π)·sqrt(L(2R − L)) at the centre
    # (Siegman, Lasers, ch. 19.3); L the reduced length.
    cav = load_cavity_text(cavity_text())
    mode = plan_mode(cav)
    L, R = _effective_length(), 1.0
    g = 1 - L / R
    assert mode.half_trace == pytest.approx(2 * g * g - 1, abs=1e-9)
    w_end = math.sqrt(LAM * L / math.pi / math.sqrt(1 - g * g))
    assert mode.radius_at("end-A") == pytest.approx(w_end, rel=1e-9)
    assert mode.radius_at("end-B") == pytest.approx(w_end, rel=1e-9)
    w0 = math.sqrt(LAM / (2 * math.pi) * math.sqrt(L * (2 * R - L)))
    assert min(e.radius_m for e in mode.elements) >= w0 * (1 - 1e-9)


def test_flat_concave_waist_on_flat_mirror():
    # Siegman, Lasers, ch. 19.1: flat–concave, waist on the flat mirror
    # w0² = (λ/π)·sqrt(L(R − L)).
    cav = load_cavity_text(cavity_text(r1="flat", r2="2 m"))
    L = _effective_length()
    w0 = math.sqrt(LAM / math.pi * math.sqrt(L * (2.0 - L)))
    assert plan_mode(cav).radius_at("end-A") == pytest.approx(w0, rel=1e-9)


@pytest.mark.parametrize("gap,stable", [("300 mm", True), ("1400 mm", True), ("1700 mm", False)])
def test_stability_edge_g1g2_between_0_and_1(gap, stable):
    # Kogelnik & Li (1966): stable when 0 < g1·g2 < 1; R1 = R2 = 1 m, stable for L < 2 m.
    cav = load_cavity_text(cavity_text(gap1=gap))
    g = 1 - _effective_length(gap1=float(gap.split()[0]) / 1e3)
    assert (0 < g * g < 1) == stable
    if stable:
        assert plan_mode(cav).stable
    else:
        with pytest.raises(InputError, match="unstable resonator, half trace"):
            plan_mode(cav)


def test_end_pumped_thermal_lens_formula():
    # Innocenzi et al., APL 56, 1831 (1990); Koechner ch. 7: f = π K w_p² / (P_heat dn/dT),
    # P_heat = (1 − λp/λ)·P_abs (quantum defect), P_abs = E·f_rep·η_abs for a pulsed pump.
    cav = load_cavity_text(cavity_text(gain_extra=", thermal_lens: {pump_radius: 0.5 mm, "
                                                  "dn_dt: 1.3e-5, thermal_conductivity: 33}"))
    p_abs = 9e-3 * 1e3 * 0.85  # 7.65 W, worked by hand
    assert absorbed_pump_power(cav) == pytest.approx(p_abs, rel=1e-12)
    heat = (1 - 527 / 800) * p_abs
    f = math.pi * 33 * 0.5e-3 ** 2 / (heat * 1.3e-5)  # ≈ 0.764 m by hand
    assert f == pytest.approx(0.764, rel=2e-3)
    assert thermal_focal_length(cav, p_abs) == pytest.approx(f, rel=1e-12)
    # Koechner ch. 7, uniformly heated side-pumped rod: f = K A / (P_heat dn/dT / 2)
    side = load_cavity_text(cavity_text(gain_extra=", thermal_lens: {pump_radius: 0.5 mm, "
                                                   "dn_dt: 1.3e-5, thermal_conductivity: 33, "
                                                   "pumping: side}"))
    assert thermal_focal_length(side, p_abs) == pytest.approx(2 * f, rel=1e-12)


def test_given_focal_length_scales_as_inverse_power_and_has_a_stable_range():
    # Thermal lens f ∝ 1/P_heat (Innocenzi 1990); the cavity with R = 1 m mirrors turns
    # unstable when the lens gets strong enough: a finite upper edge inside the scan.
    cav = load_cavity_text(cavity_text(gain_extra=", thermal_lens: 600 mm"))
    p = absorbed_pump_power(cav)
    assert thermal_focal_length(cav, 2 * p) == pytest.approx(0.3, rel=1e-12)
    mode = plan_mode(cav)
    zone = [z for z in mode.stable_range if z[0] <= p <= z[1]]
    assert zone, mode.stable_range
    # each inner edge found by the scan: the same cavity with the lens scaled to that power
    # (f = 600 mm · p / P) is stable just inside the zone and unstable just outside it
    edges = [e for z in mode.stable_range for e in z if 0.0 < e < mode.scan_max_W * 0.999]
    assert edges
    for edge in edges:
        states = []
        for power in (edge * 0.99, edge * 1.01):
            f_mm = 600 * p / power
            c = load_cavity_text(cavity_text(gain_extra=f", thermal_lens: {f_mm!r} mm"))
            try:
                states.append(plan_mode(c).stable)
            except InputError:
                states.append(False)
        assert states[0] != states[1]


def test_fold_angle_gives_tangential_and_sagittal_focal_lengths():
    # Kogelnik et al., IEEE JQE 8, 373 (1972): f_t = R cosθ/2, f_s = R/(2cosθ): the
    # tangential plane of a 500 mm fold at 20° equals a normal-incidence fold of R cos20°.
    base = dict(r1="flat", r2="flat")
    tilted = plan_mode(load_cavity_text(cavity_text(fold="radius_of_curvature: 500 mm, "
                                                         "angle_of_incidence: 20 deg", **base)))
    c = math.cos(math.radians(20))
    flat_t = plan_mode(load_cavity_text(cavity_text(fold=f"radius_of_curvature: {500 * c!r} mm",
                                                    **base)))
    flat_s = plan_mode(load_cavity_text(cavity_text(fold=f"radius_of_curvature: {500 / c!r} mm",
                                                    **base)))
    assert tilted.two_planes
    assert tilted.half_trace == pytest.approx(flat_t.half_trace, abs=1e-12)
    assert tilted.half_trace_sagittal == pytest.approx(flat_s.half_trace, abs=1e-12)
    x = tilted.crystal
    assert x.radius_tangential_m == pytest.approx(flat_t.crystal.radius_m, rel=1e-9)
    assert x.radius_sagittal_m == pytest.approx(flat_s.crystal.radius_m, rel=1e-9)
    assert x.radius_m == max(x.radius_tangential_m, x.radius_sagittal_m)


def test_brewster_crystal_reduced_distances():
    # Kogelnik et al. 1972: a Brewster plate is L/n in the sagittal plane (the same as a
    # normal-incidence crystal) and L/n³ in the tangential plane (as L/n of a crystal of
    # length L/n²).
    n = float(refractive_index("sapphire", LAM, axis="e"))
    brew = plan_mode(load_cavity_text(cavity_text(crystal_extra=", brewster: true")))
    plain = plan_mode(load_cavity_text(cavity_text()))
    short = plan_mode(load_cavity_text(cavity_text().replace(
        "length: 10 mm}", f"length: {10 / n**2!r} mm}}")))
    assert brew.half_trace_sagittal == pytest.approx(plain.half_trace, abs=1e-12)
    assert brew.half_trace == pytest.approx(short.half_trace, abs=1e-12)


def test_computed_mode_feeds_the_extraction_and_typed_mode_warns():
    cav = load_cavity_text(cavity_text())
    w = plan_mode(cav).radius_at("crystal")
    assert gain_model(cav).grid.mode_radius == pytest.approx(w, rel=1e-12)
    typed = load_cavity_text(cavity_text(mode_radius=f", mode_radius: {w * 1.2e3!r} mm"))
    assert gain_model(typed).grid.mode_radius == pytest.approx(1.2 * w, rel=1e-12)
    msgs = [c.message for c in make_plan(typed).checks if c.name == "mode"]
    assert msgs and "differs by 20%" in msgs[0]
    close = load_cavity_text(cavity_text(mode_radius=f", mode_radius: {w * 1.05e3!r} mm"))
    assert not [c for c in make_plan(close).checks if c.name == "mode"]


@pytest.mark.parametrize("diameters,level", [(3.5, None), (2.5, "warning"), (1.5, "error")])
def test_aperture_clipping_thresholds(diameters, level):
    # Common practice: clear aperture ≥ 3 mode diameters (warning below), 2 (error below).
    w = plan_mode(load_cavity_text(cavity_text())).radius_at("cell")
    cav = load_cavity_text(cavity_text(cell_extra=f", aperture: {2 * w * diameters * 1e3!r} mm"))
    got = [c.level for c in plan_mode(cav).checks if c.name == "aperture"]
    assert got == ([] if level is None else [level])


def test_unstable_cavity_is_exit_2_naming_half_trace_and_elements(tmp_path, capsys):
    path = tmp_path / "unstable.yaml"
    path.write_text(cavity_text(gain_extra=", thermal_lens: 50 mm"))
    assert main(["plan", str(path)]) == 2
    err = capsys.readouterr().err
    assert "unstable resonator, half trace (A+D)/2 = " in err
    assert "end-A (R 1000 mm)" in err and "thermal lens f 50 mm" in err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_mode_radius_missing_without_curvature_is_exit_2(tmp_path, capsys):
    path = tmp_path / "flat.yaml"
    path.write_text(cavity_text(r1="flat", r2="flat"))
    assert main(["plan", str(path)]) == 2
    assert "gain.mode_radius: missing" in capsys.readouterr().err


def test_mode_command_json(tmp_path, capsys):
    path = tmp_path / "c.yaml"
    path.write_text(cavity_text(gain_extra=", thermal_lens: {pump_radius: 1 mm}"))
    png = tmp_path / "mode.png"
    assert main(["mode", str(path), "--format", "json", "--plot", str(png)]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["stable"] is True and abs(d["half_trace"]) < 1
    names = [e["name"] for e in d["elements"]]
    assert names == ["end-A", "cell", "qwp", "tfp", "crystal", "end-B"]
    plan = json.loads(_plan_json(capsys, str(path)))["cavity_mode"]
    assert plan["elements"] == d["elements"]
    assert d["thermal_focal_length_m"] > 0 and d["stable_range"][0][0] == 0.0
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _plan_json(capsys, path):
    assert main(["plan", path, "--format", "json"]) in (0, 3)  # short demo cavity: no switch window
    return capsys.readouterr().out


def test_bad_curvature_value_names_the_key(tmp_path, capsys):
    path = tmp_path / "bad.yaml"
    path.write_text(cavity_text(r1="500"))
    assert main(["mode", str(path)]) == 2
    err = capsys.readouterr().err
    assert "cavity[0].mirror.radius_of_curvature" in err and len(err.strip().splitlines()) == 1
