"""Ring-resolved steady state of a continuously pumped regen: Newton on the shot map.

With a Gaussian mode the crystal's state between shots is the stored fluence of every ring,
j ∈ R^R (J/m²).  One shot is the map j' = F(j; R_pump, E_seed, N, 1/f) of
:func:`regentime.physics.buildup.shot` (Frantz–Nodvik at every crossing, ring by ring:
L. M. Frantz & J. S. Nodvik, J. Appl. Phys. 34, 2346 (1963); recovery towards each ring's
own R·τ share between crossings and shots).  Its period-1 steady state is the root of

    G(j) = F(j) − j = 0,

solved by Newton's method (any numerical-analysis text, e.g. J. E. Dennis & R. B. Schnabel,
Numerical Methods for Unconstrained Optimization and Nonlinear Equations, SIAM 1996, ch. 5)
with the Jacobian J = ∂F/∂j by forward differences, all members and all R columns in one
batched shot, kept for the next steps while they contract (a chord method) and rebuilt once
when they do not.  Rings the mode does not reach (every crossing leaves them untouched)
relax in closed form to their equilibrium share j_eq = R·τ·profile and are left out of the
Newton system.

From the same Jacobian, at the fixed point:
- the stability of period 1: the largest |eigenvalue| of J (< 1: period 1);
- the steady state of a perturbed pump or seed p: j*(p) solves j = F(j; p); two chord steps
  j ← j + (I − J)⁻¹ (F(j; p) − j) from j*(p₀) reach it to ~(δp)³ (the sensitivities).

Valid as :func:`regentime.physics.buildup.shot` (pulse ≪ T_rt ≪ … , 1/f ≥ N·T_rt).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from regentime.physics.buildup import GainModel, RoundTripPath, shot

TOL = 1e-12  # converged when |F(j) − j| ≤ TOL · max_r j (per member)
MAX_STEPS = 30
_FD_STEP = 1e-7  # forward-difference step, relative to the member's largest ring fluence


def _map(gm: GainModel, path: RoundTripPath, seeds, ns, period, j, rate):
    return shot(replace(gm, pump_rate=rate), path, seeds, j, ns, period)


def reached_rings(gm: GainModel) -> np.ndarray:
    """Rings the mode reaches (boolean, R): a ring with no mode intensity is never depleted."""
    return np.asarray(gm.grid.mode, dtype=float) > 0.0


def jacobian(gm: GainModel, path: RoundTripPath, seeds, ns, period, j, rate, cols=None):
    """∂F/∂j (B, C, C) over the columns ``cols`` (default all rings) by forward differences,
    one batched shot of B·(C + 1) members; also returns (output, F(j)) at j."""
    b_n, r_n = j.shape
    cols = np.arange(r_n) if cols is None else np.asarray(cols)
    c_n = cols.size
    h = _FD_STEP * np.maximum(np.abs(j).max(axis=1), 1e-300)  # (B,)
    big = np.repeat(j[:, None, :], c_n + 1, axis=1)  # (B, C+1, R)
    big[:, np.arange(1, c_n + 1), cols] += h[:, None]
    def rep(a):
        return np.repeat(np.broadcast_to(np.asarray(a), (b_n,)), c_n + 1)

    out, f = _map(gm, path, rep(seeds), rep(ns), period, big.reshape(-1, r_n), rep(rate))
    out, f = out.reshape(b_n, c_n + 1), f.reshape(b_n, c_n + 1, r_n)
    jac = (f[:, 1:, :][:, :, cols] - f[:, :1, cols]) / h[:, None, None]  # (B, col moved, row)
    return np.swapaxes(jac, 1, 2), out[:, 0], f[:, 0]


def ring_fixed_points(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j0):
    """Period-1 fixed points j* (B, R) of the ring shot map for a batch.

    ``gm.pump_rate`` scalar or (B,) W; ``seeds`` (B,) J; ``ns`` (B,) round trips; ``j0``
    (B, R) J/m² a starting state (best the energy-only estimate).  Returns
    ``(output, j_star, jac, ok)``: output energy at j* (J, NaN where Newton failed), the
    Jacobian (B, C, C) over the reached rings at j*, and the convergence flags.
    """
    x = np.clip(np.array(j0, dtype=float), 0.0, None)
    b_n, r_n = x.shape
    seeds = np.broadcast_to(np.asarray(seeds, dtype=float), (b_n,)).copy()
    ns = np.broadcast_to(np.asarray(ns), (b_n,)).copy()
    rate = np.broadcast_to(np.asarray(gm.pump_rate, dtype=float), (b_n,)).copy()
    reach = reached_rings(gm)
    cols = np.flatnonzero(reach)
    j_eq = np.broadcast_to(gm.stored_fluence(rate * gm.tau), (b_n, r_n))
    x[:, ~reach] = j_eq[:, ~reach]  # closed form: never depleted, at equilibrium
    scale = np.maximum(j_eq.max(axis=1), 1e-300)
    out = np.full(b_n, np.nan)
    ok = np.zeros(b_n, dtype=bool)
    jac_all = np.zeros((b_n, cols.size, cols.size))
    eye = np.eye(cols.size)
    active = np.arange(b_n)
    jac, o, f = jacobian(gm, path, seeds, ns, period, x, rate, cols)
    prev = np.full(b_n, np.inf)
    for _ in range(MAX_STEPS):
        res = f - x[active]
        err = np.abs(res).max(axis=1) / scale[active]
        done = err <= TOL
        out[active[done]] = o[done]
        ok[active[done]] = True
        jac_all[active[done]] = jac[done]
        slow = ~done & (err > 0.25 * prev[active])  # the chord no longer contracts: rebuild J
        prev[active] = err
        keep = ~done
        active, jac, res, slow = active[keep], jac[keep], res[keep], slow[keep]
        if active.size == 0:
            break
        if slow.any():
            idx = active[slow]
            jac[slow], _, _ = jacobian(gm, path, seeds[idx], ns[idx], period, x[idx], rate[idx], cols)
        step = np.linalg.solve(eye - jac, res[:, cols][..., None])[..., 0]
        x[active[:, None], cols] = np.clip(x[active][:, cols] + step, 0.0, None)
        o, f = _map(gm, path, seeds[active], ns[active], period, x[active], rate[active])
    if active.size:  # not converged: the last iterate is no steady output
        jac_all[active] = jac
    return out, x, jac_all, ok


def multiplier(jac: np.ndarray) -> np.ndarray:
    """Largest |eigenvalue| of the shot map's Jacobian (B, C, C): < 1 means period 1."""
    if jac.shape[-1] == 0:
        return np.zeros(jac.shape[0])
    return np.abs(np.linalg.eigvals(jac)).max(axis=-1)


