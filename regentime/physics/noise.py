"""Spontaneous-emission noise in a closed cavity and its amplification to a lasing pulse.

Noise input (A. E. Siegman, Lasers, University Science Books 1986, ch. 13: the equivalent
input noise of an amplifier is n_sp photons per mode, i.e. a noise power n_sp hν Δν in one
transverse mode and one polarisation over a bandwidth Δν):

    E_n = n_sp · h ν · Δν_g · T_rt     (J per round trip)

with h Planck's constant (J s), ν = c/λ (Hz), Δν_g the FWHM of the gain line (Hz) and T_rt
the round-trip time (s): the noise energy the cavity mode collects in one round trip.
n_sp = 1 for a four-level medium and N₂/(N₂ − (σ_a/σ_e)N₁) for a quasi-three-level one.

Build-up: each round trip k multiplies the circulating energy by G_k (small-signal gain ×
closed-state transmission) and adds E_n, so E_k = E_n Σ_{j≤k} Π_{i=j..k} G_i.  Valid while
the noise is far below saturation (up to the 1 % threshold it is), with the whole gain line
taken as amplified at the line-centre gain (an upper bound: never a softer verdict).
"""

from __future__ import annotations

from typing import Optional

import numpy as np

H_PLANCK = 6.62607015e-34  # J s (exact, SI 2019; equals scipy.constants.h)
C_LIGHT = 299_792_458.0  # m/s (exact; equals scipy.constants.c)


def photon_energy(wavelength: float) -> float:
    """h ν = h c / λ (J), λ in m (> 0).  Reference: SI 2019 exact constants."""
    if not wavelength > 0.0:
        raise ValueError(f"wavelength must be positive, got {wavelength!r}")
    return H_PLANCK * C_LIGHT / wavelength


def linewidth_hz(wavelength: float, fwhm_wavelength: float) -> float:
    """Δν = c Δλ / λ² (Hz) for a line of FWHM Δλ (m) at λ (m); valid for Δλ ≪ λ (at
    Δλ/λ = 0.3, as for Ti:sapphire, the exact c/λ₁ − c/λ₂ differs by about 2 %)."""
    if not (wavelength > 0.0 and fwhm_wavelength > 0.0):
        raise ValueError("wavelength and line width must be positive")
    return C_LIGHT * fwhm_wavelength / wavelength ** 2


def inversion_factor(sigma_e: float, sigma_a: float, n_upper: float, n_total: float) -> float:
    """n_sp = N₂ / (N₂ − (σ_a/σ_e) N₁), N₁ = N_t − N₂ (densities m⁻³, cross-sections m²).

    1 for σ_a = 0 (four-level).  ``inf`` when the medium is at or below transparency (no
    gain: the noise is then not amplified and the caller sees no lasing).  Reference:
    Siegman, Lasers, ch. 13 (population inversion factor).
    """
    if sigma_a <= 0.0:
        return 1.0
    if not sigma_e > 0.0:
        raise ValueError("emission cross-section must be positive")
    n1 = max(n_total - n_upper, 0.0)
    net = n_upper - sigma_a / sigma_e * n1
    return float(n_upper / net) if net > 0.0 else float("inf")


def noise_energy_per_round_trip(wavelength: float, gain_line_hz: float, round_trip_time: float,
                                n_sp: float = 1.0) -> float:
    """E_n = n_sp h ν Δν_g T_rt (J): one transverse mode, one polarisation (Siegman ch. 13)."""
    if not round_trip_time > 0.0:
        raise ValueError("round-trip time must be positive")
    return n_sp * photon_energy(wavelength) * gain_line_hz * round_trip_time


def noise_buildup_round_trips(noise_energy: float, log_gain, threshold) -> Optional[int]:
    """First round trip k (1-based) at which the amplified noise reaches ``threshold``.

    ``log_gain[k-1]`` = ln G_k, the net round-trip log gain of round trip k (small-signal
    gain × the closed cavity's transmission); ``threshold[k-1]`` the energy to reach (J,
    e.g. 1 % of the stored energy), arrays of equal length K.  Noise E_n (J) is added every
    round trip: E_k = E_n Σ_{j=1..k} exp(L_k − L_{j−1}), L_k = Σ_{i≤k} ln G_i (computed in
    logarithms, no overflow).  None when it is not reached within K round trips.
    """
    lg = np.asarray(log_gain, dtype=float)
    thr = np.broadcast_to(np.asarray(threshold, dtype=float), lg.shape)
    if lg.size == 0 or not noise_energy > 0.0:
        return None
    cum = np.cumsum(lg)
    prev = np.concatenate([[0.0], cum[:-1]])
    log_e = np.log(noise_energy) + cum + np.logaddexp.accumulate(-prev)
    with np.errstate(divide="ignore"):
        hit = np.flatnonzero(log_e >= np.log(thr))
    return int(hit[0]) + 1 if hit.size else None


def amplified_noise(noise_energy: float, round_trip_gain) -> float:
    """Noise energy (J) in the cavity after K round trips of net gains G_1 … G_K, E_n added
    every round trip before its amplification: E = E_n Σ_{j=1..K} Π_{i=j..K} G_i
    (the same sum as :func:`noise_buildup_round_trips`; Siegman, Lasers, ch. 13)."""
    g = np.asarray(round_trip_gain, dtype=float)
    if g.size == 0 or not noise_energy > 0.0:
        return 0.0
    lg = np.log(np.maximum(g, 1e-300))
    cum = np.cumsum(lg)
    prev = np.concatenate([[0.0], cum[:-1]])
    return float(np.exp(np.log(noise_energy) + cum[-1] + np.logaddexp.reduce(-prev)))
