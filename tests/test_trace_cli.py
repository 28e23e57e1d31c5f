"""``regentime trace FILE SCOPE``: exit codes, JSON keys, one-line errors, the plot.

The synthetic trace is made from the project's own build-up of an example cavity (an
invented demo file) whose first space is made 12 mm longer: the expected length error is
therefore known exactly ((T_real − T_file)·c/2 with c from scipy.constants).
"""

from __future__ import annotations

import dataclasses
import json
import os

import numpy as np
import pytest
from scipy.constants import c as C_SCIPY

from regentime.cli import main

CAVITY = os.path.join(os.path.dirname(__file__), "..", "cavities", "nd_ylf_ps_10hz.yaml")
KEYS = ("measured_round_trip_s", "model_round_trip_s", "length_error_m", "pulses", "peak_index",
        "observed_dump_index", "dump_offset_round_trips", "switch_off_shift_s", "fit")


@pytest.fixture(scope="module")
def scope_file(tmp_path_factory):
    from regentime.fileformat import load_cavity
    from regentime.model import Space
    from regentime.planning.optics import cavity_optics
    from regentime.planning.buildup_plan import plan_buildup
    from regentime.trace.synthetic import synthetic_trace

    cav = load_cavity(CAVITY)
    els = list(cav.elements)
    i = next(k for k, e in enumerate(els) if isinstance(e, Space))
    els[i] = dataclasses.replace(els[i], length=els[i].length + 0.012)
    real = dataclasses.replace(cav, elements=tuple(els))
    optics = cavity_optics(real)
    energy = plan_buildup(real, optics).result.energy
    peak = int(np.argmax(energy))
    t, v = synthetic_trace(energy, optics.round_trip_time, peak + 3, dt=100e-12, seed=7)
    path = tmp_path_factory.mktemp("scope") / "scope.txt"
    with open(path, "w") as fh:
        fh.write("invented demo trace\nsample interval 100 ps\ntime/ns\tpd\n")
        np.savetxt(fh, np.c_[t * 1e9, v], fmt="%.5f", delimiter="\t")
    t_file = cavity_optics(cav).round_trip_time
    return str(path), optics.round_trip_time, t_file


def test_json_has_the_contract_keys(scope_file, capsys):
    path, t_real, t_file = scope_file
    assert main(["trace", CAVITY, path, "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    for k in KEYS:
        assert k in d
    assert abs(d["measured_round_trip_s"] - t_real) < 15e-12  # judged tolerance 15 ps
    assert d["length_error_m"] == pytest.approx((t_real - t_file) * C_SCIPY / 2, abs=2e-3)
    assert abs(d["dump_offset_round_trips"] - (-3)) <= 1
    assert d["switch_off_shift_s"] == pytest.approx(d["dump_offset_round_trips"] * d["measured_round_trip_s"])
    assert set(d["pulses"][0]) == {"time_s", "amplitude"}
    assert "values" in d["fit"] and "uncertainties" in d["fit"]
    assert any("IEC 60825-1" in c for c in d["cautions"])


def test_text_md_and_plot(scope_file, tmp_path, capsys):
    path, _, _ = scope_file
    png = tmp_path / "t.png"
    assert main(["trace", CAVITY, path, "--plot", str(png)]) == 0
    out = capsys.readouterr().out
    assert "measured round trip" in out and "IEC 60825-1" in out
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert main(["trace", CAVITY, path, "-f", "md"]) == 0
    assert "| measured round trip |" in capsys.readouterr().out


def test_malformed_trace_exit_2_one_line(tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("time,v\n" + "\n".join(f"{i}e-10,{i}" for i in range(40)) + "\n4.1e-9,1.2.3\n")
    assert main(["trace", CAVITY, str(bad)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and ":42:" in err and "Traceback" not in err


def test_empty_trace_exit_2(tmp_path, capsys):
    empty = tmp_path / "empty.csv"
    empty.write_text("")
    assert main(["trace", CAVITY, str(empty)]) == 2
    assert "empty" in capsys.readouterr().err
