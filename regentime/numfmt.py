"""The one number formatter of the program, and the one JSON rule for non-finite floats.

Ground level: input, planning, reports and front ends may use it; physics does not need it.

- :func:`eng` writes a number in engineering notation with an SI prefix (``3.4 ns``).
- :func:`ns` writes a time in nanoseconds with 3 decimals (1 ps), as the setup card does.
- :func:`json_float` turns inf and NaN into ``None`` (JSON has no infinity).

Units in file values are parsed and written back by :mod:`regentime.units`, which uses the
file format's own unit tables; the text reports use these helpers.
"""

from __future__ import annotations

import math
from typing import Any, Optional

_PREFIX = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}


def eng(value: Any, unit: str = "", digits: int = 4, fixed_prefix: Optional[str] = None) -> str:
    """Engineering notation with an SI prefix: ``eng(3.4e-9, 's')`` -> ``'3.4 ns'``.

    ``digits`` significant digits (decimals with ``fixed_prefix``, which forces a prefix:
    ``"n"`` for a column of ns).  ``None`` and NaN -> ``'—'``; ±inf -> ``'∞'``/``'−∞'``.
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
    text = f"{scaled:.{digits}f}" if fixed_prefix is not None else f"{scaled:.{digits}g}"
    return f"{text} {_PREFIX[exp]}{unit}".rstrip()


def ns(value: Any, decimals: int = 3) -> str:
    """A time (s) in ns with ``decimals`` decimals (3: 1 ps): ``389.439 ns``; None/NaN -> ``—``."""
    v = finite_or_none(value)
    return "—" if v is None else f"{v * 1e9:.{decimals}f} ns"


def bench_time(value: Any) -> str:
    """A time (s) as a technician sets it on a delay generator: from 1 µs up in µs with 4
    decimals (``339.9345 µs``), below in ns with 3 decimals (``389.439 ns``); None/NaN -> ``—``."""
    v = finite_or_none(value)
    if v is None:
        return "—"
    if abs(v) >= 1e-6:
        return f"{v * 1e6:.4f} µs"
    return f"{v * 1e9:.3f} ns"


def finite_or_none(value: Any) -> Optional[float]:
    """``float(value)`` when it is a finite number, else ``None`` (also for non-numbers)."""
    try:
        v = float(value)
    except (TypeError, ValueError):
        return None
    return v if math.isfinite(v) else None


def json_float(value: float) -> Optional[float]:
    """A float for JSON: itself when finite, ``None`` (``null``) for inf and NaN."""
    v = float(value)
    return v if math.isfinite(v) else None


__all__ = ["bench_time", "eng", "ns", "finite_or_none", "json_float"]
