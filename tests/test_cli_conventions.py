"""-q, -v, --strict before or after the command, and one --dump spelling everywhere."""

from pathlib import Path

import pytest

from regentime.cli import COMMANDS, build_parser, main

ROOT = Path(__file__).resolve().parent.parent
TI = str(ROOT / "cavities" / "ti_sapphire_1khz.yaml")


def test_strict_turns_warnings_into_exit_3(capsys):
    # the Nd:YLF example carries warnings (B-integral above 1 rad, damage above half) and no error
    ylf = str(ROOT / "cavities" / "nd_ylf_ps_10hz.yaml")
    assert main(["plan", ylf]) == 0
    assert main(["plan", ylf, "--strict"]) == 3
    assert main(["--strict", "check", ylf]) == 3
    assert "strict" in capsys.readouterr().err


def test_quiet_keeps_results_and_the_caution(capsys):
    assert main(["-q", "plan", TI, "--format", "csv"]) == 0
    out, err = capsys.readouterr()
    assert out.startswith("output,") and "IEC 60825-1" in err
    assert main(["sweep", TI, "pump.energy=8mJ,9mJ", "-q"]) == 0
    out, err = capsys.readouterr()
    assert "sweep:" not in err and "IEC 60825-1" in out


def test_verbose_shows_the_traceback_of_an_internal_error(monkeypatch, capsys):
    import regentime.commands.plan as plan_command

    def broken(args):
        raise RuntimeError("a deliberate bug")

    monkeypatch.delenv("REGENTIME_DEBUG", raising=False)
    monkeypatch.setattr(plan_command, "run", broken)
    assert main(["plan", TI]) == 1
    assert "Traceback" not in capsys.readouterr().err
    assert main(["plan", TI, "-v"]) == 1
    assert "Traceback" in capsys.readouterr().err


def test_one_metavar_for_dump_everywhere():
    parser = build_parser(every=True)
    sub = next(a for a in parser._actions if a.dest == "command")
    seen = set()
    for name in COMMANDS:
        for action in sub.choices[name]._actions:
            if "--dump" in action.option_strings:
                seen.add(action.metavar)
    assert seen == {"N|auto|steady"}
