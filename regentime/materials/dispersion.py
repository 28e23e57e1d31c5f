"""Refractive index and group index of the crystals, glasses and gases in a regen cavity.

Every formula is one of two general shapes, with wavelength λ in µm and x = λ² (µm²):

* ``kind="n2"``:  n² = A + Σ_i B_i x/(x − C_i) + Σ_j D_j/(x − E_j) − F x
* ``kind="n-1"``: n − 1 = the same right-hand side (used for air, whose index is near 1)

This covers the Sellmeier form of Malitson (A = 1, C_i = c_i²), the "A + D/(λ² − E) − Fλ²"
form used for BBO and YVO4, the mixed KDP form of Zernike and the Ciddor standard-air
form.  The derivative is analytic: with N(x) the right-hand side,
dN/dx = −Σ B_i C_i/(x − C_i)² − Σ D_j/(x − E_j)² − F, and

    n² kind:   dn/dλ = λ (dN/dx) / n          n−1 kind:  dn/dλ = 2 λ (dN/dx)

The group index is n_g = n − λ dn/dλ (dimensionless; λ dn/dλ has no unit, so µm inside
is fine).  Public functions take and return SI (wavelength in metres).

Each :class:`DispersionMaterial` names its formula, its source and a flag: ``"confirmed"``
(coefficients as given by the cited source, cross-checked in the tests), ``"derived"``
(computed by us from a confirmed formula) or ``"from memory"`` (recalled, not checked
against the paper here; use with a wide tolerance and prefer a measured or datasheet
``group_index:`` in the cavity file when it matters).  See docs/materials.md.

Outside its valid wavelength range a formula is extrapolated (no error): use
:func:`in_valid_range` to warn.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping, Union

import numpy as np

ArrayLike = Union[float, np.ndarray]

_UM = 1e-6  # metres per micrometre


@dataclass(frozen=True)
class DispersionAxis:
    """Coefficients of one index (one polarisation axis); see the module docstring."""

    A: float = 1.0
    B: tuple[float, ...] = ()  # strengths of the B x/(x − C) terms
    C: tuple[float, ...] = ()  # µm²
    D: tuple[float, ...] = ()  # µm², strengths of the D/(x − E) terms
    E: tuple[float, ...] = ()  # µm²
    F: float = 0.0  # µm⁻², the −F x term
    kind: str = "n2"  # "n2" (formula gives n²) or "n-1" (formula gives n − 1)

    def _rhs(self, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Right-hand side N(x) and dN/dx, x = λ² in µm²."""
        n = np.full_like(x, self.A, dtype=float)
        dn = np.full_like(x, -self.F, dtype=float)
        n = n - self.F * x
        for b, c in zip(self.B, self.C):
            n = n + b * x / (x - c)
            dn = dn - b * c / (x - c) ** 2
        for d, e in zip(self.D, self.E):
            n = n + d / (x - e)
            dn = dn - d / (x - e) ** 2
        return n, dn

    def index(self, lam_um: np.ndarray) -> np.ndarray:
        x = lam_um * lam_um
        rhs, _ = self._rhs(x)
        if self.kind == "n-1":
            return 1.0 + rhs
        return np.sqrt(rhs)

    def dn_dlambda(self, lam_um: np.ndarray) -> np.ndarray:
        """dn/dλ in µm⁻¹."""
        x = lam_um * lam_um
        rhs, drhs = self._rhs(x)
        if self.kind == "n-1":
            return 2.0 * lam_um * drhs
        return lam_um * drhs / np.sqrt(rhs)


@dataclass(frozen=True)
class DispersionMaterial:
    """One material of the dispersion library.

    ``axes`` maps an axis letter to its coefficients: ``"o"`` only for isotropic materials
    (the axis argument is then ignored), ``"o"``/``"e"`` for uniaxial crystals, the
    crystal's own letters for biaxial ones (``x y z`` for RTP, ``p m g`` for KGW);
    for a biaxial crystal ``"o"`` (the default argument everywhere) means ``default_axis``.
    """

    key: str
    label: str
    formula: str  # the formula as text, λ in µm
    source: str
    flag: str  # "confirmed" | "derived" | "from memory" | "exact"
    valid_range: tuple[float, float]  # m
    axes: Mapping[str, DispersionAxis]
    symmetry: str = "isotropic"  # "isotropic" | "uniaxial" | "biaxial"
    default_axis: str = "o"
    note: str = ""
    axis_names: Mapping[str, str] = field(default_factory=dict)  # axis letter -> meaning


