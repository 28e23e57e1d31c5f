"""Sweeps: rows against individual plans, the order and count of combinations, monotonic
output energy in pump energy at fixed seed, and the CLI's parsing of KEY=VALUES."""

import json
import math
from pathlib import Path

import pytest

import regentime
from regentime.cli import main
from regentime.commands.sweep import expand
from regentime.errors import InputError

ROOT = Path(__file__).resolve().parent.parent
TI = str(ROOT / "cavities" / "ti_sapphire_1khz.yaml")


def test_rows_equal_individual_plans_over_two_keys():
    axes = {"pump.energy": ["8 mJ", "10 mJ"], "seed.energy": ["0.3 nJ", "0.7 nJ"]}
    r = regentime.sweep(TI, axes, workers=2)
    assert len(r.rows) == 4 and not r.interrupted
    for row in r.rows:
        d = regentime.plan(TI, overrides={k: row[k] for k in axes}).to_dict()
        assert row["output_energy_J"] == d["dump"]["output_energy_J"]
        assert row["dump_round_trip"] == d["dump"]["round_trip"]
        assert row["nearest_pre_ratio"] == d["contrast"]["nearest_pre_ratio"]
        assert row["margin_s"] == d["switch"]["margin_s"]
        assert row["error"] is None
    # the last key varies fastest; SI values from the file's own unit parser
    assert [row["seed.energy"] for row in r.rows] == ["0.3 nJ", "0.7 nJ"] * 2
    assert math.isclose(r.rows[0]["pump.energy (SI)"], 8e-3)


def test_output_energy_rises_with_pump_energy_at_fixed_seed():
    # Frantz-Nodvik: more stored energy, more extracted energy at the chosen round trip
    r = regentime.sweep(TI, {"pump.energy": ["6 mJ", "8 mJ", "10 mJ", "12 mJ"]},
                        outputs=["output_energy_J"])
    e = [row["output_energy_J"] for row in r.rows]
    assert all(b > a for a, b in zip(e, e[1:]))


def test_bad_key_value_and_output_raise_input_error():
    with pytest.raises(InputError, match="pump.energyy"):
        regentime.sweep(TI, {"pump.energyy": ["8 mJ"]})
    with pytest.raises(InputError, match="pump.energy"):
        regentime.sweep(TI, {"pump.energy": ["8 mJ", "9 mm"]})
    with pytest.raises(InputError, match="outputs"):
        regentime.sweep(TI, {"pump.energy": ["8 mJ"]}, outputs=["nonsense"])


def test_expand_ranges_lists_and_log():
    assert expand("pump.energy", "8mJ:12mJ:5", "energy") == ["8 mJ", "9 mJ", "10 mJ", "11 mJ", "12 mJ"]
    assert expand("seed.energy", "log:10pJ:10nJ:4", "energy") == ["10 pJ", "100 pJ", "1000 pJ", "10000 pJ"]
    assert expand("pump.energy", "8mJ,9mJ,11mJ", "energy") == ["8mJ", "9mJ", "11mJ"]
    assert expand("dump", "8:14:4", "count") == [8, 10, 12, 14]
    assert expand("pump.energy", "10mJ", "energy") == ["10mJ"]


@pytest.mark.parametrize("arg, key", [
    ("pump.energy=8mJ:12mm:3", "pump.energy"),
    ("pump.energi=8mJ:12mJ:3", "pump.energi"),
    ("pump.energy=8mJ:12mJ:0", "pump.energy"),
    ("pump.energy=8mJ:12mJ:1", "pump.energy"),
    ("seed.energy=log:-1nJ:1nJ:3", "seed.energy"),
    ("pump.energy=8mJ,,9mJ", "pump.energy"),
    ("pump.energy", "KEY=VALUES"),
])
def test_cli_bad_settings_exit_2_naming_the_key(capsys, arg, key):
    assert main(["sweep", TI, arg]) == 2
    err = capsys.readouterr().err
    assert key in err and "Traceback" not in err


def test_cli_json_and_plot(tmp_path, capsys):
    pytest.importorskip("matplotlib")
    png = tmp_path / "s.png"
    code = main(["sweep", TI, "pump.energy=8mJ:10mJ:2", "seed.energy=0.3nJ,0.7nJ",
                 "--format", "json", "--plot", str(png), "--no-progress"])
    assert code == 0
    d = json.loads(capsys.readouterr().out)
    assert d["done"] == d["total"] == 4 and d["keys"] == ["pump.energy", "seed.energy"]
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_ctrl_c_keeps_the_rows_done():
    def progress(done, total):
        if done == 2:
            raise KeyboardInterrupt  # as ctrl-c would, between two plans

    r = regentime.sweep(TI, {"pump.energy": ["6 mJ", "8 mJ", "10 mJ", "12 mJ"]},
                        outputs=["output_energy_J"], workers=1, progress=progress)
    assert r.interrupted and len(r.rows) == 2 and r.total == 4
    assert [row["pump.energy"] for row in r.rows] == ["6 mJ", "8 mJ"]
