"""Record the independent reference numbers for tests/test_independent.py.

Run from the repository root:  python -m tests.independent.make_reference
It computes :func:`tests.independent.reference.plan` for every cavity in ``cavities/`` and
``tests/independent/cavities/`` (invented scenarios) and the steady-state period at a few
(round trips, rate) points of the continuously pumped ones, and writes
``tests/independent/reference_results.json`` with the SHA-256 of each file, so that the
test can tell when a cavity file changed after the recording.  Slow (a few minutes: the
gaussian, continuously pumped case iterates the ring-resolved shot map); the test itself only
reads the recording and recomputes a few fast cavities live.
"""

from __future__ import annotations

import hashlib
import json
import pathlib
import time

import numpy as np

from regentime.fileformat import load_cavity
from tests.independent.reference import Reference, plan

ROOT = pathlib.Path(__file__).resolve().parents[2]
HERE = pathlib.Path(__file__).resolve().parent
OUT = HERE / "reference_results.json"

# (round trips, rate) points of the period check, per continuously pumped file
PERIOD_POINTS = {
    "nd_yvo4_cw_200khz.yaml": ([20, 30, 45], [50e3, 200e3, 400e3]),
    "yvo4_strong_seed.yaml": ([25, 40], [100e3, 300e3]),
    "yb_flat_50khz_auto.yaml": ([60, 120], [50e3, 150e3]),
}


def cavity_files():
    return sorted((ROOT / "cavities").glob("*.yaml")) + sorted((HERE / "cavities").glob("*.yaml"))


def _clean(x):
    if isinstance(x, dict):
        return {k: _clean(v) for k, v in x.items() if k != "buildup_E"}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, (np.floating, np.integer)):
        return x.item()
    return x


def record(path: pathlib.Path) -> dict:
    cav = load_cavity(str(path))
    t0 = time.time()
    res = plan(cav)
    if cav.pump.mode == "continuous" and cav.gain.profile == "gaussian":
        alt = plan(cav, reset_profile=True)
        res["reset_profile_reading"] = {k: alt[k] for k in
                                        ("dump_round_trip", "output_energy_J", "peak_round_trip")
                                        if k in alt}
    if path.name in PERIOD_POINTS:
        ns, rates = PERIOD_POINTS[path.name]
        ref = Reference(cav)
        table = []
        for n in ns:
            table.append(ref.period(n, rates))
        res["period_points"] = {"round_trips": ns, "rates_Hz": rates, "period": table}
    res["sha256"] = hashlib.sha256(path.read_bytes()).hexdigest()
    res["seconds"] = round(time.time() - t0, 1)
    return _clean(res)


def main():
    out = {}
    for p in cavity_files():
        rel = str(p.relative_to(ROOT))
        out[rel] = record(p)
        print(rel, out[rel]["seconds"], "s", flush=True)
    OUT.write_text(json.dumps(out, indent=1, sort_keys=True) + "\n")


if __name__ == "__main__":
    main()
