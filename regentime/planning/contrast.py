"""Pre- and post-pulse contrast of the regen's output, and the plan of an external pulse cleaner.

Satellites at the output (in/out) port, relative to the main pulse (DESIGN.md "Contrast"):

- **Leakage pre-pulses** at −k·T_rt, k = 1 … N: every time the trapped pulse comes back from
  the cell arm to the polarizer a share ℓ leaves by the reflected port
  (:func:`regentime.physics.jones.leak_per_return`).  Pre-pulse k is ℓ·E_{N−k}·T_cell-arm,
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
and the first post-pulse (see :func:`plan_cleaner`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any, Optional

import numpy as np

from regentime.model import Cavity, PockelsCell, Polarizer
from regentime.physics import contrast as pc
from regentime.physics.buildup import path_from_passes
from regentime.physics.optics import CavityOptics
from regentime.planning.checks import Check

POST_FLOOR = 1e-9  # post-pulses are followed until below this share of the main pulse (issue 4)
_MAX_POST = 5000  # round trips; a guard for a leftover that does not decay (it is reported)
_MAX_SEEDS = 20000  # seed pulses listed at most (a guard on --span: each costs a gain pass)
_PULSE_WIDTHS = 2.0  # a pulse occupies ±1 FWHM around its centre for the cleaner-gate fit


# ----- results ----------------------------------------------------------------------------


@dataclass(frozen=True)
class Satellite:
    """One satellite pulse at the output port.

    kind: "pre" (round-trip leakage), "post" or "seed"; index: k (round trips before the main
    pulse), j (after it) or m (seed pulse number from the file's arrival); time: s from the
    main pulse; time_from_trigger: s from the generator's trigger input (at the regen's port;
    at the cleaner for cleaned lists); energy: J; ratio: E_main/E.
    """

    kind: str
    index: int
    time: float
    time_from_trigger: float
    energy: float
    ratio: float
    note: str = ""

    @property
    def db(self) -> float:
        return pc.decibels(self.ratio)

    def to_dict(self) -> dict:
        return {"time_s": self.time, "energy_J": self.energy, "ratio": _finite(self.ratio),
                "time_from_trigger_s": self.time_from_trigger, "dB": _finite(self.db),
                "kind": self.kind, "index": self.index, "note": self.note}


@dataclass
class Summary:
    """The numbers users ask for first, from one set of satellites."""

    main_energy: float
    nearest_pre_ratio: float
    worst_pre_ratio: float
    worst_post_ratio: float
    worst_seed_ratio: float
    energy_within: float  # J in all satellites with |t| ≤ span
    span: float

    @property
    def energy_within_ratio(self) -> float:
        return pc.ratio(self.main_energy, self.energy_within)

    def to_dict(self) -> dict:
        return {"nearest_pre_ratio": _finite(self.nearest_pre_ratio),
                "worst_pre_ratio": _finite(self.worst_pre_ratio),
                "worst_post_ratio": _finite(self.worst_post_ratio),
                "worst_seed_ratio": _finite(self.worst_seed_ratio),
                "energy_within_J": self.energy_within, "energy_within_ratio": _finite(self.energy_within_ratio),
                "span_s": self.span}


@dataclass
class CleanerPlan:
    """Gate of the external cleaning cell and the contrast after it."""

    open_edge: float  # s from trigger, 50 % of the opening edge at the cleaner cell
    close_edge: float
    delay: float  # generator setting, s (latency and cable removed)
    width: float  # gate width between the 50 % points, s
    margin: float  # s, free time on each side of a ramp (negative: the edge does not fit)
    fits: bool
    main_transmission: float
    main_energy: float  # after the cleaner, J
    pre_pulses: list
    post_pulses: list
    seed_leak: list
    summary: Summary
    extinction_ratio: float
    transmission: float

    def to_dict(self) -> dict:
        out = {"open_edge_s": self.open_edge, "close_edge_s": self.close_edge, "delay_s": self.delay,
               "gate_width_s": self.width, "margin_s": self.margin, "edge_fits": self.fits,
               "main_transmission": self.main_transmission, "main_energy_J": self.main_energy,
               "extinction_ratio": _finite(self.extinction_ratio), "transmission": self.transmission,
               "pre_pulses": [s.to_dict() for s in self.pre_pulses],
               "post_pulses": [s.to_dict() for s in self.post_pulses],
               "seed_leak": [s.to_dict() for s in self.seed_leak]}
        out.update(self.summary.to_dict())
        return out


@dataclass
class ContrastResult:
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
        """DESIGN.md's ``contrast`` object (SI units; ``null`` for an infinite ratio)."""
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


