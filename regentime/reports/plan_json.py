"""The plan as one JSON object (the contract for tools and tests: DESIGN.md "Output").

SI units, the unit in each key name.  Infinite or undefined numbers become ``null`` (JSON has
no infinity); the reason is given next to them where it matters.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from regentime import __version__


def _clean(x: Any) -> Any:
    """Make numpy scalars/arrays and non-finite floats JSON-safe."""
    if isinstance(x, dict):
        return {str(k): _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, np.ndarray):
        return [_clean(v) for v in x.tolist()]
    if isinstance(x, (np.integer,)):
        return int(x)
    if isinstance(x, (float, np.floating)):
        v = float(x)
        return v if math.isfinite(v) else None
    return x


def buildup_dict(plan) -> dict:
    b = plan.buildup
    n = b.n_shown
    r = b.result
    ks = list(range(n + 1))
    return {
        "round_trip": ks,
        "energy_J": r.energy[: n + 1],
        "log_gain": r.log_gain[: n + 1],
        "stored_energy_J": r.stored[: n + 1],
        "output_energy_J": b.output[: n + 1],
        "peak_fluence_J_m2": r.peak_fluence[: n + 1],
        "b_integral_rad": r.b_integral[: n + 1],
        "sensitivity_pump": b.sensitivity_pump[: n + 1],
        "sensitivity_seed": b.sensitivity_seed[: n + 1],
        "peak_round_trip": b.peak_round_trip,
        "notes": (["output_energy_J and the sensitivities are per switch-out round trip N, "
                   "each at its own shot-to-shot steady state (continuous pump)"]
                  if b.continuous else []),
    }


def plan_to_dict(plan) -> dict:
    """Everything ``regentime plan --format json`` prints."""
    b = plan.buildup
    cav = plan.cavity
    out: dict[str, Any] = {
        "regentime_version": __version__,
        "name": cav.name,
        "source": cav.source,
        "content_hash": cav.content_hash,
        "wavelength_m": cav.wavelength,
        "repetition_rate_Hz": cav.repetition_rate,
        "round_trip_time_s": plan.optics.round_trip_time,
        "optical_path_m": plan.optics.optical_path,
        "cell_arm_time_s": plan.optics.cell_arm_time,
        "gain_arm_time_s": plan.optics.gain_arm_time,
        "saturation_fluence_J_m2": b.gain.j_sat,
        "stored_energy_J": b.stored_at_injection,
        "initial_log_gain": float(b.result.log_gain[0]),
        "buildup": buildup_dict(plan),
        "dump": {
            "round_trip": b.dump_round_trip,
            "output_energy_J": b.output_energy,
            "extraction_efficiency": b.extraction_efficiency,
            "rule": b.rule,
            "peak_round_trip": b.peak_round_trip,
            "period": b.period,
            "output_energies_J": [float(e) for e in b.output_energies],
        },
    }
    if plan.switching is not None:
        out["switch"] = plan.switching.to_dict()
        out["seed_pulse_index"] = plan.switching.seed_pulse_index
    else:
        out["switch"] = {"status": "not computed: switching model not available in this build"}
        out["seed_pulse_index"] = None
    if plan.timing is not None:
        out["timing_table"] = plan.timing.to_rows_dicts()
    else:
        out["timing_table"] = []
    if plan.contrast is not None:
        out["contrast"] = plan.contrast.to_dict()
    else:
        out["contrast"] = {"status": "not computed: contrast model not available in this build"}
    if plan.stability is not None and hasattr(plan.stability, "to_dict"):
        out["stability"] = plan.stability.to_dict()
    out["checks"] = [c.to_dict() for c in plan.checks]
    out["cannot_be_met"] = plan.cannot_be_met
    out["cautions"] = list(plan.cautions)
    return _clean(out)


def plan_to_json(plan) -> str:
    return json.dumps(plan_to_dict(plan), indent=2, ensure_ascii=False)
