"""Contrast: leakage pre-pulses, post-pulses, seed leakage, cleaner, inverse target.

Every check names its outside source beside it.  The cavities are the project's invented demo
files (cavities/*.yaml); variants are made with dataclasses.replace.
"""

from __future__ import annotations

import json
import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from scipy.constants import c as C_LIGHT

from regentime.planning import cell_model
from regentime.fileformat import load_cavity
from regentime.model import Cable, Cleaner, GainElement, PockelsCell, Polarizer
from regentime.physics import contrast as pc
from regentime.planning.optics import cavity_optics
from regentime.planning import contrast as pcon
from regentime.planning import contrast_target as pcon_target
from regentime.planning.buildup_plan import plan_buildup
from regentime.planning.plan import make_plan

ROOT = Path(__file__).resolve().parents[1]
TI = ROOT / "cavities" / "ti_sapphire_1khz.yaml"
ND = ROOT / "cavities" / "nd_ylf_ps_10hz.yaml"


_with = pcon_target.cavity_with  # the planner's own "same cavity, other ER/contrast"


def _ideal(cavity):
    """Optics, build-up and contrast with ideal (instant, exact) switching: no switching plan."""
    optics = cavity_optics(cavity)
    b = plan_buildup(cavity, optics)
    return optics, b, pcon.plan_contrast(cavity, optics, b, None)


@pytest.fixture(scope="module")
def ti():
    return load_cavity(str(TI))


@pytest.fixture(scope="module")
def nd():
    return load_cavity(str(ND))


# ----- the polarizer port ------------------------------------------------------------------


def test_port_share_is_one_over_extinction_of_the_blocked_polarisation():
    # Definition of extinction ratio; Jones polarizer diag(t_pass, t_block) (DiMarzio, Optics
    # for Engineers, ch. 6): the reflected port diag(√(R_s/ER), √R_s) acting on a P field
    # passes |√(R_s/ER)|² = R_s/ER of it, on an S field R_s.
    r_s, er = 0.995, 500.0
    port = np.diag([math.sqrt(r_s / er), math.sqrt(r_s)])
    p_field, s_field = np.array([1.0, 0.0]), np.array([0.0, 1.0])
    assert pc.port_share(r_s, er, 0.0) == pytest.approx(np.sum(np.abs(port @ p_field) ** 2), rel=1e-12)
    assert pc.port_share(r_s, er, 1.0) == pytest.approx(np.sum(np.abs(port @ s_field) ** 2), rel=1e-12)
    assert pc.port_share(r_s, er, 0.0) == pytest.approx(r_s / er, rel=1e-12)
    # an incoherent mixture adds intensities (Stokes/Mueller: unpolarised light, DiMarzio ch. 6)
    assert pc.port_share(r_s, er, 0.3) == pytest.approx(0.3 * r_s + 0.7 * r_s / er, rel=1e-12)
    assert pc.port_share(r_s, math.inf, 0.0) == 0.0
    with pytest.raises(ValueError):
        pc.port_share(r_s, er, 1.5)


def test_leak_per_return_without_cell_depolarisation_is_rs_over_er(ti):
    # docs/definitions.md "Contrast" / definition of extinction ratio: a purely P pulse leaks R_s/ER.
    cav = _with(ti, contrast=math.inf)
    optics, _, res = _ideal(cav)
    pol = optics.polarizer
    assert res.leak_per_return == pytest.approx(pol.reflection_s / pol.extinction_ratio, rel=1e-9)


# ----- leakage pre-pulses ------------------------------------------------------------------


