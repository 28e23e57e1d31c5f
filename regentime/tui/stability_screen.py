"""The stability view: the shot-to-shot period around the file's setting, the setting marked.

Drawn from :func:`regentime.planning.stability.local_map` (round trips N ± 20 against the
repetition rate ± 50 %), made in a thread worker; one character per map cell.
"""

from __future__ import annotations

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static
from textual.worker import get_current_worker

from regentime.numfmt import eng

# period code -> (character, style); codes as in StabilityMap.period
CELLS = {1: ("·", "green"), 2: ("2", "yellow"), 4: ("4", "dark_orange"), 8: ("8", "red"),
         16: ("#", "red"), 0: ("≈", "bold red"), -1: (" ", ""), -2: ("?", "dim")}
LEGEND = (("·", "green", "period 1 (stable)"), ("2", "yellow", "period 2"),
          ("4", "dark_orange", "period 4"), ("8", "red", "8"), ("#", "red", "16"),
          ("≈", "bold red", "irregular"), ("◉", "bold reverse", "the file's setting"))


def render_map(m) -> Text:
    """The map as text: N upwards, repetition rate to the right, the file's point as ◉."""
    text = Text(no_wrap=True, overflow="crop")
    fi, fj = m.file_point if m.file_point else (None, None)
    rates = m.rates_Hz
    for i in range(len(m.round_trips) - 1, -1, -1):
        text.append(f"N {int(m.round_trips[i]):>4} │", style="dim")
        for j in range(m.period.shape[1]):
            if i == fi and j == fj:
                text.append("◉", style="bold reverse")
                continue
            ch, st = CELLS.get(int(m.period[i, j]), ("?", "dim"))
            text.append(ch, style=st or None)
        text.append("\n")
    width = m.period.shape[1]
    text.append(" " * 7 + "└" + "─" * width + "\n", style="dim")
    lo, hi = eng(rates[0], "Hz", 3), eng(rates[-1], "Hz", 3)
    mid = eng(rates[fj], "Hz", 4) if fj is not None else ""
    axis = [" "] * (width + 8)
    for pos, label in ((8, lo), (8 + (fj or 0) - len(mid) // 2, mid), (8 + width - len(hi), hi)):
        pos = max(0, min(len(axis) - len(label), pos))
        axis[pos:pos + len(label)] = list(label)
    text.append("".join(axis).rstrip() + "   repetition rate\n", style="dim")
    for ch, st, what in LEGEND:
        text.append(f" {ch} ", style=st)
        text.append(f"{what}  ")
    return text


class StabilityScreen(ModalScreen[None]):
    DEFAULT_CSS = """
    StabilityScreen { align: center middle; }
    StabilityScreen > Vertical { width: 100; max-width: 98%; height: auto; max-height: 95%;
        border: thick $accent; background: $surface; padding: 0 1; }
    StabilityScreen .title { text-style: bold; }
    StabilityScreen VerticalScroll { height: auto; max-height: 48; }
    """
    BINDINGS = [Binding("escape,m,q", "close", "Close")]

    def __init__(self, cavity, round_trip: int, optics=None) -> None:
        super().__init__()
        self.cavity = cavity
        self.round_trip = round_trip
        self.optics = optics
        self.map = None

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(f"Stability around the setting: switch-out after {self.round_trip}, "
                         f"{eng(self.cavity.repetition_rate, 'Hz', 4)}   (escape closes)",
                         classes="title")
            with VerticalScroll():
                yield Static("computing the map…", id="map")

    def on_mount(self) -> None:
        self._make_map()

    @work(thread=True, exclusive=True, exit_on_error=False)
    def _make_map(self) -> None:
        from regentime.planning.stability import local_map

        worker = get_current_worker()
        try:
            m = local_map(self.cavity, self.round_trip, optics=self.optics)
        except Exception as exc:  # noqa: BLE001 - shown in the view, never a crash
            if not worker.is_cancelled:
                self.app.call_from_thread(self._show_error, exc)
            return
        if not worker.is_cancelled:
            self.app.call_from_thread(self._show, m)

    def _show(self, m) -> None:
        self.map = m
        self.query_one("#map", Static).update(render_map(m))

    def _show_error(self, exc: Exception) -> None:
        msg = exc.one_line() if hasattr(exc, "one_line") else f"{type(exc).__name__}: {exc}"
        self.query_one("#map", Static).update(Text(f"no map: {msg}", style="red"))

    def action_close(self) -> None:
        self.dismiss(None)
