"""Frantz–Nodvik energy extraction for one pass through a saturable gain medium.

Reference: L. M. Frantz and J. S. Nodvik, "Theory of pulse propagation in a laser
amplifier", J. Appl. Phys. 34, 2346 (1963); W. Koechner, Solid-State Laser Engineering,
6th ed. (Springer 2006), ch. 4; A. E. Siegman, Lasers (1986), ch. 10.
"""

from __future__ import annotations

import numpy as np

# Above this reduced input fluence x = J_in/J_sat the "large-x" form is used: it never forms
# exp(x) (which overflows at x > 709) and, for x > 1, its log1p argument lies in (-1/e, 0] for
# g >= 0, so nothing cancels.  Below it the plain log1p/expm1 form is exact to rounding.
_X_SWITCH = 1.0


def frantz_nodvik(j_in, log_gain, j_sat):
    """One pass through a gain medium: output fluence and the log gain left after the pass.

    Equation (Frantz–Nodvik, energy form)::

        J_out = J_sat · ln(1 + G0 · (exp(J_in/J_sat) − 1)),   G0 = exp(g)
        g_after = g − (J_out − J_in)/J_sat

    evaluated as ``x + log1p(expm1(−g)·exp(−x)) + g`` for x = J_in/J_sat > 1 and as
    ``log1p(exp(g)·expm1(x))`` otherwise, so it neither overflows nor loses precision.

    Parameters (numpy arrays broadcast together)
        j_in : input fluence, J/m^2 (≥ 0)
        log_gain : single-pass log gain g = ln G0 before the pass (may be < 0: absorption)
        j_sat : saturation fluence hν/(σ_e + σ_a), J/m^2 (> 0)

    Returns ``(j_out, log_gain_after)`` with the broadcast shape.

    Valid range: any J_in ≥ 0 (tested 1e-12 … 1e3 J/cm^2 with J_sat ≈ 0.1 … 10 J/cm^2) and
    |g| ≲ 700.  The pulse must be short compared with the upper-state lifetime (no pumping
    or decay during the pass) and the gain uniform across the area the fluence refers to.
    """
    j_in = np.asarray(j_in, dtype=float)
    g = np.asarray(log_gain, dtype=float)
    j_sat = np.asarray(j_sat, dtype=float)
    x = j_in / j_sat
    big = x > _X_SWITCH
    any_big = bool(big.any())
    with np.errstate(over="ignore", invalid="ignore"):
        # small x: ln(1 + G0 (e^x - 1)) - x
        gained = np.log1p(np.exp(g) * np.expm1(np.where(big, 0.0, x) if any_big else x)) - x
        if any_big:
            # large x: g + ln(1 + (e^{-g} - 1) e^{-x})
            extracted_big = g + np.log1p(np.expm1(-g) * np.exp(-np.where(big, x, 0.0)))
            gained = np.where(big, extracted_big, gained)  # (J_out - J_in)/J_sat
    j_out = j_in + gained * j_sat
    return j_out, g - gained
