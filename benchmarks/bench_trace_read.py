"""Read speed and peak memory of the trace reader against numpy.loadtxt on the same file.

Run:  python benchmarks/bench_trace_read.py [--samples 10000000] [--layouts csv,semicolon,whitespace]
                                            [--repeat 3] [--candidates] [--keep]

Writes an invented two-column trace (time, signal; %.9e; 10 million samples by default) in each
layout asked for, then reads it, in the same run, with:

* ``numpy.loadtxt`` (for decimal commas it needs a converter, which is how loadtxt reads them);
* ``read_trace`` as shipped (``parser="auto"``: pandas' C reader when the ``trace`` extra is
  installed, else the numpy path);
* ``read_trace(parser="numpy")``, the exact numpy path the reader falls back to;
* with ``--candidates`` also the other options weighed for the fast path: pandas' whole-file
  multithreaded ``read_csv``, ``pyarrow.csv.read_csv`` (if installed) and ``numpy.loadtxt``
  in ``max_rows`` chunks into one preallocated array.

Every measurement runs in a fresh subprocess (imports numpy, then times the call, so a lazy
import of pandas inside the reader is counted in its time).  The runs are interleaved
(loadtxt, reader, … then again) ``--repeat`` times, because other work on the machine changes
speed from minute to minute; best and median wall time are printed.  Memory: the process's
peak resident set (``VmHWM`` in /proc/self/status, which sees pandas' and pyarrow's native
allocations that tracemalloc does not) minus its resident set just before the call
(``VmRSS``); that growth includes the lazily imported library.  The numpy path's forked
workers are separate processes: their largest peak resident set (``ru_maxrss`` of the
children, which counts the pages they share with the parent) is printed on its own.  Every
reader's arrays are hashed and must equal numpy.loadtxt's bit for bit.  Target (issue 7):
faster than loadtxt, memory growth within 3x the sample arrays (2 columns x 8 bytes x N).
"""

from __future__ import annotations

import argparse
import hashlib
import io
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np

LAYOUTS = {  # name: (header line, delimiter, decimal comma)
    "csv": ("Time (s),pd (V)", ",", False),
    "semicolon": ("Time (s);pd (V)", ";", True),
    "whitespace": ("time_s   pd_V", "   ", False),
}
KINDS = ["numpy.loadtxt", "read_trace (auto)", "read_trace (numpy path)"]
CANDIDATES = ["pandas whole file, threads", "pyarrow.csv, threads", "loadtxt max_rows chunks"]


def make_file(path: str, n: int, layout: str = "csv") -> None:
    """Invented benchmark trace: noise plus a pulse every 200 samples, 50 ps sampling."""
    header, delim, comma = LAYOUTS[layout]
    rng = np.random.default_rng(0)
    step = 1_000_000
    with open(path, "w") as fh:
        fh.write(f"# invented benchmark trace\n{header}\n")
        for start in range(0, n, step):
            k = np.arange(start, min(n, start + step))
            v = 0.01 * rng.standard_normal(k.size) + 0.5 * (k % 200 == 0)
            buf = io.StringIO()
            np.savetxt(buf, np.c_[k * 50e-12, v], fmt="%.9e", delimiter=delim)
            text = buf.getvalue()
            fh.write(text.replace(".", ",") if comma else text)


# ----- child: one measurement in a fresh process --------------------------------------------


def _status(key: str) -> int:
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith(key + ":"):
                return int(line.split()[1]) * 1024
    return 0


def _run(kind: str, path: str, layout: str):
    _, delim, comma = LAYOUTS[layout]
    sep = None if delim.strip() == "" else delim
    if kind == "numpy.loadtxt":
        if comma:
            a = np.loadtxt(path, delimiter=sep, skiprows=2,
                           converters=lambda s: float(s.replace(",", ".")))
        else:
            a = np.loadtxt(path, delimiter=sep, skiprows=2)
        return a[:, 0], a[:, 1], ""
    if kind.startswith("read_trace"):
        from regentime.trace.reader import read_trace

        tr = read_trace(path, parser="numpy" if "numpy" in kind else "auto")
        return tr.time, tr.signal, tr.parser
    if kind == "pandas whole file, threads":
        import csv

        import pandas as pd

        df = pd.read_csv(path, skiprows=2, header=None, sep=r"\s+" if sep is None else sep,
                         decimal="," if comma else ".", dtype=np.float64, quoting=csv.QUOTE_NONE,
                         na_filter=False)
        return df[0].to_numpy(), df[1].to_numpy(), pd.__version__
    if kind == "pyarrow.csv, threads":
        import pyarrow as pa
        import pyarrow.csv as pc

        if sep is None:
            raise NotImplementedError("pyarrow.csv has no whitespace-run delimiter")
        t = pc.read_csv(path, read_options=pc.ReadOptions(skip_rows=2, autogenerate_column_names=True),
                        parse_options=pc.ParseOptions(delimiter=sep),
                        convert_options=pc.ConvertOptions(
                            decimal_point="," if comma else ".",
                            column_types={"f0": pa.float64(), "f1": pa.float64()}))
        return t.column(0).to_numpy(), t.column(1).to_numpy(), pa.__version__
    if kind == "loadtxt max_rows chunks":
        if comma:
            raise NotImplementedError("needs a per-value converter (as slow as loadtxt's)")
        rows = 1 << 20
        cap = os.path.getsize(path) // 20
        out = np.empty((cap, 2))
        n = 0
        with open(path) as fh:
            fh.readline(), fh.readline()
            while True:
                a = np.loadtxt(fh, delimiter=sep, max_rows=rows, ndmin=2)
                if a.shape[0] == 0:
                    break
                out[n:n + a.shape[0]] = a
                n += a.shape[0]
                if a.shape[0] < rows:
                    break
        return out[:n, 0], out[:n, 1], ""
    raise ValueError(kind)


