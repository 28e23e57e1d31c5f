"""Built-in gain media: spectroscopic and damage data with a source for every number.

Each entry is a :class:`GainMedium` in SI units (m, s, m², m²/W, J/m², m⁻³).
``sources`` maps every property name to its source text; a text that contains
"from memory" marks a value recalled by us and not checked against the cited paper here
(use it as a default only; the cavity file may override any property under ``gain:``).
The flags follow docs/references.md and are listed in docs/materials.md.

Damage fluences are for the pulse duration stored beside them; scale them to the
stretched pulse duration with the τ^½ law (B. C. Stuart et al., Phys. Rev. B 53, 1749
(1996)) before comparing.  Coated surfaces often damage below the bulk value.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping, Optional, Union


@dataclass(frozen=True)
class GainMedium:
    """Material properties of the gain medium after file overrides are applied."""

    key: str  # library key, e.g. "ti_sapphire"
    label: str  # e.g. "Ti:sapphire"
    wavelength: float  # m, default laser wavelength
    emission_cross_section: float  # m^2
    absorption_cross_section: float  # m^2 (0 for four-level media)
    upper_state_lifetime: float  # s
    n2: float  # m^2/W, nonlinear index
    damage_fluence: float  # J/m^2 at damage_duration
    damage_duration: float  # s, pulse duration the damage fluence refers to
    doping_density: float  # ions/m^3 (used for the transparency fluence of quasi-3-level)
    host: str  # dispersion library key of the host crystal, e.g. "sapphire"
    axis: str = "o"  # which index of the host ("o" or "e")
    sources: Mapping[str, str] = field(default_factory=dict)  # property -> source text

# cm-based helpers: the literature quotes cm², cm²/W, J/cm², cm⁻³.
_CM2 = 1e-4  # m² per cm²
_CM3 = 1e6  # m⁻³ per cm⁻³

_DAMAGE_NOTE = ("from memory: typical bulk/AR-surface damage fluence of the crystal at 10 ns "
                "(the duration is our assumption where the source did not state it); "
                "coatings may damage lower")
_DAMAGE_DURATION_NOTE = "assumed reference duration for the damage fluence (from memory)"

GAIN_MEDIA: dict[str, GainMedium] = {}


def _add(medium: GainMedium) -> None:
    missing = [f for f in _PROPERTIES if f not in medium.sources]
    if missing:  # pragma: no cover - caught by the tests when an entry is edited
        raise AssertionError(f"{medium.key}: no source for {missing}")
    GAIN_MEDIA[medium.key] = medium


#: property names that must carry a source text
_PROPERTIES = ("wavelength", "emission_cross_section", "absorption_cross_section",
               "upper_state_lifetime", "n2", "damage_fluence", "damage_duration",
               "doping_density", "host")

_add(GainMedium(
    key="ti_sapphire", label="Ti:sapphire",
    wavelength=800e-9,
    emission_cross_section=3.0e-19 * _CM2,
    absorption_cross_section=0.0,
    upper_state_lifetime=3.2e-6,
    n2=3.2e-16 * _CM2,
    damage_fluence=4.0 / _CM2,
    damage_duration=10e-9,
    doping_density=3.3e19 * _CM3,
    host="sapphire", axis="e",
    sources={
        "wavelength": "common practice: centre of the usual CPA band",
        "emission_cross_section": "P. F. Moulton, J. Opt. Soc. Am. B 3, 125 (1986) (π "
                                  "polarisation, peak; number from memory, published values "
                                  "2.8-4.1e-19 cm²)",
        "absorption_cross_section": "four-level at 800 nm: 0 (Moulton 1986)",
        "upper_state_lifetime": "P. F. Moulton, J. Opt. Soc. Am. B 3, 125 (1986), room "
                                "temperature (value from memory)",
        "n2": "from memory: sapphire n2 ≈ 3.2e-16 cm²/W",
        "damage_fluence": "from memory: bulk ≈ 4-5 J/cm² (duration not stated in our source; "
                          "10 ns assumed)",
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 0.1 wt% Ti2O3 ≈ 3.3e19 cm^-3 (typical)",
        "host": "sapphire, extraordinary axis: the laser light is π-polarised (E ∥ c)",
    },
))

_add(GainMedium(
    key="nd_yag", label="Nd:YAG",
    wavelength=1064e-9,
    emission_cross_section=2.8e-19 * _CM2,
    absorption_cross_section=0.0,
    upper_state_lifetime=230e-6,
    n2=6.2e-16 * _CM2,
    damage_fluence=10.0 / _CM2,
    damage_duration=10e-9,
    doping_density=1.38e20 * _CM3,
    host="yag", axis="o",
    sources={
        "wavelength": "W. Koechner, Solid-State Laser Engineering, 6th ed. (2006), ch. 2 "
                      "(from memory)",
        "emission_cross_section": "W. Koechner, Solid-State Laser Engineering (2006), "
                                  "effective value 2.8e-19 cm² (from memory)",
        "absorption_cross_section": "four-level: 0",
        "upper_state_lifetime": "W. Koechner, Solid-State Laser Engineering (2006), 1 at.% "
                                "(from memory)",
        "n2": "from memory: YAG n2 ≈ 6.2e-16 cm²/W",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 1 at.% Nd = 1.38e20 cm^-3",
        "host": "YAG (isotropic)",
    },
))

_add(GainMedium(
    key="nd_ylf", label="Nd:YLF (1053 nm, σ)",
    wavelength=1053e-9,
    emission_cross_section=1.2e-19 * _CM2,
    absorption_cross_section=0.0,
    upper_state_lifetime=480e-6,
    n2=1.7e-16 * _CM2,
    damage_fluence=10.0 / _CM2,
    damage_duration=10e-9,
    doping_density=1.4e20 * _CM3,
    host="ylf", axis="o",
    sources={
        "wavelength": "from memory: σ-polarised 1053 nm line (π line: 1047 nm, 1.8e-19 cm²; "
                      "override wavelength, cross-section and axis 'e' for it)",
        "emission_cross_section": "from memory: 1.2e-19 cm² (σ, 1053 nm)",
        "absorption_cross_section": "four-level: 0",
        "upper_state_lifetime": "from memory: 480-520 µs (1 at.%)",
        "n2": "from memory: YLF n2 ≈ 1.7e-16 cm²/W",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 1 at.% Nd ≈ 1.4e20 cm^-3",
        "host": "YLF, ordinary axis for the σ-polarised 1053 nm line",
    },
))

_add(GainMedium(
    key="nd_yvo4", label="Nd:YVO4",
    wavelength=1064e-9,
    emission_cross_section=15.6e-19 * _CM2,
    absorption_cross_section=0.0,
    upper_state_lifetime=90e-6,
    n2=15e-16 * _CM2,
    damage_fluence=5.0 / _CM2,
    damage_duration=10e-9,
    doping_density=1.25e20 * _CM3,
    host="yvo4", axis="e",
    sources={
        "wavelength": "from memory: π-polarised 1064 nm line",
        "emission_cross_section": "from memory: published values spread 15.6-25e-19 cm²; "
                                  "the lower end is used",
        "absorption_cross_section": "four-level: 0",
        "upper_state_lifetime": "from memory: ≈ 90-100 µs (1 at.%)",
        "n2": "from memory: YVO4 n2 ≈ 1.5e-15 cm²/W (uncertain by a factor of about 2)",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 1 at.% Nd ≈ 1.25e20 cm^-3",
        "host": "YVO4, extraordinary axis (E ∥ c, π polarisation)",
    },
))

_add(GainMedium(
    key="yb_yag", label="Yb:YAG",
    wavelength=1030e-9,
    emission_cross_section=2.0e-20 * _CM2,
    absorption_cross_section=0.12e-20 * _CM2,
    upper_state_lifetime=0.95e-3,
    n2=6.2e-16 * _CM2,
    damage_fluence=10.0 / _CM2,
    damage_duration=10e-9,
    doping_density=1.38e21 * _CM3,
    host="yag", axis="o",
    sources={
        "wavelength": "common practice: 1030 nm line",
        "emission_cross_section": "from memory: 2.0-2.2e-20 cm² at room temperature",
        "absorption_cross_section": "from memory: 0.1-0.12e-20 cm² at 1030 nm, room "
                                    "temperature (quasi-three-level)",
        "upper_state_lifetime": "G. Ostermeyer and A. Straesser, Opt. Commun. 274, 422 "
                                "(2007) (confirmed per docs/references.md)",
        "n2": "from memory: YAG n2 ≈ 6.2e-16 cm²/W",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 10 at.% Yb ≈ 1.38e21 cm^-3 (typical)",
        "host": "YAG (isotropic)",
    },
))

_add(GainMedium(
    key="yb_kgw", label="Yb:KGW",
    wavelength=1030e-9,
    emission_cross_section=2.8e-20 * _CM2,
    absorption_cross_section=0.25e-20 * _CM2,
    upper_state_lifetime=0.6e-3,
    n2=15e-16 * _CM2,
    damage_fluence=5.0 / _CM2,
    damage_duration=10e-9,
    doping_density=3.2e20 * _CM3,
    host="kgw", axis="m",
    sources={
        "wavelength": "common practice: 1030 nm, E ∥ N_m",
        "emission_cross_section": "N. V. Kuleshov et al., Opt. Lett. 22, 1317 (1997) (E ∥ N_m; "
                                  "number from memory)",
        "absorption_cross_section": "from memory: estimate ≈ 0.25e-20 cm² at 1030 nm, E ∥ N_m",
        "upper_state_lifetime": "N. V. Kuleshov et al., Opt. Lett. 22, 1317 (1997) (≈ 0.6-0.7 "
                                "ms; number from memory)",
        "n2": "from memory: KGW n2 ≈ 1.5e-15 cm²/W (uncertain by a factor of about 2)",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 5 at.% Yb ≈ 3.2e20 cm^-3",
        "host": "KGW, N_m axis",
    },
))

_add(GainMedium(
    key="yb_caf2", label="Yb:CaF2",
    wavelength=1030e-9,
    emission_cross_section=0.25e-20 * _CM2,
    absorption_cross_section=0.03e-20 * _CM2,
    upper_state_lifetime=2.4e-3,
    n2=1.9e-16 * _CM2,
    damage_fluence=10.0 / _CM2,
    damage_duration=10e-9,
    doping_density=7.4e20 * _CM3,
    host="caf2", axis="o",
    sources={
        "wavelength": "from memory: 1030 nm (the gain band spans about 1030-1050 nm)",
        "emission_cross_section": "from memory: 0.2-0.3e-20 cm²",
        "absorption_cross_section": "from memory: ≈ 0.03e-20 cm² at 1030 nm",
        "upper_state_lifetime": "from memory: ≈ 2-2.4 ms",
        "n2": "from memory: CaF2 n2 ≈ 1.9e-16 cm²/W",
        "damage_fluence": _DAMAGE_NOTE,
        "damage_duration": _DAMAGE_DURATION_NOTE,
        "doping_density": "from memory: 3 at.% Yb ≈ 7.4e20 cm^-3",
        "host": "CaF2 (isotropic)",
    },
))


def get_medium(medium: str) -> GainMedium:
    """The library entry for ``medium``; ``ValueError`` naming the valid keys otherwise."""
    try:
        return GAIN_MEDIA[medium]
    except (KeyError, TypeError):
        raise ValueError(
            f"unknown gain medium {medium!r}; known gain media: {', '.join(GAIN_MEDIA)}"
        ) from None


def _resolve(medium: Union[str, GainMedium]) -> GainMedium:
    return get_medium(medium) if isinstance(medium, str) else medium


def saturation_fluence(medium: Union[str, GainMedium],
                       wavelength: Optional[float] = None) -> float:
    """Saturation fluence J_sat = h ν / (σ_e + σ_a), in J/m².

    h Planck's constant (J s), ν = c/λ the laser frequency (Hz, λ in m: ``wavelength`` or
    the medium's own), σ_e and σ_a the emission and absorption cross-sections at the laser
    wavelength (m²; σ_a = 0 for four-level media).  The cross-sections are not rescaled when
    another wavelength is given: override them too.  Reference: W. Koechner, Solid-State Laser
    Engineering (2006), ch. 4; Frantz–Nodvik (J. Appl. Phys. 34, 2346 (1963)); for
    quasi-three-level media the σ_e + σ_a form (docs/references.md).
    """
    # exact SI 2019 values (equal to scipy.constants.h and .c; not imported: start-up time)
    h, c = 6.62607015e-34, 299_792_458.0

    m = _resolve(medium)
    lam = m.wavelength if wavelength is None else float(wavelength)
    if not lam > 0.0:
        raise ValueError(f"wavelength must be positive, got {lam!r}")
    sigma = m.emission_cross_section + m.absorption_cross_section
    if not sigma > 0.0:
        raise ValueError(f"{m.key}: σ_e + σ_a must be positive, got {sigma!r} m²")
    return h * c / lam / sigma


def transparency_fluence(medium: Union[str, GainMedium], length: float,
                         wavelength: Optional[float] = None) -> float:
    """Stored excitation fluence at which a quasi-three-level crystal is transparent, J/m².

    The small-signal gain coefficient is σ_e N₂ − σ_a N₁ with N₁ + N₂ = N_t (the doping
    density, m⁻³); it vanishes at N₂ = σ_a N_t/(σ_e + σ_a).  The stored energy per area is
    J_st = h ν N₂ L, so J_tr = h ν L N_t σ_a/(σ_e + σ_a) = J_sat σ_a N_t L, and the single-
    pass log gain is g = (J_st − J_tr)/J_sat (docs/definitions.md).  L is the crystal length (m).
    Zero for four-level media (σ_a = 0).  Uniform doping and inversion along the crystal
    are assumed.  Reference: W. Koechner, Solid-State Laser Engineering (2006), ch. 3
    (quasi-three-level rate equations).
    """
    m = _resolve(medium)
    if not length >= 0.0:
        raise ValueError(f"length must be zero or positive, got {length!r}")
    return (saturation_fluence(m, wavelength) * m.absorption_cross_section
            * m.doping_density * length)
