"""Fast shot-to-shot map of a continuously pumped regen (tabulated extraction, all points at once).

Model (docs/definitions.md "Gain", continuous pump; M. Grishin, Opt. Express 15, 9434 (2007)).  With
x the energy stored in the mode at injection (J) and u = x/(Rτ) ∈ [0, 1] its share of the
equilibrium Rτ (R the stored-energy rate, W; τ the upper-state lifetime, s), one shot is

    build-up:   N round trips from injection, each followed by recovery over T_rt
                (E ← Rτ + (E − Rτ) e^{−T_rt/τ}), Frantz–Nodvik at every gain crossing;
    switch-out: the output pass (depleting the crystal if it lies in the cell arm);
                E_out = Q_N(u), the stored energy left is Rτ · r_N(u);
    recovery:   Δ = 1/f − N·T_rt until the next injection:  u' = 1 − (1 − r_N(u)) · e^{−Δ/τ}.

Q_N and r_N depend on the seed, the pump rate R and N but *not* on the repetition rate f,
which enters only through the factor d = e^{−Δ/τ}.  So for every N the two functions are
computed once, exactly (the same arithmetic as :func:`regentime.physics.buildup.shot`, all N
in one build-up pass), on a uniform grid of u, and represented by not-a-knot cubic splines
(error O(h⁴)); ln Q_N is tabulated, so the output error is relative.  The error is measured
at the midpoints of the grid (exact values computed in the same pass), and reported.  Then
every (f, N) point of a map is iterated at once: one table look-up and one cubic per shot
and point.

Gaussian profiles (rings): the state carried from shot to shot is the stored energy and the
stored fluence at injection is given the pump's profile (docs/definitions.md "Gain": "with the stored
fluence profile of the pump"), as :mod:`regentime.planning.steady` does.  The ring-resolved
memory of the depleted profile is available, slowly, in :func:`iterate_ring_memory`.

Valid while the pulse is short compared with T_rt and τ, and 1/f ≥ N·T_rt (otherwise the shot
does not fit into the period: such points are flagged, and computed with Δ = 0 as ``shot``
does).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable, Optional

import numpy as np

from regentime.physics.buildup import GainModel, RoundTripPath, apply_ops, shot

GRID_NODES = 2049  # spline nodes in u; the measured midpoint error is ~1e-9 for typical regens
_LOG_FLOOR = 1e-300  # guard for ln of an output energy that underflowed (never seen in practice)


@dataclass(frozen=True)
class ShotTables:
    """Tabulated shot map for C cases (seed, pump rate) and K round-trip counts.

    ``n_values`` (K,) round trips; ``equilibrium`` (C,) Rτ in J; ``remain`` and ``log_output``:
    four flat arrays each (coefficients c0…c3 of the cubic in t = u·(nodes−1) − i on interval
    i, rows ordered case, k, i) for r_N(u) (the share of Rτ left after the switch-out) and
    ln E_out(u) (E in J).  ``error_remain``: largest |cubic − exact| of r at the grid
    midpoints; ``error_output``: largest relative output error there.  ``round_trip_time``
    and ``tau`` in s.
    """

    n_values: np.ndarray
    equilibrium: np.ndarray
    nodes: int
    remain: tuple
    log_output: tuple
    error_remain: float
    error_output: float
    round_trip_time: float
    tau: float

    @property
    def cases(self) -> int:
        return int(self.equilibrium.size)

    def row_base(self, case, k_index):
        """Index of the first interval of table (case, k) in the flat coefficient arrays."""
        return ((np.asarray(case) * self.n_values.size + np.asarray(k_index)) * (self.nodes - 1)).astype(np.intp)

    def _eval(self, coef, base, u):
        t = u * (self.nodes - 1)
        i = t.astype(np.intp)
        np.minimum(i, self.nodes - 2, out=i)
        t -= i
        i += base
        c0, c1, c2, c3 = coef
        r = c3.take(i)
        r *= t
        r += c2.take(i)
        r *= t
        r += c1.take(i)
        r *= t
        r += c0.take(i)
        return r

    def remaining(self, base, u):
        """r_N(u): share of Rτ left after the switch-out (``base`` from :meth:`row_base`)."""
        return self._eval(self.remain, base, u)

    def output(self, base, u):
        """E_out(u) in J."""
        return np.exp(self._eval(self.log_output, base, u))


def build_tables(gm: GainModel, path: RoundTripPath, seed_energy, pump_rate, n_values,
                 nodes: int = GRID_NODES) -> ShotTables:
    """Tabulate Q_N and r_N for every N in ``n_values`` and every case (seed, pump rate).

    ``seed_energy`` (J) and ``pump_rate`` (R, W) broadcast to C cases; ``n_values``: increasing
    positive integers.  One build-up pass of max(N) round trips over C × (2·nodes − 1) stored
    energies (the nodes and the midpoints, for the error estimate), with exactly the arithmetic
    of :func:`regentime.physics.buildup.shot`.  Cost ∝ C·nodes·rings·max(N).
    """
    seed = np.atleast_1d(np.asarray(seed_energy, dtype=float))
    rate = np.atleast_1d(np.asarray(pump_rate, dtype=float))
    seed, rate = np.broadcast_arrays(seed, rate)
    seed, rate = seed.ravel(), rate.ravel()
    ns = np.asarray(n_values, dtype=int)
    if ns.ndim != 1 or ns.size == 0 or np.any(ns < 1) or np.any(np.diff(ns) <= 0):
        raise ValueError("n_values must be increasing positive integers")
    if nodes < 5:
        raise ValueError("nodes must be at least 5")
    c_n = seed.size
    fine = 2 * nodes - 1
    u = np.linspace(0.0, 1.0, fine)
    eq = rate * gm.tau
    gmc = replace(gm, pump_rate=rate[:, None])
    stored = eq[:, None] * u[None, :]  # (C, fine)
    j_st = gmc.stored_fluence(stored)  # (C, fine, R)
    j_eq = gmc.stored_fluence(eq[:, None])  # (C, 1, R)
    decay = np.exp(-path.dt / gm.tau)
    energy = np.broadcast_to((seed * path.reflection_s)[:, None], stored.shape).astype(float)
    out_factor = path.reflection_s * path.switching_efficiency
    k_n = ns.size
    rem = np.empty((c_n, k_n, fine))
    lout = np.empty((c_n, k_n, fine))
    want = {int(n): i for i, n in enumerate(ns)}
    safe_eq = np.where(eq > 0, eq, 1.0)[:, None]
    for k in range(1, int(ns[-1]) + 1):
        energy, j_st, _, _ = apply_ops(path.ops, energy, j_st, gm, False)
        j_st = j_eq + (j_st - j_eq) * decay
        if k in want:
            e_out, j_after, _, _ = apply_ops(path.out_ops, energy, j_st, gm, False)
            idx = want[k]
            lout[:, idx] = np.log(np.maximum(e_out * out_factor, _LOG_FLOOR))
            rem[:, idx] = gm.stored_in(j_after) / safe_eq
    rem_c, err_r = _hermite(rem)
    out_c, err_o = _hermite(lout)
    return ShotTables(ns.copy(), eq, nodes, rem_c, out_c, err_r, float(np.expm1(err_o)),
                      path.dt, gm.tau)


def _hermite(values):
    """Cubic Hermite pieces through the even samples of ``values`` (…, 2·nodes − 1), with the
    slopes from fourth-order finite differences (one-sided five-point formulas at the ends;
    any numerical-analysis text, e.g. Abramowitz & Stegun 25.3.6): error O(h⁴).  Returns the
    four flat coefficient arrays (in t ∈ [0, 1] per interval) and the largest error at the odd
    samples (the interval midpoints)."""
    f = values[..., ::2]
    m = f.shape[-1]
    d = np.empty_like(f)
    d[..., 2:-2] = (f[..., :-4] - 8.0 * f[..., 1:-3] + 8.0 * f[..., 3:-1] - f[..., 4:]) / 12.0
    d[..., 0] = (-25.0 * f[..., 0] + 48.0 * f[..., 1] - 36.0 * f[..., 2] + 16.0 * f[..., 3] - 3.0 * f[..., 4]) / 12.0
    d[..., 1] = (-3.0 * f[..., 0] - 10.0 * f[..., 1] + 18.0 * f[..., 2] - 6.0 * f[..., 3] + f[..., 4]) / 12.0
    d[..., -1] = (25.0 * f[..., -1] - 48.0 * f[..., -2] + 36.0 * f[..., -3] - 16.0 * f[..., -4] + 3.0 * f[..., -5]) / 12.0
    d[..., -2] = (3.0 * f[..., -1] + 10.0 * f[..., -2] - 18.0 * f[..., -3] + 6.0 * f[..., -4] - f[..., -5]) / 12.0
    df = np.diff(f, axis=-1)
    d0, d1 = d[..., :-1], d[..., 1:]
    c0 = f[..., :-1]
    c2 = 3.0 * df - 2.0 * d0 - d1
    c3 = d0 + d1 - 2.0 * df
    mid = c0 + 0.5 * d0 + 0.25 * c2 + 0.125 * c3
    err = float(np.max(np.abs(mid - values[..., 1::2]))) if m > 1 else 0.0
    coef = tuple(np.ascontiguousarray(c.reshape(-1)) for c in (c0, d0, c2, c3))
    return coef, err


def recovery_factor(period, n_round_trips, round_trip_time: float, tau: float):
    """d = exp(−Δ/τ) with Δ = period − N·T_rt (s); returns (d, fits) where ``fits`` is
    Δ ≥ 0 (the N round trips fit into the period).  Δ < 0 is computed as Δ = 0."""
    gap = np.asarray(period, dtype=float) - np.asarray(n_round_trips) * round_trip_time
    return np.exp(-np.maximum(gap, 0.0) / tau), gap >= 0


def classify_batch(values: np.ndarray, rel_tol: float, max_period: int) -> np.ndarray:
    """Period of each row of ``values`` (P, W): the smallest p in 1, 2, 4, …, max_period with
    |v_i − v_{i−p}| ≤ rel_tol · max|v| over the row, else 0 (irregular).  A row must hold more
    than 2p values to show period p."""
    return _classify_columns(np.ascontiguousarray(np.asarray(values, dtype=float).T), rel_tol, max_period)


def _classify_columns(values: np.ndarray, rel_tol: float, max_period: int) -> np.ndarray:
    """:func:`classify_batch` for values laid out (W, P): shot-major, one column per point."""
    w, p_n = values.shape
    period = np.zeros(p_n, dtype=int)
    if p_n == 0:
        return period
    limit = rel_tol * np.maximum(np.max(np.abs(values), axis=0), 1e-300)
    todo = np.arange(p_n)
    p = 1
    while p <= max_period and todo.size and w > 2 * p:
        v = values[:, todo] if todo.size < p_n else values
        ok = np.all(np.abs(v[p:] - v[:-p]) <= limit[todo], axis=0)
        period[todo[ok]] = p
        todo = todo[~ok]
        p *= 2
    return period


@dataclass
class Orbit:
    """Steady state per point: ``period`` (1, 2, 4 … max_period; 0 irregular); output energy
    ``mean``, ``minimum``, ``maximum`` (J) over the observed shots; ``shots`` the number of shots
    iterated (transient + extensions + observed); ``observed`` (P, W) the last W outputs (J)
    when asked for, else None; ``state`` the stored share u at the end."""

    period: np.ndarray
    mean: np.ndarray
    minimum: np.ndarray
    maximum: np.ndarray
    shots: np.ndarray
    state: np.ndarray
    observed: Optional[np.ndarray] = None


def iterate_tables(tables: ShotTables, case, k_index, decay, transient: int, observe: int,
                   rel_tol: float, max_period: int, extend: int = 0, extend_rounds: int = 0,
                   keep: bool = False, start=1.0,
                   on_shots: Optional[Callable[[int], None]] = None) -> Orbit:
    """Iterate every point from ``start`` (share of Rτ; full storage by default).

    ``case``, ``k_index``, ``decay`` (P,): the table case, the index into ``n_values`` and the
    recovery factor of each point.  ``transient`` shots are dropped, ``observe`` are recorded and
    classified; points still irregular get up to ``extend_rounds`` further rounds of ``extend``
    shots (only they are iterated) before the last classification — this resolves slow
    convergence near a period-doubling boundary without extending every point.
    ``on_shots(n)`` is called with the number of point-shots done since the last call.
    """
    base = tables.row_base(case, k_index).astype(np.intp)
    d = np.asarray(decay, dtype=float)
    p_n = base.size
    u = np.broadcast_to(np.asarray(start, dtype=float), (p_n,)).copy()
    shots = np.zeros(p_n, dtype=int)
    obs = np.empty((observe, p_n))  # shot-major: contiguous writes and fast classification

    def run(idx, n_skip):
        b, dd, uu = base[idx], d[idx], u[idx]
        omd = 1.0 - dd
        for s in range(n_skip):
            uu = _step(tables, b, uu, dd, omd)
            if on_shots is not None and (s & 63) == 63:
                on_shots(64 * idx.size)
        out = np.empty((observe, idx.size))
        for s in range(observe):
            out[s] = tables.output(b, uu)
            uu = _step(tables, b, uu, dd, omd)
        if on_shots is not None:
            on_shots((n_skip % 64 + observe) * idx.size)
        u[idx] = uu
        obs[:, idx] = out
        shots[idx] += n_skip + observe

    everything = np.arange(p_n)
    run(everything, transient)
    period = _classify_columns(obs, rel_tol, max_period)
    for _ in range(extend_rounds):
        todo = np.flatnonzero(period == 0)
        if todo.size == 0:
            break
        run(todo, extend)
        period[todo] = _classify_columns(obs[:, todo], rel_tol, max_period)
    # A point whose period-1 fixed point is stable (|F'(u*)| < 1) is period 1, even if its orbit
    # from full storage still alternates after the transient: near |F'| = 1 the alternation
    # decays as |F'|^s and can pass the lag-2 test long before it dies out.
    todo = np.flatnonzero(period != 1)
    if todo.size:
        case_a = np.broadcast_to(np.asarray(case), (p_n,))[todo]
        k_a = np.broadcast_to(np.asarray(k_index), (p_n,))[todo]
        u_star, slope, e_star = fixed_points_tables(tables, case_a, k_a, d[todo])
        stable = np.abs(slope) < 1.0
        if stable.any():
            idx = todo[stable]
            period[idx] = 1
            obs[:, idx] = e_star[stable]
            u[idx] = u_star[stable]
    return Orbit(period, obs.mean(0), obs.min(0), obs.max(0), shots, u, obs.T.copy() if keep else None)


def _step(tables: ShotTables, base, u, d, one_minus_d):
    """u' = 1 − (1 − r_N(u))·d, kept in [0, 1] (guards the cubic's tiny overshoot)."""
    r = tables.remaining(base, u)
    r *= d
    r += one_minus_d
    return np.clip(r, 0.0, 1.0, out=r)


def fixed_points_tables(tables: ShotTables, case, k_index, decay, iterations: int = 60):
    """Period-1 fixed points u* = 1 − (1 − r_N(u*)) d on the splines, by bisection (the map's
    u' − u is > 0 at u = 0 and ≤ 0 at u = 1).  Returns (u*, slope F'(u*), E_out(u*))."""
    base = tables.row_base(case, k_index).astype(np.intp)
    d = np.asarray(decay, dtype=float)
    lo = np.zeros(base.size)
    hi = np.ones(base.size)
    for _ in range(iterations):
        mid = 0.5 * (lo + hi)
        up = 1.0 - (1.0 - tables.remaining(base, mid)) * d - mid > 0
        lo = np.where(up, mid, lo)
        hi = np.where(up, hi, mid)
    x = 0.5 * (lo + hi)
    h = 1e-6
    xp, xm = np.minimum(x + h, 1.0), np.maximum(x - h, 0.0)
    slope = (tables.remaining(base, xp) - tables.remaining(base, xm)) * d / (xp - xm)
    return x, slope, tables.output(base, x)


def direct_orbit(gm: GainModel, path: RoundTripPath, seed_energy, n_round_trips, period,
                 transient: int, observe: int, ring_memory: bool = False):
    """Reference: iterate :func:`regentime.physics.buildup.shot` shot by shot (batch).

    ``n_round_trips`` (P,) integers, ``period`` (P,) s, ``seed_energy`` scalar or (P,), J.
    Starts from full storage Rτ.  ``ring_memory``: carry the stored fluence of every ring from
    shot to shot (the depleted profile is remembered) instead of the stored energy with the
    pump's profile.  Returns the observed outputs (P, observe) in J and the stored energy (P,)
    after the last shot.
    """
    n = np.asarray(n_round_trips)
    per = np.broadcast_to(np.asarray(period, dtype=float), n.shape)
    seed = np.broadcast_to(np.asarray(seed_energy, dtype=float), n.shape)
    j = gm.stored_fluence(np.full(n.shape, gm.pump_rate * gm.tau))
    obs = np.empty(n.shape + (observe,))
    for s in range(transient + observe):
        out, j = shot(gm, path, seed, j, n, per)
        if not ring_memory:
            j = gm.stored_fluence(gm.stored_in(j))
        if s >= transient:
            obs[..., s - transient] = out
    return obs, gm.stored_in(j)


__all__ = ["GRID_NODES", "ShotTables", "build_tables", "recovery_factor", "classify_batch", "Orbit",
           "iterate_tables", "fixed_points_tables", "direct_orbit"]
