"""``regentime contrast``: formats, options, exit codes, plot, and the plan JSON's contrast object."""

from __future__ import annotations

import csv
import io
import json
import math
from pathlib import Path

import pytest

from regentime.cli import main
from regentime.commands.contrast import parse_ratio
from regentime.fileformat import load_cavity
from regentime.planning.plan import make_plan
from regentime.reports.contrast_report import contrast_summary_lines

ROOT = Path(__file__).resolve().parents[1]
TI = str(ROOT / "cavities" / "ti_sapphire_1khz.yaml")
ND = str(ROOT / "cavities" / "nd_ylf_ps_10hz.yaml")


def _run(capsys, *argv):
    rc = main(["contrast", *argv])
    out = capsys.readouterr()
    return rc, out.out, out.err


def test_text_report_has_summary_satellites_and_caution(capsys):
    rc, out, _ = _run(capsys, TI)
    assert rc == 0
    assert "nearest pre-pulse" in out and "worst post-pulse" in out and "seed leak" in out
    # safety caution deferring to the standards (project rule)
    assert "IEC 60825-1" in out and "ANSI Z136.1" in out and "IEC 61010-1" in out
    assert "laser safety officer" in out


def test_json_matches_the_plan_contrast(capsys):
    rc, out, _ = _run(capsys, ND, "--format", "json")
    assert rc == 0
    d = json.loads(out)
    c = d["contrast"]
    plan = make_plan(load_cavity(ND))
    assert c["nearest_pre_ratio"] == pytest.approx(plan.contrast.nearest_pre_ratio, rel=1e-12)
    assert c["cleaner"]["nearest_pre_ratio"] > c["nearest_pre_ratio"]
    assert d["cautions"] and "IEC 60825-1" in d["cautions"][0]
    # ratio = E_main / E for every listed satellite (definition, docs/definitions.md "Contrast")
    for s in c["pre_pulses"] + c["post_pulses"] + c["seed_leak"]:
        if s["ratio"] is not None:
            assert s["ratio"] == pytest.approx(c["main_energy_J"] / s["energy_J"], rel=1e-9)


def test_plan_json_carries_the_contrast_object():
    # docs/definitions.md "JSON output": `regentime plan --format json` has contrast.{pre_pulses, …}.
    from regentime.reports.plan_json import plan_to_json

    d = json.loads(plan_to_json(make_plan(load_cavity(TI))))
    c = d["contrast"]
    assert {"pre_pulses", "post_pulses", "seed_leak", "nearest_pre_ratio", "worst_pre_ratio",
            "worst_post_ratio"} <= set(c)
    assert c["pre_pulses"][0]["time_s"] == pytest.approx(-d["round_trip_time_s"], rel=1e-12)


def test_csv_lists_every_satellite(capsys):
    rc, out, err = _run(capsys, TI, "--format", "csv")
    assert rc == 0
    rows = list(csv.DictReader(io.StringIO(out)))
    plan = make_plan(load_cavity(TI))
    assert len(rows) == len(plan.contrast.satellites)
    assert {r["kind"] for r in rows} == {"pre", "post", "seed"}
    assert "IEC 60825-1" in err  # the caution goes to stderr, keeping the CSV clean


def test_markdown_and_output_file(tmp_path, capsys):
    path = tmp_path / "contrast.md"
    rc, out, _ = _run(capsys, ND, "--format", "md", "--output", str(path))
    assert rc == 0 and out == ""
    text = path.read_text()
    assert text.startswith("# Contrast") and "| satellite |" in text and "## Cleaner" in text


def test_target_option_and_decibels(capsys):
    # 40 dB = 1e4 (definition of the decibel for energy ratios)
    assert parse_ratio("40 dB") == pytest.approx(1e4, rel=1e-12)
    assert parse_ratio("1e5") == 1e5
    rc, out, _ = _run(capsys, TI, "--target", "40dB", "--format", "json")
    assert rc == 0
    t = json.loads(out)["target"]
    assert [a["which"] for a in t] == ["nearest", "worst"]
    assert t[0]["target_ratio"] == pytest.approx(1e4, rel=1e-12)


@pytest.mark.parametrize("argv, word", [
    (["--span", "5 mm"], "--span"),
    (["--span", "-3 ns"], "--span"),
    (["--target", "0.5"], "--target"),
    (["--target", "lots"], "--target"),
    (["--dump", "0"], "--dump"),
])
def test_bad_options_exit_2_with_one_line(capsys, argv, word):
    # docs/definitions.md "Exit codes": 2 for wrong input, one clear line, no traceback
    rc, out, err = _run(capsys, TI, *argv)
    assert rc == 2
    assert word in err and "Traceback" not in err


def test_missing_file_exits_2(capsys, tmp_path):
    rc, _, err = _run(capsys, str(tmp_path / "nope.yaml"))
    assert rc == 2 and "Traceback" not in err


def test_span_widens_the_listed_seed_pulses(capsys):
    rc, narrow, _ = _run(capsys, TI, "--format", "json", "--span", "20 ns")
    rc2, wide, _ = _run(capsys, TI, "--format", "json", "--span", "300 ns")
    assert rc == rc2 == 0
    n, w = json.loads(narrow)["contrast"], json.loads(wide)["contrast"]
    assert n["span_s"] == pytest.approx(20e-9) and w["span_s"] == pytest.approx(300e-9)
    assert len(w["seed_leak"]) > len(n["seed_leak"])
    assert all(abs(s["time_s"]) <= 20e-9 * (1 + 1e-12) for s in n["seed_leak"])


def test_plot_writes_a_png(tmp_path, capsys):
    png = tmp_path / "c.png"
    rc, _, _ = _run(capsys, ND, "--plot", str(png))
    assert rc == 0
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification, ISO/IEC 15948)
    assert len(data) > 10_000


def test_summary_lines_for_the_setup_card():
    plan = make_plan(load_cavity(ND))
    lines = contrast_summary_lines(plan)
    assert any("nearest pre-pulse" in x for x in lines)
    assert any("after the cleaner" in x for x in lines)
    r = plan.contrast.nearest_pre_ratio
    assert f"{r:.3g}" in lines[0] and f"{10 * math.log10(r):.1f} dB" in lines[0]
