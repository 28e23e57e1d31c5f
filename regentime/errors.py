"""Error classes.  The library raises these; only the front ends turn them into exit codes.

Exit codes (docs/definitions.md): 0 success, 2 input wrong (:class:`InputError`), 3 the plan cannot be
met (:class:`PlanError`), 1 internal error (anything else: a bug).
"""

from __future__ import annotations

from typing import Any, Optional

SHOWN_VALUE = 80  # characters of a user's value shown in a message
LINE_LIMIT = 300  # characters of one message line at most


def escape_text(text: str) -> str:
    """``text`` safe for a terminal line: C0/C1 control characters and the bidirectional
    overrides shown as ``\\x1b`` / ``\\u202e`` escapes, so a value can never move the cursor,
    retitle or recolour the terminal or reverse the text around it."""
    out = []
    for ch in str(text):
        code = ord(ch)
        if code < 0x20 or code == 0x7F or 0x80 <= code < 0xA0:
            out.append(f"\\x{code:02x}")
        elif code in (0x200E, 0x200F, 0xFEFF) or 0x202A <= code <= 0x202E or 0x2066 <= code <= 0x2069:
            out.append(f"\\u{code:04x}")
        else:
            out.append(ch)
    return "".join(out)


def terminal_safe(text: str) -> str:
    """A whole report made safe to print: every line through :func:`escape_text`, the line
    breaks and tabs kept.  JSON stays valid (its strings never hold raw control characters,
    and a bidirectional override becomes the equivalent ``\\u202e`` escape)."""
    return "\n".join("\t".join(escape_text(part) for part in line.split("\t"))
                     for line in text.split("\n"))


def shorten(text: str, limit: int = SHOWN_VALUE) -> str:
    """``text`` cut to ``limit`` characters with an ellipsis."""
    return text if len(text) <= limit else text[: limit - 1] + "…"


def show_value(value: Any) -> str:
    """One user value for a message: quoted, escaped, shortened; a YAML-tagged value named
    by its tag, a collection by its kind (never a parser object's repr)."""
    tag = getattr(getattr(value, "tag", None), "value", None) if not isinstance(value, (str, int, float)) else None
    if isinstance(tag, str) and tag:
        return f"a tagged value ({shorten(escape_text(tag), 40)})"
    if isinstance(value, str):
        return "'" + shorten(escape_text(value)) + "'"
    if isinstance(value, (bool, int, float)) or value is None:
        return shorten(escape_text(repr(value)))
    from collections.abc import Mapping, Sequence, Set

    if isinstance(value, Set):
        return "a set"
    if isinstance(value, Mapping):
        return "a mapping"
    if isinstance(value, Sequence):
        return "a list" if len(value) > 8 else shorten(escape_text(repr(list(value))))
    return shorten(escape_text(str(value)))


def safe_line(text: str) -> str:
    """One line for stderr: escaped and at most :data:`LINE_LIMIT` characters."""
    return shorten(escape_text(text), LINE_LIMIT)


class RegentimeError(Exception):
    """Base class of every error the library raises on purpose."""

    exit_code = 1


class InputError(RegentimeError, ValueError):
    """The input is wrong: names the key path, the line, the value and what was expected."""

    exit_code = 2

    def __init__(
        self,
        path: str,
        value: Any,
        expected: str,
        line: Optional[int] = None,
        source: Optional[str] = None,
    ) -> None:
        self.path = path
        self.value = value
        self.expected = expected
        self.line = line
        self.source = source
        super().__init__(self.one_line())

    def one_line(self) -> str:
        where = self.source or ""
        if self.line is not None:
            where = f"{where}:{self.line}" if where else f"line {self.line}"
        head = f"{where}: " if where else ""
        key = f"{self.path}: " if self.path else ""
        if self.value is _MISSING:
            return safe_line(f"{head}{key}missing; expected {self.expected}")
        return safe_line(f"{head}{key}got {show_value(self.value)}; expected {self.expected}")


class InputErrors(RegentimeError, ValueError):
    """Several input problems found in one file (each printed on its own line)."""

    exit_code = 2

    def __init__(self, errors: list[InputError]) -> None:
        self.errors = list(errors)
        super().__init__("\n".join(e.one_line() for e in self.errors))


class PlanError(RegentimeError):
    """The plan cannot be met (no window, a negative delay that cannot be shifted ...)."""

    exit_code = 3


class _Missing:
    def __repr__(self) -> str:
        return "<missing>"


_MISSING = _Missing()
MISSING = _MISSING