def child(kind: str, path: str, layout: str) -> None:
    import resource
    import warnings

    warnings.simplefilter("ignore")
    before = _status("VmRSS")
    t0 = time.perf_counter()
    try:
        t, s, note = _run(kind, path, layout)
    except NotImplementedError as exc:
        print(json.dumps({"skip": str(exc)}))
        return
    except ImportError as exc:
        print(json.dumps({"skip": f"not installed ({exc.name})"}))
        return
    dt = time.perf_counter() - t0
    peak = _status("VmHWM")
    kids = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024
    h = hashlib.sha1(np.ascontiguousarray(t, dtype=np.float64).tobytes())
    h.update(np.ascontiguousarray(s, dtype=np.float64).tobytes())
    print(json.dumps({"time": dt, "before": before, "peak": peak, "children": kids,
                      "n": int(np.size(s)), "sha": h.hexdigest(), "note": note}))


# ----- parent --------------------------------------------------------------------------------


def _measure(kind: str, path: str, layout: str) -> dict:
    out = subprocess.run([sys.executable, __file__, "--child", kind, path, layout],
                         capture_output=True, text=True, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def _versions() -> str:
    parts = [f"numpy {np.__version__}"]
    for mod in ("pandas", "pyarrow"):
        try:
            parts.append(f"{mod} {__import__(mod).__version__}")
        except ImportError:
            parts.append(f"{mod} not installed")
    return ", ".join(parts)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--samples", type=int, default=10_000_000)
    ap.add_argument("--layouts", default="csv,semicolon,whitespace")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--candidates", action="store_true", help="also the other fast-path options")
    ap.add_argument("--keep", action="store_true", help="keep the generated files")
    ap.add_argument("--child", nargs=3, metavar=("KIND", "PATH", "LAYOUT"), help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        child(*args.child)
        return
    kinds = KINDS + (CANDIDATES if args.candidates else [])
    arrays = 2 * 8 * args.samples
    print(f"cpus: {os.cpu_count()}; {_versions()}; load average at start {os.getloadavg()[0]:.1f}")
    print(f"sample arrays: {arrays / 1e6:.0f} MB (2 columns x 8 bytes x {args.samples}); "
          "memory = peak resident set (VmHWM) minus resident set before the call (VmRSS)")
    folder = tempfile.mkdtemp(prefix="regentime-bench-")
    for layout in args.layouts.split(","):
        path = os.path.join(folder, f"trace-{layout}.txt")
        t0 = time.perf_counter()
        make_file(path, args.samples, layout)
        print(f"\n== {layout}: {os.path.getsize(path) / 1e6:.0f} MB, {args.samples} samples "
              f"(written in {time.perf_counter() - t0:.1f} s)")
        res: dict = {k: [] for k in kinds}
        for _ in range(args.repeat):
            for kind in kinds:
                if res[kind] and "skip" in res[kind][0]:
                    continue
                if kind == "numpy.loadtxt" and LAYOUTS[layout][2] and res[kind]:
                    continue  # the converter run takes long and varies little: once is enough
                res[kind].append(_measure(kind, path, layout))
        ref = res["numpy.loadtxt"][0]
        best_ref = min(r["time"] for r in res["numpy.loadtxt"])
        print(f"{'reader':<30}{'best s':>8}{'median s':>10}{'vs loadtxt':>12}{'memory MB':>11}"
              f"{'x arrays':>10}{'same bits':>11}  notes")
        for kind in kinds:
            runs = res[kind]
            if "skip" in runs[0]:
                print(f"{kind:<30}  skipped: {runs[0]['skip']}")
                continue
            times = [r["time"] for r in runs]
            grow = max(r["peak"] - r["before"] for r in runs)
            same = all(r["sha"] == ref["sha"] and r["n"] == ref["n"] for r in runs)
            notes = []
            if runs[0]["note"]:
                notes.append(f"parser {runs[0]['note']}" if kind.startswith("read_trace")
                             else runs[0]["note"])
            kids = max(r["children"] for r in runs)
            if kids:
                notes.append(f"forked workers' peak RSS {kids / 1e6:.0f} MB")
            print(f"{kind:<30}{min(times):>8.2f}{statistics.median(times):>10.2f}"
                  f"{best_ref / min(times):>11.2f}x{grow / 1e6:>11.0f}{grow / arrays:>10.2f}"
                  f"{'yes' if same else 'NO':>11}  {'; '.join(notes)}")
        if not args.keep:
            os.remove(path)
    print(f"\nload average at end {os.getloadavg()[0]:.1f} (2 cores: above ~1 another job competed)")
    if not args.keep:
        os.rmdir(folder)


if __name__ == "__main__":
    main()
