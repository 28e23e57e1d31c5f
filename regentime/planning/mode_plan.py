"""The cavity's TEM00 mode: from a Cavity to ABCD items, the thermal lens and the pump range.

:func:`plan_mode` gives a :class:`CavityModeResult` (stable, half trace, the 1/e² radius at
the centre of every element, both planes when a fold angle or a Brewster face makes the
cavity astigmatic, the stable range of absorbed pump power).  :func:`gain_mode_radius` is
what the extraction uses when ``gain.mode_radius`` is left out.  The physics is in
:mod:`regentime.physics.abcd`; this module names keys and raises :class:`InputError`.

Reduced distances: gases count with their length (n − 1 < 3e-4 is neglected), every solid
element with L/n, n the phase index of the library's dispersion formula at the laser
wavelength (a Brewster-cut element L/n³ tangential, L/n sagittal).  The thermal lens is a
thin lens at the crystal's centre; its focal length scales as 1/P with the absorbed average
pump power P (pulse energy × repetition rate for a pulsed pump).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Optional

from regentime.errors import MISSING, InputError
from regentime.model import Cavity, GainElement, Lens, Mirror, PockelsCell, Space
from regentime.physics import abcd
from regentime.planning.checks import Check

EDGE_MARGIN = 0.1  # warn within 10 % of the stable zone's width from an edge (common practice)
MISMATCH = 0.1  # typed vs computed mode radius (brief: warn above 10 %)
CLIP_WARN, CLIP_ERROR = 3.0, 2.0  # aperture in mode diameters (common practice)
SCAN_FACTOR = 3.0  # the stable range is searched from 0 to 3× the operating pump power
TABLE_POINTS = 13


class _Shown:
    def __init__(self, text: str) -> None:
        self.text = text

    def __repr__(self) -> str:
        return self.text


@dataclass(frozen=True)
class ModeElement:
    """The mode at one element's centre (m); tangential = sagittal for a round beam."""

    name: str
    kind: str
    path: str
    radius_m: float  # the larger of the two planes
    radius_tangential_m: float
    radius_sagittal_m: float
    aperture_m: Optional[float] = None

    @property
    def ellipticity(self) -> float:
        """w_min / w_max (1 for a round beam)."""
        big = max(self.radius_tangential_m, self.radius_sagittal_m)
        return min(self.radius_tangential_m, self.radius_sagittal_m) / big if big > 0 else math.nan


@dataclass(frozen=True)
class CavityModeResult:
    stable: bool
    half_trace: float  # (A+D)/2 of the round trip from end mirror 1 (tangential plane)
    half_trace_sagittal: float
    two_planes: bool
    thermal_focal_length_m: Optional[float]  # None: no thermal lens
    pump_power_W: float  # absorbed average pump power at the operating point
    elements: tuple[ModeElement, ...]
    stable_range: Optional[tuple[tuple[float, float], ...]]  # W absorbed; None: no thermal lens
    scan_max_W: float
    pump_table: tuple[tuple[float, float], ...]  # (absorbed W, radius at the crystal m; nan unstable)
    given_mode_radius: Optional[float]
    checks: tuple[Check, ...] = ()

    def radius_at(self, name: str) -> float:
        """1/e² radius (m, larger plane) at the centre of the element called ``name``."""
        for e in self.elements:
            if e.name == name:
                return e.radius_m
        raise KeyError(f"no element named {name!r}; elements: "
                       f"{', '.join(e.name for e in self.elements)}")

    @property
    def crystal(self) -> ModeElement:
        return next(e for e in self.elements if e.kind == "gain_medium")

    def of_kind(self, kind: str) -> Optional[ModeElement]:
        return next((e for e in self.elements if e.kind == kind), None)

    def to_dict(self) -> dict:
        out = {
            "stable": self.stable,
            "half_trace": self.half_trace,
            "thermal_focal_length_m": self.thermal_focal_length_m,
            "elements": [{"name": e.name, "kind": e.kind, "radius_m": e.radius_m}
                         | ({"radius_tangential_m": e.radius_tangential_m,
                             "radius_sagittal_m": e.radius_sagittal_m,
                             "ellipticity": e.ellipticity} if self.two_planes else {})
                         for e in self.elements],
            "stable_range": ([list(z) for z in self.stable_range]
                             if self.stable_range is not None else None),
            "stable_range_unit": "W of absorbed average pump power",
            "pump_power_W": self.pump_power_W,
            "radius_vs_pump": [{"pump_power_W": p, "crystal_radius_m": w}
                               for p, w in self.pump_table],
            "source": "given (gain.mode_radius)" if self.given_mode_radius is not None
            else "computed from the cavity",
        }
        if self.two_planes:
            out["half_trace_sagittal"] = self.half_trace_sagittal
        if self.stable_range is not None:
            out["stable_range_searched_W"] = [0.0, self.scan_max_W]
        return out


