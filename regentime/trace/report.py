"""Format a :class:`~regentime.trace.result.TraceResult`: text, Markdown, JSON, PNG plot.

Formatting only: every number comes from the result object.
"""

from __future__ import annotations

import json
import math

from regentime.numfmt import eng
from regentime.trace.result import TraceResult

_NAMES = {
    "initial_log_gain": "log gain g0 at injection (single pass)",
    "single_pass_gain": "single-pass gain G0 at injection",
    "round_trip_loss": "round-trip loss",
    "start_log_gain": "log gain at the first pulse",
    "round_trips_before_first_pulse": "round trips from injection to the first pulse",
    "seed_energy_J": "injected seed energy",
    "start_energy_J": "energy at the first pulse",
    "scale_per_J": "photodiode scale (area per joule, V·s/J)",
    "scale_per_E_sat": "photodiode scale (area per E_sat)",
}
_ORDER = ["initial_log_gain", "single_pass_gain", "round_trip_loss", "round_trips_before_first_pulse",
          "seed_energy_J", "start_energy_J", "start_log_gain", "scale_per_J", "scale_per_E_sat"]


def _num(value, unit: str = "") -> str:
    if value is None:
        return "—"
    if unit == "J":
        return eng(value, "J", 4)
    if unit == "g":
        return f"{value:.4g}"
    if unit == "%":
        return f"{100 * value:.3g} %"
    return f"{value:.4g}"


def _unit_of(key: str) -> str:
    if key.endswith("energy_J"):
        return "J"
    if key.startswith("scale"):
        return "g"
    if key == "round_trip_loss":
        return "%"
    return ""


def rows(result: TraceResult) -> list[tuple[str, str]]:
    """(label, value) rows of the summary, shared by text and Markdown."""
    r, tr = result, result.train
    out = [
        ("measured round trip", f"{eng(r.measured_round_trip_s, 's', 7)} ± {eng(r.measured_round_trip_sigma_s, 's', 3)}"),
        ("model round trip (cavity file)", eng(r.model_round_trip_s, "s", 7)),
        ("length error (one-way optical path)",
         "—" if r.length_error_m is None else f"{r.length_error_m * 1e3:+.2f} mm "
         + ("(real cavity longer than the file)" if r.length_error_m > 0 else "(real cavity shorter than the file)")),
        ("pulses measured", f"{tr.amplitudes.size} (amplitude = pulse area over one round trip)"),
        ("observed switch-out", f"after pulse {r.observed_dump_index}" + ("" if tr.switch_out_seen else " (collapse not seen)")),
        ("peak of the build-up", f"pulse {r.peak_index}" + (" (extrapolated by the fit)" if r.peak_extrapolated else "")
         + ("" if r.peak_source == "fit" else " (largest measured pulse)")),
        ("switch out", _shift_words(r)),
        ("switch-off delay change", f"{eng(r.switch_off_shift_s, 's', 5)}" if r.switch_off_shift_s else "none"),
    ]
    return out


def _shift_words(r: TraceResult) -> str:
    n = r.dump_offset_round_trips
    if n == 0:
        return "at the same round trip (already at the peak)"
    word = "later" if n > 0 else "earlier"
    return f"{abs(n)} round trip{'s' if abs(n) != 1 else ''} {word} ({n:+d})"


def fit_rows(result: TraceResult) -> list[tuple[str, str, str, str]]:
    f = result.fit
    if f is None:
        return []
    out = []
    for key in _ORDER:
        if key not in f.values:
            continue
        unit = _unit_of(key)
        val, sig = f.values[key], f.sigmas.get(key, float("nan"))
        sig_txt = "—" if not math.isfinite(sig) or sig == 0 else _num(sig, unit)
        file_val = f.file_values.get(key)
        out.append((_NAMES.get(key, key), _num(val, unit), sig_txt, _num(file_val, unit)))
    return out


def format_text(result: TraceResult) -> str:
    lines = ["Photodiode trace of the build-up"]
    if result.trace is not None:
        t = result.trace
        lines.append(f"  {t.source}: channel '{t.channel}', {t.n_samples} samples every "
                     f"{eng(t.sample_interval, 's', 4)} ({t.layout})")
    lines.append("")
    r = rows(result)
    w = max(len(a) for a, _ in r)
    lines += [f"  {a:<{w}}  {b}" for a, b in r]
    fr = fit_rows(result)
    if fr:
        f = result.fit
        lines += ["", f"Build-up fit ({f.mode}; rms residual {100 * f.rms_residual:.2g} % of the largest pulse; "
                  f"peak index 16–84 %: {f.peak_range[0]}…{f.peak_range[1]})"]
        head = ("parameter", "fitted", "± 1σ", "file")
        ws = [max(len(x[i]) for x in fr + [head]) for i in range(4)]
        lines.append("  " + "  ".join(h.ljust(ws[i]) for i, h in enumerate(head)))
        for row in fr:
            lines.append("  " + "  ".join(c.ljust(ws[i]) for i, c in enumerate(row)))
        if f.peak_energy is not None:
            lines.append(f"  predicted peak energy at the reference point: {eng(f.peak_energy, 'J', 4)}")
    if result.notes:
        lines += [""] + [f"note: {n}" for n in result.notes]
    lines += [""] + result.cautions
    return "\n".join(lines)


