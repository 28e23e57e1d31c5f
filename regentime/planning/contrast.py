"""Pre- and post-pulse contrast of the regen's output (the satellites at its port).

Satellites at the output (in/out) port, relative to the main pulse (definitions: docs/contrast.md):

- **Leakage pre-pulses** at −k·T_rt, k = 1 … N: every time the trapped pulse comes back from
  the cell arm to the polarizer a share ℓ leaves by the reflected port
  (:func:`regentime.planning.cell_model.leak_per_return`).  Pre-pulse k is ℓ·E_{N−k}·T_cell-arm,
  E_k the build-up energy after k round trips and T_cell-arm the cell-arm double pass (with
  the gain at that time when the crystal is in the cell arm).
- **Post-pulses** at +j·T_rt: the share of the switched-out pulse that the imperfect switch
  leaves in the cavity (1 − ejected share of the switching plan) goes on round trip by round
  trip with the gain that is left after the switch-out; at each return to the polarizer the
  off-state cell arm sends part of it out (Jones model with the cell off) and keeps the rest.
  Followed until a post-pulse is below 1e-9 of the main pulse.
- **Seed leakage**: every seed pulse of the oscillator train that meets the cavity is sent
  back to the port — after one round trip with the gain present at that time when the cell
  is off in the quarter-wave scheme, straight back (cell-arm double pass only) otherwise —
  listed at the oscillator spacing within ±span of the main pulse.  The part of the trapped
  seed pulse that the switch-on edge fails to trap is listed too.

Ratios are E_main / E_satellite (> 1 for a satellite weaker than the main pulse); ``inf``
for a satellite of zero energy (perfect optics), written ``null`` in JSON.
The cleaner: a second cell between its own polarizers after the output, gated open from
halfway between the nearest pre-pulse and the main pulse to halfway between the main pulse
and the first post-pulse (:mod:`regentime.planning.cleaner`); the inverse question (which extinction
ratio and contrast a target needs) is in :mod:`regentime.planning.contrast_target`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Optional

import numpy as np

from regentime.model import Cavity, Polarizer
from regentime.physics import contrast as pc
from regentime.physics import jones
from regentime.physics.buildup import path_from_passes
from regentime.planning.optics import CavityOptics
from regentime.planning import cell_model
from regentime.planning.checks import Check
from regentime.planning.cleaner import CleanerPlan, plan_cleaner
from regentime.planning.satellites import Satellite, Summary, summarize

POST_FLOOR = 1e-9  # post-pulses are followed until below this share of the main pulse (issue 4)
_MAX_POST = 5000  # round trips; a guard for a leftover that does not decay (it is reported)
_MAX_SEEDS = 20000  # seed pulses listed at most (a guard on --span: each costs a gain pass)


# ----- results ----------------------------------------------------------------------------


@dataclass(frozen=True)
class ContrastResult:
    """Satellites at the output port, their summary and, with a cleaner, the contrast after it."""

    main_energy: float  # J, the plan's output energy
    main_time: float  # s from trigger, main pulse at the output port
    round_trip_time: float
    dump_round_trip: int
    pre_pulses: list
    post_pulses: list
    seed_leak: list
    summary: Summary
    leak_per_return: float  # ℓ
    post_keep: float  # share kept in the cavity per return with the cell off
    post_out: float  # share sent out per return with the cell off
    left_in_cavity: float  # share of the switched-out pulse the switch leaves behind
    cleaned: Optional[CleanerPlan] = None
    timing_rows: list = field(default_factory=list)
    checks: list = field(default_factory=list)
    notes: list = field(default_factory=list)

    # the contract's names
    @property
    def nearest_pre_ratio(self) -> float:
        return self.summary.nearest_pre_ratio

    @property
    def worst_pre_ratio(self) -> float:
        return self.summary.worst_pre_ratio

    @property
    def worst_post_ratio(self) -> float:
        return self.summary.worst_post_ratio

    @property
    def energy_within(self) -> float:
        return self.summary.energy_within

    @property
    def satellites(self) -> list:
        return sorted(self.pre_pulses + self.post_pulses + self.seed_leak, key=lambda s: s.time)

    def to_dict(self) -> dict:
        """The JSON ``contrast`` object (docs/definitions.md, "JSON output") (SI units; ``null`` for an infinite ratio)."""
        out = {"pre_pulses": [s.to_dict() for s in self.pre_pulses],
               "post_pulses": [s.to_dict() for s in self.post_pulses],
               "seed_leak": [s.to_dict() for s in self.seed_leak]}
        out.update(self.summary.to_dict())
        out.update({"main_energy_J": self.main_energy, "main_time_from_trigger_s": self.main_time,
                    "leak_per_return": self.leak_per_return, "left_in_cavity": self.left_in_cavity,
                    "post_out_share": self.post_out, "post_keep_share": self.post_keep,
                    "notes": list(self.notes),
                    "ratio_null_means": "infinite ratio (no satellite energy): JSON has no infinity"})
        if self.cleaned is not None:
            out["cleaner"] = self.cleaned.to_dict()
        return out


# ----- polarisation shares ----------------------------------------------------------------


@dataclass(frozen=True)
class Shares:
    """Polarisation bookkeeping at the polarizer (from the Jones model of the cell arm).

    leak: ℓ, the share of a P pulse back from the on-state cell arm leaving by the port;
    off_out / off_keep: for a P pulse entering the off-state cell arm, the share leaving by
    the port / staying P in the cavity when it is back (before the polarizer's T_p, which the
    round-trip path applies); on_keep: P share of a P pulse back from the on-state cell arm;
    seed_straight_on/off: share of a seed pulse at the polarizer
    sent straight back (R_s in, cell arm, reflected port); seed_round_off: share coming back
    after one round trip with the cell off (polarizer factors included, T_p twice).
    """

    leak: float
    off_out: float
    off_keep: float
    on_keep: float
    seed_straight_on: float
    seed_straight_off: float
    seed_round_off: float


def polarisation_shares(cavity: Cavity, optics: CavityOptics) -> Shares:
    pol = optics.polarizer
    leak = float(cell_model.leak_per_return(cavity, optics))
    straight_off, round_off = cell_model.seed_return_shares(cavity, optics)
    g = cell_model.full_retardance(cavity, optics.cell)
    m_on = jones.cell_arm_mueller(optics.cell_arm, g, g, optics.cell.contrast)
    m_off = jones.cell_arm_mueller(optics.cell_arm, 0.0, 0.0, optics.cell.contrast)
    back = m_off @ jones.STOKES_P
    s_back = float(jones.s_share(back)) / float(back[0])
    kept = m_on @ jones.STOKES_P
    p_on = float(jones.p_share(kept)) / float(kept[0])
    seed_on = m_on @ (pol.reflection_s * jones.STOKES_S)
    s_seed_on = float(jones.s_share(seed_on)) / float(seed_on[0])
    return Shares(
        leak=leak,
        off_out=pc.port_share(pol.reflection_s, pol.extinction_ratio, s_back),
        off_keep=1.0 - s_back,  # the P share goes on (T_p applied by the path)
        on_keep=p_on,
        seed_straight_on=pol.reflection_s * pc.port_share(pol.reflection_s, pol.extinction_ratio, s_seed_on),
        seed_straight_off=float(straight_off),
        seed_round_off=float(round_off),
    )


# ----- the stored fluence in time ---------------------------------------------------------


@dataclass
class StoredHistory:
    """Energies and stored fluences of the build-up, and the gain at any time."""

    gm: Any
    t_inj: float  # s from trigger, start of round trip 1
    t_out: float  # s from trigger, main pulse back at the polarizer
    t_pump: Optional[float]  # pulsed: pump light; None: continuous
    trt: float
    energy: list  # E_k, k = 0 … N
    back: list  # energy back from the cell arm in round trip k+1 (k = 0 … N)
    j: list  # stored fluence at the start of round trip k+1 (k = 0 … N)
    j_after: np.ndarray  # after the output's cell-arm double pass

    def j_at(self, t: float):
        gm = self.gm
        if t < self.t_inj:
            if self.t_pump is not None and t < self.t_pump:
                return np.zeros_like(self.j[0])  # pulsed: before the pump light, nothing stored
            return pc.relax(self.j[0], gm, t - self.t_inj)
        if t < self.t_out:
            k = min(int((t - self.t_inj) // self.trt), len(self.j) - 1)
            return self.j[k]
        return pc.relax(self.j_after, gm, t - self.t_out)


def stored_history(cavity: Cavity, buildup, t_inj: float, t_ca: float) -> StoredHistory:
    gm, path = buildup.gain, buildup.path
    n = buildup.dump_round_trip
    j = buildup.stored_fluence_at_injection()
    e = cavity.seed.energy * path.reflection_s
    energies, backs, js = [e], [], [j]
    for _ in range(n):
        backs.append(pc.follow(path.out_ops, e, j, gm)[0])
        e, j = pc.follow(path.ops, e, j, gm)
        j = pc.relax_round_trip(j, gm, path.dt)
        energies.append(e)
        js.append(j)
    back_n, j_after = pc.follow(path.out_ops, e, j, gm)
    backs.append(back_n)
    t_pump = t_inj - cavity.pump.lead if cavity.pump.mode == "pulsed" else None
    return StoredHistory(gm, t_inj, t_inj + n * path.dt + t_ca, t_pump, path.dt, energies, backs, js, j_after)


# ----- the satellites ---------------------------------------------------------------------


def plan_contrast(cavity: Cavity, optics: CavityOptics, buildup, switching,
                  span: Optional[float] = None, shares: Optional[Shares] = None) -> "ContrastResult":
    """Satellites, summary, cleaner plan and checks for a planned cavity.

    ``span``: half-width (s) of the window around the main pulse for the seed list and the
    energy sum (default 10·T_rt); ``shares``: override of the polarisation shares (tests).
    """
    trt, t_ca = optics.round_trip_time, optics.cell_arm_time
    span = 10.0 * trt if span is None else float(span)
    if not span > 0:
        from regentime.errors import InputError

        raise InputError("--span", span, "a positive time")
    sh = shares or polarisation_shares(cavity, optics)
    n = buildup.dump_round_trip
    t_inj = cavity.seed.arrival if switching is None else float(switching.seed_time)
    hist = stored_history(cavity, buildup, t_inj, t_ca)
    main = buildup.output_energy
    t_main = hist.t_out
    notes: list[str] = []
    checks: list[Check] = []

    pre = []
    for k in range(1, n + 1):
        e = sh.leak * hist.back[n - k]
        pre.append(Satellite("pre", k, -k * trt, t_main - k * trt, e, pc.ratio(main, e),
                             "leak of round trip 1 (injection)" if k == n else ""))

    post, left, growing = _post_pulses(cavity, optics, buildup, switching, sh, hist, main)
    if growing:
        top = max(post, key=lambda s: s.energy)
        checks.append(Check("warning", "contrast",
                            f"the light left in the cavity after the switch-out ({left:.2e} of the pulse) "
                            "grows: the gain left exceeds the round-trip losses, so a second pulse builds up "
                            f"after the main one (largest post-pulse {top.energy:.3g} J, ratio {top.ratio:.3g}, "
                            f"at +{top.index} round trips); switch out later, lower the pump or improve "
                            "the switch-out"))
    seeds = _seed_leak(cavity, optics, buildup, switching, sh, hist, main, span)
    summary = summarize(main, pre, post, seeds, span)
    cleaned, rows = None, []
    if cavity.cleaner is not None:
        cleaned, cleaner_checks, rows = plan_cleaner(cavity, main, t_main, trt, pre, post, seeds, span)
        checks.extend(cleaner_checks)
    return ContrastResult(main, t_main, trt, n, pre, post, seeds, summary, sh.leak, sh.off_keep,
                          sh.off_out, left, cleaned=cleaned, timing_rows=rows, checks=checks, notes=notes)


def _post_pulses(cavity, optics, buildup, switching, sh: Shares, hist: StoredHistory, main: float):
    """Post-pulses from the share the switch-out leaves in the cavity (see the module notes)."""
    gm, path = buildup.gain, buildup.path
    trt = path.dt
    left = left_in_cavity(cavity, sh, None if switching is None else switching.ejected_share)
    rest_ops = path_from_passes([p for p in optics.passes if p.arm != "cell"], 1.0, trt).ops
    x = hist.back[-1] * left
    j = hist.j_after
    out: list[Satellite] = []
    period = 1.0 / cavity.repetition_rate
    limit = int(min(_MAX_POST, max(1.0, (period - hist.t_out + hist.t_inj) / trt)))
    growing = False
    for i in range(1, limit + 1):
        if x <= 0.0:
            break
        x, j = pc.follow(rest_ops, x, j, gm)
        back, j = pc.follow(path.out_ops, x, j, gm)
        j = pc.relax_round_trip(j, gm, trt)
        e = back * sh.off_out
        if i == 1 or e >= POST_FLOOR * main:
            out.append(Satellite("post", i, i * trt, hist.t_out + i * trt, e, pc.ratio(main, e)))
        x = back * sh.off_keep
        if e < POST_FLOOR * main and (i > 1 or e == 0.0):
            break
    growing = len(out) > 1 and max(s.energy for s in out[1:]) > out[0].energy
    return out, left, growing


def left_in_cavity(cavity: Cavity, sh: Shares, ejected: Optional[float]) -> float:
    """Share of the switched-out pulse that stays P (trapped) after the switch-off edge.

    The switching plan's ``ejected_share`` η is the energy leaving by the port relative to
    perfect polarisation optics (T_p² R_s): η = p_on · [s + (1 − s)/ER], with p_on the P share
    after the last on-state cell-arm pass and s the S share after the edge pass (port share,
    :func:`regentime.physics.contrast.port_share`).  Solved for s, the share left is 1 − s.
    Without a switching plan (η None): an instant, exact switch, 1 − s = ``sh.off_keep``.
    """
    if ejected is None or not math.isfinite(ejected):
        return sh.off_keep
    er = cavity.elements_of(Polarizer)[0].extinction_ratio
    inv = 0.0 if math.isinf(er) else 1.0 / er
    s = (float(ejected) / max(sh.on_keep, 1e-300) - inv) / (1.0 - inv)
    return min(1.0, max(0.0, 1.0 - s))


def _seed_leak(cavity, optics, buildup, switching, sh: Shares, hist: StoredHistory, main: float,
               span: float) -> list:
    """Seed pulses sent back to the port within ±span of the main pulse."""
    gm, path = buildup.gain, buildup.path
    trt, t_ca = optics.round_trip_time, optics.cell_arm_time
    seed = cavity.seed
    dt = 1.0 / seed.train_rate
    quarter = cavity.switch.scheme == "quarter-wave"
    if switching is None:  # ideal switching: the ideal gate, no seed index or trapped share
        on_edge, off_edge = hist.t_inj + 0.5 * trt, hist.t_out - 0.5 * t_ca
        m0 = trapped = None
    else:
        on_edge, off_edge = switching.on_edge, switching.off_edge
        m0, trapped = switching.seed_pulse_index, switching.trapped_share
    t_cross = optics.cell_crossings[0] if optics.cell_crossings else 0.0
    gain_ops = path_from_passes([p for p in optics.passes if p.arm == "gain"], 1.0, trt).ops
    round_ops = tuple(path.out_ops) + tuple(gain_ops) + tuple(path.out_ops)
    out: list[Satellite] = []
    # seed m reaches the polarizer at arrival + m·dt and is back at the port at most one round
    # trip and one cell-arm pass later
    lo = math.floor((hist.t_out - span - trt - t_ca - seed.arrival) / dt)
    hi = math.ceil((hist.t_out + span - seed.arrival) / dt)
    if hi - lo > _MAX_SEEDS:
        from regentime.errors import InputError

        raise InputError("--span", span, f"a span holding at most {_MAX_SEEDS} seed pulses "
                         f"(at most {_MAX_SEEDS * dt / 2 * 1e6:.3g} µs at {seed.train_rate / 1e6:.4g} MHz)")
    for m in range(lo, hi + 1):
        t_m = seed.arrival + m * dt
        if m == m0:
            share = 1.0 - float(trapped) if trapped is not None else 0.0
            if share <= 0.0:
                continue
            if quarter:
                e = share * seed.energy * sh.seed_round_off * pc.follow(round_ops, 1.0, hist.j_at(t_m), gm)[0]
                t_back, note = t_m + trt + t_ca, "untrapped part of the trapped seed pulse"
            else:
                continue  # half-wave: its straight-back part is pre-pulse N
        else:
            cell_on = on_edge <= t_m + t_cross <= off_edge
            if quarter and not cell_on:
                gain = pc.follow(round_ops, seed.energy, hist.j_at(t_m + t_ca), gm)[0]
                e = gain * sh.seed_round_off
                t_back, note = t_m + trt + t_ca, "one round trip, cell off"
            else:
                straight = sh.seed_straight_on if (quarter and cell_on) else sh.seed_straight_off
                e = straight * pc.follow(path.out_ops, seed.energy, hist.j_at(t_m), gm)[0]
                t_back, note = t_m + t_ca, "straight back, cell " + ("on" if cell_on else "off")
        rel = t_back - hist.t_out
        if abs(rel) <= span and abs(rel) > 1e-15:
            out.append(Satellite("seed", m, rel, t_back, e, pc.ratio(main, e), note))
    out.sort(key=lambda s: s.time)
    return out


__all__ = ["ContrastResult", "POST_FLOOR", "Shares", "left_in_cavity", "plan_contrast",
           "polarisation_shares", "stored_history"]
