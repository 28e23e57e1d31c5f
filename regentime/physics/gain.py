"""Gain-medium storage: saturation fluence, pump storage, recovery, radial profiles.

Definitions follow docs/definitions.md ("Gain").  References: W. Koechner, Solid-State Laser
Engineering, 6th ed. (Springer 2006), ch. 3–4; A. E. Siegman, Lasers (1986), ch. 10
(stored energy, saturation fluence, quasi-three-level media).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

H_PLANCK = 6.62607015e-34  # J s (exact, SI 2019; equals scipy.constants.h)
C_LIGHT = 299_792_458.0  # m/s (exact)


def saturation_fluence(sigma_e: float, sigma_a: float, wavelength: float) -> float:
    """Saturation fluence J_sat = h ν / (σ_e + σ_a), J/m².

    σ_e, σ_a: emission and absorption cross-sections at the laser wavelength, m²;
    wavelength λ in m (ν = c/λ).  Valid for any σ_e + σ_a > 0.  Reference: Koechner ch. 4;
    for quasi-three-level media the sum of the cross-sections (docs/references.md, Frantz–Nodvik).
    """
    return H_PLANCK * C_LIGHT / wavelength / (sigma_e + sigma_a)


def transparency_fluence(j_sat: float, sigma_a: float, doping_density: float, length: float) -> float:
    """Stored fluence J_tr at which the single-pass gain is zero, J/m².

    With N_t ions per m³ over the crystal length L (m) and the stored excitation counted in
    laser photons, g = σ_e N₂L − σ_a N₁L = J_st/J_sat − σ_a N_t L, so
    J_tr = J_sat σ_a N_t L.  Zero for four-level media (σ_a = 0).  Reference: Koechner ch. 3
    (quasi-three-level gain); pump bleaching is not modelled (docs/physics.md).
    """
    return j_sat * sigma_a * doping_density * length


def pulsed_stored_energy(pump_energy: float, absorbed_fraction: float, overlap: float,
                         pump_wavelength: float, wavelength: float, lead: float, tau: float,
                         duration: float = 0.0) -> float:
    """Stored energy at seed injection for a pulsed pump, J (in laser photons).

    A rectangular pump pulse of length T_p fills the upper state at the rate
    R = E_pump · η_abs · η_overlap · (λ_pump/λ) / T_p while it decays with τ
    (dE/dt = R − E/τ, E(0) = 0), so at the pump's end E = R τ (1 − e^{−T_p/τ}); then it decays
    over ``lead`` (pump end to seed):  E_st = R τ (1 − e^{−T_p/τ}) · e^{−lead/τ}.
    T_p → 0 gives E_pump · η_abs · η_overlap · (λ_pump/λ) · e^{−lead/τ}.

    E_pump in J, wavelengths in m, lead, duration T_p and upper-state lifetime τ in s
    (T_p ≥ 0, lead ≥ 0).  No pump bleaching or ground-state depletion.
    Reference: the rate equation of a four-level medium, Koechner, Solid-State Laser
    Engineering, ch. 3 (quantum defect λ_p/λ, storage efficiency of a pump pulse).
    """
    e0 = pump_energy * absorbed_fraction * overlap * (pump_wavelength / wavelength)
    x = duration / tau
    storage = 1.0 if x == 0 else float(-np.expm1(-x) / x)
    return e0 * storage * np.exp(-lead / tau)


def continuous_pump_rate(power: float, absorbed_fraction: float, overlap: float,
                         pump_wavelength: float, wavelength: float) -> float:
    """Stored-energy rate R = P · η_abs · η_overlap · (λ_pump/λ), W (in laser photons)."""
    return power * absorbed_fraction * overlap * (pump_wavelength / wavelength)


def relax(stored, equilibrium, dt, tau):
    """Stored energy (or fluence) after a time dt with pumping and spontaneous decay.

    E(t+Δ) = Rτ + (E(t) − Rτ) e^{−Δ/τ};   ``equilibrium`` is Rτ (0 for a pulsed pump).
    Any units, as long as ``stored`` and ``equilibrium`` agree; dt, tau in s.
    """
    return equilibrium + (stored - equilibrium) * np.exp(-np.asarray(dt) / tau)


@dataclass(frozen=True)
class RadialGrid:
    """Equal-area rings across the beam.

    ``area[i]`` (m²) of ring i; ``mode[i]`` the pulse fluence per joule of pulse energy
    (1/m², Σ mode·area = 1); ``pump[i]`` the stored fluence per joule stored (Σ pump·area = 1);
    ``peak_factor`` = on-axis fluence · (π w²) / E = 2 for both profiles: the beam is the
    cavity's TEM00 mode of 1/e² radius w, whose on-axis fluence is 2E/(πw²) (Siegman, Lasers,
    ch. 17); ``flat-top`` only models the extraction with the mean fluence E/(πw²).
    """

    area: np.ndarray
    mode: np.ndarray
    pump: np.ndarray
    mode_radius: float
    peak_factor: float

    @property
    def rings(self) -> int:
        return int(self.area.size)


def radial_grid(mode_radius: float, profile: str = "flat-top", pump_radius: float | None = None,
                pump_profile: str = "gaussian", rings: int = 64) -> RadialGrid:
    """Rings for the extraction.  Flat-top: one ring of area π w² (mean fluence E/(πw²) for
    the gain; the damage and intensity use the on-axis 2E/(πw²), ``peak_factor``).

    Gaussian mode: F(r) = (2E/πw²) exp(−2r²/w²) sampled at the centres (in r²) of ``rings``
    equal-area rings out to r_max = 2·max(w, w_p) (0.03 % of the energy beyond, renormalised);
    pump stored fluence Gaussian of 1/e² radius w_p, or flat-top of radius w_p.
    Reference: Siegman, Lasers, ch. 17 (Gaussian beams); the ring-by-ring application of
    Frantz–Nodvik is standard (e.g. Koechner ch. 4).
    """
    w = float(mode_radius)
    if profile == "flat-top":
        area = np.array([np.pi * w * w])
        return RadialGrid(area, 1.0 / area, 1.0 / area, w, 2.0)
    wp = float(pump_radius if pump_radius is not None else w)
    r_max = 2.0 * max(w, wp)
    u_edges = np.linspace(0.0, r_max * r_max, rings + 1)
    area = np.pi * np.diff(u_edges)
    u = 0.5 * (u_edges[1:] + u_edges[:-1])
    mode = np.exp(-2.0 * u / (w * w))
    mode /= (mode * area).sum()
    if pump_profile == "flat-top":
        # fraction of each ring inside the pump radius
        inside = np.clip((wp * wp - u_edges[:-1]) / np.diff(u_edges), 0.0, 1.0)
        pump = inside.astype(float)
    else:
        pump = np.exp(-2.0 * u / (wp * wp))
    pump = pump / (pump * area).sum()
    return RadialGrid(area, mode, pump, w, 2.0)
