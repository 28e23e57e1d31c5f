"""Hostile or absurd cavity files: tags, control characters, huge values, deep nesting,
long lists, YAML 1.1 directives.  Each is exit 2 with one escaped line of at most 300
characters, fast (the pre-scan refuses before the full parse)."""

from __future__ import annotations

import re
import subprocess
import sys
import time
from pathlib import Path

import pytest

from regentime.errors import escape_text, show_value

ROOT = Path(__file__).resolve().parents[1]
TEXT = (ROOT / "cavities" / "ti_sapphire_1khz.yaml").read_text()
CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f\x80-\x9f\u202a-\u202e\u2066-\u2069]")


def _with_dump(value: str) -> str:
    return re.sub(r"(?m)^dump:.*$", lambda _m: "dump: " + value, TEXT)


CASES = {
    "tag": (_with_dump("!foo auto"), "a tagged value (!foo)"),
    "set": (_with_dump("!!set {a, b}"), "got a set"),
    "escapes": (_with_dump(r'"a\e]0;title\a\e[31m\u202eb"'), r"\x1b]0;title\x07\x1b[31m\u202eb"),
    "long": (_with_dump("x" * 5000), "…"),
    "yaml11": ("%YAML 1.1\n---\n" + TEXT, "YAML 1.2"),
    "nesting": (TEXT + "\nextra: " + "[" * 5000 + "]" * 5000 + "\n", "nested too deep"),
    "items": (TEXT + "\nmore: [" + ",".join(["1"] * 30000) + "]\n", "list entries"),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_hostile_file_is_one_escaped_short_line(tmp_path, name):
    text, expect = CASES[name]
    path = tmp_path / f"{name}.yaml"
    path.write_text(text)
    start = time.perf_counter()
    proc = subprocess.run([sys.executable, "-m", "regentime", "plan", str(path)],
                          capture_output=True, text=True, timeout=60, cwd=ROOT)
    elapsed = time.perf_counter() - start
    assert proc.returncode == 2, proc.stderr
    lines = proc.stderr.splitlines()
    assert len(lines) == 1 and len(lines[0]) <= 300, proc.stderr[:400]
    assert not CONTROL.search(lines[0])
    assert expect in lines[0]
    assert "TaggedScalar" not in lines[0] and "odict_keys" not in lines[0]
    # generous bound (a shared machine): the old parse of these took 8–20 s
    assert elapsed < 10


def test_escape_and_show_value():
    assert escape_text("\x1b[2J\u202e") == "\\x1b[2J\\u202e"
    assert show_value("y" * 500).endswith("…'") and len(show_value("y" * 500)) == 82
    assert show_value({"a": 1}) == "a mapping"
    assert show_value(3.5) == "3.5"


@pytest.mark.parametrize("fmt", ["text", "md", "csv", "json"])
def test_names_from_the_file_cannot_drive_the_terminal(tmp_path, fmt):
    text = re.sub(r"(?m)^name:.*$", lambda _m: r'name: "demo \e]0;retitled\a\e[31m red \u202e"', TEXT)
    path = tmp_path / "named.yaml"
    path.write_text(text)
    proc = subprocess.run([sys.executable, "-m", "regentime", "plan", str(path), "--format", fmt],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert proc.returncode in (0, 3), proc.stderr
    for stream in (proc.stdout, proc.stderr):
        assert not CONTROL.search(stream.replace("\n", "").replace("\t", ""))
    if fmt == "json":
        import json

        assert "\x1b" in json.loads(proc.stdout)["name"]  # the value itself is kept
