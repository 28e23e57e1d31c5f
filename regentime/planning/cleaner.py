"""The plan of an external pulse cleaner: a second Pockels cell between its own polarizers
after the regen's output, gated open around the main pulse, and the contrast after it.

The gate opens halfway between the nearest pre-pulse and the main pulse and closes halfway
between the main pulse and the first post-pulse; docs/contrast.md has the definitions.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from regentime.model import Cavity
from regentime.numfmt import json_float
from regentime.physics import contrast as pc
from regentime.planning.checks import Check
from regentime.planning.satellites import Summary, summarize
from regentime.planning.timing import TimingRow

_PULSE_WIDTHS = 2.0  # a pulse occupies ±1 FWHM around its centre for the cleaner-gate fit


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
               "extinction_ratio": json_float(self.extinction_ratio), "transmission": self.transmission,
               "pre_pulses": [s.to_dict() for s in self.pre_pulses],
               "post_pulses": [s.to_dict() for s in self.post_pulses],
               "seed_leak": [s.to_dict() for s in self.seed_leak]}
        out.update(self.summary.to_dict())
        return out


def plan_cleaner(cavity: Cavity, main_energy: float, main_time: float, round_trip_time: float,
                 pre: list, post: list, seeds: list, span: float
                 ) -> tuple[CleanerPlan, list[Check], list[TimingRow]]:
    """Gate the external cleaning cell around the main pulse and apply it to every satellite.

    The gate's 50 % points sit halfway between the nearest pre-pulse and the main pulse
    (−T_rt/2) and halfway between the main pulse and the first post-pulse (+T_rt/2) at the
    cleaner cell (output time + path_delay); each satellite is multiplied by the cleaner's
    transmission at its time, T(v) = T_open [sin²(πv/2) + cos²(πv/2)/ER] (A. Yariv & P. Yeh,
    Optical Waves in Crystals, Wiley 1984, ch. 7), with v the linear-ramp gate level.  The
    ramp (0–100 % in rise/0.8) plus ±1 FWHM of the pulse must fit in half a round trip on
    each side; otherwise a warning says so and the satellites on the edge get the edge's
    share.  ``main_energy`` (J), ``main_time`` (s from the trigger, at the regen's port),
    ``round_trip_time`` (s), the satellite lists and ``span`` (s) come from the contrast plan.
    Returns the cleaner plan, its checks and the gate's timing row.
    """
    cl = cavity.cleaner
    trt = round_trip_time
    t_main = main_time + cl.path_delay
    t_open, t_close = t_main - 0.5 * trt, t_main + 0.5 * trt
    ramp_on, ramp_off = cl.rise_time / 0.8, cl.fall_time / 0.8
    width_pulse = _PULSE_WIDTHS * cavity.seed.duration
    margin = 0.5 * (trt - max(ramp_on, ramp_off) - width_pulse)
    fits = margin >= 0.0

    def trans(t_rel):
        level = pc.gate_level(t_main + np.asarray(t_rel), t_open, t_close, cl.rise_time, cl.fall_time)
        return pc.cleaner_transmission(level, cl.extinction_ratio, cl.transmission)

    t_m = float(trans(0.0))
    main = main_energy * t_m

    def clean(sats):
        out = []
        for s in sats:
            e = s.energy * float(trans(s.time))
            out.append(replace(s, energy=e, ratio=pc.ratio(main, e), time_from_trigger=s.time_from_trigger
                               + cl.path_delay))
        return out

    pre, post, seeds = clean(pre), clean(post), clean(seeds)
    summary = summarize(main, pre, post, seeds, span)
    checks: list[Check] = []
    cable = cl.cable if cl.cable is not None else cavity.cables.get("cleaner")
    cable_delay = cable.delay if cable is not None else 0.0
    delay = t_open - cl.latency - cable_delay
    plan = CleanerPlan(t_open, t_close, delay, t_close - t_open, margin, fits, t_m, main, pre, post, seeds,
                       summary, cl.extinction_ratio, cl.transmission)
    sigma = cavity.switch.jitter
    if not fits:
        checks.append(Check(
            "warning", "cleaner",
            f"the cleaner's edges ({cl.rise_time * 1e9:.3g} ns rise, {cl.fall_time * 1e9:.3g} ns fall, 10-90 %) "
            f"with the pulse (±{cavity.seed.duration * 1e12:.0f} ps) do not fit inside one round trip "
            f"({trt * 1e9:.3f} ns) around the main pulse: the nearest satellites pass on the edges and the "
            f"main pulse sees {t_m / cl.transmission * 100:.1f} % of the open transmission"))
    elif sigma > 0 and margin < cavity.switch.min_margin_sigma * sigma:
        checks.append(Check("warning", "cleaner",
                                   f"cleaner gate margin {margin * 1e12:.0f} ps is {margin / sigma:.1f} σ of the "
                                   f"switch jitter ({sigma * 1e12:.0f} ps rms)"))
    else:
        checks.append(Check("info", "cleaner",
                                   f"cleaner gate fits: {margin * 1e9:.3g} ns free on each side of its edges"))
    rows = [_cleaner_row(cavity, plan, cable_delay)]
    if delay < 0:
        checks.append(Check("error", "cleaner",
                                   f"cleaner delay would be {delay * 1e9:.3f} ns (negative): the main pulse "
                                   "reaches the cleaner before its latency and cable allow"))
    return plan, checks, rows


def _cleaner_row(cavity: Cavity, plan: CleanerPlan, cable_delay: float):
    """The cleaner's row of the delay-generator table."""
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
    return TimingRow(output=cl.output, drives="cleaner", delay=delay, width=width, note=note,
                     status="cannot" if problem else "ok", reason=problem or "",
                     problem=problem, rounding=rounding, event=plan.open_edge, latency=cl.latency,
                     cable_delay=cable_delay)


__all__ = ["CleanerPlan", "plan_cleaner"]
