"""The delay-generator setup table: one row per generator output.

docs/definitions.md, "Delay-generator settings": time zero is the generator's trigger input; a
channel's delay = the required event time − the device latency − the cable delay, with the
cable delay = length/(velocity_factor · c).  The seed pulse m (arriving at the polarizer at
t_m = arrival + m/train_rate) is the first for which every delay is ≥ 0; with a pulsed pump
the pump light leads that seed pulse by exactly ``pump.lead``.

Rows (``drives``): ``pump`` (pulsed pump only), ``switch_on`` and ``switch_off`` (two
trigger inputs) or ``gate`` (one gate input: the rising edge starts the switch-on, the
falling edge the switch-off; width = (off edge − off latency) − (on edge − on latency)),
``scope`` (the oscilloscope trigger ``scope.lead`` before the switch-out, default N·T_rt,
one build-up's worth).  Delays and the gate width are rounded to ``generator.resolution``
when given and the rounding is shown.  A setting that cannot be met keeps its row with the
reason in ``problem`` and an error check (exit code 3).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Optional

from regentime.model import Cavity
from regentime.numfmt import eng, ns
from regentime.planning.optics import CavityOptics
from regentime.planning.checks import Check

_EPS = 1e-15  # s: delays above −1 fs count as ≥ 0 (floating-point noise of the sums)


@dataclass
class TimingRow:
    output: str  # the user's name of the generator output
    drives: str  # pump | switch_on | switch_off | gate | scope | cleaner
    delay: float  # s from the trigger input, after rounding
    width: Optional[float] = None  # s (gate channels), None for trigger edges
    note: str = ""
    problem: Optional[str] = None  # why the setting cannot be met (None: fine)
    status: str = "ok"  # "ok" | "marginal" | "cannot" (docs/timing.md, "Row status")
    reason: str = ""  # the numbers behind a marginal or cannot status
    rounding: float = 0.0  # s, rounded − exact delay
    event: Optional[float] = None  # s, time of the event the channel causes (edge, light ...)
    latency: float = 0.0  # s, device latency used
    cable_delay: float = 0.0  # s, cable delay used

    def to_dict(self) -> dict:
        return {"output": self.output, "drives": self.drives, "delay_s": self.delay,
                "width_s": self.width, "note": self.note, "problem": self.problem,
                "status": self.status, "reason": self.reason,
                "rounding_s": self.rounding, "event_s": self.event, "latency_s": self.latency,
                "cable_delay_s": self.cable_delay}


@dataclass
class TimingTable:
    rows: list  # list[TimingRow]
    seed_pulse_index: int
    seed_time: float
    resolution: Optional[float] = None
    checks: list = field(default_factory=list)

    def with_extra_rows(self, rows) -> "TimingTable":
        """A copy with ``rows`` appended (the cleaner's gate channel, planned with the contrast)."""
        return replace(self, rows=[*self.rows, *rows])

    def to_rows_dicts(self) -> list[dict]:
        return [r.to_dict() for r in self.rows]

    def row(self, drives: str) -> Optional[TimingRow]:
        for r in self.rows:
            if r.drives == drives:
                return r
        return None

    @property
    def has_problems(self) -> bool:
        return any(r.problem for r in self.rows)


@dataclass(frozen=True)
class _Channel:
    drives: str
    event_rel: float  # event time relative to t_m (s)
    latency: float
    cable: float
    cable_text: str
    what: str


def cable_delay(cavity: Cavity, drives: str) -> tuple[float, str]:
    """Delay (s) and a description of the trigger cable of ``drives`` (0 if none is given)."""
    cable = cavity.cables.get(drives)
    if cable is None:
        return 0.0, "no cable given"
    d = cable.delay
    return d, f"cable {cable.length:g} m at VF {cable.velocity_factor:g} = {d * 1e9:.3f} ns"


def scope_lead(cavity: Cavity, n: int, t_rt: float) -> float:
    """Scope trigger lead before the switch-out: ``scope.lead`` or one build-up, N·T_rt."""
    return cavity.scope.lead if cavity.scope.lead is not None else n * t_rt


def _channels(cavity: Cavity, on_rel: float, off_rel: float, n: int, t_rt: float) -> list[_Channel]:
    s = cavity.switch
    out = []
    if cavity.pump.mode == "pulsed":
        d, text = cable_delay(cavity, "pump")
        out.append(_Channel("pump", -cavity.pump.lead - cavity.pump.duration, cavity.pump.latency, d,
                            text, "pump laser"))
    if s.inputs == "gate":
        d, text = cable_delay(cavity, "gate")
        out.append(_Channel("gate", on_rel, s.on_latency, d, text, "cell driver gate"))
    else:
        d, text = cable_delay(cavity, "switch_on")
        out.append(_Channel("switch_on", on_rel, s.on_latency, d, text, "cell driver, switch-on"))
        d, text = cable_delay(cavity, "switch_off")
        out.append(_Channel("switch_off", off_rel, s.off_latency, d, text, "cell driver, switch-off"))
    d, text = cable_delay(cavity, "scope")
    out.append(_Channel("scope", off_rel - scope_lead(cavity, n, t_rt), 0.0, d, text, "oscilloscope trigger"))
    return out


def choose_seed_pulse(cavity: Cavity, on_rel: float, off_rel: float, n: int,
                      t_rt: float) -> tuple[int, float]:
    """First seed pulse m = 0, 1, … for which every channel delay is ≥ 0; returns (m, t_m).

    Each delay is t_m + c_i with c_i = event_i − latency_i − cable_i (event relative to t_m),
    so m = max(0, ⌈(max_i(−c_i) − arrival)·train_rate⌉).
    """
    seed = cavity.seed
    ins = cavity.generator.insertion_delay
    need = max(ch.latency + ch.cable + ins - ch.event_rel for ch in _channels(cavity, on_rel, off_rel, n, t_rt))
    m = max(0, math.ceil((need - seed.arrival) * seed.train_rate - 1e-9))
    t_m = seed.arrival + m / seed.train_rate
    while t_m < need - _EPS:  # guard against rounding in the ceil
        m += 1
        t_m = seed.arrival + m / seed.train_rate
    return m, t_m


def _round(value: float, resolution: Optional[float]) -> float:
    if not resolution:
        return value
    return round(value / resolution) * resolution


def _eng(x: float) -> str:
    return eng(x, "s")


def timing_table(cavity: Cavity, optics: CavityOptics, buildup, switching) -> TimingTable:
    """Build the generator table from the switching plan (edges are absolute, from the trigger)."""
    s = cavity.switch
    sp = switching
    n = sp.dump_round_trip
    t_rt = optics.round_trip_time
    t_m = sp.seed_time
    res = cavity.generator.resolution
    rows: list[TimingRow] = []
    checks: list[Check] = []
    seed_text = f"seed pulse #{sp.seed_pulse_index} at the polarizer {ns(t_m)}"

    def window_text(window, edge) -> str:
        if window is None:
            return "NO WINDOW (edge placed mid-gap)"
        half = 0.5 * (window[1] - window[0])
        sig = f" = {half / s.jitter:.1f} σ" if s.jitter > 0 else ""
        return f"window {ns(window[0])} … {ns(window[1])}, margin ±{half * 1e9:.3f} ns{sig}"

    for ch in _channels(cavity, sp.on_edge_rel, sp.off_edge_rel, n, t_rt):
        event = t_m + ch.event_rel
        exact = event - ch.latency - ch.cable - cavity.generator.insertion_delay
        delay = _round(exact, res)
        width = None
        problem = None
        parts = []
        if ch.drives == "pump":
            parts.append(f"pump light at {ns(event)}, {_eng(cavity.pump.lead)} before {seed_text}; "
                         f"latency {ns(ch.latency)}")
            if cavity.pump.duration > 0:
                width = cavity.pump.duration
                parts.append(f"pump pulse {_eng(width)} long, from its start to {_eng(cavity.pump.lead)} "
                             "before the seed")
        elif ch.drives in ("switch_on", "gate"):
            parts.append(f"switch-on edge (50 %) at the cell {ns(event)}; "
                         + window_text(sp.on_window, sp.on_edge) + f"; {seed_text}; latency {ns(ch.latency)}")
            if sp.on_window is None:
                problem = "no switch-on window (see checks)"
        elif ch.drives == "switch_off":
            parts.append(f"switch-off edge (50 %) at the cell {ns(event)}, after round trip {n}; "
                         + window_text(sp.off_window, sp.off_edge) + f"; latency {ns(ch.latency)}")
            if sp.off_window is None:
                problem = "no switch-off window (see checks)"
        else:
            lead = scope_lead(cavity, n, t_rt)
            how = "scope.lead" if cavity.scope.lead is not None else f"one build-up, {n} round trips"
            parts.append(f"scope trigger at {ns(event)}, {_eng(lead)} ({how}) before the switch-out")
        if ch.drives == "gate":
            w_exact = (sp.off_edge - s.off_latency) - (sp.on_edge - s.on_latency)
            width = _round(w_exact, res)
            parts.append(f"falling edge → switch-off at the cell {ns(sp.off_edge)} after round trip {n}; "
                         + window_text(sp.off_window, sp.off_edge) + f"; off latency {ns(s.off_latency)}")
            if sp.off_window is None and problem is None:
                problem = "no switch-off window (see checks)"
            elif sp.off_window is None:
                problem = "no switch-on or switch-off window (see checks)"
        parts.append(ch.cable_text)
        if cavity.generator.insertion_delay:
            parts.append(f"generator insertion delay {ns(cavity.generator.insertion_delay)} subtracted")
        rounding = delay - exact
        hard = []  # problems that the switching checks have not reported already
        if res:
            parts.append(f"rounded to the {res * 1e12:.4g} ps step by {rounding * 1e12:+.1f} ps")
        if exact < -_EPS:
            hard.append(f"negative delay {ns(exact)}: the event comes before its trigger can")
        if ch.drives in ("switch_off", "gate") and sp.gate_width > s.max_gate:
            hard.append(f"gate {ns(sp.gate_width)} longer than the driver's max_gate {ns(s.max_gate)}")
        if ch.drives in ("switch_off", "gate") and event > 1.0 / cavity.repetition_rate:
            hard.append(f"the switch-out at {ns(event)} comes after the next trigger "
                        f"(shot period {ns(1.0 / cavity.repetition_rate)})")
        for h in hard:
            problem = _join(problem, h)
            checks.append(Check("error", "timing", f"{cavity.outputs.get(ch.drives, ch.drives)} "
                                                   f"({ch.drives}): {h}"))
        status, reason = _row_status(ch.drives, problem, sp, s, res)
        if status == "marginal":
            checks.append(Check("warning", "timing", f"{cavity.outputs.get(ch.drives, ch.drives)} "
                                                     f"({ch.drives}) is marginal: {reason}"))
        rows.append(TimingRow(output=cavity.outputs.get(ch.drives, ch.drives), drives=ch.drives,
                              delay=delay, width=width, note="; ".join(parts), problem=problem,
                              status=status, reason=reason,
                              rounding=rounding, event=event, latency=ch.latency, cable_delay=ch.cable))
    if res and sp.has_windows and res / 2 > 0.5 * sp.margin:
        checks.append(Check("warning", "timing",
                            f"the generator step {res * 1e12:.4g} ps takes more than half the ±{sp.margin * 1e9:.3f} ns margin"))
    return TimingTable(rows=rows, seed_pulse_index=sp.seed_pulse_index, seed_time=t_m,
                       resolution=res, checks=checks)


def _row_status(drives: str, problem: Optional[str], sp, switch, step: Optional[float]) -> tuple[str, str]:
    """(status, reason) of one generator row.

    ``cannot``: the row has a problem (no window from the Jones model, a negative delay, a gate
    longer than ``max_gate``, a switch-out after the next trigger).  ``marginal``, for the
    rows that place a switching edge: the window's margin (half its width) is below
    ``switch.min_margin_sigma`` rms jitters, or the generator step exceeds a quarter of the
    margin.  ``ok`` otherwise.  Reasons name the numbers.
    """
    if problem:
        return "cannot", problem
    windows = {"switch_on": (sp.on_window,), "switch_off": (sp.off_window,),
               "gate": (sp.on_window, sp.off_window)}.get(drives)
    if windows is None:
        return "ok", ""
    reasons = []
    for w in windows:
        margin = 0.5 * (w[1] - w[0])
        need = switch.min_margin_sigma * switch.jitter
        if switch.jitter > 0 and margin < need:
            reasons.append(f"margin ±{margin * 1e12:.0f} ps is {margin / switch.jitter:.1f} σ of the "
                           f"{switch.jitter * 1e12:.0f} ps rms jitter, below {switch.min_margin_sigma:g} σ")
        if step and step > 0.25 * margin:
            reasons.append(f"the generator step {step * 1e12:.4g} ps exceeds a quarter of the "
                           f"±{margin * 1e12:.0f} ps margin")
    return ("marginal", "; ".join(reasons)) if reasons else ("ok", "")


def _join(a: Optional[str], b: str) -> str:
    return b if not a else f"{a}; {b}"