def perturbed_fixed_points(gm: GainModel, path: RoundTripPath, seeds, ns, period: float, j_star, jac,
                           steps: int = 3):
    """Steady states for perturbed pump rates / seeds (B,) near known fixed points j* (B, R)
    with their Jacobians (B, C, C): ``steps`` chord steps j ← j + (I − J)⁻¹ (F(j) − j).
    Returns (output at the last state, state)."""
    x = np.array(j_star, dtype=float)
    b_n, _ = x.shape
    seeds = np.broadcast_to(np.asarray(seeds, dtype=float), (b_n,))
    ns = np.broadcast_to(np.asarray(ns), (b_n,))
    rate = np.broadcast_to(np.asarray(gm.pump_rate, dtype=float), (b_n,))
    reach = reached_rings(gm)
    cols = np.flatnonzero(reach)
    j_eq = np.broadcast_to(gm.stored_fluence(rate * gm.tau), x.shape)
    x[:, ~reach] = j_eq[:, ~reach]
    lhs = np.eye(cols.size) - jac
    o, f = _map(gm, path, seeds, ns, period, x, rate)
    for _ in range(steps):
        step = np.linalg.solve(lhs, (f - x)[:, cols][..., None])[..., 0]
        x[:, cols] = np.clip(x[:, cols] + step, 0.0, None)
        o, f = _map(gm, path, seeds, ns, period, x, rate)
    return o, x


__all__ = ["ring_fixed_points", "multiplier", "perturbed_fixed_points", "jacobian", "reached_rings"]
