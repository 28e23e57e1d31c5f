"""Plain table rendering shared by every report: aligned text, Markdown and CSV."""

from __future__ import annotations

import csv
import io
from typing import Iterable, Sequence


def text_table(headers: Sequence[str], rows: Iterable[Sequence[object]], align: str | None = None,
               indent: str = "  ") -> str:
    """Aligned plain-text table.  ``align``: one char per column, 'l' or 'r' (default: first l)."""
    rows = [[("" if c is None else str(c)) for c in r] for r in rows]
    headers = [str(h) for h in headers]
    n = len(headers)
    align = align or ("l" + "r" * (n - 1))
    widths = [max([len(headers[i])] + [len(r[i]) for r in rows]) for i in range(n)]

    def fmt(cells):
        parts = [c.ljust(widths[i]) if align[i] == "l" else c.rjust(widths[i]) for i, c in enumerate(cells)]
        return (indent + "  ".join(parts)).rstrip()

    lines = [fmt(headers), indent + "  ".join("-" * w for w in widths)]
    lines += [fmt(r) for r in rows]
    return "\n".join(lines)


def md_table(headers: Sequence[str], rows: Iterable[Sequence[object]], align: str | None = None) -> str:
    rows = [[("" if c is None else str(c)).replace("|", "\\|") for c in r] for r in rows]
    n = len(headers)
    align = align or ("l" + "r" * (n - 1))
    sep = ["---:" if a == "r" else ":---" for a in align]
    lines = ["| " + " | ".join(headers) + " |", "| " + " | ".join(sep) + " |"]
    lines += ["| " + " | ".join(r) + " |" for r in rows]
    return "\n".join(lines)


def csv_table(headers: Sequence[str], rows: Iterable[Sequence[object]]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(headers)
    for r in rows:
        w.writerow(["" if c is None else (repr(c) if isinstance(c, float) else c) for c in r])
    return buf.getvalue()
