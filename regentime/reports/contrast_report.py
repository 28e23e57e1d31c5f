"""Contrast of a plan as text, Markdown, CSV and JSON, and the summary lines of the setup card.

Formatting only: the numbers come from :class:`regentime.planning.contrast.ContrastResult`.
Text and Markdown list the satellites within ±span of the main pulse (and say how many weaker
pre-pulses further out are left out); CSV and JSON list all of them.
"""

from __future__ import annotations

import json
import math
from typing import Optional

from regentime.numfmt import eng
from regentime.reports.tables import csv_table, md_table, text_table

_KIND = {"pre": "pre-pulse (leak)", "post": "post-pulse", "seed": "seed leak"}


def _ratio(r: float) -> str:
    if r is None or (isinstance(r, float) and math.isnan(r)):
        return "—"
    if math.isinf(r):
        return "∞"
    return f"{r:.3g}"


def _db(r: float) -> str:
    if r is None or math.isinf(r) or r <= 0:
        return "∞" if r is not None and math.isinf(r) else "—"
    return f"{10 * math.log10(r):.1f}"


def _caution() -> str:
    from regentime.safety import CAUTION

    return CAUTION


def contrast_summary_lines(plan) -> list[str]:
    """A few lines for the setup card: nearest/worst pre-pulse, worst post-pulse, cleaner."""
    c = plan.contrast
    s = c.summary
    lines = [
        f"nearest pre-pulse (−{eng(c.round_trip_time, 's')}): {_ratio(s.nearest_pre_ratio)} "
        f"({_db(s.nearest_pre_ratio)} dB); worst pre-pulse {_ratio(s.worst_pre_ratio)} "
        f"({_db(s.worst_pre_ratio)} dB)",
        f"worst post-pulse {_ratio(s.worst_post_ratio)} ({_db(s.worst_post_ratio)} dB); worst seed leak "
        f"{_ratio(s.worst_seed_ratio)}; satellites within ±{eng(s.span, 's')}: {eng(s.energy_within, 'J')} "
        f"(ratio {_ratio(s.energy_within_ratio)})",
    ]
    if c.cleaned is not None:
        k = c.cleaned.summary
        lines.append(f"after the cleaner: nearest pre-pulse {_ratio(k.nearest_pre_ratio)}, worst pre-pulse "
                     f"{_ratio(k.worst_pre_ratio)}, worst post-pulse {_ratio(k.worst_post_ratio)}"
                     + ("" if c.cleaned.fits else " (cleaner edge does not fit in one round trip)"))
    return lines


def _rows(c, everything: bool):
    """Satellite rows (sorted by time) and the number of satellites left out."""
    cleaned = {}
    if c.cleaned is not None:
        for s in c.cleaned.pre_pulses + c.cleaned.post_pulses + c.cleaned.seed_leak:
            cleaned[(s.kind, s.index)] = s
    rows, hidden = [], 0
    for s in c.satellites:
        if not everything and abs(s.time) > c.summary.span * (1 + 1e-12):
            hidden += 1
            continue
        rows.append((s, cleaned.get((s.kind, s.index))))
    return rows, hidden


def _summary_rows(c):
    s = c.summary
    rows = [("nearest pre-pulse (−T_rt)", s.nearest_pre_ratio), ("worst pre-pulse", s.worst_pre_ratio),
            ("worst post-pulse", s.worst_post_ratio), ("worst seed leak", s.worst_seed_ratio),
            (f"all satellites within ±{eng(s.span, 's')}", s.energy_within_ratio)]
    after = c.cleaned.summary if c.cleaned is not None else None
    if after is None:
        return ["", "ratio E_main/E", "dB"], [(name, _ratio(r), _db(r)) for name, r in rows]
    after_vals = [after.nearest_pre_ratio, after.worst_pre_ratio, after.worst_post_ratio, after.worst_seed_ratio,
                  after.energy_within_ratio]
    return (["", "ratio E_main/E", "dB", "after cleaner", "dB after"],
            [(name, _ratio(r), _db(r), _ratio(a), _db(a)) for (name, r), a in zip(rows, after_vals)])


def _header_lines(plan, c) -> list[str]:
    cav = plan.cavity
    pol, cell = plan.optics.polarizer, plan.optics.cell
    lines = [
        f"main pulse: {eng(c.main_energy, 'J')} at the output port, {eng(c.main_time, 's')} after the trigger "
        f"(switched out after N = {c.dump_round_trip} round trips of {eng(c.round_trip_time, 's')})",
        f"leak per return ℓ = {c.leak_per_return:.3g} (polarizer extinction ratio {pol.extinction_ratio:g}, "
        f"R_s {pol.reflection_s * 100:.4g} %, cell contrast {cell.contrast:g}, {cav.switch.scheme} scheme)",
        f"left in the cavity by the switch-out: {c.left_in_cavity:.3g} of the pulse; with the cell off "
        f"{c.post_out:.3g} of it leaves per return, {c.post_keep:.3g} stays",
    ]
    return lines + [f"note: {n}" for n in c.notes]


