"""Shown instead of the planner when the cavity file cannot be opened: the errors, and a way on."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Button, Footer, Static


class LoadErrorScreen(Screen[str]):
    """Dismisses with "demo" (open the built-in demo) or "quit"."""

    DEFAULT_CSS = """
    LoadErrorScreen { align: center middle; }
    LoadErrorScreen > Vertical { width: 100; max-width: 98%; height: auto; max-height: 95%;
        border: thick $error; padding: 1 2; }
    LoadErrorScreen .title { text-style: bold; color: $error; }
    LoadErrorScreen VerticalScroll { height: auto; max-height: 20; margin: 1 0; }
    LoadErrorScreen Horizontal { height: auto; align: center middle; }
    LoadErrorScreen Button { margin: 0 2; }
    """
    BINDINGS = [
        Binding("d", "choose('demo')", "Open the built-in demo"),
        Binding("f", "choose('edit')", "Fix it here"),
        Binding("q,escape", "choose('quit')", "Quit"),
    ]

    def __init__(self, path: str, lines: list[str], can_edit: bool = False) -> None:
        super().__init__()
        self.path = path
        self.lines = lines
        self.can_edit = can_edit

    def check_action(self, action: str, parameters: tuple) -> bool | None:
        if action == "choose" and parameters and parameters[0] == "edit":
            return self.can_edit
        return True

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(f"Cannot open {self.path}", classes="title")
            with VerticalScroll():
                yield Static("\n".join(self.lines), markup=False)
            yield Static("The file was not changed. "
                         + ("Fix the marked values here (nothing is saved until ctrl+s), "
                            if self.can_edit else "Fix it in an editor and start again, ")
                         + "or look around with the built-in demo (an invented scenario).")
            with Horizontal():
                if self.can_edit:
                    yield Button("Fix it here (f)", id="edit", variant="primary")
                yield Button("Open the built-in demo (d)", id="demo",
                             variant="default" if self.can_edit else "primary")
                yield Button("Quit (q)", id="quit")
        yield Footer()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(str(event.button.id))

    def action_choose(self, what: str) -> None:
        self.dismiss(what)
