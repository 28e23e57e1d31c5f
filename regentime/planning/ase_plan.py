"""Amplified spontaneous emission that leaves with the pulse (the noise model of self-lasing).

During the gate the cavity mode collects E_n = n_sp hν Δν_g T_rt per round trip
(:mod:`regentime.physics.noise`), spread over the whole round trip (a ns pedestal), and
amplifies it with the same saturated round-trip gains as the seeded pulse (G_k = E_k/E_{k−1}
of the planned build-up: the ASE is far too weak to change the gain).  It leaves with the
pulse through the same output pass.

* ``energy_J``: the ASE energy in the output; ``ratio``: output pulse energy / ASE energy.
* ``pedestal_ratio``: the stretched pulse's peak power over the mean ASE power across the
  round trip it leaves in, (E_out/(1.0645 τ)) / (E_ase/T_rt).
* ``seed_energy_for_ratio``: the seed energy for a pulse/ASE energy ratio of 10⁶, from the
  proportionality ratio ∝ seed (small-signal; saturation makes it approximate).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from regentime.materials.gain_lines import gain_line_fwhm
from regentime.physics import noise
from regentime.physics.buildup import SQRT_PI_LN2

TARGET_RATIO = 1e6  # pulse/ASE energy ratio asked for (common practice for a clean ns contrast)


@dataclass(frozen=True)
class AseResult:
    energy_J: float
    ratio: float
    pedestal_ratio: float
    seed_energy_for_ratio_J: float
    noise_energy_per_round_trip_J: float

    def to_dict(self) -> dict:
        return {"energy_J": self.energy_J, "ratio": self.ratio, "pedestal_ratio": self.pedestal_ratio,
                "seed_energy_for_ratio": {"ratio": TARGET_RATIO, "seed_energy_J": self.seed_energy_for_ratio_J},
                "noise_energy_per_round_trip_J": self.noise_energy_per_round_trip_J}


def plan_ase(cavity, buildup) -> AseResult:
    from regentime.planning.self_lasing import _n_sp

    gm = buildup.gain
    n = buildup.dump_round_trip
    e = np.asarray(buildup.result.energy, dtype=float)
    gains = e[1:n + 1] / e[:n]
    fwhm, _ = gain_line_fwhm(cavity.gain.medium.key)
    n_sp = _n_sp(cavity, gm, float(buildup.stored_at_injection))
    t_rt = buildup.path.dt
    e_n = noise.noise_energy_per_round_trip(cavity.wavelength, noise.linewidth_hz(cavity.wavelength, fwhm),
                                            t_rt, n_sp if np.isfinite(n_sp) else 1.0)
    e_out = buildup.output_energy
    out_share = e_out / e[n] if e[n] > 0 else 0.0
    ase = noise.amplified_noise(e_n, gains) * out_share
    ratio = e_out / ase if ase > 0 else float("inf")
    pedestal = (e_out / (SQRT_PI_LN2 * cavity.seed.duration)) / (ase / t_rt) if ase > 0 else float("inf")
    seed_min = cavity.seed.energy * TARGET_RATIO / ratio if np.isfinite(ratio) and ratio > 0 else 0.0
    return AseResult(float(ase), float(ratio), float(pedestal), float(seed_min), float(e_n))
