"""Trace reader: layouts, units, channels, numpy files and errors naming the line.

The reference for every parsed value is numpy.loadtxt / the array written (general-purpose
library); the layouts are invented test files written here.
"""

from __future__ import annotations

import numpy as np
import pytest

from regentime.errors import InputError
from regentime.trace.reader import read_trace

N = 400
T = np.arange(N) * 50e-12  # 20 GS/s
V1 = np.sin(np.arange(N) * 0.3) * 0.25
V2 = np.cos(np.arange(N) * 0.1) * 1e-3


def _write(path, text):
    path.write_text(text, encoding="utf-8")
    return str(path)


def _rows(fmt, scale=1.0, comma=False):
    out = []
    for t, a, b in zip(T / scale, V1, V2):
        line = fmt.format(t, a, b)
        out.append(line.replace(".", ",") if comma else line)
    return "\n".join(out) + "\n"


def test_csv_with_header_matches_loadtxt(tmp_path):
    p = _write(tmp_path / "a.csv", "Time (s),CH1,CH2\n" + _rows("{:.6e},{:.6e},{:.6e}"))
    tr = read_trace(p)
    ref = np.loadtxt(p, delimiter=",", skiprows=1)  # reference: numpy's own reader
    np.testing.assert_array_equal(tr.time, ref[:, 0])
    np.testing.assert_array_equal(tr.signal, ref[:, 1])
    assert tr.channel == "CH1" and tr.channels == ("CH1", "CH2")
    assert tr.sample_interval == pytest.approx(50e-12, rel=1e-6)


def test_semicolon_decimal_comma_ms_and_metadata(tmp_path):
    text = "Model: bench recorder (invented)\nDate: 2026-01-01\ntime [ms];pd;gate\n" + \
        _rows("{:.9f};{:.6f};{:.6f}", scale=1e-3, comma=True)
    tr = read_trace(_write(tmp_path / "b.txt", text))
    assert tr.time_unit == "ms"
    np.testing.assert_allclose(tr.time, T, atol=1e-15)  # printed to 1e-12 ms = 1e-15 s
    np.testing.assert_allclose(tr.signal, V1, atol=5e-7)  # 6 decimals printed
    assert tr.channel == "pd"  # a column named like a photodiode wins by default
    assert "decimal comma" in tr.layout


def test_tab_with_metadata_unit_line_and_channel_by_number(tmp_path):
    text = "# acquisition export\n# time unit: ns\n" + _rows("{:.4f}\t{:.6e}\t{:.6e}", scale=1e-9)
    tr = read_trace(_write(tmp_path / "c.tsv", text), channel="2")
    assert tr.time_unit == "ns"
    np.testing.assert_allclose(tr.signal, V2, rtol=1e-6)
    np.testing.assert_allclose(tr.time, T, atol=1e-16)


def test_whitespace_with_units_row_us(tmp_path):
    text = "t signal gate\n(us) (V) (V)\n" + _rows("  {:.8e}   {:+.5e}   {:.3e}", scale=1e-6)
    tr = read_trace(_write(tmp_path / "d.dat", text), channel="signal")
    assert tr.time_unit == "us"
    np.testing.assert_allclose(tr.time, T, rtol=1e-8, atol=1e-20)


def test_npy_and_npz(tmp_path):
    np.save(tmp_path / "e.npy", np.c_[T, V1])
    tr = read_trace(str(tmp_path / "e.npy"))
    np.testing.assert_array_equal(tr.signal, V1)
    np.savez(tmp_path / "f.npz", time_ns=T * 1e9, pd=V1, other=V2)
    tr = read_trace(str(tmp_path / "f.npz"))
    np.testing.assert_allclose(tr.time, T, rtol=1e-12)
    assert tr.channel == "pd" and tr.time_unit == "ns"


def test_parallel_parse_equals_serial(tmp_path):
    """Forked workers write the same numbers as a single parse (numpy.loadtxt as reference)."""
    p = _write(tmp_path / "g.csv", "time,v\n" + _rows("{:.6e},{:.6e},{:.6e}").replace(
        "\n", "\n", 1))
    import regentime.trace.reader as rd

    old = rd._CHUNK_BYTES
    rd._CHUNK_BYTES = 2048  # many small chunks
    try:
        par = read_trace(p, workers=2)
        ser = read_trace(p, workers=1)
    finally:
        rd._CHUNK_BYTES = old
    np.testing.assert_array_equal(par.signal, ser.signal)
    np.testing.assert_array_equal(par.time, np.loadtxt(p, delimiter=",", skiprows=1)[:, 0])


@pytest.mark.parametrize("body,line,what", [
    ("time,v\n" + "\n".join(f"{i}e-10,{i}" for i in range(30)) + "\n3e-9,abc\n", 32, "column 2"),
    ("time;v\n" + "\n".join(f"{i}e-10;{i}" for i in range(30)) + "\n3e-9\n", 32, "2 fields"),
    ("time,v\n" + "\n".join(f"{i}e-10,{i}" for i in range(30)) + "\n1e-10,5\n", 32, "time must increase"),
])
def test_malformed_names_the_line(tmp_path, body, line, what):
    p = _write(tmp_path / "bad.csv", body)
    with pytest.raises(InputError) as exc:
        read_trace(p)
    msg = exc.value.one_line()
    assert f":{line}:" in msg and what in msg and "\n" not in msg


def test_empty_and_non_numeric(tmp_path):
    with pytest.raises(InputError, match="empty"):
        read_trace(_write(tmp_path / "empty.csv", ""))
    with pytest.raises(InputError, match="no numeric rows"):
        read_trace(_write(tmp_path / "words.csv", "this is\nnot a trace\n"))
    with pytest.raises(InputError, match="--channel"):
        read_trace(_write(tmp_path / "ok.csv", "t,a\n" + "\n".join(f"{i}e-9,{i}" for i in range(40))),
                   channel="nope")


def test_trailing_delimiter_rows(tmp_path):
    """Rows ending in a delimiter (as some exporters write them) read like plain rows."""
    text = "Time,CH1,\n" + "".join(f"{t:.6e},{v:.6e},\n" for t, v in zip(T, V1))
    tr = read_trace(_write(tmp_path / "h.csv", text))
    assert tr.channels == ("CH1",)
    np.testing.assert_allclose(tr.signal, V1, rtol=1e-6, atol=1e-12)  # 7 significant digits printed
