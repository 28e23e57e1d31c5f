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
from regentime.planning.dispersion_plan import DispersionResult, plan_dispersion

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
    dispersion: Optional[DispersionResult] = None  # GDD/TOD/FOD per element, round trip, switch-out

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
    from regentime.planning import contrast, stability, switching, timing

    if dump is not None:
        cavity = replace(cavity, dump=dump)
    optics = cavity_optics(cavity)
    buildup = plan_buildup(cavity, optics)
    switch_plan = switching.plan_switching(cavity, optics, buildup)
    # the ejected share scales every output alike: the dump choice and the sensitivities stay
    buildup = buildup.with_switching_efficiency(getattr(switch_plan, "switching_efficiency", 1.0))
    plan = Plan(cavity, optics, buildup, switch_plan)
    plan.timing = timing.timing_table(cavity, optics, buildup, switch_plan)
    plan.contrast = contrast.plan_contrast(cavity, optics, buildup, switch_plan)
    plan.timing.rows.extend(getattr(plan.contrast, "timing_rows", None) or ())  # cleaner gate, if any
    if cavity.pump.mode == "continuous":
        plan.stability = stability.plan_stability_note(cavity, optics, buildup)
    plan.dispersion = plan_dispersion(cavity, optics, buildup.dump_round_trip)
    plan.checks = run_checks(plan)
    return plan


__all__ = ["Plan", "make_plan", "Check", "CAUTION", "CAUTION_SHORT"]
