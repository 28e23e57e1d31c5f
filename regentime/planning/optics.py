"""Cavity geometry: group delays, round-trip time, the two arms and the round-trip path.

The linear cavity (end mirror to end mirror) is unfolded at the polarizer (docs/definitions.md,
"Round trip").  The arm that holds the Pockels cell is the *cell arm*, the other the *gain
arm* (the crystal may be in either).  A round trip starts just past the polarizer, heading
into the cell arm: cell arm out and back, polarizer in transmission, gain arm out and back,
polarizer in transmission.  Every element between the end mirrors is crossed twice per
round trip; each end mirror reflects once.

Round-trip time (group delay)::

    T_rt = 2 Σ_i n_g,i L_i / c,     n_g = n − λ dn/dλ

with n_g of each crystal and plate from its dispersion formula and of air for spaces
(``air: vacuum`` or a space's ``group_index`` overrides).  Reference: any optics text, e.g.
B. Saleh & M. Teich, Fundamentals of Photonics, group velocity; the formulas per material
are in :mod:`regentime.materials.dispersion`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Optional

from regentime.errors import InputError
from regentime.model import (
    Cavity,
    Element,
    GainElement,
    Mirror,
    PockelsCell,
    Polarizer,
    Space,
    Waveplate,
)

C_LIGHT = 299_792_458.0  # m/s, exact (SI definition; equals scipy.constants.c)


@dataclass(frozen=True)
class Pass:
    """One crossing (or end-mirror reflection) in round-trip order.

    ``time`` is the instant (s) the pulse centre reaches the middle of the element, counted
    from the start of the round trip (pulse leaving the polarizer into the cell arm).
    """

    element: Element
    arm: str  # "cell" or "gain" ("polarizer" for the two polarizer transmissions)
    transmission: float  # single-pass transmission or reflectivity applied at this crossing
    gain: bool  # True for a crossing of the gain crystal
    time: float


@dataclass(frozen=True)
class CavityOptics:
    wavelength: float  # m
    group_index: tuple  # per element, same order as cavity.elements
    optical_path: float  # m, one-way group path Σ n_g L from end mirror to end mirror
    round_trip_time: float  # s
    cell_arm: tuple  # elements from the polarizer outward, ending with the end mirror
    gain_arm: tuple
    cell_arm_time: float  # s, double pass polarizer -> end mirror -> polarizer
    gain_arm_time: float  # s
    polarizer_time: float  # s, one transmission through the polarizer's own thickness
    cell_crossings: tuple  # (t_out, t_back) of the cell centre, from the start of the round trip
    cell_to_polarizer: float  # m, geometric distance polarizer -> cell centre
    passes: tuple  # tuple[Pass, ...] in round-trip order
    crystal_in_cell_arm: bool
    cell: PockelsCell
    polarizer: Polarizer
    waveplates_in_cell_arm: tuple

    @property
    def cell_arm_passes(self) -> tuple:
        return tuple(p for p in self.passes if p.arm == "cell")

    def passive_transmission(self, arm: str) -> float:
        """Product of the passive transmissions of one arm's double pass (gain excluded)."""
        t = 1.0
        for p in self.passes:
            if p.arm == arm:
                t *= p.transmission
        return t


def element_group_index(element: Element, cavity: Cavity) -> float:
    """Group index n_g = n − λ dn/dλ of the material the element is made of (1 for thin ones)."""
    explicit: Optional[float] = getattr(element, "group_index", None)
    if explicit is not None:
        return float(explicit)
    if element.thickness == 0.0:
        return 1.0
    wavelength = cavity.wavelength
    if isinstance(element, Space):
        material = element.material
        if material == "air" and cavity.air == "vacuum":
            return 1.0
        axis = "o"
    elif isinstance(element, GainElement):
        material, axis = cavity.gain.medium.host, cavity.gain.medium.axis
    elif isinstance(element, PockelsCell):
        material, axis = element.crystal, element.axis
    else:
        material = getattr(element, "material", "vacuum")
        axis = getattr(element, "axis", "o") if not isinstance(element, Waveplate) else "o"
    if material == "vacuum":
        return 1.0
    from regentime.materials.dispersion import group_index

    try:
        return float(group_index(material, wavelength, axis=axis))
    except ValueError as exc:
        raise InputError(element.path, material, f"a material with a dispersion formula ({exc})") from None


