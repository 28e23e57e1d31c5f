"""Planning wrapper of the ring-resolved (Gaussian) continuous-pump steady state.

The solver (Newton on the ring state, stability and sensitivities from its Jacobian) is
:mod:`regentime.physics.ring_map`; these two functions keep the older call shape.
"""

from __future__ import annotations

import numpy as np

from regentime.physics import ring_map
from regentime.physics.buildup import GainModel, RoundTripPath


def ring_fixed_points(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j0):
    """Fixed points j* (B, R) of the ring shot map; returns ``(output, j*)`` (output NaN where
    no period-1 fixed point was found)."""
    out, j, _, _ = ring_map.ring_fixed_points(gm, path, seeds, ns, period, j0)
    return out, j


def ring_multiplier(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j_star) -> np.ndarray:
    """Largest |eigenvalue| of the linearised ring shot map at j* (B,): < 1 means period 1."""
    j_star = np.asarray(j_star, dtype=float)
    jac, _, _ = ring_map.jacobian(gm, path, seeds, ns, period, j_star, gm.pump_rate,
                                  np.flatnonzero(ring_map.reached_rings(gm)))
    return ring_map.multiplier(jac)
