"""Electro-optic crystals for Pockels cells, and their half- and quarter-wave voltages.

A Pockels cell between crossed polarizers transmits T = sin²(π V / (2 V_π)) (A. Yariv and
P. Yeh, Optical Waves in Crystals (Wiley 1984), ch. 7; B. Saleh and M. Teich, Fundamentals
of Photonics, ch. 20).  The applied field changes the two principal indices seen by the
light; the retardation is Γ = (π/λ) (n³r)_eff E L and V_π is the voltage that gives Γ = π:

* longitudinal (field along the light, KDP/KD*P, r63, light along z):
  the indices n_o ∓ ½ n_o³ r63 E, so (n³r)_eff = 2 n_o³ r63 and V_π = λ/(2 n_o³ r63),
  independent of length and aperture;
* transverse, r22 (BBO, LiNbO3; light along z, field along x or y):
  n_o ∓ ½ n_o³ r22 E, (n³r)_eff = 2 n_o³ r22, V_π = λ d/(2 n_o³ r22 L);
* transverse, r33 with r23 (RTP, light along x, field along z, polarisation at 45° to y
  and z): only the z and y indices move, by −½ n_z³ r33 E and −½ n_y³ r23 E, so
  (n³r)_eff = n_z³ r33 − n_y³ r23 and V_π = λ d/((n_z³ r33 − n_y³ r23) L).  In the
  form V_π = λ d/(2 n³ r L) this is n = n_z and r = (r33 − (n_y/n_z)³ r23)/2.

d is the electrode gap (m), L the crystal length crossed by the light (m; for a
two-crystal cell the sum of both), λ the wavelength (m), r in m/V.  Published
electro-optic coefficients are uncertain by about ±15 % (M. J. Weber, Handbook of Optical
Materials, CRC 2003, sect. 1.7); a cell's datasheet or a measured voltage is better and the
cavity file can give one.  Indices come from :mod:`regentime.materials.dispersion`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping, Optional

from regentime.materials.dispersion import refractive_index

PM_PER_V = 1e-12  # m/V per pm/V


@dataclass(frozen=True)
class EOCrystal:
    """One electro-optic crystal of the library (SI units)."""

    key: str  # dispersion key as well
    label: str
    coefficient_name: str  # "r63", "r22", "r33"
    coefficient: float  # m/V
    geometry: str  # "longitudinal" | "transverse"
    index_axis: str  # dispersion axis whose index enters n³ ("o", "z" ...)
    typical_wavelength: float  # m, for the listing
    example_aperture: Optional[float]  # m, electrode gap of an example cell (transverse)
    example_length: Optional[float]  # m, crystal length of that example cell
    sources: Mapping[str, str] = field(default_factory=dict)
    flag: str = "from memory"  # of the coefficient: "confirmed" | "from memory"
    secondary_name: Optional[str] = None  # "r23" for RTP
    secondary_coefficient: float = 0.0  # m/V
    secondary_axis: Optional[str] = None  # index of the secondary term ("y" for RTP)
    note: str = ""


_EXAMPLE = "common practice: an example cell size for the listing, not a recommendation"

EO_CRYSTALS: dict[str, EOCrystal] = {c.key: c for c in (
    EOCrystal(
        key="bbo", label="BBO", coefficient_name="r22", coefficient=2.5 * PM_PER_V,
        geometry="transverse", index_axis="o", typical_wavelength=1030e-9,
        example_aperture=3e-3, example_length=20e-3, flag="confirmed",
        sources={
            "coefficient": "M. J. Weber, Handbook of Optical Materials (CRC 2003), linear "
                           "electro-optic coefficients: r22 = 2.5 pm/V at 514 nm (±15 %); "
                           "other sources give 2.2 pm/V",
            "index": "n_o from D. Eimerl et al., J. Appl. Phys. 62, 1968 (1987)",
            "formula": "Yariv & Yeh (1984) ch. 7: V_π = λ d/(2 n_o³ r22 L)",
            "example": _EXAMPLE,
        },
        note="Light along the optic axis z, field transverse; no static birefringence.",
    ),
    EOCrystal(
        key="kdp", label="KDP", coefficient_name="r63", coefficient=10.5 * PM_PER_V,
        geometry="longitudinal", index_axis="o", typical_wavelength=1064e-9,
        example_aperture=None, example_length=None,
        sources={
            "coefficient": "from memory: r63 ≈ 10.5 pm/V",
            "index": "n_o from F. Zernike, J. Opt. Soc. Am. 54, 1215 (1964)",
            "formula": "Yariv & Yeh (1984) ch. 7: V_π = λ/(2 n_o³ r63)",
        },
    ),
    EOCrystal(
        key="dkdp", label="KD*P", coefficient_name="r63", coefficient=24.0 * PM_PER_V,
        geometry="longitudinal", index_axis="o", typical_wavelength=1064e-9,
        example_aperture=None, example_length=None,
        sources={
            "coefficient": "from memory: r63 ≈ 23-26 pm/V (depends on deuteration); 24 used",
            "index": "n_o of KDP (Zernike 1964) as an approximation for KD*P",
            "formula": "Yariv & Yeh (1984) ch. 7: V_π = λ/(2 n_o³ r63)",
        },
    ),
    EOCrystal(
        key="rtp", label="RTP", coefficient_name="r33", coefficient=35.0 * PM_PER_V,
        geometry="transverse", index_axis="z", typical_wavelength=1064e-9,
        example_aperture=4e-3, example_length=20e-3,
        secondary_name="r23", secondary_coefficient=12.5 * PM_PER_V, secondary_axis="y",
        sources={
            "coefficient": "from memory: r33 ≈ 35-38 pm/V; 35 used",
            "secondary_coefficient": "from memory: r23 ≈ 12.5 pm/V (uncertain)",
            "index": "n_z and n_y from the RTP Sellmeier fit (from memory)",
            "formula": "Yariv & Yeh (1984) ch. 7, index-ellipsoid method: "
                       "V_π = λ d/((n_z³ r33 − n_y³ r23) L)",
            "example": _EXAMPLE + " (two 10 mm crystals)",
        },
        note="x-cut pair, field along z, polarisation at 45° to y and z; L is the total "
             "length of both crystals.",
    ),
    EOCrystal(
        key="lithium_niobate", label="LiNbO3", coefficient_name="r22",
        coefficient=6.8 * PM_PER_V, geometry="transverse", index_axis="o",
        typical_wavelength=1064e-9, example_aperture=9e-3, example_length=25e-3,
        sources={
            "coefficient": "from memory: r22 ≈ 6.8 pm/V (r33 ≈ 30.8 pm/V)",
            "index": "n_o from D. E. Zelmon et al., J. Opt. Soc. Am. B 14, 3319 (1997) "
                     "(from memory)",
            "formula": "Yariv & Yeh (1984) ch. 7: V_π = λ d/(2 n_o³ r22 L)",
            "example": _EXAMPLE,
        },
        note="Light along z, field along x (r22 geometry, as in Q-switch cells).",
    ),
)}


def get_crystal(crystal: str) -> EOCrystal:
    """The library entry for ``crystal``; ``ValueError`` naming the valid keys otherwise."""
    try:
        return EO_CRYSTALS[crystal]
    except (KeyError, TypeError):
        raise ValueError(
            f"unknown electro-optic crystal {crystal!r}; known crystals: "
            f"{', '.join(EO_CRYSTALS)}"
        ) from None


def effective_n3r(crystal: str, wavelength: float, r: Optional[float] = None) -> float:
    """(n³ r)_eff in m/V: the retardation is Γ = (π/λ) (n³r)_eff E L (module docstring).

    ``r`` (m/V) replaces the crystal's main coefficient (r63, r22 or r33; for RTP the r23
    term stays the library's).
    """
    cr = get_crystal(crystal)
    r_main = cr.coefficient if r is None else float(r)
    if not r_main > 0.0:
        raise ValueError(f"electro-optic coefficient must be positive, got {r_main!r} m/V")
    n = refractive_index(cr.key, wavelength, cr.index_axis)
    if cr.secondary_name is None:
        return 2.0 * n ** 3 * r_main
    n2 = refractive_index(cr.key, wavelength, cr.secondary_axis)
    value = n ** 3 * r_main - n2 ** 3 * cr.secondary_coefficient
    if not value > 0.0:
        raise ValueError(f"{crystal}: effective electro-optic product is not positive "
                         f"(r = {r_main!r} m/V too small)")
    return value


def half_wave_voltage(crystal: str, wavelength: float, length: Optional[float] = None,
                      aperture: Optional[float] = None, r: Optional[float] = None) -> float:
    """Half-wave voltage V_π of a Pockels cell, in volts.

    Longitudinal cells (KDP, KD*P): V_π = λ/(2 n_o³ r63); ``length`` and ``aperture`` are
    not needed (and ignored).  Transverse cells: V_π = λ d/((n³r)_eff L) — for r22 crystals
    (BBO, LiNbO3) λ d/(2 n_o³ r22 L), for RTP λ d/((n_z³ r33 − n_y³ r23) L).
    λ = ``wavelength`` (m), d = ``aperture`` (electrode gap, m), L = ``length`` (crystal
    length crossed by the light, m), r = override of the main coefficient (m/V).
    Valid where the crystal is transparent and the dispersion formula holds; the
    coefficients are uncertain by about ±15 %.  Reference: A. Yariv and P. Yeh, Optical
    Waves in Crystals (1984), ch. 7; B. Saleh and M. Teich, Fundamentals of Photonics.
    Raises ``ValueError`` for an unknown crystal or, for a transverse cell, when the
    length or the aperture is missing or not positive.
    """
    cr = get_crystal(crystal)
    lam = float(wavelength)
    if not lam > 0.0:
        raise ValueError(f"wavelength must be positive, got {wavelength!r}")
    n3r = effective_n3r(crystal, lam, r)
    if cr.geometry == "longitudinal":
        return lam / n3r
    missing = [name for name, value in (("length", length), ("aperture", aperture))
               if value is None]
    if missing:
        raise ValueError(f"{cr.label} is a transverse cell: its half-wave voltage needs the "
                         f"crystal {' and the '.join(missing)} (electrode gap d and crystal "
                         "length L)")
    if not (length > 0.0 and aperture > 0.0):
        raise ValueError(f"length and aperture must be positive, got length={length!r} m, "
                         f"aperture={aperture!r} m")
    return lam * aperture / (n3r * length)


def quarter_wave_voltage(crystal: str, wavelength: float, length: Optional[float] = None,
                         aperture: Optional[float] = None, r: Optional[float] = None) -> float:
    """Quarter-wave voltage V_π/2 in volts (same arguments as :func:`half_wave_voltage`)."""
    return 0.5 * half_wave_voltage(crystal, wavelength, length, aperture, r)


def crossed_polarizer_transmission(voltage, half_wave: float):
    """T = sin²(π V/(2 V_π)) of a cell between crossed polarizers (Yariv & Yeh 1984, ch. 7).

    ``voltage`` in V (scalar or array), ``half_wave`` = V_π in V; dimensionless result.
    """
    import numpy as np

    if not half_wave > 0.0:
        raise ValueError(f"half-wave voltage must be positive, got {half_wave!r} V")
    return np.sin(np.pi * np.asarray(voltage, dtype=float) / (2.0 * half_wave)) ** 2
