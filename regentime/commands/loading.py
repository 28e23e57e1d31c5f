"""Load the cavity a command names (or the built-in demo), the same way for every command."""

from __future__ import annotations

import sys


def load(path: str | None, allow_demo: bool = False):
    from regentime import fileformat

    if path is None:
        if not allow_demo:  # argparse makes FILE required; kept for safety
            from regentime.errors import InputError

            raise InputError("FILE", None, "a cavity file")
        print("note: no cavity file given: planning the built-in demo cavity (an invented "
              "scenario, not a real instrument)", file=sys.stderr)
        return fileformat.demo_cavity()
    return fileformat.load_cavity(path)


def parse_dump(text: str | None):
    """``--dump auto|steady|N`` -> rule or int (None: keep the file's)."""
    if text is None:
        return None
    from regentime.errors import InputError

    from regentime.model import DumpRule

    t = text.strip().lower()
    if t in ("auto", "steady"):
        return DumpRule(t)
    try:
        n = int(t)
    except ValueError:
        raise InputError("--dump", text, "auto, steady or a round trip number ≥ 1") from None
    if n < 1:
        raise InputError("--dump", text, "auto, steady or a round trip number ≥ 1")
    return DumpRule("given", n)
