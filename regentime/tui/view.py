"""Plan -> text for the TUI's regions.  Formatting only: every number comes from the plan.

Kept free of Textual so the same strings can be checked in plain tests.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Optional

from regentime.numfmt import eng, finite_or_none, ns

def round_trip_text(plan) -> str:
    """Round-trip time to 0.1 ps, as engineers compare it with a photodiode: '11.2615 ns'."""
    return f"{plan.round_trip_time * 1e9:.4f} ns"


def summary_line(plan, override: Any = None) -> str:
    """One line for the top bar: round trip, switch-out round trip, output energy."""
    b = plan.buildup
    rule = {"auto": "peak", "steady": "steadiest", "given": "given"}.get(b.rule, b.rule)
    rule += ", chosen here: w writes it" if override is not None else ", file's rule"
    parts = [
        f"round trip {round_trip_text(plan)}",
        f"path {eng(plan.optics.optical_path, 'm', 5)}",
        f"switch-out after {b.dump_round_trip} ({rule})",
        f"output {eng(b.output_energy, 'J', 4)}, {b.extraction_efficiency * 100:.1f} % extracted",
    ]
    if b.continuous and b.period != 1:
        e = b.output_energies
        parts.append(f"alternates between {eng(max(e), 'J', 4)} and {eng(min(e), 'J', 4)} ("
                     + ("irregular" if b.period == 0 else f"period {b.period}") + ")")
    return " │ ".join(parts)


def switching_lines(plan) -> list[str]:
    """Switch-on/off windows, edges, gate width and jitter margin (ns and sigmas)."""
    s = plan.switching
    lines = [f"{s.scheme} scheme, seed pulse #{s.seed_pulse_index} trapped"]
    for label, win, edge in (("switch-on ", s.on_window, s.on_edge),
                             ("switch-off", s.off_window, s.off_edge)):
        if win is None:
            lines.append(f"{label} edge {ns(edge)}  NO WINDOW (the edge cannot be placed cleanly)")
            continue
        a, b = win
        lines.append(f"{label} edge {ns(edge)}, window {ns(a)[:-3]} … {ns(b)} ({ns(b - a)})")
    if math.isinf(s.margin_sigma):
        sig = "∞ σ, no jitter given"
    elif math.isnan(s.margin_sigma):
        sig = "— σ"
    else:
        sig = f"{s.margin_sigma:.1f} σ"
    lines.append(f"gate width {ns(s.gate_width)}   margin ±{ns(s.margin)} = {sig} of jitter")
    return lines


@dataclass
class TableView:
    """The generator table: header lines, then per row its line, its note and its problem."""

    header: list[str]
    rows: list[tuple[str, str, Optional[str]]] = field(default_factory=list)


def generator_table(plan) -> TableView:
    """The delay-generator table as ``regentime plan`` prints it: the setup card's rows and
    columns (:mod:`regentime.reports.setup_card`, the same text-table renderer); each row's
    note and problem come with it."""
    from regentime.reports.setup_card import TABLE_HEAD, table_rows
    from regentime.reports.tables import text_table

    lines = text_table(TABLE_HEAD, table_rows(plan), align="llrrrl", indent="").split("\n")
    out = [(lines[i + 2], r.note, r.problem) for i, r in enumerate(plan.timing.rows)]
    return TableView(lines[:2], out)


def _ratio(x: float) -> str:
    if math.isinf(x):
        return "∞ (no satellite)"
    if not x > 0:
        return "—"
    return f"{x:.3g}:1 ({10 * math.log10(x):.1f} dB)"


def contrast_lines(plan) -> list[str]:
    """Nearest and worst pre-pulse, worst post-pulse; after the cleaner when there is one."""
    c = plan.contrast
    lines = [f"nearest pre-pulse  {_ratio(c.nearest_pre_ratio)}",
             f"worst pre-pulse    {_ratio(c.worst_pre_ratio)}",
             f"worst post-pulse   {_ratio(c.worst_post_ratio)}"]
    if c.cleaned is not None:
        lines.append("with the cleaner cell:")
        lines.append(f"  worst pre-pulse  {_ratio(c.cleaned.summary.worst_pre_ratio)}")
        lines.append(f"  worst post-pulse {_ratio(c.cleaned.summary.worst_post_ratio)}")
    return lines


LEVEL_MARK = {"error": "✗", "warning": "!", "info": "·"}


def check_lines(plan) -> list[tuple[str, str]]:
    """(level, text) for every check, errors first."""
    order = {"error": 0, "warning": 1, "info": 2}
    checks = sorted(plan.checks, key=lambda c: order.get(c.level, 3))
    return [(c.level, f"{LEVEL_MARK.get(c.level, '?')} {c.name}: {c.message}") for c in checks]


def sensitivity_text(plan, n: int) -> str:
    b = plan.buildup
    if n >= len(b.sensitivity_pump):
        return ""
    sp, ss = finite_or_none(b.sensitivity_pump[n]), finite_or_none(b.sensitivity_seed[n])
    show = lambda x: "—" if x is None else f"{x:+.3f}"  # noqa: E731
    return (f"after round trip {n}: d ln E_out / d ln pump = {show(sp)},  "
            f"d ln E_out / d ln seed = {show(ss)}")


@dataclass
class TraceOverlay:
    """A measured build-up placed on the plan's round-trip axis (from a trace's TraceResult)."""

    first_round_trip: int  # round trip of the first measured pulse (the fit's count)
    energies: list  # J, measured pulses up to the switch-out, scaled by the fitted photodiode scale
    fitted: list  # J, the fitted envelope from the first pulse to past its peak
    observed_dump: int  # round trip of the last pulse before the switch-out (the fit's count)
    peak: int  # round trip of the peak (fitted, or the largest pulse)


def trace_overlay(result) -> Optional[TraceOverlay]:
    """Where the trace's pulses go on the build-up plot, or None without a fit in joules.

    Formatting only: pulse i is round trip round(fit "round_trips_before_first_pulse") + i
    and its energy is its amplitude divided by the fitted scale (area per joule).
    """
    f = result.fit
    if f is None:
        return None
    scale = finite_or_none(f.values.get("scale_per_J"))
    before = finite_or_none(f.values.get("round_trips_before_first_pulse"))
    if scale is None or scale <= 0 or before is None:
        return None
    k0 = int(round(before))
    amps = [float(a) for a in result.train.amplitudes[: result.observed_dump_index + 1]]
    return TraceOverlay(k0, [a / scale for a in amps], [float(a) / scale for a in f.extended],
                        k0 + int(result.observed_dump_index), k0 + int(result.peak_index))


def suggested_round_trip(result, base: int) -> int:
    """The switch-out round trip the trace suggests: the plan's ``base`` (the setting the
    trace was taken with) moved by the trace's ``dump_offset_round_trips``."""
    return max(1, int(base) + int(result.dump_offset_round_trips))


