"""Noise model and self-lasing verdict (sources beside each check)."""

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import scipy.constants as sc

from regentime.fileformat import load_cavity
from regentime.physics import noise
from regentime.planning.plan import make_plan
from regentime.planning.self_lasing import closed_states
from regentime.planning.optics import cavity_optics

ROOT = Path(__file__).resolve().parents[1] / "cavities"
HALF_WAVE_CW = Path(__file__).resolve().parent / "cavities" / "yb_half_wave_cw.yaml"  # invented


def test_photon_energy_against_scipy():
    # h c / λ with scipy.constants as the independent source
    assert noise.photon_energy(800e-9) == pytest.approx(sc.h * sc.c / 800e-9, rel=1e-12)


def test_noise_energy_hand_value():
    # Siegman, Lasers, ch. 13: n_sp photons per mode -> E_n = n_sp h ν Δν T_rt
    lam, dlam, t_rt = 800e-9, 230e-9, 10e-9
    dnu = sc.c * dlam / lam ** 2
    expected = 1.0 * sc.h * sc.c / lam * dnu * t_rt
    assert noise.noise_energy_per_round_trip(lam, noise.linewidth_hz(lam, dlam), t_rt) == pytest.approx(expected)
    assert expected == pytest.approx(2.68e-13, rel=0.01)  # hand value: 2.48e-19 J × 1.08e14 Hz × 1e-8 s


def test_inversion_factor():
    # Siegman ch. 13: n_sp = N2/(N2 − (σa/σe) N1); four-level: 1
    assert noise.inversion_factor(2e-24, 0.0, 1e25, 1e27) == 1.0
    n2, nt, se, sa = 3e26, 1e27, 2e-24, 0.12e-24
    assert noise.inversion_factor(se, sa, n2, nt) == pytest.approx(n2 / (n2 - sa / se * (nt - n2)))
    assert math.isinf(noise.inversion_factor(se, sa, 0.0, nt))  # no inversion, no gain


def test_noise_buildup_geometric_series_and_brute_force():
    # constant G: E_k = E_n (G + … + G^k) = E_n G (G^k − 1)/(G − 1) (geometric series)
    e_n, g = 1e-15, 1.3
    k = np.arange(1, 201)
    e_k = e_n * g * (g ** k - 1) / (g - 1)
    thr = 1e-6
    expected = int(k[np.argmax(e_k >= thr)])
    assert noise.noise_buildup_round_trips(e_n, np.full(200, math.log(g)), np.full(200, thr)) == expected
    # varying gain against a plain loop (independent implementation)
    rng = np.random.default_rng(1)
    lg = rng.uniform(-0.1, 0.5, 300)
    e, hit = 0.0, None
    for i, x in enumerate(lg):
        e = (e + e_n) * math.exp(x)
        if e >= thr:
            hit = i + 1
            break
    assert noise.noise_buildup_round_trips(e_n, lg, thr) == hit
    # a loss cavity never reaches it
    assert noise.noise_buildup_round_trips(e_n, np.full(1000, -0.1), thr) is None


def test_closed_states_from_jones():
    # half-wave scheme: both states keep P; quarter-wave: only the trapping state (Jones model)
    for name, state in ((HALF_WAVE_CW, (True, True)), ("ti_sapphire_1khz.yaml", (False, True))):
        cav = load_cavity(ROOT / name)
        off, on, _, _ = closed_states(cav, cavity_optics(cav))
        assert (off, on) == state, name


def _self_lasing_levels(plan):
    return [c.level for c in plan.checks if c.name == "self_lasing"]


def test_continuous_half_wave_lases():
    # a continuously pumped half-wave cavity is closed between shots: it must be flagged
    plan = make_plan(load_cavity(HALF_WAVE_CW))
    sl = plan.self_lasing
    assert sl.closed_state == "both"
    assert sl.closed_round_trips > 0 and sl.noise_round_trips <= sl.closed_round_trips
    assert sl.lases and "error" in _self_lasing_levels(plan) and plan.cannot_be_met


def test_pulsed_quarter_wave_1khz_does_not_lase():
    plan = make_plan(load_cavity(ROOT / "ti_sapphire_1khz.yaml"))
    sl = plan.self_lasing
    assert sl.closed_state == "on" and sl.closed_round_trips == 0
    assert not sl.lases and not sl.lases_without_seed
    assert _self_lasing_levels(plan) == ["info"]


def test_missing_seed_with_long_gate_warns():
    # quarter-wave, pulsed: forcing a gate far longer than the noise build-up -> lases_without_seed
    cav = load_cavity(ROOT / "ti_sapphire_1khz.yaml")
    plan = make_plan(cav, dump=60)
    sl = plan.self_lasing
    assert sl.unseeded_round_trips == 60 and sl.lases_without_seed and not sl.lases
    levels = _self_lasing_levels(plan)
    assert levels and levels[0] in ("warning", "error")
    msg = [c.message for c in plan.checks if c.name == "self_lasing"][0]
    assert "seed monitor" in msg


def test_amplified_noise_against_loop():
    # E = E_n Σ_j Π_{i=j..K} G_i (Siegman ch. 13 noise input, amplified) against a plain loop
    rng = np.random.default_rng(2)
    g = rng.uniform(0.8, 3.0, 40)
    e = 0.0
    for x in g:
        e = (e + 1e-15) * x
    assert noise.amplified_noise(1e-15, g) == pytest.approx(e, rel=1e-12)


def test_ase_in_the_plan():
    # ASE below the pulse, and the 1e6 seed estimate scales with the seed (linear regime)
    plan = make_plan(load_cavity(ROOT / "ti_sapphire_1khz.yaml"))
    a = plan.ase
    assert 0 < a.energy_J < plan.buildup.output_energy and a.ratio > 1
    assert a.pedestal_ratio > a.ratio  # the ns pedestal is spread over T_rt ≫ the pulse
    assert a.seed_energy_for_ratio_J == pytest.approx(plan.cavity.seed.energy * 1e6 / a.ratio)
