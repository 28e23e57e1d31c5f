"""The TUI's cavity-mode panel: radius at the crystal, cell and polarizer, the stable pump range."""

from __future__ import annotations

from rich.text import Text

from regentime.tui.panels import ResultPanel


class ModePanel(ResultPanel):
    """Shows :func:`regentime.reports.mode_report.mode_lines` of the plan's cavity mode."""

    def show(self, plan) -> None:
        from regentime.reports.mode_report import mode_lines

        self.show_text(Text("\n".join(mode_lines(plan.cavity_mode))))
