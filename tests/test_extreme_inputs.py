"""Valid but absurd physics (a 1 µm mode, a 90 J pump into a 5 µm mode) is exit 3 with the
numbers, never an internal error (exit 1).  The overflow bound is numpy's float64 range:
a small-signal gain of e^(F_st/J_sat) overflows once F_st/J_sat exceeds ln(1.8e308) ≈ 709.8
(numpy.finfo(float).max)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[1]
TI = ROOT / "cavities" / "ti_sapphire_1khz.yaml"


def _variant(tmp_path: Path, radius: str, pump: str | None = None) -> Path:
    text = TI.read_text()
    lines = []
    for line in text.splitlines():
        if line.strip().startswith("thermal_lens:"):
            continue  # a 90 kW average pump would make the cavity unstable (exit 2) first
        if line.strip().startswith("mode_radius:"):
            line = line.split("mode_radius:")[0] + f"mode_radius: {radius}"
        if pump and line.strip().startswith("energy: 9 mJ"):
            line = line.split("energy:")[0] + f"energy: {pump}"
        lines.append(line)
    path = tmp_path / "extreme.yaml"
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.mark.parametrize("radius,pump", [("1 um", None), ("5 um", "90 J")])
def test_overflowing_gain_is_exit_3_with_the_numbers(tmp_path, radius, pump):
    path = _variant(tmp_path, radius, pump)
    assert "mode_radius: " + radius in path.read_text()
    proc = subprocess.run([sys.executable, "-m", "regentime", "plan", str(path)],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert proc.returncode == 3, proc.stderr
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and len(lines[0]) <= 300
    assert "overflows" in lines[0] and "mode_radius" in lines[0]
    assert "internal error" not in proc.stderr


def test_overflow_bound_is_the_float_range():
    # the message's premise: beyond ~709.8 e-folds no float64 holds the gain
    with np.errstate(over="ignore"):
        assert np.isinf(np.exp(np.float64(np.log(np.finfo(float).max)) + 1.0))
    assert np.log(np.finfo(float).max) == pytest.approx(709.78, abs=0.01)
