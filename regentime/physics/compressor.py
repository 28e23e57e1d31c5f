"""Double-pass grating-pair compressor: GDD and TOD per unit of perpendicular separation.

Treacy, IEEE J. Quantum Electron. 5, 454 (1969).  Grating equation in the usual compressor
geometry (incidence and diffraction angle on the same side of the normal)::

    sin θ_d = |m| λ / d − sin θ_i

Two gratings crossed twice (four reflections), perpendicular separation G (m)::

    GDD/G = −m² λ³ / (π c² d² cos³ θ_d)                                   [s²/m]
    TOD/G = −GDD/G · 3λ/(2π c) · (1 − (|m|λ/d) sin θ_d) / cos² θ_d         [s³/m]

λ and d (groove spacing = 1/groove density) in m, θ in rad, c in m/s.  Valid while
|sin θ_d| < 1 (a propagating order).  Raises ValueError otherwise.
Example: 1480 /mm, 52°, 800 nm → θ_d ≈ 23.3°, GDD/G ≈ −5,130 fs²/mm.
"""

from __future__ import annotations

import math

C_LIGHT = 299_792_458.0  # m/s, exact


def diffraction_angle(wavelength: float, groove_density: float, incidence: float,
                      order: int = -1) -> float:
    """θ_d (rad) from sin θ_d = |m| λ/d − sin θ_i; groove_density in 1/m."""
    s = abs(order) * wavelength * groove_density - math.sin(incidence)
    if not -1.0 < s < 1.0:
        raise ValueError(f"order {order} does not propagate (sin θ_d = {s:.3f})")
    return math.asin(s)


def grating_pair_per_separation(wavelength: float, groove_density: float, incidence: float,
                                order: int = -1) -> tuple[float, float]:
    """(GDD/G in s²/m, TOD/G in s³/m) of the double-pass pair (module docstring)."""
    td = diffraction_angle(wavelength, groove_density, incidence, order)
    lam, c, d = wavelength, C_LIGHT, 1.0 / groove_density
    gdd = -(order ** 2) * lam ** 3 / (math.pi * c ** 2 * d ** 2 * math.cos(td) ** 3)
    tod = -gdd * 3 * lam / (2 * math.pi * c) * (1 - abs(order) * lam / d * math.sin(td)) \
        / math.cos(td) ** 2
    return gdd, tod
