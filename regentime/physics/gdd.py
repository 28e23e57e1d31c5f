"""Group-delay dispersion (GDD), third- and fourth-order dispersion of a length of material.

Spectral phase of a length L of material: φ(ω) = n(ω) ω L / c.  Its Taylor terms at the
centre wavelength λ, written with derivatives of n with respect to λ (Diels & Rudolph,
Ultrashort Laser Pulse Phenomena, 2nd ed., ch. 1)::

    GDD = d²φ/dω² =  λ³/(2π c²) · n'' · L                                  [s²]
    TOD = d³φ/dω³ = −λ⁴/(4π² c³) · (3 n'' + λ n''') · L                    [s³]
    FOD = d⁴φ/dω⁴ =  λ⁵/(8π³ c⁴) · (12 n'' + 8 λ n''' + λ² n'''') · L       [s⁴]

n', n'', n''', n'''' are d^k n/dλ^k in m^-k, from the closed-form derivatives of the
library's dispersion formula (see :mod:`regentime.materials.dispersion`): with x = λ²
(µm²) and N(x) the formula's right-hand side, the x-derivatives of the terms are
B x/(x − C) = B + B C/(x − C) → B C (−1)^k k!/(x − C)^(k+1), D/(x − E) → D (−1)^k k!/(x − E)^(k+1)
and −F x → −F (k = 1 only); the chain rule for x = λ² and, for the n² kind, the
derivatives of N = n² solved for those of n.  Positive GDD: normal dispersion (red ahead).

Valid range: the material formula's own range (outside it the formula is extrapolated).
SI in and out (wavelength and length in metres).  Raises ValueError for an unknown
material or axis.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from regentime.materials.dispersion import DispersionAxis, get_material

C_LIGHT = 299_792_458.0  # m/s, exact (SI definition; equals scipy.constants.c)
_UM = 1e-6


def _rhs_derivatives(ax: DispersionAxis, x: float) -> list[float]:
    """N(x) and dN/dx … d⁴N/dx⁴ at x = λ² (µm²)."""
    out = [ax.A - ax.F * x, -ax.F, 0.0, 0.0, 0.0]
    for b, c in zip(ax.B, ax.C):
        out[0] += b * x / (x - c)
        for k in range(1, 5):
            out[k] += b * c * (-1) ** k * math.factorial(k) / (x - c) ** (k + 1)
    for d, e in zip(ax.D, ax.E):
        out[0] += d / (x - e)
        for k in range(1, 5):
            out[k] += d * (-1) ** k * math.factorial(k) / (x - e) ** (k + 1)
    return out


def axis_index_derivatives(ax: DispersionAxis, wavelength: float) -> tuple[float, ...]:
    """(n, dn/dλ, d²n/dλ², d³n/dλ³, d⁴n/dλ⁴) of one formula axis, λ in m, derivatives in m^-k.

    Closed form (module docstring); reference for the formula shapes: the material's source.
    """
    lam = float(wavelength) / _UM
    if not (lam > 0.0 and math.isfinite(lam)):
        raise ValueError(f"wavelength must be a positive number of metres, got {wavelength!r}")
    n0, n1, n2, n3, n4 = _rhs_derivatives(ax, lam * lam)
    # derivatives of N with respect to λ (x = λ², x' = 2λ, x'' = 2)
    q = [n0,
         2 * lam * n1,
         4 * lam ** 2 * n2 + 2 * n1,
         8 * lam ** 3 * n3 + 12 * lam * n2,
         16 * lam ** 4 * n4 + 48 * lam ** 2 * n3 + 12 * n2]
    if ax.kind == "n-1":
        d = [1.0 + q[0], q[1], q[2], q[3], q[4]]
    else:  # N = n²: N' = 2nn', N'' = 2n'² + 2nn'', N''' = 6n'n'' + 2nn''', ...
        if q[0] <= 0.0:
            raise ValueError(f"the dispersion formula gives n² = {q[0]:g} ≤ 0 at {wavelength!r} m")
        n = math.sqrt(q[0])
        d1 = q[1] / (2 * n)
        d2 = (q[2] - 2 * d1 ** 2) / (2 * n)
        d3 = (q[3] - 6 * d1 * d2) / (2 * n)
        d4 = (q[4] - 8 * d1 * d3 - 6 * d2 ** 2) / (2 * n)
        d = [n, d1, d2, d3, d4]
    return tuple(v / _UM ** k for k, v in enumerate(d))


def index_derivatives(material: str, wavelength: float, axis: str = "o") -> tuple[float, ...]:
    """(n, n', n'', n''', n'''') of a library material (λ in m, derivatives in m^-k).

    ``axis``: "o"/"e" (uniaxial), the crystal's letters (biaxial; "o" = its default axis),
    ignored for isotropic materials, or ``"mean"``: the mean of the o and e values (used for
    waveplates, whose light is shared between the two axes).
    """
    mat = get_material(material)
    if mat.symmetry == "isotropic":
        return axis_index_derivatives(mat.axes["o"], wavelength)
    if axis == "mean":
        letters = ("o", "e") if mat.symmetry == "uniaxial" else tuple(mat.axes)[:2]
        a, b = (axis_index_derivatives(mat.axes[k], wavelength) for k in letters)
        return tuple((u + v) / 2 for u, v in zip(a, b))
    if axis == "o" and mat.symmetry == "biaxial":
        axis = mat.default_axis
    if axis not in mat.axes:
        raise ValueError(f"unknown axis {axis!r} for {material}; valid axes: {', '.join(mat.axes)}")
    return axis_index_derivatives(mat.axes[axis], wavelength)


@dataclass(frozen=True)
class Dispersion:
    """GDD (s²), TOD (s³) and FOD (s⁴); adds like numbers."""

    gdd: float = 0.0
    tod: float = 0.0
    fod: float = 0.0

    def __add__(self, other: "Dispersion") -> "Dispersion":
        return Dispersion(self.gdd + other.gdd, self.tod + other.tod, self.fod + other.fod)

    def scaled(self, k: float) -> "Dispersion":
        return Dispersion(k * self.gdd, k * self.tod, k * self.fod)


def phase_orders(derivs: tuple[float, ...], wavelength: float, length: float) -> Dispersion:
    """GDD, TOD, FOD of a length (m) with index derivatives ``derivs`` (module docstring)."""
    lam, c = float(wavelength), C_LIGHT
    _, _, d2, d3, d4 = derivs
    gdd = lam ** 3 / (2 * math.pi * c ** 2) * d2 * length
    tod = -lam ** 4 / (4 * math.pi ** 2 * c ** 3) * (3 * d2 + lam * d3) * length
    fod = lam ** 5 / (8 * math.pi ** 3 * c ** 4) * (12 * d2 + 8 * lam * d3 + lam ** 2 * d4) * length
    return Dispersion(gdd, tod, fod)


def material_dispersion(material: str, wavelength: float, length: float,
                        axis: str = "o") -> Dispersion:
    """GDD (s²), TOD (s³), FOD (s⁴) of ``length`` m of a library material at ``wavelength`` m.

    Equations in the module docstring (Diels & Rudolph, ch. 1); analytic derivatives of the
    material's dispersion formula.  Vacuum gives zero.
    """
    if length < 0 or not np.isfinite(length):
        raise ValueError(f"length must be a non-negative number of metres, got {length!r}")
    return phase_orders(index_derivatives(material, wavelength, axis), wavelength, length)