def _ns(t: float) -> str:
    return eng(t, "s", fixed_prefix="n", digits=3)


def _cleaner_lines(plan, c) -> list[str]:
    k = c.cleaned
    if k is None:
        return []
    cl = plan.cavity.cleaner
    return [
        f"cleaner ({cl.output}): gate {eng(k.width, 's')} wide, 50 % edges at {_ns(k.open_edge)} and "
        f"{_ns(k.close_edge)} after the trigger at the cleaner cell; generator delay {_ns(k.delay)}",
        f"  extinction ratio {k.extinction_ratio:g}, open transmission {k.transmission * 100:.3g} %, "
        f"main pulse after it {eng(k.main_energy, 'J')}; free time beside each edge {eng(k.margin, 's')}"
        + ("" if k.fits else "  — THE EDGE DOES NOT FIT in one round trip around the main pulse"),
    ]


def _target_lines(answers) -> list[str]:
    out = []
    for a in answers or ():
        what = "nearest pre-pulse" if a.which == "nearest" else "worst pre-pulse"
        head = f"target {what} ratio {a.target:.3g}: now {_ratio(a.now)}" + (" (met)" if a.met else "")
        er = "not reachable with this cell contrast (best " + _ratio(a.limit_by_contrast) + ")" \
            if a.extinction_needed is None else f"{a.extinction_needed:.3g}"
        ct = "not reachable with this polarizer (best " + _ratio(a.limit_by_extinction) + ")" \
            if a.contrast_needed is None else f"{a.contrast_needed:.3g}"
        out += [head,
                f"  polarizer extinction ratio needed (cell contrast {a.contrast_now:g} held): {er}",
                f"  cell contrast needed (extinction ratio {a.extinction_now:g} held): {ct}"]
        if a.both_factor is not None:
            out.append(f"  or both improved by ×{a.both_factor:.3g}: extinction ratio "
                       f"{a.extinction_now * a.both_factor:.3g}, cell contrast {a.contrast_now * a.both_factor:.3g}")
    return out


def format_text(plan, targets=None, markdown: bool = False, everything: bool = False) -> str:
    """Human-readable contrast report (aligned text, or Markdown with ``markdown=True``)."""
    c = plan.contrast
    table = md_table if markdown else text_table
    title = f"Contrast — {plan.cavity.name}"
    out = [f"# {title}" if markdown else title, ""]
    head = _header_lines(plan, c)
    out += ([f"- {h}" for h in head] if markdown else head) + [""]
    h, r = _summary_rows(c)
    out += ["## Summary" if markdown else "Summary", "", table(h, r), ""]
    cl = _cleaner_lines(plan, c)
    if cl:
        out += (["## Cleaner", ""] + [f"- {x.strip()}" for x in cl] if markdown else cl) + [""]
    tl = _target_lines(targets)
    if tl:
        out += (["## Target", ""] + [f"- {x.strip()}" for x in tl] if markdown else tl) + [""]
    rows, hidden = _rows(c, everything)
    headers = ["satellite", "#", "time from main", "from trigger", "energy", "ratio", "dB"]
    if c.cleaned is not None:
        headers += ["after cleaner", "dB after"]
    body = []
    for s, k in rows:
        row = [_KIND[s.kind], s.index, eng(s.time, "s", fixed_prefix="n", digits=3),
               eng(s.time_from_trigger, "s", fixed_prefix="n", digits=3), eng(s.energy, "J", digits=3),
               _ratio(s.ratio), _db(s.ratio)]
        if c.cleaned is not None:
            row += [_ratio(k.ratio) if k else "—", _db(k.ratio) if k else "—"]
        body.append(row)
    out += ["## Satellites" if markdown else f"Satellites within ±{eng(c.summary.span, 's')} of the main pulse",
            ""]
    if markdown:
        out += [f"Within ±{eng(c.summary.span, 's')} of the main pulse; ratio = E_main/E.", ""]
    out.append(table(headers, body, align="lrrrrrr" + ("rr" if c.cleaned is not None else "")))
    if hidden:
        out += ["", f"{hidden} more satellites (earlier leak pre-pulses, weaker) are outside the span; "
                    "--format csv or json lists them all, --span widens the window."]
    notes = [x for x in c.checks if x.level != "info"]
    if notes:
        out += [""] + [f"{x.level}: {x.message}" for x in notes]
    out += ["", _caution()]
    return "\n".join(out) + "\n"