# ---- cavity -> physics inputs --------------------------------------------------------------

def has_focusing(cavity: Cavity) -> bool:
    """True when any mirror is curved, or there is a lens or a thermal lens."""
    return cavity.gain.thermal_lens is not None or any(
        (isinstance(e, Mirror) and math.isfinite(e.radius_of_curvature)) or isinstance(e, Lens)
        for e in cavity.elements)


def absorbed_pump_power(cavity: Cavity) -> float:
    """Absorbed average pump power (W): P·η_abs, or E·f_rep·η_abs for a pulsed pump."""
    p = cavity.pump
    avg = p.power if p.mode == "continuous" else p.energy * cavity.repetition_rate
    return float(avg) * p.absorbed_fraction


def thermal_focal_length(cavity: Cavity, power: float) -> float:
    """Thermal-lens focal length (m) at absorbed average pump power ``power`` (W); inf: none."""
    tl = cavity.gain.thermal_lens
    if tl is None or power <= 0.0:
        return math.inf
    if tl.focal_length is not None:
        return tl.focal_length * absorbed_pump_power(cavity) / power
    from regentime.materials.thermal import THERMO_OPTIC

    key = cavity.gain.medium.key
    lib = THERMO_OPTIC.get(key)
    dn_dt = tl.dn_dt if tl.dn_dt is not None else (lib.dn_dt if lib else None)
    k = tl.conductivity if tl.conductivity is not None else (lib.conductivity if lib else None)
    if dn_dt is None or k is None:
        missing = "dn_dt" if dn_dt is None else "thermal_conductivity"
        raise InputError(f"gain.thermal_lens.{missing}", MISSING,
                         f"a value: the library has no thermo-optic data for {key}")
    heat = tl.heat_fraction if tl.heat_fraction is not None else \
        1.0 - cavity.pump.wavelength / cavity.wavelength
    radius = tl.pump_radius or cavity.gain.pump_radius
    if radius is None and tl.pumping == "end":
        radius = cavity.gain.mode_radius
    if radius is None:
        raise InputError("gain.thermal_lens.pump_radius", MISSING,
                         "the pump radius (end pumping) or rod radius (side pumping); "
                         "gain.pump_radius is not given either")
    if tl.pumping == "side":
        return abcd.side_pumped_focal_length(heat * power, k, dn_dt, radius)
    return abcd.thermal_focal_length(heat * power, k, dn_dt, radius)


def _index(cavity: Cavity, e) -> float:
    from regentime.materials.dispersion import refractive_index

    if isinstance(e, GainElement):
        material, axis = cavity.gain.medium.host, cavity.gain.medium.axis
    elif isinstance(e, PockelsCell):
        material, axis = e.crystal, e.axis
    else:
        material, axis = getattr(e, "material", "vacuum"), getattr(e, "axis", "o")
    if material == "vacuum":
        return 1.0
    try:
        return float(refractive_index(material, cavity.wavelength, axis=axis))
    except ValueError as exc:
        raise InputError(e.path, material, f"a material with a dispersion formula ({exc})") from None


@dataclass(frozen=True)
class Segment:
    """One piece of the unfolded half cavity: physical length, reduced distances (t, s),
    and a thin lens (f_t, f_s) at its end; ``element`` is the index whose centre it ends at."""

    length: float
    reduced: tuple[float, float]
    focal: tuple[float, float]
    element: Optional[int]


