"""Round-trip and switch-out dispersion of the Ti:sapphire demo cavity."""

from pathlib import Path

import pytest

from regentime.fileformat import load_cavity
from regentime.physics.gdd import material_dispersion
from regentime.planning.optics import cavity_optics
from regentime.planning.dispersion_plan import plan_dispersion

TI = Path(__file__).resolve().parent.parent / "cavities" / "ti_sapphire_1khz.yaml"


def test_ti_example_by_hand():
    cav = load_cavity(str(TI))
    res = plan_dispersion(cav, cavity_optics(cav), 11)
    lam = 800e-9
    # hand sum of the element list (file: 25 mm BBO cell, o; 20 mm Ti:sapphire, e;
    # 1.61 m of air; the quartz waveplate and the polarizer have no thickness)
    bbo = material_dispersion("bbo", lam, 25e-3, "o").gdd
    sap = material_dispersion("sapphire", lam, 20e-3, "e").gdd
    air_all = material_dispersion("air", lam, 1.61, "o").gdd
    air_cell = material_dispersion("air", lam, 0.41, "o").gdd
    assert bbo * 1e30 == pytest.approx(1800, rel=0.01)
    assert sap * 1e30 == pytest.approx(1130, rel=0.01)
    assert res.per_round_trip.gdd == pytest.approx(2 * (bbo + sap + air_all), rel=1e-9)
    assert res.at_dump.gdd == pytest.approx(11 * 2 * (bbo + sap + air_all) + 2 * (bbo + air_cell),
                                            rel=1e-9)
    rows = res.by_round_trip()
    assert [k for k, _ in rows] == [9, 10, 11, 12, 13]
    assert rows[3][1].gdd - rows[2][1].gdd == pytest.approx(res.per_round_trip.gdd)


def test_plan_json_has_dispersion_block():
    import json
    from regentime.planning.plan import make_plan
    from regentime.reports.plan_json import plan_to_json
    plan = make_plan(load_cavity(str(TI)))
    n = plan.dump_round_trip
    d = json.loads(plan_to_json(plan))["dispersion"]
    assert d["wavelength_m"] == pytest.approx(800e-9)
    assert [r["round_trip"] for r in d["by_round_trip"]] == [n - 2, n - 1, n, n + 1, n + 2]
    # N round trips + the exit cell-arm double pass, the hand sum of test_ti_example_by_hand
    lam = 800e-9
    bbo = material_dispersion("bbo", lam, 25e-3, "o").gdd
    sap = material_dispersion("sapphire", lam, 20e-3, "e").gdd
    air_all = material_dispersion("air", lam, 1.61, "o").gdd
    air_cell = material_dispersion("air", lam, 0.41, "o").gdd
    hand = n * 2 * (bbo + sap + air_all) + 2 * (bbo + air_cell)
    assert d["at_dump"]["gdd_s2"] == pytest.approx(hand, rel=1e-9)
    assert {"name", "kind", "material", "length_m", "gdd_s2", "tod_s3", "fod_s4"} <= set(d["elements"][2])
