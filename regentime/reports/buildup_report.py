"""Build-up table and check list as text, Markdown, CSV and JSON."""

from __future__ import annotations

import json

import numpy as np

from regentime.reports.plan_json import _clean, buildup_dict
from regentime.numfmt import eng
from regentime.reports.tables import csv_table, md_table, text_table

HEADERS = ("RT", "energy", "out if dumped", "peak fluence", "log gain", "stored", "S_pump", "S_seed", "B", "")
CSV_HEADERS = ("round_trip", "energy_J", "output_energy_J", "peak_fluence_J_m2", "log_gain",
               "stored_energy_J", "sensitivity_pump", "sensitivity_seed", "b_integral_rad", "mark")


def _mark(plan, k: int) -> str:
    b = plan.buildup
    marks = []
    if k == b.dump_round_trip:
        marks.append(f"<- switch out ({b.rule})")
    if k == b.peak_round_trip and k != b.dump_round_trip:
        marks.append("<- peak output")
    elif k == b.peak_round_trip:
        marks.append("(peak)")
    return " ".join(marks)


def _num(v, fmt="{:.4g}"):
    return "—" if v is None or not np.isfinite(v) else fmt.format(v)


def rows(plan, display: bool = True):
    b, r = plan.buildup, plan.buildup.result
    out = []
    for k in range(b.n_shown + 1):
        vals = (k, r.energy[k], b.output[k], r.peak_fluence[k], r.log_gain[k], r.stored[k],
                b.sensitivity_pump[k], b.sensitivity_seed[k], r.b_integral[k], _mark(plan, k))
        if display:
            out.append((str(k), eng(vals[1], "J"), eng(vals[2], "J"),
                        "—" if k == 0 else f"{vals[3] / 1e4:.4g} J/cm²", f"{vals[4]:.4f}", eng(vals[5], "J"),
                        _num(vals[6], "{:+.3f}"), _num(vals[7], "{:+.3f}"), _num(vals[8], "{:.3g}"), vals[9]))
        else:
            out.append(vals)
    return out


def summary_lines(plan) -> list[str]:
    b, o, cav = plan.buildup, plan.optics, plan.cavity
    lines = [
        f"cavity          {cav.name}" + (f"  ({cav.source}, {cav.content_hash})" if cav.source else "  (built-in demo)"),
        f"round trip      {eng(o.round_trip_time, 's', 6)}   (optical path end to end {o.optical_path * 1e3:.2f} mm, "
        f"cell arm {eng(o.cell_arm_time, 's')}, gain arm {eng(o.gain_arm_time, 's')})",
        f"gain            J_sat {b.gain.j_sat / 1e4:.4g} J/cm², stored {eng(b.stored_at_injection, 'J')} at injection, "
        f"single-pass log gain {b.result.log_gain[0]:.4f} (G0 = {np.exp(b.result.log_gain[0]):.4g})",
        f"switch out      after round trip {b.dump_round_trip} ({b.rule}); peak output at {b.peak_round_trip}",
        f"output          {eng(b.output_energy, 'J')}, extraction efficiency {b.extraction_efficiency * 100:.1f} % "
        + ("of the energy stored per period (E_out·f_rep/R)" if b.continuous else "of the stored energy"),
    ]
    if b.continuous:
        per = "period 1 (one energy)" if b.period == 1 else ("irregular" if b.period == 0 else f"period {b.period}")
        if b.period != 1:
            e = b.output_energies
            per += f": alternates between {eng(max(e), 'J')} and {eng(min(e), 'J')}"
        lines.append(f"shot to shot    continuous pump at {eng(cav.repetition_rate, 'Hz')}: steady state {per}")
    return lines


def buildup_text(plan) -> str:
    parts = summary_lines(plan) + ["", text_table(HEADERS, rows(plan), align="rrrrrrrrrl")]
    parts += ["", "S_pump, S_seed: relative output change per relative change of pump / seed energy "
                  "(∂ln E_out/∂ln x) if switched out after that round trip."]
    if plan.buildup.continuous:
        parts.append("Continuous pump: 'out if dumped' and S are each at that round trip's own "
                     "shot-to-shot steady state.")
    return "\n".join(parts)


def buildup_md(plan) -> str:
    parts = [f"# Build-up: {plan.cavity.name}", ""] + [f"- {l.strip()}" for l in summary_lines(plan)]
    parts += ["", md_table(HEADERS, rows(plan), align="rrrrrrrrrl")]
    return "\n".join(parts)


def buildup_csv(plan) -> str:
    return csv_table(CSV_HEADERS, rows(plan, display=False))


def buildup_json(plan) -> str:
    b = plan.buildup
    d = {"round_trip_time_s": plan.optics.round_trip_time, "buildup": buildup_dict(plan),
         "dump": {"round_trip": b.dump_round_trip, "output_energy_J": b.output_energy,
                  "extraction_efficiency": b.extraction_efficiency, "rule": b.rule,
                  "period": b.period, "output_energies_J": [float(e) for e in b.output_energies]}}
    return json.dumps(_clean(d), indent=2, ensure_ascii=False)


def checks_text(plan) -> str:
    lines = []
    for c in plan.checks:
        lines.append(f"  {c.level.upper():8s} {c.name:11s} {c.message}")
    return "\n".join(lines) if lines else "  (no checks)"
