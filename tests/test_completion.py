"""The shell completion scripts in completions/ match the parser and are valid bash."""

import shutil
import subprocess
from pathlib import Path

import pytest

from regentime.cli import COMMANDS
from regentime.completion import SCRIPTS

ROOT = Path(__file__).resolve().parent.parent


@pytest.mark.parametrize("shell", sorted(SCRIPTS))
def test_committed_scripts_match_the_parser(shell):
    file_name, make = SCRIPTS[shell]
    text = make()
    assert (ROOT / "completions" / file_name).read_text(encoding="utf-8") == text, \
        "regenerate with: python -m regentime.completion --write"
    for name in COMMANDS:
        assert f"    {name}) opts=" in text


@pytest.mark.skipif(shutil.which("bash") is None, reason="no bash here")
def test_bash_completes_commands_and_formats():
    script = ROOT / "completions" / "regentime.bash"
    probe = (f"source {script}; COMP_WORDS=(regentime sw); COMP_CWORD=1; _regentime; "
             'echo "${COMPREPLY[@]}"; COMP_WORDS=(regentime plan --format j); COMP_CWORD=3; '
             '_regentime; echo "${COMPREPLY[@]}"')
    out = subprocess.run(["bash", "-c", probe], capture_output=True, text=True, check=True)
    assert out.stdout.split("\n")[:2] == ["sweep", "json"]
