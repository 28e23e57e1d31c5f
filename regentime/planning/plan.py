"""The whole plan for one cavity: optics, build-up, dump, switching, timing, contrast, checks.

``make_plan(cavity)`` is the single entry point that the CLI, the TUI and the tests call.
It computes; it never formats or prints (see :mod:`regentime.reports`).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any, Optional, Union

from regentime.model import Cavity
from regentime.physics.optics import CavityOptics, cavity_optics
from regentime.planning.buildup_plan import BuildupPlan, plan_buildup
from regentime.planning.checks import Check, run_checks

CAUTION = (
    "CAUTION: a regenerative amplifier is a Class 4 laser and its Pockels-cell driver switches "
    "kilovolts; both can kill or blind. Follow IEC 60825-1 / ANSI Z136.1 and IEC 61010-1, your "
    "local laser and electrical safety rules and your laser safety officer. This timing is a plan: "
    "verify it at low pump power with a fast photodiode before full power."
)
CAUTION_SHORT = (
    "Class 4 laser, kV switch driver: follow IEC 60825-1/ANSI Z136.1, IEC 61010-1, local rules and "
    "your laser safety officer; verify timing at low pump power with a photodiode first."
)


@dataclass
class Plan:
    cavity: Cavity
    optics: CavityOptics
    buildup: BuildupPlan
    switching: Optional[Any] = None  # regentime.planning.switching.SwitchPlan
    timing: Optional[Any] = None  # regentime.planning.timing.TimingTable
    contrast: Optional[Any] = None  # regentime.planning.contrast.ContrastResult
    checks: list = field(default_factory=list)  # list[Check]
    cautions: list = field(default_factory=lambda: [CAUTION])
    stability: Optional[Any] = None  # continuous pump: nearest stable round trips etc.

    @property
    def round_trip_time(self) -> float:
        return self.optics.round_trip_time

    @property
    def dump_round_trip(self) -> int:
        return self.buildup.dump_round_trip

    @property
    def cannot_be_met(self) -> bool:
        """True when any check is an error (no window, negative delay, ...): exit code 3."""
        return any(c.level == "error" for c in self.checks)


def make_plan(cavity: Cavity, dump: Union[str, int, None] = None) -> Plan:
    """Plan the cavity.  ``dump`` overrides the file's dump rule (``auto``, ``steady``, N)."""
    if dump is not None:
        cavity = replace(cavity, dump=dump)
    optics = cavity_optics(cavity)
    switching = None
    switching_mod = _optional("regentime.planning.switching")
    buildup = plan_buildup(cavity, optics)
    if switching_mod is not None:
        switching = switching_mod.plan_switching(cavity, optics, buildup)
        eff = getattr(switching, "switching_efficiency", 1.0)
        if eff != 1.0:
            buildup = plan_buildup(cavity, optics, switching_efficiency=eff)
            if buildup.dump_round_trip != switching.dump_round_trip:  # keep the windows on the same N
                switching = switching_mod.plan_switching(cavity, optics, buildup)
    plan = Plan(cavity, optics, buildup, switching)
    timing_mod = _optional("regentime.planning.timing")
    if timing_mod is not None and switching is not None:
        plan.timing = timing_mod.timing_table(cavity, optics, buildup, switching)
    contrast_mod = _optional("regentime.planning.contrast")
    if contrast_mod is not None and switching is not None:
        plan.contrast = contrast_mod.plan_contrast(cavity, optics, buildup, switching)
        if plan.timing is not None:  # the cleaner's gate row, if the file has a cleaner
            plan.timing.rows.extend(getattr(plan.contrast, "timing_rows", None) or ())
    stability_mod = _optional("regentime.planning.stability")
    if stability_mod is not None and cavity.pump.mode == "continuous":
        plan.stability = stability_mod.plan_stability_note(cavity, optics, buildup)
    plan.checks = run_checks(plan)
    return plan


def _optional(name: str):
    """Import a planning stage that may not be written yet (returns None if it is absent)."""
    import importlib

    try:
        return importlib.import_module(name)
    except ModuleNotFoundError as exc:
        if exc.name == name:
            return None
        raise


__all__ = ["Plan", "make_plan", "Check", "CAUTION", "CAUTION_SHORT"]
