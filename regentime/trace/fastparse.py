"""Optional fast parse of a trace's numeric block with pandas' C reader (the ``trace`` extra).

The reader (:mod:`regentime.trace.reader`) detects the layout itself (delimiter, decimal
comma, number of columns, byte offset of the first data row) and then hands only the numeric
block to :func:`parse_block`.  pandas (>= 3.1) tokenises in C and converts every field with
the fast_float algorithm, which rounds correctly like :func:`numpy.loadtxt` (both give the
nearest double to the decimal text), so the arrays are bit-for-bit those of the numpy path.

This module never decides that a file is bad.  Whenever pandas is missing or too old, raises,
returns a shape other than expected, or returns a value that is not finite, :func:`parse_block`
returns ``None`` and the reader runs its own exact path, which finds and names the bad line.
"""

from __future__ import annotations

import csv
from typing import Optional

import numpy as np

MIN_PANDAS = (3, 1)  # from 3.1 every float_precision mode uses fast_float (correctly rounded)
_CHUNK_ROWS = 1 << 20  # rows per pandas chunk: bounded scratch memory, few calls
_state: dict = {}


def available() -> bool:
    """True when pandas >= 3.1 can be imported (checked once, lazily)."""
    if "ok" not in _state:
        try:
            import pandas as pd

            parts = tuple(int(p) for p in pd.__version__.split(".")[:2])
            _state["ok"] = parts >= MIN_PANDAS
        except Exception:  # absent, broken or oddly versioned: the numpy path does the job
            _state["ok"] = False
    return _state["ok"]


def parse_block(path: str, offset: int, ncols: int, delimiter: Optional[str], decimal_comma: bool,
                rows_hint: int = 0, sample: bytes = b"") -> Optional[np.ndarray]:
    """Parse the numeric block of ``path`` from byte ``offset`` to the end.

    Returns a ``(ncols, n)`` float64 array whose rows (the file's columns) are contiguous, or
    ``None`` when the fast parser cannot vouch for the result (the caller then uses its exact
    path).  ``delimiter`` None means runs of whitespace.  Extra fields after the first
    ``ncols`` (a trailing delimiter) are ignored.  ``rows_hint`` sizes the output (it grows
    if short; pages of it never written are never resident).  ``sample``: the first data
    lines; whitespace-separated numbers with no tab among them are read with a single space
    as delimiter and ``skipinitialspace`` (measured about 1.6x faster than pandas' ``\\s+``
    mode; a tab further down makes that parse fail and the numpy path take over).

    One thread, pandas' reader in chunks of ``_CHUNK_ROWS`` rows copied into the output as
    they come: peak memory is the output plus one chunk, not twice the output.  (pandas'
    own multithreaded whole-file read was measured faster on an idle machine but held about
    4.5x the sample arrays at its peak; see docs/trace.md.)
    """
    if not available():
        return None
    import pandas as pd

    if delimiter is not None:
        sep = dict(sep=delimiter)
    elif b"\t" in sample or not sample:
        sep = dict(sep=r"\s+")
    else:
        sep = dict(sep=" ", skipinitialspace=True)
    cap = max(int(rows_hint), 1024)
    out = np.empty((ncols, cap))
    n = 0
    try:
        with open(path, "rb") as fh:
            fh.seek(offset)
            reader = pd.read_csv(
                fh, **sep, header=None,
                usecols=range(ncols), dtype=np.float64, engine="c",
                decimal="," if decimal_comma else ".", quoting=csv.QUOTE_NONE, na_filter=False,
                skip_blank_lines=True, chunksize=_CHUNK_ROWS, encoding="utf-8",
            )
            with reader:
                for frame in reader:
                    if frame.shape[1] != ncols:
                        return None
                    m = frame.shape[0]
                    if n + m > cap:  # the estimate was short: grow (one copy)
                        cap = max(int(cap * 1.25), n + m)
                        grown = np.empty((ncols, cap))
                        grown[:, :n] = out[:, :n]
                        out = grown
                    out[:, n:n + m] = frame.to_numpy(dtype=np.float64).T
                    n += m
    except Exception:  # any parse trouble: the exact path will name the line
        return None
    if n == 0:
        return None
    out = out[:, :n]
    if not np.isfinite(out).all():  # a short row (NaN), or nan/inf written in the file
        return None
    return out


def rows_estimate(head: bytes, data_offset: int, size: int) -> int:
    """Rows expected from the mean length of the data lines seen in ``head`` (+10 %)."""
    sample = head[data_offset:]
    cut = sample.rfind(b"\n")
    if cut <= 0:
        return 0
    lines = sample[: cut + 1].count(b"\n")
    mean = (cut + 1) / max(lines, 1)
    return int((size - data_offset) / mean * 1.1) + 16
