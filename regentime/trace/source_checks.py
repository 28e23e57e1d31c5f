"""Checks of what a user points the trace reader at, before and after reading it."""

from __future__ import annotations

import errno
import os
import stat

import numpy as np

from regentime.errors import InputError


def check_trace_path(path: str) -> None:
    """An existing regular file: a missing path, a symlink loop, a folder, a device, FIFO or
    socket is an :class:`InputError` naming it (exit 2)."""
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise InputError("SCOPE", path, "an existing trace file") from None
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            raise InputError("SCOPE", path, "a trace file (this path is a symlink loop)") from None
        raise InputError("SCOPE", path, f"a readable trace file ({(exc.strerror or '').lower()})") from None
    if stat.S_ISDIR(info.st_mode):
        raise InputError("SCOPE", path, "a trace file, not a folder")
    if not stat.S_ISREG(info.st_mode):
        raise InputError("SCOPE", path, "a regular trace file, not a device, FIFO or socket")


def check_finite_channel(name: str, values: np.ndarray, path: str) -> None:
    """Every sample of the chosen channel finite; else an :class:`InputError` naming the
    channel and the first bad row (1-based)."""
    bad = ~np.isfinite(values)
    if bad.any():
        row = int(np.argmax(bad))
        what = "every sample" if bad.all() else f"{int(bad.sum())} sample(s), the first at row {row + 1}"
        raise InputError(name, float(values[row]),
                         f"finite signal values ({what} of this channel is NaN or infinite)",
                         source=path)
