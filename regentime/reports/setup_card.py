"""The printable setup card: the plan on one page, as plain text or Markdown (and CSV table).

Formatting only; every number comes from the plan (:func:`regentime.planning.plan.make_plan`).
Layout (our own): heading with cavity, file, content hash and date; the key numbers; the
delay-generator table with one note line per output; the switching windows and margins;
the high-voltage tolerance; key assumptions; checks; contrast summary; the safety caution.
"""

from __future__ import annotations

import datetime as _dt
import math
from typing import Optional

from regentime.reports.tables import csv_table, eng, md_table, text_table

_DRIVES = {"pump": "pump laser", "switch_on": "cell switch-on", "switch_off": "cell switch-off",
           "gate": "cell gate", "scope": "scope trigger", "cleaner": "cleaner cell"}


def _ns(x: Optional[float]) -> str:
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "—"
    return f"{x * 1e9:.3f} ns"


def _pct(x: float) -> str:
    return f"{x * 100:.2f} %"


def _sigma(x: float) -> str:
    return "∞ σ (no jitter given)" if math.isinf(x) else f"{x:.1f} σ"


def _source_line(plan) -> str:
    cav = plan.cavity
    src = cav.source or "built-in demo cavity (invented scenario)"
    h = f", content hash {cav.content_hash}" if cav.content_hash else ""
    return f"{src}{h}"


def _when(when: Optional[_dt.datetime]) -> str:
    return (when or _dt.datetime.now()).strftime("%Y-%m-%d %H:%M")


def key_lines(plan) -> list[str]:
    b = plan.buildup
    sp = plan.switching
    lines = [
        f"round trip T_rt {_ns(plan.round_trip_time)} (optical path {plan.optics.optical_path:.4f} m one way)",
        f"switch out after round trip {b.dump_round_trip} ({b.rule}); output {eng(b.output_energy, 'J')}, "
        f"extraction {b.extraction_efficiency:.1%}",
    ]
    if b.continuous and b.period != 1:
        lines.append(_alternation(b))
    if sp is not None:
        lines.append(f"seed pulse #{sp.seed_pulse_index}: reaches the polarizer {_ns(sp.seed_time)} after the "
                     f"trigger input (arrival {_ns(plan.cavity.seed.arrival)} + {sp.seed_pulse_index} × "
                     f"{_ns(1.0 / plan.cavity.seed.train_rate)})")
    return lines


def _alternation(b) -> str:
    """The not-period-1 output in words: the shots alternate between the cycle's energies."""
    e = b.output_energies
    kind = "irregularly, " if b.period == 0 else (f"period {b.period}, " if b.period > 2 else "")
    cycle = (f"; one cycle: {', '.join(eng(x, 'J') for x in e)}" if b.period > 2 else "")
    return (f"shot to shot the output alternates between {eng(float(e.max()), 'J')} and "
            f"{eng(float(e.min()), 'J')} ({kind}mean {eng(b.output_energy, 'J')}{cycle})")


def table_rows(plan) -> list[list[str]]:
    rows = []
    for r in plan.timing.rows:
        rows.append([r.output, _DRIVES.get(r.drives, r.drives), _ns(r.delay),
                     _ns(r.width) if r.width is not None else "—", _ns(r.event),
                     "CANNOT BE MET" if r.problem else "ok"])
    return rows


TABLE_HEAD = ["output", "drives", "delay", "width", "event at", "status"]  # public: the TUI shows the same table


def window_lines(plan) -> list[str]:
    sp = plan.switching
    n = sp.dump_round_trip
    out = []
    for label, w, e, gap in (("switch-on ", sp.on_window, sp.on_edge, sp.on_gap),
                             ("switch-off", sp.off_window, sp.off_edge, sp.off_gap)):
        if w is None:
            out.append(f"{label}: NO WINDOW between the crossings at {_ns(gap[0])} and {_ns(gap[1])}; "
                       f"edge placed mid-gap at {_ns(e)}")
        else:
            half = 0.5 * (w[1] - w[0])
            sig = _sigma(half / sp.jitter) if sp.jitter > 0 else _sigma(math.inf)
            out.append(f"{label}: {_ns(w[0])} … {_ns(w[1])} (width {_ns(w[1] - w[0])}); edge {_ns(e)}; "
                       f"margin ±{_ns(half)} = {sig}")
    rule = "(N−1)·T_rt" if sp.scheme == "quarter-wave" else "N·T_rt"
    k = n - 1 if sp.scheme == "quarter-wave" else n
    out.append(f"gate width {_ns(sp.gate_width)} = {k} × T_rt ({sp.scheme} scheme: {rule}, N = {n})")
    out.append(f"margin (half the narrower window) ±{_ns(sp.margin)} = {_sigma(sp.margin_sigma)} of "
               f"{sp.jitter * 1e12:.0f} ps rms jitter")
    out.append(f"at the recommended edges: trapped {_pct(sp.trapped_share)}, ejected {_pct(sp.ejected_share)} "
               f"(1 = perfect optics); leak per return while trapped {sp.leak_per_return:.3g}")
    return out


def tolerance_rows(plan) -> list[list[str]]:
    return [[f"{r.error * 100:+.0f} %" if r.error else "0 % (as set)", _pct(r.trapped_share), f"{r.leak_per_round_trip * 100:.3f} %",
             _pct(r.ejected_share), _pct(r.overall)] for r in plan.switching.voltage_tolerance]


_TOL_HEAD = ["HV error", "trapped", "leak per round trip", "ejected", "overall"]


def check_lines(plan) -> list[str]:
    mark = {"error": "ERROR", "warning": "warning", "info": "note"}
    return [f"{mark.get(c.level, c.level)} [{c.name}]: {c.message}" for c in plan.checks
            if c.level in ("error", "warning")]


