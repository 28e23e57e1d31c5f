"""Cross-check of `regentime plan` / `regentime stability` against an independent reading of
the design's canonical definitions (tests/independent/reference.py, written from
docs/definitions.md and docs/references.md without regentime's physics or planning code).

Tolerances are the acceptance tolerances of the project (round-trip time 3 ps, the same
switch-out round trip and seed pulse, output energy 3 %, switch-on edge inside the
independently computed window, window lengths 15 %, edges, gate width and delays 10 ps,
nearest pre-pulse ratio 20 %, the same steady-state period at (rate, round trips) points).

The reference numbers are recorded in tests/independent/reference_results.json by
``python -m tests.independent.make_reference`` (minutes: the gaussian continuously pumped
case iterates the ring-resolved shot map); the recording carries each cavity file's SHA-256
and a test fails when a file changed since.  A few fast cavities are recomputed live to
keep the recording in step with reference.py.  All cavity files are invented scenarios.

The reference itself is checked against outside values first (docs/references.md, [D] = derived
by us from the published formula).
"""

from __future__ import annotations

import hashlib
import json
import math
import pathlib
import subprocess
import sys
from concurrent.futures import ThreadPoolExecutor

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]
REC_PATH = ROOT / "tests" / "independent" / "reference_results.json"
REC = json.loads(REC_PATH.read_text())
FILES = sorted(REC)

PS = 1e-12

# Disagreements found and reported (see the report of the cross-check): regentime's plan
# carries only the stored *energy* of a gaussian, continuously pumped crystal from shot to
# shot and gives it the pump's radial profile again at each injection
# (regentime/planning/steady.py, regentime/physics/dynamics.py); the reference carries the
# depleted ring-by-ring stored fluence (docs/definitions.md "Gain": "the same law ring by ring").
GAUSS_CW = "regentime plan resets the radial stored-fluence profile of a gaussian, " \
           "continuously pumped crystal at every shot (energy-only memory); the design's " \
           "ring-by-ring law carries the depleted profile (output 2.4x lower)"
AUTO_P2 = "regentime's auto rule maximises the period-1 fixed-point output over all N and " \
          "picks N = 29, whose steady state is period 2 (it reports the mean of the two " \
          "alternating outputs); the reference maximises over period-1 settings (N = 50)"
# (resolved) both disagreements above were fixed in regentime: the ring model now carries every
# ring's stored fluence from shot to shot (regentime/planning/ring_steady.py), and the auto and
# steady rules keep to period-1 round trips (regentime/planning/buildup_plan.py::choose_dump).
FLAT_PEAK = ("the quarter-wave Yb:KGW example is far from saturation (extraction about 4 %): its "
             "output peak is flat, and the reference picks N = 111 where regentime picks N = 112; "
             "the switch-off edge and the gate then differ by exactly one round trip")
XFAIL: dict = {("cavities/yb_100khz_cw.yaml", check): FLAT_PEAK
               for check in ("round_trip", "off_window", "off_edge", "gate")}


def _param(check):
    out = []
    for f in FILES:
        reason = XFAIL.get((f, check))
        marks = [pytest.mark.xfail(strict=True, reason=reason)] if reason else []
        out.append(pytest.param(f, marks=marks, id=pathlib.Path(f).stem))
    return out


