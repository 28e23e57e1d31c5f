"""Plain table rendering shared by every report: aligned text, Markdown and CSV."""

from __future__ import annotations

import csv
import io
import math
from typing import Iterable, Sequence

_PREFIX = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}


def eng(value, unit: str = "", digits: int = 4, fixed_prefix: str | None = None) -> str:
    """Engineering notation with an SI prefix: eng(3.4e-9, 's') -> '3.4 ns'.

    ``digits`` significant digits; ``fixed_prefix`` forces a prefix ("n" for a column of ns).
    None, NaN -> '—'.
    """
    if value is None:
        return "—"
    v = float(value)
    if math.isnan(v):
        return "—"
    if math.isinf(v):
        return ("∞" if v > 0 else "−∞") + (f" {unit}" if unit else "")
    if fixed_prefix is not None:
        exp = {p: e for e, p in _PREFIX.items()}[fixed_prefix]
    elif v == 0:
        exp = 0
    else:
        exp = int(math.floor(math.log10(abs(v)) / 3) * 3)
        exp = max(-15, min(9, exp))
    scaled = v / 10 ** exp
    if fixed_prefix is not None:
        text = f"{scaled:.{digits}f}"
    else:
        text = f"{scaled:.{digits}g}"
    return f"{text} {_PREFIX[exp]}{unit}".rstrip()


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
