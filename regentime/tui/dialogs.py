"""Small modal dialogs: a question with buttons, a file name, the kind of a new element."""

from __future__ import annotations

from typing import Optional, Sequence

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, OptionList, Static

_CSS = """
{name} {{ align: center middle; }}
{name} > Vertical {{ width: 72; max-width: 95%; height: auto; max-height: 90%;
    border: thick $accent; background: $surface; padding: 1 2; }}
{name} .question {{ margin: 0 0 1 0; }}
{name} Horizontal {{ height: auto; align: center middle; }}
{name} Button {{ margin: 0 1; min-width: 10; }}
{name} .hint {{ color: $text-muted; }}
"""


class ConfirmScreen(ModalScreen[str]):
    """A question; dismisses with the id of the chosen answer (escape: the last answer)."""

    DEFAULT_CSS = _CSS.format(name="ConfirmScreen")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, question: str, answers: Sequence[tuple[str, str]]) -> None:
        super().__init__()
        self.question = question
        self.answers = list(answers)

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(self.question, classes="question")
            with Horizontal():
                for i, (key, label) in enumerate(self.answers):
                    yield Button(label, id=f"answer-{key}",
                                 variant="primary" if i == 0 else "default")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(str(event.button.id).removeprefix("answer-"))

    def action_cancel(self) -> None:
        self.dismiss(self.answers[-1][0])


class _FormDialog:
    """OK / Cancel handling shared by the dialogs with input boxes: enter or OK calls
    ``_done()``, Cancel or escape dismisses with None."""

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._done()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "ok":
            self._done()
        else:
            self.dismiss(None)

    def action_cancel(self) -> None:
        self.dismiss(None)


class PathScreen(_FormDialog, ModalScreen[Optional[str]]):
    """Ask for a file name (save as, export); dismisses with it, or None on escape."""

    DEFAULT_CSS = _CSS.format(name="PathScreen")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, value: str, hint: str = "") -> None:
        super().__init__()
        self.title_text = title
        self.value = value
        self.hint = hint

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(self.title_text, classes="question")
            yield Input(self.value, id="path")
            if self.hint:
                yield Static(self.hint, classes="hint")
            with Horizontal():
                yield Button("OK", id="ok", variant="primary")
                yield Button("Cancel", id="cancel")

    def _done(self) -> None:
        text = self.query_one("#path", Input).value.strip()
        self.dismiss(text or None)



class KindScreen(ModalScreen[Optional[str]]):
    """Pick the kind of a new cavity element."""

    DEFAULT_CSS = _CSS.format(name="KindScreen") + "KindScreen OptionList { height: auto; }"
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, kinds: Sequence[str], where: str) -> None:
        super().__init__()
        self.kinds = list(kinds)
        self.where = where

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(f"Add which element {self.where}? (enter picks, escape cancels)",
                         classes="question")
            yield OptionList(*[k.replace("_", " ") for k in self.kinds], id="kinds")

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(self.kinds[event.option_index])

    def action_cancel(self) -> None:
        self.dismiss(None)


class TraceScreen(_FormDialog, ModalScreen[Optional[tuple]]):
    """Ask for a photodiode trace file and, optionally, its channel; dismisses with
    (path, channel or None), or None on escape."""

    DEFAULT_CSS = _CSS.format(name="TraceScreen") + "TraceScreen Input { margin: 0 0 1 0; }"
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, path: str = "", channel: str = "") -> None:
        super().__init__()
        self.path = path
        self.channel = channel

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static("Load a photodiode trace of the build-up:", classes="question")
            yield Input(self.path, id="path", placeholder="scope file: .csv, .txt, .tsv, .npy, .npz")
            yield Static("Channel (a column name or its number among the signal columns; empty: "
                         "a photodiode column, else the first):", classes="hint")
            yield Input(self.channel, id="channel", placeholder="empty: automatic")
            yield Static("The fit runs in the background; the result is overlaid on the "
                         "build-up plot. Apply a changed switch-out at low pump power first.",
                         classes="hint")
            with Horizontal():
                yield Button("Load", id="ok", variant="primary")
                yield Button("Cancel", id="cancel")

    def _done(self) -> None:
        path = self.query_one("#path", Input).value.strip()
        channel = self.query_one("#channel", Input).value.strip()
        self.dismiss((path, channel or None) if path else None)

