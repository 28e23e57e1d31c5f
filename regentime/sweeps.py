"""Sweeps: plan every combination of values of one or more keys and keep the key figures.

``sweep(source, {"pump.energy": ["6 mJ", "8 mJ"], "seed.energy": ["0.3 nJ", "0.5 nJ"]})``
plans 4 cavities (a process pool when there are many) and returns a :class:`SweepResult`
whose ``rows`` hold, per combination, the swept values (as given and in SI) and the figures
below, all from the plan's JSON (so they are the numbers ``regentime plan`` prints).

Figures (SI, the unit in the name): round_trip_time_s, dump_round_trip, output_energy_J,
extraction_efficiency, period, stored_energy_J, margin_s, margin_sigma, nearest_pre_ratio,
worst_pre_ratio, worst_post_ratio, b_integral_rad (up to the switch-out),
peak_fluence_J_m2 (highest in the gain crystal up to the switch-out), damage_fluence_J_m2
(the crystal's threshold scaled to the pulse), fluence_over_damage, warnings, cannot_be_met,
error (why a combination could not be planned; None otherwise).
"""

from __future__ import annotations

import itertools
import math
import os
from dataclasses import dataclass, field
from typing import Any, Callable, Iterable, Mapping, Optional, Sequence

from regentime.errors import InputError, RegentimeError

FIGURES = ("round_trip_time_s", "dump_round_trip", "output_energy_J", "extraction_efficiency",
           "period", "stored_energy_J", "margin_s", "margin_sigma", "nearest_pre_ratio",
           "worst_pre_ratio", "worst_post_ratio", "b_integral_rad", "peak_fluence_J_m2",
           "damage_fluence_J_m2", "fluence_over_damage", "warnings", "cannot_be_met")
POOL_FROM = 8  # combinations from which a process pool is used by default


def figures_of(plan) -> dict:
    """The key figures of one plan (from its JSON dict, the output contract)."""
    from regentime.planning.checks import scaled_damage_fluence

    d = plan.to_dict()
    n = d["dump"]["round_trip"]
    sw, ct, bu = d.get("switch") or {}, d.get("contrast") or {}, d["buildup"]
    peak = [f for f in bu.get("peak_fluence_J_m2", [])[1:n + 1] if f is not None]
    b_int = bu.get("b_integral_rad", [])
    medium, tau = plan.cavity.gain.medium, plan.cavity.seed.duration
    dmg = float(scaled_damage_fluence(medium.damage_fluence, medium.damage_duration, tau))
    peak_f = max(peak) if peak else None
    return {
        "round_trip_time_s": d["round_trip_time_s"],
        "dump_round_trip": n,
        "output_energy_J": d["dump"]["output_energy_J"],
        "extraction_efficiency": d["dump"]["extraction_efficiency"],
        "period": d["dump"].get("period"),
        "stored_energy_J": d.get("stored_energy_J"),
        "margin_s": sw.get("margin_s"),
        "margin_sigma": sw.get("margin_sigma"),
        "nearest_pre_ratio": ct.get("nearest_pre_ratio"),
        "worst_pre_ratio": ct.get("worst_pre_ratio"),
        "worst_post_ratio": ct.get("worst_post_ratio"),
        "b_integral_rad": b_int[n] if n < len(b_int) else None,
        "peak_fluence_J_m2": peak_f,
        "damage_fluence_J_m2": dmg,
        "fluence_over_damage": None if peak_f is None else peak_f / dmg,
        "warnings": sum(1 for c in d["checks"] if c["level"] == "warning"),
        "cannot_be_met": d["cannot_be_met"],
    }


def _one(job: tuple) -> dict:
    """Plan one combination (runs in a worker process): figures, or the error that stopped it."""
    from regentime.api import check_dump
    from regentime.fileformat import CavityDocument
    from regentime.planning.plan import make_plan

    text, source, dump, settings, outputs = job
    doc = CavityDocument.from_text(text, source)
    try:
        for key, value in settings:
            doc.set(key, value)
        figs = figures_of(make_plan(doc.to_cavity(), dump=check_dump(dump)))
        row = {k: figs[k] for k in outputs}
        row["error"] = None
    except RegentimeError as exc:
        row = {k: None for k in outputs}
        row["error"] = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
    return row


def _quiet_worker() -> None:
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)  # ctrl-c is the parent's to handle