def segments(cavity: Cavity, f_thermal: float) -> list[Segment]:
    """The half cavity from end mirror 1 to end mirror 2 as :class:`Segment` s."""
    out: list[Segment] = []
    inf = (math.inf, math.inf)
    els = cavity.elements
    for i, e in enumerate(els[1:-1], start=1):
        if isinstance(e, Space):
            out.append(Segment(e.length, (e.length, e.length), inf, None))
        elif isinstance(e, Mirror):
            out.append(Segment(0.0, (0.0, 0.0),
                               abcd.mirror_focal_lengths(e.radius_of_curvature,
                                                         e.angle_of_incidence), i))
        elif isinstance(e, Lens):
            out.append(Segment(0.0, (0.0, 0.0), (e.focal_length, e.focal_length), i))
        else:
            length = e.thickness
            n = _index(cavity, e) if length > 0 else 1.0
            if getattr(e, "brewster", False):
                half = tuple(d / 2 for d in abcd.brewster_reduced_distances(length, n))
            else:
                half = (length / n / 2, length / n / 2)
            lens = (f_thermal, f_thermal) if isinstance(e, GainElement) else inf
            out.append(Segment(length / 2, half, lens, i))
            out.append(Segment(length / 2, half, inf, None))
    return out


def _end_focals(e: Mirror) -> tuple[float, float]:
    f = e.radius_of_curvature / 2.0
    return (f, f)


def solve(cavity: Cavity, f_thermal: float) -> abcd.TwoPlaneMode:
    """Both planes of the mode for a given thermal focal length (m)."""
    segs = segments(cavity, f_thermal)
    items_t = tuple(abcd.Item(str(k), s.reduced[0], s.focal[0]) for k, s in enumerate(segs))
    items_s = tuple(abcd.Item(str(k), s.reduced[1], s.focal[1]) for k, s in enumerate(segs))
    first, last = cavity.elements[0], cavity.elements[-1]
    return abcd.two_plane_mode(items_t, items_s, _end_focals(first), _end_focals(last),
                               cavity.wavelength)


def _worst_half_trace(mode: abcd.TwoPlaneMode) -> float:
    t, s = mode.tangential.half_trace, mode.sagittal.half_trace
    return t if abs(t) >= abs(s) else s


def _astigmatic(cavity: Cavity) -> bool:
    return any((isinstance(e, Mirror) and e.angle_of_incidence > 0.0)
               or getattr(e, "brewster", False) for e in cavity.elements)


def _describe(cavity: Cavity, f_thermal: float) -> str:
    parts = []
    for e in cavity.elements:
        if isinstance(e, Mirror):
            r = e.radius_of_curvature
            text = "flat" if math.isinf(r) else f"R {r * 1e3:g} mm"
            if e.angle_of_incidence:
                text += f" at {math.degrees(e.angle_of_incidence):.3g}°"
            parts.append(f"{e.name} ({text})")
        elif isinstance(e, Lens):
            parts.append(f"{e.name} (f {e.focal_length * 1e3:g} mm)")
        elif isinstance(e, Space):
            parts.append(f"{e.length * 1e3:g} mm")
        elif isinstance(e, GainElement) and math.isfinite(f_thermal):
            parts.append(f"{e.name} (thermal lens f {f_thermal * 1e3:.4g} mm)")
        else:
            parts.append(e.name)
    return ", ".join(parts)


# ---- the result ------------------------------------------------------------------------------

