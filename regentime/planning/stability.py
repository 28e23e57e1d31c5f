"""Repetition-rate dynamics of a continuously pumped regen: stability maps, period doubling,
noise transfer.

- :func:`stability_map` — period (1, 2, 4, 8, 16, 0 = irregular) and output energy (mean,
  minimum, maximum over the observed shots) on a grid of switch-out round trips N × one swept
  quantity: repetition rate (default), seed energy or pump power.  Uses the tabulated shot
  map of :mod:`regentime.physics.dynamics` (exact arithmetic of
  :func:`regentime.physics.buildup.shot`, interpolated in the stored energy); the period
  rule is :mod:`regentime.planning.steady`'s.  A pulsed pump refills the crystal to the same
  level before every shot, so every setting is period 1 by construction.
- :func:`bifurcation` — the observed output energies against rate at fixed N, and against N
  at fixed rate (the bifurcation diagrams).
- :func:`noise_transfer` — S_pump = ∂ln E_out/∂ln P and S_seed = ∂ln E_out/∂ln E_seed per N at
  each N's own steady state: exactly the numbers of :func:`regentime.planning.buildup_plan.
  plan_buildup` (the ``steady`` dump rule uses them).
- :func:`monte_carlo` — output rms for a given rms of the pump (and seed), shot-to-shot white
  noise, reproducible with a random seed.
- :func:`plan_stability_note` — for ``regentime plan``: is the file's setting period 1, and
  the nearest period-1 round trips at the file's rate.
- :func:`local_map` — a small map around the file's setting with the point marked (TUI).

References: M. Grishin, Opt. Express 15, 9434 (2007); M. Grishin, V. Gulbinas, A.
Michailovas, Opt. Express 17, 15700 (2009).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field, replace
from typing import Callable, Optional

import numpy as np

from regentime.model import Cavity
from regentime.numfmt import eng
from regentime.physics import dynamics as dyn
from regentime.planning import steady
from regentime.planning.checks import Check
from regentime.planning.gainsetup import gain_model, round_trip_path

PERIOD_NOT_FIT = -1  # the N round trips do not fit into the period (N·T_rt > 1/f)
PERIOD_NOT_DONE = -2  # not computed (stopped by the user)
_TABLE_TOL_OUTPUT = 1e-6  # relative output error of the tables at the grid midpoints ...
_TABLE_TOL_REMAIN = 1e-8  # ... and absolute error of the stored share: nodes are doubled until met
_MAX_NODES_ONE = 16385  # largest grid for one table set (rate axis)
_MAX_NODES_MANY = 2049  # largest grid when every column has its own tables (seed or pump axis)
_CHUNK = 8192  # points iterated together: big enough for numpy, small enough to stop promptly
_AXES = ("rate", "seed", "pump")


def _setup(cavity: Cavity, optics=None):
    if optics is None:
        from regentime.planning.optics import cavity_optics

        optics = cavity_optics(cavity)
    return gain_model(cavity), round_trip_path(cavity, optics), optics


def _tables(gm, path, seeds, rates, n_values, max_nodes, nodes=1025):
    """Tables whose midpoint error meets the tolerances (nodes doubled up to ``max_nodes``;
    at most 2049 for the ring model, whose table cost grows with the number of rings)."""
    if gm.grid.rings > 1:
        max_nodes = min(max_nodes, 2049)
    while True:
        tb = dyn.build_tables(gm, path, seeds, rates, n_values, nodes=nodes)
        good = tb.error_output <= _TABLE_TOL_OUTPUT and tb.error_remain <= _TABLE_TOL_REMAIN
        if good or 2 * nodes - 1 > max_nodes:
            return tb
        nodes = 2 * nodes - 1


@dataclass
class StabilityMap:
    """Periods and energies on round_trips × the swept axis.

    ``axis``: "rate" | "seed" | "pump"; ``rates_Hz``, ``seed_energies_J``, ``pump_W``: the
    values of each (the swept one has one value per column, the others one value);
    ``round_trips`` (K,); ``period`` (K, F) int: 1, 2, 4, 8, 16, 0 irregular, −1 the round
    trips do not fit into the period, −2 not computed; ``energy_J``, ``energy_min_J``,
    ``energy_max_J`` (K, F), NaN where not computed or not fitting.  ``pump_W`` is the pump
    power for a continuous pump and the pump pulse energy (J) for a pulsed one.
    """

    axis: str
    rates_Hz: np.ndarray
    seed_energies_J: np.ndarray
    pump_W: np.ndarray
    round_trips: np.ndarray
    period: np.ndarray
    energy_J: np.ndarray
    energy_min_J: np.ndarray
    energy_max_J: np.ndarray
    continuous: bool = True
    ring_memory: bool = False
    transient: int = steady.TRANSIENT_SHOTS
    observe: int = steady.OBSERVED_SHOTS
    rel_tol: float = steady.PERIOD_REL_TOL
    table_error: float = 0.0  # relative output error of the tables at the grid midpoints
    elapsed_s: float = 0.0
    interrupted: bool = False
    file_point: Optional[tuple] = None  # (index in round_trips or None, index in values or None)
    file_round_trip: Optional[int] = None
    file_nearest: bool = False  # the file's value is not a column: the nearest column is marked
    notes: list = field(default_factory=list)

    @property
    def values(self) -> np.ndarray:
        return {"rate": self.rates_Hz, "seed": self.seed_energies_J, "pump": self.pump_W}[self.axis]

    @property
    def spread(self) -> np.ndarray:
        """(max − min)/mean of the output energy per point."""
        with np.errstate(divide="ignore", invalid="ignore"):
            return (self.energy_max_J - self.energy_min_J) / self.energy_J

    def counts(self) -> dict:
        p = self.period
        return {"period_1": int((p == 1).sum()), "period_2": int((p == 2).sum()),
                "period_4_to_16": int(((p >= 4)).sum()), "irregular": int((p == 0).sum()),
                "not_fitting": int((p == PERIOD_NOT_FIT).sum()), "not_computed": int((p == PERIOD_NOT_DONE).sum())}

    def to_dict(self) -> dict:
        return {
            "axis": self.axis,
            "rates_Hz": self.rates_Hz.tolist(),
            "seed_energies_J": self.seed_energies_J.tolist(),
            ("pump_power_W" if self.continuous else "pump_energy_J"): self.pump_W.tolist(),
            "round_trips": [int(n) for n in self.round_trips],
            "period": self.period.tolist(),
            "energy_J": self.energy_J,
            "energy_min_J": self.energy_min_J,
            "energy_max_J": self.energy_max_J,
            "continuous_pump": self.continuous,
            "ring_memory": self.ring_memory,
            "classification": {"transient_shots": self.transient, "observed_shots": self.observe,
                               "relative_tolerance": self.rel_tol, "max_period": steady.MAX_PERIOD,
                               "extended_shots": steady.EXTEND_SHOTS * steady.EXTEND_ROUNDS},
            "period_codes": {"0": "irregular (no period up to 16)", "-1": "N round trips longer than the period",
                             "-2": "not computed (stopped)"},
            "table_error_relative": self.table_error,
            "file_setting": None if self.file_round_trip is None else {
                "round_trip": self.file_round_trip, "index": list(self.file_point) if self.file_point else None},
            "counts": self.counts(),
            "interrupted": self.interrupted,
            "elapsed_s": self.elapsed_s,
            "notes": list(self.notes),
        }


def _file_pump(cavity: Cavity) -> float:
    return cavity.pump.power if cavity.pump.mode == "continuous" else cavity.pump.energy


def stability_map(cavity: Cavity, round_trips, axis: str = "rate", values=None, *, rate=None, seed=None,
                  pump=None, optics=None, transient: int = steady.TRANSIENT_SHOTS,
                  observe: int = steady.OBSERVED_SHOTS, rel_tol: float = steady.PERIOD_REL_TOL,
                  extend_rounds: int = steady.EXTEND_ROUNDS, ring_memory: bool = False,
                  file_round_trip: Optional[int] = None,
                  on_progress: Optional[Callable[[int, int], None]] = None) -> StabilityMap:
    """Map the shot-to-shot steady state over ``round_trips`` × ``values`` of ``axis``.

    ``axis``: "rate" (values in Hz), "seed" (seed energy at the polarizer, J) or "pump" (pump
    power in W for a continuous pump; pump pulse energy in J for a pulsed one).  ``rate``,
    ``seed``, ``pump`` fix the other two (default: the file's).  Every point starts from full
    storage Rτ, drops ``transient`` shots and classifies ``observe`` shots (see
    :mod:`regentime.planning.steady`).  ``ring_memory`` (Gaussian profile only): carry the
    depleted ring profile from shot to shot with the exact shot-by-shot simulation (slow:
    for small maps).  ``on_progress(done, total)`` is called as points complete.  Ctrl-C
    (KeyboardInterrupt) stops the map cleanly: the result holds what was done
    (``interrupted`` True, the rest period −2).
    """
    if axis not in _AXES:
        raise ValueError(f"axis must be one of {_AXES}")
    t0 = time.perf_counter()
    gm, path, optics = _setup(cavity, optics)
    ns = np.asarray(sorted(set(int(n) for n in np.atleast_1d(round_trips))), dtype=int)
    if ns.size == 0 or ns[0] < 1:
        raise ValueError("round trips must be positive integers")
    fixed = {"rate": cavity.repetition_rate if rate is None else float(rate),
             "seed": cavity.seed.energy if seed is None else float(seed),
             "pump": _file_pump(cavity) if pump is None else float(pump)}
    vals = np.atleast_1d(np.asarray(values if values is not None else [fixed[axis]], dtype=float))
    per_axis = {a: (vals if a == axis else np.array([fixed[a]])) for a in _AXES}
    k_n, f_n = ns.size, vals.size
    period = np.full((k_n, f_n), PERIOD_NOT_DONE, dtype=int)
    e_mean = np.full((k_n, f_n), np.nan)
    e_min = np.full((k_n, f_n), np.nan)
    e_max = np.full((k_n, f_n), np.nan)
    continuous = cavity.pump.mode == "continuous"
    result = StabilityMap(axis, per_axis["rate"], per_axis["seed"], per_axis["pump"], ns, period, e_mean,
                          e_min, e_max, continuous=continuous, ring_memory=bool(ring_memory and gm.grid.rings > 1),
                          transient=transient, observe=observe, rel_tol=rel_tol)
    rates_all = np.broadcast_to(per_axis["rate"], (f_n,)) if axis == "rate" else np.full(f_n, fixed["rate"])
    fits = (ns[:, None] * path.dt) <= 1.0 / rates_all[None, :]
    if not continuous:
        _pulsed_map(result, cavity, gm, path, ns, per_axis, axis, fits)
    else:
        try:
            if result.ring_memory:
                _ring_memory_map(result, cavity, gm, path, ns, per_axis, axis, rates_all, fits, on_progress)
            else:
                _fast_map(result, cavity, gm, path, ns, per_axis, axis, rates_all, fits, on_progress)
        except KeyboardInterrupt:
            result.interrupted = True
            result.notes.append("stopped by the user: points marked −2 were not computed")
        period[(period != PERIOD_NOT_DONE) & ~fits] = PERIOD_NOT_FIT
        for a in (e_mean, e_min, e_max):
            a[~fits] = np.nan
        if (~fits).any():
            result.notes.append("points where N round trips take longer than the period between shots are "
                                "marked −1 (they cannot be run)")
    if file_round_trip is not None:
        result.file_round_trip = int(file_round_trip)
        i = np.flatnonzero(ns == file_round_trip)
        j = np.flatnonzero(np.isclose(vals, fixed[axis], rtol=1e-9))
        if j.size == 0 and vals.size > 1 and vals.min() <= fixed[axis] <= vals.max():
            j = np.array([int(np.argmin(np.abs(vals - fixed[axis])))])
            result.file_nearest = True
        if i.size or j.size:
            result.file_point = (int(i[0]) if i.size else None, int(j[0]) if j.size else None)
    result.elapsed_s = time.perf_counter() - t0
    return result


def _pump_rate(gm, cavity, pump_value):
    return gm.pump_rate * np.asarray(pump_value, dtype=float) / cavity.pump.power


def _fast_map(res: StabilityMap, cavity, gm, path, ns, per_axis, axis, rates_all, fits, on_progress):
    k_n, f_n = ns.size, rates_all.size
    total = k_n * f_n
    done = 0
    if on_progress:
        on_progress(0, total)
    seeds = np.broadcast_to(per_axis["seed"], (f_n,)).astype(float)
    rates_r = np.broadcast_to(_pump_rate(gm, cavity, per_axis["pump"]), (f_n,)).astype(float)
    if axis == "rate":
        groups = [np.arange(f_n)]
        tb_all = _tables(gm, path, seeds[0], rates_r[0], ns, _MAX_NODES_ONE)
    else:
        per_case = 2 * 4 * k_n * 2048 * 8  # bytes of one case's tables at 2049 nodes
        g = max(1, int(64e6 // per_case))
        groups = [np.arange(s, min(s + g, f_n)) for s in range(0, f_n, g)]
        tb_all = None
    err = 0.0
    for cols in groups:
        if tb_all is None:
            tb = _tables(gm, path, seeds[cols], rates_r[cols], ns, _MAX_NODES_MANY)
            case_of_col = np.arange(cols.size)
        else:
            tb = tb_all
            case_of_col = np.zeros(cols.size, dtype=int)
        err = max(err, tb.error_output)
        kk, cc = np.meshgrid(np.arange(k_n), np.arange(cols.size), indexing="ij")
        kk, cc = kk.ravel(), cc.ravel()
        d, _ = dyn.recovery_factor(1.0 / rates_all[cols][cc], ns[kk], path.dt, gm.tau)
        for s in range(0, kk.size, _CHUNK):
            sl = slice(s, s + _CHUNK)
            orb = dyn.iterate_tables(tb, case_of_col[cc[sl]], kk[sl], d[sl], res.transient, res.observe,
                                     res.rel_tol, steady.MAX_PERIOD, extend=steady.EXTEND_SHOTS,
                                     extend_rounds=steady.EXTEND_ROUNDS)
            rows, cols_ = kk[sl], cols[cc[sl]]
            res.period[rows, cols_] = orb.period
            res.energy_J[rows, cols_] = orb.mean
            res.energy_min_J[rows, cols_] = orb.minimum
            res.energy_max_J[rows, cols_] = orb.maximum
            done += orb.period.size
            if on_progress:
                on_progress(done, total)
    res.table_error = err


def _ring_memory_map(res: StabilityMap, cavity, gm, path, ns, per_axis, axis, rates_all, fits, on_progress):
    k_n, f_n = ns.size, rates_all.size
    total = k_n * f_n
    if on_progress:
        on_progress(0, total)
    seeds = np.broadcast_to(per_axis["seed"], (f_n,)).astype(float)
    rates_r = np.broadcast_to(_pump_rate(gm, cavity, per_axis["pump"]), (f_n,)).astype(float)
    kk, cc = np.meshgrid(np.arange(k_n), np.arange(f_n), indexing="ij")
    kk, cc = kk.ravel(), cc.ravel()
    chunk = 256
    done = 0
    for s in range(0, kk.size, chunk):
        rows, cols = kk[s:s + chunk], cc[s:s + chunk]
        gm_c = replace(gm, pump_rate=rates_r[cols])
        obs, _ = dyn.direct_orbit(gm_c, path, seeds[cols], ns[rows], 1.0 / rates_all[cols], res.transient,
                                  res.observe, ring_memory=True)
        res.period[rows, cols] = dyn.classify_batch(obs, res.rel_tol, steady.MAX_PERIOD)
        res.energy_J[rows, cols] = obs.mean(-1)
        res.energy_min_J[rows, cols] = obs.min(-1)
        res.energy_max_J[rows, cols] = obs.max(-1)
        done += rows.size
        if on_progress:
            on_progress(done, total)
    res.notes.append("ring memory: the depleted radial profile is carried from shot to shot (exact "
                     "shot-by-shot simulation, no extension of irregular points)")


def _pulsed_map(res: StabilityMap, cavity, gm, path, ns, per_axis, axis, fits):
    """Pulsed pump: each shot starts from the same stored energy, so period 1 everywhere."""
    from regentime.physics.buildup import simulate_buildup

    f_n = res.period.shape[1]
    seeds = np.broadcast_to(per_axis["seed"], (f_n,)).astype(float)
    stored = gm.stored_energy * np.broadcast_to(per_axis["pump"], (f_n,)) / cavity.pump.energy
    r = simulate_buildup(gm, path, seeds, stored, int(ns[-1]), track=False)
    out = r.output[ns]  # (K, F)
    res.period[:] = 1
    res.period[~fits] = PERIOD_NOT_FIT
    for a in (res.energy_J, res.energy_min_J, res.energy_max_J):
        a[:] = np.where(fits, out, np.nan)
    res.notes.append("pulsed pump: every shot starts from the same stored energy, so every setting is "
                     "period 1 by construction (period doubling needs a continuous pump)")


@dataclass
class Bifurcation:
    """Observed outputs along one line of the map: ``values`` (P,) of ``axis`` ("rate" in Hz or
    "round_trips"), ``outputs`` (P, W) the last W shots' output energies (J), ``period`` (P,)."""

    axis: str
    values: np.ndarray
    outputs: np.ndarray
    period: np.ndarray
    fixed: float  # the round trips (axis rate) or the rate in Hz (axis round_trips)


def bifurcation(cavity: Cavity, round_trip: int, rate: float, rates, round_trips, optics=None,
                observe: int = steady.OBSERVED_SHOTS) -> tuple[Bifurcation, Bifurcation]:
    """Bifurcation diagrams: outputs against ``rates`` (Hz) at ``round_trip``, and against
    ``round_trips`` at ``rate`` (Hz).  Continuous pump only."""
    gm, path, _ = _setup(cavity, optics)
    rates = np.asarray(rates, dtype=float)
    ns = np.asarray(sorted(set(int(n) for n in round_trips) | {int(round_trip)}), dtype=int)
    tb = _tables(gm, path, cavity.seed.energy, gm.pump_rate, ns, _MAX_NODES_ONE)
    k0 = int(np.flatnonzero(ns == round_trip)[0])
    sweeps = []
    for kidx, per in ((np.full(rates.size, k0), 1.0 / rates), (np.arange(ns.size), np.full(ns.size, 1.0 / rate))):
        d, fits = dyn.recovery_factor(per, ns[kidx], path.dt, gm.tau)
        orb = dyn.iterate_tables(tb, np.zeros(kidx.size, dtype=int), kidx, d, steady.TRANSIENT_SHOTS, observe,
                                 steady.PERIOD_REL_TOL, steady.MAX_PERIOD, extend=steady.EXTEND_SHOTS,
                                 extend_rounds=steady.EXTEND_ROUNDS, keep=True)
        outs = np.where(fits[:, None], orb.observed, np.nan)
        sweeps.append((outs, np.where(fits, orb.period, PERIOD_NOT_FIT)))
    keep_n = np.isin(ns, np.asarray(list(round_trips), dtype=int))
    return (Bifurcation("rate", rates, sweeps[0][0], sweeps[0][1], float(round_trip)),
            Bifurcation("round_trips", ns[keep_n].astype(float), sweeps[1][0][keep_n], sweeps[1][1][keep_n],
                        float(rate)))


@dataclass
class NoiseTransfer:
    """Per switch-out round trip N (index = N, index 0 unused): steady-state output (J),
    S_pump = ∂ln E_out/∂ln P (pump power, or pump energy for a pulsed pump), S_seed =
    ∂ln E_out/∂ln E_seed, the combined √(S_pump² + S_seed²) and the fixed point's slope F'
    (|F'| < 1: period 1; NaN where not computed).  ``dump``: the plan's switch-out round trip."""

    output: np.ndarray
    s_pump: np.ndarray
    s_seed: np.ndarray
    slope: Optional[np.ndarray]
    dump: int
    rule: str
    continuous: bool

    @property
    def combined(self) -> np.ndarray:
        return np.sqrt(self.s_pump ** 2 + self.s_seed ** 2)

    def to_dict(self, round_trips=None) -> dict:
        ns = np.arange(1, self.output.size) if round_trips is None else np.asarray(round_trips, dtype=int)
        ns = ns[(ns >= 1) & (ns < self.output.size)]
        pick = lambda a: None if a is None else a[ns]  # noqa: E731
        return {"round_trips": ns.tolist(), "output_energy_J": pick(self.output),
                "pump_sensitivity": pick(self.s_pump), "seed_sensitivity": pick(self.s_seed),
                "combined_sensitivity": pick(self.combined), "fixed_point_slope": pick(self.slope),
                "dump_round_trip": self.dump, "dump_rule": self.rule,
                "definition": "S_x = d ln(E_out) / d ln(x) at each N's own steady state, central differences ±0.1 %"}


def noise_transfer(cavity: Cavity, optics=None, buildup=None) -> NoiseTransfer:
    """The sensitivities of the plan's build-up (:func:`plan_buildup`), per N."""
    if buildup is None:
        from regentime.planning.buildup_plan import plan_buildup

        _, _, optics = _setup(cavity, optics)
        buildup = plan_buildup(cavity, optics)
    b = buildup
    return NoiseTransfer(np.asarray(b.output), np.asarray(b.sensitivity_pump), np.asarray(b.sensitivity_seed),
                         None if b.slope is None else np.asarray(b.slope), int(b.dump_round_trip), b.rule,
                         bool(b.continuous))


@dataclass
class MonteCarlo:
    """Output statistics with random pump (and seed) fluctuations, shot to shot.

    ``mean_J``, ``rms_relative`` (standard deviation / mean of the output), ``samples`` (the
    number of output values), ``linear_estimate`` √((S_pump σ_pump)² + (S_seed σ_seed)²) from
    the static sensitivities (for slow fluctuations), ``period`` of the noiseless setting."""

    round_trip: int
    pump_rms: float
    seed_rms: float
    random_seed: int
    mean_J: float
    rms_relative: float
    samples: int
    linear_estimate: float
    period: int
    chains: int
    shots: int

    def to_dict(self) -> dict:
        return {"round_trip": self.round_trip, "pump_rms_relative": self.pump_rms,
                "seed_rms_relative": self.seed_rms, "random_seed": self.random_seed,
                "output_mean_J": self.mean_J, "output_rms_relative": self.rms_relative,
                "samples": self.samples, "chains": self.chains, "shots_per_chain": self.shots,
                "static_linear_estimate": self.linear_estimate, "noiseless_period": self.period,
                "model": "pump power (or pump energy) and seed energy drawn independently for every shot "
                         "(Gaussian, white); the stored energy carries over between shots"}


def monte_carlo(cavity: Cavity, round_trip: int, pump_rms: float, seed_rms: float = 0.0, random_seed: int = 0,
                chains: int = 128, shots: int = 200, optics=None, buildup=None) -> MonteCarlo:
    """Monte-Carlo estimate of the output's relative rms at ``round_trip`` for a relative rms
    ``pump_rms`` of the pump power (pump energy for a pulsed pump) and ``seed_rms`` of the seed
    energy, each drawn independently (Gaussian) for every shot.

    Continuous pump: ``chains`` independent shot sequences with the exact shot map
    (:func:`regentime.planning.steady.shot_map`), each started at the noiseless steady state
    (or after the classification transient when that is not period 1), ``shots`` recorded
    after a burn-in of 100 shots; the pump power of a shot acts over its whole period.
    Pulsed pump: independent shots of the build-up.  Reproducible: the same ``random_seed``
    gives the same numbers.
    """
    from regentime.physics.buildup import simulate_buildup

    gm, path, optics = _setup(cavity, optics)
    nt = noise_transfer(cavity, optics, buildup)
    rng = np.random.default_rng(random_seed)
    n = int(round_trip)
    seed0 = cavity.seed.energy
    lin = float(np.hypot(nt.s_pump[n] * pump_rms, nt.s_seed[n] * seed_rms)) if n < nt.output.size else float("nan")
    if cavity.pump.mode != "continuous":
        m = chains * shots
        fp = 1.0 + pump_rms * rng.standard_normal(m)
        fs = 1.0 + seed_rms * rng.standard_normal(m)
        r = simulate_buildup(gm, path, seed0 * fs, gm.stored_energy * fp, n, track=False)
        out = r.output[n]
        return MonteCarlo(n, pump_rms, seed_rms, random_seed, float(out.mean()), float(out.std() / out.mean()),
                          int(m), lin, 1, chains, shots)
    period = 1.0 / cavity.repetition_rate
    x_star, slope, _ = steady.fixed_points(gm, path, np.array([seed0]), np.array([n]), period)
    if abs(slope[0]) < 1.0:
        x = np.full(chains, x_star[0])
        burn = 100
        p0 = 1
    else:
        x = np.full(chains, gm.pump_rate * gm.tau)
        burn = steady.TRANSIENT_SHOTS
        p0 = steady.iterate_shots(gm, path, seed0, n, period).period
    ns = np.full(chains, n)
    outs = np.empty((shots, chains))
    for s in range(burn + shots):
        fp = 1.0 + pump_rms * rng.standard_normal(chains)
        fs = 1.0 + seed_rms * rng.standard_normal(chains)
        gm_s = replace(gm, pump_rate=gm.pump_rate * np.maximum(fp, 0.0))
        out, x = steady.shot_map(gm_s, path, seed0 * np.maximum(fs, 0.0), x, ns, period)
        if s >= burn:
            outs[s - burn] = out
    return MonteCarlo(n, pump_rms, seed_rms, random_seed, float(outs.mean()), float(outs.std() / outs.mean()),
                      int(outs.size), lin, int(p0), chains, shots)


@dataclass
class StabilityNote:
    """What ``regentime plan`` says about the shot-to-shot dynamics at the file's setting."""

    rate_Hz: float
    round_trip: int
    period: int
    nearest_below: Optional[int]
    nearest_above: Optional[int]
    stable_round_trips: list  # [first, last] ranges of period-1 N at the file's rate
    checks: list

    def to_dict(self) -> dict:
        return {"rate_Hz": self.rate_Hz, "round_trip": self.round_trip, "period": self.period,
                "nearest_period1_below": self.nearest_below, "nearest_period1_above": self.nearest_above,
                "period1_round_trips": self.stable_round_trips}


def _ranges(ns: np.ndarray) -> list:
    out: list = []
    for n in ns.tolist():
        if out and n == out[-1][1] + 1:
            out[-1][1] = n
        else:
            out.append([n, n])
    return out


def period1_round_trips(cavity: Cavity, n_max: int, optics=None, nodes: int = 1025) -> np.ndarray:
    """Round trips N ≤ n_max whose period-1 fixed point at the file's rate is stable
    (|F_N'(x*)| < 1), from the tables (fast: for ``plan``)."""
    gm, path, _ = _setup(cavity, optics)
    period = 1.0 / cavity.repetition_rate
    n_fit = int(min(n_max, np.floor(period / path.dt)))
    if n_fit < 1:
        return np.array([], dtype=int)
    ns = np.arange(1, n_fit + 1)
    tb = dyn.build_tables(gm, path, cavity.seed.energy, gm.pump_rate, ns, nodes=nodes)
    d, _ = dyn.recovery_factor(period, ns, path.dt, gm.tau)
    _, slope, _ = dyn.fixed_points_tables(tb, np.zeros(ns.size, dtype=int), np.arange(ns.size), d)
    return ns[np.abs(slope) < 1.0]


def plan_stability_note(cavity: Cavity, optics, buildup) -> StabilityNote:
    """Warn when the file's own setting is not period 1 and name the nearest period-1 round
    trips at the file's rate (the period from the plan's own shot sequence)."""
    n = int(buildup.dump_round_trip)
    rate = cavity.repetition_rate
    p = int(buildup.period)
    n_max = max(n + 40, min(2 * max(n, int(buildup.peak_round_trip)) + 10, 120))
    gm = buildup.gain
    # a coarser grid for the ring model keeps `plan` fast (the slope test needs ~1e-4, not 1e-8)
    stable = period1_round_trips(cavity, n_max, optics, nodes=1025 if gm.grid.rings == 1 else 129)
    below = stable[stable < n]
    above = stable[stable > n]
    nb = int(below[-1]) if below.size else None
    na = int(above[0]) if above.size else None
    checks = []
    where = f"at {eng(rate, 'Hz')}"
    if p != 1:
        kind = "irregular" if p == 0 else f"period {p}"
        near = [f"N = {v}" for v in (nb, na) if v is not None]
        tail = (f"the nearest period-1 round trips {where} are " + " and ".join(near)) if near else \
            f"no round trip up to N = {n_max} is period 1 {where}"
        checks.append(Check("warning", "stability",
                            f"switch-out after N = {n} is {kind} shot to shot; {tail} "
                            "(regentime stability maps rate × round trips)"))
    elif stable.size:
        rng_txt = ", ".join(f"{a}–{b}" if a != b else f"{a}" for a, b in _ranges(stable)[:4])
        checks.append(Check("info", "stability", f"N = {n} is period 1 shot to shot {where}; period-1 round "
                                                 f"trips up to N = {n_max}: {rng_txt}"))
    return StabilityNote(rate, n, p, nb, na, _ranges(stable), checks)


def local_map(cavity: Cavity, round_trip: int, optics=None, rate_span: float = 0.5, n_span: int = 20,
              n_rates: int = 41, on_progress=None) -> StabilityMap:
    """A small map around the file's setting (rates ×(1 ± rate_span), N ± n_span) with the
    file's point marked (``file_point``): for the TUI."""
    f0 = cavity.repetition_rate
    rates = np.unique(np.concatenate([np.linspace(f0 * (1 - rate_span), f0 * (1 + rate_span), n_rates), [f0]]))
    ns = np.arange(max(1, round_trip - n_span), round_trip + n_span + 1)
    return stability_map(cavity, ns, "rate", rates, optics=optics, file_round_trip=round_trip,
                         on_progress=on_progress)


__all__ = ["StabilityMap", "stability_map", "Bifurcation", "bifurcation", "NoiseTransfer", "noise_transfer",
           "MonteCarlo", "monte_carlo", "StabilityNote", "plan_stability_note", "period1_round_trips",
           "local_map", "PERIOD_NOT_FIT", "PERIOD_NOT_DONE"]
