"""Edit one cavity element: every key its kind has, validated as you type (applied live)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Static

from regentime.fileformat.schema import ELEMENTS
from regentime.tui.editor import _ordered, placeholder, shown, tooltip
from regentime.tui.field_row import FieldRow


class ElementScreen(ModalScreen[None]):
    """The keys of ``cavity[index]``; each change goes to the app like an editor change."""

    DEFAULT_CSS = """
    ElementScreen { align: center middle; }
    ElementScreen > Vertical { width: 76; max-width: 95%; height: auto; max-height: 90%;
        border: thick $accent; background: $surface; padding: 0 1; }
    ElementScreen VerticalScroll { height: auto; max-height: 24; }
    ElementScreen .title { text-style: bold; margin: 0 0 1 0; }
    ElementScreen .hint { color: $text-muted; }
    ElementScreen Button { margin: 1 0 0 0; }
    """
    BINDINGS = [Binding("escape", "close", "Close")]

    def __init__(self, doc, index: int) -> None:
        super().__init__()
        self.doc = doc
        self.index = index
        items = doc.get("cavity") or []
        item = items[index] if 0 <= index < len(items) else None
        self.kind = str(next(iter(item))) if isinstance(item, dict) and len(item) == 1 else "?"

    def compose(self) -> ComposeResult:
        section = ELEMENTS.get(self.kind)
        with Vertical():
            yield Static(f"cavity[{self.index}]: {self.kind.replace('_', ' ')}", classes="title")
            if section is None:
                yield Static("This entry is not an element the format knows; edit it in the file.")
            else:
                fields = self.doc.get(f"cavity[{self.index}].{self.kind}")
                with VerticalScroll():
                    for key in _ordered(section.fields, fields if isinstance(fields, dict) else
                                        {"length": fields} if fields not in (None, "") else {}):
                        spec = section.fields[key]
                        path = f"cavity[{self.index}].{self.kind}.{key}"
                        yield FieldRow(path, key.replace("_", " "), shown(self.doc.get(path)),
                                       placeholder(spec, path, self.doc),
                                       f"{path}: {tooltip(spec, path)}")
            yield Static("Changes apply as you type; invalid values are marked and not applied.",
                         classes="hint")
            yield Button("Close (esc)", id="close")

    def on_mount(self) -> None:
        rows = self.query(FieldRow)
        marks = self.app.cross_marked  # problems the whole file has now
        for row in rows:
            if row.path in marks and row.reason is None:
                row.set_error(marks[row.path])
        if rows:
            rows.first().input.focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(None)

    def action_close(self) -> None:
        self.dismiss(None)