@pytest.mark.parametrize("crystal_in_cell_arm", [False, True])
def test_nearest_pre_pulse_ratio_from_the_buildup_table(ti, crystal_in_cell_arm):
    # Issue 4 / docs/definitions.md "Contrast": for ideal switching the nearest pre-pulse ratio is
    # E_N·T_ca·R_s / (ℓ·E_{N−1}·T_ca) — E_k from the build-up table, T_ca the cell-arm double
    # pass (with its gain when the crystal sits in the cell arm).  The build-up table's own
    # "output if dumped after k" is E_k·T_ca(k)·R_s, which gives E_k·T_ca(k) without our code.
    cav = ti
    if crystal_in_cell_arm:  # move the crystal next to the cell, keep everything else
        els = list(ti.elements)
        gi = next(i for i, e in enumerate(els) if isinstance(e, GainElement))
        crystal = els.pop(gi)
        ci = next(i for i, e in enumerate(els) if isinstance(e, PockelsCell))
        els.insert(ci, crystal)
        cav = replace(ti, elements=tuple(els))
    optics, b, res = _ideal(cav)
    assert optics.crystal_in_cell_arm is crystal_in_cell_arm
    n = b.dump_round_trip
    r_s = optics.polarizer.reflection_s
    main = b.output[n]
    back = lambda k: b.output[k] / r_s  # noqa: E731  E_k · T_ca(k)
    if not crystal_in_cell_arm:  # then T_ca is the passive double pass
        t_ca = optics.passive_transmission("cell")
        assert back(n - 1) == pytest.approx(b.result.energy[n - 1] * t_ca, rel=1e-12)
    expected = main / (res.leak_per_return * back(n - 1))
    assert res.nearest_pre_ratio == pytest.approx(expected, rel=1e-9)
    # every pre-pulse k < N likewise: ℓ·E_{N−k}·T_ca
    for s in res.pre_pulses:
        if s.index < n:
            assert s.energy == pytest.approx(res.leak_per_return * back(n - s.index), rel=1e-9)
    # the last one is the injection round trip's leak: ℓ·E_0·T_ca, E_0 = seed·R_s (docs/definitions.md)
    last = res.pre_pulses[-1]
    assert last.index == n
    if not crystal_in_cell_arm:
        assert last.energy == pytest.approx(
            res.leak_per_return * cav.seed.energy * r_s * optics.passive_transmission("cell"), rel=1e-9)


def test_pre_pulses_are_spaced_by_the_round_trip_time(nd):
    # Issue 4: leakage satellites at −k·T_rt.
    p = make_plan(nd)
    res = p.contrast
    times = np.array([s.time for s in res.pre_pulses])
    assert np.allclose(np.diff(times), -p.optics.round_trip_time, rtol=0, atol=1e-15)
    assert times[0] == pytest.approx(-p.optics.round_trip_time, rel=1e-12)
    trig = np.array([s.time_from_trigger for s in res.pre_pulses])
    assert np.allclose(trig - times, res.main_time, rtol=0, atol=1e-12)
    # the worst pre-pulse is by definition no cleaner than the nearest
    assert res.worst_pre_ratio <= res.nearest_pre_ratio
    assert res.worst_pre_ratio == min(s.ratio for s in res.pre_pulses)


def test_main_pulse_time_is_the_switch_out_round_trip(ti):
    # docs/definitions.md "Build-up energies": round trip 1 starts when the seed pulse t_m is reflected
    # into the cell arm; the pulse leaves after N round trips and one more cell-arm pass.
    p = make_plan(ti)
    expected = (p.switching.seed_time + p.buildup.dump_round_trip * p.optics.round_trip_time
                + p.optics.cell_arm_time)
    assert p.contrast.main_time == pytest.approx(expected, rel=1e-12)


def test_perfect_extinction_and_contrast_leave_no_leakage_pre_pulses(ti):
    # Issue 4: with perfect extinction and contrast there are no leakage pre-pulses; the JSON
    # writes their infinite ratio as null (JSON has no infinity, RFC 8259 §6).
    cav = _with(ti, extinction=math.inf, contrast=math.inf)
    _, _, res = _ideal(cav)
    assert res.leak_per_return == 0.0
    assert all(s.energy == 0.0 and math.isinf(s.ratio) for s in res.pre_pulses)
    assert math.isinf(res.nearest_pre_ratio) and math.isinf(res.worst_pre_ratio)
    d = res.to_dict()
    text = json.dumps(d, allow_nan=False)  # fails on any inf/nan left in
    assert d["nearest_pre_ratio"] is None and d["pre_pulses"][0]["ratio"] is None
    assert "null" in text
    # and an exact instant switch then leaves nothing in the cavity: no post-pulse energy
    assert res.left_in_cavity == pytest.approx(0.0, abs=1e-15)
    assert all(s.energy == 0.0 for s in res.post_pulses)


def test_pre_pulse_ratios_scale_as_one_over_the_leak(ti):
    # Pre-pulse k = ℓ·E_{N−k}·T_ca (docs/definitions.md): the build-up does not depend on ℓ here, so a
    # leak twice as large halves every ratio (linearity of the definition).
    optics, b, res = _ideal(ti)
    sh = pcon.polarisation_shares(ti, optics)
    res2 = pcon.plan_contrast(ti, optics, b, None, shares=replace(sh, leak=2 * sh.leak))
    for a, c in zip(res.pre_pulses, res2.pre_pulses):
        assert c.ratio == pytest.approx(a.ratio / 2, rel=1e-12)


