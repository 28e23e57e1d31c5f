"""A continuously pumped setting whose shots alternate reports the energies the shots have,
never the unstable period-1 fixed point (docs/stability.md)."""

from __future__ import annotations

import json

import pytest

from conftest import EXAMPLES_DIR
from regentime.cli import main
from tests.independent.reference import Reference


def test_period_two_energies_match_brute_force_shots(example_cavities, example_plans):
    # Nd:YVO4 example at its given N = 30 and 200 kHz: the shots alternate.  Brute force: the
    # independent reference (tests/independent/reference.py) iterates the shot map shot by shot
    # from full storage R·τ and reads the last shots (Grishin, Opt. Express 15, 9434 (2007))
    cav = example_cavities["nd_yvo4_cw_200khz"]
    b = example_plans["nd_yvo4_cw_200khz"].buildup
    period, mean, low, high = Reference(cav).orbit(30, [cav.repetition_rate])[0]
    assert b.dump_round_trip == 30 and b.period == period == 2
    hi, lo = b.output_energies
    assert hi == pytest.approx(high, rel=0.02) and lo == pytest.approx(low, rel=0.02)
    assert b.output_energy == pytest.approx(0.5 * (hi + lo), rel=1e-12)  # the mean of one cycle
    assert b.output_energy == pytest.approx(mean, rel=0.02)


def test_json_and_text_say_it_alternates(capsys):
    path = str(EXAMPLES_DIR / "nd_yvo4_cw_200khz.yaml")
    assert main(["plan", path, "--format", "json"]) == 0
    dump = json.loads(capsys.readouterr().out)["dump"]
    assert dump["period"] == 2 and len(dump["output_energies_J"]) == 2
    assert dump["output_energies_J"][0] > dump["output_energies_J"][1]
    assert dump["output_energy_J"] == pytest.approx(sum(dump["output_energies_J"]) / 2, rel=1e-12)
    assert main(["plan", path]) == 0
    assert "alternates between" in capsys.readouterr().out


def test_period_one_lists_its_one_energy(example_plans):
    for plan in example_plans.values():
        b = plan.buildup
        if b.period == 1:
            assert b.output_energies == (b.output_energy,)
