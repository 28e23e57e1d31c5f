"""The spectrum panel: gain narrowing, the shortest pulse and the ASE (shown with seed.bandwidth)."""

from __future__ import annotations

from rich.text import Text

from regentime.tui.panels import ResultPanel


class SpectrumPanel(ResultPanel):
    """Hidden until the plan has a spectrum (the file gives ``seed.bandwidth``)."""

    DEFAULT_CSS = """
    SpectrumPanel { height: auto; border: round $secondary 60%; padding: 0 1; display: none; }
    SpectrumPanel.shown { display: block; }
    """

    def on_mount(self) -> None:
        self.border_title = "spectrum and ASE"

    def show(self, plan) -> None:
        from regentime.reports.spectrum_report import spectrum_lines

        has = plan.spectrum is not None
        self.set_class(has, "shown")
        if has:
            self.show_text(Text("\n".join(spectrum_lines(plan)[1:])))  # self-lasing is in the checks
