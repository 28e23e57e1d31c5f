"""The broken-file corpus (tests/broken/*.yaml): each file has one defect, and its first line
says which key path and line the error must name:

    # expect: <key path, or - for the whole file> | <line N or -> | <what is wrong>

The CLI tests reuse this corpus for exit code 2 and one clean line per problem.
"""

from __future__ import annotations

import glob
import os
import re

import pytest

from regentime.errors import InputError, InputErrors
from regentime.fileformat import load_cavity

CORPUS = sorted(glob.glob(os.path.join(os.path.dirname(__file__), "broken", "*.yaml")))
HEADER = re.compile(rb"# expect: (\S+) \| (?:line (\d+)|-) \| (.+)")


def _expectation(path: str) -> tuple[str, int | None, str]:
    with open(path, "rb") as fh:
        m = HEADER.match(fh.readline())
    assert m, f"{path}: first line must be '# expect: <path> | <line N or -> | <what>'"
    key = m.group(1).decode()
    return ("" if key == "-" else key), (int(m.group(2)) if m.group(2) else None), \
        m.group(3).decode()


def _errors(path: str) -> list[InputError]:
    with pytest.raises((InputError, InputErrors)) as info:
        load_cavity(path)
    exc = info.value
    return exc.errors if isinstance(exc, InputErrors) else [exc]


def test_corpus_is_big_enough():
    assert len(CORPUS) >= 30


@pytest.mark.parametrize("path", CORPUS, ids=os.path.basename)
def test_broken_file_names_its_key(path):
    key, line, what = _expectation(path)
    errors = _errors(path)
    assert len(errors) == 1, [e.one_line() for e in errors]  # one defect, one message
    error = errors[0]
    if key:
        assert error.path == key or error.path.startswith((key + ".", key + "["))
        assert f"{error.path}: " in str(error)
    else:
        assert error.path == ""
    if line is not None:
        assert error.line == line
    assert error.source == path and str(error).startswith(path)
    assert "\n" not in str(error) and "Traceback" not in str(error)
    assert error.exit_code == 2
