"""Options and output handling shared by every command (same behaviour everywhere)."""

from __future__ import annotations

import argparse
import os
import sys
import tempfile

FORMATS = ("text", "json", "csv", "md")


def add_output_options(parser: argparse.ArgumentParser, plot: bool = False,
                       formats: tuple[str, ...] = FORMATS) -> None:
    """Add ``--format``, ``--output`` (and ``--plot`` for commands with a picture)."""
    parser.add_argument("--format", "-f", choices=formats, default="text",
                        help="output format (default: text)")
    parser.add_argument("--output", "-o", metavar="PATH",
                        help="write the result to PATH (atomically) instead of standard output")
    if plot:
        parser.add_argument("--plot", metavar="PATH.png",
                            help="also draw the picture to a PNG file (needs matplotlib)")


def add_file_argument(parser: argparse.ArgumentParser, optional: bool = False) -> None:
    if optional:
        parser.add_argument("file", nargs="?", metavar="FILE",
                            help="cavity file (YAML); without it, the built-in demo cavity")
    else:
        parser.add_argument("file", metavar="FILE", help="cavity file (YAML)")


def write_atomic(path: str, data: str | bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder, then rename.

    Nothing is left half-written: on any failure the temporary file is removed and the old
    file (if any) is untouched.  Permissions of an existing file are kept.
    """
    import shutil

    real = os.path.realpath(path)
    folder = os.path.dirname(real) or "."
    fd, tmp = tempfile.mkstemp(prefix=".regentime-", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data.encode("utf-8") if isinstance(data, str) else data)
            fh.flush()
            os.fsync(fh.fileno())
        if os.path.exists(real):
            shutil.copymode(real, tmp)
        else:
            os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, real)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def emit(args: argparse.Namespace, text: str) -> None:
    """Print ``text`` or write it to ``--output``."""
    if not text.endswith("\n"):
        text += "\n"
    out = getattr(args, "output", None)
    if out:
        from regentime.errors import InputError

        folder = os.path.dirname(os.path.abspath(out))
        if not os.path.isdir(folder):
            raise InputError("--output", out, "a path in an existing folder")
        write_atomic(out, text)
    else:
        sys.stdout.write(text)
