"""Checks on a plan: damage fluence and intensity, B-integral, gain, and the stages' own problems.

Every check produces a :class:`Check` with the numbers in its message; nothing is silent.

- Damage fluence of the crystal, scaled from its reference duration with √τ (B. C. Stuart et
  al., Phys. Rev. B 53, 1749 (1996): F_th ∝ τ^½ for pulses longer than about 50 ps); warned
  at 50 % of the scaled threshold (common practice: run at no more than about half the
  damage fluence) and, above it, an error (exit code 3: the plan is not safe).  The
  fluence is the on-axis peak of the Gaussian cavity mode, F₀ = 2E/(πw²) (A. E. Siegman,
  Lasers, ch. 17), whatever the extraction model.
- Peak intensity I = F_peak / (1.0645 τ_FWHM) (Gaussian pulse) against a user-given damage
  intensity (``checks: {damage_intensity: …}``).
- B-integral B = (2π/λ) Σ n2 I L over every crossing of the crystal up to the switch-out;
  warning above ``checks.b_integral_limit`` (default 3 rad; common practice: 3–5 rad in a
  CPA chain, below about 1 rad where contrast matters — S. Backus et al., Rev. Sci. Instrum.
  69, 1207 (1998)); a note above 1 rad.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Optional

import numpy as np

from regentime.model import GainElement
from regentime.numfmt import json_float

from regentime.physics.buildup import SQRT_PI_LN2

_WARN_SHARE = 0.5  # of the scaled damage fluence (common practice)


@dataclass(frozen=True)
class Check:
    """One verdict of the plan, as data: reports turn it into words, tools read the numbers.

    ``level``: ``info``, ``warning`` or ``error`` (any error: exit code 3, the plan cannot be
    met safely).  ``value`` and ``limit`` are SI numbers in ``unit`` (``J/m^2``, ``rad``,
    ``s`` …) when the check compares a figure with a limit; ``element`` names the cavity
    element it concerns (``None`` for the whole plan).
    """

    level: str  # "info" | "warning" | "error"
    name: str  # "damage", "intensity", "b_integral", "gain", "window", "timing", "stability", ...
    message: str
    value: Optional[float] = None
    limit: Optional[float] = None
    unit: Optional[str] = None
    element: Optional[str] = None

    def to_dict(self) -> dict:
        return {"name": self.name, "level": self.level, "message": self.message,
                "value": None if self.value is None else json_float(self.value),
                "limit": None if self.limit is None else json_float(self.limit),
                "unit": self.unit, "element": self.element}


def scaled_damage_fluence(f_ref: float, tau_ref: float, tau: float) -> float:
    """F_th(τ) = F_th(τ_ref) · √(τ/τ_ref)  (J/m²; τ in s).  Stuart et al. 1996, τ ≳ 50 ps."""
    return f_ref * np.sqrt(tau / tau_ref)


def _gain_element_name(cav) -> Optional[str]:
    """The file's name of the gain-medium element (its key path when it has no name)."""
    for e in cav.elements:
        if isinstance(e, GainElement):
            return e.name or e.path
    return None


