"""The seed's spectrum through the build-up: gain narrowing, spectral shift, shortest pulse.

Computed when ``seed.bandwidth`` is given, with :func:`regentime.physics.spectrum.spectral_buildup`
from the planned operating point (stored energy at injection, the same round-trip path).
The gain line is a Gaussian of the library's FWHM (:mod:`regentime.materials.gain_lines`)
centred at the medium's library wavelength; the seed spectrum a Gaussian of ``seed.bandwidth``
FWHM at the cavity wavelength; positive chirp (a grating stretcher: red first).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Optional

import numpy as np

from regentime.materials.gain_lines import gain_line_fwhm
from regentime.physics import spectrum as sp

C = sp.C_LIGHT
_SLICES = 161
_SPAN = 3.0  # input FWHMs either side


@dataclass(frozen=True)
class SpectrumResult:
    input_fwhm_m: float
    output_fwhm_m: float
    output_center_m: float
    transform_limited_fwhm_s: float
    input_transform_limited_fwhm_s: float
    gain_line_fwhm_m: float
    gain_line_center_m: float
    gain_line_source: str
    by_round_trip: tuple  # ((k, fwhm_m, center_m), …) for k = 1 … N
    wavelength_m: np.ndarray  # grid (for plots), decreasing with frequency
    input_spectrum: np.ndarray
    output_spectrum: np.ndarray

    def to_dict(self) -> dict:
        return {
            "input_fwhm_m": self.input_fwhm_m,
            "output_fwhm_m": self.output_fwhm_m,
            "output_center_m": self.output_center_m,
            "transform_limited_fwhm_s": self.transform_limited_fwhm_s,
            "input_transform_limited_fwhm_s": self.input_transform_limited_fwhm_s,
            "gain_line": {"fwhm_m": self.gain_line_fwhm_m, "center_m": self.gain_line_center_m,
                          "shape": "gaussian", "source": self.gain_line_source},
            "by_round_trip": [{"round_trip": k, "fwhm_m": w, "center_m": c}
                              for k, w, c in self.by_round_trip],
        }


def _width_center(nu: np.ndarray, s: np.ndarray) -> tuple[float, float]:
    nu_c = float((nu * s).sum() / s.sum())
    return C * sp.fwhm_of(nu, s) / nu_c ** 2, C / nu_c


def plan_spectrum(cavity, buildup) -> Optional[SpectrumResult]:
    """None without ``seed.bandwidth``; else the spectrum at the switch-out (see module notes)."""
    bw = cavity.seed.bandwidth
    if bw is None or not bw > 0.0:
        return None
    gm, path = buildup.gain, buildup.path
    lam = cavity.wavelength
    nu_s = C / lam
    dnu_in = C * bw / lam ** 2
    line_fwhm, source = gain_line_fwhm(cavity.gain.medium.key)
    lam_g = cavity.gain.medium.wavelength
    nu_g = C / lam_g
    dnu_g = C * line_fwhm / lam_g ** 2
    nu = np.linspace(nu_s - _SPAN * dnu_in, nu_s + _SPAN * dnu_in, _SLICES)
    seed = sp.gaussian_line(nu, nu_s, dnu_in)
    g_start = float(gm.log_gain(gm.stored_fluence(buildup.stored_at_injection)))
    j_sat0 = gm.j_sat * (lam / lam_g)  # J_sat ∝ ν at a fixed peak cross-section
    decay = gm.buildup_decay(path.dt)
    g_eq = float(gm.log_gain(gm.stored_fluence(gm.pump_rate * gm.tau))) if gm.pump_rate else 0.0
    n = buildup.dump_round_trip
    res = sp.spectral_buildup(path.ops, path.out_ops, g_start, 0.0, j_sat0, gm.area,
                              cavity.seed.energy * path.reflection_s, nu, seed, nu_g, dnu_g, n,
                              decay=decay, g_eq=g_eq)
    w_in, _ = _width_center(nu, res.input_spectrum)
    w_out, c_out = _width_center(nu, res.output_spectrum)
    per = tuple((k, *_width_center(nu, res.spectra[k])) for k in range(1, n + 1))
    return SpectrumResult(w_in, w_out, c_out, sp.transform_limited_fwhm(nu, res.output_spectrum),
                          sp.transform_limited_fwhm(nu, res.input_spectrum), line_fwhm, lam_g, source,
                          per, C / nu, res.input_spectrum, res.output_spectrum)
