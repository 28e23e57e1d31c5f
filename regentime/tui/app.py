"""The terminal planner: edit a cavity file and watch the plan follow.

The app holds a :class:`~regentime.fileformat.document.CavityDocument` (the file's text, kept
with its comments) and the last valid plan.  Every accepted edit starts a planning run in a
thread worker (a newer edit cancels the older run); the run calls the same functions as
``regentime plan`` (:func:`load_cavity_text`, :func:`make_plan`) and hands the plan back to
the UI thread.  Refused input is marked with its reason and the last valid plan stays.
"""

from __future__ import annotations

import os
import time
from typing import Any, Iterable, Optional

from rich.text import Text
from textual import events, work
from textual.app import App, ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Header, Static
from textual.worker import get_current_worker

from regentime.errors import InputError, InputErrors, PlanError
from regentime.fileformat.document import CavityDocument
from regentime.safety import CAUTION, CAUTION_SHORT
from regentime.tui import view
from regentime.tui.buildup_plot import BuildupPlot
from regentime.tui.dialogs import KindScreen
from regentime.tui.editor import ParameterEditor, shown
from regentime.tui.element_screen import ElementScreen
from regentime.tui.elements import ElementList
from regentime.tui.field_row import FieldRow
from regentime.tui.file_actions import FileActions, _lines, _stamp, autosave_path  # noqa: F401
from regentime.tui.help_screen import HelpScreen
from regentime.tui.load_error_screen import LoadErrorScreen
from regentime.tui.mode_panel import ModePanel
from regentime.tui.panels import ChecksPanel, ContrastPanel, TimingPanel, TracePanel
from regentime.tui.spectrum_panel import SpectrumPanel
from regentime.tui.trace_actions import TraceActions

DEMO_TITLE = "built-in demo (invented scenario)"

# (key, action, footer label, description, key shown, in footer): footer, help, command palette
KEYS = [
    ("f1", "help", "help", "Help: every key and what each region shows", "F1", True),
    ("left_square_bracket", "switch_out('earlier')", "earlier",
     "Switch out one round trip earlier", "[", True),
    ("right_square_bracket", "switch_out('later')", "later",
     "Switch out one round trip later", "]", True),
    ("p", "switch_out('peak')", "peak", "Switch out at the round trip of peak output", "p", True),
    ("s", "switch_out('steady')", "steadiest",
     "Switch out at the steadiest round trip (least sensitive to pump and seed)", "s", True),
    ("w", "write_dump", "write N", "Write the chosen switch-out round trip to the file (dump:)",
     "w", True),
    ("l", "toggle_log", "log/lin", "Log / linear energy axis of the build-up plot", "l", True),
    ("v", "toggle_sensitivity", "sensitivity",
     "Show / hide the output's sensitivity to pump and seed", "v", True),
    ("n", "toggle_notes", "notes", "Show / hide the notes under the generator table's rows",
     "n", False),
    ("m", "stability_map", "stability", "Stability map around the setting (period per round trip "
     "and repetition rate, the setting marked)", "m", False),
    ("ctrl+s", "save", "save", "Save the cavity file (comments and key order kept)", "^s", True),
    ("f2", "save_as", "save as", "Save the cavity file under another name", "F2", False),
    ("x", "export", "export", "Export the table (.md/.csv/.json) or the build-up plot (.png)",
     "x", True),
    ("r", "reload", "reload", "Reload the file from disk", "r", False),
    ("e", "toggle_editor", "editor", "Show / hide the parameter editor", "e", True),
    ("t", "load_trace", "trace", "Load a photodiode trace: overlay the measured build-up, fit it, "
     "suggest a switch-out", "t", True),
    ("a", "apply_trace", "apply trace", "Switch out where the loaded trace suggests (w writes it)",
     "a", False),
    ("T", "clear_trace", "clear trace", "Remove the photodiode trace overlay", "T", False),
    ("ctrl+q", "quit", "quit", "Quit (asks first when there are unsaved changes)", "^q", True),
]
OTHER_KEYS = [
    ("in a value box", [("type", "the value with its unit: '9 mJ', '250 mm', '99.8 %'"),
                        ("empty it", "removes an optional key from the file: the default "
                                     "shown in grey applies again (required keys refuse)"),
                        ("escape", "leave the box (back to the build-up plot)"),
                        ("tab / shift+tab", "next / previous box or region")]),
    ("build-up plot", [("← / →", "switch out one round trip earlier / later")]),
    ("element list", [("+ or insert", "add an element after the highlighted one"),
                      ("− or delete", "remove the highlighted element"),
                      ("shift+↑ / shift+↓", "move it up / down"),
                      ("enter", "edit its values")]),
    ("anywhere", [("?", "help (when no value box has the cursor)"),
                  ("ctrl+p", "command palette: every action by name")]),
]


