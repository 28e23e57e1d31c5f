"""TEM00 mode of a two-mirror standing-wave cavity from ABCD ray matrices (SI numbers only).

Ray vector (x, x') with x in m and x' in rad; every matrix has determinant 1 because
crystals enter as reduced distances L/n (Siegman, Lasers, ch. 15.1).  The cavity is given
as the sequence of items met going from end mirror 1 to end mirror 2 (spaces and thin
lenses); a curved mirror of radius R (concave positive) acts on reflection as a thin lens
f = R/2.  The round trip starts just after reflection at end mirror 1:

    M = L1 · (reversed items) · L2 · (items),   half_trace m = (A + D)/2,

stable when |m| < 1 (Kogelnik & Li, Appl. Opt. 5, 1550 (1966)).  The self-consistent beam
parameter then follows from 1/q = (D − A)/(2B) − i·sqrt(1 − m²)/|B| and the 1/e² radius
from w² = λ/(π·Im(−1/q)).  Valid for paraxial rays and thin lenses; λ is the vacuum
wavelength because the reduced distances already carry the index.

References: Kogelnik & Li, Appl. Opt. 5, 1550 (1966); Siegman, Lasers (1986), ch. 15, 19;
Innocenzi et al., Appl. Phys. Lett. 56, 1831 (1990) for the end-pumped thermal lens.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

Matrix = tuple[float, float, float, float]  # (A, B, C, D)

IDENTITY: Matrix = (1.0, 0.0, 0.0, 1.0)


def space(distance: float) -> Matrix:
    """Free propagation over ``distance`` (m, ≥ 0; a reduced distance L/n inside a medium).

    Matrix [[1, d], [0, 1]] (Siegman, Lasers, ch. 15.1).
    """
    return (1.0, distance, 0.0, 1.0)


def thin_lens(focal_length: float) -> Matrix:
    """Thin lens of focal length f (m; positive converging, ``math.inf`` for none).

    Matrix [[1, 0], [−1/f, 1]] (Siegman, Lasers, ch. 15.1); valid while the lens is thin
    compared with the distances around it.
    """
    return (1.0, 0.0, -1.0 / focal_length, 1.0)


def interface(n1: float, n2: float) -> Matrix:
    """Refraction at a flat interface from index n1 to n2 (real angles, not reduced).

    Matrix [[1, 0], [0, n1/n2]] (Siegman, Lasers, ch. 15.1).  Used to check that a slab of
    length L and index n equals a reduced distance L/n.
    """
    return (1.0, 0.0, 0.0, n1 / n2)


def mirror_focal_lengths(radius: float, angle_of_incidence: float = 0.0) -> tuple[float, float]:
    """Equivalent thin-lens focal lengths (tangential, sagittal) of a mirror on reflection.

    f_t = R·cosθ/2, f_s = R/(2·cosθ); R in m, concave positive, ``math.inf`` for flat;
    θ the angle of incidence in rad, 0 ≤ θ < π/2 (Kogelnik, Ippen, Dienes & Shank,
    IEEE J. Quantum Electron. 8, 373 (1972); Siegman, Lasers, ch. 15.3).
    """
    c = math.cos(angle_of_incidence)
    return radius * c / 2.0, radius / (2.0 * c)


def thermal_focal_length(
    heat_power: float, conductivity: float, dn_dt: float, pump_radius: float
) -> float:
    """Thermal-lens focal length of an end-pumped rod (m).

    f = π·K·w_p² / (P_heat · dn/dT) with K the thermal conductivity (W/(m·K)), w_p the pump
    radius (m), P_heat the heat deposited (W) and dn/dT (1/K); end stresses and bulging are
    neglected.  Innocenzi, Yura, Fincher & Fields, Appl. Phys. Lett. 56, 1831 (1990);
    Koechner, Solid-State Laser Engineering, ch. 7.  Returns ``math.inf`` for no heat.
    """
    if heat_power * dn_dt == 0.0:
        return math.inf
    return math.pi * conductivity * pump_radius**2 / (heat_power * dn_dt)


def side_pumped_focal_length(
    heat_power: float, conductivity: float, dn_dt: float, rod_radius: float
) -> float:
    """Thermal-lens focal length of a uniformly heated, side-pumped rod (m), dn/dT term only.

    f = 2·π·K·r0² / (P_heat · dn/dT) = K·A / (P_heat · dn/dT / 2), A = π r0² the rod's
    cross-section, K in W/(m·K), r0 in m, P_heat in W, dn/dT in 1/K; the photo-elastic and
    end-face terms are neglected (Koechner, Solid-State Laser Engineering, ch. 7, thermal
    lensing of a uniformly pumped rod).  Returns ``math.inf`` for no heat.
    """
    if heat_power * dn_dt == 0.0:
        return math.inf
    return 2.0 * math.pi * conductivity * rod_radius**2 / (heat_power * dn_dt)


def multiply(*matrices: Matrix) -> Matrix:
    """Product M1·M2·…·Mk (the ray meets Mk first)."""
    a, b, c, d = IDENTITY
    for e, f, g, h in matrices:
        a, b, c, d = a * e + b * g, a * f + b * h, c * e + d * g, c * f + d * h
    return (a, b, c, d)


@dataclass(frozen=True)
class Item:
    """One item of the half cavity: a space (``distance`` in m, reduced) or a thin lens.

    ``name`` labels the point where the radius is reported (the item's end for a space,
    the lens itself for a lens).
    """

    name: str
    distance: float = 0.0
    focal_length: float = math.inf

    def matrix(self) -> Matrix:
        if math.isinf(self.focal_length):
            return space(self.distance)
        return multiply(thin_lens(self.focal_length), space(self.distance))


@dataclass(frozen=True)
class Mode:
    """Self-consistent TEM00 mode of one plane.

    half_trace: (A+D)/2 of the round trip from end mirror 1; stable: |half_trace| < 1;
    radii: 1/e² radius (m) after each item of the half cavity, keyed by item name, plus
    ``"end mirror 1"`` (NaN everywhere when unstable).
    """

    half_trace: float
    stable: bool
    radii: tuple[tuple[str, float], ...]


def round_trip(items: tuple[Item, ...], f_end1: float, f_end2: float) -> Matrix:
    """Round-trip matrix starting just after reflection at end mirror 1 (see module text)."""
    forward = [it.matrix() for it in items]
    backward = [multiply(space(it.distance), thin_lens(it.focal_length)) for it in items]
    ms = [thin_lens(f_end1)] + backward + [thin_lens(f_end2)] + forward[::-1]
    return multiply(*ms)


def cavity_mode(items: tuple[Item, ...], f_end1: float, f_end2: float, wavelength: float) -> Mode:
    """Solve the cavity mode: half trace, stability and the 1/e² radius after each item.

    f_end1, f_end2: end-mirror focal lengths (R/2, m; ``math.inf`` for flat);
    wavelength: vacuum wavelength λ (m).  Equations in the module docstring
    (Kogelnik & Li, Appl. Opt. 5, 1550 (1966)).
    """
    a, b, c, d = round_trip(items, f_end1, f_end2)
    m = (a + d) / 2.0
    stable = abs(m) < 1.0 and b != 0.0
    if not stable:
        nan = math.nan
        return Mode(m, False, (("end mirror 1", nan),) + tuple((it.name, nan) for it in items))
    inv_q = complex((d - a) / (2.0 * b), -math.sqrt(1.0 - m * m) / abs(b))
    q = 1.0 / inv_q
    radii = [("end mirror 1", _radius(q, wavelength))]
    for it in items:
        q = _propagate(q, it.matrix())
        radii.append((it.name, _radius(q, wavelength)))
    return Mode(m, True, tuple(radii))


def _propagate(q: complex, mat: Matrix) -> complex:
    a, b, c, d = mat
    return (a * q + b) / (c * q + d)


def _radius(q: complex, wavelength: float) -> float:
    """w = sqrt(λ / (π · Im(−1/q)))  (Siegman, Lasers, ch. 17)."""
    return math.sqrt(wavelength / (math.pi * (-(1.0 / q).imag)))


def stable_ranges(
    half_trace_at, low: float, high: float, samples: int = 400, rtol: float = 1e-9
) -> tuple[tuple[float, float], ...]:
    """Intervals of a parameter p (e.g. absorbed pump power, W) over which |m(p)| < 1.

    ``half_trace_at(p)`` gives the half trace m = (A+D)/2 of the round trip at p; the
    interval [low, high] is sampled at ``samples`` points and each edge refined by
    bisection to a relative width ``rtol``.  A cavity with a thermal lens can have two
    stability zones (Magni, Appl. Opt. 25, 107 (1986), citation from memory); zones
    narrower than one sample step may be missed.  Returns the zones in increasing order,
    clipped to [low, high].
    """

    def inside(p: float) -> bool:
        return abs(half_trace_at(p)) < 1.0

    step = (high - low) / (samples - 1)
    points = [low + i * step for i in range(samples)]
    flags = [inside(p) for p in points]
    zones: list[tuple[float, float]] = []
    start = low if flags[0] else None
    for i in range(1, samples):
        if flags[i] != flags[i - 1]:
            edge = _edge(inside, points[i - 1], points[i], flags[i - 1], rtol)
            if flags[i]:
                start = edge
            else:
                zones.append((start, edge))
                start = None
    if start is not None:
        zones.append((start, high))
    return tuple(zones)


def near_edge(p: float, zones: tuple[tuple[float, float], ...], fraction: float = 0.1) -> bool:
    """True when p lies inside a stability zone but within ``fraction`` of its width of an edge.

    Zone edges as returned by :func:`stable_ranges` (same unit as p); fraction 0.1 is the
    10 % margin of common practice.  False when p is outside every zone.
    """
    for lo, hi in zones:
        if lo <= p <= hi:
            margin = fraction * (hi - lo)
            return p - lo < margin or hi - p < margin
    return False


def _edge(inside, a: float, b: float, flag_a: bool, rtol: float) -> float:
    """Bisect the stability edge between a and b (inside(a) == flag_a != inside(b))."""
    while b - a > rtol * max(abs(a), abs(b), 1e-300):
        mid = 0.5 * (a + b)
        if inside(mid) == flag_a:
            a = mid
        else:
            b = mid
    return 0.5 * (a + b)


def brewster_reduced_distances(length: float, index: float) -> tuple[float, float]:
    """Reduced distances (tangential, sagittal) of a Brewster-cut crystal of length L (m).

    d_t = L/n³, d_s = L/n for the beam inside a plate at Brewster's angle, n the phase
    index (Kogelnik, Ippen, Dienes & Shank, IEEE J. Quantum Electron. 8, 373 (1972)).
    """
    return length / index**3, length / index


@dataclass(frozen=True)
class TwoPlaneMode:
    """Cavity mode in the tangential and sagittal planes.

    radii: per reported point (name, larger 1/e² radius m, ellipticity = smaller/larger,
    1 for a round beam); stable only when both planes are stable.
    """

    tangential: Mode
    sagittal: Mode
    stable: bool
    radii: tuple[tuple[str, float, float], ...]


def two_plane_mode(
    tangential: tuple[Item, ...], sagittal: tuple[Item, ...],
    f_end1: tuple[float, float], f_end2: tuple[float, float], wavelength: float,
) -> TwoPlaneMode:
    """Solve both planes (same item names in each; end focal lengths as (f_t, f_s), m).

    Each plane as :func:`cavity_mode`; the larger radius and the ellipticity w_min/w_max
    are reported per point (Siegman, Lasers, ch. 15.3, astigmatic resonators).
    """
    mt = cavity_mode(tangential, f_end1[0], f_end2[0], wavelength)
    ms = cavity_mode(sagittal, f_end1[1], f_end2[1], wavelength)
    rows = []
    for (name, wt), (_, ws) in zip(mt.radii, ms.radii):
        big = max(wt, ws)
        rows.append((name, big, min(wt, ws) / big if big > 0 else math.nan))
    return TwoPlaneMode(mt, ms, mt.stable and ms.stable, tuple(rows))
