"""Steady state of a continuously pumped regen with the radially resolved (ring) gain model.

With a Gaussian profile the crystal's state between shots is the stored fluence of every ring
(docs/definitions.md "Gain": the same law ring by ring; each ring recovers towards its own R·τ share).
The shot map j_{s+1} = F_N(j_s) then acts on a vector.  Its period-1 fixed point is found by
iterating the map from the energy-only estimate, batched over round trips, with the slowest
(geometric) mode extrapolated away (Aitken's Δ² idea applied to the dominant mode; Anderson
mixing was tried and is unstable here: the output depends exponentially on the gain).  Its stability is the largest
multiplier of the linearised map, estimated by power iteration on a small perturbation.
"""

from __future__ import annotations

import numpy as np

from regentime.physics.buildup import GainModel, RoundTripPath, shot

_TOL = 1e-8  # relative change of the stored fluence per shot that counts as converged
_MAX_ITER = 600


def ring_fixed_points(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j0):
    """Fixed points j* (B, R) of the ring-state shot map for a batch; returns ``(output, j*)``.

    ``output`` is NaN for members without a period-1 fixed point within ``_MAX_ITER`` shots.

    ``gm.pump_rate`` may be an array (B,); ``seeds`` (B,) J; ``ns`` (B,) round trips; ``j0``
    (B, R) starting stored fluence per ring (J/m²), best the energy-only estimate.  Plain shot
    iteration, with the slowest mode removed by extrapolation once its ratio λ between shots
    is steady: rings outside the mode hardly deplete, so they all relax by one common factor
    (≈ e^{−Δ/τ}) and the tail of the iteration is geometric.  Members stop when converged.
    """
    from dataclasses import replace

    x = np.array(j0, dtype=float)
    b_n = x.shape[0]
    seeds = np.broadcast_to(np.asarray(seeds, dtype=float), (b_n,))
    ns = np.broadcast_to(np.asarray(ns), (b_n,))
    rate = np.broadcast_to(np.asarray(gm.pump_rate, dtype=float), (b_n,))
    scale = np.maximum(np.abs(x).max(axis=-1), 1e-300)
    out = np.zeros(b_n)
    active = np.arange(b_n)
    d_prev = lam_prev = None
    for it in range(_MAX_ITER):
        gm_a = replace(gm, pump_rate=rate[active])
        o, g = shot(gm_a, path, seeds[active], x[active], ns[active], period)
        d = g - x[active]
        out[active] = o
        x[active] = g
        done = np.all(np.abs(d) <= _TOL * scale[active, None], axis=-1)
        if done.any():
            keep = ~done
            active, d = active[keep], d[keep]
            d_prev = None if d_prev is None else d_prev[keep]
            lam_prev = None if lam_prev is None else lam_prev[keep]
            if active.size == 0:
                break
        if d_prev is not None:
            with np.errstate(all="ignore"):
                lam = np.einsum("br,br->b", d, d_prev) / np.einsum("br,br->b", d_prev, d_prev)
            if lam_prev is not None:
                steady = (lam > 0) & (lam < 0.999) & (np.abs(lam - lam_prev) < 0.05 * (1 - lam))
                if steady.any():
                    ext = np.clip(x[active] + d * (lam / (1 - lam))[:, None], 0.0, None)
                    x[active] = np.where(steady[:, None], ext, x[active])
                    lam = np.where(steady, np.nan, lam)  # re-measure after a jump
            lam_prev = lam
        d_prev = d
    else:
        # not converged in _MAX_ITER shots: no period-1 state (a long relaxation cycle or
        # irregular shots).  The last iterate is one shot of that sequence, not a steady
        # output; reporting it every shot would create energy, so it is NaN.
        out[active] = np.nan
    return out, x


def ring_multiplier(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j_star, steps: int = 24):
    """Largest |multiplier| of the linearised shot map at j* (B,): < 1 means period 1.

    Power iteration: a perturbation of relative size 1e-6 is mapped, measured and rescaled
    ``steps`` times; the mean growth of the last half of the steps estimates |λ_max|.
    """
    j_star = np.asarray(j_star, dtype=float)
    _, base = shot(gm, path, seeds, j_star, ns, period)
    size = 1e-6 * np.maximum(np.linalg.norm(j_star, axis=-1, keepdims=True), 1e-300)
    rng = np.random.default_rng(12345)  # fixed seed: reproducible estimate
    delta = rng.standard_normal(j_star.shape)
    delta *= size / np.linalg.norm(delta, axis=-1, keepdims=True)
    logs = []
    for _ in range(steps):
        _, g = shot(gm, path, seeds, np.clip(j_star + delta, 0.0, None), ns, period)
        new = g - base
        norm = np.maximum(np.linalg.norm(new, axis=-1, keepdims=True), 1e-300)
        logs.append(np.log(norm[..., 0] / size[..., 0]))
        delta = new * (size / norm)
    return np.exp(np.mean(logs[steps // 2:], axis=0))