def trace_lines(result, base: int, chosen: Optional[int]) -> list[tuple[str, str]]:
    """(style, line) of the trace panel: what was read, the measured round trip and length
    error, the fitted gain and loss beside the file's, and the suggested switch-out.

    ``base``: the plan's switch-out round trip when the trace was analysed; ``chosen``: the
    round trip the plan uses now (to say whether the suggestion is applied)."""
    import os

    r, tr, f = result, result.train, result.fit
    out: list[tuple[str, str]] = []
    if r.trace is not None:
        t = r.trace
        out.append(("", f"{os.path.basename(t.source)}, channel '{t.channel}': {t.n_samples} "
                        f"samples every {eng(t.sample_interval, 's', 3)}; "
                        f"{len(tr.amplitudes)} pulses (amplitude: pulse area)"))
    meas = f"round trip {finite_or_none(r.measured_round_trip_s) * 1e9:.4f} ns ± " \
           f"{eng(r.measured_round_trip_sigma_s, 's', 3)} measured"
    if r.model_round_trip_s is not None and r.length_error_m is not None:
        side = "longer" if r.length_error_m > 0 else "shorter"
        meas += (f", {r.model_round_trip_s * 1e9:.4f} ns in the file: length error "
                 f"{r.length_error_m * 1e3:+.2f} mm (the real cavity is {side})")
    out.append(("", meas))
    if f is None:
        out.append(("dim", "fit: none (too few pulses before the switch-out)"))
    else:
        def pair(key: str, pct: bool = False) -> str:
            v, s, file = f.values.get(key), f.sigmas.get(key), f.file_values.get(key)
            fmt = (lambda x, d=4: f"{x * 100:.{d - 1}g} %") if pct else \
                (lambda x, d=4: f"{x:.{d}g}")  # noqa: E731
            text = "—" if finite_or_none(v) is None else fmt(v)
            if finite_or_none(s) is not None and s > 0:
                text += f" ± {fmt(s, 2 + pct)}"
            if finite_or_none(file) is not None:
                text += f" (file {fmt(file)})"
            return text

        out.append(("", f"fit: log gain at injection {pair('initial_log_gain')}, round-trip "
                        f"loss {pair('round_trip_loss', pct=True)}"))
    overlay = trace_overlay(r)
    where = (lambda i, k: f"pulse {i} (round trip {k})") if overlay else \
        (lambda i, k: f"pulse {i}")  # noqa: E731
    k0 = overlay.first_round_trip if overlay else 0
    out.append(("", f"switched out after {where(r.observed_dump_index, k0 + r.observed_dump_index)}"
                    f"{'' if tr.switch_out_seen else ' (collapse not seen)'}; peak at "
                    f"{where(r.peak_index, k0 + r.peak_index)}"
                    f"{', extrapolated by the fit' if r.peak_extrapolated else ''}"))
    n = int(r.dump_offset_round_trips)
    target = suggested_round_trip(r, base)
    if n == 0:
        out.append(("bold", f"suggested: keep switching out after round trip {base} "
                            "(the trace was switched out at its peak)"))
    else:
        word = "later" if n > 0 else "earlier"
        state = "applied (w writes it)" if chosen == target else "a applies it"
        out.append(("bold", f"suggested: switch out {abs(n)} round trip{'s' if abs(n) != 1 else ''} "
                            f"{word} ({eng(r.switch_off_shift_s, 's', 4)} on the switch-off "
                            f"delay): after round trip {target} - {state}; try it at low pump "
                            "power first"))
    if overlay is not None and abs(overlay.observed_dump - base) > 1:
        out.append(("yellow", f"! the fit counts round trip {overlay.observed_dump} for the "
                              f"trace's switch-out, the plan had {base}: was the trace taken "
                              "with this setting?"))
    out += [("dim", f"· {note}") for note in r.notes]
    return out


def element_summary(kind: str, fields: Any) -> str:
    """'space 250 mm', 'mirror end-A  reflectivity 99.8 %' - the file's own text."""
    if not isinstance(fields, dict):
        return f"{kind} {fields}" if fields not in (None, "") else kind
    name = fields.get("name")
    rest = [f"{k} {v}" for k, v in fields.items() if k != "name"]
    head = f"{kind} {name}" if name else kind
    return (head + "  " + ", ".join(rest)).rstrip()
