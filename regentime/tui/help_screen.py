"""The help screen: every key, what each region shows, and the safety caution."""

from __future__ import annotations

from typing import Sequence

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

REGIONS = (
    ("top bar", "file name (and 'modified' when there are unsaved edits), round-trip time, "
                "optical path, the switch-out round trip and how it was chosen, output energy, "
                "extraction efficiency"),
    ("parameters (left)", "the file's values grouped as the file is: general, seed, gain, pump, "
                          "switch, cables, outputs (generator, scope, cleaner, checks when the "
                          "file has them), then the cavity elements. Type a value with its unit; "
                          "a refused value is marked with the reason and the last valid plan "
                          "stays on screen. Empty boxes show the default; typing adds the key."),
    ("build-up", "pulse energy in the cavity after each round trip (log or linear), the chosen "
                 "switch-out round trip (solid line), the round trip of peak output (dashed); "
                 "on demand the output's sensitivity to pump and seed energy."),
    ("switching and generator table", "Pockels-cell switch-on and switch-off windows, edges, "
                                      "gate width, jitter margin in ns and in sigmas; the "
                                      "delay-generator table as `regentime plan` prints it, a "
                                      "setting that cannot be met in red with its reason."),
    ("contrast", "nearest and worst pre-pulse, worst post-pulse (and with the cleaner cell "
                 "when the file has one), as energy ratios to the main pulse."),
    ("checks", "damage fluence and intensity, B-integral, gain, windows and timing problems: "
               "errors first (✗), then warnings (!), then notes (·)."),
    ("caution", "the safety reminder; the full text is below."),
    ("stability map (m)", "the shot-to-shot period for round trips N ± 20 and the repetition "
                          "rate ± 50 % around the setting, the setting marked ◉; period 2 and "
                          "beyond mean alternating or irregular output energies."),
)


class HelpScreen(ModalScreen[None]):
    DEFAULT_CSS = """
    HelpScreen { align: center middle; }
    HelpScreen > Vertical { width: 110; max-width: 98%; height: 95%; border: thick $accent;
        background: $surface; padding: 0 1; }
    HelpScreen .title { text-style: bold; }
    """
    BINDINGS = [Binding("escape,f1,q,question_mark", "close", "Close help")]

    def __init__(self, keys: Sequence[tuple[str, Sequence[tuple[str, str]]]], caution: str) -> None:
        super().__init__()
        self.keys = keys
        self.caution = caution

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static("regentime terminal planner - help   (escape closes)", classes="title")
            with VerticalScroll(id="help-body"):
                yield Static(self._keys_table(), id="help-keys")
                yield Static(self._regions_table(), id="help-regions")
                yield Static(Text(self.caution, style="bold yellow"), id="help-caution")

    def _keys_table(self) -> Table:
        table = Table(title="Keys", title_justify="left", expand=True, show_header=False,
                      box=None, padding=(0, 1))
        table.add_column("key", style="bold cyan", no_wrap=True, width=16)
        table.add_column("what it does", ratio=1)
        for group, rows in self.keys:
            table.add_row(Text(group, style="bold"), "")
            for key, what in rows:
                table.add_row(key, what)
        return table

    def _regions_table(self) -> Table:
        table = Table(title="Regions", title_justify="left", expand=True, show_header=False,
                      box=None, padding=(0, 1))
        table.add_column("region", style="bold", no_wrap=True, width=22)
        table.add_column("what it shows", ratio=1)
        for name, what in REGIONS:
            table.add_row(name, what)
        return table

    def action_close(self) -> None:
        self.dismiss(None)
