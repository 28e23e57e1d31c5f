"""Bounded fuzz test of the cavity file format (hypothesis, derandomized, fixed budget).

Mutations of the shipped examples — deleted and duplicated lines, values replaced by NaN,
infinities, huge, zero and negative numbers, wrong types, unicode and control escapes,
unit swaps, typos in keys, YAML tags — must each end in a loaded cavity (then a plan or a
plan error) or a clean input error whose every line is escaped and at most 300 characters.
Any other exception fails the test.  The pulsed examples are planned in-process; the
continuously pumped ones are only loaded (their plans take seconds each).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from regentime.errors import InputError, InputErrors, PlanError
from regentime.fileformat.loader import load_cavity_text
from regentime.planning.plan import make_plan

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = {p.name: p.read_text() for p in sorted((ROOT / "cavities").glob("*.yaml"))}
PLANNED = {"ti_sapphire_1khz.yaml", "nd_ylf_ps_10hz.yaml"}
CONTROL = re.compile(r"[\x00-\x09\x0b-\x1f\x7f\x80-\x9f\u202a-\u202e\u2066-\u2069]")
VALUE = re.compile(r"^(\s*-?\s*[A-Za-z_]+:\s+)([^#\n]+?)(\s*(#.*)?)$")

REPLACEMENTS = ["nan", ".inf", "-.inf", "1e300", "0", "-1", "-3 mm", "[]", "{}", "yes", "~",
                '"\\e[31mred"', '"\\u202eevil"', "x" * 400, "!foo 3", "!!set {a}", "1 furlong",
                "3 ns", "5 J", "2 %", "40 dB", "1e-300", "'12'", "1 um", "90 J", "é"]


def _mutate(text: str, ops: list) -> str:
    lines = text.splitlines()
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
        elif kind == "value":
            m = VALUE.match(lines[i])
            if m:
                lines[i] = m.group(1) + REPLACEMENTS[pick % len(REPLACEMENTS)] + m.group(3)
        elif kind == "typo":
            m = VALUE.match(lines[i])
            if m and len(m.group(1).strip()) > 3:
                key = m.group(1)
                j = len(key) - len(key.lstrip()) + 1
                lines[i] = key[:j] + key[j + 1:] + m.group(2)
    return "\n".join(lines) + "\n"


def _check_lines(exc: Exception) -> None:
    errors = exc.errors if isinstance(exc, InputErrors) else [exc]
    for err in errors:
        line = err.one_line()
        assert len(line) <= 300, line[:400]
        assert not CONTROL.search(line), line


OPS = st.lists(st.tuples(st.sampled_from(["delete", "duplicate", "swap", "value", "typo"]),
                         st.integers(0, 10_000), st.integers(0, 1000)), min_size=1, max_size=4)


@settings(max_examples=250, derandomize=True, deadline=None,
          suppress_health_check=[HealthCheck.too_slow])
@given(name=st.sampled_from(sorted(EXAMPLES)), ops=OPS)
def test_mutated_examples_load_cleanly_or_fail_cleanly(name, ops):
    text = _mutate(EXAMPLES[name], ops)
    try:
        cavity = load_cavity_text(text, source=name)
    except (InputError, InputErrors) as exc:
        _check_lines(exc)
        return
    if name not in PLANNED:
        return
    try:
        make_plan(cavity)
    except (InputError, InputErrors) as exc:
        _check_lines(exc)
    except PlanError as exc:
        for line in str(exc).splitlines():
            assert not CONTROL.search(line), line


@pytest.mark.parametrize("name", sorted(EXAMPLES))
def test_unmutated_examples_load(name):
    assert load_cavity_text(EXAMPLES[name], source=name).name
