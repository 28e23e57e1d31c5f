"""Shared fixtures: the shipped example cavities and their plans, built once per test session.

A plan is frozen (``regentime.planning.plan.Plan``), so one instance can serve every test
that only reads it; tests that change a cavity build their own with ``dataclasses.replace``.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from regentime.fileformat import load_cavity
from regentime.planning.plan import make_plan

EXAMPLES_DIR = Path(__file__).resolve().parent.parent / "cavities"
EXAMPLES = sorted(EXAMPLES_DIR.glob("*.yaml"))


@pytest.fixture(scope="session")
def example_cavities() -> dict:
    """{file stem: Cavity} for every shipped example."""
    return {p.stem: load_cavity(str(p)) for p in EXAMPLES}


@pytest.fixture(scope="session")
def example_plans(example_cavities) -> dict:
    """{file stem: Plan} for every shipped example, planned once per session."""
    return {name: make_plan(cav) for name, cav in example_cavities.items()}


@pytest.fixture(scope="session")
def ti_plan(example_plans):
    """The plan of the Ti:sapphire example (pulsed pump, quarter-wave scheme)."""
    return example_plans["ti_sapphire_1khz"]