def format_markdown(result: TraceResult) -> str:
    lines = ["# Photodiode trace of the build-up", ""]
    if result.trace is not None:
        t = result.trace
        lines += [f"`{t.source}`, channel `{t.channel}`, {t.n_samples} samples every "
                  f"{eng(t.sample_interval, 's', 4)} ({t.layout}).", ""]
    lines += ["| quantity | value |", "|---|---|"]
    lines += [f"| {a} | {b} |" for a, b in rows(result)]
    fr = fit_rows(result)
    if fr:
        lines += ["", f"## Build-up fit ({result.fit.mode})", "", "| parameter | fitted | ± 1σ | file |",
                  "|---|---|---|---|"]
        lines += [f"| {a} | {b} | {c} | {d} |" for a, b, c, d in fr]
    if result.notes:
        lines += ["", "## Notes", ""] + [f"- {n}" for n in result.notes]
    lines += ["", "> " + " ".join(result.cautions)]
    return "\n".join(lines)


def format_json(result: TraceResult) -> str:
    return json.dumps(_clean(result.to_dict()), indent=2, ensure_ascii=False)


def format_csv(result: TraceResult) -> str:
    f = result.fit
    lines = ["index,time_s,amplitude,model_amplitude"]
    for i, p in enumerate(result.pulses):
        m = "" if f is None or i >= len(f.model) else repr(float(f.model[i]))
        lines.append(f"{i},{p['time_s']!r},{p['amplitude']!r},{m}")
    return "\n".join(lines)


def _clean(obj):
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {k: _clean(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_clean(v) for v in obj]
    return obj


def plot_png(result: TraceResult, path: str, max_points: int = 200_000) -> None:
    """Draw the trace, the detected pulses, the fitted envelope and the suggested switch-out."""
    import io

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import numpy as np

    from regentime.atomic_write import write_atomic

    r, tr = result, result.train
    fig, (ax1, ax2) = plt.subplots(2, 1, figsize=(10, 7), constrained_layout=True)
    if r.trace is not None:
        t, v = r.trace.time, r.trace.signal
        step = max(1, t.size // max_points)
        ax1.plot(t[::step] * 1e9, v[::step], lw=0.6, color="0.35", label=f"trace ({r.trace.channel})")
        ax1.set_ylabel("signal (file units)")
    idx = np.arange(tr.amplitudes.size)
    ax1.set_xlabel("time (ns)")
    ax1.set_title("photodiode trace")
    for i, tt in enumerate(tr.times):
        ax1.axvline(tt * 1e9, color="tab:blue", lw=0.3, alpha=0.4)
    ax1.axvline(tr.times[r.observed_dump_index] * 1e9, color="tab:red", lw=1.2, ls="--",
                label="observed switch-out")
    t_peak = tr.times[0] + r.peak_index * tr.period
    ax1.axvline(t_peak * 1e9, color="tab:green", lw=1.2, label="suggested switch-out (peak)")
    ax1.legend(loc="upper left", fontsize=8)

    ax2.plot(idx, tr.amplitudes, "o", ms=4, color="tab:blue", label="pulse area (measured)")
    if r.fit is not None:
        ext = r.fit.extended
        ax2.plot(np.arange(ext.size), ext, "-", color="tab:orange", label=f"fitted build-up ({r.fit.mode})")
    ax2.axvline(r.observed_dump_index, color="tab:red", ls="--", lw=1.2, label="observed switch-out")
    ax2.axvline(r.peak_index, color="tab:green", lw=1.2,
                label="peak" + (" (extrapolated)" if r.peak_extrapolated else ""))
    ax2.set_xlabel("pulse index (round trips from the first measured pulse)")
    ax2.set_ylabel("pulse area (signal units · s)")
    ax2.set_title(f"build-up: switch out {_shift_words(r)}")
    ax2.legend(loc="upper left", fontsize=8)
    fig.suptitle("Class 4 laser / kV driver: follow IEC 60825-1 / ANSI Z136.1, IEC 61010-1, local rules "
                 "and your laser safety officer; try a new delay at low pump power first.", fontsize=7, color="0.4")
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=110)
    plt.close(fig)
    write_atomic(path, buf.getvalue())
