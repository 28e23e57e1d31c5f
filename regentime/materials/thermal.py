"""Thermo-optic data of the gain media for the thermal lens, with a source for every number.

``THERMO_OPTIC[key] = ThermoOptic(dn_dt, conductivity, sources)`` keyed like
:data:`regentime.materials.gain_media.GAIN_MEDIA`; dn/dT in 1/K for the polarisation the
laser uses, thermal conductivity in W/(m·K) of the doped crystal near room temperature.
A source text containing "from memory" marks a value recalled by us and not checked
against the cited work here; the cavity file may override both under
``gain.thermal_lens``.  The simple thermal-lens formulas use dn/dT alone: end-face bulging
and the photo-elastic term (large in KGW and CaF2, whose dn/dT is negative while their
measured lens is often positive) are left out, so a given ``focal_length`` is better when
it is known.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping


@dataclass(frozen=True)
class ThermoOptic:
    dn_dt: float  # 1/K
    conductivity: float  # W/(m K)
    sources: Mapping[str, str] = field(default_factory=dict)


THERMO_OPTIC: dict[str, ThermoOptic] = {
    "ti_sapphire": ThermoOptic(13e-6, 33.0, {
        "dn_dt": "from memory: sapphire ≈ 13e-6 /K near 800 nm (Koechner, Solid-State Laser "
                 "Engineering, ch. 2 table of host properties)",
        "conductivity": "P. F. Moulton, J. Opt. Soc. Am. B 3, 125 (1986): ≈ 33 W/(m·K) at 300 K "
                        "(value from memory)"}),
    "nd_yag": ThermoOptic(7.3e-6, 14.0, {
        "dn_dt": "from memory: YAG ≈ 7.3e-6 /K (Koechner, Solid-State Laser Engineering, ch. 7)",
        "conductivity": "from memory: Nd:YAG ≈ 14 W/(m·K) (Koechner, ch. 7)"}),
    "nd_ylf": ThermoOptic(-4.3e-6, 6.3, {
        "dn_dt": "from memory: YLF dn_e/dT ≈ −4.3e-6 /K (Koechner, ch. 2)",
        "conductivity": "from memory: YLF ≈ 6.3 W/(m·K) (Koechner, ch. 2)"}),
    "nd_yvo4": ThermoOptic(3.0e-6, 5.2, {
        "dn_dt": "from memory: YVO4 dn_e/dT ≈ 3e-6 /K",
        "conductivity": "from memory: YVO4 ≈ 5.2 W/(m·K) parallel to c"}),
    "yb_yag": ThermoOptic(7.8e-6, 11.0, {
        "dn_dt": "from memory: YAG ≈ 7.8e-6 /K (Koechner, ch. 2)",
        "conductivity": "from memory: Yb:YAG ≈ 11 W/(m·K) at low doping (Koechner, ch. 2)"}),
    "yb_kgw": ThermoOptic(-0.8e-6, 3.3, {
        "dn_dt": "from memory: KGW dn_g/dT ≈ −0.8e-6 /K (the measured lens is set mostly by "
                 "the photo-elastic and bulging terms, not included here)",
        "conductivity": "from memory: KGW ≈ 3.3 W/(m·K)"}),
    "yb_caf2": ThermoOptic(-11.3e-6, 6.5, {
        "dn_dt": "from memory: CaF2 ≈ −11.3e-6 /K",
        "conductivity": "from memory: Yb:CaF2 ≈ 6.5 W/(m·K) at a few at.% Yb (undoped 9.7)"}),
}


def thermo_optic(key: str) -> ThermoOptic:
    """The entry for gain medium ``key``; ``ValueError`` naming the known keys otherwise."""
    try:
        return THERMO_OPTIC[key]
    except KeyError:
        raise ValueError(f"no thermo-optic data for {key!r}; known: "
                         f"{', '.join(THERMO_OPTIC)}") from None