def _finite(x: float) -> Optional[float]:
    return float(x) if math.isfinite(x) else None


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
    from regentime.physics import jones

    pol = optics.polarizer
    leak = float(jones.leak_per_return(cavity, optics))
    straight_off, round_off = jones.seed_return_shares(cavity, optics)
    g = jones.full_retardance(cavity, optics.cell)
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
class _History:
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


def _history(cavity: Cavity, buildup, t_inj: float, t_ca: float) -> _History:
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
    return _History(gm, t_inj, t_inj + n * path.dt + t_ca, t_pump, path.dt, energies, backs, js, j_after)


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
    t_inj = float(getattr(switching, "seed_time", None) or cavity.seed.arrival)
    hist = _history(cavity, buildup, t_inj, t_ca)
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
    summary = _summary(main, pre, post, seeds, span)
    result = ContrastResult(main, t_main, trt, n, pre, post, seeds, summary, sh.leak, sh.off_keep,
                            sh.off_out, left, checks=checks, notes=notes)
    if cavity.cleaner is not None:
        plan_cleaner(cavity, result)
    return result


def _post_pulses(cavity, optics, buildup, switching, sh: Shares, hist: _History, main: float):
    """Post-pulses from the share the switch-out leaves in the cavity (see the module notes)."""
    gm, path = buildup.gain, buildup.path
    trt = path.dt
    left = left_in_cavity(cavity, sh, getattr(switching, "ejected_share", None))
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


def _seed_leak(cavity, optics, buildup, switching, sh: Shares, hist: _History, main: float,
               span: float) -> list:
    """Seed pulses sent back to the port within ±span of the main pulse."""
    gm, path = buildup.gain, buildup.path
    trt, t_ca = optics.round_trip_time, optics.cell_arm_time
    seed = cavity.seed
    dt = 1.0 / seed.train_rate
    quarter = cavity.switch.scheme == "quarter-wave"
    on_edge = getattr(switching, "on_edge", None)
    off_edge = getattr(switching, "off_edge", None)
    if on_edge is None or off_edge is None:  # no switching plan: the ideal gate
        on_edge, off_edge = hist.t_inj + 0.5 * trt, hist.t_out - 0.5 * t_ca
    m0 = getattr(switching, "seed_pulse_index", None)
    trapped = getattr(switching, "trapped_share", None)
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


def _summary(main: float, pre: list, post: list, seeds: list, span: float) -> Summary:
    nearest = next((s.ratio for s in pre if s.index == 1), math.inf)
    worst_pre = min((s.ratio for s in pre), default=math.inf)
    worst_post = min((s.ratio for s in post), default=math.inf)
    worst_seed = min((s.ratio for s in seeds), default=math.inf)
    within = sum(s.energy for s in pre + post + seeds if abs(s.time) <= span * (1 + 1e-12))
    return Summary(main, nearest, worst_pre, worst_post, worst_seed, within, span)


# ----- the cleaner ------------------------------------------------------------------------


