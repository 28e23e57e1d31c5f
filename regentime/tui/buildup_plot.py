"""The build-up plot: pulse energy in the cavity per round trip, drawn with braille dots.

Shows E_k (energy after k round trips, from ``plan.buildup.result.energy``) on a log or
linear axis, the chosen switch-out round trip (solid line) and the round trip of peak output
(dashed line); on demand a strip below with the planner's sensitivities of the output to
pump and seed (``plan.buildup.sensitivity_pump/seed``).  With a photodiode trace loaded, the
measured pulses (scaled by the trace fit, :func:`regentime.tui.view.trace_overlay`) are drawn
as small crosses and the fitted envelope as a dotted line.  Numbers come from the plan and
the trace analysis only.
"""

from __future__ import annotations

import math

from rich.text import Text
from textual.binding import Binding
from textual.message import Message
from textual.reactive import reactive
from textual.widget import Widget

from regentime.numfmt import eng
from regentime.tui.canvas import Canvas, nice_ticks, scale

_LEFT = 9  # columns for the y labels

CURVE, CHOSEN, PEAK, S_PUMP, S_SEED = ("bold green", "bold yellow", "magenta", "cyan", "blue")
MEASURED, FITTED = ("bold dark_orange", "dark_orange")


class BuildupPlot(Widget, can_focus=True):
    """Energy per round trip with the switch-out and peak round trips marked."""

    DEFAULT_CSS = """
    BuildupPlot { height: 1fr; min-height: 6; }
    """
    BINDINGS = [
        Binding("left", "nudge(-1)", "Earlier", key_display="←", show=False),
        Binding("right", "nudge(1)", "Later", key_display="→", show=False),
    ]

    log_scale: reactive[bool] = reactive(True)
    show_sensitivity: reactive[bool] = reactive(False)

    class Nudge(Message):
        """The user asked to move the switch-out round trip by ``delta``."""

        def __init__(self, delta: int) -> None:
            self.delta = delta
            super().__init__()

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.plan = None
        self.overlay = None  # view.TraceOverlay or None

    def set_plan(self, plan) -> None:
        self.plan = plan
        self.refresh()

    def set_overlay(self, overlay) -> None:
        """Show (or, with None, remove) a measured build-up."""
        self.overlay = overlay
        self.refresh()

    def action_nudge(self, delta: int) -> None:
        self.post_message(self.Nudge(delta))

    def watch_log_scale(self) -> None:
        self.refresh()

    def watch_show_sensitivity(self) -> None:
        self.refresh()

    # ---- drawing -------------------------------------------------------------------------
    def render(self) -> Text:
        w, h = self.content_size.width, self.content_size.height
        if self.plan is None:
            return Text("no plan yet", style="dim")
        if w < _LEFT + 10 or h < 4:
            return Text("(too small for the plot)", style="dim")
        return self._draw(w, h)

    def _draw(self, w: int, h: int) -> Text:
        b = self.plan.buildup
        ov = self.overlay
        n_shown = max(2, min(int(b.n_shown or len(b.result.energy) - 1), len(b.result.energy) - 1))
        n_dump, n_peak = b.dump_round_trip, b.peak_round_trip
        n_shown = max(n_shown, min(n_dump + 2, len(b.result.energy) - 1))
        energy = [float(x) for x in b.result.energy[:n_shown + 1]]
        if ov is not None:  # the axis also covers the measured pulses (within reason)
            last = max(ov.first_round_trip + len(ov.energies), ov.peak + 1)
            n_shown = max(n_shown, min(last, 2 * n_shown))
        measured = [(ov.first_round_trip + i, e) for i, e in enumerate(ov.energies)] if ov else []
        fitted = [(ov.first_round_trip + i, e) for i, e in enumerate(ov.fitted)] if ov else []
        measured = [(k, e) for k, e in measured if 0 <= k <= n_shown]
        fitted = [(k, e) for k, e in fitted if 0 <= k <= n_shown]
        caption_rows = 3 if ov is not None else 2
        plot_h = h - 1 - caption_rows  # one row of x ticks
        sens_h = 0
        if self.show_sensitivity and plot_h >= 7:
            sens_h = max(4, plot_h // 3)
            plot_h -= sens_h
        cw = w - _LEFT
        canvas = Canvas(cw, plot_h)
        xs = scale(list(range(n_shown + 1)), 0, n_shown, canvas.dots_x)
        every = energy + [e for _, e in measured] + [e for _, e in fitted]
        if self.log_scale:
            pos = [e for e in every if e > 0 and math.isfinite(e)]
            lo = math.floor(math.log10(min(pos))) if pos else -9
            hi = math.ceil(math.log10(max(pos))) if pos else 0
            hi = max(hi, lo + 1)
            ymap = lambda v: scale([math.log10(e) if e > 0 else math.nan for e in v],  # noqa: E731
                                   lo, hi, canvas.dots_y)
            step = max(1, math.ceil((hi - lo) / max(1, plot_h // 2)))
            ticks = [(10.0 ** k, (k - lo) / (hi - lo)) for k in range(lo, hi + 1, step)]
        else:
            top = max([e for e in every if math.isfinite(e)] or [1.0])
            ymap = lambda v: scale(v, 0.0, top * 1.05, canvas.dots_y)  # noqa: E731
            ticks = [(t, t / (top * 1.05)) for t in nice_ticks(0.0, top, max(2, plot_h // 2))]
        ys = ymap(energy)
        peak_layer = canvas.layer(PEAK)
        chosen_layer = canvas.layer(CHOSEN)
        fit_layer = canvas.layer(FITTED) if ov is not None else None
        curve = canvas.layer(CURVE)
        canvas.vline(peak_layer, round(xs[min(n_peak, n_shown)]), dashed=True)
        if n_dump <= n_shown:
            canvas.vline(chosen_layer, round(xs[n_dump]))
        if fitted:
            fy = ymap([e for _, e in fitted])
            for (k, _), y in zip(fitted, fy):  # one dot per round trip: a dotted line
                if math.isfinite(y):
                    canvas.dot(fit_layer, round(xs[k]), round(y))
        canvas.polyline(curve, zip(xs, ys))
        if measured:
            mark = canvas.layer(MEASURED)
            for (k, _), y in zip(measured, ymap([e for _, e in measured])):
                if math.isfinite(y):
                    x, y = round(xs[k]), round(y)
                    for dx, dy in ((0, 0), (-1, 0), (1, 0), (0, -1), (0, 1)):
                        canvas.dot(mark, x + dx, y + dy)
        labels = {}
        for value, frac in ticks:
            row = plot_h - 1 - round(frac * (plot_h - 1))
            labels[row] = eng(value, "J", 3)
        text = Text(no_wrap=True, overflow="crop")
        for r, row in enumerate(canvas.cells()):
            text.append(f"{labels.get(r, ''):>{_LEFT - 1}}┤" if r in labels else " " * (_LEFT - 1) + "│",
                        style="dim")
            _append_cells(text, row)
            text.append("\n")
        legend = self._sensitivity(text, b, n_shown, xs, cw, sens_h) if sens_h else None
        # x axis
        axis = [" "] * cw
        for t in nice_ticks(0, n_shown, max(2, cw // 10)):
            col = int(round(t / n_shown * (cw - 1)))
            label = str(int(t))
            if col + len(label) <= cw:
                axis[col:col + len(label)] = list(label)
        text.append(" " * (_LEFT - 1) + "└", style="dim")
        text.append("".join(axis) + "\n", style="dim")
        e_n = energy[n_dump] if n_dump < len(energy) else float("nan")
        text.append("│", style=CHOSEN)
        text.append(f" switch-out after {n_dump}: {eng(e_n, 'J', 4)} in the cavity, "
                    f"{eng(b.output_energy, 'J', 4)} out"[:w - 1] + "\n")
        text.append("┆", style=PEAK)
        scale_name = "log" if self.log_scale else "linear"
        text.append(f" peak output after {n_peak}"[:w - 1])
        text.append(f"   x: round trip k, y: energy in the cavity ({scale_name})"[:max(0, w - 26)],
                    style="dim")
        if ov is not None:
            text.append("\n")
            text.append("+", style=MEASURED)
            text.append(" measured pulses (trace, scaled by its fit) "[:w - 1])
            text.append("⠄⠄"[:max(0, w - 46)], style=FITTED)
            text.append(" fitted envelope"[:max(0, w - 48)])
        if legend is not None:
            text.append("\n")
            text.append_text(legend)
        return text

    def _sensitivity(self, text: Text, b, n_shown: int, xs, cw: int, sens_h: int) -> Text:
        """Draw the sensitivity strip into ``text``; returns its legend line."""
        sp = [float(x) for x in b.sensitivity_pump[:n_shown + 1]]
        ss = [float(x) for x in b.sensitivity_seed[:n_shown + 1]]
        finite = [abs(v) for v in sp + ss if math.isfinite(v)]
        lim = min(max(finite or [1.0]), 2.0) or 1.0  # clipped so the curve near the peak shows
        canvas = Canvas(cw, sens_h - 1)  # the legend goes under the x axis
        zero = canvas.layer("dim")
        for x in range(0, canvas.dots_x, 4):
            canvas.dot(zero, x, canvas.dots_y // 2)
        lp, ls = canvas.layer(S_SEED), canvas.layer(S_PUMP)
        clip = lambda v: max(-lim, min(lim, v)) if math.isfinite(v) else math.nan  # noqa: E731
        canvas.polyline(ls, zip(xs, scale([clip(v) for v in sp], -lim, lim, canvas.dots_y)))
        canvas.polyline(lp, zip(xs, scale([clip(v) for v in ss], -lim, lim, canvas.dots_y)))
        rows = canvas.cells()
        for r, row in enumerate(rows):
            label = f"{'+' if r == 0 else '−'}{lim:.2g}" if r in (0, len(rows) - 1) else (
                "sens." if r == len(rows) // 2 else "")
            text.append(f"{label:>{_LEFT - 1}}│", style="dim")
            _append_cells(text, row)
            text.append("\n")
        n = b.dump_round_trip
        show = lambda a: f"{float(a[n]):+.3f}" if n < len(a) and math.isfinite(a[n]) else "—"  # noqa: E731
        legend = Text(no_wrap=True, overflow="crop")
        legend.append("sensitivity ", style="dim")
        legend.append("pump", style=S_PUMP)
        legend.append(f" {show(b.sensitivity_pump)}  ")
        legend.append("seed", style=S_SEED)
        legend.append(f" {show(b.sensitivity_seed)}  (d ln E_out / d ln x after {n})"[:max(0, cw - 12)])
        return legend


def _append_cells(text: Text, row) -> None:
    """Append a canvas row, one span per run of cells of the same style (fewer spans to
    render than one per cell)."""
    run, style = [], None
    for ch, st in row:
        if st != style and run:
            text.append("".join(run), style=style or None)
            run = []
        style = st
        run.append(ch)
    if run:
        text.append("".join(run), style=style or None)