class PlannerApp(FileActions, TraceActions, App[int]):
    """Plan a regen interactively.  Give it a path (opened here) or a document; neither: demo."""

    CSS_PATH = "app.tcss"
    TITLE = "regentime"
    BINDINGS = [Binding(k, a, label, key_display=kd, show=s, tooltip=d)
                for k, a, label, d, kd, s in KEYS] + [
        Binding("question_mark", "help", "Help", show=False),
        Binding("escape", "focus_plot", "Back to the plot", show=False),
    ]

    def __init__(self, path: Optional[str] = None, document: Optional[CavityDocument] = None,
                 watch_interval: float = 1.0) -> None:
        super().__init__()
        self.path = path
        self.doc: Optional[CavityDocument] = document
        self.plan = None
        self.override: Any = None  # switch-out chosen here: int, "auto", "steady" or None
        self.generation = 0
        self.saved_text = ""
        self.disk_stamp: Optional[tuple] = None
        self.cross_marked: dict[str, str] = {}  # rows marked by whole-file checks
        self._summary_key: Optional[tuple] = None  # (width, lines) of the summary bar's last layout
        self.input_problems: list[str] = []
        self.last_plan_seconds = 0.0
        self.watch_interval = watch_interval
        self._asking_disk = False
        self.autosaved: Optional[str] = None
        self._plan_running = False
        self._plan_wanted: Optional[tuple] = None

    # ---- layout ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield Header(icon="≋")
        yield Static("opening…", id="summary")
        with Horizontal(id="main"):
            yield ParameterEditor(id="editor")
            with VerticalScroll(id="results"):
                yield BuildupPlot(id="plot")
                yield TracePanel(id="trace")
                yield TimingPanel(id="timing")
                yield ModePanel(id="mode")
                with Horizontal(id="lower"):
                    yield ContrastPanel(id="contrast")
                    yield ChecksPanel(id="checks")
                yield SpectrumPanel(id="spectrum")
        yield Static(f"⚠ {CAUTION_SHORT}", id="caution")
        yield Footer()

    async def on_mount(self) -> None:
        self.query_one("#plot").border_title = "build-up"
        self.query_one("#timing").border_title = "switching and delay generator"
        self.query_one("#trace").border_title = "photodiode trace (t loads, a applies, T removes)"
        self.query_one("#mode").border_title = "cavity mode"
        self.query_one("#contrast").border_title = "contrast"
        self.query_one("#checks").border_title = "checks"
        self.query_one("#editor").border_title = "parameters"
        self._layout_classes()
        if self.size.width < 100:  # results first on a narrow terminal; e brings the editor
            self.query_one(ParameterEditor).display = False
            self.notify("Narrow terminal: the parameter editor is hidden; e shows it, F1 helps.",
                        timeout=6)
        if self.doc is None and self.path is not None:
            try:
                self.doc = CavityDocument.load(self.path)
            except (InputError, InputErrors) as exc:
                self.push_screen(LoadErrorScreen(self.path, _lines(exc)), self._after_load_error)
                return
            try:
                self.doc.to_cavity()
            except (InputError, InputErrors) as exc:  # YAML fine, values wrong: may fix here
                self.push_screen(LoadErrorScreen(self.path, _lines(exc), can_edit=True),
                                 self._after_load_error)
                return
        if self.doc is None:
            await self.open_demo()
        else:
            await self.open_document(self.doc)
        if self.watch_interval > 0:
            self.set_interval(self.watch_interval, self._check_disk)

    async def open_demo(self) -> None:
        from regentime.fileformat.loader import demo_text

        await self.open_document(CavityDocument.from_text(demo_text(), None))

    async def open_document(self, doc: CavityDocument) -> None:
        self.doc = doc
        self.path = doc.source
        self.saved_text = doc.text()
        self.disk_stamp = _stamp(doc.source)
        self.override = None
        self.cross_marked.clear()
        await self.query_one(ParameterEditor).load(doc)
        self._update_title()
        self.query_one(BuildupPlot).focus()
        self.request_plan()

    def _after_load_error(self, choice: Optional[str]) -> None:
        if choice == "demo":
            self.call_later(self.open_demo)
        elif choice == "edit" and self.doc is not None:
            self.call_later(self.open_document, self.doc)
        else:
            self.exit(2)

    def on_resize(self, event: events.Resize) -> None:
        self._layout_classes(event.size)

    def _layout_classes(self, size=None) -> None:
        w, h = size or self.size
        self.screen.set_class(w < 110, "narrow")
        self.screen.set_class(h < 32, "short")
        self.screen.set_class(h >= 46, "tall")

    # ---- title and summary -----------------------------------------------------------------
    @property
    def modified(self) -> bool:
        return self.doc is not None and self.doc.text() != self.saved_text

    def _update_title(self) -> None:
        name = os.path.basename(self.doc.source) if self.doc and self.doc.source else DEMO_TITLE
        self.title = "regentime"
        self.sub_title = name + ("  ● modified (ctrl+s saves)" if self.modified else "")

    def _update_summary(self) -> None:
        bar = self.query_one("#summary", Static)
        if self.plan is None:
            bar.update("no valid plan yet: fix the values marked in red")
            return
        text = view.summary_line(self.plan, self.override)
        if self.input_problems:
            text = "⚠ input refused, showing the last valid plan  |  " + text
        bar.set_class(bool(self.input_problems), "stale")
        if text != str(bar.content):
            key = (self.size.width, len(text) // max(1, self.size.width - 2))
            bar.update(text, layout=key != self._summary_key)
            self._summary_key = key

    # ---- planning --------------------------------------------------------------------------
    def request_plan(self) -> None:
        """Plan the document as it is now.

        A newer request supersedes an older one: the older run's result is dropped (its
        generation is stale) and, rather than start a second thread that would compete with
        the first for the interpreter, the newest request waits for the running one to end
        and then runs; requests made in between are skipped.
        """
        if self.doc is None:
            return
        self.generation += 1
        self._plan_wanted = (self.doc.snapshot(), self.doc.source, self.override,
                             self.generation, time.perf_counter())
        if not self._plan_running:
            self._start_next()

    def _start_next(self) -> None:
        if self._plan_wanted is None:
            return
        args, self._plan_wanted = self._plan_wanted, None
        self._plan_running = True
        self._plan_worker(*args)

    @property
    def planning(self) -> bool:
        """True while a plan is being made or waits to be made."""
        return self._plan_running or self._plan_wanted is not None

    @work(thread=True, exclusive=True, group="plan", exit_on_error=False)
    def _plan_worker(self, snapshot: tuple, source: Optional[str], override: Any, gen: int,
                     started: float) -> None:
        from regentime.fileformat.document import cavity_of
        from regentime.planning.plan import make_plan

        worker = get_current_worker()
        outcome: tuple = ("none",)
        try:
            if gen == self.generation:  # skip work already superseded
                # cavity_of = load_cavity_text on the text, reusing the document's parse
                outcome = ("ok", make_plan(cavity_of(*snapshot, source), dump=override))
        except (InputError, InputErrors, PlanError) as exc:
            outcome = ("input", exc)
        except Exception as exc:  # noqa: BLE001 - a bug in planning: shown, never a crash
            outcome = ("bug", exc)
        if not worker.is_cancelled:
            self.call_from_thread(self._plan_finished, gen, outcome, started)

    def _plan_finished(self, gen: int, outcome: tuple, started: float) -> None:
        self._plan_running = False
        kind = outcome[0]
        if kind == "ok":
            self._plan_ready(gen, outcome[1], started)
        elif kind == "input":
            self._plan_failed(gen, outcome[1])
        elif kind == "bug":
            self._plan_crashed(gen, outcome[1])
        self._start_next()

    def _plan_ready(self, gen: int, plan, started: float) -> None:
        if gen != self.generation:
            return
        self.plan = plan
        self.input_problems = []
        self._clear_cross_marks()
        self.query_one(BuildupPlot).set_plan(plan)
        self.query_one(TimingPanel).show(plan)
        self.query_one(ModePanel).show(plan)
        self.query_one(ContrastPanel).show(plan)
        self.query_one(ChecksPanel).show(plan)
        self.query_one(SpectrumPanel).show(plan)
        self._update_summary()
        self.last_plan_seconds = time.perf_counter() - started
        if self.trace_result is not None:
            self._show_trace()
            self._schedule_refit()

    def _plan_failed(self, gen: int, exc: Exception) -> None:
        if gen != self.generation:
            return
        errors = exc.errors if isinstance(exc, InputErrors) else [exc]
        self.input_problems = [e.one_line() if isinstance(e, InputError) else str(e)
                               for e in errors]
        self._clear_cross_marks()
        for err in errors:
            path = err.path if isinstance(err, InputError) else ""
            if path:  # kept also for rows not on screen yet (an element editor opening)
                self.cross_marked.setdefault(path, _reason(err))
            for row in self._rows(path):
                if row.reason is None:
                    row.set_error(self.cross_marked[path])
        if isinstance(exc, PlanError):
            self.input_problems = [f"cannot plan: {exc}"]
        extra = [("error", f"✗ {p}") for p in self.input_problems]
        if self.plan is not None:
            self.query_one(ChecksPanel).show(self.plan, extra)
        else:
            self.query_one(ChecksPanel).show_text(Text("\n".join(t for _, t in extra)))
        self._update_summary()

    def _plan_crashed(self, gen: int, exc: Exception) -> None:
        if gen != self.generation:
            return
        self.notify(f"internal error while planning (a bug in regentime, please report it with "
                    f"the cavity file): {type(exc).__name__}: {exc}", severity="error",
                    timeout=12)
        self._plan_failed(gen, PlanError(f"internal error: {type(exc).__name__}: {exc}"))

    def _rows(self, path: str) -> list[FieldRow]:
        rows = [r for r in self.screen.query(FieldRow) if r.path == path]
        if self.screen is not self.screen_stack[0]:
            rows += [r for r in self.screen_stack[0].query(FieldRow) if r.path == path]
        return rows

    def _clear_cross_marks(self) -> None:
        for path, reason in list(self.cross_marked.items()):
            for row in self._rows(path):
                if row.reason == reason:
                    row.set_error(None)
        self.cross_marked.clear()

    # ---- editing ---------------------------------------------------------------------------
    def on_field_row_edited(self, event: FieldRow.Edited) -> None:
        event.stop()
        if self.doc is None:
            return
        text = event.text.strip()
        current = self.doc.get(event.path)
        if not text and (current is None or isinstance(current, (dict, list))):
            event.row.set_error(None)
            return
        if text and shown(current) == text and event.row.reason is None:
            return
        try:
            if text:
                self.doc.set(event.path, text)
            else:  # an emptied box removes the key: its default applies again
                self.doc.delete(event.path)
        except InputError as exc:
            event.row.set_error("required: type a value (this key cannot be removed)"
                                if not text and exc.value == "" else _reason(exc))
            return
        event.row.set_error(None)
        if event.path == "dump":
            self.override = None
        self._after_edit(elements=event.path.startswith("cavity"))
        self.query_one(ParameterEditor).refresh_hints(self.doc, event.path)

    def _after_edit(self, elements: bool = False) -> None:
        self._update_title()
        if elements:
            self.call_later(self.query_one(ElementList).load, self.doc)
        self.request_plan()

    async def on_element_list_action(self, event: ElementList.Action) -> None:
        event.stop()
        if self.doc is None:
            return
        i = event.index
        try:
            if event.action == "add":
                where = f"after element {i}" if i >= 0 else "at the start"
                self.push_screen(KindScreen(_kinds(), where), lambda k: self._add(k, i + 1))
                return
            if i < 0:
                return
            if event.action == "edit":
                self.push_screen(ElementScreen(self.doc, i), self._after_element_screen)
                return
            if event.action == "remove":
                self.doc.remove_element(i)
                keep = i
            elif event.action in ("up", "down"):
                self.doc.move_element(i, -1 if event.action == "up" else 1)
                keep = i + (-1 if event.action == "up" else 1)
            else:
                return
        except InputError as exc:
            self.notify(exc.one_line(), severity="error")
            return
        await self.query_one(ElementList).load(self.doc, keep=keep)
        self._update_title()
        self.request_plan()

    def _add(self, kind: Optional[str], index: int) -> None:
        if kind is None or self.doc is None:
            return
        try:
            self.doc.insert_element(index, kind)
        except InputError as exc:
            self.notify(exc.one_line(), severity="error")
            return
        self._update_title()
        self.call_later(self.query_one(ElementList).load, self.doc, index)
        self.request_plan()
        self.push_screen(ElementScreen(self.doc, index), self._after_element_screen)

    def _after_element_screen(self, _: Any = None) -> None:
        self.call_later(self.query_one(ElementList).load, self.doc)
        self.query_one(ElementList).focus()

    # ---- the switch-out round trip ----------------------------------------------------------
    def on_buildup_plot_nudge(self, event: BuildupPlot.Nudge) -> None:
        self.action_switch_out("earlier" if event.delta < 0 else "later")

    def action_switch_out(self, how: str) -> None:
        if self.plan is None:
            self.notify("no valid plan yet", severity="warning")
            return
        b = self.plan.buildup
        top = len(b.output) - 1
        now = self.override if isinstance(self.override, int) else b.dump_round_trip
        if how == "earlier":
            choice: Any = max(1, now - 1)
        elif how == "later":
            choice = min(top, now + 1)
        elif how == "peak":
            choice = "auto"
        else:
            choice = "steady"
        file_value = self.doc.get("dump", "auto") if self.doc else "auto"
        self.override = None if str(file_value) == str(choice) else choice
        self.request_plan()

    def action_write_dump(self) -> None:
        if self.doc is None or self.plan is None:
            return
        value = self.override if self.override is not None else self.doc.get("dump")
        if value is None:
            self.notify("the file already uses the default (auto: peak output)")
            return
        try:
            self.doc.set("dump", value)
        except InputError as exc:
            self.notify(exc.one_line(), severity="error")
            return
        self.override = None
        row = self.query_one(ParameterEditor).row("dump")
        if row is not None:
            row.set_value(shown(self.doc.get("dump")))
        self.notify(f"dump: {value} written to the document (ctrl+s saves the file)")
        self._after_edit()

    # ---- view toggles ------------------------------------------------------------------------
    def action_toggle_log(self) -> None:
        plot = self.query_one(BuildupPlot)
        plot.log_scale = not plot.log_scale

    def action_toggle_sensitivity(self) -> None:
        plot = self.query_one(BuildupPlot)
        plot.show_sensitivity = not plot.show_sensitivity

    def action_stability_map(self) -> None:
        if self.plan is None:
            self.notify("no valid plan yet", severity="warning")
            return
        from regentime.tui.stability_screen import StabilityScreen

        self.push_screen(StabilityScreen(self.plan.cavity, self.plan.dump_round_trip,
                                         self.plan.optics))

    def action_toggle_notes(self) -> None:
        panel = self.query_one(TimingPanel)
        panel.notes = not panel.notes
        if self.plan is not None:
            panel.show(self.plan)

    def action_toggle_editor(self) -> None:
        editor = self.query_one(ParameterEditor)
        editor.display = not editor.display
        if not editor.display:
            self.query_one(BuildupPlot).focus()

    def action_focus_plot(self) -> None:
        self.query_one(BuildupPlot).focus()

    def action_help(self) -> None:
        keys = [("main keys", [(kd, d) for _, _, _, d, kd, _ in KEYS])]
        self.push_screen(HelpScreen(keys + OTHER_KEYS, CAUTION))

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        yield from super().get_system_commands(screen)
        for _, action, _, description, key, _ in KEYS:
            yield SystemCommand(description, f"key {key}",
                                lambda a=action: self.run_action(a))




def _kinds() -> list[str]:
    from regentime.fileformat.schema import ELEMENT_KINDS

    return list(ELEMENT_KINDS)


def _reason(exc: Exception) -> str:
    if isinstance(exc, InputError):
        text = exc.one_line()
        prefix = f"{exc.path}: "
        return text.split(prefix, 1)[1] if prefix in text and exc.path else text
    return str(exc)