def plan_cleaner(cavity: Cavity, result: ContrastResult) -> CleanerPlan:
    """Gate the external cleaning cell around the main pulse and apply it to every satellite.

    The gate's 50 % points sit halfway between the nearest pre-pulse and the main pulse
    (−T_rt/2) and halfway between the main pulse and the first post-pulse (+T_rt/2) at the
    cleaner cell (output time + path_delay); each satellite is multiplied by the cleaner's
    transmission at its time, T(v) = T_open [sin²(πv/2) + cos²(πv/2)/ER] (Yariv & Yeh), with v
    the linear-ramp gate level.  The ramp (0–100 % in rise/0.8) plus ±1 FWHM of the pulse must
    fit in half a round trip on each side; otherwise a warning says so and the satellites on
    the edge get the edge's share.  Sets ``result.cleaned`` and appends the gate's timing row.
    """
    cl = cavity.cleaner
    trt = result.round_trip_time
    t_main = result.main_time + cl.path_delay
    t_open, t_close = t_main - 0.5 * trt, t_main + 0.5 * trt
    ramp_on, ramp_off = cl.rise_time / 0.8, cl.fall_time / 0.8
    width_pulse = _PULSE_WIDTHS * cavity.seed.duration
    margin = 0.5 * (trt - max(ramp_on, ramp_off) - width_pulse)
    fits = margin >= 0.0

    def trans(t_rel):
        level = pc.gate_level(t_main + np.asarray(t_rel), t_open, t_close, cl.rise_time, cl.fall_time)
        return pc.cleaner_transmission(level, cl.extinction_ratio, cl.transmission)

    t_m = float(trans(0.0))
    main = result.main_energy * t_m

    def clean(sats):
        out = []
        for s in sats:
            e = s.energy * float(trans(s.time))
            out.append(replace(s, energy=e, ratio=pc.ratio(main, e), time_from_trigger=s.time_from_trigger
                               + cl.path_delay))
        return out

    pre, post, seeds = clean(result.pre_pulses), clean(result.post_pulses), clean(result.seed_leak)
    summary = _summary(main, pre, post, seeds, result.summary.span)
    cable = cl.cable if cl.cable is not None else cavity.cables.get("cleaner")
    cable_delay = cable.delay if cable is not None else 0.0
    delay = t_open - cl.latency - cable_delay
    plan = CleanerPlan(t_open, t_close, delay, t_close - t_open, margin, fits, t_m, main, pre, post, seeds,
                       summary, cl.extinction_ratio, cl.transmission)
    result.cleaned = plan
    sigma = cavity.switch.jitter
    if not fits:
        result.checks.append(Check(
            "warning", "cleaner",
            f"the cleaner's edges ({cl.rise_time * 1e9:.3g} ns rise, {cl.fall_time * 1e9:.3g} ns fall, 10-90 %) "
            f"with the pulse (±{cavity.seed.duration * 1e12:.0f} ps) do not fit inside one round trip "
            f"({trt * 1e9:.3f} ns) around the main pulse: the nearest satellites pass on the edges and the "
            f"main pulse sees {t_m / cl.transmission * 100:.1f} % of the open transmission"))
    elif sigma > 0 and margin < 3 * sigma:
        result.checks.append(Check("warning", "cleaner",
                                   f"cleaner gate margin {margin * 1e12:.0f} ps is {margin / sigma:.1f} σ of the "
                                   f"switch jitter ({sigma * 1e12:.0f} ps rms)"))
    else:
        result.checks.append(Check("info", "cleaner",
                                   f"cleaner gate fits: {margin * 1e9:.3g} ns free on each side of its edges"))
    row = _cleaner_row(cavity, plan, cable_delay)
    if row is not None:
        result.timing_rows.append(row)
    if delay < 0:
        result.checks.append(Check("error", "cleaner",
                                   f"cleaner delay would be {delay * 1e9:.3f} ns (negative): the main pulse "
                                   "reaches the cleaner before its latency and cable allow"))
    return plan


def _cleaner_row(cavity: Cavity, plan: CleanerPlan, cable_delay: float):
    """The cleaner's row of the delay-generator table (None if the timing module is absent)."""
    try:
        from regentime.planning.timing import TimingRow
    except ModuleNotFoundError:
        return None
    cl = cavity.cleaner
    res = cavity.generator.resolution
    delay, width, rounding = plan.delay, plan.width, 0.0
    if res:
        d_r = round(delay / res) * res
        rounding = d_r - delay
        delay, width = d_r, round(width / res) * res
    note = (("" if plan.fits else "edge too slow for one round trip; ")
            + f"cleaner gate: 50 % edges {plan.width * 0.5e9:.3f} ns either side of the main pulse at the "
            f"cleaner (latency {cl.latency * 1e9:.3g} ns, cable {cable_delay * 1e9:.3g} ns)")
    problem = None
    if plan.delay < 0:
        problem = "negative delay: the main pulse reaches the cleaner before its latency and cable allow"
    return _make_row(TimingRow, output=cl.output, drives="cleaner", delay=delay, width=width, note=note,
                     problem=problem, rounding=rounding, event=plan.open_edge, latency=cl.latency,
                     cable_delay=cable_delay)


def _make_row(cls, **kw):
    """Build a TimingRow with the fields it has (the timing module owns the class)."""
    import dataclasses

    if dataclasses.is_dataclass(cls):
        names = {f.name for f in dataclasses.fields(cls)}
        kw = {k: v for k, v in kw.items() if k in names}
    return cls(**kw)


# ----- the inverse question ---------------------------------------------------------------


@dataclass
class TargetAnswer:
    """Polarizer extinction ratio and cell contrast needed for a pre-pulse ratio target."""

    target: float
    which: str  # "nearest" | "worst"
    now: float  # the ratio with the file as it is
    leak_needed: float
    extinction_needed: Optional[float]  # with the file's cell contrast (None: not reachable)
    contrast_needed: Optional[float]  # with the file's extinction ratio
    extinction_now: float
    contrast_now: float
    limit_by_contrast: float  # best ratio with a perfect polarizer and the file's contrast
    limit_by_extinction: float  # best ratio with a perfect cell and the file's polarizer
    both_factor: Optional[float] = None  # improve ER and contrast both by this factor

    @property
    def met(self) -> bool:
        return self.now >= self.target

    def to_dict(self) -> dict:
        return {"target_ratio": self.target, "which": self.which, "ratio_now": _finite(self.now),
                "met": self.met, "leak_needed": self.leak_needed,
                "extinction_ratio_needed": _finite(self.extinction_needed or math.inf)
                if self.extinction_needed is not None else None,
                "contrast_needed": _finite(self.contrast_needed or math.inf)
                if self.contrast_needed is not None else None,
                "extinction_ratio_now": _finite(self.extinction_now), "contrast_now": _finite(self.contrast_now),
                "best_ratio_with_perfect_polarizer": _finite(self.limit_by_contrast),
                "best_ratio_with_perfect_cell": _finite(self.limit_by_extinction),
                "both_improved_by": _finite(self.both_factor) if self.both_factor is not None else None}


