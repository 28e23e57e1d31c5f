"""Exports from the TUI: the generator table (md/csv/json) and the build-up plot (png).

Uses the reports layer (setup card, plan JSON, plot) when those modules are present; a format
whose report module is not in this build raises an error that says so.  Files are written
atomically (temporary file + rename).
"""

from __future__ import annotations

import importlib
import json
import math
import os

from regentime.errors import InputError
from regentime.planning.plan import CAUTION
from regentime.tui import view

FORMATS = {".md": "Markdown table", ".csv": "CSV table", ".json": "plan JSON",
           ".png": "build-up plot"}


def _optional(name: str):
    try:
        return importlib.import_module(name)
    except ModuleNotFoundError as exc:
        if exc.name == name:
            return None
        raise


def default_name(source: str | None, ext: str = ".md") -> str:
    stem = os.path.splitext(os.path.basename(source))[0] if source else "demo"
    return f"{stem}-setup{ext}"


def markdown(plan) -> str:
    card = _optional("regentime.reports.setup_card")
    fn = getattr(card, "setup_card_md", None) if card is not None else None
    if fn is not None:
        return fn(plan)
    from regentime.reports.tables import md_table

    lines = [f"# Setup: {plan.cavity.name}", "", view.summary_line(plan), ""]
    lines += [f"- {x}" for x in view.switching_lines(plan)]
    lines.append("")
    if plan.timing is None:
        lines.append(f"Generator table: {view.NOT_YET}")
    else:
        headers, cells = view.table_rows(plan)
        lines.append(md_table(headers, cells, align="llrrl"))
    lines += ["", "## Contrast", ""] + [f"- {x}" for x in view.contrast_lines(plan)]
    lines += ["", "## Checks", ""] + [f"- {c.level}: {c.name}: {c.message}" for c in plan.checks]
    lines += ["", f"> {CAUTION}", ""]
    return "\n".join(lines)


def csv_text(plan) -> str:
    """The generator table with SI numbers (delay_s, width_s) for spreadsheets."""
    if plan.timing is None:
        raise InputError("export", "csv", f"a plan with a generator table ({view.NOT_YET})")
    card = _optional("regentime.reports.setup_card")
    if card is not None and hasattr(card, "timing_csv"):
        return card.timing_csv(plan)  # the same CSV as `regentime plan --format csv`
    from regentime.reports.tables import csv_table

    rows = []
    for r in plan.timing.rows:
        width = getattr(r, "width", None)
        rows.append([r.output, r.drives, float(r.delay),
                     float(width) if width is not None and math.isfinite(float(width)) else "",
                     getattr(r, "note", "") or "", getattr(r, "problem", "") or ""])
    return csv_table(("output", "drives", "delay_s", "width_s", "note", "problem"), rows)


def json_text(plan) -> str:
    mod = _optional("regentime.reports.plan_json")
    if mod is None or not hasattr(mod, "plan_to_dict"):
        raise InputError("export", "json", "a build with regentime.reports.plan_json "
                         "(not in this build yet)")
    return json.dumps(mod.plan_to_dict(plan), indent=2, ensure_ascii=False) + "\n"


def export(plan, path: str) -> str:
    """Write ``plan`` to ``path`` in the format its extension names; returns what was written."""
    from regentime.atomic_write import write_atomic

    ext = os.path.splitext(path)[1].lower()
    folder = os.path.dirname(os.path.abspath(path))
    if ext not in FORMATS:
        raise InputError("export", path, "a file name ending in " + ", ".join(FORMATS))
    if not os.path.isdir(folder):
        raise InputError("export", path, "a path in an existing folder")
    if ext == ".png":
        plots = _optional("regentime.reports.plots")
        if plots is None or not hasattr(plots, "plot_buildup"):
            raise InputError("export", path, "a build with regentime.reports.plots "
                             "(not in this build yet)")
        plots.plot_buildup(plan, path)
        return FORMATS[ext]
    text = {".md": markdown, ".csv": csv_text, ".json": json_text}[ext](plan)
    write_atomic(path, text)
    return FORMATS[ext]
