"""Stability maps, noise transfer, Monte-Carlo and the plan note (issue 6).

Outside sources beside each check: M. Grishin, Opt. Express 15, 9434 (2007) and M. Grishin,
V. Gulbinas, A. Michailovas, Opt. Express 17, 15700 (2009) (qualitative behaviour of
continuously pumped regens, docs/references.md "Regen dynamics"); the small-signal limit of
Frantz–Nodvik (J. Appl. Phys. 34, 2346 (1963)): output ∝ input; first-order propagation of
uncertainty (JCGM 100:2008, GUM, eq. 10) for the Monte-Carlo of independent shots.
The cavities are invented test scenarios (tests/_stability_cavity.py).
"""

from __future__ import annotations

import json

import numpy as np
import pytest

import _stability_cavity as sc  # noqa: E402

from regentime.planning.optics import cavity_optics  # noqa: E402
from regentime.planning import stability as st  # noqa: E402
from regentime.planning import steady  # noqa: E402
from regentime.planning.buildup_plan import plan_buildup  # noqa: E402
from regentime.planning.gainsetup import gain_model, round_trip_path  # noqa: E402


@pytest.fixture(scope="module")
def cav(tmp_path_factory):
    return sc.load(sc.CW_FLAT, tmp_path_factory.mktemp("flat"))


@pytest.fixture(scope="module")
def buildup(cav):
    return plan_buildup(cav, cavity_optics(cav))


def _onset(periods: np.ndarray, values: np.ndarray):
    bad = np.flatnonzero(periods != 1)
    return values[bad[0]] if bad.size else None


def test_low_rate_is_period_one_everywhere(cav):
    # f_rep·τ ≪ 1 (here ≤ 0.09 with τ = 90 µs): the gain recovers fully, one stable energy
    # (Grishin 2007, qualitative)
    m = st.stability_map(cav, np.arange(1, 81), "rate", [100.0, 300.0, 1000.0])
    assert (m.period == 1).all()
    assert np.allclose(m.energy_min_J, m.energy_max_J, rtol=1e-4)


def test_rising_rate_gives_period_two_then_more(cav):
    # fixed N, strong gain: raising the rate gives period 2 first and then more complex
    # behaviour (Grishin 2007; Grishin et al. 2009)
    rates = np.linspace(10e3, 200e3, 96)
    m = st.stability_map(cav, [30], "rate", rates)
    p = m.period[0]
    first = np.flatnonzero(p != 1)[0]
    assert p[:first].tolist() == [1] * first and p[first] == 2
    later = p[first:]
    assert np.any((later >= 4) | (later == 0))  # period 4 and more, or irregular
    assert np.flatnonzero((later >= 4) | (later == 0))[0] > 0  # ... after the period-2 region


def test_doubled_region_is_a_band_in_round_trips(cav):
    # at a fixed rate, against N the period-2 region is a band with period 1 on both sides
    # (Grishin 2007; Grishin et al. 2009)
    m = st.stability_map(cav, np.arange(1, 61), "rate", [40e3])
    p = m.period[:, 0]
    doubled = np.flatnonzero(p != 1)
    assert doubled.size >= 3
    assert np.all(np.diff(doubled) == 1)  # one contiguous band
    assert p[doubled[0] - 1] == 1 and p[doubled[-1] + 1] == 1
    assert 2 in p[doubled].tolist()


def test_more_seed_moves_onset_to_higher_rate(cav):
    # more seed energy moves the onset of doubling to a higher rate (Grishin et al. 2009;
    # docs/references.md): here 1 nJ vs 30 nJ at N = 20
    rates = np.linspace(10e3, 120e3, 111)
    lo = st.stability_map(cav, [20], "rate", rates, seed=1e-9)
    hi = st.stability_map(cav, [20], "rate", rates, seed=30e-9)
    f_lo, f_hi = _onset(lo.period[0], rates), _onset(hi.period[0], rates)
    assert f_lo is not None and f_hi is not None
    assert f_hi > f_lo * 1.1