def cavity_optics(cavity: Cavity) -> CavityOptics:
    """Unfold the cavity at the polarizer and compute delays, arms and the round-trip path."""
    elements = cavity.elements
    pol_idx = [i for i, e in enumerate(elements) if isinstance(e, Polarizer)]
    cell_idx = [i for i, e in enumerate(elements) if isinstance(e, PockelsCell)]
    if len(pol_idx) != 1:
        raise InputError("cavity", f"{len(pol_idx)} polarizers", "exactly one polarizer")
    if len(cell_idx) != 1:
        raise InputError("cavity", f"{len(cell_idx)} Pockels cells", "exactly one pockels_cell")
    p, ci = pol_idx[0], cell_idx[0]
    n_g = tuple(element_group_index(e, cavity) for e in elements)
    delay = [n * e.thickness / C_LIGHT for n, e in zip(n_g, elements)]

    if ci < p:
        cell_arm_idx = list(range(p - 1, -1, -1))
        gain_arm_idx = list(range(p + 1, len(elements)))
    else:
        cell_arm_idx = list(range(p + 1, len(elements)))
        gain_arm_idx = list(range(p - 1, -1, -1))
    for arm_name, arm in (("cell", cell_arm_idx), ("gain", gain_arm_idx)):
        if not arm or not isinstance(elements[arm[-1]], Mirror):
            raise InputError("cavity", f"{arm_name} arm without an end mirror",
                             "a mirror at each end of the cavity list")

    passes: list[Pass] = []
    t = 0.0

    def walk(arm_idx: list[int], arm: str) -> float:
        nonlocal t
        out = arm_idx[:-1]
        end = arm_idx[-1]
        for i in out:
            e = elements[i]
            passes.append(Pass(e, arm, e.transmission, isinstance(e, GainElement), t + delay[i] / 2))
            t += delay[i]
        e = elements[end]
        passes.append(Pass(e, arm, e.transmission, False, t))
        for i in reversed(out):
            e = elements[i]
            passes.append(Pass(e, arm, e.transmission, isinstance(e, GainElement), t + delay[i] / 2))
            t += delay[i]
        return t

    pol = elements[p]
    start = t
    walk(cell_arm_idx, "cell")
    cell_arm_time = t - start
    passes.append(Pass(pol, "polarizer", pol.transmission_p, False, t + delay[p] / 2))
    t += delay[p]
    start = t
    walk(gain_arm_idx, "gain")
    gain_arm_time = t - start
    passes.append(Pass(pol, "polarizer", pol.transmission_p, False, t + delay[p] / 2))
    t += delay[p]
    round_trip_time = t

    optical_path = sum(n * e.thickness for n, e in zip(n_g, elements))
    cell = elements[ci]
    cell_times = tuple(ps.time for ps in passes if ps.element is cell)
    lo, hi = sorted((p, ci))
    cell_to_pol = sum(elements[i].thickness for i in range(lo + 1, hi)) + cell.thickness / 2
    gain_idx = [i for i, e in enumerate(elements) if isinstance(e, GainElement)]
    if len(gain_idx) != 1:
        raise InputError("cavity", f"{len(gain_idx)} gain media", "exactly one gain_medium")
    return CavityOptics(
        wavelength=cavity.wavelength,
        group_index=n_g,
        optical_path=optical_path,
        round_trip_time=round_trip_time,
        cell_arm=tuple(elements[i] for i in cell_arm_idx),
        gain_arm=tuple(elements[i] for i in gain_arm_idx),
        cell_arm_time=cell_arm_time,
        gain_arm_time=gain_arm_time,
        polarizer_time=delay[p],
        cell_crossings=cell_times,
        cell_to_polarizer=cell_to_pol,
        passes=tuple(passes),
        crystal_in_cell_arm=gain_idx[0] in cell_arm_idx,
        cell=cell,
        polarizer=pol,
        waveplates_in_cell_arm=tuple(elements[i] for i in cell_arm_idx if isinstance(elements[i], Waveplate)),
    )
