"""Read an oscilloscope or acquisition-program trace: time column plus signal columns.

Accepted layouts (detected from the first 64 KiB, never configured):

* delimited text — comma, semicolon, tab or whitespace separated; any number of metadata or
  header lines before the numbers; the last non-numeric line with as many fields as the data
  names the columns; a line of units right after it (``(s),(V)``) is understood;
* scientific notation, ``nan``/``inf`` spellings; decimal commas where the delimiter is not a
  comma (``1,5e-9;0,25``);
* the first column is time, in seconds unless the header (``Time (ms)``, ``t[ns]``, ``time_us``)
  or a metadata line (``time unit: ns``) names another unit (s, ms, us/µs, ns, ps);
* ``.npy`` (a 2-D array, time first; or a structured array with named fields) and ``.npz``
  (named 1-D arrays, the time one called ``t``/``time``/``x`` with an optional unit suffix, or
  one 2-D array; or ``dt`` [+ ``t0``] and signal arrays).

Speed: the layout is detected here; the numeric block is then parsed in C, never one Python
object per sample.  With the optional ``trace`` extra (pandas >= 3.1) it goes to pandas' C
reader in chunks (:mod:`regentime.trace.fastparse`, about 1.5x faster than
:func:`numpy.loadtxt` on a 10-million-sample file, same bits).  Without it, or whenever that
parse fails or finds a non-finite value, the exact numpy path runs: :func:`numpy.loadtxt` on a
file handle positioned at each chunk, or :func:`numpy.fromstring` after translating decimal
commas, into one preallocated array, large files split at line boundaries across forked
worker processes.  The numpy path is the one that names the bad line of a malformed file.

Errors raise :class:`regentime.errors.InputError` naming the file and the line.
"""

from __future__ import annotations

import mmap
import os
import re
import sys
from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from regentime.errors import InputError
from regentime.trace.source_checks import check_finite_channel, check_trace_path
from regentime.trace.sniff import NUM_COMMA_RE, NUM_RE, SNIFF_BYTES, Sniff, sniff, split_fields

_CHUNK_BYTES = 1 << 23  # 8 MiB of text per parse job: bounded scratch memory, few jobs
_PARALLEL_MIN_BYTES = 1 << 26  # below 64 MiB forking costs more than it saves
# below 32 MiB of numbers, importing pandas (~0.2 s) costs more than its faster parse saves
# over the numpy path (measured: benchmarks/bench_trace_read.py, docs/trace.md)
_FAST_MIN_BYTES = 1 << 25
_MIN_SAMPLES = 16

TIME_UNITS = {"s": 1.0, "sec": 1.0, "secs": 1.0, "second": 1.0, "seconds": 1.0,
              "ms": 1e-3, "us": 1e-6, "\u00b5s": 1e-6, "\u03bcs": 1e-6, "ns": 1e-9, "ps": 1e-12}

_UNIT_IN_NAME = re.compile(
    r"(?:[\(\[{]\s*(?P<a>[a-zA-Z\u00b5\u03bc]+)\s*[\)\]}]"  # Time (ms), t[ns], {us}
    r"|[/_ -](?P<b>[a-zA-Z\u00b5\u03bc]+)\s*$"  # time/ns, time_us, "time ns"
    r"|^(?P<c>[a-zA-Z\u00b5\u03bc]+)$)"  # a bare unit as the column name: "s"
)
_TIME_NAMES = re.compile(r"^(?:t|time|x|times?)(?:[ _/-]?(?:s|ms|us|\u00b5s|\u03bcs|ns|ps))?$", re.I)
_PD_NAMES = re.compile(r"photo|diode|\bpd\b|^pd", re.I)


@dataclass
class Trace:
    """A trace as read: time in seconds and one chosen signal column (file units, normally V)."""

    time: np.ndarray  # s, as written in the file (converted to seconds)
    signal: np.ndarray  # the chosen channel
    channel: str  # name of the chosen channel
    channels: tuple  # names of every signal column
    source: str  # file path
    time_unit: str  # unit the file's time column was in
    layout: str  # human description of what was detected
    first_data_line: int = 0  # 1-based line number of the first data row (0 for npy/npz)
    t0: float = 0.0  # s, fitted time of sample 0 (t = t0 + i·dt)
    sample_interval: float = 0.0  # s, fitted dt
    notes: list = field(default_factory=list)
    parser: str = "numpy"  # which parser read the numbers: "pandas" (fast path), "numpy", "npy"

    @property
    def n_samples(self) -> int:
        return int(self.signal.size)


# ----- public entry ------------------------------------------------------------------------


