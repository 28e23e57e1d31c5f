"""Energy conservation in the build-up and the continuously pumped steady state.

First law (no source of energy but the seed and the pump): the pulse switched out after N
round trips cannot carry more than the seed, the energy stored at injection and what a
continuous pump of rate R adds during the build-up, R·N·T_rt; over many shots the average
output power cannot exceed the stored power R (plus the seed's).  Checked over random
cavities (profiles, radii, rings, pump, seed, N, repetition rate) built from the shipped
examples' paths; hypothesis runs bounded and derandomized so the test is reproducible.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from regentime import fileformat
from regentime.physics.buildup import shot, simulate_buildup
from regentime.physics.gain import radial_grid
from regentime.planning.optics import cavity_optics
from regentime.planning.gainsetup import gain_model, round_trip_path

CAVITIES = Path(__file__).resolve().parent.parent / "cavities"
_CW = ["yb_100khz_cw.yaml", "nd_yvo4_cw_200khz.yaml"]
_ALL = sorted(p.name for p in CAVITIES.glob("*.yaml"))
_SLACK = 1e-9  # relative: floating-point rounding only


def _setup(name):
    cav = fileformat.load_cavity(str(CAVITIES / name))
    optics = cavity_optics(cav)
    return cav, gain_model(cav), round_trip_path(cav, optics)


_CACHE = {name: _setup(name) for name in _ALL}

_VARIANT = dict(
    name=st.sampled_from(_ALL),
    profile=st.sampled_from(["flat-top", "gaussian"]),
    pump_profile=st.sampled_from(["flat-top", "gaussian"]),
    ratio=st.floats(0.5, 2.0),
    rings=st.integers(4, 48),
    pump_scale=st.floats(0.1, 4.0),
    seed=st.floats(1e-12, 1e-6),
    n=st.integers(1, 150),
)


def _variant(name, profile, pump_profile, ratio, rings, pump_scale):
    cav, gm, path = _CACHE[name]
    w = gm.grid.mode_radius
    grid = radial_grid(w, profile, w * ratio, pump_profile, rings)
    return cav, replace(gm, grid=grid, pump_rate=gm.pump_rate * pump_scale,
                        stored_energy=gm.stored_energy * pump_scale), path


@settings(max_examples=30, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(**_VARIANT)
def test_buildup_creates_no_energy(name, profile, pump_profile, ratio, rings, pump_scale, seed, n):
    cav, gm, path = _variant(name, profile, pump_profile, ratio, rings, pump_scale)
    res = simulate_buildup(gm, path, seed, gm.stored_energy, n, track=False)
    k = np.arange(1, n + 1)
    bound = seed + gm.stored_energy + gm.pump_rate * k * path.dt
    assert np.all(res.output[1:] <= bound * (1 + _SLACK))
    assert np.all(res.energy[1:] <= bound * (1 + _SLACK))  # the circulating pulse too


@settings(max_examples=12, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(**{**_VARIANT, "name": st.sampled_from(_CW), "rate_scale": st.floats(0.5, 2.0)})
def test_shot_sequence_output_power_below_stored_power(name, profile, pump_profile, ratio, rings,
                                                       pump_scale, seed, n, rate_scale):
    """Shot after shot from full storage Rτ: each shot below its bound, and the energy
    balance over the sequence: Σ out ≤ seeds + (E_st,0 − E_st,end) + R·(shots·period)."""
    cav, gm, path = _variant(name, profile, pump_profile, ratio, rings, pump_scale)
    period = rate_scale / cav.repetition_rate
    n = max(1, min(n, int(0.9 * period / path.dt)))
    j = gm.stored_fluence(np.array([gm.pump_rate * gm.tau]))
    start = gm.stored_in(j)[0]
    total, shots = 0.0, 60
    for _ in range(shots):
        o, j_next = shot(gm, path, np.array([seed]), j, np.array([n]), period)
        assert o[0] <= (seed + gm.stored_in(j)[0] + gm.pump_rate * n * path.dt) * (1 + _SLACK)
        total += o[0]
        j = j_next
    balance = shots * seed + start - gm.stored_in(j)[0] + gm.pump_rate * shots * period
    assert total <= balance * (1 + 1e-6)


@pytest.mark.parametrize("name", _ALL)
def test_shipped_examples_create_no_energy(name):
    """The plan of every shipped example: output ≤ seed + stored + R·N·T_rt, P_out ≤ R."""
    from regentime.planning.plan import make_plan

    cav, gm, path = _CACHE[name]
    plan = make_plan(cav)
    b = plan.buildup
    n = b.dump_round_trip
    bound = cav.seed.energy + b.stored_at_injection + gm.pump_rate * n * path.dt
    assert b.output_energy <= bound * (1 + _SLACK)
    if gm.pump_rate:
        assert b.output_energy * cav.repetition_rate <= gm.pump_rate + cav.seed.energy * cav.repetition_rate


@settings(max_examples=8, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(**{**_VARIANT, "name": st.sampled_from(_CW), "rate_scale": st.floats(0.5, 2.0)})
@example(name="yb_100khz_cw.yaml", profile="flat-top", pump_profile="flat-top", ratio=1.0, rings=4,
         pump_scale=1.0, seed=3.761564301605137e-07, n=25, rate_scale=2.0)  # found by this test
def test_ring_steady_state_is_a_fixed_point_within_the_pump_power(name, profile, pump_profile, ratio,
                                                                   rings, pump_scale, seed, n, rate_scale):
    """A reported steady output belongs to a state the next shot reproduces, and its average
    power is at most the stored power R (plus the seed's); without one the output is NaN."""
    from regentime.planning.ring_steady import ring_fixed_points

    cav, gm, path = _variant(name, profile, pump_profile, ratio, rings, pump_scale)
    period = rate_scale / cav.repetition_rate
    n = max(1, min(n, int(0.9 * period / path.dt)))
    j0 = gm.stored_fluence(np.array([gm.pump_rate * gm.tau]))
    out, j_star = ring_fixed_points(gm, path, np.array([seed]), np.array([n]), period, j0)
    if np.isnan(out[0]):
        return
    o, j_next = shot(gm, path, np.array([seed]), j_star, np.array([n]), period)
    assert o[0] == pytest.approx(out[0], rel=1e-4)
    assert gm.stored_in(j_next)[0] == pytest.approx(gm.stored_in(j_star)[0], rel=1e-4)
    assert out[0] / period <= (gm.pump_rate + seed / period) * (1 + 1e-6)