def format_csv(plan) -> str:
    """Every satellite, one row each, SI units (with the cleaned values when there is a cleaner)."""
    c = plan.contrast
    rows, _ = _rows(c, everything=True)
    headers = ["kind", "index", "time_s", "time_from_trigger_s", "energy_J", "ratio", "dB", "note"]
    if c.cleaned is not None:
        headers += ["cleaned_energy_J", "cleaned_ratio"]
    body = []
    for s, k in rows:
        row = [s.kind, s.index, s.time, s.time_from_trigger, s.energy, _num(s.ratio), _num(s.db), s.note]
        if c.cleaned is not None:
            row += [k.energy if k else "", _num(k.ratio) if k else ""]
        body.append(row)
    return csv_table(headers, body)


def _num(x: float):
    return x if math.isfinite(x) else "inf"


def to_dict(plan, targets=None) -> dict:
    """JSON object of ``regentime contrast`` (the plan's ``contrast`` object plus context)."""
    from regentime.safety import CAUTION

    c = plan.contrast
    out = {"name": plan.cavity.name, "source": plan.cavity.source, "round_trip_time_s": c.round_trip_time,
           "dump_round_trip": c.dump_round_trip, "contrast": c.to_dict(),
           "checks": [x.to_dict() for x in c.checks]}
    if targets:
        out["target"] = [a.to_dict() for a in targets]
    out["cautions"] = [CAUTION]
    return _clean(out)


def _clean(x):
    if isinstance(x, dict):
        return {k: _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, float) and not math.isfinite(x):
        return None
    return x


def format_json(plan, targets=None) -> str:
    return json.dumps(to_dict(plan, targets), indent=2, ensure_ascii=False)


def render(plan, fmt: str, targets: Optional[list] = None) -> str:
    if fmt == "json":
        return format_json(plan, targets)
    if fmt == "csv":
        return format_csv(plan)
    return format_text(plan, targets, markdown=(fmt == "md"))


def plot_png(plan, dpi: int = 120) -> bytes:
    """Stem plot of the satellites (E/E_main, log scale) against time from the main pulse.

    One panel, or two (before and after the cleaner) when the file has a cleaner.  Returns
    the PNG bytes (the caller writes them).  matplotlib is imported here, with the Agg backend.
    """
    import io

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    c = plan.contrast
    panels = [("as switched out", c.pre_pulses, c.post_pulses, c.seed_leak, c.main_energy)]
    if c.cleaned is not None:
        k = c.cleaned
        panels.append(("after the cleaner", k.pre_pulses, k.post_pulses, k.seed_leak, k.main_energy))
    fig, axes = plt.subplots(len(panels), 1, figsize=(10.5, 3.4 * len(panels) + 0.6), sharex=True, squeeze=False)
    span = c.summary.span
    styles = {"pre": ("tab:red", "o", "leak pre-pulses"), "post": ("tab:blue", "s", "post-pulses"),
              "seed": ("tab:green", "^", "seed leakage")}
    floor = 1e-12
    for ax, (title, pre, post, seed, main) in zip(axes[:, 0], panels):
        for kind, sats in (("pre", pre), ("post", post), ("seed", seed)):
            pts = [(s.time * 1e9, max(s.energy / main, floor)) for s in sats if abs(s.time) <= span * 1.0001]
            if not pts:
                continue
            x, y = zip(*pts)
            color, marker, label = styles[kind]
            ax.vlines(x, floor, y, colors=color, linewidth=1.0)
            ax.plot(x, y, linestyle="none", marker=marker, color=color, label=label, markersize=4)
        ax.vlines([0.0], floor, 1.0, colors="black", linewidth=1.6)
        ax.plot([0.0], [1.0], marker="D", color="black", linestyle="none", label="main pulse")
        if c.cleaned is not None and title.startswith("after"):
            half = 0.5 * c.cleaned.width * 1e9  # the gate is centred on the main pulse
            ax.axvspan(-half, half, color="0.9", zorder=0, label="cleaner gate (50 %)")
        ax.set_yscale("log")
        ax.set_ylim(floor, 3.0)
        ax.set_ylabel("E / E_main")
        ax.set_title(f"{plan.cavity.name}: satellites {title}", fontsize=10)
        ax.grid(True, which="major", alpha=0.3)
        ax.legend(fontsize=8, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)
    axes[-1, 0].set_xlabel("time from the main pulse (ns)")
    from regentime.safety import CAUTION_SHORT

    fig.text(0.01, 0.005, CAUTION_SHORT, fontsize=6.5, wrap=True)
    fig.tight_layout(rect=(0, 0.04, 1, 1))
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=dpi)
    plt.close(fig)
    return buf.getvalue()


__all__ = ["contrast_summary_lines", "format_csv", "format_json", "format_text", "plot_png", "render", "to_dict"]