# ----- post-pulses -------------------------------------------------------------------------


def test_first_post_pulse_follows_the_small_signal_gain_left(nd):
    # Frantz–Nodvik small-signal limit (Frantz & Nodvik 1963; Koechner ch. 4): for
    # J_in ≪ J_sat/G0 a crossing multiplies the fluence by G0 = exp(g).  The leftover after
    # the switch-out is tiny, so post-pulse 1 = left·E_back·T_p²·T_gain-arm·G²·T_ca·q_off,
    # g the log gain left after the output pass.  This cavity has a Gaussian mode: ring by
    # ring, the energy gain of a crossing is Σ_i w_i exp(g_i), w_i the mode's energy share of
    # ring i (the mode shape is re-imposed at each crossing, docs/definitions.md "Gain").
    p = make_plan(nd)
    res, optics, b = p.contrast, p.optics, p.buildup
    sw = p.switching
    hist = pcon.stored_history(nd, b, sw.seed_time, optics.cell_arm_time)
    gm = b.gain
    w = gm.grid.mode * gm.grid.area
    assert w.sum() == pytest.approx(1.0, rel=1e-9)
    g_rings = (hist.j_after - gm.j_tr) / gm.j_sat
    gain = float(np.sum(w * np.exp(g_rings)))
    t_rest = optics.passive_transmission("gain") * optics.polarizer.transmission_p ** 2
    t_ca = optics.passive_transmission("cell")
    expected = res.left_in_cavity * hist.back[-1] * t_rest * gain ** 2 * t_ca * res.post_out
    first = res.post_pulses[0]
    assert first.index == 1
    assert first.time == pytest.approx(optics.round_trip_time, rel=1e-12)
    assert first.energy == pytest.approx(expected, rel=1e-3)
    # post-pulses are listed until one falls below 1e-9 of the main pulse (issue 4)
    assert all(s.energy >= pcon.POST_FLOOR * res.main_energy for s in res.post_pulses[1:])
    assert np.allclose(np.diff([s.time for s in res.post_pulses]), optics.round_trip_time, rtol=1e-9)


def test_left_in_cavity_inverts_the_port_share(ti):
    # Port share q = p_on·[s + (1 − s)/ER] (definition of extinction ratio); solving for s and
    # putting it back must return the same ejected share.
    optics, _, _ = _ideal(ti)
    sh = pcon.polarisation_shares(ti, optics)
    er = optics.polarizer.extinction_ratio
    for ejected in (0.5, 0.9, 0.99):
        left = pcon.left_in_cavity(ti, sh, ejected)
        s = 1 - left
        assert sh.on_keep * (s + (1 - s) / er) == pytest.approx(ejected, rel=1e-12)
    assert pcon.left_in_cavity(ti, sh, None) == sh.off_keep


# ----- seed leakage ------------------------------------------------------------------------


def test_seed_leak_is_spaced_by_the_oscillator_period(ti):
    # Issue 4: seed satellites at the oscillator spacing 1/train_rate.
    p = make_plan(ti)
    seeds = p.contrast.seed_leak
    assert len(seeds) >= 4
    dt = 1.0 / ti.seed.train_rate
    by_path = {}
    for s in seeds:
        by_path.setdefault(s.note, []).append(s)
    for group in by_path.values():
        t = np.array([s.time for s in group])
        m = np.array([s.index for s in group])
        assert np.allclose(np.diff(t), np.diff(m) * dt, rtol=0, atol=1e-15)
    assert all(abs(s.time) <= p.contrast.summary.span for s in seeds)


def test_quarter_wave_seed_after_switch_out_gets_one_round_trip_of_gain(ti):
    # Quarter-wave scheme, cell off: the seed makes one round trip (issue 4).  Small-signal
    # Frantz–Nodvik (G0 = e^g per crossing) with the gain left after the switch-out, and
    # the Jones share for R_s in, two off-state cell-arm passes, T_p twice, R_s out.
    p = make_plan(ti)
    res, optics, b = p.contrast, p.optics, p.buildup
    hist = pcon.stored_history(ti, b, p.switching.seed_time, optics.cell_arm_time)
    after = [s for s in res.seed_leak if s.note == "one round trip, cell off"]
    assert after, "expected seed pulses after the switch-out"
    s = after[0]
    t_seed = s.time_from_trigger - optics.round_trip_time - optics.cell_arm_time
    g = float(b.gain.log_gain(hist.j_at(t_seed + optics.cell_arm_time)))
    from regentime.planning.cell_model import seed_return_shares

    share = seed_return_shares(ti, optics)[1]
    expected = (ti.seed.energy * share * optics.passive_transmission("cell") ** 2
                * optics.passive_transmission("gain") * math.exp(2 * g))
    assert s.energy == pytest.approx(expected, rel=1e-3)


