"""The DISPERSION section of the text plan: fs², fs³ per element, per round trip, at the switch-out."""

from __future__ import annotations


def dispersion_lines(plan) -> list[str]:
    d = plan.dispersion
    if d is None:
        return []
    lines = [f"  at {d.wavelength_m * 1e9:.1f} nm; elements per single pass, crossed twice per round trip"]
    for e in d.elements:
        if e.gdd_s2:
            lines.append(f"  {e.name:<12} {e.material:<14} {e.length_m * 1e3:8.1f} mm "
                         f"{e.gdd_s2 * 1e30:10.0f} fs²  {e.tod_s3 * 1e45:9.0f} fs³")
    rt = d.per_round_trip
    lines.append(f"  per round trip: {rt.gdd * 1e30:,.0f} fs², {rt.tod * 1e45:,.0f} fs³")
    for k, x in d.by_round_trip():
        mark = "  <- switch-out" if k == d.dump_round_trip else ""
        lines.append(f"  after {k:3d} round trips + exit pass: {x.gdd * 1e30:12,.0f} fs² "
                     f"{x.tod * 1e45:12,.0f} fs³{mark}")
    return lines
