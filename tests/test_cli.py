"""The command line as a user meets it: exit codes, one clean line per input problem, the
examples, the JSON keys of docs/definitions.md, the README's command list in step with the code."""

from __future__ import annotations

import argparse
import glob
import json
import os
import re
import subprocess
import sys

import pytest

from regentime.cli import COMMANDS, main

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLES = sorted(glob.glob(os.path.join(ROOT, "cavities", "*.yaml")))
BROKEN = sorted(glob.glob(os.path.join(ROOT, "tests", "broken", "*.yaml")))


def run_cli(args, capsys):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("path", BROKEN, ids=os.path.basename)
def test_broken_files_exit_2_with_one_line(path, capsys):
    code, out, err = run_cli(["check", path], capsys)
    assert code == 2
    lines = [l for l in err.splitlines() if l.strip()]
    assert len(lines) == 1, err  # one defect per corpus file -> one line
    assert lines[0].startswith("error: ") and "Traceback" not in err
    with open(path, encoding="utf-8", errors="replace") as fh:
        first = fh.readline()
    m = re.match(r"# expect: (\S+) \|", first)
    if m and m.group(1) != "-":
        assert m.group(1) in lines[0]
    assert out == ""


@pytest.mark.parametrize("path", BROKEN[:3], ids=os.path.basename)
def test_broken_file_in_a_real_process(path):
    proc = subprocess.run([sys.executable, "-m", "regentime", "plan", path, "--format", "json"],
                          capture_output=True, text=True, cwd=ROOT, timeout=60)
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr and proc.stdout == ""


def test_missing_file_exit_2(capsys, tmp_path):
    code, _, err = run_cli(["check", str(tmp_path / "nope.yaml")], capsys)
    assert code == 2 and "Traceback" not in err and len(err.strip().splitlines()) == 1


@pytest.mark.parametrize("path", EXAMPLES, ids=os.path.basename)
def test_examples_plan_as_json(path, capsys):
    code, out, err = run_cli(["plan", path, "--format", "json"], capsys)
    assert code in (0, 3), err
    d = json.loads(out)
    # docs/definitions.md "JSON output": the contract keys
    for key in ("round_trip_time_s", "optical_path_m", "buildup", "dump", "switch", "seed_pulse_index",
                "timing_table", "contrast", "checks", "cautions"):
        assert key in d, key
    for key in ("round_trip", "energy_J", "log_gain"):
        assert key in d["buildup"]
    for key in ("round_trip", "output_energy_J", "extraction_efficiency", "rule"):
        assert key in d["dump"]
    for key in ("scheme", "on_window_s", "off_window_s", "on_edge_s", "off_edge_s", "gate_width_s",
                "margin_s", "margin_sigma"):
        assert key in d["switch"], key
    for row in d["timing_table"]:
        for key in ("output", "drives", "delay_s", "width_s", "note"):
            assert key in row
    for key in ("pre_pulses", "post_pulses", "seed_leak", "nearest_pre_ratio", "worst_pre_ratio",
                "worst_post_ratio"):
        assert key in d["contrast"], key
    assert any("IEC 60825-1" in c for c in d["cautions"])
    assert 1e-9 < d["round_trip_time_s"] < 1e-7
    assert d["dump"]["output_energy_J"] > 0


@pytest.mark.parametrize("command", ["buildup", "check"])
@pytest.mark.parametrize("fmt", ["text", "json", "csv", "md"])
def test_buildup_and_check_formats(command, fmt, capsys):
    code, out, err = run_cli([command, EXAMPLES[0], "--format", fmt], capsys)
    assert code in (0, 3), err
    assert out.strip()
    if fmt == "json":
        json.loads(out)


def test_output_file_written_atomically(tmp_path, capsys):
    target = tmp_path / "b.csv"
    code, out, _ = run_cli(["buildup", EXAMPLES[0], "--format", "csv", "--output", str(target)], capsys)
    assert code == 0 and out == ""
    text = target.read_text()
    assert text.startswith("round_trip,energy_J")
    assert [p.name for p in tmp_path.iterdir()] == ["b.csv"]  # no temporary file left


def test_plot_written(tmp_path, capsys):
    pytest.importorskip("matplotlib")
    target = tmp_path / "b.png"
    code, _, _ = run_cli(["buildup", EXAMPLES[0], "--plot", str(target)], capsys)
    assert code == 0
    assert target.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_dump_override_and_bad_dump(capsys):
    code, out, _ = run_cli(["buildup", EXAMPLES[0], "--dump", "7", "--format", "json"], capsys)
    assert code == 0 and json.loads(out)["dump"]["round_trip"] == 7
    code, _, err = run_cli(["buildup", EXAMPLES[0], "--dump", "zero"], capsys)
    assert code == 2 and "--dump" in err


def test_readme_lists_every_command():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        readme = fh.read()
    for name in COMMANDS:
        assert f"regentime {name}" in readme, name


def test_every_command_has_help_with_an_example(capsys):
    for name in COMMANDS:
        with pytest.raises(SystemExit) as info:
            main([name, "--help"])
        assert info.value.code == 0
        out = capsys.readouterr().out
        assert "example" in out.lower(), name


def test_command_table_help_matches_each_command_module():
    # The lazy table must say what each command's own parser says (checked against the
    # fully registered parser, every module imported).
    from regentime.cli import COMMAND_HELP, build_parser

    parser = build_parser(every=True)
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    helps = {c.dest: c.help for c in sub._choices_actions}
    assert helps == COMMAND_HELP


def test_a_command_imports_only_its_own_module():
    code = (
        "import sys; from regentime.cli import main; "
        "main(['materials']); "
        "print(sorted(m for m in sys.modules if m.startswith('regentime.commands.')))"
    )
    env = dict(os.environ, PYTHONPATH=ROOT)
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env=env, check=True).stdout.strip().splitlines()[-1]
    assert "regentime.commands.plan" not in out and "regentime.commands.tui" not in out
    assert "regentime.commands.materials" in out
