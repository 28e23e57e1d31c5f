"""One editable value of the cavity file: its key, an input box and, when invalid, the reason.

The row only reports what was typed (:class:`FieldRow.Edited`); the app applies it to the
document, which validates it, and tells the row whether it was accepted (:meth:`set_error`).
"""

from __future__ import annotations

from typing import Optional

from textual.app import ComposeResult
from textual.message import Message
from textual.widget import Widget
from textual.widgets import Input, Label, Static


class FieldRow(Widget):
    """``key  [value      ]`` on one line; the reason below it when the value is refused."""

    DEFAULT_CSS = """
    FieldRow { height: auto; layout: grid; grid-size: 2; grid-columns: 17 1fr; grid-rows: 1; }
    FieldRow .key { width: 17; color: $text-muted; text-overflow: ellipsis; text-wrap: nowrap; }
    FieldRow Input { height: 1; border: none; padding: 0 1; width: 1fr; }
    FieldRow Input:focus { border: none; background: $boost; }
    FieldRow.bad Input { background: $error 35%; }
    FieldRow.bad .key { color: $error; text-style: bold; }
    FieldRow .reason { color: $error; display: none; height: auto; padding: 0 0 0 2;
        column-span: 2; }
    FieldRow.bad .reason { display: block; }
    """

    class Edited(Message):
        """The text of the row's box changed (by the user)."""

        def __init__(self, row: "FieldRow", path: str, text: str) -> None:
            self.row = row
            self.path = path
            self.text = text
            super().__init__()

    def __init__(self, path: str, label: str, value: str, placeholder: str = "",
                 tooltip: str = "", **kw) -> None:
        super().__init__(**kw)
        self.path = path
        self.label = label
        self._value = value
        self._placeholder = placeholder
        self._tooltip = tooltip
        self.reason: Optional[str] = None

    def compose(self) -> ComposeResult:
        yield Label(self.label, classes="key")
        box = Input(self._value, placeholder=self._placeholder, compact=True)
        if self._tooltip:
            box.tooltip = self._tooltip
        yield box
        yield Static("", classes="reason")

    @property
    def input(self) -> Input:
        return self.query_one(Input)

    @property
    def value(self) -> str:
        return self.input.value

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self.post_message(self.Edited(self, self.path, event.value))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()

    def set_value(self, text: str) -> None:
        """Show ``text`` without reporting it as an edit."""
        box = self.input
        with box.prevent(Input.Changed):
            box.value = text
        self.set_error(None)

    def set_placeholder(self, text: str) -> None:
        """Change the grey text shown while the box is empty."""
        self._placeholder = text
        if self.is_mounted and self.input.placeholder != text:
            self.input.placeholder = text

    def set_error(self, reason: Optional[str]) -> None:
        """Mark the row invalid with ``reason`` (None: valid)."""
        if reason == self.reason:
            return  # nothing to redraw (most edits: valid before, valid after)
        self.reason = reason
        self.set_class(reason is not None, "bad")
        if self.is_mounted:
            self.query_one(".reason", Static).update("" if reason is None else f"↳ {reason}")
