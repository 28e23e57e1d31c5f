"""Formatting of the stability map, noise transfer and Monte-Carlo results (no computing here).

Text: a compact character map (rows: round trips, columns: the swept quantity) with its
legend, a summary at the file's setting, the noise-transfer table and the caution.  JSON: the
map (``rates_Hz``, ``round_trips``, ``period[i][j]`` for ``round_trips[i]`` and the j-th
column, ``energy_J``, ``energy_min_J``, ``energy_max_J``), the noise transfer and the
Monte-Carlo result.  CSV: one row per point.  Plot: period map and bifurcation diagrams.
"""

from __future__ import annotations

import json
import math

import numpy as np

from regentime.numfmt import eng, json_float
from regentime.reports.tables import csv_table, md_table, text_table

# Our own marks: the digit of the period where it has one, otherwise a symbol.
MARKS = {1: ".", 2: "2", 4: "4", 8: "8", 16: "H", 0: "#", -1: " ", -2: "?"}
LEGEND = ("legend: '.' period 1 (one energy)   '2' period 2   '4' period 4   '8' period 8   'H' period 16   "
          "'#' irregular (no period ≤ 16)   ' ' N round trips longer than the period   '?' not computed   "
          "'@' the file's setting")
_AXIS_LABEL = {"rate": ("repetition rate", "Hz"), "seed": ("seed energy", "J"), "pump": ("pump", "W")}


def _caution() -> str:
    from regentime.safety import CAUTION

    return CAUTION


def _axis_unit(m) -> tuple[str, str]:
    name, unit = _AXIS_LABEL[m.axis]
    if m.axis == "pump":
        return ("pump power", "W") if m.continuous else ("pump energy", "J")
    return name, unit


def _pick(n: int, limit: int) -> np.ndarray:
    """Evenly spaced indices, at most ``limit`` of ``n`` (all when n ≤ limit)."""
    if n <= limit:
        return np.arange(n)
    return np.unique(np.round(np.linspace(0, n - 1, limit)).astype(int))