# ----- summary -----------------------------------------------------------------------------


def test_energy_within_span_is_the_sum_of_the_satellites_inside(ti):
    # Issue 4: energy in all satellites within ±X (default X = 10·T_rt).
    p = make_plan(ti)
    res = p.contrast
    assert res.summary.span == pytest.approx(10 * p.optics.round_trip_time, rel=1e-12)
    manual = sum(s.energy for s in res.satellites if abs(s.time) <= res.summary.span)
    assert res.energy_within == pytest.approx(manual, rel=1e-12)
    wide = pcon.plan_contrast(ti, p.optics, p.buildup, p.switching, span=1e-6)
    assert wide.energy_within > res.energy_within
    assert len(wide.seed_leak) > len(res.seed_leak)


def test_to_dict_has_the_design_keys_and_is_strict_json(nd):
    # docs/definitions.md "JSON output": contrast {pre_pulses, post_pulses, seed_leak: [{time_s, energy_J,
    # ratio}], nearest_pre_ratio, worst_pre_ratio, worst_post_ratio}.
    d = make_plan(nd).contrast.to_dict()
    for key in ("pre_pulses", "post_pulses", "seed_leak", "nearest_pre_ratio", "worst_pre_ratio",
                "worst_post_ratio", "cleaner"):
        assert key in d
    for key in ("pre_pulses", "post_pulses", "seed_leak"):
        assert d[key], key
        assert {"time_s", "energy_J", "ratio", "time_from_trigger_s", "dB"} <= set(d[key][0])
    json.dumps(d, allow_nan=False)


# ----- cleaner -----------------------------------------------------------------------------


def _cleaner(**kw):
    base = dict(extinction_ratio=1000.0, transmission=0.9, rise_time=1e-12, fall_time=1e-12,
                latency=50e-9, cable=Cable(2.0, 0.66), output="clean", path_delay=3e-9)
    base.update(kw)
    return Cleaner(**base)


def test_cleaner_transmission_follows_sin_squared():
    # Cell between crossed polarizers: T = sin²(πV/(2V_π)) (Yariv & Yeh, Optical Waves in
    # Crystals, ch. 7), with the closed pair's leak 1/ER (definition of extinction ratio).
    v = np.array([0.0, 0.25, 0.5, 1.0])
    t = pc.cleaner_transmission(v, math.inf, 1.0)
    assert np.allclose(t, np.sin(np.pi * v / 2) ** 2, atol=1e-15)
    assert pc.cleaner_transmission(0.0, 200.0, 0.9) == pytest.approx(0.9 / 200.0, rel=1e-12)
    # linear ramp whose 10-90 % time is the rise time (definition of rise time; docs/definitions.md
    # "Switching"): with the 50 % point at 0 and a rise of 1, 10 % at −0.5 and 90 % at +0.5
    lv = pc.gate_level(np.array([-0.5, 0.0, 0.5, 5.0, 9.5, 20.0]), 0.0, 10.0, 1.0, 1.0)
    assert np.allclose(lv, [0.1, 0.5, 0.9, 1.0, 0.9, 0.0], atol=1e-12)


def test_fast_cleaner_multiplies_every_outside_ratio_by_its_extinction(ti):
    # Issue 4: with a perfect (instant) cleaner the contrast gain is limited only by the
    # cleaner's extinction: outside the gate T = T_open/ER, the main pulse T_open.
    cav = replace(ti, cleaner=_cleaner(extinction_ratio=1e4))
    p = make_plan(cav)
    res = p.contrast
    k = res.cleaned
    assert k is not None and k.fits
    assert k.main_transmission == pytest.approx(0.9, rel=1e-12)
    before = {(s.kind, s.index): s for s in res.satellites}
    for s in k.pre_pulses + k.post_pulses + k.seed_leak:
        ref = before[(s.kind, s.index)]
        if abs(s.time) >= 0.5 * p.optics.round_trip_time and math.isfinite(ref.ratio):
            assert s.ratio == pytest.approx(ref.ratio * 1e4, rel=1e-9)
    assert k.summary.nearest_pre_ratio == pytest.approx(res.nearest_pre_ratio * 1e4, rel=1e-9)
    # a perfect polarizer pair blocks everything outside the gate
    perfect = pcon.plan_contrast(replace(ti, cleaner=_cleaner(extinction_ratio=math.inf)), p.optics,
                                 p.buildup, p.switching)
    assert math.isinf(perfect.cleaned.summary.nearest_pre_ratio)


