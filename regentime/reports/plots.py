"""Pictures to PNG files (matplotlib, Agg backend, imported only when a plot is asked for)."""

from __future__ import annotations

import io

import numpy as np

from regentime.errors import InputError


def _pyplot(path: str):
    try:
        import matplotlib

        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:  # pragma: no cover - depends on the environment
        raise InputError("--plot", path, "matplotlib installed (pip install 'regentime[plot]')") from None
    return plt


def save_figure(fig, path: str) -> None:
    """Render to memory, then write atomically (never a half-written PNG)."""
    from regentime.atomic_write import write_atomic

    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=120)
    write_atomic(path, buf.getvalue())


def _axes(ax):
    """``ax`` or a new figure's Axes (pyplot imported only here)."""
    if ax is not None:
        return ax
    import matplotlib.pyplot as plt

    return plt.subplots(figsize=(8, 4.5))[1]


def draw_buildup(plan, ax=None):
    """Energy per round trip (log scale), output if switched out, the dump and the peak marked,
    on ``ax`` (a new figure when None).  Returns the Axes."""
    ax = _axes(ax)
    b, r = plan.buildup, plan.buildup.result
    k = np.arange(b.n_shown + 1)
    ax.semilogy(k, r.energy[: k.size], "o-", ms=3, label="in the cavity, E_k")
    ax.semilogy(k[1:], b.output[1: k.size], "s-", ms=3, alpha=0.7, label="output if switched out after k")
    ax.axvline(b.dump_round_trip, color="C3", ls="--", label=f"switch out: {b.dump_round_trip} ({b.rule})")
    if b.peak_round_trip != b.dump_round_trip:
        ax.axvline(b.peak_round_trip, color="C2", ls=":", label=f"peak output: {b.peak_round_trip}")
    ax.set_xlabel("round trip")
    ax.set_ylabel("energy (J)")
    ax.set_title(f"{plan.cavity.name}: build-up, T_rt = {plan.optics.round_trip_time * 1e9:.3f} ns")
    ax.grid(True, which="both", alpha=0.3)
    ax.legend(loc="lower right", fontsize=8)
    return ax


def draw_contrast(plan, ax=None):
    """Satellites E/E_main (log scale) against time from the main pulse (ns), on ``ax``."""
    ax = _axes(ax)
    c = plan.contrast
    floor = 1e-12
    for sats, color, label in ((c.pre_pulses, "tab:red", "pre-pulses"),
                               (c.post_pulses, "tab:blue", "post-pulses"),
                               (c.seed_leak, "tab:green", "seed leakage")):
        pts = [(s.time * 1e9, max(s.energy / c.main_energy, floor)) for s in sats]
        if pts:
            x, y = zip(*pts)
            ax.vlines(x, floor, y, colors=color, linewidth=1.0)
            ax.plot(x, y, "o", color=color, ms=4, label=label)
    ax.plot([0.0], [1.0], "D", color="black", label="main pulse")
    ax.set_yscale("log")
    ax.set_xlabel("time from the main pulse (ns)")
    ax.set_ylabel("E / E_main")
    ax.set_title(f"{plan.cavity.name}: satellites")
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=8)
    return ax


def plot_buildup(plan, path: str) -> None:
    """The build-up picture (:func:`draw_buildup`) to a PNG file."""
    plt = _pyplot(path)
    fig, ax = plt.subplots(figsize=(8, 4.5))
    draw_buildup(plan, ax)
    fig.tight_layout()
    save_figure(fig, path)
    plt.close(fig)
