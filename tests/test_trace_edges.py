"""Trace files a user may point the tool at by mistake: a device, a symlink loop, an all-NaN
channel, values near the float limit.  Each is exit 2 with a line that says what is wrong,
and no numpy warning reaches the terminal."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[1]
TI = str(ROOT / "cavities" / "ti_sapphire_1khz.yaml")


def _trace(path: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "regentime", "trace", TI, path],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)


def _one_line(proc: subprocess.CompletedProcess) -> str:
    assert proc.returncode == 2, proc.stderr
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert "Warning" not in proc.stderr
    return lines[0]


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="no /dev/zero here")
def test_device_is_not_called_an_empty_file():
    line = _one_line(_trace("/dev/zero"))
    assert "not a device" in line and "empty" not in line


def test_symlink_loop_is_named(tmp_path):
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    a.symlink_to(b)
    b.symlink_to(a)
    assert "symlink loop" in _one_line(_trace(str(a)))


def test_all_nan_channel_is_named(tmp_path):
    t = np.arange(4000) * 1e-10
    path = tmp_path / "nan.npy"
    np.save(path, np.c_[t, np.full(t.size, np.nan)])
    line = _one_line(_trace(str(path)))
    assert "NaN" in line and "pulse(s)" not in line


def test_values_near_the_float_limit_print_no_warning(tmp_path):
    t = np.arange(4000) * 1e-10
    rng = np.random.default_rng(3)
    y = 1e300 * rng.standard_normal(t.size)
    y[::200] = 9e304
    path = tmp_path / "huge.csv"
    np.savetxt(path, np.c_[t, y], delimiter=",", header="time_s,photodiode_V", comments="")
    proc = _trace(str(path))
    assert "RuntimeWarning" not in proc.stderr and "Traceback" not in proc.stderr
    assert proc.returncode == 2 and "signal values below" in proc.stderr
