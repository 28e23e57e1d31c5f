"""The Pockels cell and polarizer of a planned cavity, in the Jones model of :mod:`regentime.physics.jones`.

Turns the cavity's cell, waveplates and polarizer (file values, key paths for errors) into
the numbers the Jones model takes: the retardance at the set voltage, the leak per return
of the trapped pulse and the shares of a seed pulse sent back to the port.
"""

from __future__ import annotations

import math

from regentime.errors import InputError
from regentime.materials.electrooptic import half_wave_voltage
from regentime.model import Cavity, PockelsCell
from regentime.physics import jones


def full_retardance(cavity: Cavity, cell: PockelsCell | None = None) -> float:
    """Retardance Γ_full (rad) per crossing with the high voltage fully on.

    Γ_full = π V / V_π (Yariv & Yeh 1984, ch. 7).  Without ``voltage`` in the file the
    driver is taken to apply the scheme's nominal voltage: Γ_full = π/2 (quarter-wave) or π
    (half-wave).  With ``voltage``, V_π comes from the file (half_wave_voltage, or twice
    quarter_wave_voltage) or, when neither is given, from the crystal's electro-optic
    coefficient, length, aperture and the wavelength
    (:func:`regentime.materials.electrooptic.half_wave_voltage`).
    """
    if cell is None:
        cell = cavity.elements_of(PockelsCell)[0]
    if cell.voltage is None:
        return jones.nominal_retardance(cavity.switch.scheme)
    return math.pi * cell.voltage / half_wave_voltage_of(cavity, cell)


def half_wave_voltage_of(cavity: Cavity, cell: PockelsCell) -> float:
    """V_π of the cell (V): from the file when given, else from the material library."""
    if cell.half_wave_voltage is not None:
        return float(cell.half_wave_voltage)
    if cell.quarter_wave_voltage is not None:
        return 2.0 * float(cell.quarter_wave_voltage)
    try:
        return half_wave_voltage(cell.crystal, cavity.wavelength, length=cell.length or None,
                                 aperture=cell.aperture, r=cell.electro_optic_coefficient)
    except ValueError as exc:
        raise InputError(cell.path, cell.crystal,
                         f"a quarter_wave_voltage or half_wave_voltage, or what the library needs "
                         f"to compute it ({exc})") from None




def leak_per_return(cavity: Cavity, optics) -> float:
    """ℓ: share of the trapped pulse's energy that leaves through the in/out port per return.

    The trapped pulse (P) makes one cell-arm double pass with the cell in its trapping state
    (quarter-wave scheme: Γ_full on both crossings, plus the waveplate; half-wave scheme:
    Γ_full on both crossings), then meets the polarizer.  ℓ = R_s·S + (R_s/ER)·P, with S and
    P the shares of the returning light in each state (Jones model with the cell's static
    contrast as depolarisation, see the module notes).  A perfect cell and voltage give
    ℓ = R_s/ER (docs/definitions.md, "Contrast").  ℓ is relative to the energy that comes back from
    the cell arm: the arm's passive transmission is not included.
    """
    g = full_retardance(cavity, optics.cell)
    m = jones.cell_arm_mueller(optics.cell_arm, g, g, optics.cell.contrast)
    out = m @ jones.STOKES_P
    return float(jones.reflected_intensity(optics.polarizer, out) / out[0])


def seed_return_shares(cavity: Cavity, optics) -> tuple[float, float]:
    """(straight back, after one round trip): shares of a seed pulse sent back to the in/out port.

    With the cell off.  The seed arrives at the polarizer in S, is reflected into the cell
    arm (R_s; the small P part of the seed beam is ignored), makes a cell-arm double pass
    with no voltage, and at the polarizer
    * its S part is reflected straight back out (R_s, and R_s/ER of its P part): the first
      number (no delay);
    * its P part is transmitted (T_p), crosses the gain arm (whose gain and passive loss the
      caller applies), is transmitted again (T_p), makes a second cell-arm double pass with
      the cell off, and leaves by reflection (R_s of the S part, R_s/ER of the P part): the
      second number (one round trip later).
    Both are shares of the seed energy arriving at the polarizer and include the polarizer
    factors and the polarisation model, not the arms' passive transmission or gain.
    """
    pol = optics.polarizer
    m0 = jones.cell_arm_mueller(optics.cell_arm, 0.0, 0.0, optics.cell.contrast)
    first = m0 @ (pol.reflection_s * jones.STOKES_S)
    straight = float(jones.reflected_intensity(pol, first))
    t = jones.mueller(jones.transmitted_port(pol))
    again = m0 @ (t @ (t @ first))
    after_one = float(jones.reflected_intensity(pol, again))
    return straight, after_one


def seed_return_share(cavity: Cavity, optics) -> float:
    """Share of a seed pulse returned to the in/out port by the cell arm while the cell is off.

    Quarter-wave scheme: the share trapped for one round trip that comes back after it
    (second number of :func:`seed_return_shares`; the caller applies that round trip's gain
    and passive transmission).  Half-wave scheme: the share reflected straight back (first
    number).  Shares of the seed energy arriving at the polarizer, polarizer factors
    included (R_s in, R_s out, T_p twice for the quarter-wave path).
    """
    straight, after_one = seed_return_shares(cavity, optics)
    return after_one if cavity.switch.scheme == "quarter-wave" else straight


__all__ = ["full_retardance", "half_wave_voltage_of", "leak_per_return", "seed_return_share",
           "seed_return_shares"]