def contrast_lines(plan) -> list[str]:
    if getattr(plan, "contrast", None) is None:
        return []
    try:
        from regentime.reports.contrast_report import contrast_summary_lines
    except ImportError:
        return []
    return list(contrast_summary_lines(plan))


def _caution() -> str:
    from regentime.planning.plan import CAUTION

    return CAUTION


def _assumptions(plan) -> list[str]:
    cav = plan.cavity
    out = list(plan.switching.assumptions) if plan.switching is not None else []
    out.append("time zero = the delay generator's trigger input; delay = event − device latency − "
               "cable length/(velocity factor · c)")
    if cav.generator.resolution:
        out.append(f"delays rounded to the generator step of {cav.generator.resolution * 1e12:.4g} ps")
    if cav.pump.mode == "pulsed":
        out.append(f"pump light leads the seed pulse by {cav.pump.lead * 1e9:.4g} ns "
                   f"(pump latency {_ns(cav.pump.latency)})")
    else:
        out.append("continuous pump: no pump channel")
    return out


def _wrap(text: str, first: str = "  ", width: int = 100) -> list[str]:
    import textwrap

    return textwrap.wrap(text, width=width, initial_indent=first,
                         subsequent_indent=" " * max(len(first), 2) + "  ", break_on_hyphens=False)


def setup_card_text(plan, when: Optional[_dt.datetime] = None) -> str:
    """The setup card as aligned plain text (fits one printed page for a normal plan)."""
    cav = plan.cavity
    title = f"REGENTIME SETUP CARD — {cav.name}"
    lines = [title, "=" * len(title), f"file: {_source_line(plan)}", f"planned: {_when(when)}", ""]
    lines += key_lines(plan)
    if plan.timing is not None:
        res = cav.generator.resolution
        lines += ["", "DELAY GENERATOR (time zero = trigger input" +
                  (f"; rounded to {res * 1e12:.4g} ps)" if res else ")"),
                  text_table(TABLE_HEAD, table_rows(plan), align="llrrrl"), ""]
        for r in plan.timing.rows:
            lines += _wrap(f"{r.output}: {r.note}")
            if r.problem:
                lines += _wrap(f"{r.output}: CANNOT BE MET: {r.problem}")
    if plan.switching is not None:
        lines += ["", "SWITCHING WINDOWS (50 % points of the high-voltage edge at the cell)"]
        lines += [w for x in window_lines(plan) for w in _wrap(x)]
        lines += ["", "HIGH-VOLTAGE TOLERANCE (shares at the recommended edges)",
                  text_table(_TOL_HEAD, tolerance_rows(plan))]
    lines += ["", "KEY ASSUMPTIONS"] + [w for a in _assumptions(plan) for w in _wrap(a, "  - ")]
    checks = check_lines(plan)
    lines += ["", "CHECKS"] + ([w for c in checks for w in _wrap(c)] or ["  no warnings or errors"])
    contrast = contrast_lines(plan)
    if contrast:
        lines += ["", "CONTRAST"] + [w for c in contrast for w in _wrap(c)]
    if plan.cannot_be_met:
        lines += ["", "THIS PLAN CANNOT BE MET AS IT STANDS: see the errors above."]
    lines += [""] + _wrap(_caution(), "")
    return "\n".join(lines) + "\n"


def setup_card_md(plan, when: Optional[_dt.datetime] = None) -> str:
    """The setup card as Markdown."""
    cav = plan.cavity
    lines = [f"# Setup card — {cav.name}", "", f"- file: `{_source_line(plan)}`", f"- planned: {_when(when)}"]
    lines += [f"- {x}" for x in key_lines(plan)]
    if plan.timing is not None:
        res = cav.generator.resolution
        lines += ["", "## Delay generator", "",
                  "Time zero = the generator's trigger input" +
                  (f"; delays rounded to {res * 1e12:.4g} ps." if res else "."), "",
                  md_table(TABLE_HEAD, table_rows(plan), align="llrrrl"), ""]
        for r in plan.timing.rows:
            lines.append(f"- **{r.output}**: {r.note}" + (f" — **cannot be met: {r.problem}**" if r.problem else ""))
    if plan.switching is not None:
        lines += ["", "## Switching windows", "", "50 % points of the high-voltage edge at the cell.", ""]
        lines += [f"- {x}" for x in window_lines(plan)]
        lines += ["", "## High-voltage tolerance", "", md_table(_TOL_HEAD, tolerance_rows(plan))]
    lines += ["", "## Key assumptions", ""] + [f"- {a}" for a in _assumptions(plan)]
    checks = check_lines(plan)
    lines += ["", "## Checks", ""] + ([f"- {c}" for c in checks] or ["- no warnings or errors"])
    contrast = contrast_lines(plan)
    if contrast:
        lines += ["", "## Contrast", ""] + [f"- {c}" for c in contrast]
    if plan.cannot_be_met:
        lines += ["", "**This plan cannot be met as it stands: see the errors above.**"]
    lines += ["", f"> {_caution()}"]
    return "\n".join(lines) + "\n"


def timing_csv(plan) -> str:
    """The generator table as CSV (SI seconds)."""
    head = ["output", "drives", "delay_s", "width_s", "event_s", "latency_s", "cable_delay_s",
            "rounding_s", "problem", "note"]
    rows = [[r.output, r.drives, r.delay, r.width, r.event, r.latency, r.cable_delay, r.rounding,
             r.problem or "", r.note] for r in (plan.timing.rows if plan.timing else [])]
    return csv_table(head, rows)
