"""Writing a result file safely (ground level: every layer above input may use it).

A regular file (or a new one) is replaced atomically: the data goes to a temporary file in
the same folder, is flushed to disk, and is renamed over the target, so a reader never sees
half a file and a failure leaves the old file untouched.  A character device (``/dev/null``,
a terminal) or a FIFO cannot be renamed over without destroying it, so those are written
straight into; a FIFO is opened without blocking, so a FIFO that no process reads is an
error at once instead of a hang.  Any other special file (a socket, a block device) and a
folder are refused.  Every failure is an :class:`OutputError` (exit 2) naming the path.
"""

from __future__ import annotations

import errno
import os
import stat
import tempfile

from regentime.errors import RegentimeError, escape_text, shorten

_SHOWN = 80


def shown_path(path: str) -> str:
    """``path`` quoted for one line: control characters escaped, long paths shortened."""
    return "'" + shorten(escape_text(str(path)), _SHOWN) + "'"


class OutputError(RegentimeError, OSError):
    """A result could not be written: the path and the reason (exit 2, the user's to fix).

    Also an ``OSError``, so code that handles file errors (the TUI's save) handles it too.
    """

    exit_code = 2

    def __init__(self, path: str, reason: str) -> None:
        self.path = path
        self.reason = reason
        super().__init__(f"cannot write {shown_path(path)}: {reason}")


def _reason(exc: OSError) -> str:
    return (exc.strerror or type(exc).__name__).lower()


def write_atomic(path: str, data: str | bytes) -> None:
    """Write ``data`` to ``path``: atomically for a regular file, directly into a device or FIFO.

    Raises :class:`OutputError` for a folder, a missing folder, a socket or block device, a
    FIFO without a reader, a full device, missing permissions and any other ``OSError``.
    """
    payload = data.encode("utf-8") if isinstance(data, str) else data
    try:
        info = os.stat(path)
    except FileNotFoundError:
        info = None
    except OSError as exc:  # a symlink loop, a name too long, a path through a file
        raise OutputError(path, _reason(exc)) from None
    if info is not None and stat.S_ISDIR(info.st_mode):
        raise OutputError(path, "it is a folder; give a file name")
    if info is not None and (stat.S_ISCHR(info.st_mode) or stat.S_ISFIFO(info.st_mode)):
        _write_into(path, payload, fifo=stat.S_ISFIFO(info.st_mode))
        return
    if info is not None and not stat.S_ISREG(info.st_mode):
        raise OutputError(path, "it is a special file (socket or block device); refused")
    _replace(path, payload, existing=info is not None)


def _write_into(path: str, payload: bytes, *, fifo: bool) -> None:
    """Write into a character device or FIFO in place (never replace it)."""
    flags = os.O_WRONLY | (os.O_NONBLOCK if fifo else 0)
    try:
        fd = os.open(path, flags)
    except OSError as exc:
        if fifo and exc.errno == errno.ENXIO:
            raise OutputError(path, "no process is reading this FIFO") from None
        raise OutputError(path, _reason(exc)) from None
    try:
        if fifo:
            os.set_blocking(fd, True)
        view = memoryview(payload)
        while view:
            written = os.write(fd, view)
            view = view[written:]
    except OSError as exc:
        raise OutputError(path, _reason(exc)) from None
    finally:
        os.close(fd)


def _replace(path: str, payload: bytes, *, existing: bool) -> None:
    """Temporary file in the target's folder, fsync, keep the mode, rename over the target."""
    import shutil

    real = os.path.realpath(path)
    folder = os.path.dirname(real) or "."
    if not os.path.isdir(folder):
        raise OutputError(path, f"the folder {shown_path(folder)} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=".regentime-", dir=folder)
    except OSError as exc:
        raise OutputError(path, _reason(exc)) from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(payload)
            fh.flush()
            os.fsync(fh.fileno())
        if existing:
            shutil.copymode(real, tmp)
        else:
            os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, real)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise OutputError(path, _reason(exc)) from None
        raise


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask
