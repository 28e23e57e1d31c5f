"""The whole plan for one cavity: optics, build-up, dump, switching, timing, contrast, checks.

``make_plan(cavity)`` is the single entry point that the CLI, the TUI and the tests call.
It computes; it never formats or prints (see :mod:`regentime.reports`).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Optional, Union

from regentime.model import Cavity, DumpRule
from regentime.planning.optics import CavityOptics, cavity_optics
from regentime.planning.buildup_plan import BuildupPlan, plan_buildup
from regentime.planning.checks import Check, run_checks
from regentime.planning.contrast import ContrastResult, plan_contrast
from regentime.planning.stability import StabilityNote, plan_stability_note
from regentime.planning.switching import SwitchPlan, plan_switching
from regentime.planning.timing import TimingTable, timing_table
from regentime.planning.mode_plan import CavityModeResult, plan_mode
from regentime.planning.self_lasing import SelfLasing, plan_self_lasing
from regentime.planning.spectrum_plan import SpectrumResult, plan_spectrum
from regentime.planning.ase_plan import AseResult, plan_ase
from regentime.plan_views import PlanViews  # notebook views; reports imported only when called
from regentime.planning.dispersion_plan import DispersionResult, plan_dispersion

from regentime.safety import CAUTION, CAUTION_SHORT


@dataclass(frozen=True)
class Plan(PlanViews):
    """Everything planned for one cavity; built once by :func:`make_plan`, never changed.

    Every stage is present for every cavity; ``stability`` is the shot-to-shot note of a
    continuously pumped cavity and ``None`` for a pulsed pump (there is no shot-to-shot
    coupling to describe).  All numbers are SI (s, J, m, W, rad).
    """

    cavity: Cavity
    optics: CavityOptics
    buildup: BuildupPlan
    switching: SwitchPlan
    timing: TimingTable
    contrast: ContrastResult
    checks: tuple[Check, ...]
    stability: Optional[StabilityNote] = None
    cautions: tuple[str, ...] = (CAUTION,)
    cavity_mode: Optional[CavityModeResult] = None  # None: no curvatures and mode_radius typed
    self_lasing: Optional[SelfLasing] = None  # does the closed cavity lase by itself
    spectrum: Optional[SpectrumResult] = None  # with seed.bandwidth: gain narrowing and shift
    ase: Optional[AseResult] = None  # spontaneous emission leaving with the pulse
    dispersion: Optional[DispersionResult] = None  # GDD/TOD/FOD per element, round trip, switch-out

    @property
    def round_trip_time(self) -> float:
        return self.optics.round_trip_time

    @property
    def dump_round_trip(self) -> int:
        return self.buildup.dump_round_trip

    @property
    def cannot_be_met(self) -> bool:
        """True when any check is an error (no window, negative delay, damage ...): exit code 3."""
        return any(c.level == "error" for c in self.checks)

    def with_contrast(self, contrast: ContrastResult) -> "Plan":
        """The same plan with the contrast stage re-planned (e.g. over a wider span)."""
        return replace(self, contrast=contrast)


def make_plan(cavity: Cavity, dump: Union[DumpRule, str, int, None] = None) -> Plan:
    """Plan the cavity.  ``dump`` overrides the file's dump rule (``auto``, ``steady``, N)."""
    if dump is not None:
        cavity = replace(cavity, dump=DumpRule.of(dump))
    optics = cavity_optics(cavity)
    mode = plan_mode(cavity)  # an unstable cavity is an input error (exit 2)
    buildup = plan_buildup(cavity, optics)
    switch_plan = plan_switching(cavity, optics, buildup)
    # the ejected share scales every output alike: the dump choice and the sensitivities stay
    buildup = buildup.with_switching_efficiency(switch_plan.switching_efficiency)
    timing = timing_table(cavity, optics, buildup, switch_plan)
    contrast = plan_contrast(cavity, optics, buildup, switch_plan)
    timing = timing.with_extra_rows(contrast.timing_rows)  # the cleaner's gate, if any
    stability = (plan_stability_note(cavity, optics, buildup)
                 if cavity.pump.mode == "continuous" else None)
    self_lasing = plan_self_lasing(cavity, optics, buildup)
    spectrum = plan_spectrum(cavity, buildup)
    ase = plan_ase(cavity, buildup)
    dispersion = plan_dispersion(cavity, optics, buildup.dump_round_trip)
    checks = run_checks(cavity, buildup, (switch_plan, timing, contrast, stability, mode, self_lasing),
                        stability)
    return Plan(cavity, optics, buildup, switch_plan, timing, contrast, tuple(checks), stability,
                cavity_mode=mode, self_lasing=self_lasing, spectrum=spectrum, ase=ase,
                dispersion=dispersion)


__all__ = ["Plan", "make_plan", "Check", "DumpRule", "CAUTION", "CAUTION_SHORT"]
