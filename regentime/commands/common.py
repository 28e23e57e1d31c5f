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


def add_dump_option(parser: argparse.ArgumentParser) -> None:
    """``--dump N|auto|steady``: the same spelling and help in every command."""
    parser.add_argument("--dump", metavar="N|auto|steady",
                        help="override the file's dump rule: a round trip N, auto or steady")


def add_global_options(parser: argparse.ArgumentParser, top: bool = False) -> None:
    """``-q``, ``-v`` and ``--strict`` before or after the command (after it, the command's
    value only replaces the top-level one when given: SUPPRESS keeps the default out)."""
    default = {} if top else {"default": argparse.SUPPRESS}
    parser.add_argument("-q", "--quiet", action="store_true", **default,
                        help="results only: no notes or progress on stderr (the safety caution stays)")
    parser.add_argument("-v", "--verbose", action="store_true", **default,
                        help="show the traceback of an internal error")
    parser.add_argument("--strict", action="store_true", **default,
                        help="exit 3 when the plan has any warning")


def plan_exit(args: argparse.Namespace, plan) -> int:
    """0, or 3 when the plan cannot be met (or, with ``--strict``, has a warning)."""
    if plan.cannot_be_met:
        return 3
    if getattr(args, "strict", False) and any(c.level == "warning" for c in plan.checks):
        if not getattr(args, "quiet", False):
            print("strict: the plan has warnings (exit 3)", file=sys.stderr)
        return 3
    return 0