def _sell(*pairs: tuple[float, float], squared: bool = True) -> DispersionAxis:
    """Malitson Sellmeier n² − 1 = Σ B λ²/(λ² − c²); ``pairs`` are (B, c) with c in µm
    (``squared=True``: c is squared here) or (B, C) with C already in µm²."""
    b = tuple(p[0] for p in pairs)
    c = tuple((p[1] ** 2 if squared else p[1]) for p in pairs)
    return DispersionAxis(A=1.0, B=b, C=c)


# ----- the library ----------------------------------------------------------------------

_MATERIALS: list[DispersionMaterial] = [
    DispersionMaterial(
        key="vacuum", label="vacuum", formula="n = 1",
        source="definition", flag="exact", valid_range=(0.0, float("inf")),
        axes={"o": DispersionAxis(A=1.0)},
    ),
    DispersionMaterial(
        key="air", label="air (standard air)",
        formula="(n − 1)·1e8 = 5792105/(238.0185 − σ²) + 167917/(57.362 − σ²), σ = 1/λ",
        source="P. E. Ciddor, Appl. Opt. 35, 1566 (1996), eq. (1): standard air, 15 °C, "
               "101 325 Pa, dry, 450 ppm CO2 (coefficients from memory)",
        flag="from memory", valid_range=(0.23e-6, 1.69e-6),
        # k1/(k0 − 1/x) = (k1/k0) x/(x − 1/k0): an n−1 Sellmeier term in x = λ².
        axes={"o": DispersionAxis(
            A=0.0,
            B=(5792105e-8 / 238.0185, 167917e-8 / 57.362),
            C=(1.0 / 238.0185, 1.0 / 57.362),
            kind="n-1")},
        note="Temperature, pressure and humidity change n − 1 by a few per cent; the effect "
             "on a cavity round trip is below 1 ps per metre of air.",
    ),
    DispersionMaterial(
        key="fused_silica", label="fused silica",
        formula="n² − 1 = Σ B_i λ²/(λ² − C_i²), B = (0.6961663, 0.4079426, 0.8974794), "
                "C = (0.0684043, 0.1162414, 9.896161) µm",
        source="I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965)",
        flag="confirmed", valid_range=(0.21e-6, 3.71e-6),
        axes={"o": _sell((0.6961663, 0.0684043), (0.4079426, 0.1162414),
                         (0.8974794, 9.896161))},
    ),
    DispersionMaterial(
        key="sapphire", label="sapphire (Al2O3)",
        formula="n² − 1 = Σ B_i λ²/(λ² − C_i²); o: B = (1.4313493, 0.65054713, 5.3414021), "
                "C = (0.0726631, 0.1193242, 18.028251) µm; e: B = (1.5039759, 0.55069141, "
                "6.5927379), C = (0.0740288, 0.1216529, 20.072248) µm",
        source="I. H. Malitson and M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972); M. J. Dodge, "
               "Handbook of Laser Science and Technology vol. IV (CRC 1986)",
        flag="confirmed", valid_range=(0.2e-6, 5.0e-6), symmetry="uniaxial",
        axes={
            "o": _sell((1.4313493, 0.0726631), (0.65054713, 0.1193242),
                       (5.3414021, 18.028251)),
            "e": _sell((1.5039759, 0.0740288), (0.55069141, 0.1216529),
                       (6.5927379, 20.072248)),
        },
        axis_names={"o": "ordinary (E ⊥ c)", "e": "extraordinary (E ∥ c, the π "
                    "polarisation of Ti:sapphire)"},
    ),
    DispersionMaterial(
        key="yag", label="YAG (Y3Al5O12)",
        formula="n² = 1 + 2.28200 λ²/(λ² − 0.01185) + 3.27644 λ²/(λ² − 282.734)",
        source="D. E. Zelmon, D. L. Small and R. Page, Appl. Opt. 37, 4933 (1998)",
        flag="confirmed", valid_range=(0.4e-6, 5.0e-6),
        axes={"o": _sell((2.28200, 0.01185), (3.27644, 282.734), squared=False)},
        note="Undoped YAG; the Nd and Yb dopants at usual levels change n by ~1e-3 (from "
             "memory).",
    ),
    DispersionMaterial(
        key="bbo", label="BBO (β-BaB2O4)",
        formula="n_o² = 2.7405 + 0.0184/(λ² − 0.0179) − 0.0155 λ²; "
                "n_e² = 2.3730 + 0.0128/(λ² − 0.0156) − 0.0044 λ²",
        source="D. Eimerl et al., J. Appl. Phys. 62, 1968 (1987)",
        flag="confirmed", valid_range=(0.22e-6, 1.06e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=2.7405, D=(0.0184,), E=(0.0179,), F=0.0155),
            "e": DispersionAxis(A=2.3730, D=(0.0128,), E=(0.0156,), F=0.0044),
        },
        note="Fitted range ends at 1.06 µm; 1064 nm is a slight extrapolation.",
    ),
    DispersionMaterial(
        key="kdp", label="KDP (KH2PO4)",
        formula="n_o² = 2.259276 + 0.01008956/(λ² − 0.0129426) + 13.00522 λ²/(λ² − 400); "
                "n_e² = 2.132668 + 0.008637494/(λ² − 0.0122810) + 3.2279924 λ²/(λ² − 400)",
        source="F. Zernike, J. Opt. Soc. Am. 54, 1215 (1964)",
        flag="confirmed", valid_range=(0.2135e-6, 1.529e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=2.259276, B=(13.00522,), C=(400.0,),
                                D=(0.01008956,), E=(0.0129426,)),
            "e": DispersionAxis(A=2.132668, B=(3.2279924,), C=(400.0,),
                                D=(0.008637494,), E=(0.0122810,)),
        },
    ),
    DispersionMaterial(
        key="dkdp", label="KD*P (deuterated KDP, KD2PO4)",
        formula="KDP formula of Zernike (1964) used as an approximation",
        source="approximation: F. Zernike, J. Opt. Soc. Am. 54, 1215 (1964) for KDP; no "
               "confirmed KD*P formula at hand. KD*P indices are lower by about 0.001 (o) "
               "and 0.004 (e) near 1 µm (from memory)",
        flag="from memory", valid_range=(0.2135e-6, 1.529e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=2.259276, B=(13.00522,), C=(400.0,),
                                D=(0.01008956,), E=(0.0129426,)),
            "e": DispersionAxis(A=2.132668, B=(3.2279924,), C=(400.0,),
                                D=(0.008637494,), E=(0.0122810,)),
        },
        note="Group delay error from the approximation: about 0.03 ps per cm of crystal "
             "(estimate from the index difference above).",
    ),
    DispersionMaterial(
        key="rtp", label="RTP (RbTiOPO4)",
        formula="n² = A + B λ²/(λ² − C²) − D λ²; x: (2.15559, 0.93307, 0.20994, 0.01452), "
                "y: (2.38494, 0.73603, 0.23891, 0.01583), z: (2.27723, 1.11030, 0.23454, "
                "0.01995), C in µm",
        source="coefficients from memory of a published Sellmeier fit for flux-grown RTP "
               "(original publication not confirmed here)",
        flag="from memory", valid_range=(0.4e-6, 1.6e-6), symmetry="biaxial",
        default_axis="y",
        axes={
            "x": DispersionAxis(A=2.15559, B=(0.93307,), C=(0.20994 ** 2,), F=0.01452),
            "y": DispersionAxis(A=2.38494, B=(0.73603,), C=(0.23891 ** 2,), F=0.01583),
            "z": DispersionAxis(A=2.27723, B=(1.11030,), C=(0.23454 ** 2,), F=0.01995),
        },
        axis_names={"x": "n_x", "y": "n_y", "z": "n_z (the r33 axis)"},
        note="In an x-cut cell the light is split between the y and z axes; the default "
             "axis for group delay is y.  The y/z group-index difference (≈0.1) is "
             "compensated in a two-crystal cell, so the mean of y and z is closer; give "
             "group_index: if it matters.",
    ),
    DispersionMaterial(
        key="caf2", label="CaF2",
        formula="n² − 1 = Σ B_i λ²/(λ² − C_i²), B = (0.5675888, 0.4710914, 3.8484723), "
                "C = (0.050263605, 0.1003909, 34.649040) µm",
        source="I. H. Malitson, Appl. Opt. 2, 1103 (1963)",
        flag="confirmed", valid_range=(0.23e-6, 9.7e-6),
        axes={"o": _sell((0.5675888, 0.050263605), (0.4710914, 0.1003909),
                         (3.8484723, 34.649040))},
    ),
    DispersionMaterial(
        key="quartz", label="crystalline quartz (α-SiO2)",
        formula="n² = A + B λ²/(λ² − C) + D λ²/(λ² − E); o: (1.28604141, 1.07044083, "
                "1.00585997e-2, 1.10202242, 100); e: (1.28851804, 1.09509924, "
                "1.02101864e-2, 1.15662475, 100), C and E in µm²",
        source="G. Ghosh, Opt. Commun. 163, 95 (1999) (coefficients from memory)",
        flag="from memory", valid_range=(0.198e-6, 2.05e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=1.28604141, B=(1.07044083, 1.10202242),
                                C=(1.00585997e-2, 100.0)),
            "e": DispersionAxis(A=1.28851804, B=(1.09509924, 1.15662475),
                                C=(1.02101864e-2, 100.0)),
        },
    ),
    DispersionMaterial(
        key="ylf", label="YLF (LiYF4)",
        formula="n² = A + B λ²/(λ² − C) + D λ²/(λ² − E); o: (1.38757, 0.70757, 0.00931, "
                "0.18849, 50.99741); e: (1.31021, 0.84903, 0.00876, 0.53607, 134.9566), "
                "C and E in µm²",
        source="N. P. Barnes and D. J. Gettemy, J. Opt. Soc. Am. 70, 1244 (1980) "
               "(coefficients from memory)",
        flag="from memory", valid_range=(0.23e-6, 2.6e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=1.38757, B=(0.70757, 0.18849), C=(0.00931, 50.99741)),
            "e": DispersionAxis(A=1.31021, B=(0.84903, 0.53607), C=(0.00876, 134.9566)),
        },
        axis_names={"o": "ordinary (σ polarisation, 1053 nm line of Nd:YLF)",
                    "e": "extraordinary (π polarisation, 1047 nm line)"},
    ),
    DispersionMaterial(
        key="yvo4", label="YVO4",
        formula="n_o² = 3.77834 + 0.069736/(λ² − 0.04724) − 0.0108133 λ²; "
                "n_e² = 4.59905 + 0.110534/(λ² − 0.04813) − 0.0122676 λ²",
        source="Sellmeier form widely quoted in crystal data tables (original publication "
               "not confirmed here; coefficients from memory, matching the tabulated indices "
               "at 1.30 and 1.55 µm to 1e-4)",
        flag="from memory", valid_range=(0.4e-6, 1.6e-6), symmetry="uniaxial",
        axes={
            "o": DispersionAxis(A=3.77834, D=(0.069736,), E=(0.04724,), F=0.0108133),
            "e": DispersionAxis(A=4.59905, D=(0.110534,), E=(0.04813,), F=0.0122676),
        },
        axis_names={"o": "ordinary (E ⊥ c)", "e": "extraordinary (E ∥ c, π polarisation "
                    "of Nd:YVO4)"},
    ),
    DispersionMaterial(
        key="kgw", label="KGW (KGd(WO4)2)",
        formula="one-term Sellmeier n² − 1 = S λ²/(λ² − C) per axis; p: (2.8404, 0.028034), "
                "m: (2.9899, 0.024567), g: (3.1204, 0.027596), C in µm²",
        source="approximation fitted by us through n_p, n_m, n_g = 2.0135, 2.0458, 2.0860 at "
               "633 nm (Appl. Opt. 51, 2951 (2012), abstract) and 1.978, 2.014, 2.049 at "
               "1064 nm (from memory)",
        flag="from memory", valid_range=(0.6e-6, 1.1e-6), symmetry="biaxial",
        default_axis="m",
        axes={
            "p": _sell((2.8404, 0.028034), squared=False),
            "m": _sell((2.9899, 0.024567), squared=False),
            "g": _sell((3.1204, 0.027596), squared=False),
        },
        axis_names={"p": "N_p", "m": "N_m (E ∥ N_m: the usual Yb:KGW laser polarisation)",
                    "g": "N_g"},
        note="Two points per axis fix only a one-term formula; the group index is uncertain "
             "to about ±0.02 (estimate).  Give group_index: if a measured value exists.",
    ),
    DispersionMaterial(
        key="lithium_niobate", label="lithium niobate (LiNbO3, congruent)",
        formula="n² − 1 = Σ B_i λ²/(λ² − C_i); o: B = (2.6734, 1.2290, 12.614), C = (0.01764, "
                "0.05914, 474.60); e: B = (2.9804, 0.5981, 8.9543), C = (0.02047, 0.0666, "
                "416.08), C in µm²",
        source="D. E. Zelmon, D. L. Small and D. Jundt, J. Opt. Soc. Am. B 14, 3319 (1997) "
               "(coefficients from memory)",
        flag="from memory", valid_range=(0.4e-6, 5.0e-6), symmetry="uniaxial",
        axes={
            "o": _sell((2.6734, 0.01764), (1.2290, 0.05914), (12.614, 474.60), squared=False),
            "e": _sell((2.9804, 0.02047), (0.5981, 0.0666), (8.9543, 416.08), squared=False),
        },
    ),
]

