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


# ----- fast path (pandas, the optional `trace` extra) against the exact numpy path ----------
#
# Reference for every comparison: numpy.loadtxt (general-purpose library) and Python's
# float(), which the Python documentation states rounds correctly (nearest double to the
# decimal text, IEEE 754 round-half-even); the numpy path of the reader is checked against
# them above and here, the fast path must equal it bit for bit.

from regentime.trace import fastparse  # noqa: E402

needs_pandas = pytest.mark.skipif(not fastparse.available(),
                                  reason="pandas >= 3.1 (the trace extra) not installed")

_R = [f"{t:.9e},{a:.17g},{b:.6e}" for t, a, b in zip(T, V1, V2)]
LAYOUTS = {
    "csv header": "Time (s),CH1,CH2\n" + "\n".join(_R) + "\n",
    "csv crlf, no final newline": "t,a,b\r\n" + "\r\n".join(_R),
    "csv blank lines, bom": "\ufefft,a,b\n\n" + "\n".join(_R[:100]) + "\n\n\n" + "\n".join(_R[100:]) + "\n",
    "csv no header": "\n".join(_R) + "\n",
    "csv trailing delimiter": "t,a,b,\n" + "".join(r + ",\n" for r in _R),
    "csv spaces around fields": "t,a,b\n" + "\n".join(r.replace(",", " , ") for r in _R) + "\n",
    "semicolon decimal comma, metadata": "Model: bench recorder (invented)\ntime [ms];pd;gate\n" +
        "\n".join(r.replace(",", ";").replace(".", ",") for r in _R) + "\n",
    "tab, metadata unit": "# time unit: ns\n" + "\n".join(r.replace(",", "\t") for r in _R) + "\n",
    "whitespace, units row": "t signal gate\n(us) (V) (V)\n" +
        "\n".join("  " + r.replace(",", "   ") for r in _R) + "\n",
    "whitespace, tabs and spaces": "t a b\n" + "\n".join(r.replace(",", " \t ") for r in _R) + "\n",
    "whitespace, tab rows after space rows": "t a b\n" + "\n".join(_R[:300]).replace(",", "  ") + "\n" +
        "\n".join(_R[300:]).replace(",", "\t") + "\n",
    "whitespace, ragged leading spaces": "t a b\n" + "\n".join(
        " " * (i % 4) + r.replace(",", " " * (1 + i % 3)) + " " * (i % 2) for i, r in enumerate(_R)) + "\n",
    "whitespace decimal comma": "t a b\n" + "\n".join(r.replace(",", " ").replace(".", ",") for r in _R) + "\n",
}


@needs_pandas
@pytest.mark.parametrize("name", list(LAYOUTS))
def test_fast_and_numpy_paths_identical_on_every_layout(tmp_path, name):
    p = _write(tmp_path / "l.txt", LAYOUTS[name])
    fast = read_trace(p, parser="pandas")
    exact = read_trace(p, parser="numpy")
    assert fast.parser == "pandas" and exact.parser == "numpy"  # both paths really ran
    for ch in ("1", "2"):
        a, b = read_trace(p, channel=ch, parser="pandas"), read_trace(p, channel=ch, parser="numpy")
        assert a.signal.tobytes() == b.signal.tobytes() and a.time.tobytes() == b.time.tobytes()
    assert (fast.channels, fast.time_unit, fast.layout, fast.first_data_line) == \
        (exact.channels, exact.time_unit, exact.layout, exact.first_data_line)
    assert fast.t0 == exact.t0 and fast.sample_interval == exact.sample_interval
    assert fast.signal.flags.c_contiguous  # each column is one contiguous array
    # outside reference: Python's correctly rounded float() on the text of each field
    ref = np.array([float(r.split(",")[1]) for r in _R])
    np.testing.assert_array_equal(read_trace(p, channel="1", parser="pandas").signal, ref)


@needs_pandas
def test_fast_path_bits_equal_loadtxt_on_hard_decimals(tmp_path):
    """17-digit mantissas, exponents near the ends of the double range, subnormals, and
    decimals next to halfway points: the fast path equals numpy.loadtxt and float()."""
    rng = np.random.default_rng(7)
    n = 4000
    mant = rng.integers(10**16, 10**17, n)
    expo = rng.integers(-320, 300, n)
    vals = [f"{m // 10**16}.{m % 10**16:016d}e{e:d}" for m, e in zip(mant, expo)]
    # halfway cases between two doubles, written out exactly, nudged by one in the last digit
    x = rng.uniform(0.5, 1.0, 200)
    from decimal import Decimal
    for v in x:
        mid = (Decimal(float(v)) + Decimal(float(np.nextafter(v, 2.0)))) / 2
        vals += [f"{mid:.40e}", f"{mid + Decimal('1e-45'):.40e}", f"{mid - Decimal('1e-45'):.40e}"]
    vals += ["4.9406564584124654e-324", "2.2250738585072011e-308", "1.7976931348623157e308"]
    lines = [f"{i}e-10,{v}" for i, v in enumerate(vals)]
    p = _write(tmp_path / "hard.csv", "t,v\n" + "\n".join(lines) + "\n")
    fast = read_trace(p, parser="pandas")
    assert fast.parser == "pandas"
    ref = np.loadtxt(p, delimiter=",", skiprows=1)[:, 1]  # reference: numpy's own reader
    assert fast.signal.tobytes() == ref.tobytes()
    assert fast.signal.tobytes() == np.array([float(v) for v in vals]).tobytes()  # float()
    assert read_trace(p, parser="numpy").signal.tobytes() == ref.tobytes()


