"""The result panels: switching and generator table, contrast, checks.  Text from tui.view."""

from __future__ import annotations

import math

from rich.text import Text
from textual.widgets import Static

from regentime.tui import view


class ResultPanel(Static):
    """A Static that asks for a new layout only when its height would change (a layout of the
    whole screen costs tens of milliseconds; most edits change numbers, not line counts)."""

    _height_key: tuple = ()

    def show_text(self, text: Text) -> None:
        width = max(1, self.content_size.width)
        key = (width, sum(max(1, math.ceil(len(line) / width)) for line in text.plain.split("\n")))
        self.update(text, layout=key != self._height_key)
        self._height_key = key

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
        if self.table is None:
            text.append(f"generator table: {view.NOT_YET}\n", style="dim")
        else:
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
