"""Benchmarks of the core (issue 2).  Prints its figures; measured side by side in one run.

1. Start-up: ``regentime plan FILE --format json`` as a whole process against
   ``python -c "import numpy"`` (target: within 3×), median of several alternating runs.
2. Build-up of a 1000 × 1000 grid of (pump energy, seed energy) points, 100 round trips each,
   vectorised, in points per second, and the ratio to a plain per-point loop measured on a
   sample of the same points.

Run: ``python benchmarks/bench_plan.py [--quick]``.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CAVITY = os.path.join(ROOT, "cavities", "ti_sapphire_1khz.yaml")


def startup(repeats: int) -> None:
    numpy_cmd = [sys.executable, "-c", "import numpy"]
    plan_cmd = [sys.executable, "-m", "regentime", "plan", CAVITY, "--format", "json"]
    t_np, t_plan = [], []
    for _ in range(repeats):  # alternate so that both see the same machine load
        for cmd, acc in ((numpy_cmd, t_np), (plan_cmd, t_plan)):
            t0 = time.perf_counter()
            proc = subprocess.run(cmd, capture_output=True, cwd=ROOT)
            acc.append(time.perf_counter() - t0)
            if proc.returncode not in (0, 3):
                sys.exit(f"{cmd} failed: {proc.stderr.decode()[-400:]}")
    a, b = statistics.median(t_np), statistics.median(t_plan)
    print(f"start-up  python -c 'import numpy'          median {a * 1e3:7.1f} ms  ({repeats} runs)")
    print(f"start-up  regentime plan … --format json    median {b * 1e3:7.1f} ms")
    print(f"start-up  ratio plan / numpy import         {b / a:7.2f}   (target ≤ 3)")


def grid(n_side: int, sample: int) -> None:
    import numpy as np

    from regentime.fileformat import load_cavity
    from regentime.physics.buildup import simulate_buildup
    from regentime.planning.optics import cavity_optics
    from regentime.planning.gainsetup import gain_model, round_trip_path

    cav = load_cavity(CAVITY)
    optics = cavity_optics(cav)
    gm, path = gain_model(cav), round_trip_path(cav, optics)
    pump = np.linspace(0.5, 1.5, n_side)[:, None] * gm.stored_energy  # stored energy ∝ pump energy
    seed = np.logspace(-11, -7, n_side)[None, :]
    t0 = time.perf_counter()
    res = simulate_buildup(gm, path, seed, pump, 100, track=False)
    t_vec = time.perf_counter() - t0
    points = n_side * n_side
    rng = np.random.default_rng(1)
    idx = rng.integers(0, n_side, size=(sample, 2))
    t0 = time.perf_counter()
    loop_out = [simulate_buildup(gm, path, seed[0, j], pump[i, 0], 100, track=False).output[-1] for i, j in idx]
    t_loop = (time.perf_counter() - t0) / sample
    diff = max(abs(loop_out[s] / res.output[-1, i, j] - 1) for s, (i, j) in enumerate(idx))
    print(f"grid      {n_side} × {n_side} points × 100 round trips, vectorised: {t_vec:6.2f} s = "
          f"{points / t_vec:,.0f} points/s")
    print(f"grid      plain per-point loop (sample of {sample}): {1 / t_loop:,.0f} points/s; "
          f"ratio {points / t_vec * t_loop:,.0f}×; largest relative difference {diff:.1e}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="fewer repeats and a 300 × 300 grid")
    args = ap.parse_args()
    startup(5 if args.quick else 11)
    grid(300 if args.quick else 1000, 50 if args.quick else 200)


if __name__ == "__main__":
    main()
