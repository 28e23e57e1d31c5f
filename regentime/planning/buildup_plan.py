"""Build-up of the cavity and the choice of the switch-out (dump) round trip.

Rules (docs/definitions.md "Dump round trip"):
- ``auto``: the N ≥ 1 that maximises the output energy;
- ``steady``: among round trips giving at least 90 % of the peak output, the N that minimises
  the output noise for equal relative pump and seed noise, i.e. √(S_pump² + S_seed²) with
  S_x = ∂ln E_out/∂ln x (central differences, ±0.1 %);
- an integer: as given.
With a continuous pump every N is evaluated at its own steady state across shots
(:mod:`regentime.planning.steady`).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Optional

import numpy as np

from regentime.model import Cavity
from regentime.physics.buildup import BuildupResult, GainModel, RoundTripPath, simulate_buildup
from regentime.planning.optics import CavityOptics
from regentime.planning import steady
from regentime.planning.gainsetup import gain_model, round_trip_path

_DELTA = 1e-3  # relative step of the sensitivity differences (well above rounding, well below curvature)
_FIRST_SPAN = 64  # round trips simulated first; doubled while the peak sits near the end
_MAX_SPAN = 6400


@dataclass
class BuildupPlan:
    optics: CavityOptics
    gain: GainModel
    path: RoundTripPath
    result: BuildupResult  # 1-D (per round trip) for the operating point
    dump_round_trip: int
    rule: str  # "auto" | "steady" | "given"
    peak_round_trip: int
    output: np.ndarray  # output energy if switched out after k (k = 0 … n; NaN at 0), J
    sensitivity_pump: np.ndarray  # per k
    sensitivity_seed: np.ndarray
    stored_at_injection: float  # J
    continuous: bool
    slope: Optional[np.ndarray] = None  # continuous: F_N'(x*) per N (|.| < 1: period 1)
    shots: Optional[steady.ShotSequence] = None  # continuous: shot sequence at the dump N
    net_gain_ok: bool = True
    n_shown: int = 0
    repetition_rate: float = 0.0
    injection_state: Optional[np.ndarray] = None  # stored fluence per ring at injection (ring model)

    def stored_fluence_at_injection(self) -> np.ndarray:
        """Stored fluence per ring (J/m²) at injection: the ring-model steady state when there
        is one, else the stored energy distributed like the pump."""
        if self.injection_state is not None:
            return np.array(self.injection_state, dtype=float)
        return self.gain.stored_fluence(self.stored_at_injection)

    @property
    def output_energies(self) -> tuple[float, ...]:
        """The output energies (J) of one steady-state cycle at the switch-out, highest first.

        Period 1 (and every pulsed pump): the one energy.  Period p = 2, 4, …: the p energies
        the shots repeat.  Irregular (period 0): the highest and the lowest of the observed
        shots.  Never the unstable period-1 fixed point (docs/stability.md)."""
        shots = self.shots
        if not self.continuous or shots is None or shots.period == 1:
            return (float(self.output[self.dump_round_trip]),)
        if shots.period == 0:
            return (float(shots.maximum), float(shots.minimum))
        cycle = np.sort(np.asarray(shots.outputs[-shots.period:], dtype=float))[::-1]
        return tuple(float(x) for x in cycle)

    @property
    def output_energy(self) -> float:
        """Output energy per shot (J): the one energy of a period-1 steady state, else the mean
        over one cycle (irregular: over the observed shots)."""
        shots = self.shots
        if not self.continuous or shots is None or shots.period == 1:
            return float(self.output[self.dump_round_trip])
        if shots.period == 0:
            return float(shots.mean)
        return float(np.mean(self.output_energies))

    @property
    def extraction_efficiency(self) -> float:
        """Pulsed pump: output energy / energy stored in the mode at injection.
        Continuous pump: output power / stored-energy rate, E_out·f_rep / R (the share of the
        energy stored per period that leaves in the pulse)."""
        if self.continuous:
            per_shot = self.gain.pump_rate / self.repetition_rate
            return self.output_energy / per_shot if per_shot > 0 else 0.0
        return self.output_energy / self.stored_at_injection if self.stored_at_injection > 0 else 0.0

    def with_switching_efficiency(self, efficiency: float) -> "BuildupPlan":
        """The same plan with the outputs scaled by the switch's ejected share (η_switch only
        multiplies E_out: the dump choice and the logarithmic sensitivities do not change)."""
        factor = efficiency / self.path.switching_efficiency
        if factor == 1.0:
            return self
        res = replace(self.result, output=self.result.output * factor)
        shots = self.shots
        if shots is not None:
            shots = shots.scaled(factor)
        return replace(self, path=replace(self.path, switching_efficiency=efficiency), result=res,
                       output=self.output * factor, shots=shots)

    @property
    def period(self) -> int:
        return 1 if self.shots is None else self.shots.period


def _pulsed(cavity: Cavity, gm: GainModel, path: RoundTripPath, n: int):
    seed = cavity.seed.energy
    d = _DELTA
    seeds = np.array([seed, seed, seed, seed * (1 + d), seed * (1 - d)])
    stored = gm.stored_energy * np.array([1.0, 1 + d, 1 - d, 1.0, 1.0])
    res = simulate_buildup(gm, path, seeds, stored, n)
    out = res.output
    with np.errstate(divide="ignore", invalid="ignore"):
        s_pump = (np.log(out[:, 1]) - np.log(out[:, 2])) / (np.log1p(d) - np.log1p(-d))
        s_seed = (np.log(out[:, 3]) - np.log(out[:, 4])) / (np.log1p(d) - np.log1p(-d))
    one = BuildupResult(*(a[:, 0] if a.ndim > 1 else a for a in (
        res.energy, res.output, res.log_gain, res.stored, res.peak_fluence, res.b_integral)),
        final_stored_fluence=res.final_stored_fluence[0])
    return one, out[:, 0], s_pump, s_seed


_GRID = 160  # stored-energy grid points of the all-N steady-state scan


def _roots(x, nxt, out):
    """Per N: the fixed point of x -> nxt[N](x) on the grid (first sign change of nxt − x,
    linear interpolation), the output there, the grid bracket and the local slope."""
    h = nxt - x[None, :]
    idx = np.argmax(h <= 0, axis=1)
    idx = np.clip(idx, 1, x.size - 1)
    rows = np.arange(h.shape[0])
    h0, h1 = h[rows, idx - 1], h[rows, idx]
    x0, x1 = x[idx - 1], x[idx]
    w = np.where(h0 != h1, h0 / np.where(h0 == h1, 1, h0 - h1), 0.0)
    x_star = x0 + w * (x1 - x0)
    with np.errstate(divide="ignore", invalid="ignore"):  # output grows ~exponentially with x
        lo_, hi_ = np.log(out[rows, idx - 1]), np.log(out[rows, idx])
        o = np.exp(lo_ + w * (hi_ - lo_))
    o = np.where(np.isfinite(o), o, out[rows, idx - 1] + w * (out[rows, idx] - out[rows, idx - 1]))
    slope = (nxt[rows, idx] - nxt[rows, idx - 1]) / (x1 - x0)
    return x_star, o, (x0, x1), slope


_SECANT_STEPS = 4  # from the grid's ~1e-3 to ≲1e-9 relative (checked against steady.fixed_points)


def _newton(gm, path, seeds, ns, period, x0, slope):
    """Polish fixed points of the exact shot map: one Newton step with the grid's slope F',
    then secant steps on h(x) = F(x) − x.  Returns ``(output, x, F'(x))``."""
    x_prev = x0
    h_prev = steady.shot_map(gm, path, seeds, x_prev, ns, period)[1] - x_prev
    x = np.clip(x_prev - h_prev / np.minimum(slope - 1.0, -1e-3), 0.0, None)
    for _ in range(_SECANT_STEPS - 1):
        h = steady.shot_map(gm, path, seeds, x, ns, period)[1] - x
        dx = x - x_prev
        dh = h - h_prev
        ok = (dh != 0) & (dx != 0)
        step = np.where(ok, h * dx / np.where(ok, dh, 1.0), 0.0)
        x_prev, h_prev = x, h
        x = np.clip(x - step, 0.0, None)
    out, _ = steady.shot_map(gm, path, seeds, x, ns, period)
    h = np.maximum(x * 1e-6, 1e-18)
    slope = (steady.shot_map(gm, path, seeds, x + h, ns, period)[1]
             - steady.shot_map(gm, path, seeds, x - h, ns, period)[1]) / (2 * h)
    return out, x, slope


def _continuous(cavity: Cavity, gm: GainModel, path: RoundTripPath, n: int, must=None, exact_rings=True):
    """Steady-state output for every N = 1 … n, and sensitivities at the steady state.

    One build-up per point of a stored-energy grid serves every N at once
    (:func:`regentime.physics.buildup.shot_every_n`); the fixed point of each N is read off the
    grid and, for the round trips near the peak, polished to 1e-10 with the exact shot map
    (:func:`regentime.planning.steady.fixed_points`).  The stored fluence at injection is taken
    to have the pump's profile (exact for flat-top; an approximation for the ring model).
    """
    from regentime.physics.buildup import shot_every_n

    period = 1.0 / cavity.repetition_rate
    n_fit = max(1, min(n, int(np.floor(period / path.dt)) - 1))
    d = _DELTA
    seed = cavity.seed.energy
    variants = ((1.0, 1.0), (1 + d, 1.0), (1 - d, 1.0), (1.0, 1 + d), (1.0, 1 - d))
    x = np.linspace(0.0, gm.pump_rate * gm.tau * (1 + 2 * d), _GRID if gm.grid.rings == 1 else _GRID // 2)
    outs, slopes, stars = [], [], []
    for fp, fs in variants:
        gm_v = replace(gm, pump_rate=gm.pump_rate * fp)
        out_g, nxt_g = shot_every_n(gm_v, path, seed * fs, x, n_fit, period)
        xs, o, _, sl = _roots(x, nxt_g[1:], out_g[1:])
        outs.append(o)
        slopes.append(sl)
        stars.append(xs)
    outs = np.array(outs)
    slope = np.array(slopes[0])
    # polish with Newton steps on the exact shot map (slope from the grid): every N for the
    # one-ring model, the round trips near the peak (and a given dump) for the ring model
    nominal = outs[0]
    cand = np.arange(n_fit)
    ring_state = {}
    if gm.grid.rings > 1 and not exact_rings:
        pass  # span search only: the energy-only estimate is enough to find the peak
    elif gm.grid.rings > 1:
        # ring model: the exact steady state carries every ring's stored fluence from shot to
        # shot.  Solved for a coarse set of N, then for every N within reach of the peak, with
        # the pump and seed variants there (the sensitivities); other N are not shown.
        from regentime.physics import ring_map

        jacs = {}

        def solve(idx):
            o_r, j_r, jac, _ = ring_map.ring_fixed_points(gm, path, np.full(idx.size, seed), idx + 1, period,
                                                          gm.stored_fluence(stars[0][idx]))
            jacs.update({int(k): m for k, m in zip(idx, jac)})
            return o_r, j_r

        top1 = int(np.nanargmax(nominal))
        coarse = np.unique(np.concatenate([np.linspace(0, n_fit - 1, min(n_fit, 24)).astype(int),
                                           [top1]]))
        o_c, j_c = solve(coarse)
        guess = np.interp(np.arange(n_fit), coarse, o_c)
        fine = np.flatnonzero(guess >= 0.8 * o_c.max())
        fine = np.union1d(fine, np.clip(coarse[np.argmax(o_c)] + np.arange(-3, 4), 0, n_fit - 1))
        if must is not None and 1 <= must <= n_fit:
            fine = np.union1d(fine, [must - 1])
        new = np.setdiff1d(fine, coarse)
        o_f, j_f = solve(new) if new.size else (np.empty(0), np.empty((0, gm.grid.rings)))
        ring_out = np.full(n_fit, np.nan)
        ring_out[coarse], ring_out[new] = o_c, o_f
        states = {int(k): j for k, j in zip(coarse, j_c)}
        states.update({int(k): j for k, j in zip(new, j_f)})
        outs = np.full(outs.shape, np.nan)  # shown only where the ring model was solved
        outs[0] = ring_out
        # pump and seed variants (the sensitivities) where the steady rule looks: ≥ 90 % of the
        # peak, each from its nominal steady state with the same Jacobian (chord steps)
        band = fine[ring_out[fine] >= 0.9 * np.nanmax(ring_out)]
        band_states = np.array([states[int(k)] for k in band])
        band_jacs = np.array([jacs[int(k)] for k in band])
        nv = len(variants) - 1
        rates = np.concatenate([np.full(band.size, gm.pump_rate * fp) for fp, _ in variants[1:]])
        seeds_v = np.concatenate([np.full(band.size, seed * fs) for _, fs in variants[1:]])
        o_v, _ = ring_map.perturbed_fixed_points(replace(gm, pump_rate=rates), path, seeds_v,
                                                 np.tile(band + 1, nv), period, np.tile(band_states, (nv, 1)),
                                                 np.tile(band_jacs, (nv, 1, 1)))
        outs[1:, band] = o_v.reshape(nv, band.size)
        slope = np.full(n_fit, np.nan)
        slope[fine] = ring_map.multiplier(np.array([jacs[int(k)] for k in fine]))
        ring_state = {int(k) + 1: j for k, j in states.items()}
    elif cand.size:  # one-ring model: every N, polished on the exact shot map
        nv = len(variants)
        nn = np.tile(cand + 1, nv)
        rates = np.concatenate([np.full(cand.size, gm.pump_rate * fp) for fp, _ in variants])
        seeds = np.concatenate([np.full(cand.size, seed * fs) for _, fs in variants])
        x0 = np.concatenate([xs[cand] for xs in stars])
        sl = np.concatenate([sv[cand] for sv in slopes])
        gm_v = replace(gm, pump_rate=rates)
        o, x_new, sl_exact = _newton(gm_v, path, seeds, nn, period, x0, sl)
        slope = np.full(n_fit, np.nan)
        slope[cand] = sl_exact[:cand.size]
        outs[:, cand] = o.reshape(nv, cand.size)
    full = lambda a: np.concatenate([[np.nan], a])  # noqa: E731 - index by N
    with np.errstate(divide="ignore", invalid="ignore"):
        s_pump = (np.log(outs[1]) - np.log(outs[2])) / (np.log1p(d) - np.log1p(-d))
        s_seed = (np.log(outs[3]) - np.log(outs[4])) / (np.log1p(d) - np.log1p(-d))
    return full(outs[0]), full(s_pump), full(s_seed), full(slope), n_fit, ring_state


def choose_dump(output: np.ndarray, s_pump: np.ndarray, s_seed: np.ndarray, rule,
                stable=None) -> tuple[int, str]:
    """Apply the dump rule to per-round-trip arrays (index = N, index 0 unused).

    ``stable`` (optional, per N): False where the shot-to-shot steady state is not period 1;
    ``auto`` and ``steady`` then choose among the period-1 round trips (the plan uses period 1,
    docs/definitions.md), unless there is none.
    """
    valid = np.isfinite(output)
    valid[0] = False
    if stable is not None and not isinstance(rule, (int, np.integer)):
        ok = valid & np.asarray(stable, dtype=bool)
        if ok.any():
            valid = ok
    if isinstance(rule, (int, np.integer)) and not isinstance(rule, bool):
        return int(rule), "given"
    out = np.where(valid, output, -np.inf)
    peak = int(np.argmax(out))  # the best allowed round trip
    if rule == "steady":
        noise = np.sqrt(s_pump ** 2 + s_seed ** 2)
        ok = valid & (out >= 0.9 * out[peak]) & np.isfinite(noise)
        if ok.any():
            return int(np.argmin(np.where(ok, noise, np.inf))), "steady"
        return peak, "steady"
    return peak, "auto"


def _require_period_one(output, slope, stable, cavity: Cavity) -> None:
    """``auto`` and ``steady`` keep to period-1 round trips: a :class:`PlanError` naming the
    nearest stable setting when no round trip has a stable period-1 steady state."""
    valid = np.isfinite(output)
    valid[0] = False
    with np.errstate(invalid="ignore"):
        known = valid & np.isfinite(slope)
    if not known.any() or (valid & stable).any():
        return
    from regentime.errors import PlanError

    mult = np.where(known, np.abs(slope), np.inf)
    best = int(np.argmin(mult))
    raise PlanError(
        f"dump {cavity.dump}: no switch-out round trip has a stable period-1 steady state at "
        f"{cavity.repetition_rate:g} Hz (the shots alternate); nearest stable setting: round trip "
        f"{best} (shot-map multiplier {mult[best]:.3f}, stable below 1), or a lower pump power, "
        "a higher repetition rate or a larger seed energy; or give dump: N to accept the alternation")


def _peak_round_trip(output: np.ndarray, cavity: Cavity, gm: GainModel, g0: float) -> int:
    """Index of the largest finite output energy at N ≥ 1; a :class:`PlanError` with the
    numbers when no round trip gives a finite energy (the gain overflows any float: the mode
    is far too small or the stored energy far too large for a real amplifier)."""
    finite = np.isfinite(output)
    finite[:1] = False
    if not finite.any():
        from regentime.errors import PlanError

        fluence = gm.stored_fluence(gm.stored_energy) if gm.stored_energy > 0 else 0.0
        peak_fluence = float(np.max(np.atleast_1d(fluence)))
        raise PlanError(
            f"the build-up overflows: stored fluence {peak_fluence * 1e-4:.3g} J/cm² = "
            f"{peak_fluence / gm.j_sat:.3g} J_sat (gain e^{g0:.3g} per pass) at "
            f"{'gain.mode_radius' if cavity.gain.mode_radius is not None else 'computed mode_radius'} "
            f"{gm.grid.mode_radius * 1e6:.3g} µm, {gm.stored_energy:.3g} J "
            "stored; no real amplifier works there: check mode radius, pump and seed")
    return int(np.argmax(np.where(finite, output, -np.inf)))


def plan_buildup(cavity: Cavity, optics: CavityOptics, switching_efficiency: float = 1.0) -> BuildupPlan:
    """Simulate the build-up, evaluate every switch-out round trip, apply the dump rule."""
    gm = gain_model(cavity)
    path = round_trip_path(cavity, optics, switching_efficiency)
    continuous = cavity.pump.mode == "continuous"
    # net small-signal round-trip gain at injection (is there any build-up at all?)
    g0 = float(gm.log_gain(gm.stored_fluence(gm.stored_energy)))
    net_log = path.gain_passes * g0 + np.log(path.passive_transmission)
    n = _FIRST_SPAN
    given = cavity.dump.round_trip
    if given:
        n = max(n, given + 10)
    slope = shots = None
    ring_state: dict = {}
    while True:
        if continuous:
            output, s_pump, s_seed, slope, n_fit, ring_state = _continuous(cavity, gm, path, n, must=given,
                                                                           exact_rings=False)
        else:
            res, output, s_pump, s_seed = _pulsed(cavity, gm, path, n)
            n_fit = n
        peak = _peak_round_trip(output, cavity, gm, g0)
        past_plateau = not output[-1] >= 0.9 * output[peak]  # every N within 90 % is seen
        if (peak < 0.8 * n_fit and past_plateau) or n >= _MAX_SPAN or n_fit < n:
            break
        n *= 2
    if continuous and gm.grid.rings > 1:  # the span is set: now the exact ring-model steady states
        output, s_pump, s_seed, slope, n_fit, ring_state = _continuous(cavity, gm, path, n, must=given)
        peak = _peak_round_trip(output, cavity, gm, g0)
    n_top = output.size - 1
    if given and given > n_top:
        from regentime.errors import InputError

        raise InputError("dump", given, f"a round trip that fits between shots (at most {n_top} "
                         f"round trips of {optics.round_trip_time * 1e9:.3f} ns at this repetition rate)")
    stable = None
    if continuous:
        with np.errstate(invalid="ignore"):
            stable = ~(np.abs(slope) >= 1.0)  # unknown (NaN) counts as allowed
    dump, rule = choose_dump(output, s_pump, s_seed, cavity.dump.rule if given is None else given, stable)
    if continuous and given is None:
        _require_period_one(output, slope, stable, cavity)
    if continuous:
        # the operating point: the build-up from the steady-state stored energy for this N
        period = 1.0 / cavity.repetition_rate
        seed = cavity.seed.energy
        j_star = ring_state.get(dump)
        if gm.grid.rings > 1 and j_star is None:  # a round trip outside the scanned set
            from regentime.physics import ring_map

            x1, _, _ = steady.fixed_points(gm, path, np.array([seed]), np.array([dump]), period)
            o_r, j_r, jac, _ = ring_map.ring_fixed_points(gm, path, np.array([seed]), np.array([dump]), period,
                                                          gm.stored_fluence(x1))
            j_star, output[dump] = j_r[0], o_r[0]
            slope[dump] = ring_map.multiplier(jac)[0]
        if j_star is not None:
            stored0 = float(gm.stored_in(j_star))
            multiplier = slope[dump]
        else:
            x_star, sl, _ = steady.fixed_points(gm, path, np.array([seed]), np.array([dump]), period)
            stored0, multiplier = float(x_star[0]), sl[0]
        if abs(multiplier) >= 1.0:
            shots = steady.iterate_shots(gm, path, seed, dump, period, transient=steady.DUMP_TRANSIENT_SHOTS,
                                         observe=steady.DUMP_OBSERVED_SHOTS)
        else:
            shots = steady.ShotSequence(1, np.array([output[dump]]), float(output[dump]),
                                        float(output[dump]), float(output[dump]))
        res = simulate_buildup(replace(gm, stored_energy=stored0), path, seed, stored0, n_top,
                               stored_fluence=j_star)
    else:
        stored0, j_star = gm.stored_energy, None
    n_shown = int(min(n_top, max(dump, peak) + max(10, (max(dump, peak) + 1) // 2)))
    return BuildupPlan(optics, gm, path, res, dump, rule, peak, output, s_pump, s_seed, stored0,
                       continuous, slope, shots, net_gain_ok=bool(net_log > 0), n_shown=n_shown,
                       repetition_rate=cavity.repetition_rate,
                       injection_state=j_star if continuous else None)
