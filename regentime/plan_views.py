"""What a :class:`~regentime.planning.plan.Plan` shows in a notebook: JSON dict, setup card,
plots.  Each method imports its report module when called, so planning stays free of reports
at import time and ``import regentime`` stays cheap."""

from __future__ import annotations

from typing import Any


class PlanViews:
    """Mixed into ``Plan``: ``to_dict``, ``to_json``, ``setup_card``, the Jupyter reprs, plots."""

    def to_dict(self) -> dict:
        """Exactly what ``regentime plan --format json`` prints (SI units, unit in each key)."""
        from regentime.reports.plan_json import plan_to_dict

        return plan_to_dict(self)

    def to_json(self) -> str:
        from regentime.reports.plan_json import plan_to_json

        return plan_to_json(self)

    def setup_card(self, fmt: str = "text") -> str:
        """The printable setup card (``text`` or ``md``), as ``regentime plan`` prints it."""
        from regentime.reports import setup_card

        return setup_card.setup_card_md(self) if fmt == "md" else setup_card.setup_card_text(self)

    def _repr_markdown_(self) -> str:
        return self.setup_card("md")

    def plot_buildup(self, ax: Any = None):
        """Energy per round trip on a matplotlib Axes (a new figure when ``ax`` is None)."""
        from regentime.reports.plots import draw_buildup

        return draw_buildup(self, ax)

    def plot_contrast(self, ax: Any = None):
        """Satellite pulses E/E_main against time from the main pulse, on an Axes."""
        from regentime.reports.plots import draw_contrast

        return draw_contrast(self, ax)


__all__ = ["PlanViews"]
