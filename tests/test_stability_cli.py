"""`regentime stability` on the command line: exit codes, outputs, errors (docs/definitions.md "Exit codes")."""

from __future__ import annotations

import json

import pytest

import _stability_cavity as sc  # noqa: E402

from regentime.cli import main  # noqa: E402


@pytest.fixture(scope="module")
def cw_file(tmp_path_factory):
    p = tmp_path_factory.mktemp("cli") / "cw.yaml"
    p.write_text(sc.CW_FLAT, encoding="utf-8")
    return str(p)


def test_json_map(cw_file, capsys):
    rc = main(["stability", cw_file, "--rates", "20kHz,50kHz,90kHz", "--round-trips", "10:20:5",
               "--format", "json", "--no-progress"])
    assert rc == 0
    d = json.loads(capsys.readouterr().out)
    assert d["rates_Hz"] == [20e3, 50e3, 90e3] and d["round_trips"] == [10, 15, 20]
    assert len(d["period"]) == 3 and len(d["period"][0]) == 3
    assert d["noise_transfer"]["round_trips"] == [10, 15, 20]


def test_text_map_has_legend_and_caution(cw_file, capsys):
    rc = main(["stability", cw_file, "--rates", "10kHz:100kHz:10", "--round-trips", "5:25"])
    out = capsys.readouterr().out
    assert rc == 0
    assert "legend:" in out and "'@' the file's setting" in out
    assert "IEC 60825-1" in out and "laser safety officer" in out
    assert "@" in out.split("legend:")[0]  # the file's setting (50 kHz, its dump N) is on the map


def test_csv_one_row_per_point(cw_file, capsys):
    rc = main(["stability", cw_file, "--rates", "20kHz,40kHz", "--round-trips", "8,9,10", "--format", "csv"])
    lines = capsys.readouterr().out.strip().splitlines()
    assert rc == 0 and len(lines) == 1 + 6
    assert lines[0].startswith("round_trips,rate_Hz,seed_energy_J,pump_power_W,period")


def test_seed_sweep_and_monte_carlo(cw_file, capsys):
    rc = main(["stability", cw_file, "--seed-energies", "0.5nJ:50nJ:3log", "--round-trips", "30",
               "--pump-noise", "1%", "--random-seed", "3", "--at", "30", "--format", "json"])
    d = json.loads(capsys.readouterr().out)
    assert rc == 0 and d["axis"] == "seed" and len(d["seed_energies_J"]) == 3
    assert d["monte_carlo"]["random_seed"] == 3 and d["monte_carlo"]["round_trip"] == 30


@pytest.mark.parametrize("args, key", [
    (["--rates", "10 m:20 m:3"], "--rates"),
    (["--rates", "10kHz:20kHz"], "--rates"),
    (["--round-trips", "a:b"], "--round-trips"),
    (["--round-trips", "0:5"], "--round-trips"),
    (["--pump-noise", "70%"], "--pump-noise"),
])
def test_bad_options_exit_2(cw_file, capsys, args, key):
    rc = main(["stability", cw_file] + args)
    err = capsys.readouterr().err
    assert rc == 2 and key in err and "Traceback" not in err


def test_plot_written(cw_file, tmp_path, capsys):
    png = tmp_path / "map.png"
    rc = main(["stability", cw_file, "--rates", "10kHz:100kHz:12", "--round-trips", "5:30:5", "--plot", str(png)])
    capsys.readouterr()
    assert rc == 0 and png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_pulsed_says_period_one_by_construction(tmp_path, capsys):
    p = tmp_path / "pulsed.yaml"
    p.write_text(sc.PULSED, encoding="utf-8")
    rc = main(["stability", str(p), "--rates", "1kHz,10kHz", "--round-trips", "5:10"])
    assert rc == 0 and "period 1 by construction" in capsys.readouterr().out


def test_pulsed_pump_says_there_is_no_shot_to_shot_coupling(capsys):
    from conftest import EXAMPLES_DIR

    assert main(["stability", str(EXAMPLES_DIR / "ti_sapphire_1khz.yaml"), "--round-trips", "1:30"]) == 0
    err = capsys.readouterr().err
    assert "pulsed pump" in err and "no shot-to-shot coupling" in err
