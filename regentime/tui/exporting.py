"""Exports from the TUI: the generator table (md/csv/json) and the build-up plot (png).

The same reports as the command line (setup card, plan JSON, build-up plot); files are
written atomically (temporary file + rename).
"""

from __future__ import annotations

import json
import os

from regentime.errors import InputError

FORMATS = {".md": "Markdown table", ".csv": "CSV table", ".json": "plan JSON",
           ".png": "build-up plot"}


def default_name(source: str | None, ext: str = ".md") -> str:
    stem = os.path.splitext(os.path.basename(source))[0] if source else "demo"
    return f"{stem}-setup{ext}"


def markdown(plan) -> str:
    """The setup card in Markdown, as ``regentime plan --format md`` writes it."""
    from regentime.reports.setup_card import setup_card_md

    return setup_card_md(plan)


def csv_text(plan) -> str:
    """The generator table with SI numbers, as ``regentime plan --format csv`` writes it."""
    from regentime.reports.setup_card import timing_csv

    return timing_csv(plan)


def json_text(plan) -> str:
    """The plan JSON, as ``regentime plan --format json`` writes it."""
    from regentime.reports.plan_json import plan_to_dict

    return json.dumps(plan_to_dict(plan), indent=2, ensure_ascii=False) + "\n"


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
        from regentime.reports.plots import plot_buildup

        plot_buildup(plan, path)
        return FORMATS[ext]
    text = {".md": markdown, ".csv": csv_text, ".json": json_text}[ext](plan)
    write_atomic(path, text)
    return FORMATS[ext]
