"""Edges, windows and the switching plan (sources named beside each check)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import erfinv  # general-purpose reference library

import _switch_cavity as tc  # noqa: E402

from regentime.errors import InputError  # noqa: E402
from regentime.physics import switching as sw  # noqa: E402
from regentime.planning.optics import cavity_optics  # noqa: E402
from regentime.planning.buildup_plan import plan_buildup  # noqa: E402
from regentime.planning.switching import plan_switching  # noqa: E402


def _plan(**kw):
    cav = tc.load(**kw)
    optics = cavity_optics(cav)
    return cav, optics, plan_switching(cav, optics, plan_buildup(cav, optics))


# ----- edges ------------------------------------------------------------------------------

def test_linear_edge_10_90_time_is_the_rise_time():
    # Geometry of a straight ramp: 10 % and 90 % points are 0.8 of the 0-100 % time apart.
    t = np.linspace(-5e-9, 5e-9, 200001)
    v = sw.edge(t, 0.0, 3.5e-9, "linear")
    t10, t90 = np.interp(0.1, v, t), np.interp(0.9, v, t)
    assert t90 - t10 == pytest.approx(3.5e-9, rel=1e-4)
    assert float(sw.edge(0.0, 0.0, 3.5e-9)) == pytest.approx(0.5)


def test_erf_edge_10_90_time_is_the_rise_time():
    # Normal distribution quantiles from scipy.special.erfinv: z_0.9 − z_0.1 = 2√2 erfinv(0.8).
    assert sw.ERF_10_90 == pytest.approx(2 * math.sqrt(2) * erfinv(0.8), rel=1e-12)
    t = np.linspace(-10e-9, 10e-9, 400001)
    v = sw.edge(t, 0.0, 5e-9, "erf")
    assert np.interp(0.9, v, t) - np.interp(0.1, v, t) == pytest.approx(5e-9, rel=1e-4)
    falling = sw.edge(t, 0.0, 5e-9, "erf", rising=False)
    np.testing.assert_allclose(falling, 1 - v)


def test_pulse_slices_are_a_normalised_gaussian_of_the_given_fwhm():
    # Gaussian: FWHM = 2√(2 ln 2) σ (any statistics text); weights sum to 1.  Gauss–Hermite
    # nodes integrate polynomials of degree < 2n exactly (Abramowitz & Stegun 25.4.46), so the
    # normal distribution's moments E[τ²] = σ², E[τ⁴] = 3σ⁴ come out to rounding.
    tau, w = sw.pulse_slices(150e-12)
    assert w.sum() == pytest.approx(1.0, rel=1e-12)
    sigma = math.sqrt(float(np.sum(w * tau ** 2)))
    assert sigma * 2 * math.sqrt(2 * math.log(2)) == pytest.approx(150e-12, rel=1e-10)
    assert float(np.sum(w * tau ** 4)) == pytest.approx(3 * sigma ** 4, rel=1e-10)


# ----- windows reduce to the crossing times -------------------------------------------------

@pytest.mark.parametrize("scheme", ["quarter-wave", "half-wave"])
def test_instant_edge_short_pulse_window_is_the_gap_between_crossings(scheme):
    # Crossing times by hand from the arm lengths and group indices (tc.hand_times), scipy's c.
    cav, optics, sp = _plan(scheme=scheme, rise="10 ps", pulse="1 ps", contrast=1e9, er=1e9,
                            pump="continuous", inputs="gate" if scheme == "half-wave" else "separate")
    t_out, t_back, t_rt = tc.hand_times()
    t_m = sp.seed_time
    n = sp.dump_round_trip
    if scheme == "quarter-wave":  # after the return crossing, before the next outward one
        on = (t_m + t_back, t_m + t_rt + t_out)
        off = (t_m + (n - 1) * t_rt + t_back, t_m + n * t_rt + t_out)
    else:  # between the two crossings of one double pass
        on = (t_m + t_out, t_m + t_back)
        off = (t_m + n * t_rt + t_out, t_m + n * t_rt + t_back)
    tol = 8e-12  # the 10 ps edge (12.5 ps from 0 to 100 %) narrows each end by ≤ 6.25 ps
    np.testing.assert_allclose(sp.on_window, on, atol=tol)
    np.testing.assert_allclose(sp.off_window, off, atol=tol)
    # the ideal instant edge (rise 0) and a 1 fs pulse give the crossing times themselves
    from regentime.planning.switching import switch_events

    on_ev, off_ev = switch_events(cav, optics, n, sp.full_retardance)
    for ev, want in ((on_ev, on), (off_ev, off)):
        res = sw.find_window(ev, 0.0, "linear", 1e-15)
        np.testing.assert_allclose(np.array(res.window) + t_m, want, atol=0.2e-12)


@pytest.mark.parametrize("scheme,gamma_full", [("quarter-wave", math.pi / 2), ("half-wave", math.pi)])
def test_linear_ramp_window_width_by_hand(scheme, gamma_full):
    # Derived [D] from the Jones retarder sum (Yariv & Yeh ch. 5): at a window end the crossing
    # nearest the edge sees Γ = Γ_full·v and the pass keeps cos²(Γ/2) of the ideal, so
    # cos²(Γ_full v*/2) = 0.99, v* = 2 acos(√0.99)/Γ_full, and for a short pulse the window is
    # gap − 2(½ − v*)·T₀ with T₀ = rise/0.8.  (A long gap keeps only one crossing in the ramp.)
    rise = 2e-9
    cav, optics, sp = _plan(scheme=scheme, rise="2 ns", pulse="1 ps", contrast=1e9, er=1e9, a=900,
                            e=300)
    v_star = 2 * math.acos(math.sqrt(0.99)) / gamma_full
    t0 = rise / 0.8
    gap = sp.on_gap[1] - sp.on_gap[0]
    expect = gap - 2 * (0.5 - v_star) * t0
    width = sp.on_window[1] - sp.on_window[0]
    assert width == pytest.approx(expect, abs=3e-12)
    assert sp.off_window[1] - sp.off_window[0] == pytest.approx(expect, abs=3e-12)


# ----- gate width, margin ----------------------------------------------------------------------

@pytest.mark.parametrize("scheme,k", [("quarter-wave", -1), ("half-wave", 0)])
def test_gate_width_is_whole_round_trips(scheme, k):
    # docs/definitions.md "Gate width": (N−1)·T_rt quarter-wave, N·T_rt half-wave.
    for n in (5, 17):
        cav, optics, sp = _plan(scheme=scheme, dump=n)
        assert sp.gate_width == pytest.approx((n + k) * optics.round_trip_time, abs=1e-12)
        assert sp.on_window[0] <= sp.on_edge <= sp.on_window[1]
        assert sp.off_window[0] <= sp.off_edge <= sp.off_window[1]


def test_margin_is_half_the_narrower_window_in_jitter_sigmas():
    # docs/definitions.md "Switching": margin = half the window, reported in sigmas of the rms jitter.
    cav, optics, sp = _plan(rise="3 ns", fall="5 ns")
    half = min(sp.on_window[1] - sp.on_window[0], sp.off_window[1] - sp.off_window[0]) / 2
    assert sp.margin == pytest.approx(half)
    assert sp.margin_sigma == pytest.approx(half / 100e-12)
    d = sp.to_dict()
    for key in ("scheme", "on_window_s", "off_window_s", "on_edge_s", "off_edge_s", "gate_width_s",
                "margin_s", "margin_sigma"):
        assert key in d


# ----- no window ---------------------------------------------------------------------------

def test_long_rise_time_gives_no_window_with_the_numbers():
    # Quarter-wave: the pulse is away from the cell for T_rt − (t_back − t_out) ≈ 9.4 ns (hand
    # times); a 12 ns (10–90 %) ramp, 15 ns from 0 to 100 %, cannot fit.
    cav, optics, sp = _plan(rise="12 ns")
    t_out, t_back, t_rt = tc.hand_times()
    assert sp.on_window is None
    msgs = [c.message for c in sp.checks if c.level == "error" and c.name == "window"]
    assert msgs and "no window" in msgs[0]
    assert f"{(t_rt - (t_back - t_out)) * 1e9:.3f} ns" in msgs[0]
    assert "12 ns" in msgs[0] and "driver faster than" in msgs[0]


def test_quarter_wave_cell_close_to_polarizer_in_long_arm_gives_no_window():
    # A long cell arm with the cell next to the polarizer: the pulse is away from the cell only
    # while it crosses the short gain arm, 2·(0.1 + 0.1 + 0.0178·1.78 …) m / c ≈ 1.6 ns.
    cav, optics, sp = _plan(a=1500, b=10, c=10, d=100, e=100, lg=20)
    assert sp.on_window is None and sp.off_window is None
    text = " ".join(c.message for c in sp.checks if c.level == "error")
    assert "towards the cell-side end mirror" in text


def test_half_wave_cell_close_to_end_mirror_is_never_shown_ok(tmp_path, capsys):
    # Half-wave: the edge must fall between the crossings, 2·(30 mm + cell)/c ≈ 0.48 ns here,
    # far shorter than the 3.5 ns rise time.  Feasibility is the Jones model's alone
    # (docs/timing.md, "Row status"): with a window the rows are at best MARGINAL (its margin
    # is a fraction of the 100 ps jitter), without one CANNOT BE MET and exit 3.
    from regentime.cli import main

    path = tmp_path / "hw.yaml"
    path.write_text(tc.yaml_text(scheme="half-wave", a=30, b=300, inputs="gate"))
    code = main(["plan", str(path)])
    out = capsys.readouterr().out
    assert "gap is shorter than the rise time" in out or "no window" in out
    assert ("CANNOT BE MET" in out and code == 3) or ("MARGINAL" in out and code == 0)
    gate_row = next(line for line in out.splitlines() if "gate" in line and " ns " in line)
    assert not gate_row.rstrip().endswith(" ok")


def test_no_window_exit_code_3(tmp_path, capsys):
    from regentime.cli import main

    path = tmp_path / "slow.yaml"
    path.write_text(tc.yaml_text(rise="12 ns"))
    assert main(["plan", str(path), "--format", "json"]) == 3
    import json

    data = json.loads(capsys.readouterr().out)
    assert data["switch"]["on_window_s"] is None
    assert any(c["level"] == "error" for c in data["checks"])


# ----- schemes ---------------------------------------------------------------------------------

def test_quarter_wave_scheme_without_plate_is_an_input_error():
    cav = tc.load(scheme="quarter-wave", plate="  - space: 100 mm\n")
    optics = cavity_optics(cav)
    with pytest.raises(InputError) as exc:
        plan_switching(cav, optics, plan_buildup(cav, optics))
    assert exc.value.path == "switch.scheme" and "quarter-wave plate" in exc.value.expected


def test_half_wave_scheme_with_quarter_wave_plate_is_an_input_error():
    cav = tc.load(scheme="half-wave", plate=tc.QWP.replace("{c}", "100"), pump="continuous")
    optics = cavity_optics(cav)
    with pytest.raises(InputError) as exc:
        plan_switching(cav, optics, plan_buildup(cav, optics))
    assert "no waveplate" in exc.value.expected


def test_voltage_tolerance_rows_and_ideal_shares():
    # Shares normalised to perfect optics: with C, ER = 1e9 and a short pulse they approach 1;
    # the ±1, 2, 5, 10 % rows are present and symmetric for the quarter-wave scheme (sin² law).
    cav, optics, sp = _plan(contrast=1e9, er=1e9, pulse="10 ps")
    assert sp.trapped_share == pytest.approx(1.0, abs=1e-6)
    assert sp.switching_efficiency == pytest.approx(1.0, abs=1e-6)
    errs = [r.error for r in sp.voltage_tolerance]
    for e in (-0.1, -0.05, -0.02, -0.01, 0.01, 0.02, 0.05, 0.1):
        assert e in errs
    by = {r.error: r for r in sp.voltage_tolerance}
    assert by[0.05].leak_per_round_trip == pytest.approx(math.sin(math.pi * 0.05 / 2) ** 2, rel=1e-6)
    assert by[0.1].overall < by[0.02].overall < by[0.0].overall
