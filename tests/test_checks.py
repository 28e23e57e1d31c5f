"""Checks on a plan: damage scaling, B-integral and gain warnings carry their numbers."""

import math
from dataclasses import replace

import pytest

from regentime.fileformat import load_cavity
from regentime.planning.checks import scaled_damage_fluence
from regentime.planning.plan import make_plan

TI = "cavities/ti_sapphire_1khz.yaml"


def test_sqrt_tau_damage_scaling():
    # Stuart et al., Phys. Rev. B 53, 1749 (1996): F_th ∝ τ^½ above ~50 ps;
    # docs/references.md [D]: 10 ns -> 500 ps scales by √(0.05) = 0.2236
    assert scaled_damage_fluence(1.0, 10e-9, 500e-12) == pytest.approx(math.sqrt(0.05), rel=1e-12)
    assert scaled_damage_fluence(1.0, 10e-9, 500e-12) == pytest.approx(0.2236, abs=1e-4)


def _check(plan, name):
    found = [c for c in plan.checks if c.name == name]
    assert found, [c.name for c in plan.checks]
    return found[0]


def test_damage_above_threshold_is_an_error_with_its_numbers():
    cav = load_cavity(TI)
    low = replace(cav, gain=replace(cav.gain, medium=replace(cav.gain.medium, damage_fluence=1e3)))
    plan = make_plan(low)
    c = _check(plan, "damage")
    assert c.level == "error" and "ABOVE" in c.message and "J/cm²" in c.message
    assert plan.cannot_be_met  # exit 3: a safety verdict is never softer than the physics
    # the limit is the threshold scaled with √τ (Stuart et al., Phys. Rev. B 53, 1749 (1996))
    tau = cav.seed.duration
    assert c.limit == pytest.approx(1e3 * (tau / cav.gain.medium.damage_duration) ** 0.5, rel=1e-12)
    assert c.unit == "J/m^2" and c.value > c.limit and c.element
    high = replace(cav, gain=replace(cav.gain, medium=replace(cav.gain.medium, damage_fluence=1e7)))
    assert _check(make_plan(high), "damage").level == "info"


def test_b_integral_limit_warning():
    cav = load_cavity(TI)
    tight = replace(cav, checks=replace(cav.checks, b_integral_limit=0.01))
    c = _check(make_plan(tight), "b_integral")
    assert c.level == "warning" and "exceeds the limit" in c.message


def test_no_gain_is_an_error_exit_3():
    cav = load_cavity(TI)
    weak = replace(cav, pump=replace(cav.pump, energy=1e-5))
    plan = make_plan(weak)
    assert _check(plan, "gain").level == "error"
    assert plan.cannot_be_met
