"""Gain-line widths of the built-in gain media (FWHM of the emission band at the laser line).

Used by the noise model (:mod:`regentime.physics.noise`) as Δν_g = c Δλ_g / λ².  Every
value carries its source; "from memory" marks a value recalled by us and not checked
against the cited work here.  The noise input depends on Δν_g only logarithmically in the
self-lasing verdict, so a factor-of-two uncertainty moves the round-trip count by
ln 2 / ln G (about one round trip at G = 2).  Where the literature spreads, the upper end
is used: a wider line means more noise and an earlier verdict (never softer).
"""

from __future__ import annotations

#: library key -> (FWHM of the gain line in m, source text)
GAIN_LINE_FWHM: dict[str, tuple[float, str]] = {
    "ti_sapphire": (230e-9, "P. F. Moulton, J. Opt. Soc. Am. B 3, 125 (1986): π emission band "
                            "FWHM ≈ 230 nm around 780-800 nm (number from memory)"),
    "nd_yag": (0.45e-9, "W. Koechner, Solid-State Laser Engineering (2006), ch. 2: 1064 nm "
                        "line ≈ 120 GHz = 0.45 nm at room temperature (from memory)"),
    "nd_ylf": (1.35e-9, "from memory: 1053 nm σ line ≈ 1.3-1.4 nm FWHM"),
    "nd_yvo4": (0.96e-9, "from memory: 1064 nm π line ≈ 0.8-1.0 nm FWHM"),
    "yb_yag": (9e-9, "from memory: 1030 nm emission peak ≈ 6-9 nm FWHM at room temperature "
                     "(upper end used)"),
    "yb_kgw": (25e-9, "from memory: emission band near 1030 nm, E ∥ N_m, ≈ 20-25 nm FWHM "
                      "(upper end used)"),
    "yb_caf2": (40e-9, "from memory: broad band 1020-1060 nm, ≈ 30-40 nm FWHM (upper end used)"),
}


def gain_line_fwhm(key: str) -> tuple[float, str]:
    """(Δλ_g in m, source) for the library key; ``ValueError`` for an unknown key."""
    try:
        return GAIN_LINE_FWHM[key]
    except KeyError:
        raise ValueError(f"no gain-line width for gain medium {key!r}; known: "
                         f"{', '.join(GAIN_LINE_FWHM)}") from None
