"""Build-up of the cavity and the choice of the switch-out (dump) round trip.

Rules (DESIGN.md "Dump round trip"):
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
from regentime.physics.optics import CavityOptics
from regentime.planning import steady
from regentime.planning.gainsetup import gain_model, round_trip_path

_DELTA = 1e-3  # relative step of the sensitivity differences (well above rounding, well below curvature)
_FIRST_SPAN = 400  # round trips simulated first; doubled while the peak sits near the end
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

    @property
    def output_energy(self) -> float:
        return float(self.output[self.dump_round_trip])

    @property
    def extraction_efficiency(self) -> float:
        """Output energy / energy stored in the mode at injection."""
        return self.output_energy / self.stored_at_injection if self.stored_at_injection > 0 else 0.0

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


def _continuous(cavity: Cavity, gm: GainModel, path: RoundTripPath, n: int):
    """Steady-state output for every N = 1 … n, and sensitivities at the steady state."""
    period = 1.0 / cavity.repetition_rate
    n_fit = max(1, min(n, int(np.floor(period / path.dt)) - 1))
    ns = np.arange(1, n_fit + 1)
    d = _DELTA
    seed = cavity.seed.energy
    rates = np.concatenate([np.full(ns.size, gm.pump_rate * f) for f in (1.0, 1 + d, 1 - d, 1.0, 1.0)])
    seeds = np.concatenate([np.full(ns.size, seed * f) for f in (1.0, 1.0, 1.0, 1 + d, 1 - d)])
    n_all = np.tile(ns, 5)
    _, slope, out = steady.fixed_points(gm, path, seeds, n_all, period, pump_rate=rates)
    out = out.reshape(5, ns.size)
    slope = slope.reshape(5, ns.size)[0]
    full = lambda a: np.concatenate([[np.nan], a])  # noqa: E731 - index by N
    with np.errstate(divide="ignore", invalid="ignore"):
        s_pump = (np.log(out[1]) - np.log(out[2])) / (np.log1p(d) - np.log1p(-d))
        s_seed = (np.log(out[3]) - np.log(out[4])) / (np.log1p(d) - np.log1p(-d))
    return full(out[0]), full(s_pump), full(s_seed), full(slope), n_fit


def choose_dump(output: np.ndarray, s_pump: np.ndarray, s_seed: np.ndarray, rule) -> tuple[int, str]:
    """Apply the dump rule to per-round-trip arrays (index = N, index 0 unused)."""
    valid = np.isfinite(output)
    valid[0] = False
    if isinstance(rule, (int, np.integer)) and not isinstance(rule, bool):
        return int(rule), "given"
    out = np.where(valid, output, -np.inf)
    peak = int(np.argmax(out))
    if rule == "steady":
        noise = np.sqrt(s_pump ** 2 + s_seed ** 2)
        ok = valid & (out >= 0.9 * out[peak]) & np.isfinite(noise)
        if ok.any():
            return int(np.argmin(np.where(ok, noise, np.inf))), "steady"
        return peak, "steady"
    return peak, "auto"


def plan_buildup(cavity: Cavity, optics: CavityOptics, switching_efficiency: float = 1.0) -> BuildupPlan:
    """Simulate the build-up, evaluate every switch-out round trip, apply the dump rule."""
    gm = gain_model(cavity)
    path = round_trip_path(cavity, optics, switching_efficiency)
    continuous = cavity.pump.mode == "continuous"
    # net small-signal round-trip gain at injection (is there any build-up at all?)
    g0 = float(gm.log_gain(gm.stored_fluence(gm.stored_energy)))
    net_log = path.gain_passes * g0 + np.log(path.passive_transmission)
    n = _FIRST_SPAN
    given = cavity.dump if isinstance(cavity.dump, int) and not isinstance(cavity.dump, bool) else None
    if given:
        n = max(n, given + 10)
    slope = shots = None
    while True:
        if continuous:
            output, s_pump, s_seed, slope, n_fit = _continuous(cavity, gm, path, n)
        else:
            res, output, s_pump, s_seed = _pulsed(cavity, gm, path, n)
            n_fit = n
        peak = int(np.nanargmax(np.where(np.arange(output.size) >= 1, output, np.nan)))
        if peak < 0.8 * n_fit or n >= _MAX_SPAN or n_fit < n:
            break
        n *= 2
    n_top = output.size - 1
    if given and given > n_top:
        from regentime.errors import InputError

        raise InputError("dump", given, f"a round trip that fits between shots (at most {n_top} "
                         f"round trips of {optics.round_trip_time * 1e9:.3f} ns at this repetition rate)")
    dump, rule = choose_dump(output, s_pump, s_seed, cavity.dump if given is None else given)
    if continuous:
        # the operating point: the build-up from the steady-state stored energy for this N
        period = 1.0 / cavity.repetition_rate
        x_star, sl, _ = steady.fixed_points(gm, path, np.array([cavity.seed.energy]), np.array([dump]), period)
        stored0 = float(x_star[0])
        if abs(sl[0]) >= 1.0:
            shots = steady.iterate_shots(gm, path, cavity.seed.energy, dump, period)
        else:
            shots = steady.ShotSequence(1, np.array([output[dump]]), float(output[dump]),
                                        float(output[dump]), float(output[dump]))
        res = simulate_buildup(replace(gm, stored_energy=stored0), path, cavity.seed.energy, stored0, n_top)
    else:
        stored0 = gm.stored_energy
    n_shown = int(min(n_top, max(dump, peak) + max(10, (max(dump, peak) + 1) // 2)))
    return BuildupPlan(optics, gm, path, res, dump, rule, peak, output, s_pump, s_seed, stored0,
                       continuous, slope, shots, net_gain_ok=bool(net_log > 0), n_shown=n_shown)
