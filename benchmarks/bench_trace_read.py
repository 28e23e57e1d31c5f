"""Read speed of the trace reader against numpy.loadtxt on the same 10-million-sample file.

Run:  python benchmarks/bench_trace_read.py [--samples 10000000] [--keep]

Time is the best of two plain runs; memory is the peak traced by tracemalloc in a third run.
Writes an invented two-column CSV trace (time, signal; %.9e) once, then reads it with
``regentime.trace.read_trace`` and with ``numpy.loadtxt`` in the same run, printing wall time
and peak traced memory (tracemalloc; numpy reports its array allocations to it) side by side.
The forked parse workers of the reader run in child processes: their peak resident memory is
printed separately (ru_maxrss of the children).  Target (issue 7): faster than loadtxt, memory
within 3x the sample arrays (2 columns x 8 bytes x N).
"""

from __future__ import annotations

import argparse
import os
import resource
import tempfile
import time
import tracemalloc

import numpy as np


def make_file(path: str, n: int) -> None:
    rng = np.random.default_rng(0)
    step = 1_000_000
    with open(path, "w") as fh:
        fh.write("# invented benchmark trace\nTime (s),pd (V)\n")
        for start in range(0, n, step):
            k = np.arange(start, min(n, start + step))
            v = 0.01 * rng.standard_normal(k.size) + 0.5 * (k % 200 == 0)
            np.savetxt(fh, np.c_[k * 50e-12, v], fmt="%.9e", delimiter=",")


def measure(label: str, fn, repeat: int = 2):
    """Best wall time of ``repeat`` plain runs, then one run under tracemalloc for the peak.

    tracemalloc slows allocation-heavy code a lot, so time and memory are measured apart.
    """
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
        del out
    tracemalloc.start()
    out = fn()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return label, best, peak, out


def _untraced(out) -> int:
    """Bytes of a result held in a shared mmap (parallel parse): tracemalloc does not see them."""
    import mmap

    base = getattr(out, "time", None)
    while base is not None and not isinstance(base, mmap.mmap):
        base = getattr(base, "base", None)
    return len(base) if isinstance(base, mmap.mmap) else 0


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--samples", type=int, default=10_000_000)
    ap.add_argument("--keep", action="store_true", help="keep the generated file")
    args = ap.parse_args()
    from regentime.trace.reader import read_trace

    folder = tempfile.mkdtemp(prefix="regentime-bench-")
    path = os.path.join(folder, "trace.csv")
    t0 = time.perf_counter()
    make_file(path, args.samples)
    print(f"file: {path}, {os.path.getsize(path) / 1e6:.0f} MB, {args.samples} samples "
          f"(written in {time.perf_counter() - t0:.1f} s)")
    arrays = 2 * 8 * args.samples
    runs = [
        measure("numpy.loadtxt", lambda: np.loadtxt(path, delimiter=",", skiprows=2)),
        measure("read_trace (1 process)", lambda: read_trace(path, workers=1)),
        measure("read_trace (auto)", lambda: read_trace(path)),
    ]
    ref = runs[0][3]
    for _, _, _, out in runs[1:]:
        assert np.array_equal(out.signal, ref[:, 1]) and np.array_equal(out.time, ref[:, 0])
    child = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024
    print(f"sample arrays: {arrays / 1e6:.0f} MB (2 columns x 8 bytes); peak MB includes a shared "
          "mmap result where the parse was parallel")
    print(f"{'reader':<26}{'time s':>9}{'peak MB':>10}{'x arrays':>10}")
    for label, dt, peak, out in runs:
        peak += _untraced(out)
        print(f"{label:<26}{dt:>9.2f}{peak / 1e6:>10.0f}{peak / arrays:>10.2f}")
    print(f"largest parse worker (resident, whole process): {child / 1e6:.0f} MB; cpus: {os.cpu_count()}, "
          f"load average {os.getloadavg()[0]:.1f}")
    if not args.keep:
        os.remove(path)
        os.rmdir(folder)


if __name__ == "__main__":
    main()