MATERIALS: dict[str, DispersionMaterial] = {m.key: m for m in _MATERIALS}


# ----- public functions -----------------------------------------------------------------


def get_material(material: str) -> DispersionMaterial:
    """The library entry for ``material``; ``ValueError`` naming the valid keys otherwise."""
    try:
        return MATERIALS[material]
    except (KeyError, TypeError):
        raise ValueError(
            f"unknown material {material!r}; known materials: {', '.join(sorted(MATERIALS))}"
        ) from None


def axes_of(material: str) -> tuple[str, ...]:
    """The axis letters accepted for ``material`` (isotropic: ``("o",)``)."""
    return tuple(get_material(material).axes)


def _axis(mat: DispersionMaterial, axis: str) -> DispersionAxis:
    if mat.symmetry == "isotropic":
        return mat.axes["o"]
    if axis == "o" and mat.symmetry == "biaxial":
        axis = mat.default_axis
    try:
        return mat.axes[axis]
    except (KeyError, TypeError):
        raise ValueError(
            f"unknown axis {axis!r} for {mat.key}; valid axes: {', '.join(mat.axes)}"
        ) from None


def _lam_um(wavelength: ArrayLike) -> np.ndarray:
    lam = np.asarray(wavelength, dtype=float)
    if not np.all(np.isfinite(lam)) or np.any(lam <= 0.0):
        raise ValueError(f"wavelength must be a positive number of metres, got {wavelength!r}")
    if np.any(lam > 1e-3):
        raise ValueError(f"wavelength {wavelength!r} m is not an optical wavelength "
                         "(give metres, e.g. 800e-9)")
    return lam / _UM


