"""From a :class:`~regentime.model.Cavity` to the numbers the build-up physics needs."""

from __future__ import annotations

from regentime.model import Cavity, GainElement
from regentime.physics.buildup import GainModel, RoundTripPath, path_from_passes
from regentime.physics.gain import (
    continuous_pump_rate,
    pulsed_stored_energy,
    radial_grid,
    saturation_fluence,
    transparency_fluence,
)
from regentime.planning.optics import CavityOptics


def crystal(cavity: Cavity) -> GainElement:
    return cavity.elements_of(GainElement)[0]


def gain_model(cavity: Cavity, pump_scale: float = 1.0) -> GainModel:
    """Gain model of the cavity: J_sat, J_tr, τ, rings, stored energy at injection, pump rate.

    Pulsed pump: the stored energy at injection per docs/definitions.md (decayed over ``lead``), then held
    during the build-up (only extraction lowers it; the design's definition — the decay over a
    build-up of N·T_rt ≪ τ is left out, see docs/physics.md).
    Continuous pump: the start value is the equilibrium Rτ (full storage) and ``pump_rate``
    is R; the steady state across shots is found in :mod:`regentime.planning.steady`.
    ``pump_scale`` multiplies the pump energy or power (used for sensitivities).
    """
    g, p, m = cavity.gain, cavity.pump, cavity.gain.medium
    lam = cavity.wavelength
    j_sat = saturation_fluence(m.emission_cross_section, m.absorption_cross_section, lam)
    xtal = crystal(cavity)
    j_tr = transparency_fluence(j_sat, m.absorption_cross_section, m.doping_density, xtal.length)
    from regentime.planning.mode_plan import gain_mode_radius

    grid = radial_grid(gain_mode_radius(cavity), g.profile, g.pump_radius, g.pump_profile, g.rings)
    tau = m.upper_state_lifetime
    if p.mode == "pulsed":
        stored = pulsed_stored_energy(p.energy * pump_scale, p.absorbed_fraction, p.overlap,
                                      p.wavelength, lam, p.lead, tau, p.duration)
        rate = 0.0
    else:
        rate = continuous_pump_rate(p.power * pump_scale, p.absorbed_fraction, p.overlap, p.wavelength, lam)
        stored = rate * tau
    return GainModel(j_sat=j_sat, j_tr=j_tr, tau=tau, grid=grid, stored_energy=float(stored),
                     pump_rate=float(rate), n2=m.n2, length=xtal.length, wavelength=lam,
                     pulse_duration=cavity.seed.duration, relax_in_buildup=p.mode == "continuous")


def round_trip_path(cavity: Cavity, optics: CavityOptics, switching_efficiency: float = 1.0) -> RoundTripPath:
    return path_from_passes(optics.passes, optics.polarizer.reflection_s, optics.round_trip_time,
                            switching_efficiency)
