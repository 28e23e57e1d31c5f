"""The planner's photodiode-trace actions: load a trace, overlay it, apply its suggestion.

A mixin of :class:`regentime.tui.app.PlannerApp`.  The trace is read and fitted in a thread
worker with the trace API (:func:`regentime.trace.read_trace`,
:func:`~regentime.trace.inputs_from_plan`, :func:`~regentime.trace.analyse_trace`); nothing
is computed here.  A bad file shows its one-line error as a notification.  After an edit the
loaded trace is fitted again against the new plan once the edits pause, unless the fit's
inputs did not change.  Applying the suggestion sets the switch-out round trip like ``[`` and
``]`` do (the file changes only when ``w`` writes it).
"""

from __future__ import annotations

import os
from typing import Optional

from textual import work

from regentime.errors import InputError, InputErrors
from regentime.tui import view
from regentime.tui.buildup_plot import BuildupPlot
from regentime.tui.dialogs import TraceScreen
from regentime.tui.panels import TracePanel

REFIT_DELAY = 1.5  # s without a new plan before the loaded trace is fitted again


class TraceActions:
    """Trace state and actions; expects the PlannerApp attributes (plan, doc, override …)."""

    trace_result = None  # TraceResult of the loaded trace, or None
    trace_base: Optional[int] = None  # the plan's switch-out round trip when it was loaded
    trace_request: tuple = ("", None)  # (path, channel) as typed
    _trace = None  # the Trace as read (kept for re-fits)
    _trace_generation = 0
    _trace_inputs: Optional[tuple] = None  # fit inputs of the shown result
    _refit_timer = None

    def action_load_trace(self) -> None:
        if self.plan is None:
            self.notify("no valid plan yet: the trace is fitted against the plan",
                        severity="warning")
            return
        self.push_screen(TraceScreen(*[x or "" for x in self.trace_request]), self._trace_chosen)

    def _trace_chosen(self, answer: Optional[tuple]) -> None:
        if not answer or self.plan is None:
            return
        self.trace_request = answer
        self._trace_generation += 1
        self.notify(f"reading and fitting {os.path.basename(answer[0])} …", timeout=3,
                    markup=False)
        self._trace_worker(answer[0], answer[1], None, self.plan, self.plan.dump_round_trip,
                           None, self._trace_generation)

    def _schedule_refit(self) -> None:
        """Fit the loaded trace again against the new plan once the edits pause."""
        if self._refit_timer is not None:
            self._refit_timer.stop()
        self._refit_timer = self.set_timer(REFIT_DELAY, self._refit)

    def _refit(self) -> None:
        self._refit_timer = None
        if self.trace_result is None or self._trace is None or self.plan is None:
            return
        self._trace_generation += 1
        self._trace_worker(self.trace_request[0], self.trace_request[1], self._trace, self.plan,
                           self.trace_base, self._trace_inputs, self._trace_generation)

    @work(thread=True, group="trace", exit_on_error=False)
    def _trace_worker(self, path: str, channel: Optional[str], trace, plan, base: int,
                      skip_inputs: Optional[tuple], gen: int) -> None:
        """Read (unless ``trace`` is given) and analyse a trace against ``plan``; the result or
        a one-line error goes back to the UI thread.  A re-fit whose fit inputs did not change
        (``skip_inputs``) ends quietly."""
        from regentime.trace import analyse_trace, inputs_from_plan, read_trace

        try:
            inputs = inputs_from_plan(plan)
            key = _inputs_key(inputs)
            if trace is not None and key == skip_inputs:
                return
            if trace is None:
                trace = read_trace(path, channel)
            result = analyse_trace(trace, inputs)
        except (InputError, InputErrors) as exc:
            errors = exc.errors if isinstance(exc, InputErrors) else [exc]
            msg = "; ".join(e.one_line().removeprefix("SCOPE: ") for e in errors)
            self.call_from_thread(self._trace_failed, gen, f"trace not loaded: {msg}")
        except Exception as exc:  # noqa: BLE001 - shown to the user, never a crash
            self.call_from_thread(self._trace_failed, gen, "trace not analysed (a bug in "
                                  "regentime, please report it with the trace): "
                                  f"{type(exc).__name__}: {exc}")
        else:
            self.call_from_thread(self._trace_ready, gen, trace, result, base, key)

    def _trace_ready(self, gen: int, trace, result, base: int, key: tuple) -> None:
        if gen != self._trace_generation:
            return
        first = self.trace_result is None or self._trace is not trace
        self._trace, self.trace_result, self.trace_base, self._trace_inputs = \
            trace, result, base, key
        self._show_trace()
        if first:
            n = result.dump_offset_round_trips
            what = ("the switch-out is at the peak" if n == 0 else
                    f"switch out {abs(n)} round trip{'s' if abs(n) != 1 else ''} "
                    f"{'later' if n > 0 else 'earlier'} (a applies it)")
            self.notify(f"trace fitted: {what}", timeout=6)

    def _trace_failed(self, gen: int, message: str) -> None:
        if gen != self._trace_generation:
            return
        self.notify(message, severity="error", timeout=10, markup=False)

    def _show_trace(self) -> None:
        panel = self.query_one(TracePanel)
        result = self.trace_result
        if result is None:
            panel.set_class(False, "loaded")
            self.query_one(BuildupPlot).set_overlay(None)
            return
        chosen = self.plan.dump_round_trip if self.plan is not None else None
        panel.set_class(True, "loaded")
        panel.show(view.trace_lines(result, self.trace_base, chosen))
        plot = self.query_one(BuildupPlot)
        overlay = view.trace_overlay(result)
        if overlay != plot.overlay:
            plot.set_overlay(overlay)

    def action_apply_trace(self) -> None:
        if self.trace_result is None:
            self.notify("no trace loaded: t loads one", severity="warning")
            return
        if self.plan is None:
            self.notify("no valid plan yet", severity="warning")
            return
        top = len(self.plan.buildup.output) - 1
        target = min(top, view.suggested_round_trip(self.trace_result, self.trace_base))
        if target == self.plan.dump_round_trip and self.override is not None:
            self.notify(f"already switching out after round trip {target}")
            return
        file_value = self.doc.get("dump", "auto") if self.doc else "auto"
        self.override = None if str(file_value) == str(target) else target
        self.notify(f"switch-out after round trip {target}, from the trace (w writes it to the "
                    "file); check it at low pump power first")
        self.request_plan()

    def action_clear_trace(self) -> None:
        if self.trace_result is None:
            return
        self._trace_generation += 1  # drops a fit still running
        self.trace_result, self._trace, self.trace_base, self._trace_inputs = None, None, None, None
        self._show_trace()


def _inputs_key(inputs) -> tuple:
    """The scalar fit inputs, to tell whether a re-fit would change anything."""
    return (inputs.round_trip_time, inputs.e_sat, inputs.seed_energy, inputs.initial_log_gain,
            inputs.round_trip_loss, tuple(inputs.ops), inputs.decay, inputs.g_eq,
            inputs.rings is not None)
