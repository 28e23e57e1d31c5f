"""Bounded fuzz test of the trace reader (hypothesis, derandomized, fixed budget).

Mutations of a valid comma-separated photodiode trace — deleted, duplicated and swapped
lines, fields replaced by NaN, inf, huge numbers, text, control escapes, empty fields,
changed delimiters and decimal commas — must each give a trace or a clean input error whose
line is escaped and at most 300 characters; any other exception fails the test.
"""

from __future__ import annotations

import re

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from regentime.errors import InputError, InputErrors
from regentime.trace.reader import read_trace

CONTROL = re.compile(r"[\x00-\x09\x0b-\x1f\x7f\x80-\x9f\u202a-\u202e\u2066-\u2069]")
_T = np.arange(600) * 2e-10
_Y = 0.01 * np.sin(_T * 3e9) + np.where((np.arange(600) % 56) == 5, 1.0, 0.0)
BASE = ["# invented demo trace", "time_s,photodiode_V"] + [f"{t:.6e},{y:.6e}" for t, y in zip(_T, _Y)]
FIELDS = ["nan", "inf", "-inf", "1e309", "9e304", "abc", "", "\x1b[2J", "\u202e1", "1,5", "0x10",
          "1e-320", " ", "é", "1;2", "--1"]


def _mutate(ops: list) -> str:
    lines = list(BASE)
    for kind, where, pick in ops:
        if not lines:
            break
        i = where % len(lines)
        if kind == "delete":
            del lines[i]
        elif kind == "duplicate":
            lines.insert(i, lines[i])
        elif kind == "swap" and i + 1 < len(lines):
            lines[i], lines[i + 1] = lines[i + 1], lines[i]
        elif kind == "field":
            parts = lines[i].split(",")
            parts[pick % len(parts)] = FIELDS[pick % len(FIELDS)]
            lines[i] = ",".join(parts)
        elif kind == "delimiter":
            lines = [ln.replace(",", ";" if pick % 2 else "\t") for ln in lines]
        elif kind == "truncate":
            lines = lines[: i + 1]
    return "\n".join(lines) + "\n"


OPS = st.lists(st.tuples(st.sampled_from(["delete", "duplicate", "swap", "field", "field",
                                          "delimiter", "truncate"]),
                         st.integers(0, 10_000), st.integers(0, 1000)), min_size=1, max_size=5)


@settings(max_examples=200, derandomize=True, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(ops=OPS)
def test_mutated_traces_read_or_fail_cleanly(tmp_path, ops):
    path = tmp_path / "scope.csv"
    path.write_text(_mutate(ops), encoding="utf-8")
    try:
        trace = read_trace(str(path), parser="numpy")
    except (InputError, InputErrors) as exc:
        errors = exc.errors if isinstance(exc, InputErrors) else [exc]
        for err in errors:
            line = err.one_line()
            assert len(line) <= 300 and not CONTROL.search(line), line[:400]
        return
    assert trace.time.size == trace.signal.size >= 1


def test_unmutated_trace_reads(tmp_path):
    path = tmp_path / "scope.csv"
    path.write_text("\n".join(BASE) + "\n")
    trace = read_trace(str(path), parser="numpy")
    assert trace.signal.size == 600 and trace.channel == "photodiode_V"
