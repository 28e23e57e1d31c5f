"""Checks on a plan: damage fluence and intensity, B-integral, gain, and the stages' own problems.

Every check produces a :class:`Check` with the numbers in its message; nothing is silent.

- Damage fluence of the crystal, scaled from its reference duration with √τ (B. C. Stuart et
  al., Phys. Rev. B 53, 1749 (1996): F_th ∝ τ^½ for pulses longer than about 50 ps); warned
  at 50 % of the scaled threshold (common practice: run at no more than about half the
  damage fluence) and, louder, above it.  Damage and B-integral are warnings, never errors:
  exit code 3 is kept for timing that cannot be met (DESIGN.md "Exit codes").
- Peak intensity I = F_peak / (1.0645 τ_FWHM) (Gaussian pulse) against a user-given damage
  intensity (``checks: {damage_intensity: …}``).
- B-integral B = (2π/λ) Σ n2 I L over every crossing of the crystal up to the switch-out;
  warning above ``checks.b_integral_limit`` (default 3 rad; common practice: 3–5 rad in a
  CPA chain, below about 1 rad where contrast matters — S. Backus et al., Rev. Sci. Instrum.
  69, 1207 (1998)); a note above 1 rad.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from regentime.physics.buildup import SQRT_PI_LN2

_WARN_SHARE = 0.5  # of the scaled damage fluence (common practice)


@dataclass(frozen=True)
class Check:
    level: str  # "info" | "warning" | "error"
    name: str  # "damage", "intensity", "b_integral", "gain", "window", "timing", "stability", ...
    message: str

    def to_dict(self) -> dict:
        return {"level": self.level, "name": self.name, "message": self.message}


def scaled_damage_fluence(f_ref: float, tau_ref: float, tau: float) -> float:
    """F_th(τ) = F_th(τ_ref) · √(τ/τ_ref)  (J/m²; τ in s).  Stuart et al. 1996, τ ≳ 50 ps."""
    return f_ref * np.sqrt(tau / tau_ref)


def run_checks(plan) -> list[Check]:
    out: list[Check] = []
    cav, b = plan.cavity, plan.buildup
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
    if peak_f > f_dmg:
        out.append(Check("warning", "damage", "ABOVE the damage threshold: " + text))
    elif peak_f > _WARN_SHARE * f_dmg:
        out.append(Check("warning", "damage", f"above {int(_WARN_SHARE * 100)} % of damage: " + text))
    else:
        out.append(Check("info", "damage", text))
    peak_i = peak_f / (SQRT_PI_LN2 * tau)
    if cav.checks.damage_intensity is not None:
        lim = cav.checks.damage_intensity
        level = "warning" if peak_i > _WARN_SHARE * lim else "info"
        out.append(Check(level, "intensity",
                         f"peak intensity {peak_i / 1e13:.3g} GW/cm² vs damage intensity {lim / 1e13:.3g} GW/cm²"))
    else:
        out.append(Check("info", "intensity", f"peak intensity in the crystal {peak_i / 1e13:.3g} GW/cm² "
                                              "(no damage intensity given: checks.damage_intensity)"))
    b_n = float(b.result.b_integral[n]) if n < b.result.b_integral.size else float("nan")
    lim = cav.checks.b_integral_limit
    msg = (f"B-integral up to the switch-out {b_n:.3g} rad (crystal only, n2 = "
           f"{medium.n2 * 1e4:.3g} cm²/W, {2 * n + 1 if b.optics.crystal_in_cell_arm else 2 * n} crossings)")
    if b_n > lim:
        out.append(Check("warning", "b_integral", msg + f" exceeds the limit {lim:g} rad"))
    elif b_n > 1.0:
        out.append(Check("info", "b_integral", msg + "; above 1 rad contrast may suffer (common practice)"))
    else:
        out.append(Check("info", "b_integral", msg))
    if b.continuous and b.shots is not None and b.shots.period != 1 and plan.stability is None:
        kind = "irregular" if b.shots.period == 0 else f"period {b.shots.period}"
        out.append(Check("warning", "stability",
                         f"the shot-to-shot steady state at N = {n} is {kind}: output between "
                         f"{b.shots.minimum * 1e3:.4g} and {b.shots.maximum * 1e3:.4g} mJ"))
    for stage in (plan.switching, plan.timing, plan.contrast, plan.stability,
                  getattr(plan, "self_lasing", None)):
        for c in getattr(stage, "checks", None) or ():
            out.append(c)
    return out