def test_seed_axis_agrees_with_rate_axis(cav):
    # the same point reached through the seed axis and through the rate axis
    a = st.stability_map(cav, [12, 20], "seed", [1e-9, 3e-9], rate=60e3)
    b = st.stability_map(cav, [12, 20], "rate", [60e3], seed=3e-9)
    assert a.period[:, 1].tolist() == b.period[:, 0].tolist()
    assert np.allclose(a.energy_J[:, 1], b.energy_J[:, 0], rtol=1e-5)


def test_pump_axis_lower_pump_is_more_stable(cav):
    # less pump, less gain: fewer doubled points at the same rate (Grishin 2007: the
    # doubling needs strong gain)
    m = st.stability_map(cav, np.arange(5, 40, 2), "pump", [8.0, 30.0], rate=60e3)
    assert (m.period[:, 0] != 1).sum() < (m.period[:, 1] != 1).sum()


def test_map_json_shape_and_keys(cav):
    from regentime.reports.stability_report import stability_json

    m = st.stability_map(cav, [5, 10, 15], "rate", [20e3, 50e3, 90e3, 150e3], file_round_trip=10)
    d = json.loads(stability_json(m))
    assert d["rates_Hz"] == [20e3, 50e3, 90e3, 150e3]
    assert d["round_trips"] == [5, 10, 15]
    for key in ("period", "energy_J", "energy_min_J", "energy_max_J"):
        assert len(d[key]) == 3 and all(len(row) == 4 for row in d[key])
    assert d["file_setting"]["index"] == [1, 1]
    assert "IEC 60825-1" in d["cautions"][0]


def test_rounds_that_do_not_fit_are_flagged(cav):
    gm, path = gain_model(cav), round_trip_path(cav, cavity_optics(cav))
    f = 1.0 / (50 * path.dt)  # exactly 50 round trips per period
    m = st.stability_map(cav, [40, 60], "rate", [f])
    assert m.period[0, 0] >= 0 and m.period[1, 0] == st.PERIOD_NOT_FIT
    assert np.isnan(m.energy_J[1, 0])


def test_interrupt_keeps_what_was_done(cav, monkeypatch):
    # Ctrl-C during a map: the points done so far are kept, the rest marked −2
    monkeypatch.setattr(st, "_CHUNK", 100)
    calls = []

    def progress(done, total):
        calls.append(done)
        if done >= 200:
            raise KeyboardInterrupt

    m = st.stability_map(cav, np.arange(1, 41), "rate", np.linspace(10e3, 100e3, 20), on_progress=progress)
    assert m.interrupted
    assert (m.period == st.PERIOD_NOT_DONE).sum() == 800 - 200
    assert ((m.period >= 0).sum()) == 200


def test_pulsed_pump_is_period_one_by_construction(tmp_path):
    cav = sc.load(sc.PULSED, tmp_path)
    m = st.stability_map(cav, np.arange(1, 30), "rate", [1e3, 50e3])
    assert (m.period == 1).all()
    assert np.allclose(m.energy_J[:, 0], m.energy_J[:, 1])
    assert any("period 1 by construction" in n for n in m.notes)


def test_noise_transfer_is_the_plans(cav, buildup):
    nt = st.noise_transfer(cav, buildup=buildup)
    assert np.array_equal(nt.s_pump, buildup.sensitivity_pump, equal_nan=True)
    assert np.array_equal(nt.s_seed, buildup.sensitivity_seed, equal_nan=True)
    # small-signal limit of Frantz–Nodvik (output ∝ input): after one round trip from a 1 nJ
    # seed the output is linear in the seed, S_seed = 1 within 1e-3
    assert nt.s_seed[1] == pytest.approx(1.0, abs=1e-3)