def read_trace(path: str, channel: Optional[str] = None, workers: Optional[int] = None,
               parser: str = "auto") -> Trace:
    """Read ``path`` and return a :class:`Trace` with the chosen ``channel``.

    ``channel``: a column name (case-insensitive) or a number counting the signal columns
    from 1; default: a column whose name says photodiode, else the first signal column.
    ``workers``: parallel parse processes of the numpy path for large text files (default:
    automatic).  ``parser``: ``"auto"`` (pandas' C reader when the ``trace`` extra is
    installed and the file is large enough to repay importing pandas, or pandas is already
    imported; else numpy), ``"pandas"`` (the fast path whatever the size, if installed) or
    ``"numpy"`` (always the exact numpy path).  Both give the same arrays bit for bit; a file
    the fast parser cannot read goes to the numpy path, which names the bad line.
    """
    if parser not in ("auto", "pandas", "numpy"):
        raise ValueError(f"parser must be 'auto', 'pandas' or 'numpy', not {parser!r}")
    check_trace_path(path)
    lower = path.lower()
    if lower.endswith(".npy") or lower.endswith(".npz"):
        names, units, columns, layout = _read_numpy(path)
        first_line, used = 0, "npy"
    else:
        names, units, columns, layout, first_line, used = _read_text(path, workers, parser)
    time_name, sig_names = names[0], list(names[1:])
    scale, unit = _time_scale(time_name, units)
    time = columns[0]
    if scale != 1.0:
        time = time * scale
    idx = _pick_channel(sig_names, channel, path)
    check_finite_channel(sig_names[idx], columns[1 + idx], path)
    trace = Trace(time=time, signal=columns[1 + idx], channel=sig_names[idx], channels=tuple(sig_names),
                  source=path, time_unit=unit, layout=layout, first_data_line=first_line,
                  parser=used)
    _check_time(trace)
    return trace


# ----- text --------------------------------------------------------------------------------


def _read_text(path: str, workers: Optional[int], parser: str = "auto"):
    size = os.path.getsize(path)
    if size == 0:
        raise InputError("", "(empty file)", "a trace: a time column and at least one signal column",
                         source=path)
    with open(path, "rb") as fh:
        head = fh.read(SNIFF_BYTES)
    sn = sniff(path, head)
    desc = {",": "comma", ";": "semicolon", "\t": "tab", None: "whitespace"}[sn.delimiter]
    layout = f"{desc}-separated" + (", decimal comma" if sn.decimal_comma else "") + \
        f", {sn.ncols} columns, {sn.preamble} line(s) before the data"
    units = dict(sn.units)
    if "row" in units:
        units["time_row"] = units["row"][0]
    big = size - sn.data_offset >= _FAST_MIN_BYTES or _pandas_imported()
    if parser == "pandas" or (parser == "auto" and big):
        from regentime.trace import fastparse

        if fastparse.available():
            block = fastparse.parse_block(path, sn.data_offset, sn.ncols, sn.delimiter,
                                          sn.decimal_comma,
                                          fastparse.rows_estimate(head, sn.data_offset, size),
                                          head[sn.data_offset:])
            if block is not None and block.shape[1] >= _MIN_SAMPLES:
                return sn.names, units, [block[k] for k in range(sn.ncols)], layout, \
                    sn.data_line + 1, "pandas"
    out = _read_text_numpy(path, sn, size, workers)
    return sn.names, units, [out[:, k] for k in range(sn.ncols)], layout, sn.data_line + 1, "numpy"


def _pandas_imported() -> bool:
    return "pandas" in sys.modules


def _read_text_numpy(path: str, sn: Sniff, size: int, workers: Optional[int]) -> np.ndarray:
    """The exact path: numpy's C reader chunk by chunk; errors name the line."""
    jobs = _plan_chunks(path, sn.data_offset, size)
    rows_total = sum(j[2] for j in jobs)
    if rows_total < _MIN_SAMPLES:
        raise InputError("", f"{rows_total} data rows", f"at least {_MIN_SAMPLES} samples", source=path)
    nworkers = _workers(workers, size, len(jobs))
    if nworkers > 1:
        buf = mmap.mmap(-1, rows_total * sn.ncols * 8)
        out = np.frombuffer(buf, dtype=np.float64).reshape(rows_total, sn.ncols)
        _parse_parallel(path, sn, jobs, out, nworkers)
    else:
        out = np.empty((rows_total, sn.ncols))
        for job in jobs:
            err = _parse_job(path, sn, job, out)
            if err:
                raise _job_error(path, sn, err)
    _check_finite(path, sn, out, jobs)
    return out