@dataclass
class SweepResult:
    """Rows of a sweep, in the order of the combinations (the last key varies fastest)."""

    keys: list[str]
    outputs: list[str]
    rows: list[dict] = field(default_factory=list)
    total: int = 0
    interrupted: bool = False

    def columns(self) -> list[str]:
        return [c for k in self.keys for c in (k, f"{k} (SI)")] + self.outputs + ["error"]

    def to_dict(self) -> dict:
        from regentime.reports.plan_json import _clean

        return _clean({"keys": self.keys, "outputs": self.outputs, "total": self.total,
                       "done": len(self.rows), "interrupted": self.interrupted,
                       "rows": self.rows})

    def to_csv(self) -> str:
        import csv
        import io

        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        cols = self.columns()
        w.writerow(cols)
        for r in self.rows:
            w.writerow(["" if r.get(c) is None else r.get(c) for c in cols])
        return buf.getvalue()

    def _cells(self) -> tuple[list[str], list[list[str]]]:
        head = self.keys + self.outputs + ["error"]
        body = [[_cell(r.get(c)) for c in head] for r in self.rows]
        return head, body

    def to_text(self) -> str:
        from regentime.reports.tables import text_table

        head, body = self._cells()
        return text_table(head, body)

    def to_markdown(self) -> str:
        from regentime.reports.tables import md_table

        head, body = self._cells()
        return md_table(head, body)

    def _repr_markdown_(self) -> str:
        return self.to_markdown()

    def plot(self, figure: str = "output_energy_J", ax: Any = None):
        """``figure`` against the first swept key, one line per value of the second key."""
        if figure not in self.outputs:
            raise InputError("figure", figure, f"one of the sweep's outputs: {', '.join(self.outputs)}")
        if ax is None:
            import matplotlib.pyplot as plt

            ax = plt.subplots(figsize=(8, 4.5))[1]
        x_key = self.keys[0]
        groups: dict = {}
        for r in self.rows:
            label = r.get(self.keys[1]) if len(self.keys) > 1 else None
            groups.setdefault(label, []).append((r[f"{x_key} (SI)"], r.get(figure)))
        for label, pts in groups.items():
            pts = [(x, y) for x, y in pts if x is not None and y is not None]
            if pts:
                xs, ys = zip(*pts)
                ax.plot(xs, ys, "o-", ms=4, label=None if label is None else f"{self.keys[1]} = {label}")
        ax.set_xlabel(f"{x_key} (SI)")
        ax.set_ylabel(figure)
        ax.grid(True, alpha=0.3)
        if len(self.keys) > 1:
            ax.legend(fontsize=8)
        return ax


def _cell(v: Any) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        return f"{v:.6g}" if math.isfinite(v) else str(v)
    return str(v)


def sweep(source, axes: Mapping[str, Sequence[Any]], *, outputs: Optional[Iterable[str]] = None,
          dump=None, workers: Optional[int] = None,
          progress: Optional[Callable[[int, int], None]] = None) -> SweepResult:
    """Plan every combination of ``axes`` (key path -> values written as in a file).

    ``outputs``: the figures to keep (default all of :data:`FIGURES`).  ``workers``: processes
    (default: one up to :data:`POOL_FROM` combinations, else up to the CPU count).
    ``progress(done, total)`` is called after each plan.  Ctrl-C stops the sweep and returns
    the rows done so far with ``interrupted`` True.  Bad keys or values raise InputError
    naming the key before anything is planned.
    """
    from regentime.api import check_dump, source_text
    from regentime.fileformat import CavityDocument

    outs = list(FIGURES if outputs is None else outputs)
    for o in outs:
        if o not in FIGURES:
            raise InputError("outputs", o, f"one of {', '.join(FIGURES)}")
    if not axes:
        raise InputError("keys", None, "at least one key to sweep")
    check_dump(dump)
    keys = list(axes)
    text, name = source_text(source)
    si: dict[str, dict] = {}
    for key in keys:  # every value checked once, up front: one clear error before any work
        values = list(axes[key])
        if not values:
            raise InputError(key, "[]", "at least one value")
        doc = CavityDocument.from_text(text, name)
        si[key] = {}
        for v in values:
            doc.set(key, v)
            si[key][_id(v)] = doc.get_si(key)
    combos = list(itertools.product(*(list(axes[k]) for k in keys)))
    result = SweepResult(keys, outs, total=len(combos))
    jobs = [(text, name, dump, tuple(zip(keys, c)), tuple(outs)) for c in combos]
    heads = [{**{k: v for k, v in zip(keys, c)},
              **{f"{k} (SI)": si[k][_id(v)] for k, v in zip(keys, c)}} for c in combos]
    n_work = workers if workers is not None else (1 if len(jobs) < POOL_FROM else min(os.cpu_count() or 1, 8))
    try:
        if n_work <= 1:
            for head, job in zip(heads, jobs):
                result.rows.append({**head, **_one(job)})
                if progress:
                    progress(len(result.rows), len(jobs))
        else:
            _pool(result, heads, jobs, n_work, progress)
    except KeyboardInterrupt:
        result.interrupted = True
    return result


def _pool(result: SweepResult, heads: list, jobs: list, n_work: int, progress) -> None:
    from concurrent.futures import ProcessPoolExecutor

    pool = ProcessPoolExecutor(max_workers=n_work, initializer=_quiet_worker)
    try:
        for head, row in zip(heads, pool.map(_one, jobs, chunksize=1)):
            result.rows.append({**head, **row})
            if progress:
                progress(len(result.rows), len(jobs))
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


def _id(v: Any) -> str:
    return repr(v)


__all__ = ["FIGURES", "SweepResult", "figures_of", "sweep"]