def _with(cavity: Cavity, extinction: Optional[float] = None, contrast: Optional[float] = None) -> Cavity:
    els = []
    for e in cavity.elements:
        if extinction is not None and isinstance(e, Polarizer):
            e = replace(e, extinction_ratio=extinction)
        if contrast is not None and isinstance(e, PockelsCell):
            e = replace(e, contrast=contrast)
        els.append(e)
    return replace(cavity, elements=tuple(els))


def _leak(cavity: Cavity, optics: CavityOptics, extinction=None, contrast=None) -> float:
    """ℓ with the polarizer's ER and/or the cell's contrast replaced (the rest held)."""
    from regentime.physics import jones

    cav = _with(cavity, extinction, contrast)
    pol = replace(optics.polarizer, extinction_ratio=extinction) if extinction is not None else optics.polarizer
    cell = replace(optics.cell, contrast=contrast) if contrast is not None else optics.cell
    arm = tuple(cell if a is optics.cell else (pol if a is optics.polarizer else a) for a in optics.cell_arm)
    return float(jones.leak_per_return(cav, replace(optics, polarizer=pol, cell=cell, cell_arm=arm)))


def required_for_target(cavity: Cavity, optics: CavityOptics, result: ContrastResult, target: float,
                        which: str = "nearest") -> TargetAnswer:
    """Extinction ratio (cell contrast held) and cell contrast (ER held) for a pre-pulse ratio.

    Pre-pulse ratios scale as 1/ℓ with everything else held (the build-up does not depend on
    the leak in this model), so the target needs ℓ* = ℓ·r_now/r_target; each parameter is
    then found by bisection on log ER (or log C) of the Jones model's ℓ, which falls
    monotonically with both.  ``None`` when the other parameter alone already limits the
    ratio below the target.
    """
    if not (target > 1 and math.isfinite(target)):
        from regentime.errors import InputError

        raise InputError("--target", target, "a finite contrast ratio greater than 1 (e.g. 1e6 or 60 dB)")
    now = result.nearest_pre_ratio if which == "nearest" else result.worst_pre_ratio
    leak = result.leak_per_return
    pol, cell = optics.polarizer, optics.cell
    if not math.isfinite(now) or leak <= 0:
        return TargetAnswer(target, which, now, 0.0, pol.extinction_ratio, cell.contrast, pol.extinction_ratio,
                            cell.contrast, math.inf, math.inf)
    need = leak * now / target
    perfect = 1e15  # stands for "infinite" in the bisection (ℓ is then limited by the other part)
    leak_c = _leak(cavity, optics, extinction=perfect)
    leak_e = _leak(cavity, optics, contrast=perfect)

    er0, c0 = pol.extinction_ratio, cell.contrast

    def solve(kind):
        floor = {"extinction": leak_c, "contrast": leak_e, "both": 0.0}[kind]
        if need <= floor * (1 + 1e-9):
            return None
        f = {"extinction": lambda x: _leak(cavity, optics, extinction=x),
             "contrast": lambda x: _leak(cavity, optics, contrast=x),
             "both": lambda x: _leak(cavity, optics, extinction=max(1.0 + 1e-9, er0 * x), contrast=c0 * x)}[kind]
        lo, hi = (0.0, math.log10(perfect)) if kind != "both" else (-6.0, 12.0)  # log10 of the parameter
        if f(10 ** lo) <= need:
            return 10 ** lo
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            if f(10 ** mid) > need:
                lo = mid
            else:
                hi = mid
        return 10 ** hi

    return TargetAnswer(target, which, now, need, solve("extinction"), solve("contrast"), pol.extinction_ratio,
                        cell.contrast, now * leak / leak_c if leak_c > 0 else math.inf,
                        now * leak / leak_e if leak_e > 0 else math.inf, solve("both"))


__all__ = ["CleanerPlan", "ContrastResult", "POST_FLOOR", "Satellite", "Shares", "Summary", "TargetAnswer",
           "plan_cleaner", "plan_contrast", "polarisation_shares", "required_for_target"]
