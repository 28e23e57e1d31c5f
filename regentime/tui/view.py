"""Plan -> text for the TUI's regions.  Formatting only: every number comes from the plan.

Kept free of Textual so the same strings can be checked in plain tests.  Stages that are not
written yet (``plan.switching``, ``plan.timing``, ``plan.contrast`` are None) are shown as
"not available yet", never as made-up numbers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Optional

from regentime.reports.tables import eng

NOT_YET = "not available yet (this planning stage is not in this build)"


def _f(x: Any) -> Optional[float]:
    try:
        v = float(x)
    except (TypeError, ValueError):
        return None
    return v if math.isfinite(v) else None


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
        parts.append(f"alternates between {eng(float(e.max()), 'J', 4)} and {eng(float(e.min()), 'J', 4)} ("
                     + ("irregular" if b.period == 0 else f"period {b.period}") + ")")
    return " │ ".join(parts)


def ns(x: Any) -> str:
    """Nanoseconds with 3 decimals (1 ps), as the setup card prints times: '389.439 ns'."""
    v = _f(x)
    return "—" if v is None else f"{v * 1e9:.3f} ns"


def switching_lines(plan) -> list[str]:
    """Switch-on/off windows, edges, gate width and jitter margin (ns and sigmas)."""
    s = plan.switching
    if s is None:
        return [f"Pockels-cell windows: {NOT_YET}"]
    lines = []
    scheme = getattr(s, "scheme", None) or getattr(plan.cavity.switch, "scheme", "")
    seed_i = getattr(s, "seed_pulse_index", None)
    head = f"{scheme} scheme"
    if seed_i is not None:
        head += f", seed pulse #{seed_i} trapped"
    lines.append(head)
    for label, win, edge in (("switch-on ", getattr(s, "on_window", None), getattr(s, "on_edge", None)),
                             ("switch-off", getattr(s, "off_window", None), getattr(s, "off_edge", None))):
        if win is None:
            lines.append(f"{label} edge {ns(edge)}  NO WINDOW (the edge cannot be placed cleanly)")
            continue
        a, b = (_f(win[0]), _f(win[1])) if len(win) == 2 else (None, None)
        w = (b - a) if a is not None and b is not None else None
        lines.append(f"{label} edge {ns(edge)}, window {ns(a)[:-3]} … {ns(b)} ({ns(w)})")
    sigma = _f(getattr(s, "margin_sigma", None))
    raw_sigma = getattr(s, "margin_sigma", None)
    if sigma is not None:
        sig = f"{sigma:.1f} σ"
    elif isinstance(raw_sigma, float) and math.isinf(raw_sigma):
        sig = "∞ σ, no jitter given"
    else:
        sig = "— σ"
    lines.append(f"gate width {ns(getattr(s, 'gate_width', None))}   "
                 f"margin ±{ns(getattr(s, 'margin', None))} = {sig} of jitter")
    return lines


@dataclass
class TableView:
    """The generator table: header lines, then per row its line, its note and its problem."""

    header: list[str]
    rows: list[tuple[str, str, Optional[str]]] = field(default_factory=list)
    source: str = ""  # "setup card" | "timing rows"


HEADERS = ("output", "drives", "delay", "width", "note")


def _cell_time(x) -> str:
    return eng(x, "s", 4, "n") if _f(x) is not None else ""


def generator_table(plan) -> Optional[TableView]:
    """The delay-generator table as ``plan`` prints it (None when timing is not available).

    Uses the setup card's rows and columns (:mod:`regentime.reports.setup_card`, the same
    text-table renderer as ``regentime plan``); each row's note and problem come with it.
    Without the setup card, renders ``plan.timing.rows`` with the shared renderer.
    """
    if plan.timing is None:
        return None
    from regentime.reports.tables import text_table

    rows = list(getattr(plan.timing, "rows", []) or [])
    card = _setup_card()
    head = card.TABLE_HEAD
    if card is not None and head is not None and hasattr(card, "table_rows"):
        lines = text_table(head, card.table_rows(plan), align="llrrrl", indent="").split("\n")
        source = "setup card"
    else:
        cells = [[r.output, r.drives, _cell_time(r.delay) or "—",
                  _cell_time(getattr(r, "width", None))] for r in rows]
        lines = text_table(HEADERS[:4], cells, align="llrr", indent="").split("\n")
        source = "timing rows"
    out = [(lines[i + 2], getattr(r, "note", "") or "", getattr(r, "problem", None) or None)
           for i, r in enumerate(rows)]
    return TableView(lines[:2], out, source)


def table_rows(plan) -> tuple[tuple[str, ...], list[list[str]]]:
    """Headers and cells of the generator table, for the Markdown/CSV export."""
    rows = list(getattr(plan.timing, "rows", []) or []) if plan.timing is not None else []
    cells = []
    for r in rows:
        cells.append([str(r.output), str(r.drives),
                      eng(r.delay, "s", 4, "n") if _f(r.delay) is not None else "—",
                      eng(getattr(r, "width", None), "s", 4, "n")
                      if _f(getattr(r, "width", None)) is not None else "",
                      (getattr(r, "note", "") or "") +
                      (f" PROBLEM: {r.problem}" if getattr(r, "problem", None) else "")])
    return HEADERS, cells


def contrast_lines(plan) -> list[str]:
    c = plan.contrast
    if c is None:
        return [f"contrast: {NOT_YET}"]

    def ratio(x) -> str:
        try:
            if math.isinf(float(x)):
                return "∞ (no satellite)"
        except (TypeError, ValueError):
            pass
        v = _f(x)
        if v is None:
            return "—"
        db = 10 * math.log10(v) if v > 0 else float("nan")
        return f"{v:.3g}:1 ({db:.1f} dB)"

    lines = [f"nearest pre-pulse  {ratio(getattr(c, 'nearest_pre_ratio', None))}",
             f"worst pre-pulse    {ratio(getattr(c, 'worst_pre_ratio', None))}",
             f"worst post-pulse   {ratio(getattr(c, 'worst_post_ratio', None))}"]
    cleaned = getattr(c, "cleaned", None)
    if cleaned is not None:
        src = getattr(cleaned, "summary", cleaned)
        get = (src.get if isinstance(src, dict) else lambda k, d=None: getattr(src, k, d))
        lines.append("with the cleaner cell:")
        lines.append(f"  worst pre-pulse  {ratio(get('worst_pre_ratio'))}")
        lines.append(f"  worst post-pulse {ratio(get('worst_post_ratio'))}")
    return lines


LEVEL_MARK = {"error": "✗", "warning": "!", "info": "·"}


def check_lines(plan) -> list[tuple[str, str]]:
    """(level, text) for every check, errors first."""
    order = {"error": 0, "warning": 1, "info": 2}
    checks = sorted(plan.checks, key=lambda c: order.get(c.level, 3))
    out = [(c.level, f"{LEVEL_MARK.get(c.level, '?')} {c.name}: {c.message}") for c in checks]
    if plan.switching is None:
        out.append(("info", f"· windows: {NOT_YET}"))
    return out


def sensitivity_text(plan, n: int) -> str:
    b = plan.buildup
    if n >= len(b.sensitivity_pump):
        return ""
    sp, ss = _f(b.sensitivity_pump[n]), _f(b.sensitivity_seed[n])
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
    scale = _f(f.values.get("scale_per_J"))
    before = _f(f.values.get("round_trips_before_first_pulse"))
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
    meas = f"round trip {_f(r.measured_round_trip_s) * 1e9:.4f} ns ± " \
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
            text = "—" if _f(v) is None else fmt(v)
            if _f(s) is not None and s > 0:
                text += f" ± {fmt(s, 2 + pct)}"
            if _f(file) is not None:
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


def _setup_card():
    import importlib

    try:
        return importlib.import_module("regentime.reports.setup_card")
    except ModuleNotFoundError as exc:
        if exc.name == "regentime.reports.setup_card":
            return None
        raise
