"""Pure physics of the satellite pulses a regen emits around its main pulse.

No I/O, no printing; SI units (s, J, J/m²).  The planning stage
(:mod:`regentime.planning.contrast`) decides *which* satellites exist and when; this module
holds the equations it uses:

- following a pulse through a sequence of round-trip operations with the gain that is left
  (Frantz–Nodvik at every crossing of the crystal, via :func:`regentime.physics.buildup.apply_ops`),
  and the recovery of the stored fluence between crossings;
- the polarisation bookkeeping at the polarizer's reflected (in/out) port;
- the transmission of an external pulse-cleaning cell between crossed polarizers while its
  high-voltage gate rises and falls.

References: Frantz & Nodvik, J. Appl. Phys. 34, 2346 (1963); A. Yariv & P. Yeh, Optical Waves
in Crystals (1984), ch. 7 (cell between crossed polarizers, T = sin²(πV/2V_π)); C. A. DiMarzio,
Optics for Engineers (CRC 2011), ch. 6 (Jones polarizer diag(t_pass, t_block): a polarizer of
extinction ratio ER passes 1/ER of the blocked polarisation).
"""

from __future__ import annotations

import math

import numpy as np

from regentime.physics.buildup import GainModel, apply_ops

_RAMP_10_90 = 0.8  # a linear ramp's 10-90 % time is 0.8 of its 0-100 % time


def port_share(reflection_s: float, extinction_ratio: float, s_share: float) -> float:
    """Share of a pulse arriving at the polarizer that leaves by its reflected (in/out) port.

    Equation (power, polarisations add incoherently)::

        q = R_s · s + (R_s / ER) · (1 − s)

    reflection_s R_s: the port's reflectivity for S (fraction); extinction_ratio ER = R_s/R_p of
    that port (> 1, ``inf`` for a perfect polarizer); s_share s: the S share of the arriving
    pulse (0 … 1).  Definition of extinction ratio; Jones polarizer diag(t_pass, t_block),
    DiMarzio, Optics for Engineers, ch. 6.  Valid for any 0 ≤ s ≤ 1, ER ≥ 1.
    """
    if not 0.0 <= s_share <= 1.0:
        raise ValueError(f"S share {s_share} outside 0 … 1")
    return reflection_s * s_share + reflection_s / extinction_ratio * (1.0 - s_share)


def follow(ops, energy: float, j_st, gm: GainModel):
    """Send one pulse of ``energy`` (J) through ``ops`` with stored fluence ``j_st`` (J/m², per ring).

    ``ops`` is a sequence of transmission factors and ``"gain"`` crossings (see
    :class:`regentime.physics.buildup.RoundTripPath`); every gain crossing applies
    Frantz–Nodvik, J_out = J_sat ln(1 + G0 (e^{J_in/J_sat} − 1)), and lowers the stored fluence.
    Returns ``(energy_out, j_st_after)``.  Valid while the pulse is much shorter than the
    upper-state lifetime.
    """
    e, j, _, _ = apply_ops(ops, np.asarray(float(energy)), np.asarray(j_st, dtype=float), gm, False)
    return float(e), j


def relax(j_st, gm: GainModel, dt: float):
    """Stored fluence after ``dt`` seconds of pumping and spontaneous decay.

    Equation (docs/definitions.md "Gain")::  J(t+Δ) = J_eq + (J(t) − J_eq) e^{−Δ/τ},  J_eq = R τ / area
    per ring (R the continuous pump rate, zero for a pulsed pump).  ``dt`` may be negative to
    run a pulsed-pump decay backwards in time (earlier = more stored).
    """
    j_eq = gm.stored_fluence(gm.pump_rate * gm.tau) if gm.pump_rate else 0.0
    return j_eq + (np.asarray(j_st, dtype=float) - j_eq) * math.exp(-dt / gm.tau)


def gate_level(t, t_open: float, t_close: float, rise_time: float, fall_time: float):
    """Normalised gate voltage v(t) (0 … 1) of a linear-ramp high-voltage gate.

    The rising edge has its 50 % point at ``t_open`` and rises 0 → 1 in rise_time/0.8 (rise_time
    is the 10–90 % time); the falling edge has its 50 % point at ``t_close`` and falls in
    fall_time/0.8.  Times in s, any array shape.  Zero rise time gives a step.
    """
    t = np.asarray(t, dtype=float)
    up = _ramp(t - t_open, rise_time / _RAMP_10_90)
    down = _ramp(t_close - t, fall_time / _RAMP_10_90)
    return np.minimum(up, down)


def _ramp(x, width):
    if width <= 0.0:
        return np.where(x > 0, 1.0, np.where(x < 0, 0.0, 0.5))
    return np.clip(0.5 + x / width, 0.0, 1.0)


def cleaner_transmission(level, extinction_ratio: float, transmission: float):
    """Transmission of a Pockels cell between crossed polarizers at normalised voltage v = V/V_π.

    Equation (Yariv & Yeh, Optical Waves in Crystals, ch. 7; leak of the closed pair from the
    definition of extinction ratio)::

        T(v) = T_open · [ sin²(π v / 2) + cos²(π v / 2) / ER ]

    level v: 0 (closed) … 1 (half-wave voltage, open); extinction_ratio ER of the polarizer
    pair (> 1, ``inf`` allowed); transmission T_open of the open cleaner.  Returns T for every
    v (array).  Static depolarisation of the cleaner's crystal is taken as part of ER.
    """
    v = np.asarray(level, dtype=float)
    s = np.sin(0.5 * np.pi * v) ** 2
    return transmission * (s + (1.0 - s) / extinction_ratio)


def ratio(main: float, energy: float) -> float:
    """Contrast ratio E_main / E (``inf`` for a satellite of zero energy)."""
    if energy <= 0.0:
        return math.inf
    return main / energy


def decibels(r: float) -> float:
    """10 log10(ratio); ``inf`` stays ``inf``."""
    if math.isinf(r):
        return math.inf
    return 10.0 * math.log10(r) if r > 0 else -math.inf


def relax_round_trip(j_st, gm: GainModel, dt: float):
    """Stored fluence after one round trip of the build-up (or of a post-pulse): the recovery
    law with a continuous pump, held constant with a pulsed one — the same rule as the build-up
    (:meth:`regentime.physics.buildup.GainModel.buildup_decay`)."""
    if not gm.relax_in_buildup:
        return np.asarray(j_st, dtype=float)
    return relax(j_st, gm, dt)