@needs_pandas
def test_fast_path_grows_output_and_chunks(tmp_path, monkeypatch):
    """Tiny pandas chunks and a short size estimate: same arrays as the numpy path."""
    p = _write(tmp_path / "g.csv", LAYOUTS["csv header"])
    monkeypatch.setattr(fastparse, "_CHUNK_ROWS", 7)
    monkeypatch.setattr(fastparse, "rows_estimate", lambda *a: 5)
    fast = read_trace(p, parser="pandas")
    assert fast.parser == "pandas"
    assert fast.signal.tobytes() == read_trace(p, parser="numpy").signal.tobytes()


def test_without_pandas_numpy_path_is_used(tmp_path, monkeypatch):
    monkeypatch.setitem(fastparse._state, "ok", False)  # as if the trace extra were absent
    p = _write(tmp_path / "a.csv", LAYOUTS["csv header"])
    tr = read_trace(p, parser="pandas")
    assert tr.parser == "numpy"
    np.testing.assert_array_equal(tr.signal, np.loadtxt(p, delimiter=",", skiprows=1)[:, 1])
    with pytest.raises(ValueError):
        read_trace(p, parser="fastest")


_GOOD = "\n".join(f"{i}e-10,{i}" for i in range(30))


@pytest.mark.parametrize("parser", ["pandas", "numpy"])
@pytest.mark.parametrize("body,line,what", [
    ("time,v\n" + _GOOD + "\n3e-9,abc\n4e-9,1\n", 32, "column 2"),
    ("time,v\n" + _GOOD + "\n3e-9\n4e-9,1\n", 32, "2 fields"),
    ("time,v\n" + _GOOD + "\n3e-9,\n4e-9,1\n", 32, "2 fields"),  # a trailing comma is allowed
    ("time,v\n" + _GOOD + "\n3e-9,nan\n4e-9,1\n", 32, "finite"),
    ("time,v\n" + _GOOD + '\n"3e-9",1\n4e-9,1\n', 32, "column 1"),
    ("time,v\n" + _GOOD + "\n3e-9,1D3\n4e-9,1\n", 32, "column 2"),
    ("time,v\n" + _GOOD + "\n3e-9,2\xb5\n4e-9,1\n", 32, "column 2"),
    ("time,v\n" + _GOOD + "\n1e-10,5\n", 32, "time must increase"),
], ids=["word", "short row", "empty field", "nan", "quoted", "D exponent", "unit glued", "time back"])
def test_malformed_names_the_line_on_both_paths(tmp_path, parser, body, line, what):
    p = _write(tmp_path / "bad.csv", body)
    with pytest.raises(InputError) as exc:
        read_trace(p, parser=parser)
    msg = exc.value.one_line()
    assert f":{line}:" in msg and what in msg and "\n" not in msg


def test_line_of_only_spaces(tmp_path):
    """Stated difference: the numpy path stops at a line of only spaces inside delimited
    rows and names it; pandas' reader (fast path) skips it like an empty line."""
    p = _write(tmp_path / "sp.csv", "time,v\n" + _GOOD + "\n   \n3e-9,1\n")
    with pytest.raises(InputError, match=":32:.*only spaces"):
        read_trace(p, parser="numpy")
    if fastparse.available():
        tr = read_trace(p, parser="pandas")
        assert tr.parser == "pandas" and tr.n_samples == 31


def test_auto_parser_picks_by_size(tmp_path, monkeypatch):
    """Small files stay on the numpy path (importing pandas would cost more than it saves),
    unless pandas is already imported; large ones go to pandas when it is installed."""
    import regentime.trace.reader as rd

    p = _write(tmp_path / "a.csv", LAYOUTS["csv header"])
    monkeypatch.setattr(rd, "_pandas_imported", lambda: False)
    assert read_trace(p).parser == "numpy"
    monkeypatch.setattr(rd, "_pandas_imported", lambda: True)
    assert read_trace(p).parser == ("pandas" if fastparse.available() else "numpy")
    monkeypatch.setattr(rd, "_pandas_imported", lambda: False)
    monkeypatch.setattr(rd, "_FAST_MIN_BYTES", 1)
    assert read_trace(p).parser == ("pandas" if fastparse.available() else "numpy")


@needs_pandas
def test_fast_parse_failure_on_valid_file_falls_back_to_same_arrays(tmp_path):
    """Space-separated rows, then tab-separated ones past the 64 KiB the layout is sniffed
    from: the single-space fast parse fails there, the numpy path reads the whole file."""
    n = 3000
    rows = [f"{i * 5e-11:.9e}{'  ' if i < 2000 else chr(9)}{np.sin(i):.9e}" for i in range(n)]
    p = _write(tmp_path / "mixed.dat", "t v\n" + "\n".join(rows) + "\n")
    tr = read_trace(p, parser="pandas")
    assert tr.parser == "numpy" and tr.n_samples == n
    ref = np.loadtxt(p, skiprows=1)  # reference: numpy's own reader
    assert tr.signal.tobytes() == ref[:, 1].tobytes()
