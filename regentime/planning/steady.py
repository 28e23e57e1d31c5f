"""Planning wrapper of the continuous-pump steady state across shots.

The shot-to-shot map, its period-1 fixed points and the period classification live in
:mod:`regentime.physics.shot_map` (SI numbers only); this module keeps the names the planning
code and the stability map use.
"""

from __future__ import annotations

from regentime.physics.shot_map import (  # noqa: F401 (re-exported)
    DUMP_OBSERVED_SHOTS,
    DUMP_TRANSIENT_SHOTS,
    EXTEND_ROUNDS,
    EXTEND_SHOTS,
    MAX_PERIOD,
    OBSERVED_SHOTS,
    PERIOD_REL_TOL,
    TRANSIENT_SHOTS,
    ShotSequence,
    classify,
    fixed_points,
    iterate_shots,
    shot_map,
)