def _plan_chunks(path: str, start: int, size: int) -> list:
    """[(byte_start, byte_end, rows, first_line_number, first_row)] split at newlines.

    Each chunk holds about ``_CHUNK_BYTES``; ``rows`` counts its non-blank lines (what the
    parsers read), found with one vectorised pass over the newline positions.
    """
    jobs = []
    with open(path, "rb") as fh:
        line = fh.read(start).count(b"\n") + 1
        pos, row = start, 0
        while pos < size:
            fh.seek(pos)
            block = fh.read(_CHUNK_BYTES)
            if not block:
                break
            if pos + len(block) < size:
                cut = block.rfind(b"\n")
                while cut < 0:  # one enormous line: read on to its end
                    extra = fh.read(1 << 20)
                    if not extra:
                        break
                    block += extra
                    cut = block.rfind(b"\n")
                if cut >= 0:
                    block = block[: cut + 1]
            rows, nl = _count_rows(block)
            if rows > 0:
                jobs.append((pos, pos + len(block), rows, line, row))
            row += rows
            line += nl
            pos += len(block)
    return jobs


def _count_rows(block: bytes) -> tuple:
    """(non-blank lines, newlines) in ``block``; a line of only \\r or spaces is blank."""
    arr = np.frombuffer(block, dtype=np.uint8)
    ends = np.flatnonzero(arr == 10)
    nl = int(ends.size)
    if block[:1] not in (b"\n", b"\r") and (nl < 2 or int(np.diff(ends).min()) > 2):
        # the usual case: no line shorter than 2 bytes, so no empty line (\n\n, \n\r\n);
        # lines of only spaces are not looked for here
        return nl + (0 if block.endswith(b"\n") else 1), nl
    starts = np.concatenate(([0], ends + 1))
    stops = np.concatenate((ends, [arr.size]))
    ink = ~((arr == 32) | (arr == 13) | (arr == 9) | (arr == 10))
    csum = np.concatenate(([0], np.cumsum(ink, dtype=np.int64)))
    blank = (csum[stops] - csum[starts]) == 0
    return int((~blank).sum()), nl


def _workers(workers: Optional[int], size: int, njobs: int) -> int:
    if workers is not None:
        return max(1, min(int(workers), njobs))
    if size < _PARALLEL_MIN_BYTES or not hasattr(os, "fork"):
        return 1
    import threading

    if threading.active_count() > 1:  # forking a threaded process is unsafe (TUI workers)
        return 1
    return max(1, min(os.cpu_count() or 1, 8, njobs))


def _parse_job(path: str, sn: Sniff, job: tuple, out: np.ndarray):
    """Parse one chunk into ``out``; return None or (line_hint, message) on failure."""
    import warnings

    start, end, rows, line0, row0 = job
    try:
        if sn.decimal_comma:
            with open(path, "rb") as fh:
                fh.seek(start)
                block = fh.read(end - start)
            table = bytes.maketrans(b",;\t", b".  ")
            with warnings.catch_warnings():
                warnings.simplefilter("error")
                vals = np.fromstring(block.translate(table), dtype=np.float64, sep=" ")
            if vals.size != rows * sn.ncols:
                return (line0, None)
            out[row0:row0 + rows] = vals.reshape(rows, sn.ncols)
        else:
            with open(path, "r", encoding="latin-1", newline=None) as fh:
                fh.seek(start)
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore")
                    arr = np.loadtxt(fh, delimiter=sn.delimiter, comments=None, max_rows=rows,
                                     ndmin=2, dtype=np.float64, usecols=range(sn.ncols))
            if arr.shape != (rows, sn.ncols):
                return (line0, None)
            out[row0:row0 + rows] = arr
    except (ValueError, DeprecationWarning, UnicodeDecodeError) as exc:
        return (line0, str(exc))
    return None


def _parse_parallel(path: str, sn: Sniff, jobs: list, out: np.ndarray, nworkers: int) -> None:
    import multiprocessing as mp

    ctx = mp.get_context("fork")
    groups = [jobs[k::nworkers] for k in range(nworkers)]
    procs = []
    for group in groups:
        r, w = ctx.Pipe(duplex=False)
        p = ctx.Process(target=_worker, args=(path, sn, group, out, w), daemon=True)
        p.start()
        w.close()
        procs.append((p, r))
    errors = []
    for p, r in procs:
        try:
            msg = r.recv()
        except EOFError:
            msg = ("crash", None)
        p.join()
        if msg is not None:
            errors.append(msg)
    if errors:
        errs = [e for e in errors if e[0] != "crash"]
        if not errs:
            raise RuntimeError("a trace parse worker stopped unexpectedly")
        raise _job_error(path, sn, min(errs, key=lambda e: e[0]))


