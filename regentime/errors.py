"""Error classes.  The library raises these; only the front ends turn them into exit codes.

Exit codes (DESIGN.md): 0 success, 2 input wrong (:class:`InputError`), 3 the plan cannot be
met (:class:`PlanError`), 1 internal error (anything else: a bug).
"""

from __future__ import annotations

from typing import Any, Optional


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
            return f"{head}{key}missing; expected {self.expected}"
        shown = repr(self.value) if not isinstance(self.value, str) else f"'{self.value}'"
        if len(shown) > 60:
            shown = shown[:57] + "..."
        return f"{head}{key}got {shown}; expected {self.expected}"


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
