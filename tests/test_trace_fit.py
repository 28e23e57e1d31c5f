"""Pulse-train analysis and build-up fit on synthetic traces (made here from the model).

The build-up behind the synthetic traces is computed in this file with a plain loop over
Frantz–Nodvik passes (L. M. Frantz & J. S. Nodvik, J. Appl. Phys. 34, 2346 (1963)), with
invented parameters; the photodiode response is a Gaussian plus damped ringing, with a
baseline offset and white noise (fixed random seeds).  The analysis must give back what
went in: the period (to 10 ps, the issue's tolerance), the switch-out offset (±1 round
trip), and the gain and loss within the tolerances stated beside each check.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import c as C_SCIPY  # reference value of the speed of light
from scipy.stats import norm

from regentime.physics.frantz_nodvik import frantz_nodvik
from regentime.trace.analysis import MAD_TO_SIGMA, analyse_pulses
from regentime.trace.fit import BuildupInputs, backward, envelope
from regentime.trace.result import C_LIGHT, result_from_train
from regentime.trace.synthetic import synthetic_trace

# invented cavity: T_rt 8.6 ns, E_sat 10 mJ, two gain passes, 7 % round-trip loss
E_SAT = 10e-3
G0 = 0.40
LOSS = 0.07
E0 = 1e-10
T_MODEL = 8.6e-9


def buildup(g0=G0, loss=LOSS, e0=E0, n=80):
    """E_k after k round trips: gain pass, gain pass, then (1 − loss) — a direct loop."""
    e = np.empty(n + 1)
    e[0] = e0
    x, g = e0 / E_SAT, g0
    for k in range(1, n + 1):
        x, g = frantz_nodvik(x, g, 1.0)
        x, g = frantz_nodvik(x, g, 1.0)
        x *= 1 - loss
        e[k] = x * E_SAT
    return e


INPUTS = BuildupInputs(round_trip_time=T_MODEL, e_sat=E_SAT, seed_energy=E0, initial_log_gain=0.37,
                       round_trip_loss=0.05, ops=("gain", "gain", 1.0))


def run(t_real, dump_shift, dt=100e-12, noise=0.004, seed=1, **kw):
    e = buildup()
    peak = int(np.argmax(e))
    dump = peak - dump_shift
    t, v = synthetic_trace(e, t_real, dump, dt=dt, noise=noise, seed=seed, **kw)
    train = analyse_pulses(v, dt, 0.0, expected_period=T_MODEL)
    res = result_from_train(train, INPUTS)
    k_first = 1 + int(round((train.times[0] - 30e-9) / t_real))  # round trip of the first pulse
    return res, peak, dump, k_first


def test_mad_factor_is_the_normal_quantile():
    # 1.4826 = 1/Φ⁻¹(0.75) for a normal distribution (scipy.stats as the reference)
    assert MAD_TO_SIGMA == pytest.approx(1.0 / norm.ppf(0.75), rel=1e-4)


def test_speed_of_light_constant():
    assert C_LIGHT == C_SCIPY  # SI definition, checked against scipy.constants


def test_envelope_matches_direct_frantz_nodvik_loop():
    e = buildup(n=60)
    x, _ = envelope(E0 / E_SAT, G0, 1 - LOSS, 61, ("gain", "gain", 1.0))
    np.testing.assert_allclose(x * E_SAT, e, rtol=1e-12)


def test_backward_inverts_frantz_nodvik_published_case():
    # docs/references.md [D]: J_sat = 1, G0 = 10, J_in = 0.1 -> J_out = 0.71867, gain left 5.3866
    m, g = backward(0.71867, math.log(5.3866), 1.0, 0.1 + 1e-12, ops=("gain",))
    assert g == pytest.approx(math.log(10.0), abs=2e-4)
    assert m == pytest.approx(1.0, abs=1e-3)


@pytest.mark.parametrize("layout_kw", [
    dict(ringing=0.25, seed=2),
    dict(ringing=0.0, seed=3, invert=True),  # negative pulses
    dict(ringing=0.35, ring_freq=0.9e9, seed=4, dt=200e-12, fwhm=0.8e-9),
])
def test_after_peak_recovers_period_offset_gain_loss(layout_kw):
    t_real = 8.7321e-9  # real cavity 15 mm (one-way path) longer than the 8.6 ns model
    dt = layout_kw.pop("dt", 100e-12)
    res, peak, dump, k1 = run(t_real, dump_shift=-3, dt=dt, **layout_kw)
    assert abs(res.measured_round_trip_s - t_real) < 10e-12  # issue tolerance: 10 ps
    true_dl = (t_real - T_MODEL) * C_SCIPY / 2
    assert abs(res.length_error_m - true_dl) < 1.5e-3  # 10 ps of round trip = 1.5 mm
    assert res.observed_dump_index == dump - k1
    assert abs(res.dump_offset_round_trips - (peak - dump)) <= 1  # issue: ±1 round trip
    assert res.switch_off_shift_s == pytest.approx(res.dump_offset_round_trips * res.measured_round_trip_s)
    assert not res.peak_extrapolated
    f = res.fit
    # stated tolerances (this test's choice): g0 within 0.03 (≈8 %), loss within 0.03 absolute
    assert abs(f.values["initial_log_gain"] - G0) < 0.03
    assert abs(f.values["round_trip_loss"] - LOSS) < 0.03


@pytest.mark.parametrize("shift", [2, 3])
def test_before_peak_extrapolates(shift):
    t_real = 8.55e-9  # real cavity shorter than the model
    res, peak, dump, k1 = run(t_real, dump_shift=shift, seed=10 + shift)
    assert abs(res.measured_round_trip_s - t_real) < 10e-12
    assert res.length_error_m < 0
    assert res.peak_extrapolated
    assert abs(res.dump_offset_round_trips - shift) <= 1
    assert res.switch_off_shift_s > 0
    assert any("extrapolated" in n for n in res.notes)


def test_switch_out_at_the_peak_gives_zero_shift():
    res, peak, dump, k1 = run(8.6e-9, dump_shift=0, seed=21)
    assert abs(res.dump_offset_round_trips) <= 1


def test_trace_without_pulses_is_an_input_error():
    from regentime.errors import InputError

    v = np.random.default_rng(0).normal(0, 0.01, 5000)
    with pytest.raises(InputError):
        analyse_pulses(v, 1e-10)