def _worker(path, sn, group, out, conn) -> None:  # pragma: no cover - runs in a child
    first = None
    for job in group:
        err = _parse_job(path, sn, job, out)
        if err and (first is None or err[0] < first[0]):
            first = err
    conn.send(first)
    conn.close()
    os._exit(0)


def _job_error(path: str, sn: Sniff, err: tuple) -> InputError:
    """Find the exact line that broke a chunk (error path only: a plain line scan)."""
    line0 = err[0]
    with open(path, "rb") as fh:
        for lineno, raw in enumerate(fh, start=1):
            if lineno < line0:
                continue
            text = raw.decode("utf-8", errors="replace").strip()
            if not text:
                if sn.delimiter is not None and raw.strip(b"\r\n"):  # loadtxt stops on these
                    return InputError("", "(only spaces)", "numbers or an empty line",
                                      line=lineno, source=path)
                continue
            if sn.delimiter and text.endswith(sn.delimiter) and len(text) > 1:
                text = text[:-1].rstrip()
            fields = split_fields(text, sn.delimiter)
            if len(fields) != sn.ncols:
                return InputError("", text[:60], f"{sn.ncols} fields like the rows above "
                                  f"(found {len(fields)})", line=lineno, source=path)
            for k, f in enumerate(fields):
                ok = NUM_RE.match(f) or (sn.decimal_comma and NUM_COMMA_RE.match(f))
                if not ok:
                    return InputError(f"column {k + 1}", f, "a number", line=lineno, source=path)
    return InputError("", err[1] or "unreadable data", "numeric rows", line=line0, source=path)


def _check_finite(path: str, sn: Sniff, out: np.ndarray, jobs: list) -> None:
    bad = ~np.isfinite(out)
    if not bad.any():
        return
    row = int(np.flatnonzero(bad.any(axis=1))[0])
    col = int(np.flatnonzero(bad[row])[0])
    line = _line_of_row(path, jobs, row)
    raise InputError(f"column {col + 1}", float(out[row, col]), "a finite number", line=line, source=path)


def _line_of_row(path: str, jobs: list, row: int) -> int:
    """Line number of data row ``row`` (error path: scans the one chunk that holds it)."""
    for job in jobs:
        r0 = job[4]
        if r0 <= row < r0 + job[2]:
            want = row - r0
            with open(path, "rb") as fh:
                fh.seek(job[0])
                block = fh.read(job[1] - job[0])
            seen = -1
            for k, raw in enumerate(block.split(b"\n")):
                if raw.strip():
                    seen += 1
                    if seen == want:
                        return job[3] + k
    return 0


# ----- numpy files -------------------------------------------------------------------------


def _read_numpy(path: str):
    try:
        if path.lower().endswith(".npy"):
            arr = np.load(path, mmap_mode="r", allow_pickle=False)
            return _columns_from_array(path, arr, "npy")
        with np.load(path, allow_pickle=False) as z:
            keys = list(z.keys())
            if not keys:
                raise InputError("", "(empty .npz)", "named arrays: time and signals", source=path)
            arrays = {k: np.asarray(z[k]) for k in keys}
    except InputError:
        raise
    except Exception as exc:  # numpy raises several types for a damaged or foreign file
        raise InputError("", type(exc).__name__, f"a readable numpy file ({exc})", source=path) from None
    if len(arrays) == 1:
        (k, arr), = arrays.items()
        return _columns_from_array(path, arr, f"npz array '{k}'")
    dt_key = next((k for k in arrays if k.lower() in ("dt", "sample_interval", "dt_s")), None)
    vectors = {k: v for k, v in arrays.items() if v.ndim == 1 and v.size > 1}
    if not vectors:
        raise InputError("", ", ".join(keys), "1-D arrays of samples (time and signals)", source=path)
    n = max(v.size for v in vectors.values())
    same = {k: v for k, v in vectors.items() if v.size == n}
    tkey = next((k for k in same if _TIME_NAMES.match(k)), None)
    if tkey is None and dt_key is not None:
        dt = float(np.asarray(arrays[dt_key]).ravel()[0])
        t0k = next((k for k in arrays if k.lower() in ("t0", "t0_s", "start")), None)
        t0 = float(np.asarray(arrays[t0k]).ravel()[0]) if t0k else 0.0
        names = ["time"] + list(same)
        cols = [t0 + dt * np.arange(n)] + [np.asarray(v, dtype=float) for v in same.values()]
        return names, {}, cols, f"npz with {dt_key} and {len(same)} signal array(s)"
    if tkey is None:
        tkey = next(iter(same))
    names = [tkey] + [k for k in same if k != tkey]
    if len(names) < 2:
        raise InputError("", ", ".join(keys), "a time array and at least one signal array of the same length",
                         source=path)
    cols = [np.asarray(same[k], dtype=float) for k in names]
    return names, {}, cols, f"npz, {len(names)} arrays of {n} samples"