def char_map(m, width: int = 100, height: int = 60) -> str:
    """The period map as characters: one row per round trip (N grows downwards), one column
    per value of the swept quantity (growing to the right)."""
    cols = _pick(m.period.shape[1], width)
    rows = _pick(m.period.shape[0], height)
    name, unit = _axis_unit(m)
    vals = m.values
    fi, fj = (m.file_point or (None, None))
    label_w = max(len(str(int(n))) for n in m.round_trips) + 3
    lines = []
    # ticks: first, middle, last value above the map
    left = eng(vals[cols[0]], unit, 3)
    mid = eng(vals[cols[len(cols) // 2]], unit, 3)
    right = eng(vals[cols[-1]], unit, 3)
    span = len(cols)
    tick = [" "] * max(span, len(left) + len(mid) + len(right) + 2)
    for pos, text in ((0, left), (span // 2 - len(mid) // 2, mid), (span - len(right), right)):
        pos = max(0, min(pos, len(tick) - len(text)))
        tick[pos:pos + len(text)] = list(text)
    lines.append(" " * label_w + "".join(tick).rstrip() + f"   ({name} →)")
    lines.append(" " * label_w + "".join("|" if c in (0, len(cols) // 2, len(cols) - 1) else "-"
                                         for c in range(len(cols))))
    for r in rows:
        chars = []
        for c in cols:
            ch = MARKS.get(int(m.period[r, c]), "?")
            if fi is not None and fj is not None and r == fi and c == fj:
                ch = "@"
            chars.append(ch)
        lines.append(f"N={int(m.round_trips[r]):<{label_w - 3}} " + "".join(chars))
    note = []
    if len(cols) < m.period.shape[1]:
        note.append(f"{len(cols)} of {m.period.shape[1]} columns shown")
    if len(rows) < m.period.shape[0]:
        note.append(f"{len(rows)} of {m.period.shape[0]} rows shown")
    if note:
        lines.append("  (" + ", ".join(note) + "; the JSON and CSV outputs hold every point)")
    lines.append(LEGEND)
    return "\n".join(lines)


def _file_summary(m) -> list[str]:
    out = []
    if m.file_point and m.file_point[0] is not None and m.file_point[1] is not None:
        i, j = m.file_point
        p = int(m.period[i, j])
        kind = {0: "irregular", -1: "does not fit into the period", -2: "not computed"}.get(p, f"period {p}")
        out.append(f"file's setting ('@'): N = {m.file_round_trip} at {eng(m.values[j], _axis_unit(m)[1])}"
                   f"{' (nearest column)' if m.file_nearest else ''}: {kind}, "
                   f"output {eng(m.energy_J[i, j], 'J')} mean, {eng(m.energy_min_J[i, j], 'J')} … "
                   f"{eng(m.energy_max_J[i, j], 'J')}")
    elif m.file_round_trip is not None:
        out.append(f"file's setting (N = {m.file_round_trip}) is outside the map")
    return out


def stability_text(m, noise=None, mc=None, noise_rows=None) -> str:
    name, unit = _axis_unit(m)
    c = m.counts()
    lines = [f"Shot-to-shot stability map: round trips × {name}"]
    fixed = []
    if m.axis != "rate":
        fixed.append(f"rate {eng(m.rates_Hz[0], 'Hz')}")
    if m.axis != "seed":
        fixed.append(f"seed {eng(m.seed_energies_J[0], 'J')}")
    if m.axis != "pump":
        fixed.append(f"pump {eng(m.pump_W[0], 'W' if m.continuous else 'J')}")
    lines.append("  fixed: " + ", ".join(fixed))
    lines.append(f"  each point: from full storage, {m.transient} shots dropped, {m.observe} classified "
                 f"(tolerance {m.rel_tol:g} of the largest output; irregular points run up to "
                 f"{m.transient + m.observe} + more shots before the verdict)")
    lines.append(f"  points: {c['period_1']} period 1, {c['period_2']} period 2, {c['period_4_to_16']} period 4–16, "
                 f"{c['irregular']} irregular, {c['not_fitting']} not fitting, in {m.elapsed_s:.2f} s")
    lines.append("")
    lines.append(char_map(m))
    lines.append("")
    lines.extend(_file_summary(m))
    for note in m.notes:
        lines.append(f"note: {note}")
    if noise is not None:
        lines.append("")
        lines.append(noise_text(noise, noise_rows))
    if mc is not None:
        lines.append("")
        lines.append(monte_carlo_text(mc))
    lines.append("")
    lines.append(_caution())
    return "\n".join(lines)


def _noise_ns(noise, rows):
    top = noise.output.size - 1
    if rows is None:
        lo, hi = max(1, noise.dump - 10), min(top, noise.dump + 10)
        rows = np.arange(lo, hi + 1)
    rows = np.asarray([n for n in np.atleast_1d(rows) if 1 <= n <= top], dtype=int)
    return rows[_pick(rows.size, 40)]


def noise_text(noise, rows=None) -> str:
    ns = _noise_ns(noise, rows)
    what = "pump power" if noise.continuous else "pump energy"
    body = []
    for n in ns:
        sl = None if noise.slope is None else noise.slope[n]
        p1 = "" if sl is None or not np.isfinite(sl) else ("yes" if abs(sl) < 1 else "no")
        mark = "  ← switch-out" if n == noise.dump else ""
        body.append([str(n), eng(noise.output[n], "J"), _f(noise.s_pump[n]), _f(noise.s_seed[n]),
                     _f(noise.combined[n]), "" if sl is None or not np.isfinite(sl) else f"{sl:+.3f}", p1 + mark])
    head = (f"Noise transfer at the file's settings (S = d ln E_out / d ln x, at each N's own steady state; "
            f"x = {what} or seed energy; dump rule '{noise.rule}')")
    return head + "\n" + text_table(["N", "output", "S_pump", "S_seed", "√(S²+S²)", "F'(x*)", "period 1"],
                                    body, align="rrrrrrl")


def _f(x) -> str:
    return "—" if x is None or not math.isfinite(float(x)) else f"{float(x):.4f}"


def monte_carlo_text(mc) -> str:
    return (f"Monte-Carlo at N = {mc.round_trip}: pump rms {mc.pump_rms * 100:.3g} %, seed rms "
            f"{mc.seed_rms * 100:.3g} % (independent every shot, random seed {mc.random_seed}) → output rms "
            f"{mc.rms_relative * 100:.3g} % of {eng(mc.mean_J, 'J')} ({mc.samples} shots in {mc.chains} chains); "
            f"static estimate √((S_pump σ)² + (S_seed σ)²) = {mc.linear_estimate * 100:.3g} %"
            + ("" if mc.period == 1 else f"; the noiseless setting is not period 1 (period code {mc.period}): "
               "the rms includes the alternation"))


def _fast_lists(d: dict) -> dict:
    """2-D float arrays to nested lists with null for NaN, without a per-element walk."""
    out = {}
    for k, v in d.items():
        if isinstance(v, np.ndarray) and v.dtype.kind == "f":
            obj = v.astype(object)
            obj[~np.isfinite(v)] = None
            out[k] = obj.tolist()
        else:
            out[k] = v
    return out


def stability_json(m, noise=None, mc=None, noise_rows=None) -> str:
    from regentime.reports.plan_json import _clean

    big = _fast_lists({k: v for k, v in m.to_dict().items() if isinstance(v, np.ndarray)})
    out = _clean({k: v for k, v in m.to_dict().items() if not isinstance(v, np.ndarray)})
    if noise is not None:
        out["noise_transfer"] = noise.to_dict(_noise_ns(noise, noise_rows if noise_rows is not None
                                                        else np.arange(1, noise.output.size)))
    if mc is not None:
        out["monte_carlo"] = mc.to_dict()
    out["cautions"] = [_caution()]
    out = _clean(out)
    out.update(big)
    order = ["axis", "rates_Hz", "seed_energies_J", "pump_power_W", "pump_energy_J", "round_trips", "period",
             "energy_J", "energy_min_J", "energy_max_J"]
    out = {**{k: out[k] for k in order if k in out}, **{k: v for k, v in out.items() if k not in order}}
    indent = 1 if m.period.size <= 2000 else None  # a big map stays compact (and fast)
    return json.dumps(out, indent=indent, ensure_ascii=False)


def stability_csv(m, noise=None, mc=None, noise_rows=None) -> str:
    name, unit = _axis_unit(m)
    rows = []
    rates = np.broadcast_to(m.rates_Hz, (m.period.shape[1],)) if m.axis == "rate" else None
    for i, n in enumerate(m.round_trips):
        for j in range(m.period.shape[1]):
            rate = float(rates[j]) if rates is not None else float(m.rates_Hz[0])
            seed = float(m.seed_energies_J[j] if m.axis == "seed" else m.seed_energies_J[0])
            pump = float(m.pump_W[j] if m.axis == "pump" else m.pump_W[0])
            rows.append([int(n), rate, seed, pump, int(m.period[i, j]), json_float(m.energy_J[i, j]),
                         json_float(m.energy_min_J[i, j]), json_float(m.energy_max_J[i, j])])
    pump_col = "pump_power_W" if m.continuous else "pump_energy_J"
    return csv_table(["round_trips", "rate_Hz", "seed_energy_J", pump_col, "period", "energy_J",
                      "energy_min_J", "energy_max_J"], rows)


def stability_md(m, noise=None, mc=None, noise_rows=None) -> str:
    name, unit = _axis_unit(m)
    c = m.counts()
    parts = [f"# Shot-to-shot stability: round trips × {name}", "",
             md_table(["period 1", "period 2", "period 4–16", "irregular", "not fitting"],
                      [[c["period_1"], c["period_2"], c["period_4_to_16"], c["irregular"], c["not_fitting"]]],
                      align="rrrrr"), "", "```", char_map(m), "```", ""]
    parts += [f"- {s}" for s in _file_summary(m) + [f"note: {n}" for n in m.notes]]
    if noise is not None:
        ns = _noise_ns(noise, noise_rows)
        parts += ["", "## Noise transfer", "",
                  md_table(["N", "output", "S_pump", "S_seed", "combined"],
                           [[str(n), eng(noise.output[n], "J"), _f(noise.s_pump[n]), _f(noise.s_seed[n]),
                             _f(noise.combined[n])] for n in ns])]
    if mc is not None:
        parts += ["", monte_carlo_text(mc)]
    parts += ["", f"> {_caution()}"]
    return "\n".join(parts)


def plot_stability(m, sweeps, path: str) -> None:
    """Period map (left) and the two bifurcation diagrams (right): outputs against rate at
    fixed N, and against N at fixed rate."""
    from regentime.reports.plots import _pyplot, save_figure
    from regentime.safety import CAUTION_SHORT

    plt = _pyplot(path)
    from matplotlib.colors import BoundaryNorm, ListedColormap

    fig = plt.figure(figsize=(12, 6.5))
    gs = fig.add_gridspec(2, 2, width_ratios=[1.1, 1])
    ax = fig.add_subplot(gs[:, 0])
    codes = [-2, -1, 0, 1, 2, 4, 8, 16]
    colours = ["#dddddd", "#ffffff", "#222222", "#9ecae1", "#fdae6b", "#e6550d", "#a63603", "#7f2704"]
    idx = np.searchsorted(codes, m.period)
    cmap = ListedColormap(colours)
    norm = BoundaryNorm(np.arange(len(codes) + 1) - 0.5, cmap.N)
    name, unit = _axis_unit(m)
    scale, pre = (1e3, "k") if m.axis == "rate" else ((1e-9, "n") if unit == "J" else (1.0, ""))
    x = m.values / scale
    y = m.round_trips
    ax.pcolormesh(_edges(x), _edges(y.astype(float)), idx, cmap=cmap, norm=norm, shading="flat")
    if m.file_point and None not in m.file_point:
        i, j = m.file_point
        ax.plot(x[j], y[i], marker="*", ms=14, mfc="white", mec="black", ls="none", label="file's setting")
        ax.legend(loc="upper right", fontsize=8)
    ax.set_xlabel(f"{name} ({pre}{unit})")
    ax.set_ylabel("switch-out round trip N")
    ax.set_title("period: light blue 1, orange 2, darker 4–16, black irregular", fontsize=9)
    if sweeps is not None:
        for row, sw in enumerate(sweeps):
            a = fig.add_subplot(gs[row, 1])
            xs = sw.values / (1e3 if sw.axis == "rate" else 1.0)
            xx = np.repeat(xs, sw.outputs.shape[1])
            a.scatter(xx, sw.outputs.ravel() * 1e6, s=0.6, color="C0", linewidths=0)
            if sw.axis == "rate":
                a.set_xlabel("repetition rate (kHz)")
                a.set_title(f"output against rate at N = {int(sw.fixed)}", fontsize=9)
            else:
                a.set_xlabel("switch-out round trip N")
                a.set_title(f"output against N at {eng(sw.fixed, 'Hz')}", fontsize=9)
            a.set_ylabel("output (µJ)")
            a.grid(True, alpha=0.3)
    fig.text(0.01, 0.005, CAUTION_SHORT, fontsize=6.5, wrap=True)
    fig.tight_layout(rect=(0, 0.03, 1, 1))
    save_figure(fig, path)
    plt.close(fig)


def _edges(v: np.ndarray) -> np.ndarray:
    if v.size == 1:
        return np.array([v[0] * 0.95, v[0] * 1.05]) if v[0] else np.array([-0.5, 0.5])
    mid = 0.5 * (v[1:] + v[:-1])
    return np.concatenate([[v[0] - (mid[0] - v[0])], mid, [v[-1] + (v[-1] - mid[-1])]])