def plan_mode(cavity: Cavity, *, require_stable: bool = True) -> Optional[CavityModeResult]:
    """The cavity mode, or None when there is nothing to compute it from (no curvature,
    lens or thermal lens, and ``gain.mode_radius`` given).

    Raises :class:`InputError` when the cavity is unstable at the operating point
    (``require_stable``), or when the mode radius is missing and cannot be computed.
    """
    given = cavity.gain.mode_radius
    if not has_focusing(cavity):
        if given is not None:
            return None
        raise InputError("gain.mode_radius", MISSING,
                         "the mode radius in the crystal, or mirror radius_of_curvature, lenses "
                         "or gain.thermal_lens so that it can be computed (a flat–flat cavity has "
                         "no stable mode)")
    power = absorbed_pump_power(cavity)
    f_th = thermal_focal_length(cavity, power)
    mode = solve(cavity, f_th)
    two = _astigmatic(cavity)
    m_worst = _worst_half_trace(mode)
    if require_stable and not mode.stable:
        raise InputError("cavity", _Shown(
            f"an unstable resonator, half trace (A+D)/2 = {m_worst:.6g}"
            + (" (tangential {:.6g}, sagittal {:.6g})".format(
                mode.tangential.half_trace, mode.sagittal.half_trace) if two else "")),
            f"|(A+D)/2| < 1; the elements: {_describe(cavity, f_th)}; change the mirror "
            "curvatures, the distances, the lenses or the pump power (thermal lens)")
    elements = _elements(cavity, mode)
    zones, table, scan_max = None, (), 0.0
    if cavity.gain.thermal_lens is not None and power > 0:
        scan_max = SCAN_FACTOR * power
        zones = abcd.stable_ranges(lambda p: _worst_half_trace(solve(cavity, thermal_focal_length(cavity, p))), 0.0, scan_max, samples=300)
        table = tuple(_table_row(cavity, scan_max * k / (TABLE_POINTS - 1))
                      for k in range(TABLE_POINTS))
    result = CavityModeResult(
        stable=mode.stable, half_trace=mode.tangential.half_trace,
        half_trace_sagittal=mode.sagittal.half_trace, two_planes=two,
        thermal_focal_length_m=None if cavity.gain.thermal_lens is None else f_th,
        pump_power_W=power, elements=elements, stable_range=zones, scan_max_W=scan_max,
        pump_table=table, given_mode_radius=given)
    return _with_checks(result, cavity)


def _crystal_index(cavity: Cavity) -> int:
    return next(i for i, e in enumerate(cavity.elements) if isinstance(e, GainElement))


def _table_row(cavity: Cavity, power: float) -> tuple[float, float]:
    mode = solve(cavity, thermal_focal_length(cavity, power))
    if not mode.stable:
        return (power, math.nan)
    return (power, _radius_of(cavity, mode, _crystal_index(cavity))[0])


def _radius_of(cavity: Cavity, mode: abcd.TwoPlaneMode, index: int) -> tuple[float, float, float]:
    """(larger, tangential, sagittal) radius at element ``index``'s centre."""
    n = len(cavity.elements)
    if index == 0:
        pos = 0
    elif index == n - 1:
        pos = len(mode.tangential.radii) - 1
    else:
        segs = segments(cavity, math.inf)
        pos = 1 + next(k for k, s in enumerate(segs) if s.element == index)
    wt, ws = mode.tangential.radii[pos][1], mode.sagittal.radii[pos][1]
    return max(wt, ws), wt, ws


def _elements(cavity: Cavity, mode: abcd.TwoPlaneMode) -> tuple[ModeElement, ...]:
    out = []
    for i, e in enumerate(cavity.elements):
        if isinstance(e, Space):
            continue
        w, wt, ws = _radius_of(cavity, mode, i)
        out.append(ModeElement(e.name, e.kind, e.path, w, wt, ws, e.aperture))
    return tuple(out)


