"""The result panels: switching and generator table, contrast, checks.  Text from tui.view."""

from __future__ import annotations

from typing import Optional

from rich.text import Text
from textual.widgets import Static

from regentime.tui import view


class ResultPanel(Static):
    """A Static that redraws only when its text changed, and asks for a new layout of the
    screen only when its height changes (a layout costs several milliseconds; most edits
    change numbers, not line counts).

    The height is measured the way Textual lays the text out.  When new text is one line
    shorter than what is on screen (a message that wraps for some values and not for others),
    it is padded with an empty line instead: the box keeps its height, the screen its layout,
    and the panels below do not jump up and down while a value is being tuned.
    """

    SHRINK_PAD = 1  # lines of padding allowed before the box shrinks
    _shown: Optional[Text] = None
    _box: tuple = ()  # (width, lines) on screen

    def show_text(self, text: Text) -> None:
        width = self.content_size.width
        if text == self._shown and width == (self._box or (None,))[0]:
            return
        self._shown = text
        if width <= 0:  # not laid out yet: the first layout measures it
            self._box = ()
            self.update(text)
            return
        from textual.visual import visualize

        lines = visualize(self, text, markup=False).get_height(self.styles, width)
        if self._box and self._box[0] == width and 0 < self._box[1] - lines <= self.SHRINK_PAD:
            text = text.copy()
            text.append("\n" * (self._box[1] - lines))
            lines = self._box[1]
        box = (width, lines)
        self.update(text, layout=box != self._box)
        self._box = box

_LEVEL_STYLE = {"error": "bold red", "warning": "yellow", "info": ""}


class TimingPanel(ResultPanel):
    """Pockels-cell windows and the delay-generator table; a problem row in red with its reason."""

    notes = False  # show each row's note under it (key n)

    def show(self, plan) -> None:
        self.table = view.generator_table(plan)
        text = Text(no_wrap=False)
        for line in view.switching_lines(plan):
            text.append(line + "\n")
        text.append("\n")
        for line in self.table.header:
            text.append(line + "\n", style="bold")
        for line, note, problem in self.table.rows:
            text.append(line + "\n", style="bold red" if problem else None)
            if problem:
                text.append(f"   ↳ cannot be met: {problem}\n", style="red")
            if note and self.notes:
                text.append(f"   {note}\n", style="dim")
        text.rstrip()
        self.show_text(text)


class ContrastPanel(ResultPanel):
    def show(self, plan) -> None:
        self.show_text(Text("\n".join(view.contrast_lines(plan))))


class ChecksPanel(ResultPanel):
    def show(self, plan, extra: list[tuple[str, str]] | None = None) -> None:
        text = Text()
        lines = list(extra or []) + view.check_lines(plan)
        for i, (level, line) in enumerate(lines):
            text.append(line + ("\n" if i < len(lines) - 1 else ""), style=_LEVEL_STYLE.get(level))
        self.show_text(text)


class TracePanel(ResultPanel):
    """A loaded photodiode trace: measured round trip, length error, fit, suggested switch-out."""

    def show(self, lines: list[tuple[str, str]]) -> None:
        text = Text()
        for i, (style, line) in enumerate(lines):
            text.append(line + ("\n" if i < len(lines) - 1 else ""), style=style or None)
        self.show_text(text)