def _out(value: np.ndarray, wavelength: ArrayLike) -> ArrayLike:
    return float(value) if np.ndim(wavelength) == 0 else value


def refractive_index(material: str, wavelength: ArrayLike, axis: str = "o") -> ArrayLike:
    """Phase refractive index n(λ) from the material's dispersion formula.

    n from the formula of ``MATERIALS[material]`` (see its ``formula`` and ``source``);
    wavelength λ in m (scalar or array), result dimensionless, same shape.  ``axis``:
    "o"/"e" for uniaxial crystals, the crystal's letters for biaxial ones ("o" there
    means the documented default axis), ignored for isotropic materials.
    Valid range: ``MATERIALS[material].valid_range``; outside it the formula is
    extrapolated.  Raises ``ValueError`` for an unknown material or axis.
    """
    mat = get_material(material)
    ax = _axis(mat, axis)
    lam = _lam_um(wavelength)
    return _out(ax.index(lam), wavelength)


def group_index(material: str, wavelength: ArrayLike, axis: str = "o") -> ArrayLike:
    """Group index n_g = n − λ dn/dλ, analytic derivative of the dispersion formula.

    n_g = c / v_g: the factor by which a pulse envelope is slower than in vacuum, the one
    that enters the round-trip time T = 2 Σ n_g,i L_i / c.  λ in m; dimensionless result.
    Reference: any optics text, e.g. B. Saleh and M. Teich, Fundamentals of Photonics,
    ch. 5 (group index).  Same arguments, range and errors as :func:`refractive_index`.
    """
    mat = get_material(material)
    ax = _axis(mat, axis)
    lam = _lam_um(wavelength)
    return _out(ax.index(lam) - lam * ax.dn_dlambda(lam), wavelength)


def dn_dlambda(material: str, wavelength: ArrayLike, axis: str = "o") -> ArrayLike:
    """dn/dλ in 1/m (analytic), λ in m.  Same arguments as :func:`refractive_index`."""
    mat = get_material(material)
    ax = _axis(mat, axis)
    lam = _lam_um(wavelength)
    return _out(ax.dn_dlambda(lam) / _UM, wavelength)


def in_valid_range(material: str, wavelength: float) -> bool:
    """True when ``wavelength`` (m) lies inside the formula's published range."""
    lo, hi = get_material(material).valid_range
    return lo <= wavelength <= hi