def run_checks(cav, b, stages: tuple, stability=None) -> list[Check]:
    """The plan's checks: gain, overlap, damage, intensity, B-integral and shot-to-shot state,
    then every stage's own checks (``stages``: switching, timing, contrast, stability; a
    stage may be ``None``).  ``cav``: the :class:`~regentime.model.Cavity`; ``b``: its
    :class:`~regentime.planning.buildup_plan.BuildupPlan`."""
    out: list[Check] = []
    n = b.dump_round_trip
    medium = cav.gain.medium
    tau = cav.seed.duration
    if not b.net_gain_ok:
        out.append(Check("error", "gain",
                         "net round-trip gain at injection is below 1 (single-pass log gain "
                         f"{b.result.log_gain[0]:.3f}, {b.path.gain_passes} gain passes, passive "
                         f"round-trip transmission {b.path.passive_transmission:.3f}): the pulse cannot build up"))
    if cav.gain.profile == "gaussian" and cav.pump.overlap < 1.0:
        out.append(Check("warning", "overlap",
                         f"pump.overlap {cav.pump.overlap:g} with profile: gaussian: the radial mode "
                         "and pump profiles already share the absorbed pump between the rings, so "
                         "overlap is read as the share stored at all (not the mode overlap); use 1 "
                         "unless part of the absorbed pump is lost"))
    peak_f = float(np.nanmax(b.result.peak_fluence[1:n + 1])) if n >= 1 else 0.0
    f_dmg = scaled_damage_fluence(medium.damage_fluence, medium.damage_duration, tau)
    text = (f"peak fluence in the crystal {peak_f / 1e4:.3g} J/cm² vs damage {f_dmg / 1e4:.3g} J/cm² "
            f"({medium.damage_fluence / 1e4:.3g} J/cm² at {medium.damage_duration * 1e9:.3g} ns scaled "
            f"with √τ to {tau * 1e12:.0f} ps)")
    if tau < 50e-12:
        text += "; √τ scaling is not valid below about 50 ps"
    crystal = _gain_element_name(cav)
    dmg = dict(value=peak_f, limit=f_dmg, unit="J/m^2", element=crystal)
    if peak_f > f_dmg:
        out.append(Check("error", "damage", "ABOVE the damage threshold: " + text, **dmg))
    elif peak_f > _WARN_SHARE * f_dmg:
        out.append(Check("warning", "damage", f"above {int(_WARN_SHARE * 100)} % of damage: " + text, **dmg))
    else:
        out.append(Check("info", "damage", text, **dmg))
    peak_i = peak_f / (SQRT_PI_LN2 * tau)
    if cav.checks.damage_intensity is not None:
        lim = cav.checks.damage_intensity
        level = "warning" if peak_i > _WARN_SHARE * lim else "info"
        out.append(Check(level if peak_i <= lim else "error", "intensity",
                         f"peak intensity {peak_i / 1e13:.3g} GW/cm² vs damage intensity {lim / 1e13:.3g} GW/cm²",
                         value=peak_i, limit=lim, unit="W/m^2", element=crystal))
    else:
        out.append(Check("info", "intensity", f"peak intensity in the crystal {peak_i / 1e13:.3g} GW/cm² "
                                              "(no damage intensity given: checks.damage_intensity)",
                         value=peak_i, unit="W/m^2", element=crystal))
    b_n = float(b.result.b_integral[n]) if n < b.result.b_integral.size else float("nan")
    lim = cav.checks.b_integral_limit
    msg = (f"B-integral up to the switch-out {b_n:.3g} rad (crystal only, n2 = "
           f"{medium.n2 * 1e4:.3g} cm²/W, {2 * n + 1 if b.optics.crystal_in_cell_arm else 2 * n} crossings)")
    bnum = dict(value=b_n, limit=lim, unit="rad", element=crystal)
    if b_n > lim:
        out.append(Check("warning", "b_integral", msg + f" exceeds the limit {lim:g} rad", **bnum))
    elif b_n > 1.0:
        out.append(Check("info", "b_integral", msg + "; above 1 rad contrast may suffer (common practice)", **bnum))
    else:
        out.append(Check("info", "b_integral", msg, **bnum))
    if b.continuous and b.shots is not None and b.shots.period != 1 and stability is None:
        kind = "irregular" if b.shots.period == 0 else f"period {b.shots.period}"
        out.append(Check("warning", "stability",
                         f"the shot-to-shot steady state at N = {n} is {kind}: output between "
                         f"{b.shots.minimum * 1e3:.4g} and {b.shots.maximum * 1e3:.4g} mJ"))
    for stage in stages:
        if stage is not None:
            out.extend(stage.checks)
    return out
