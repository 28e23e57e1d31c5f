"""Pockels-cell switching windows, recommended edges, margins and voltage tolerance.

``plan_switching(cavity, optics, buildup) -> SwitchPlan`` applies docs/definitions.md ("Switching",
"Gate width"):

* round trip k of the chosen seed pulse m starts at t_m + (k−1)·T_rt, t_m = arrival +
  m/train_rate (from the generator's trigger input); the pulse centre crosses the cell at
  t_out and t_back after the start of each round trip (:mod:`regentime.planning.optics`);
* switch-on: the seed (S) makes the cell-arm passes of round trips 1 and 2; the quarter-wave
  edge falls between the return crossing of round trip 1 and the outward crossing of round
  trip 2, the half-wave edge between the two crossings of round trip 1; measured: the
  share still trapped after round trip 2's cell-arm pass;
* switch-off after round trip N: the trapped pulse (P) makes the cell-arm passes of round
  trips N and N+1; quarter-wave edge between them, half-wave edge inside round trip N+1's;
  measured: the share ejected through the in/out port;
* window = 50 % edge times giving ≥ 99 % of an ideal instant switch; recommended edge = its
  middle; margin = half the narrower window; margin/jitter in sigmas.

Gate width = off − on edge = (N−1)·T_rt (quarter-wave) or N·T_rt (half-wave): the
geometry of the two events repeats after that time, so the two window middles differ by
exactly it (up to the bisection tolerance).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional

from regentime.errors import InputError
from regentime.model import Cavity, Space
from regentime.numfmt import json_float
from regentime.physics import jones
from regentime.planning import cell_model
from regentime.physics import switching as sw
from regentime.planning.optics import C_LIGHT, CavityOptics
from regentime.planning.checks import Check

VOLTAGE_ERRORS = (-0.10, -0.05, -0.02, -0.01, 0.0, 0.01, 0.02, 0.05, 0.10)


@dataclass(frozen=True)
class VoltageRow:
    """Effect of a high-voltage error on the switching (shares 0 … 1, 1 = perfect optics)."""

    error: float  # relative error of the high voltage (0.02 = +2 %)
    trapped_share: float  # injection (switch-on) at the recommended edge
    ejected_share: float  # switch-out at the recommended edge
    leak_per_round_trip: float  # share lost per trapped round trip through the in/out port
    kept: float  # (1 − leak)^(N − 3): left after the round trips between the two events
    overall: float  # trapped × kept × ejected (before gain saturation makes up for part of it)

    def to_dict(self) -> dict:
        return {"error": self.error, "trapped_share": self.trapped_share,
                "ejected_share": self.ejected_share,
                "leak_per_round_trip": self.leak_per_round_trip, "kept": self.kept,
                "overall": self.overall}


@dataclass
class SwitchPlan:
    scheme: str
    on_window: Optional[tuple]  # absolute (s from the trigger input), 50 % points at the cell
    off_window: Optional[tuple]
    on_edge: float  # recommended, absolute
    off_edge: float
    gate_width: float  # off − on edge
    gate_width_nominal: float  # (N−1)·T_rt or N·T_rt
    margin: float  # half the narrower window (0 without a window)
    margin_sigma: float  # margin / jitter (inf with zero jitter)
    seed_pulse_index: int
    seed_time: float  # t_m
    switching_efficiency: float  # ejected share at the recommended off edge (1 = perfect)
    trapped_share: float  # at the recommended on edge (1 = perfect)
    ejected_share: float
    voltage_tolerance: list  # list[VoltageRow]
    full_retardance: float  # rad per crossing with the high voltage on
    dump_round_trip: int
    round_trip_time: float
    rise_time: float
    fall_time: float
    edge_shape: str
    jitter: float
    on_gap: tuple  # absolute crossing instants the on edge must fall between
    off_gap: tuple
    on_result: sw.WindowResult = field(repr=False, default=None)
    off_result: sw.WindowResult = field(repr=False, default=None)
    leak_per_return: float = 0.0
    assumptions: list = field(default_factory=list)
    checks: list = field(default_factory=list)

    @property
    def on_edge_rel(self) -> float:
        return self.on_edge - self.seed_time

    @property
    def off_edge_rel(self) -> float:
        return self.off_edge - self.seed_time

    @property
    def has_windows(self) -> bool:
        return self.on_window is not None and self.off_window is not None

    def to_dict(self) -> dict:
        """The JSON ``switch`` object (docs/definitions.md, "JSON output"), plus a few extra keys."""
        return {
            "scheme": self.scheme,
            "on_window_s": list(self.on_window) if self.on_window else None,
            "off_window_s": list(self.off_window) if self.off_window else None,
            "on_edge_s": self.on_edge,
            "off_edge_s": self.off_edge,
            "gate_width_s": self.gate_width,
            "margin_s": self.margin,
            "margin_sigma": json_float(self.margin_sigma),
            "seed_pulse_index": self.seed_pulse_index,
            "seed_time_s": self.seed_time,
            "full_retardance_rad": self.full_retardance,
            "trapped_share": self.trapped_share,
            "ejected_share": self.ejected_share,
            "switching_efficiency": self.switching_efficiency,
            "leak_per_return": self.leak_per_return,
            "rise_time_s": self.rise_time,
            "fall_time_s": self.fall_time,
            "edge": self.edge_shape,
            "voltage_tolerance": [r.to_dict() for r in self.voltage_tolerance],
        }


# ----- scheme check -----------------------------------------------------------------------


def check_scheme(cavity: Cavity, optics: CavityOptics, gamma_full: float) -> list[Check]:
    """Raise InputError when the cell arm cannot work in the declared scheme; warn when it
    works only partly.  Decided with the Jones model: with the cell off a quarter-wave cell
    arm must turn the S seed into P, a half-wave one must send it back in S."""
    scheme = cavity.switch.scheme
    arm = optics.cell_arm
    off = jones.p_share(jones.cell_arm_mueller(arm, 0.0, 0.0, math.inf) @ jones.STOKES_S)
    plates = optics.waveplates_in_cell_arm
    found = ", ".join(f"{p.name} ({p.retardance:g} wave at {math.degrees(p.axis_angle):g}°)"
                      for p in plates) or "no waveplate"
    if scheme == "quarter-wave" and off < 0.5:
        raise InputError("switch.scheme", scheme,
                         "a quarter-wave plate (retardance: quarter, axis: 45 deg) between the polarizer "
                         "and the cell-side end mirror, because the quarter-wave scheme needs the cell arm "
                         f"to turn the S seed into P while the cell is off; the cell arm has {found} and "
                         f"turns {off:.1%} of S into P (for a cell alone use scheme: half-wave)")
    if scheme == "half-wave" and off > 0.5:
        raise InputError("switch.scheme", scheme,
                         "no waveplate in the cell arm, because in the half-wave scheme the cell alone "
                         f"turns S into P; the cell arm has {found}, which turns {off:.1%} of the S seed "
                         "into P with the cell off (remove it, or use scheme: quarter-wave)")
    out: list[Check] = []
    good = off if scheme == "quarter-wave" else 1.0 - off
    if good < 0.99:
        out.append(Check("warning", "switching",
                         f"with the cell off the cell arm sends {good:.2%} of the seed into the intended "
                         f"state ({found}); check the waveplate's retardance and axis"))
    on = jones.p_share(jones.cell_arm_mueller(arm, gamma_full, gamma_full, math.inf) @ jones.STOKES_P)
    if on < 0.5:
        raise InputError(f"{optics.cell.path}.voltage", optics.cell.voltage,
                         f"a voltage that traps the pulse: at {math.degrees(gamma_full):.0f}° retardance "
                         f"per crossing the cell arm keeps only {on:.1%} of the trapped pulse in P")
    nominal = jones.nominal_retardance(scheme)
    if abs(gamma_full / nominal - 1.0) > 0.005:
        out.append(Check("warning", "switching",
                         f"the set voltage gives {math.degrees(gamma_full):.1f}° of retardance per crossing "
                         f"instead of {math.degrees(nominal):.0f}°: {1 - on:.2%} of the trapped pulse leaks "
                         "out per round trip from the voltage alone"))
    return out


# ----- planning ---------------------------------------------------------------------------


def _passes(optics: CavityOptics, first: int, count: int = 2) -> tuple:
    """(t_out, t_back) of the cell crossings in round trips first … first+count−1 (from t_m)."""
    t_rt = optics.round_trip_time
    t_out, t_back = optics.cell_crossings
    return tuple(((k - 1) * t_rt + t_out, (k - 1) * t_rt + t_back) for k in range(first, first + count))


def switch_events(cavity: Cavity, optics: CavityOptics, n: int, gamma_full: float):
    """The switch-on and switch-off events (times from t_m, the start of round trip 1)."""
    scheme = cavity.switch.scheme
    common = dict(arm=optics.cell_arm, gamma_full=gamma_full, contrast=optics.cell.contrast,
                  polarizer=optics.polarizer)
    p_on = _passes(optics, 1)
    p_off = _passes(optics, n)
    off_pass = 0 if scheme == "quarter-wave" else 1
    on = sw.SwitchEvent(passes=p_on, gap=sw.gap_crossings(p_on, scheme, 0), rising=True,
                        start="S", measure="trapped", **common)
    off = sw.SwitchEvent(passes=p_off, gap=sw.gap_crossings(p_off, scheme, off_pass), rising=False,
                         start="P", measure="ejected", **common)
    return on, off


def plan_switching(cavity: Cavity, optics: CavityOptics, buildup) -> SwitchPlan:
    """Windows, recommended edges, gate width, margins, seed pulse, shares and tolerance."""
    from regentime.planning.timing import choose_seed_pulse

    s = cavity.switch
    scheme = s.scheme
    n = int(buildup.dump_round_trip)
    t_rt = optics.round_trip_time
    gamma = cell_model.full_retardance(cavity, optics.cell)
    checks = check_scheme(cavity, optics, gamma)
    fwhm = cavity.seed.duration
    on_ev, off_ev = switch_events(cavity, optics, n, gamma)
    on_res = sw.find_window(on_ev, s.rise_time, s.edge, fwhm)
    off_res = sw.find_window(off_ev, s.fall_time, s.edge, fwhm)
    nominal_gate = (n - 1) * t_rt if scheme == "quarter-wave" else n * t_rt
    on_rel = on_res.middle if on_res.exists else 0.5 * sum(on_ev.gap)
    off_rel = off_res.middle if off_res.exists else 0.5 * sum(off_ev.gap)
    if on_res.exists and off_res.exists and abs((off_rel - on_rel) - nominal_gate) < 1e-12:
        off_rel = on_rel + nominal_gate  # the same geometry one gate later: remove bisection noise
    if scheme == "quarter-wave" and n < 2:
        checks.append(Check("error", "window",
                            f"switch-out after round trip {n}: the quarter-wave scheme needs N ≥ 2 (round "
                            "trip 1 runs with the cell off, so the gate would be empty)"))
    for label, res, ev, rise, kind in (("switch-on", on_res, on_ev, s.rise_time, "rise"),
                                       ("switch-off", off_res, off_ev, s.fall_time, "fall")):
        checks += _window_checks(label, res, ev, rise, kind, cavity, optics)
    widths = [r.width for r in (on_res, off_res)]
    margin = 0.5 * min(widths) if on_res.exists and off_res.exists else 0.0
    margin_sigma = margin / s.jitter if s.jitter > 0 else math.inf
    if on_res.exists and off_res.exists:
        if margin_sigma < s.min_margin_sigma:  # switch.min_margin_sigma, default 3 (common practice)
            checks.append(Check("warning", "window",
                                f"timing margin ±{margin * 1e9:.3f} ns is only {margin_sigma:.1f} σ of the "
                                f"{s.jitter * 1e12:.0f} ps rms jitter (common practice: at least {s.min_margin_sigma:g} σ, switch.min_margin_sigma)"))
        else:
            checks.append(Check("info", "window",
                                f"timing margin ±{margin * 1e9:.3f} ns = {margin_sigma:.1f} σ of the jitter"))
    m, t_m = choose_seed_pulse(cavity, on_rel, off_rel, n, t_rt)
    shift = lambda w: None if w is None else (w[0] + t_m, w[1] + t_m)  # noqa: E731
    perfect_on, perfect_off = sw.perfect_share(on_ev), sw.perfect_share(off_ev)
    trapped = float(sw.event_share(on_ev, on_rel, s.rise_time, s.edge, fwhm)[0]) / perfect_on
    ejected = float(sw.event_share(off_ev, off_rel, s.fall_time, s.edge, fwhm)[0]) / perfect_off
    efficiency = min(1.0, ejected)
    tolerance = voltage_tolerance(cavity, optics, on_ev, off_ev, on_rel, off_rel, n, gamma)
    assumptions = [
        f"{scheme} scheme; retardance per crossing with the high voltage on {math.degrees(gamma):.1f}° "
        + ("(the scheme's nominal voltage)" if optics.cell.voltage is None else
           f"({optics.cell.voltage:.0f} V against V_π = {cell_model.half_wave_voltage_of(cavity, optics.cell):.0f} V)"),
        f"cell axes at 45° to the polarizer; static contrast {optics.cell.contrast:g} as depolarisation",
        f"high-voltage edge: {s.edge}, 10–90 % rise {s.rise_time * 1e9:.3g} ns, fall {s.fall_time * 1e9:.3g} ns; "
        f"Gaussian stretched pulse, FWHM {fwhm * 1e12:.4g} ps",
        "window: 50 % edge times giving ≥ 99 % of an ideal instant switch's trapped (ejected) share",
    ]
    return SwitchPlan(
        scheme=scheme, on_window=shift(on_res.window), off_window=shift(off_res.window),
        on_edge=on_rel + t_m, off_edge=off_rel + t_m, gate_width=off_rel - on_rel,
        gate_width_nominal=nominal_gate, margin=margin, margin_sigma=margin_sigma,
        seed_pulse_index=m, seed_time=t_m, switching_efficiency=efficiency,
        trapped_share=trapped, ejected_share=ejected, voltage_tolerance=tolerance,
        full_retardance=gamma, dump_round_trip=n, round_trip_time=t_rt,
        rise_time=s.rise_time, fall_time=s.fall_time, edge_shape=s.edge, jitter=s.jitter,
        on_gap=shift(on_ev.gap), off_gap=shift(off_ev.gap), on_result=on_res, off_result=off_res,
        leak_per_return=cell_model.leak_per_return(cavity, optics), assumptions=assumptions, checks=checks)


def voltage_tolerance(cavity, optics, on_ev, off_ev, on_rel, off_rel, n, gamma) -> list[VoltageRow]:
    """Shares versus a relative high-voltage error (rows for VOLTAGE_ERRORS), at the
    recommended edges.  The switch-on event already holds round trips 1–2 and the switch-off
    event round trips N–N+1, so the leak of the fully-on cell is applied for the N − 3
    round trips between them: overall = trapped × (1 − leak)^(N−3) × ejected (before gain
    saturation makes up for part of the loss)."""
    s = cavity.switch
    fwhm = cavity.seed.duration
    p_on, p_off = sw.perfect_share(on_ev), sw.perfect_share(off_ev)
    rows = []
    for e in VOLTAGE_ERRORS:
        scale = 1.0 + e
        trapped = float(sw.event_share(on_ev, on_rel, s.rise_time, s.edge, fwhm, scale)[0]) / p_on
        ejected = float(sw.event_share(off_ev, off_rel, s.fall_time, s.edge, fwhm, scale)[0]) / p_off
        g = gamma * scale
        stokes = jones.cell_arm_mueller(optics.cell_arm, g, g, optics.cell.contrast) @ jones.STOKES_P
        leak = float(jones.s_share(stokes) / stokes[0])
        kept = (1.0 - leak) ** max(0, n - 3)
        rows.append(VoltageRow(e, min(trapped, 1.0), min(ejected, 1.0), leak, kept,
                               min(trapped, 1.0) * kept * min(ejected, 1.0)))
    return rows


# ----- no window: what conflicts and what would fix it ------------------------------------


def _window_checks(label, res: sw.WindowResult, ev: sw.SwitchEvent, rise: float, kind: str,
                   cavity: Cavity, optics: CavityOptics) -> list[Check]:
    s = cavity.switch
    fwhm = cavity.seed.duration
    gap = ev.gap[1] - ev.gap[0]
    scheme = s.scheme
    where = ("while the pulse is away from the cell (cell → end mirror → cell takes "
             f"{(optics.cell_crossings[1] - optics.cell_crossings[0]) * 1e9:.3f} ns of the "
             f"{optics.round_trip_time * 1e9:.3f} ns round trip)" if scheme == "quarter-wave" else
             "between the pulse's two crossings of the cell (cell → end mirror → cell)")
    head = (f"{label}: the edge must fall {where}: {gap * 1e9:.3f} ns between the crossings; "
            f"10–90 % {kind} time {rise * 1e9:.3g} ns ({s.edge}), stretched pulse {fwhm * 1e12:.4g} ps FWHM")
    out: list[Check] = []
    if res.exists:
        if gap < rise:  # feasibility is the Jones model's alone: a warning, not a second rule
            out.append(Check("warning", "window", head + f": the gap is shorter than the {kind} time; the "
                             f"Jones model finds a {res.width * 1e9:.3f} ns window where the partial "
                             "retardances of the two crossings still add up, which relies on the edge "
                             "being as symmetric as modelled"
                             + _gap_fixes(gap, rise, kind, cavity, optics)))
        if res.ideal < sw.THRESHOLD * res.nominal:
            out.append(Check("warning", "window",
                             f"{label}: even an instant switch catches only {res.ideal / res.nominal:.1%} of the "
                             f"pulse: the {fwhm * 1e12:.4g} ps pulse is long against the {gap * 1e9:.3f} ns gap"))
        return out
    msg = (head + f": no window — the best edge time gives {res.best / res.ideal:.2%} of an ideal switch "
           f"(need {sw.THRESHOLD:.0%})")
    if res.ideal < sw.THRESHOLD * res.nominal:
        msg += (f"; even an instant switch catches only {res.ideal / res.nominal:.1%} of the pulse, so the "
                "pulse itself is too long for the gap")
    out.append(Check("error", "window", msg + _fixes(ev, rise, cavity, optics)))
    return out


def _fixes(ev: sw.SwitchEvent, rise: float, cavity: Cavity, optics: CavityOptics) -> str:
    s = cavity.switch
    fwhm = cavity.seed.duration
    fixes = []
    faster = sw.largest_rise_time(ev, rise, s.edge, fwhm)
    if 0.0 < faster < rise:
        fixes.append(f"a driver faster than {faster * 1e9:.2f} ns (10–90 %)")
    # the later crossing of the gap in time order: index among the flattened crossings
    flat = [t for p in ev.passes for t in p]
    later = flat.index(ev.gap[1])
    extra = sw.extra_gap_needed(ev, rise, s.edge, fwhm, later)
    if math.isfinite(extra) and extra > 0:
        distance = extra * C_LIGHT / 2.0  # air: group index ≈ 1.0003, the move is geometric
        free = _free_space(optics, behind=(s.scheme == "quarter-wave"))
        if s.scheme == "quarter-wave":
            text = (f"the cell moved {distance * 1e3:.0f} mm towards the cell-side end mirror "
                    f"(the pulse would spend {extra * 1e9:.2f} ns more away from the cell)")
            if distance > free:
                text += (f" — more than the {free * 1e3:.0f} mm of free space there, so instead lengthen "
                         f"the gain arm by about {distance * 1e3:.0f} mm")
        else:
            text = (f"the cell moved {distance * 1e3:.0f} mm away from the cell-side end mirror, towards "
                    f"the polarizer, or the end mirror moved {distance * 1e3:.0f} mm further from the cell "
                    f"({extra * 1e9:.2f} ns more between the crossings)")
            if distance > free:
                text = (f"the cell-side end mirror moved {distance * 1e3:.0f} mm further from the cell "
                        f"({extra * 1e9:.2f} ns more between the crossings; only {free * 1e3:.0f} mm of free "
                        "space lies between the polarizer and the cell)")
        fixes.append(text)
    shorter = sw.longest_pulse(ev, rise, s.edge, fwhm)
    if 0.0 < shorter < fwhm:
        fixes.append(f"a stretched pulse shorter than {shorter * 1e12:.0f} ps FWHM")
    elif shorter == 0.0 and fixes:
        fixes.append("(a shorter stretched pulse alone would not help with this edge)")
    return ("; it would work with " + ", or ".join(fixes)) if fixes else ""


def _gap_fixes(gap: float, rise: float, kind: str, cavity: Cavity, optics: CavityOptics) -> str:
    """Fixes for a gap shorter than the edge's 10–90 % time: a faster driver or more gap."""
    extra = rise - gap
    distance = extra * C_LIGHT / 2.0
    if cavity.switch.scheme == "quarter-wave":
        move = f"the cell moved about {distance * 1e3:.0f} mm towards the cell-side end mirror"
    else:
        move = (f"the cell-side end mirror (or the cell, towards the polarizer) moved about "
                f"{distance * 1e3:.0f} mm further apart")
    return (f"; it would fit with a driver whose {kind} time is below {gap * 1e9:.2f} ns (10–90 %), "
            f"or {move} ({extra * 1e9:.2f} ns more between the crossings)")


def _free_space(optics: CavityOptics, behind: bool) -> float:
    """Free space (m) between the cell and the cell-side end mirror (behind=True) or between
    the polarizer and the cell (behind=False), from the cell arm's spaces."""
    arm = list(optics.cell_arm)
    i = arm.index(optics.cell)
    part = arm[i + 1:] if behind else arm[:i]
    return sum(e.length for e in part if isinstance(e, Space))