def test_cleaner_gate_and_timing_row(ti):
    # docs/definitions.md "Delay-generator settings": delay = event − latency − cable delay, cable delay
    # = length/(velocity_factor·c) (c from scipy.constants).  Gate 50 % points halfway to the
    # nearest satellites of the round trip (issue 4: open after the nearest pre-pulse, closed
    # before the first post-pulse).
    cav = replace(ti, cleaner=_cleaner(rise_time=2e-9, fall_time=2e-9))
    p = make_plan(cav)
    k, trt = p.contrast.cleaned, p.optics.round_trip_time
    at_cleaner = p.contrast.main_time + 3e-9
    assert k.open_edge == pytest.approx(at_cleaner - trt / 2, rel=1e-12)
    assert k.close_edge == pytest.approx(at_cleaner + trt / 2, rel=1e-12)
    assert k.open_edge > at_cleaner - trt and k.close_edge < at_cleaner + trt
    assert k.delay == pytest.approx(k.open_edge - 50e-9 - 2.0 / (0.66 * C_LIGHT), rel=1e-12)
    row = p.timing.row("cleaner")
    assert row is not None and row.output == "clean"
    res = ti.generator.resolution
    assert abs(row.delay - k.delay) <= res / 2 + 1e-18
    assert row.width == pytest.approx(trt, abs=res)


def test_slow_cleaner_edge_is_reported(ti):
    # Issue 4: if the rise time does not fit inside one round trip around the main pulse,
    # say so.  A 20 ns rise (25 ns ramp) cannot fit in ≈ 11 ns.
    cav = replace(ti, cleaner=_cleaner(rise_time=20e-9, fall_time=20e-9))
    p = make_plan(cav)
    k = p.contrast.cleaned
    assert not k.fits
    assert any(c.name == "cleaner" and c.level == "warning" and "do not fit" in c.message
               for c in p.checks)
    # on the edge the main pulse only sees part of the open transmission
    assert k.main_transmission < 0.9


# ----- inverse question --------------------------------------------------------------------


def test_target_extinction_ratio_reaches_the_target(ti):
    # Pre-pulse ratios ∝ 1/ℓ; the answer must give the target back when put into the file
    # (round trip through the same Jones model; definition of the ratio, docs/definitions.md).
    cav = _with(ti, contrast=1e6)  # a good cell: the polarizer limits
    optics, b, res = _ideal(cav)
    target = 10 * res.nearest_pre_ratio
    ans = pcon_target.required_for_target(cav, optics, res, target)
    assert ans.extinction_needed is not None and not ans.met
    cav2 = _with(cav, extinction=ans.extinction_needed)
    _, _, res2 = _ideal(cav2)
    assert res2.nearest_pre_ratio == pytest.approx(target, rel=1e-6)
    # both improved together also reaches it
    cav3 = _with(cav, extinction=cav_er(cav) * ans.both_factor, contrast=1e6 * ans.both_factor)
    assert _ideal(cav3)[2].nearest_pre_ratio == pytest.approx(target, rel=1e-6)


def cav_er(cavity):
    return cavity.elements_of(Polarizer)[0].extinction_ratio


def test_target_out_of_reach_of_one_part_says_so(ti):
    # With a perfect polarizer the cell's contrast alone limits ℓ (ℓ → R_s·S share), so a
    # target beyond that limit cannot be met by the extinction ratio alone.
    optics, b, res = _ideal(ti)
    ans = pcon_target.required_for_target(ti, optics, res, 1e7)
    assert ans.extinction_needed is None
    _, _, perfect_pol = _ideal(_with(ti, extinction=1e15))
    assert ans.limit_by_contrast == pytest.approx(perfect_pol.nearest_pre_ratio, rel=1e-6)
    assert ans.both_factor is not None and ans.both_factor > 1
    with pytest.raises(ValueError):
        pcon_target.required_for_target(ti, optics, res, 0.5)