def test_noise_transfer_against_a_direct_difference(cav):
    # S_pump at a period-1 N from two exact steady states with the pump ±1 % (an independent
    # difference with a different step from the plan's ±0.1 %; agreement to 1e-2 absolute)
    nt = st.noise_transfer(cav)
    n = 30
    assert abs(nt.slope[n]) < 1
    gm, path = gain_model(cav), round_trip_path(cav, cavity_optics(cav))
    outs = []
    for f in (1.01, 0.99):
        _, _, o = steady.fixed_points(gm, path, np.array([cav.seed.energy]), np.array([n]), 1 / cav.repetition_rate,
                                      pump_rate=np.array([gm.pump_rate * f]))
        outs.append(o[0])
    s = (np.log(outs[0]) - np.log(outs[1])) / (np.log(1.01) - np.log(0.99))
    assert s == pytest.approx(nt.s_pump[n], abs=1e-2)


def test_monte_carlo_reproducible_and_close_to_linear(cav, buildup):
    kw = dict(chains=16, shots=40, buildup=buildup)
    a = st.monte_carlo(cav, 30, 0.01, random_seed=5, **kw)
    b = st.monte_carlo(cav, 30, 0.01, random_seed=5, **kw)
    c = st.monte_carlo(cav, 30, 0.01, random_seed=6, **kw)
    assert a.rms_relative == b.rms_relative and a.mean_J == b.mean_J
    assert a.rms_relative != c.rms_relative
    assert a.period == 1 and 0 < a.rms_relative < 0.05


def test_monte_carlo_pulsed_follows_linear_propagation(tmp_path):
    # independent shots (pulsed pump): output rms ≈ |S_pump|·σ for small σ (GUM eq. 10)
    cav = sc.load(sc.PULSED, tmp_path)
    mc = st.monte_carlo(cav, 20, 0.002, random_seed=1, chains=64, shots=100)
    assert mc.rms_relative == pytest.approx(mc.linear_estimate, rel=0.05)


def test_plan_note_names_nearest_period_one(cav, buildup):
    # the auto rule keeps to period-1 round trips; the largest (unstable) fixed-point output of
    # this invented cavity lies in the doubled band at 50 kHz: switch out there on purpose
    from dataclasses import replace

    n_top = int(np.nanargmax(buildup.output))
    assert buildup.period == 1 and abs(buildup.slope[n_top]) >= 1
    cav = replace(cav, dump=n_top)
    buildup = plan_buildup(cav, cavity_optics(cav))
    note = st.plan_stability_note(cav, cavity_optics(cav), buildup)
    assert buildup.period != 1
    assert note.checks and note.checks[0].level == "warning"
    assert note.nearest_below is not None and note.nearest_above is not None
    gm, path = buildup.gain, buildup.path
    per = 1 / cav.repetition_rate
    # the named round trips are period 1 by direct iteration, the dump's neighbours towards
    # them are not
    for n in (note.nearest_below, note.nearest_above):
        assert steady.iterate_shots(gm, path, cav.seed.energy, n, per).period == 1
    assert steady.iterate_shots(gm, path, cav.seed.energy, note.nearest_above - 1, per).period != 1
    assert f"N = {note.nearest_below}" in note.checks[0].message


def test_plan_note_is_fast(cav, buildup):
    import time

    t = time.perf_counter()
    st.plan_stability_note(cav, cavity_optics(cav), buildup)
    assert time.perf_counter() - t < 0.2


def test_local_map_marks_the_file_point(cav):
    m = st.local_map(cav, 18, n_span=5, n_rates=11)
    i, j = m.file_point
    assert m.round_trips[i] == 18 and m.rates_Hz[j] == pytest.approx(cav.repetition_rate)


def test_ring_memory_map_runs_for_gaussian(tmp_path):
    cav = sc.load(sc.CW_GAUSS, tmp_path)
    m = st.stability_map(cav, [10, 30], "rate", [1e3, 60e3], ring_memory=True)
    assert m.ring_memory and (m.period[:, 0] == 1).all()  # f·τ ≪ 1 column (Grishin 2007)
