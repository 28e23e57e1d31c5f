"""Self-lasing: does the closed cavity build up a pulse from spontaneous emission by itself?

Definitions (docs/physics.md, "Self-lasing"):

* ``closed_state``: the cell states (``off`` = no voltage, ``on`` = the trapping voltage) in
  which P light returning from the cell arm stays P and so keeps circulating — from the
  Jones model of the cell arm (:func:`regentime.physics.jones.cell_arm_mueller`).  Half-wave
  scheme: both; quarter-wave scheme: only the trapping state.
* noise input per round trip E_n = n_sp hν Δν_g T_rt (:mod:`regentime.physics.noise`).
* ``noise_round_trips``: round trips for that noise, amplified by the closed cavity's
  small-signal round-trip gain, to reach 1 % of the energy stored in the mode (common
  practice for "it lases").  Continuous pump: the gain when the cavity closes after a shot,
  recovering towards Rτ; pulsed pump: the gain at injection held (an upper bound for the
  lead before injection).
* ``closed_round_trips``: the round trips the cavity is closed, holds gain and has no seed in
  normal operation; ``unseeded_round_trips``: the same when the seed is missing (the gate
  added, and no shot has extracted the gain).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from regentime.materials.gain_lines import gain_line_fwhm
from regentime.physics import jones
from regentime.physics import noise
from regentime.planning import cell_model
from regentime.planning.checks import Check, scaled_damage_fluence

THRESHOLD_SHARE = 0.01  # of the stored energy: "it lases" (common practice)
_KEEP_CLOSED = 0.5  # a state keeps P light when at least half returns in P
_MAX_HORIZON = 2_000_000  # round trips followed at most


@dataclass(frozen=True)
class SelfLasing:
    closed_state: str  # "on" | "off" | "both" | "none"
    noise_round_trips: Optional[int]  # normal operation (None: the noise never reaches 1 %)
    unseeded_noise_round_trips: Optional[int]  # with the seed missing
    closed_round_trips: int
    unseeded_round_trips: int
    lases: bool
    lases_without_seed: bool
    noise_energy_J: float  # per round trip
    n_sp: float
    gain_line_fwhm_m: float
    gain_line_source: str
    round_trip_gain_closed: float  # net small-signal round-trip gain when the cavity closes
    q_switch_fluence_J_m2: float  # on-axis, stored energy over the mode (seed missing)
    q_switch_damage_J_m2: float
    checks: list = field(default_factory=list)

    def to_dict(self) -> dict:
        return {
            "closed_state": self.closed_state,
            "noise_round_trips": self.noise_round_trips,
            "closed_round_trips": self.closed_round_trips,
            "unseeded_round_trips": self.unseeded_round_trips,
            "lases": self.lases,
            "lases_without_seed": self.lases_without_seed,
            "unseeded_noise_round_trips": self.unseeded_noise_round_trips,
            "noise_energy_J": self.noise_energy_J,
            "n_sp": None if math.isinf(self.n_sp) else self.n_sp,
            "gain_line_fwhm_m": self.gain_line_fwhm_m,
            "round_trip_gain_closed": self.round_trip_gain_closed,
            "q_switch_fluence_J_m2": self.q_switch_fluence_J_m2,
            "q_switch_damage_J_m2": self.q_switch_damage_J_m2,
        }


def closed_states(cavity, optics) -> tuple[bool, bool, float, float]:
    """(off closed, on closed, P share kept per cell-arm double pass off, on): Jones model."""
    g_on = cell_model.full_retardance(cavity, optics.cell)
    keep = []
    for g in (0.0, g_on):
        m = jones.cell_arm_mueller(optics.cell_arm, g, g, optics.cell.contrast)
        keep.append(float(jones.p_share(m @ jones.STOKES_P)))
    return keep[0] >= _KEEP_CLOSED, keep[1] >= _KEEP_CLOSED, keep[0], keep[1]


def _state_name(off: bool, on: bool) -> str:
    return {(True, True): "both", (True, False): "off", (False, True): "on"}.get((off, on), "none")


def _round_trip_log_gain(gm, path, stored, keep: float) -> np.ndarray:
    """ln G per round trip: gain passes × small-signal log gain + ln(passive T × P kept)."""
    g = gm.log_gain(gm.stored_fluence(np.asarray(stored, dtype=float)))
    return path.gain_passes * g + math.log(max(path.passive_transmission * keep, 1e-300))


def _n_sp(cavity, gm, stored: float) -> float:
    m = cavity.gain.medium
    if m.absorption_cross_section <= 0.0:
        return 1.0
    length = gm.length
    if not length > 0.0:
        return 1.0
    n_upper = stored / gm.area / (noise.photon_energy(cavity.wavelength) * length)
    return noise.inversion_factor(m.emission_cross_section, m.absorption_cross_section,
                                  n_upper, m.doping_density)


def _first(gm, path, e_n, stored, keep) -> Optional[int]:
    lg = _round_trip_log_gain(gm, path, stored, keep)
    return noise.noise_buildup_round_trips(e_n, lg, THRESHOLD_SHARE * np.asarray(stored))


def plan_self_lasing(cavity, optics, buildup) -> SelfLasing:
    """The self-lasing verdict of the planned cavity (see the module notes)."""
    gm, path = buildup.gain, buildup.path
    t_rt = optics.round_trip_time
    n = buildup.dump_round_trip
    off, on, keep_off, keep_on = closed_states(cavity, optics)
    state = _state_name(off, on)
    fwhm, source = gain_line_fwhm(cavity.gain.medium.key)
    dnu = noise.linewidth_hz(cavity.wavelength, fwhm)
    keep = keep_off if off else keep_on
    continuous = cavity.pump.mode == "continuous"
    if continuous:
        per_shot = max(int(math.floor(1.0 / cavity.repetition_rate / t_rt)), n)
        x_full = gm.pump_rate * gm.tau  # no shot extracts it when the seed is missing
        closed = per_shot - n if off else 0
        unseeded = per_shot if off else n
        horizon = int(min(max(4 * per_shot, 10_000), _MAX_HORIZON))
        k = np.arange(1, horizon + 1)
        x0 = float(buildup.result.stored[min(n, buildup.result.stored.size - 1)])  # after the build-up
        normal = x_full + (x0 - x_full) * np.exp(-k * t_rt / gm.tau)
        full = np.full(horizon, x_full)
    else:
        lead = cavity.pump.lead
        closed = int(math.floor(lead / t_rt)) if off else 0
        unseeded = closed + n
        horizon = int(min(max(4 * unseeded, 10_000), _MAX_HORIZON))
        x_full = float(buildup.stored_at_injection)  # held: an upper bound over the lead
        full = np.full(horizon, x_full)
        normal = full
    n_sp = _n_sp(cavity, gm, float(normal[0]))
    e_n = (noise.noise_energy_per_round_trip(cavity.wavelength, dnu, t_rt, n_sp)
           if math.isfinite(n_sp) else 0.0)
    n_sp_full = _n_sp(cavity, gm, x_full)
    e_n_full = (noise.noise_energy_per_round_trip(cavity.wavelength, dnu, t_rt, n_sp_full)
                if math.isfinite(n_sp_full) else 0.0)
    if state == "none":
        rt_normal = rt_unseeded = None
    else:
        rt_normal = _first(gm, path, e_n, normal, keep) if off else _first(gm, path, e_n_full, full, keep)
        rt_unseeded = _first(gm, path, e_n_full, full, keep)
    lases = rt_normal is not None and closed > 0 and rt_normal <= closed
    without = rt_unseeded is not None and unseeded > 0 and rt_unseeded <= unseeded
    g_close = float(np.exp(_round_trip_log_gain(gm, path, normal[0], keep)))
    medium = cavity.gain.medium
    f_q = gm.grid.peak_factor * x_full / gm.area
    f_dmg = float(scaled_damage_fluence(medium.damage_fluence, medium.damage_duration, t_rt))
    result = SelfLasing(state, rt_normal, rt_unseeded, int(closed), int(unseeded), bool(lases),
                        bool(without), float(e_n), float(n_sp), fwhm, source, g_close, float(f_q), f_dmg)
    return _with_checks(result, cavity, t_rt)


def _with_checks(r: SelfLasing, cavity, t_rt: float) -> SelfLasing:
    out: list[Check] = []
    noise_txt = (f"spontaneous emission ({r.noise_energy_J:.2g} J per round trip, gain line "
                 f"{r.gain_line_fwhm_m * 1e9:.3g} nm) reaches 1 % of the stored energy in "
                 f"{r.noise_round_trips} round trips")
    advice = ("interlock the switch on a seed monitor (no seed pulse: no gate) and check for "
              "pre-lasing with a photodiode at low pump power")
    if r.lases:
        out.append(Check("error", "self_lasing",
                         f"the cavity lases by itself: closed with the cell "
                         f"{'off and on' if r.closed_state == 'both' else r.closed_state}, it holds gain "
                         f"for {r.closed_round_trips} round trips between seed pulses and {noise_txt} "
                         f"(net round-trip gain {r.round_trip_gain_closed:.3g} when it closes); the "
                         "plan's steady state is not what this regen does — use the quarter-wave "
                         "scheme (cell off: cavity open), a pulsed pump or a lower pump"))
    elif r.lases_without_seed:
        fluence = (f"the Q-switched pulse (≈ the stored energy, on-axis {r.q_switch_fluence_J_m2 / 1e4:.3g} "
                   f"J/cm²) against damage {r.q_switch_damage_J_m2 / 1e4:.3g} J/cm² at "
                   f"{t_rt * 1e9:.3g} ns")
        over = r.q_switch_fluence_J_m2 > r.q_switch_damage_J_m2
        out.append(Check("error" if over else "warning", "self_lasing",
                         f"without a seed pulse the cavity Q-switches: spontaneous emission reaches 1 % "
                         f"of the stored energy in {r.unseeded_noise_round_trips} round trips, within "
                         f"the {r.unseeded_round_trips} it is closed; {fluence}"
                         f"{' — ABOVE damage' if over else ''}; {advice}"))
    else:
        rt = r.unseeded_noise_round_trips
        out.append(Check("info", "self_lasing",
                         f"closed state: {r.closed_state}; no self-lasing: spontaneous emission needs "
                         f"{'more than the round trips followed' if rt is None else f'{rt} round trips'} "
                         f"to reach 1 % of the stored energy, the cavity is closed without a seed for "
                         f"{r.unseeded_round_trips}"))
    return SelfLasing(**{**r.__dict__, "checks": out})
