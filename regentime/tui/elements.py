"""The cavity's element list: one line per element, as the file writes it.

Keys (when the list has focus): ``+``/insert add after the highlighted element,
``−``/delete remove it, shift+↑/↓ move it, enter edit its values.  The list only reports
the wish (:class:`ElementList.Action`); the app edits the document.
"""

from __future__ import annotations

from textual.binding import Binding
from textual.message import Message
from textual.widgets import Label, ListItem, ListView

from regentime.tui.view import element_summary


def element_kinds(doc) -> list[tuple[str, object]]:
    """(kind, fields) of every element in the document, in file order."""
    items = doc.get("cavity") or []
    out = []
    for item in items if isinstance(items, list) else []:
        if isinstance(item, dict) and len(item) == 1:
            kind, fields = next(iter(item.items()))
            out.append((str(kind), fields))
        else:
            out.append(("?", item))
    return out


class ElementList(ListView):
    DEFAULT_CSS = """
    ElementList { height: auto; max-height: 16; }
    ElementList > ListItem { height: 1; }
    ElementList > ListItem Label { text-wrap: nowrap; text-overflow: ellipsis; }
    """
    BINDINGS = [
        Binding("plus,insert", "act('add')", "Add element", key_display="+"),
        Binding("minus,delete", "act('remove')", "Remove element", key_display="−"),
        Binding("shift+up", "act('up')", "Move up", key_display="⇧↑"),
        Binding("shift+down", "act('down')", "Move down", key_display="⇧↓"),
        Binding("enter", "select_cursor", "Edit element", key_display="⏎"),
    ]

    class Action(Message):
        def __init__(self, action: str, index: int) -> None:
            self.action = action
            self.index = index
            super().__init__()

    async def load(self, doc, keep: int | None = None) -> None:
        keep = self.index if keep is None else keep
        await self.clear()
        items = [ListItem(Label(f"{i:>2} {element_summary(kind, fields)}"))
                 for i, (kind, fields) in enumerate(element_kinds(doc))]
        await self.extend(items)
        if items:
            self.index = max(0, min(keep or 0, len(items) - 1))

    def action_act(self, action: str) -> None:
        self.post_message(self.Action(action, self.index if self.index is not None else -1))

    def on_list_view_selected(self, event: ListView.Selected) -> None:
        event.stop()
        self.post_message(self.Action("edit", self.index if self.index is not None else -1))
