"""Options and output handling shared by every command (same behaviour everywhere)."""

from __future__ import annotations

import argparse
import sys

from regentime.atomic_write import write_atomic

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


def emit(args: argparse.Namespace, text: str) -> None:
    """Print ``text`` or write it to ``--output``."""
    from regentime.errors import terminal_safe

    if not text.endswith("\n"):
        text += "\n"
    text = terminal_safe(text)  # a name from the file can never drive the terminal
    out = getattr(args, "output", None)
    if out:
        write_atomic(out, text)
    else:
        sys.stdout.write(text)