def _run(args):
    proc = subprocess.run([sys.executable, "-m", "regentime", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=120)
    # 3 is a verdict (e.g. damage above threshold in a deliberately hard test cavity): the
    # numbers are printed all the same, and the numbers are what this cross-check compares
    assert proc.returncode in (0, 3), proc.stderr
    return json.loads(proc.stdout)


@pytest.fixture(scope="module")
def tool():
    """regentime plan --format json on every cavity (run in parallel, once)."""
    with ThreadPoolExecutor(max_workers=8) as ex:
        outs = list(ex.map(lambda f: _run(["plan", f, "--format", "json"]), FILES))
    return dict(zip(FILES, outs))


# ------------------------------------------------------------ the reference, checked outside


def test_reference_frantz_nodvik_against_references_md():
    from tests.independent.reference import fn_cross
    # docs/references.md [D] (Frantz & Nodvik 1963): J_sat = 1, G0 = 10, J_in = 0.1 -> 0.71867,
    # gain left 5.3866; J_in = 1 -> 2.90048; G0 = 2, J_in = 1 -> 1.48988; J_in = 1e-3 -> 9.955
    g10 = math.log(10.0)
    out, st = fn_cross(0.1, g10, 0.0, 1.0)
    assert out == pytest.approx(0.71867, abs=1e-5)
    assert math.exp(st) == pytest.approx(5.3866, abs=1e-4)
    assert fn_cross(1.0, g10, 0.0, 1.0)[0] == pytest.approx(2.90048, abs=1e-5)
    assert fn_cross(1.0, math.log(2.0), 0.0, 1.0)[0] == pytest.approx(1.48988, abs=1e-5)
    assert fn_cross(1e-3, g10, 0.0, 1.0)[0] / 1e-3 == pytest.approx(9.955, abs=1e-3)
    # no overflow far above saturation: J_out ≈ J_in + J_sat ln G0 (docs/references.md limit)
    assert fn_cross(800.0, g10, 0.0, 1.0)[0] == pytest.approx(800.0 + g10, rel=1e-12)


def test_reference_round_trip_of_vacuum_cavity():
    # docs/references.md: a 1.5 m linear cavity in vacuum has a 10.007 ns round trip (scipy c)
    from regentime.fileformat import load_cavity
    from tests.independent.reference import round_trip_time
    import scipy.constants as sc
    cav = load_cavity(str(ROOT / "tests/independent/cavities/ti_vacuum_fixed.yaml"))
    from tests.independent.reference import element_delay
    spaces = sum(e.thickness for e in cav.elements if e.kind == "space")
    assert spaces == pytest.approx(1.61, abs=1e-12)  # the file's spaces: 250+60+100+500+700 mm
    # vacuum spaces (air: vacuum): T_rt = 2 L_spaces / c + 2 Σ n_g L_crystal / c
    crystals = sum(element_delay(e, cav) for e in cav.elements if e.kind != "space")
    assert round_trip_time(cav) - 2 * crystals == pytest.approx(2 * spaces / sc.c, rel=1e-12)
    assert 2 * 1.5 / sc.c == pytest.approx(10.007e-9, abs=0.001e-9)


def test_reference_window_shares_are_physical():
    # Jones calculus (DiMarzio, Optics for Engineers, ch. 6): with no depolarisation an ideal
    # instant switch traps and ejects everything; with contrast C each double pass keeps
    # about 1 - 2/C (the reading written in reference.py, R6)
    from dataclasses import replace
    from regentime.fileformat import load_cavity
    from regentime import model as md
    from tests.independent.reference import Reference
    cav = load_cavity(str(ROOT / "cavities/ti_sapphire_1khz.yaml"))
    cell = cav.elements_of(md.PockelsCell)[0]
    big = replace(cav, elements=tuple(replace(e, contrast=1e12) if e is cell else e
                                      for e in cav.elements))
    ref = Reference(big)
    mid = 0.5 * (ref.a2 + ref.T + ref.a1)
    assert ref.trapped_share(mid, ideal=True) == pytest.approx(1.0, abs=1e-9)
    assert ref.ejected_share(mid + 10 * ref.T, 11, ideal=True) == pytest.approx(1.0, abs=1e-9)
    ref = Reference(cav)
    assert ref.eta == pytest.approx(1 - 2 / cell.contrast, rel=1e-5)


@pytest.mark.parametrize("name", ["cavities/ti_sapphire_1khz.yaml",
                                  "tests/independent/cavities/ti_half_wave.yaml",
                                  "tests/independent/cavities/ti_crystal_in_cell_arm.yaml"])
def test_recording_matches_reference_code(name):
    """Recompute a few fast cavities live: the recording must be what reference.py gives."""
    from regentime.fileformat import load_cavity
    from tests.independent.reference import plan
    live = plan(load_cavity(str(ROOT / name)))
    rec = REC[name]
    for key in ("round_trip_time_s", "output_energy_J", "nearest_pre_ratio", "on_edge_s",
                "off_edge_s"):
        assert live[key] == pytest.approx(rec[key], rel=1e-9), key
    assert live["dump_round_trip"] == rec["dump_round_trip"]
    assert live["seed_pulse_index"] == rec["seed_pulse_index"]


@pytest.mark.parametrize("name", FILES)
def test_recording_is_current(name):
    digest = hashlib.sha256((ROOT / name).read_bytes()).hexdigest()
    assert digest == REC[name]["sha256"], \
        f"{name} changed since the recording: run python -m tests.independent.make_reference"


# ------------------------------------------------------------ regentime against the reference


@pytest.mark.parametrize("name", _param("round_trip_time"))
def test_round_trip_time(tool, name):
    assert abs(tool[name]["round_trip_time_s"] - REC[name]["round_trip_time_s"]) <= 3 * PS


@pytest.mark.parametrize("name", _param("round_trip"))
def test_switch_out_round_trip(tool, name):
    assert tool[name]["dump"]["round_trip"] == REC[name]["dump_round_trip"]


@pytest.mark.parametrize("name", _param("output"))
def test_output_energy(tool, name):
    rec = REC[name]
    # period 2 (continuous pump): regentime reports the mean of the two alternating outputs
    ref = rec.get("output_mean_J", rec["output_energy_J"])
    assert tool[name]["dump"]["output_energy_J"] == pytest.approx(ref, rel=0.03)


@pytest.mark.parametrize("name", _param("seed"))
def test_seed_pulse(tool, name):
    assert tool[name]["seed_pulse_index"] == REC[name]["seed_pulse_index"]


@pytest.mark.parametrize("name", _param("on_edge"))
def test_switch_on_edge_inside_window(tool, name):
    lo, hi = REC[name]["on_window_s"]
    assert lo <= tool[name]["switch"]["on_edge_s"] <= hi


@pytest.mark.parametrize("name", _param("on_window"))
def test_switch_on_window_length(tool, name):
    lo, hi = REC[name]["on_window_s"]
    a, b = tool[name]["switch"]["on_window_s"]
    assert (b - a) == pytest.approx(hi - lo, rel=0.15)


@pytest.mark.parametrize("name", _param("off_window"))
def test_switch_off_window(tool, name):
    lo, hi = REC[name]["off_window_s"]
    a, b = tool[name]["switch"]["off_window_s"]
    assert (b - a) == pytest.approx(hi - lo, rel=0.15)
    assert lo <= tool[name]["switch"]["off_edge_s"] <= hi


@pytest.mark.parametrize("name", _param("off_edge"))
def test_switch_off_edge(tool, name):
    assert abs(tool[name]["switch"]["off_edge_s"] - REC[name]["off_edge_s"]) <= 10 * PS


@pytest.mark.parametrize("name", _param("gate"))
def test_gate_width(tool, name):
    assert abs(tool[name]["switch"]["gate_width_s"] - REC[name]["gate_width_s"]) <= 10 * PS


@pytest.mark.parametrize("name", _param("delays"))
def test_delays(tool, name):
    rows = {r["drives"]: r for r in tool[name]["timing_table"]}
    want = REC[name]["delays_s"]
    assert want, "the reference found no delays"
    for drive, delay in want.items():
        assert drive in rows, f"no row drives {drive}"
        assert rows[drive]["problem"] is None
        assert abs(rows[drive]["delay_s"] - delay) <= 10 * PS, drive


@pytest.mark.parametrize("name", _param("pre"))
def test_nearest_pre_pulse_ratio(tool, name):
    assert tool[name]["contrast"]["nearest_pre_ratio"] == pytest.approx(
        REC[name]["nearest_pre_ratio"], rel=0.20)


@pytest.mark.parametrize("name", _param("period"))
def test_plan_period(tool, name):
    rec = REC[name]
    if "period" not in rec:
        assert tool[name]["dump"].get("period", 1) == 1  # pulsed pump: one energy per shot
    else:
        assert tool[name]["dump"]["period"] == rec["period"]


# (resolved) regentime stability used to call a slowly converging period-1 point (fixed-point
# multiplier -0.988) period 2; a stable fixed point now classifies as period 1.
STAB_XFAIL: dict = {}


def _period_points():
    out = []
    for f in FILES:
        pts = REC[f].get("period_points")
        if not pts:
            continue
        for i, n in enumerate(pts["round_trips"]):
            for j, rate in enumerate(pts["rates_Hz"]):
                reason = STAB_XFAIL.get((f, n, rate))
                marks = [pytest.mark.xfail(strict=True, reason=reason)] if reason else []
                out.append(pytest.param(f, n, rate, pts["period"][i][j], marks=marks,
                                        id=f"{pathlib.Path(f).stem}-N{n}-{rate / 1e3:g}kHz"))
    return out


@pytest.fixture(scope="module")
def stability_maps():
    """regentime stability --format json at the recorded (round trips, rate) points."""
    def one(f):
        pts = REC[f]["period_points"]
        return _run(["stability", f, "--rates", ",".join(f"{r:g}Hz" for r in pts["rates_Hz"]),
                     "--round-trips", ",".join(str(n) for n in pts["round_trips"]),
                     "--format", "json", "--no-progress"])
    files = [f for f in FILES if "period_points" in REC[f]]
    with ThreadPoolExecutor(max_workers=4) as ex:
        return dict(zip(files, ex.map(one, files)))


@pytest.mark.parametrize("name, n, rate, period", _period_points())
def test_stability_period(stability_maps, name, n, rate, period):
    out = stability_maps[name]
    i = out["round_trips"].index(n)
    j = [round(r) for r in out["rates_Hz"]].index(round(rate))
    # period[i][j]: round trips i, rate j; 0 = irregular (no period found) in both
    assert out["period"][i][j] == period
