"""Spectrally resolved build-up of a linearly chirped pulse: gain narrowing and spectral shift.

Model (time-resolved Frantz–Nodvik with the instantaneous frequency; the treatments of
C. Le Blanc, P. Curley & F. Salin, Opt. Commun. 131, 391 (1996) and C. P. J. Barty et al.,
Opt. Lett. 21, 219 (1996)): the stretched pulse is linearly chirped, so its spectral
slice at frequency ν crosses the crystal at its own time.  Each crossing takes the slices
in time order (positive chirp: low frequencies first) and applies to slice i, of fluence
F_i, the Frantz–Nodvik law at its own saturation fluence J_s(ν) = hν/σ(ν)

    F_i,out = J_s ln(1 + e^{g(ν_i)} (e^{F_i/J_s} − 1)),   g(ν) = g₀ · ℓ(ν),

then lowers the shared inversion by the photons it took:  g₀ ← g₀ − (F_i,out − F_i)/J_s,0
(J_s,0 the line-centre saturation fluence; homogeneous broadening: one inversion for every
frequency).  ℓ(ν) = σ(ν)/σ₀ is the normalised gain line; here a Gaussian in frequency of
FWHM Δν_g centred at ν_g (an approximation for the structured Yb lines).  For a
monochromatic pulse (one slice, ℓ = 1) this is the ordinary Frantz–Nodvik crossing
(J. Appl. Phys. 34, 2346 (1963)), because Frantz–Nodvik composes over successive parts of a
pulse.  Mean (flat-top) fluence over the mode area; transverse structure ignored.

Valid for: homogeneous broadening, a linear chirp with the stretched duration ≫ the
transform limit (each frequency at one time), slices short against τ, T_rt ≫ pulse.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

FWHM_GAUSS_TBP = 2.0 * math.log(2.0) / math.pi  # 0.4413: Δν·Δt of a transform-limited Gaussian
C_LIGHT = 299_792_458.0


def gaussian_line(nu, center: float, fwhm: float) -> np.ndarray:
    """exp(−4 ln2 (ν − ν_c)²/Δν²): unit-peak Gaussian of FWHM Δν (Hz)."""
    return np.exp(-4.0 * math.log(2.0) * ((np.asarray(nu, dtype=float) - center) / fwhm) ** 2)


def fwhm_of(x: np.ndarray, y: np.ndarray) -> float:
    """Full width at half maximum of samples y(x) (x increasing), linear interpolation."""
    y = np.asarray(y, dtype=float)
    i = int(np.argmax(y))
    half = 0.5 * y[i]
    above = np.flatnonzero(y >= half)
    lo, hi = above[0], above[-1]
    def cross(a, b):
        if a == b or y[a] == y[b]:
            return x[a]
        return x[a] + (half - y[a]) * (x[b] - x[a]) / (y[b] - y[a])
    left = cross(lo - 1, lo) if lo > 0 else x[0]
    right = cross(hi, hi + 1) if hi < y.size - 1 else x[-1]
    return float(right - left)


def transform_limited_fwhm(nu: np.ndarray, spectrum: np.ndarray, pad: int = 16) -> float:
    """FWHM (s) of |E(t)|² for a flat spectral phase and power spectrum S(ν) on a uniform ν
    grid: E(t) = FFT of √S (zero-padded ``pad``×).  A Gaussian gives 0.441/Δν_FWHM."""
    dnu = float(nu[1] - nu[0])
    n = nu.size * pad
    field = np.fft.fftshift(np.fft.ifft(np.sqrt(np.maximum(spectrum, 0.0)), n))
    t = (np.arange(n) - n // 2) / (n * dnu)
    return fwhm_of(t, np.abs(field) ** 2)


def chirped_gain_pass(fluence: np.ndarray, g0: float, shape: np.ndarray, j_sat0: float,
                      nu: np.ndarray, nu0: float, order: np.ndarray) -> tuple[np.ndarray, float]:
    """One crossing of the crystal by the slices ``fluence`` (J/m² per slice) taken in
    ``order`` (time order).  g0: line-centre log gain; shape: ℓ(ν) per slice; j_sat0 at ν0.
    Returns (fluence out, g0 after).  See the module notes."""
    out = fluence.copy()
    for i in order:
        f_in = float(fluence[i])
        ell = float(shape[i])
        if f_in <= 0.0 or ell <= 0.0:
            continue
        js = j_sat0 * (nu[i] / nu0) / ell  # hν/σ(ν)
        g = g0 * ell
        x = f_in / js
        f_out = js * math.log1p(math.exp(g) * math.expm1(x)) if x < 700 and g < 700 else f_in + g * js
        out[i] = f_out
        g0 -= (f_out - f_in) / j_sat0 * (nu0 / nu[i])  # photons taken: ΔF/(hν) · σ₀ ... per area
    return out, g0


@dataclass(frozen=True)
class SpectralBuildup:
    nu: np.ndarray  # Hz grid
    input_spectrum: np.ndarray  # J/m² per slice at injection
    spectra: np.ndarray  # [k, slice] after k round trips (k = 0 … n)
    output_spectrum: np.ndarray  # at the switch-out after round trip n (out_ops applied)
    energy: np.ndarray  # J per round trip (mean fluence × area)


def spectral_buildup(ops, out_ops, g0_start: float, j_tr_g: float, j_sat0: float, area: float,
                     seed_energy: float, nu: np.ndarray, seed_shape: np.ndarray,
                     line_center: float, line_fwhm: float, n: int, decay: float = 1.0,
                     g_eq: float = 0.0, positive_chirp: bool = True) -> SpectralBuildup:
    """Build-up over ``n`` round trips on the frequency grid ``nu`` (Hz, uniform).

    ops/out_ops: the round trip and the output's cell-arm double pass as transmissions and
    "gain" (as :class:`regentime.physics.buildup.RoundTripPath`); g0_start: line-centre
    single-pass log gain at injection; j_tr_g: unused reserve (0); j_sat0: J/m² at the line
    centre; area: m²; seed_energy: J entering the first round trip; seed_shape: relative
    spectral energy per slice; decay/g_eq: per round trip, g0 ← g_eq + (g0 − g_eq)·decay
    (continuous pump; 1 and 0 for a pulsed pump).  Returns a :class:`SpectralBuildup`.
    """
    nu = np.asarray(nu, dtype=float)
    shape = gaussian_line(nu, line_center, line_fwhm)
    order = np.argsort(nu) if positive_chirp else np.argsort(-nu)
    s = np.asarray(seed_shape, dtype=float)
    f = seed_energy / area * s / s.sum()
    spectra = np.empty((n + 1, nu.size))
    spectra[0] = f
    energy = np.empty(n + 1)
    energy[0] = f.sum() * area
    g0 = g0_start
    nu0 = line_center

    def run(ops_, f_, g_):
        for op in ops_:
            if op == "gain":
                f_, g_ = chirped_gain_pass(f_, g_, shape, j_sat0, nu, nu0, order)
            else:
                f_ = f_ * op
        return f_, g_

    for k in range(1, n + 1):
        f, g0 = run(ops, f, g0)
        g0 = g_eq + (g0 - g_eq) * decay
        spectra[k] = f
        energy[k] = f.sum() * area
    f_out, _ = run(out_ops, f, g0)
    return SpectralBuildup(nu, spectra[0], spectra, f_out, energy)
