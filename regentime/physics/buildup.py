"""Round-trip-by-round-trip energy build-up with gain saturation (vectorised).

Model (docs/definitions.md "Build-up energies", "Gain"):  the pulse energy E_k is taken just past the
polarizer, entering the cell arm, after k complete round trips (E_0 = seed energy · R_s).
Each round trip applies, in path order, the single-pass transmission of every crossing and
Frantz–Nodvik at every crossing of the gain crystal (ring by ring for a Gaussian mode, with
the mode's shape re-imposed at each crossing: the cavity's TEM00 mode).  After each round
trip the stored energy relaxes for Δ = T_rt (pumping at the continuous rate R, spontaneous
decay with τ):  E_st ← Rτ + (E_st − Rτ) e^{−Δ/τ}  (R = 0 for a pulsed pump).

The pulse switched out after round trip N makes one more cell-arm double pass (with gain if
the crystal is in that arm) and leaves by reflection at the polarizer:
E_out(N) = E_N · T_cell-arm · R_s · η_switch.

All arrays carry a leading batch shape so that grids of (pump, seed) points run at once.
References: Frantz & Nodvik, J. Appl. Phys. 34, 2346 (1963); Koechner, Solid-State Laser
Engineering, ch. 4; Siegman, Lasers, ch. 10.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from regentime.physics.frantz_nodvik import frantz_nodvik
from regentime.physics.gain import RadialGrid

SQRT_PI_LN2 = 1.0644670194312262  # ∫ Gaussian / peak for a FWHM of 1: sqrt(π / (4 ln 2))


@dataclass(frozen=True)
class GainModel:
    """Everything the build-up needs about the gain, in SI units.

    j_sat: saturation fluence J/m²; j_tr: transparency fluence J/m² (0 for four-level);
    tau: upper-state lifetime s; grid: radial rings (see :func:`regentime.physics.gain.radial_grid`);
    stored_energy: energy stored in the mode at injection, J (laser photons; for a continuous
    pump the start value, normally the equilibrium Rτ); pump_rate: R, W (0 for pulsed);
    n2: nonlinear index m²/W; length: crystal length m; wavelength: m;
    pulse_duration: FWHM of the stretched pulse, s.
    """

    j_sat: float
    j_tr: float
    tau: float
    grid: RadialGrid
    stored_energy: float
    pump_rate: float = 0.0
    n2: float = 0.0
    length: float = 0.0
    wavelength: float = 800e-9
    pulse_duration: float = 100e-12
    relax_in_buildup: bool = True  # continuous pump: recover over each T_rt (docs/definitions.md); pulsed: no

    def buildup_decay(self, dt: float) -> float:
        """Factor e^{−Δ/τ} applied to (E_st − Rτ) after each round trip of the build-up (1 when
        the stored energy is held constant during the build-up, as the design defines it for a
        pulsed pump)."""
        return float(np.exp(-dt / self.tau)) if self.relax_in_buildup else 1.0

    @property
    def area(self) -> float:
        """π w², the mode area used for flat-top fluences (m²)."""
        return float(np.pi * self.grid.mode_radius ** 2)

    def stored_fluence(self, stored_energy):
        """Stored fluence per ring (…, R) for a stored energy (…) distributed like the pump."""
        return np.asarray(stored_energy, dtype=float)[..., None] * self.grid.pump

    def log_gain(self, j_st):
        """Mode-weighted single-pass log gain g = Σ (J_st − J_tr)/J_sat · mode · area."""
        g = (j_st - self.j_tr) / self.j_sat
        return (g * (self.grid.mode * self.grid.area)).sum(-1)

    def stored_in(self, j_st):
        """Stored energy (J) from the ring fluences."""
        return (j_st * self.grid.area).sum(-1)


@dataclass(frozen=True)
class RoundTripPath:
    """The round trip reduced to what the energy needs: merged loss factors and gain passes.

    ``ops``: tuple of floats (a transmission factor) and the string "gain" (one crossing of
    the crystal), in path order; ``out_ops``: the same for the output's cell-arm double pass;
    ``reflection_s``: polarizer reflection used at injection and output; ``dt``: T_rt.
    """

    ops: tuple
    out_ops: tuple
    reflection_s: float
    dt: float
    switching_efficiency: float = 1.0

    @property
    def gain_passes(self) -> int:
        return sum(1 for op in self.ops if op == "gain")

    @property
    def passive_transmission(self) -> float:
        t = 1.0
        for op in self.ops:
            if op != "gain":
                t *= op
        return t


def path_from_passes(passes, reflection_s: float, round_trip_time: float,
                     switching_efficiency: float = 1.0) -> RoundTripPath:
    """Build a :class:`RoundTripPath` from :class:`regentime.planning.optics.Pass` objects."""

    def reduce(seq):
        ops: list = []
        for p in seq:
            if p.gain:
                if p.transmission != 1.0:
                    _push(ops, p.transmission ** 0.5)
                ops.append("gain")
                if p.transmission != 1.0:
                    _push(ops, p.transmission ** 0.5)
            else:
                _push(ops, p.transmission)
        return tuple(ops)

    return RoundTripPath(reduce(passes), reduce([p for p in passes if p.arm == "cell"]),
                         reflection_s, round_trip_time, switching_efficiency)


def _push(ops: list, factor: float) -> None:
    if factor == 1.0:
        return
    if ops and ops[-1] != "gain":
        ops[-1] *= factor
    else:
        ops.append(factor)


@dataclass
class BuildupResult:
    """Arrays indexed [k, *batch] for k = 0 … n round trips.

    energy: E_k (J); output: E_out if switched out after round trip k (J, NaN at k = 0);
    log_gain: mode-weighted single-pass log gain at the reference point after k round trips;
    stored: stored energy (J); peak_fluence: largest peak fluence in the crystal during round
    trip k (J/m², output pass included); b_integral: B accumulated up to and including the
    output after round trip k (rad).
    """

    energy: np.ndarray
    output: np.ndarray
    log_gain: np.ndarray
    stored: np.ndarray
    peak_fluence: np.ndarray
    b_integral: np.ndarray
    final_stored_fluence: np.ndarray = field(repr=False)  # (…, R) after the last round trip

    @property
    def round_trips(self) -> np.ndarray:
        return np.arange(self.energy.shape[0])


def b_integral_increment(n2, intensity, length, wavelength):
    """B-integral of one crossing, rad: B = (2π/λ) n2 I L.

    n2 in m²/W, peak intensity I in W/m², crystal length L and wavelength λ in m.  Valid for a
    collimated beam whose intensity is constant along the crystal (use the mean of the input and
    output intensity of an amplifying pass).  Reference: e.g. S. Backus et al., Rev. Sci.
    Instrum. 69, 1207 (1998); A. E. Siegman, Lasers.
    """
    return 2.0 * np.pi / wavelength * n2 * intensity * length


def peak_intensity(peak_fluence, fwhm):
    """Peak intensity of a Gaussian pulse, W/m²: I = F / (τ_FWHM · √(π/(4 ln 2)))."""
    return peak_fluence / (SQRT_PI_LN2 * fwhm)


def _gain_pass(energy, j_st, gm: GainModel):
    if gm.grid.rings == 1:  # flat-top: no ring axis work (the hot path of large grids)
        m, a = gm.grid.mode[0], gm.grid.area[0]
        f_in = energy * m
        f_out, g_after = frantz_nodvik(f_in, (j_st[..., 0] - gm.j_tr) / gm.j_sat, gm.j_sat)
        return f_out * a, (gm.j_tr + g_after * gm.j_sat)[..., None]
    f_in = energy[..., None] * gm.grid.mode
    g = (j_st - gm.j_tr) / gm.j_sat
    f_out, g_after = frantz_nodvik(f_in, g, gm.j_sat)
    j_new = gm.j_tr + g_after * gm.j_sat
    e_out = (f_out * gm.grid.area).sum(-1)
    return e_out, j_new


def apply_ops(ops, energy, j_st, gm: GainModel, track: bool = False):
    """Apply ops; returns energy, stored fluence, largest peak fluence and B added."""
    peak = np.zeros_like(energy) if track else None
    b_add = np.zeros_like(energy) if track else None
    k_peak = gm.grid.peak_factor / gm.area
    # B per crossing with the mean of the input and output peak fluence
    b_coeff = b_integral_increment(gm.n2, peak_intensity(1.0, gm.pulse_duration), gm.length, gm.wavelength)
    for op in ops:
        if op == "gain":
            e_in = energy
            energy, j_st = _gain_pass(energy, j_st, gm)
            if track:
                peak = np.maximum(peak, energy * k_peak)
                b_add = b_add + b_coeff * 0.5 * (e_in + energy) * k_peak
        else:
            energy = energy * op
    return energy, j_st, peak, b_add


def simulate_buildup(gm: GainModel, path: RoundTripPath, seed_energy, stored_energy, n_round_trips: int,
                     track: bool = True, stored_fluence=None) -> BuildupResult:
    """Run the build-up for ``n_round_trips`` round trips from injection.

    seed_energy: seed pulse energy at the polarizer (J), any batch shape; stored_energy: the
    stored energy in the mode at injection (J), broadcast with it.  Returns a
    :class:`BuildupResult`.  Valid while the pulse is much shorter than T_rt and τ.
    """
    seed_energy = np.asarray(seed_energy, dtype=float)
    stored_energy = np.asarray(stored_energy, dtype=float)
    shape = np.broadcast_shapes(seed_energy.shape, stored_energy.shape)
    energy = np.broadcast_to(seed_energy * path.reflection_s, shape).astype(float)
    j_st = gm.stored_fluence(np.broadcast_to(stored_energy, shape))
    if stored_fluence is not None:  # a given radial profile (e.g. a ring-model steady state)
        j_st = np.broadcast_to(np.asarray(stored_fluence, dtype=float), j_st.shape).copy()
    j_eq = gm.stored_fluence(gm.pump_rate * gm.tau) if np.any(gm.pump_rate) else 0.0
    decay = gm.buildup_decay(path.dt)
    n = int(n_round_trips)
    e_hist = np.empty((n + 1,) + shape)
    out_hist = np.full((n + 1,) + shape, np.nan)
    g_hist = np.empty((n + 1,) + shape)
    s_hist = np.empty((n + 1,) + shape)
    p_hist = np.zeros((n + 1,) + shape)
    b_hist = np.zeros((n + 1,) + shape)
    e_hist[0], g_hist[0], s_hist[0] = energy, gm.log_gain(j_st), gm.stored_in(j_st)
    b_total = np.zeros(shape)
    out_factor = path.reflection_s * path.switching_efficiency
    for k in range(1, n + 1):
        energy, j_st, peak, b_add = apply_ops(path.ops, energy, j_st, gm, track)
        j_st = j_eq + (j_st - j_eq) * decay
        e_hist[k] = energy
        g_hist[k] = gm.log_gain(j_st)
        s_hist[k] = gm.stored_in(j_st)
        e_out, _, peak_out, b_out = apply_ops(path.out_ops, energy, j_st, gm, track)
        out_hist[k] = e_out * out_factor
        if track:
            b_total = b_total + b_add
            p_hist[k] = np.maximum(peak, peak_out)
            b_hist[k] = b_total + b_out
    return BuildupResult(e_hist, out_hist, g_hist, s_hist, p_hist, b_hist, j_st)


def shot(gm: GainModel, path: RoundTripPath, seed_energy, j_st, n_round_trips, period: float):
    """One shot of a continuously pumped regen, vectorised over a batch.

    From the stored fluence per ring at injection ``j_st`` (…, R): N round trips (each
    followed by recovery over T_rt), the output pass (depleting the crystal if it is in the
    cell arm), then recovery over Δ = period − N·T_rt until the next injection (docs/definitions.md
    "Gain", continuous pump).  ``n_round_trips`` may be an integer array with the batch
    shape (each member stops at its own N).  Returns ``(output_energy, j_st_next)``.
    """
    j_st = np.array(j_st, dtype=float)
    batch = j_st.shape[:-1]
    n_arr = np.broadcast_to(np.asarray(n_round_trips), batch)
    rest = np.maximum(period - n_arr * path.dt, 0.0)[..., None]
    # work on a flat batch sorted by N, and drop the members that are done (same arithmetic)
    rings = j_st.shape[-1]
    n_flat = n_arr.reshape(-1)
    order = np.argsort(n_flat, kind="stable")
    n_sorted = n_flat[order]
    j = j_st.reshape(-1, rings)[order]
    energy = np.broadcast_to(np.asarray(seed_energy, dtype=float) * path.reflection_s, batch).reshape(-1)[order].copy()
    j_eq_all = np.broadcast_to(gm.stored_fluence(gm.pump_rate * gm.tau), batch + (rings,)).reshape(-1, rings)[order]
    decay = np.exp(-path.dt / gm.tau)
    out = np.zeros(n_flat.size)
    j_end = j.copy()
    first = 0  # members [first:] are still running
    n_max = int(n_sorted[-1]) if n_sorted.size else 0
    for k in range(1, n_max + 1):  # (extraction does not depend on the pump rate)
        energy, j, _, _ = apply_ops(path.ops, energy, j, gm, False)
        j = j_eq_all[first:] + (j - j_eq_all[first:]) * decay
        stop = int(np.searchsorted(n_sorted, k, side="right")) - first  # members with N == k
        if stop > 0:
            e_out, j_after, _, _ = apply_ops(path.out_ops, energy[:stop], j[:stop], gm, False)
            out[first:first + stop] = e_out * path.reflection_s * path.switching_efficiency
            j_end[first:first + stop] = j_after
            first += stop
            energy, j = energy[stop:], j[stop:]
    inverse = np.empty_like(order)
    inverse[order] = np.arange(order.size)
    out = out[inverse].reshape(batch)
    j_end = j_end[inverse].reshape(batch + (rings,))
    j_eq = np.broadcast_to(gm.stored_fluence(gm.pump_rate * gm.tau), batch + (rings,))
    j_next = j_eq + (j_end - j_eq) * np.exp(-rest / gm.tau)
    return out, j_next


def shot_every_n(gm: GainModel, path: RoundTripPath, seed_energy, stored_energy, n_max: int, period: float):
    """One continuously pumped shot from each starting storage, switched out after every N.

    A single build-up from each stored energy at injection x (J, 1-D batch, stored fluence
    distributed like the pump) gives, for every N = 1 … n_max at once, the output energy and
    the stored energy at the next injection (after the output pass and the recovery over
    Δ = period − N·T_rt).  Returns ``(output[N, batch], next_stored[N, batch])`` (row 0 NaN).
    Same physics as :func:`shot`, arranged so that one pass serves every N.
    """
    x = np.asarray(stored_energy, dtype=float)
    j_st = gm.stored_fluence(x)
    energy = np.broadcast_to(np.asarray(seed_energy, dtype=float) * path.reflection_s, x.shape).astype(float)
    j_eq = gm.stored_fluence(np.broadcast_to(gm.pump_rate * gm.tau, x.shape))
    decay = np.exp(-path.dt / gm.tau)
    out = np.full((n_max + 1,) + x.shape, np.nan)
    nxt = np.full((n_max + 1,) + x.shape, np.nan)
    for k in range(1, n_max + 1):
        energy, j_st, _, _ = apply_ops(path.ops, energy, j_st, gm, False)
        j_st = j_eq + (j_st - j_eq) * decay
        e_out, j_after, _, _ = apply_ops(path.out_ops, energy, j_st, gm, False)
        out[k] = e_out * path.reflection_s * path.switching_efficiency
        rest = max(period - k * path.dt, 0.0)
        nxt[k] = gm.stored_in(j_eq + (j_after - j_eq) * np.exp(-rest / gm.tau))
    return out, nxt