def _columns_from_array(path: str, arr: np.ndarray, what: str):
    if arr.dtype.names:
        names = list(arr.dtype.names)
        if len(names) < 2:
            raise InputError("", names, "a time field and at least one signal field", source=path)
        return names, {}, [np.asarray(arr[n], dtype=float) for n in names], f"{what}, structured"
    if arr.ndim != 2 or min(arr.shape) < 2:
        raise InputError("", f"array of shape {arr.shape}", "a 2-D array: time column then signal columns",
                         source=path)
    if arr.shape[0] < arr.shape[1] and arr.shape[0] <= 16:
        arr = arr.T
    arr = np.asarray(arr, dtype=float)
    names = ["time"] + [f"column {k}" for k in range(2, arr.shape[1] + 1)]
    return names, {}, [arr[:, k] for k in range(arr.shape[1])], f"{what}, {arr.shape[1]} columns"


# ----- checks and choices ------------------------------------------------------------------


def _time_scale(name: str, units: dict) -> tuple:
    cand = []
    if units.get("time_row"):
        cand.append(units["time_row"])
    m = _UNIT_IN_NAME.search(name.strip())
    if m:
        cand.append(m.group("a") or m.group("b") or m.group("c"))
    if units.get("time_meta"):
        cand.append(units["time_meta"])
    for c in cand:
        key = c.strip()
        if key in TIME_UNITS:
            return TIME_UNITS[key], key
        if key.lower() in TIME_UNITS:
            return TIME_UNITS[key.lower()], key.lower()
    return 1.0, "s"


def _pick_channel(names: list, channel: Optional[str], path: str) -> int:
    if channel is None or str(channel).strip() == "":
        for k, n in enumerate(names):
            if _PD_NAMES.search(n):
                return k
        return 0
    want = str(channel).strip()
    for k, n in enumerate(names):
        if n.lower() == want.lower():
            return k
    if re.fullmatch(r"\d+", want):
        k = int(want)
        if 1 <= k <= len(names):
            return k - 1
    listing = ", ".join(f"{k + 1}={n}" for k, n in enumerate(names))
    raise InputError("--channel", want, f"a signal column name or number ({listing})", source=path)


def _check_time(trace: Trace) -> None:
    t = np.asarray(trace.time, dtype=float)
    n = t.size
    if n < _MIN_SAMPLES:
        raise InputError("", f"{n} samples", f"at least {_MIN_SAMPLES} samples", source=trace.source)
    if not np.all(t[1:] > t[:-1]):
        row = int(np.flatnonzero(~(t[1:] > t[:-1]))[0]) + 1
        raise InputError("time", float(t[row]), "a time larger than the row before (time must increase)",
                         line=_text_line(trace, row), source=trace.source)
    # t = t0 + i·dt by least squares on a subsample (robust to time values printed with few
    # digits), then every sample checked against the line in blocks (bounded scratch memory)
    step = max(1, n // 200_000)
    i = np.arange(0, n, step, dtype=float)
    ts = t[::step]
    im, tm = float(i.mean()), float(ts.mean())
    dt = float(np.dot(i - im, ts - tm) / np.dot(i - im, i - im))
    t0 = tm - dt * im
    block = 1 << 20
    for start in range(0, n, block):
        seg = t[start:start + block]
        dev = seg - (t0 + dt * np.arange(start, start + seg.size, dtype=float))
        worst = int(np.argmax(np.abs(dev)))
        if abs(dev[worst]) > 0.5 * dt:
            row = start + worst
            raise InputError("time", float(t[row]), "evenly spaced samples (this one is "
                             f"{dev[worst] / dt:+.2f} sample intervals off the straight line)",
                             line=_text_line(trace, row), source=trace.source)
    trace.t0, trace.sample_interval = t0, dt


def _text_line(trace: Trace, row: int) -> Optional[int]:
    if not trace.first_data_line:
        return None
    if trace.layout.startswith("npz") or trace.layout.startswith("npy"):
        return None
    return trace.first_data_line + row  # exact unless blank lines sit inside the data
