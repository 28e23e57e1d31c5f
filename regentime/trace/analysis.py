"""Find the round-trip pulse train in a photodiode trace: baseline, pulses, period, switch-out.

Pure numpy/scipy (no I/O).  The photodiode sits behind a cavity mirror and sees the trapped
pulse once per round trip; its response (a fast Gaussian-like lobe, often followed by
ringing) repeats every T_rt while the envelope grows, and collapses when the pulse is
switched out.

Method
1. Baseline and noise from the quiet part: the trace is cut into blocks; the quarter of the
   blocks with the smallest median absolute deviation (MAD) are taken as pulse-free; baseline =
   their median, noise σ = 1.4826 · their MAD (the MAD-to-σ factor of a normal distribution).
2. Polarity: pulses may be negative (inverted probe); the larger excursion decides.
3. Pulses: the trace is smoothed with a Gaussian matched to the largest pulse's FWHM and peaks
   above 6 σ (of the smoothed trace) are taken; each centre is refined to a fraction of a
   sample by fitting a parabola to the logarithm of the three highest samples (exact for a
   Gaussian lobe).
4. Period: centres are assigned to round-trip slots k and a weighted straight line
   t_k = t_ref + k · T (weights ∝ SNR²) gives T to a small fraction of the sample interval;
   its standard error comes from the residual scatter.
5. Amplitude of every slot: the pulse **area** (V·s) of the baseline-free signal over one
   round trip, from 0.3 T before the slot centre to 0.7 T after it (it takes in the ringing;
   the area is proportional to the pulse energy for a linear photodiode).  Computed from the
   cumulative integral with fractional-sample edges.
6. Switch-out: the last slot before the largest drop of the envelope (next/this < 0.5 among
   slots above a quarter of the maximum).  A pulse train that never collapses is reported as
   "switch-out not seen" and its last significant slot is used.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from regentime.errors import InputError

MAD_TO_SIGMA = 1.4826  # 1/Φ⁻¹(3/4) for normally distributed noise
DETECT_SIGMA = 6.0  # peak threshold on the smoothed trace (false alarms ≈ 1e-9 per sample)
SIGNIFICANT_SIGMA = 5.0  # an area this many σ above zero counts as a pulse
COLLAPSE_RATIO = 0.5  # next/this below this marks the switch-out (natural decay is ≳ 0.7)
WINDOW_BEFORE = 0.3  # area window, fraction of T before / after the pulse centre
WINDOW_AFTER = 0.7


@dataclass
class PulseTrain:
    """The measured pulse train (all times in s, amplitudes as pulse areas in V·s)."""

    slots: np.ndarray  # round-trip slot numbers k (consecutive)
    times: np.ndarray  # s, measured centre where a pulse was detected, else t_ref + k·T
    amplitudes: np.ndarray  # V·s, pulse areas (baseline removed, polarity made positive)
    detected: np.ndarray  # bool: a peak was found in this slot
    sigma_amplitude: float  # V·s, noise of one area
    period: float  # s, measured round-trip time
    period_sigma: float  # s, standard error of the period
    t_ref: float  # s, time of slot 0 on the fitted line
    baseline: float  # signal units
    noise: float  # σ of the raw signal
    polarity: int  # +1 or −1 (−1: pulses were negative and were flipped)
    fwhm: float  # s, FWHM of the largest pulse's main lobe
    dump_index: int  # index into the arrays above: last pulse before the switch-out
    switch_out_seen: bool
    n_timed: int  # pulses used for the period line
    amplitude_kind: str = "area"
    notes: list = field(default_factory=list)

    @property
    def first_index(self) -> int:
        """Index of the first significant pulse."""
        return int(np.flatnonzero(self.amplitudes > SIGNIFICANT_SIGMA * self.sigma_amplitude)[0])


def baseline_and_noise(y: np.ndarray) -> tuple[float, float]:
    """Baseline (median) and σ (1.4826·MAD) of the quietest quarter of ~200 blocks."""
    n = y.size
    nb = int(min(200, max(4, n // 32)))
    bs = n // nb
    blocks = y[: nb * bs].reshape(nb, bs)
    med = np.median(blocks, axis=1)
    mad = np.median(np.abs(blocks - med[:, None]), axis=1)
    order = np.argsort(mad)
    quiet = order[: max(1, nb // 4)]
    base = float(np.median(med[quiet]))
    noise = MAD_TO_SIGMA * float(np.median(mad[quiet]))
    if noise <= 0.0:  # quantised, nearly noiseless record: fall back on the rms of quiet blocks
        dev = blocks[quiet] - base
        top = float(np.max(np.abs(dev))) if dev.size else 0.0
        # rms scaled by the largest deviation, so values near the float limit cannot overflow
        noise = top * float(np.sqrt(np.mean((dev / top) ** 2))) if top > 0 else 0.0
    scale = float(np.max(np.abs(y - base))) if n else 0.0
    return base, max(noise, 1e-12 * scale, np.finfo(float).tiny)


def _fwhm_samples(y: np.ndarray, i: int) -> float:
    half = y[i] / 2.0
    lo = i
    while lo > 0 and y[lo - 1] > half and i - lo < 10000:
        lo -= 1
    hi = i
    while hi < y.size - 1 and y[hi + 1] > half and hi - i < 10000:
        hi += 1
    return float(hi - lo + 1)


def _refine(z: np.ndarray, idx: np.ndarray) -> np.ndarray:
    """Sub-sample peak positions: parabola through log z (Gaussian-exact), else through z."""
    idx = np.clip(idx, 1, z.size - 2)
    a, b, c = z[idx - 1], z[idx], z[idx + 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        la, lb, lc = np.log(a), np.log(b), np.log(c)
        d_log = 0.5 * (la - lc) / (la - 2 * lb + lc)
        d_lin = 0.5 * (a - c) / (a - 2 * b + c)
    ok = (a > 0) & (c > 0) & np.isfinite(d_log)
    d = np.where(ok, d_log, d_lin)
    d = np.where(np.isfinite(d), np.clip(d, -0.5, 0.5), 0.0)
    return idx + d


def analyse_pulses(signal, dt: float, t0: float = 0.0, expected_period: Optional[float] = None,
                   source: str = "SCOPE") -> PulseTrain:
    """Analyse an evenly sampled photodiode signal (sample i at t0 + i·dt, dt in s).

    ``expected_period``: the model's T_rt (s), used only when the trace itself shows fewer
    than three strong pulses to estimate the spacing.  Returns a :class:`PulseTrain`.
    """
    from scipy.signal import find_peaks

    y = np.array(signal, dtype=float)  # a private copy, contiguous
    n = y.size
    notes: list = []
    base, noise = baseline_and_noise(y)
    y -= base
    polarity = 1
    if -float(y.min()) > float(y.max()):
        y *= -1.0
        polarity = -1
        notes.append("pulses are negative in the file; the signal was inverted")
    i_max = int(np.argmax(y))
    if y[i_max] < 2 * DETECT_SIGMA * noise:
        raise InputError("", f"largest excursion {y[i_max] / noise:.1f} σ", "a pulse train well above "
                         "the noise (at least a few pulses above 12 σ)", source=source)
    w = _fwhm_samples(y, i_max)
    sig_k = max(w / 2.3548, 0.6)
    half = int(np.ceil(3 * sig_k))
    ker = np.exp(-0.5 * (np.arange(-half, half + 1) / sig_k) ** 2)
    ker /= ker.sum()
    z = np.convolve(y, ker, mode="same")
    noise_z = noise * float(np.sqrt(np.sum(ker ** 2)))

    # --- period estimate from the strong pulses ---------------------------------------------
    zmax = float(z.max())
    strong, _ = find_peaks(z, height=0.5 * zmax, distance=max(1, int(2 * w)))
    if strong.size >= 3:
        t_strong = _refine(z, strong) * dt
        period0 = float(np.median(np.diff(t_strong)))
        if expected_period and not 0.7 < period0 / expected_period < 1.3:
            notes.append(f"strong pulses are {period0 * 1e9:.3f} ns apart, the model says "
                         f"{expected_period * 1e9:.3f} ns; the trace's spacing is used")
    elif expected_period:
        period0 = float(expected_period)
        notes.append("fewer than three strong pulses: the model's round trip seeds the search")
    else:
        raise InputError("", f"{strong.size} strong pulse(s)", "a pulse train with at least three "
                         "pulses above half the largest", source=source)
    if period0 < 4 * dt:
        raise InputError("", f"round trip {period0:.3g} s with samples every {dt:.3g} s",
                         "at least 4 samples per round trip (sample faster)", source=source)

    # --- detect, assign to slots, fit the period line ---------------------------------------
    pk, props = find_peaks(z, height=DETECT_SIGMA * noise_z, distance=max(1, int(0.6 * period0 / dt)))
    if pk.size < 3:
        raise InputError("", f"{pk.size} pulse(s)", "a pulse train with at least three pulses above "
                         f"{DETECT_SIGMA:g} σ of the noise", source=source)
    heights = props["peak_heights"]
    tc = _refine(z, pk) * dt  # relative to sample 0
    ref = float(tc[int(np.argmax(heights))])
    period, t_ref = period0, ref
    for _ in range(3):
        k = np.rint((tc - t_ref) / period)
        off = tc - (t_ref + k * period)
        keep = np.abs(off) < 0.2 * period
        kk, tt, ww = k[keep], tc[keep], (heights[keep] / noise_z) ** 2
        # one pulse per slot: the strongest
        order = np.lexsort((-ww, kk))
        first = np.concatenate(([True], np.diff(kk[order]) != 0))
        sel = order[first]
        kk, tt, ww = kk[sel], tt[sel], ww[sel]
        if kk.size < 3 or np.ptp(kk) < 2:
            raise InputError("", f"{kk.size} pulse(s) on a regular grid", "at least three pulses one "
                             "round trip apart", source=source)
        wsum = ww.sum()
        km = (ww * kk).sum() / wsum
        tm = (ww * tt).sum() / wsum
        sxx = (ww * (kk - km) ** 2).sum()
        period = float((ww * (kk - km) * (tt - tm)).sum() / sxx)
        t_ref = float(tm - period * km)
    resid = tt - (t_ref + period * kk)
    dof = max(kk.size - 2, 1)
    s2 = float((ww * resid ** 2).sum() / dof)
    period_sigma = float(np.sqrt(s2 / sxx)) if sxx > 0 else float("nan")

    # --- every slot inside the record, its centre and area ----------------------------------
    t_end = (n - 1) * dt
    k_lo = int(np.ceil((0.0 - t_ref) / period + WINDOW_BEFORE))
    k_hi = int(np.floor((t_end - t_ref) / period - WINDOW_AFTER))
    slots = np.arange(k_lo, k_hi + 1)
    centres = t_ref + slots * period
    cum = np.concatenate(([0.0], np.cumsum(y) * dt))  # integral up to each sample edge
    edges = np.arange(n + 1) * dt - 0.5 * dt

    def integral(t):
        return np.interp(t, edges, cum)

    areas = integral(centres + WINDOW_AFTER * period) - integral(centres - WINDOW_BEFORE * period)
    sigma_a = noise * float(np.sqrt(period * dt))
    measured = dict(zip(kk.astype(int).tolist(), tt.tolist()))
    det = np.array([int(s) in measured for s in slots])
    times = np.array([measured.get(int(s), c) for s, c in zip(slots, centres)])

    sig = areas > SIGNIFICANT_SIGMA * sigma_a
    if not sig.any():
        raise InputError("", "no pulse area above the noise", "a pulse train", source=source)
    runs = np.flatnonzero(sig[:-1] & sig[1:])
    first = int(runs[0]) if runs.size else int(np.flatnonzero(sig)[0])
    last = int(np.flatnonzero(sig)[-1])

    # --- switch-out: the largest collapse among the big pulses -------------------------------
    amax = float(areas.max())
    big = np.flatnonzero(areas[:-1] > 0.25 * amax)
    big = big[big >= first]
    seen = False
    dump = last
    if big.size:
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = areas[big + 1] / areas[big]
        j = int(np.argmin(ratio))
        if ratio[j] < COLLAPSE_RATIO:
            dump, seen = int(big[j]), True
    if not seen:
        notes.append("no collapse of the pulse train found: the switch-out is not in the record; "
                     "the last pulse is taken as the observed switch-out")
    last = max(last, min(dump + 1, areas.size - 1))  # show the collapse itself
    sl = slice(first, last + 1)
    slots, times, areas, det = slots[sl], times[sl], areas[sl], det[sl]
    dump -= first
    return PulseTrain(slots=slots, times=times + t0, amplitudes=areas, detected=det,
                      sigma_amplitude=sigma_a, period=period, period_sigma=period_sigma,
                      t_ref=t_ref + t0, baseline=base, noise=noise, polarity=polarity,
                      fwhm=w * dt, dump_index=dump, switch_out_seen=seen, n_timed=int(kk.size),
                      notes=notes)
