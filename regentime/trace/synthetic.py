"""Invented photodiode traces for demos and tests (not measurements of any real laser).

A trace is the sum, over round trips k = 1 … N (N the switch-out), of a photodiode response
h(t − t_k) scaled by the pulse energy E_k, plus a few small leftover pulses after the
switch-out, a baseline offset and white Gaussian noise.  The response is a unit-peak Gaussian
lobe plus damped ringing, A e^{−t/τ_r} sin(2π f_r t) for t > 0.
"""

from __future__ import annotations

import numpy as np


def photodiode_response(t, fwhm: float = 0.5e-9, ringing: float = 0.2, ring_freq: float = 1.5e9,
                        ring_decay: float = 1.0e-9) -> np.ndarray:
    """Unit-peak Gaussian of FWHM ``fwhm`` (s) plus damped ringing of relative size ``ringing``."""
    t = np.asarray(t, dtype=float)
    sig = fwhm / (2.0 * np.sqrt(2.0 * np.log(2.0)))
    h = np.exp(-0.5 * (t / sig) ** 2)
    pos = t > 0
    h = h + np.where(pos, ringing * np.exp(-np.where(pos, t, 0) / ring_decay)
                     * np.sin(2 * np.pi * ring_freq * np.where(pos, t, 0)), 0.0)
    return h


def synthetic_trace(energies, round_trip_time: float, dump: int, *, dt: float = 50e-12,
                    first_time: float = 30e-9, volts_per_joule: float = 0.0,
                    peak_volts: float = 0.8, fwhm: float = 0.5e-9, ringing: float = 0.2,
                    ring_freq: float = 1.5e9, ring_decay: float = 1.0e-9, baseline: float = 0.012,
                    noise: float = 0.004, leftover: float = 0.03, after: int = 12,
                    duration: float = 0.0, start_round_trip: int = 1, invert: bool = False,
                    seed: int = 1) -> tuple[np.ndarray, np.ndarray]:
    """Build an invented photodiode trace (time s, signal V) from per-round-trip energies.

    energies[k] is the energy after round trip k (k = 0 … ≥ dump); round trip k's pulse sits
    at first_time + (k − start_round_trip)·round_trip_time.  ``volts_per_joule`` sets the
    photodiode scale; 0 picks it so that the largest pulse peaks at ``peak_volts``.  After the
    switch-out (round trip ``dump``) a leftover of relative size ``leftover`` decays over
    ``after`` round trips.  ``duration`` 0: long enough for everything plus 10 round trips.
    """
    e = np.asarray(energies, dtype=float)
    ks = np.arange(start_round_trip, dump + 1)
    amps = e[ks]
    left = e[dump] * leftover * 0.6 ** np.arange(after)
    k_left = dump + 1 + np.arange(after)
    ks = np.concatenate([ks, k_left])
    amps = np.concatenate([amps, left])
    if volts_per_joule <= 0:
        volts_per_joule = peak_volts / amps.max()
    times = first_time + (ks - start_round_trip) * round_trip_time
    if duration <= 0:
        duration = times[-1] + 10 * round_trip_time
    n = int(np.ceil(duration / dt))
    t = np.arange(n) * dt
    rng = np.random.default_rng(seed)
    v = np.full(n, baseline) + rng.normal(0.0, noise, n)
    span = int(np.ceil((3 * fwhm + 8 * ring_decay) / dt))
    for tk, ak in zip(times, amps):
        i0 = int(np.floor(tk / dt))
        lo, hi = max(0, i0 - span // 4), min(n, i0 + span)
        if hi <= lo:
            continue
        v[lo:hi] += volts_per_joule * ak * photodiode_response(t[lo:hi] - tk, fwhm, ringing,
                                                               ring_freq, ring_decay)
    if invert:
        v = 2 * baseline - v
    return t, v
