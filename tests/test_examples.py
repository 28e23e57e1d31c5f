"""The shipped example cavities as a user meets them: they plan, they are safe to copy.

Uses the session-wide plans of tests/conftest.py (each example planned once).
"""

from __future__ import annotations

import math

from conftest import EXAMPLES, EXAMPLES_DIR


def test_every_example_is_shipped_and_planned(example_plans):
    assert len(EXAMPLES) >= 4 and set(example_plans) == {p.stem for p in EXAMPLES}


def test_examples_raise_no_error_level_check(example_plans):
    """A shipped example is a setting a technician may copy: no check may say it cannot be met
    or is unsafe (damage above threshold, no window, negative delay, self-lasing …)."""
    for name, plan in example_plans.items():
        if "FAILS ON PURPOSE" in (EXAMPLES_DIR / f"{name}.yaml").read_text(encoding="utf-8"):
            assert plan.cannot_be_met  # and it does, as its header says
            continue
        errors = [f"{c.name}: {c.message}" for c in plan.checks if c.level == "error"]
        assert not errors, (name, errors)
        assert not plan.cannot_be_met


def test_examples_checks_are_data(example_plans):
    """Each check is {name, level, message, value, limit, unit, element}; the damage and
    B-integral checks carry their figure and its limit in SI units."""
    for plan in example_plans.values():
        for c in plan.checks:
            d = c.to_dict()
            assert set(d) == {"name", "level", "message", "value", "limit", "unit", "element"}
            assert d["level"] in ("info", "warning", "error")
        dmg = [c for c in plan.checks if c.name == "damage"]
        assert dmg and all(c.unit == "J/m^2" and c.value > 0 and c.limit > 0 for c in dmg)
        # above the limit would be an error: the examples stay below it
        assert all(c.value <= c.limit for c in dmg)
        b = [c for c in plan.checks if c.name == "b_integral"]
        assert b and b[0].unit == "rad" and math.isfinite(b[0].value)


def test_example_damage_uses_the_gaussian_peak(example_plans):
    """On-axis peak fluence of a Gaussian mode F0 = 2E/(πw²) (A. E. Siegman, Lasers, ch. 17):
    the check's value is at least 2E/(πw²) of the switched-out pulse inside the crystal."""
    for plan in example_plans.values():
        # the typed mode radius, or the one computed from the cavity's ABCD matrices
        w = plan.cavity.gain.mode_radius or plan.cavity_mode.crystal.radius_m
        e_out = plan.buildup.output_energy
        c = next(c for c in plan.checks if c.name == "damage")
        # the output has left the cavity after the polarizer: the pulse inside was larger
        assert c.value >= 2 * e_out / (math.pi * w * w) * 0.99