def _with_checks(r: CavityModeResult, cavity: Cavity) -> CavityModeResult:
    from dataclasses import replace

    checks: list[Check] = []
    w_x = r.crystal.radius_m
    if r.given_mode_radius is not None and math.isfinite(w_x):
        diff = abs(r.given_mode_radius - w_x) / w_x
        if diff > MISMATCH:
            checks.append(Check("warning", "mode", f"gain.mode_radius {r.given_mode_radius * 1e6:.4g} µm "
                                f"differs by {diff:.0%} from the computed cavity mode at the crystal "
                                f"{w_x * 1e6:.4g} µm (the typed value is used)"))
    for e in r.elements:
        if e.aperture_m is None or not math.isfinite(e.radius_m):
            continue
        ratio = e.aperture_m / (2.0 * e.radius_m)
        text = (f"{e.name}: clear aperture {e.aperture_m * 1e3:.3g} mm is {ratio:.2g} mode diameters "
                f"(mode radius {e.radius_m * 1e6:.4g} µm)")
        if ratio < CLIP_ERROR:
            checks.append(Check("error", "aperture", text + f": below {CLIP_ERROR:g}, the mode is clipped"))
        elif ratio < CLIP_WARN:
            checks.append(Check("warning", "aperture", text + f": below {CLIP_WARN:g}, "
                                "diffraction losses and hot spots (common practice)"))
    if r.stable_range is not None:
        p = r.pump_power_W
        for lo, hi in r.stable_range:
            if lo <= p <= hi:
                margin = EDGE_MARGIN * (hi - lo)
                real_lo, real_hi = lo > 0.0, hi < r.scan_max_W * (1 - 1e-9)
                if (real_lo and p - lo < margin) or (real_hi and hi - p < margin):
                    checks.append(Check("warning", "mode", f"absorbed pump power {p:.4g} W is within "
                                        f"10 % of an edge of the stable range {lo:.4g}–{hi:.4g} W: the "
                                        "thermal lens may push the cavity unstable"))
    return replace(r, checks=tuple(checks))


def gain_mode_radius(cavity: Cavity) -> float:
    """The mode radius the extraction uses: ``gain.mode_radius`` when given, else the
    computed TEM00 radius (larger plane) at the crystal's centre."""
    if cavity.gain.mode_radius is not None:
        return cavity.gain.mode_radius
    result = plan_mode_at_crystal(cavity)
    return result


def plan_mode_at_crystal(cavity: Cavity) -> float:
    """The computed radius at the crystal (m), without the pump scan (cheap)."""
    if not has_focusing(cavity):
        plan_mode(cavity)  # raises the missing-radius error
    f_th = thermal_focal_length(cavity, absorbed_pump_power(cavity))
    mode = solve(cavity, f_th)
    if not mode.stable:
        plan_mode(cavity)  # raises the unstable-cavity error with the full message
    return _radius_of(cavity, mode, _crystal_index(cavity))[0]


def beam_profile(cavity: Cavity, points: int = 40):
    """(z m, w_t m list, w_s m list, [(z, element name)]) along the unfolded half cavity at the
    operating point; z is the physical position from end mirror 1 (radii inside a medium from
    its reduced distance)."""
    import numpy as np

    f_th = thermal_focal_length(cavity, absorbed_pump_power(cavity))
    mode = solve(cavity, f_th)
    segs = segments(cavity, f_th)
    planes = []
    for plane, m in ((0, mode.tangential), (1, mode.sagittal)):
        a, b, c, d = abcd.round_trip(tuple(abcd.Item(str(k), s.reduced[plane], s.focal[plane])
                                           for k, s in enumerate(segs)),
                                     _end_focals(cavity.elements[0])[plane],
                                     _end_focals(cavity.elements[-1])[plane])
        q = 1.0 / complex((d - a) / (2.0 * b), -math.sqrt(1.0 - m.half_trace ** 2) / abs(b))
        planes.append(q)
    zs, wts, wss, marks = [0.0], [], [], [(0.0, cavity.elements[0].name)]
    lam = cavity.wavelength
    w = lambda q: math.sqrt(lam / (math.pi * (-(1.0 / q).imag)))  # noqa: E731
    qt, qs = planes
    wts.append(w(qt)), wss.append(w(qs))
    z = 0.0
    for s in segs:
        n = points if s.length > 0 else 0
        for k in range(1, n + 1):
            t = k / n
            zs.append(z + t * s.length)
            wts.append(w(qt + t * s.reduced[0]))
            wss.append(w(qs + t * s.reduced[1]))
        z += s.length
        qt, qs = qt + s.reduced[0], qs + s.reduced[1]
        if s.element is not None:
            marks.append((z, cavity.elements[s.element].name))
        qt = abcd._propagate(qt, abcd.thin_lens(s.focal[0]))
        qs = abcd._propagate(qs, abcd.thin_lens(s.focal[1]))
    marks.append((z, cavity.elements[-1].name))
    return np.array(zs), wts, wss, marks
