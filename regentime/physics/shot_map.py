"""The shot-to-shot map of a continuously pumped regen and its steady states (SI units).

One module for the one-ring (energy) map, the ring-resolved (Gaussian) map and the period
classification; :mod:`regentime.planning.steady` and :mod:`regentime.planning.ring_steady`
are thin planning wrappers of it.  Ring-resolved fixed points: :mod:`regentime.physics.ring_map`.

The shot-to-shot map x_{s+1} = F_N(x_s) of the stored energy at injection (continuous pump:
docs/physics.md; M. Grishin, Opt. Express 15, 9434 (2007)) always has a fixed point between
0 and the equilibrium Rτ (F_N(0) > 0, F_N(Rτ) ≤ Rτ).  It is found for every candidate N at once
by the Illinois variant of regula falsi; it is the operating point if |F_N'(x*)| < 1 (period 1).
Otherwise the shot sequence is iterated and its period classified.

Classification (the one place these numbers are set; :mod:`regentime.planning.stability` and
:mod:`regentime.physics.dynamics` use them too): iterate from full storage Rτ, drop
``TRANSIENT_SHOTS`` shots, observe ``OBSERVED_SHOTS``; the period is the smallest p in 1, 2,
4, …, ``MAX_PERIOD`` with |E_i − E_{i−p}| ≤ ``PERIOD_REL_TOL`` · max E over the observed shots,
else irregular (0).  A sequence still irregular gets up to ``EXTEND_ROUNDS`` more rounds of
``EXTEND_SHOTS`` shots before the verdict: near a period-doubling boundary the approach to the
orbit is slow (the multiplier is close to −1), and this resolves it without lengthening every
point of a map.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from regentime.physics import dynamics as dyn
from regentime.physics.buildup import GainModel, RoundTripPath, shot

_REL_TOL = 1e-10  # relative tolerance on the stored energy at the fixed point
_MAX_ITER = 80

TRANSIENT_SHOTS = 400  # shots dropped before classifying (the transient from full storage)
OBSERVED_SHOTS = 64  # shots classified: room for period 16 three times over
PERIOD_REL_TOL = 1e-4  # of the largest observed output: well above the fast map's ~1e-6 error
MAX_PERIOD = 16
EXTEND_SHOTS = 1000  # further shots for a sequence still irregular ...
EXTEND_ROUNDS = 2  # ... at most this many times
DUMP_TRANSIENT_SHOTS = 1024  # the operating point when it is not period 1: at least 1024 shots ...
DUMP_OBSERVED_SHOTS = 256  # ... then 256 observed (highest, lowest and mean when irregular)


def shot_map(gm: GainModel, path: RoundTripPath, seed, stored, n_rt, period):
    """F_N: stored energy at injection (J, batch) -> (output energy, next stored energy) (J)."""
    j = gm.stored_fluence(stored)
    out, j_next = shot(gm, path, seed, j, n_rt, period)
    return out, gm.stored_in(j_next)


def fixed_points(gm: GainModel, path: RoundTripPath, seed, n_rt, period, pump_rate=None,
                 bracket=None):
    """Period-1 fixed points x* (J) and slopes F_N'(x*) for a batch of N (and pump rates).

    ``n_rt``: integer array (batch); ``pump_rate``: optional array (batch) of R in W that
    replaces gm.pump_rate; ``bracket``: optional (lo, hi) arrays known to enclose x*
    (default 0 and Rτ).  Returns ``(x_star, slope, output_at_x_star)``.
    """
    n_rt = np.asarray(n_rt)
    if pump_rate is not None:
        gm = replace(gm, pump_rate=np.asarray(pump_rate, dtype=float))
        rate = np.asarray(pump_rate, dtype=float)
    else:
        rate = np.full(n_rt.shape, gm.pump_rate)
    if bracket is None:
        hi = rate * gm.tau + 0.0
        lo = np.zeros_like(hi)
    else:
        lo, hi = (np.asarray(b, dtype=float).copy() for b in bracket)
    scale = rate * gm.tau
    f_lo = shot_map(gm, path, seed, lo, n_rt, period)[1] - lo
    f_hi = shot_map(gm, path, seed, hi, n_rt, period)[1] - hi
    side = np.zeros(hi.shape, dtype=int)
    x = hi.copy()
    for _ in range(_MAX_ITER):
        denom = f_lo - f_hi
        x = np.where(denom != 0, (lo * (-f_hi) + hi * f_lo) / np.where(denom == 0, 1, denom), 0.5 * (lo + hi))
        fx = shot_map(gm, path, seed, x, n_rt, period)[1] - x
        if np.all(np.abs(fx) <= _REL_TOL * np.maximum(scale, 1e-300)):
            break
        pos = fx > 0
        # Illinois: halve the retained end's value when the same side is kept twice
        lo = np.where(pos, x, lo)
        f_lo = np.where(pos, fx, np.where(side == -1, f_lo * 0.5, f_lo))
        hi = np.where(pos, hi, x)
        f_hi = np.where(pos, np.where(side == 1, f_hi * 0.5, f_hi), fx)
        side = np.where(pos, 1, -1)
    h = np.maximum(x * 1e-6, 1e-18)
    out_p, xp = shot_map(gm, path, seed, x + h, n_rt, period)
    out_m, xm = shot_map(gm, path, seed, np.maximum(x - h, 0), n_rt, period)
    slope = (xp - xm) / (x + h - np.maximum(x - h, 0))
    out = shot_map(gm, path, seed, x, n_rt, period)[0]
    return x, slope, out


@dataclass(frozen=True)
class ShotSequence:
    period: int  # 1, 2, 4, 8, 16; 0 = irregular
    outputs: np.ndarray  # the last shots' output energies (J)
    mean: float
    minimum: float
    maximum: float

    def cycle_energies(self) -> np.ndarray:
        """The output energies of one cycle, highest first (J): the last ``period`` shots;
        irregular (0): the highest and the lowest observed shot."""
        if self.period >= 1:
            return np.sort(np.asarray(self.outputs[-self.period:], dtype=float))[::-1]
        return np.array([self.maximum, self.minimum])

    def scaled(self, factor: float) -> "ShotSequence":
        """The same sequence with every output multiplied by ``factor``."""
        return ShotSequence(self.period, self.outputs * factor, self.mean * factor,
                            self.minimum * factor, self.maximum * factor)


def classify(values: np.ndarray, rel_tol: float = PERIOD_REL_TOL, max_period: int = MAX_PERIOD) -> int:
    """Smallest p in 1, 2, 4, …, max_period with |v_i − v_{i−p}| ≤ rel_tol·max|v| over the
    observed shots, else 0 (irregular)."""
    scale = max(float(np.max(np.abs(values))), 1e-300)
    p = 1
    while p <= max_period:
        if values.size > 2 * p and np.all(np.abs(values[p:] - values[:-p]) <= rel_tol * scale):
            return p
        p *= 2
    return 0


def iterate_shots(gm: GainModel, path: RoundTripPath, seed, n_rt: int, period: float,
                  transient: int = TRANSIENT_SHOTS, observe: int = OBSERVED_SHOTS,
                  extend_rounds: int = EXTEND_ROUNDS, exact: bool = False) -> ShotSequence:
    """Iterate the shot map from full storage (Rτ), drop the transient, classify the period;
    an irregular sequence is continued for up to ``extend_rounds`` × EXTEND_SHOTS shots (see
    the module docstring).

    By default the shot map is the tabulated one of :mod:`regentime.physics.dynamics` (built
    for this N alone, relative output error ≲ 1e-6, checked at the grid midpoints; much faster
    for the hundreds of shots needed); ``exact=True`` iterates :func:`shot_map` itself.
    """
    if not exact:
        return _iterate_tables(gm, path, seed, n_rt, period, transient, observe, extend_rounds)
    x = np.array([gm.pump_rate * gm.tau])
    n_arr = np.array([n_rt])

    def run(x, skip):
        outs = np.empty(observe)
        for s in range(skip + observe):
            out, x = shot_map(gm, path, seed, x, n_arr, period)
            if s >= skip:
                outs[s - skip] = out[0]
        return x, outs

    x, outs = run(x, transient)
    p = classify(outs)
    for _ in range(extend_rounds):
        if p != 0:
            break
        x, outs = run(x, EXTEND_SHOTS)
        p = classify(outs)
    return ShotSequence(p, outs, float(outs.mean()), float(outs.min()), float(outs.max()))


def _iterate_tables(gm, path, seed, n_rt, period, transient, observe, extend_rounds) -> ShotSequence:
    nodes, top = 1025, (8193 if gm.grid.rings == 1 else 2049)
    while True:
        tb = dyn.build_tables(gm, path, float(np.asarray(seed).ravel()[0]), gm.pump_rate, [int(n_rt)], nodes=nodes)
        if (tb.error_output <= 1e-6 and tb.error_remain <= 1e-8) or 2 * nodes - 1 > top:
            break
        nodes = 2 * nodes - 1
    d, _ = dyn.recovery_factor(period, int(n_rt), path.dt, gm.tau)
    orb = dyn.iterate_tables(tb, np.zeros(1, dtype=int), np.zeros(1, dtype=int), np.atleast_1d(d), transient,
                             observe, PERIOD_REL_TOL, MAX_PERIOD, extend=EXTEND_SHOTS,
                             extend_rounds=extend_rounds, keep=True)
    outs = orb.observed[0]
    return ShotSequence(int(orb.period[0]), outs, float(outs.mean()), float(outs.min()), float(outs.max()))
