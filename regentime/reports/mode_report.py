"""The cavity mode as text lines, a table against pump power, and the beam-radius picture."""

from __future__ import annotations

import math

from regentime.reports.tables import text_table


def _um(x) -> str:
    return "unstable" if x is None or not math.isfinite(x) else f"{x * 1e6:.4g} µm"


def range_text(mode) -> str:
    if mode.stable_range is None:
        return "no thermal lens: the mode does not depend on the pump power"
    if not mode.stable_range:
        return (f"stable nowhere between 0 and {mode.scan_max_W:.4g} W of absorbed average "
                "pump power")
    zones = ", ".join(f"{lo:.4g}–{hi:.4g} W" + (" (searched up to here)"
                                                 if hi >= mode.scan_max_W * (1 - 1e-9) else "")
                      for lo, hi in mode.stable_range)
    return f"stable for absorbed average pump power {zones}; operating at {mode.pump_power_W:.4g} W"


def mode_lines(mode) -> list[str]:
    """The MODE section of the setup card: radius at the crystal, cell and polarizer; range."""
    if mode is None:
        return ["not computed: no mirror curvature, lens or thermal lens given "
                "(gain.mode_radius used as typed)"]
    out = []
    for kind, label in (("gain_medium", "crystal"), ("pockels_cell", "cell"),
                        ("polarizer", "polarizer")):
        e = mode.of_kind(kind)
        if e is not None:
            extra = (f" (tangential {_um(e.radius_tangential_m)}, sagittal "
                     f"{_um(e.radius_sagittal_m)}, ellipticity {e.ellipticity:.3f})"
                     if mode.two_planes else "")
            out.append(f"1/e² radius at the {label} ({e.name}): {_um(e.radius_m)}{extra}")
    ht = f"half trace (A+D)/2 = {mode.half_trace:.4g}"
    if mode.two_planes:
        ht += f" tangential, {mode.half_trace_sagittal:.4g} sagittal"
    if mode.thermal_focal_length_m is not None:
        ht += f"; thermal lens f = {mode.thermal_focal_length_m * 1e3:.4g} mm"
    out.append(ht)
    out.append(range_text(mode))
    out.append("mode radius " + ("typed (gain.mode_radius) and used as given"
                                 if mode.given_mode_radius is not None
                                 else "computed from the cavity and used for the extraction"))
    return out


def element_table(mode) -> str:
    head = ["element", "kind", "radius"] + (["tangential", "sagittal", "ellipticity"]
                                            if mode.two_planes else []) + ["aperture"]
    rows = []
    for e in mode.elements:
        row = [e.name, e.kind, _um(e.radius_m)]
        if mode.two_planes:
            row += [_um(e.radius_tangential_m), _um(e.radius_sagittal_m), f"{e.ellipticity:.3f}"]
        row.append("" if e.aperture_m is None else f"{e.aperture_m * 1e3:.3g} mm")
        rows.append(row)
    return text_table(head, rows)


def pump_table(mode) -> str:
    return text_table(["absorbed pump", "radius at the crystal"],
                      [[f"{p:.4g} W", _um(w)] for p, w in mode.pump_table])


def plot_mode(cavity, mode, path: str) -> None:
    """Beam radius along the unfolded cavity (both planes) with the elements marked, and the
    crystal radius against absorbed pump power when there is a thermal lens."""
    from regentime.planning.mode_plan import beam_profile
    from regentime.reports.plots import _pyplot, save_figure

    plt = _pyplot(path)
    z, wt, ws, marks = beam_profile(cavity)
    panels = 2 if mode.pump_table else 1
    fig, axes = plt.subplots(panels, 1, figsize=(9, 4 + 2.5 * (panels - 1)), squeeze=False)
    ax = axes[0][0]
    ax.plot(z * 1e3, [w * 1e3 for w in wt], label="tangential" if mode.two_planes else "1/e² radius")
    if mode.two_planes:
        ax.plot(z * 1e3, [w * 1e3 for w in ws], "--", label="sagittal")
    top = max(max(wt), max(ws)) * 1e3
    for pos, name in marks:
        ax.axvline(pos * 1e3, color="0.6", lw=0.8)
        ax.text(pos * 1e3, top * 1.02, name, rotation=90, fontsize=7, va="bottom", ha="center")
    ax.set_ylim(0, top * 1.35)
    ax.set_xlabel("position along the cavity from the first end mirror (mm)")
    ax.set_ylabel("1/e² beam radius (mm)")
    ax.set_title(f"{cavity.name}: TEM00 mode, half trace {mode.half_trace:.3g}", fontsize=9)
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=8, loc="lower right")
    if panels == 2:
        bx = axes[1][0]
        p = [r[0] for r in mode.pump_table]
        w = [r[1] * 1e3 if math.isfinite(r[1]) else float("nan") for r in mode.pump_table]
        bx.plot(p, w, "o-", ms=3)
        bx.axvline(mode.pump_power_W, color="C3", ls="--", label="operating point")
        for lo, hi in mode.stable_range or ():
            bx.axvspan(lo, hi, color="C2", alpha=0.1)
        bx.set_xlabel("absorbed average pump power (W)")
        bx.set_ylabel("radius at the crystal (mm)")
        bx.grid(True, alpha=0.3)
        bx.legend(fontsize=8)
    fig.tight_layout()
    save_figure(fig, path)
    plt.close(fig)
