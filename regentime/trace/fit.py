"""Fit the regen build-up model to a measured pulse envelope (least squares, scipy).

Model (reduced units x = E / E_sat, E_sat = J_sat · A the saturation energy of the mode area A;
flat-top mode).  One round trip applies, in path order, passive transmission factors
T^{w_i} (Σ w_i = 1, T = 1 − loss the round-trip transmission) and Frantz–Nodvik gain passes::

    x_out = ln(1 + e^{g} (e^{x_in} − 1)),      g ← g − (x_out − x_in)

(L. M. Frantz and J. S. Nodvik, J. Appl. Phys. 34, 2346 (1963); W. Koechner, Solid-State
Laser Engineering, ch. 4), then lets the gain relax towards g_eq for one round trip,
g ← g_eq + (g − g_eq) · e^{−T_rt/τ} (pulsed pump: g_eq = −J_tr/J_sat; the default is no
relaxation).  The photodiode reads a_k = s · E_k (s in V·s per J when amplitudes are areas).

Two ways to place the model on the measured slots:

* **free start** (default): parameters g₁ (log gain at the first measured pulse), loss,
  ln x₁ (energy at the first measured pulse) and ln s.  Nothing about the time of injection
  is needed.  The gain at injection g₀ and the number of round trips m from injection to the
  first measured pulse are then found by running the model backwards (the inverse of
  Frantz–Nodvik is closed-form: x_in = −ln(1 − e^{−g_after}(1 − e^{−x_out}))) down to the
  file's injected energy E₀.
* **anchored**: m is known (the injection time on the trace's time base is given); parameters
  g₀, loss, ln s and optionally ln E₀.

Uncertainties: covariance = σ̂² (JᵀJ)⁻¹ at the solution (σ̂² = residual sum of squares / degrees
of freedom); the predicted peak's spread comes from 300 parameter draws of that covariance.
When the data show no saturation (pure exponential growth), energy scale and photodiode scale
are degenerate and the peak cannot be predicted well: the spread says so.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional, Sequence

import numpy as np

from regentime.physics.frantz_nodvik import frantz_nodvik

_MAX_EXTRA = 5000  # round trips simulated past the data to find a predicted peak
_X_MIN, _X_MAX = 1e-16, 50.0  # bounds of the reduced pulse energy at the first pulse
_DRAWS = 300


@dataclass(frozen=True)
class BuildupInputs:
    """What the fit takes from a cavity file (plain numbers, SI).  Any may be None."""

    round_trip_time: Optional[float] = None  # s, the model's T_rt
    e_sat: Optional[float] = None  # J, J_sat · mode area
    seed_energy: Optional[float] = None  # J, E_0: injected energy at the reference point
    initial_log_gain: Optional[float] = None  # g_0, single-pass, at injection
    round_trip_loss: Optional[float] = None  # 1 − passive round-trip transmission
    ops: tuple = (0.5, "gain", "gain", 0.5)  # loss weights and gain passes in path order
    decay: float = 1.0  # e^{−T_rt/τ}: relaxation of the gain per round trip (1: none)
    g_eq: float = 0.0  # log gain the relaxation tends to
    rings: Optional["Rings"] = None  # radial rings (Gaussian mode); None: flat-top

    @property
    def gain_passes(self) -> int:
        return sum(1 for op in self.ops if op == "gain")


@dataclass(frozen=True)
class Rings:
    """Radial rings for a Gaussian mode, in reduced form (A = π w², J_sat the saturation fluence).

    u = A · mode fluence per joule (pulse fluence per ring / (E/A)); v = ring area / A
    (Σ u·v = 1); p = stored fluence per ring / J_sat at the file's operating point; o =
    J_tr / J_sat; q = (equilibrium stored fluence − J_tr) / J_sat per ring (relaxation target).
    A mode-weighted log gain g maps to rings by scaling the stored profile:
    g_r = (g + o)/Σ(p u v) · p_r − o, so that Σ g_r u_r v_r = g.
    """

    u: np.ndarray
    v: np.ndarray
    p: np.ndarray
    o: float = 0.0
    q: Optional[np.ndarray] = None

    def ring_gain(self, g):
        g = np.asarray(g, dtype=float)
        s = float(np.sum(self.p * self.u * self.v))
        return (g[..., None] + self.o) / s * self.p - self.o

    def mean_gain(self, g_r):
        return (g_r * self.u * self.v).sum(-1)


@dataclass
class FitResult:
    """Fitted build-up; values and 1-σ uncertainties keyed by parameter name."""

    mode: str  # "free start" | "anchored"
    values: dict  # name -> value
    sigmas: dict  # name -> 1-σ (NaN when not determined)
    file_values: dict  # name -> the cavity file's value (or None)
    model: np.ndarray  # fitted amplitudes for every measured pulse (same units as the data)
    extended: np.ndarray  # fitted amplitudes from the first pulse to past the predicted peak
    peak_index: Optional[int]  # index (from the first measured pulse) of the predicted peak
    peak_range: tuple  # (16th, 84th percentile) of the peak index over parameter draws
    peak_amplitude: float  # predicted peak amplitude
    peak_energy: Optional[float]  # J, predicted intracavity peak energy (needs E_sat)
    rms_residual: float  # rms of (data − model) / max(data)
    dof: int
    success: bool
    message: str
    notes: list = field(default_factory=list)


# ----- the model ---------------------------------------------------------------------------


def _round_trip(x, g, trans, ops, decay, g_eq, rings=None):
    for op in ops:
        if op == "gain":
            if rings is None:
                x, g = frantz_nodvik(x, g, 1.0)
            else:  # mode shape re-imposed at each crossing (the cavity's TEM00 mode)
                phi, g = frantz_nodvik(x[..., None] * rings.u, g, 1.0)
                x = (phi * rings.v).sum(-1)
        else:
            x = x * trans ** op
    if decay != 1.0:
        target = g_eq if rings is None or rings.q is None else rings.q
        g = target + (g - target) * decay
    return x, g


def envelope(x_start, g_start, transmission, n: int, ops: Sequence = BuildupInputs.ops,
             decay: float = 1.0, g_eq: float = 0.0, rings: Optional[Rings] = None
             ) -> tuple[np.ndarray, np.ndarray]:
    """Reduced energies x_k = E_k/E_sat and log gains g_k for k = 0 … n−1 from (x_0, g_0).

    Broadcasts over array arguments (leading axis of the result is k).  See the module text
    for the equations; ``ops`` lists loss weights (floats) and "gain" passes in path order;
    with ``rings`` g is the mode-weighted log gain and the extraction is ring by ring.
    """
    x = np.asarray(x_start, dtype=float)
    g = np.asarray(g_start, dtype=float)
    t = np.asarray(transmission, dtype=float)
    shape = np.broadcast_shapes(x.shape, g.shape, t.shape)
    x = np.broadcast_to(x, shape).astype(float)
    g = np.broadcast_to(g, shape).astype(float)
    if rings is not None:
        g = rings.ring_gain(g)
    xs = np.empty((n,) + shape)
    gs = np.empty((n,) + shape)
    for k in range(n):
        xs[k] = x
        gs[k] = g if rings is None else rings.mean_gain(g)
        if k < n - 1:
            x, g = _round_trip(x, g, t, ops, decay, g_eq, rings)
    return xs, gs


def backward(x_end, g_end, transmission, x_target, ops: Sequence = BuildupInputs.ops,
             decay: float = 1.0, g_eq: float = 0.0, max_steps: int = 100000) -> tuple[float, float]:
    """Run the model backwards from (x, g) until x ≤ x_target.

    Returns (m, g_m): the number of round trips (fractional, interpolated in ln x) back to the
    energy x_target and the log gain there.  Inverse Frantz–Nodvik (exact):
    x_in = −ln(1 − e^{−g_after}(1 − e^{−x_out})), g_before = g_after + x_out − x_in.
    """
    x, g = float(x_end), float(g_end)
    if x <= x_target:
        return 0.0, g
    for step in range(1, max_steps + 1):
        x_prev = x
        if decay != 1.0:
            g = g_eq + (g - g_eq) / decay
        for op in reversed(list(ops)):
            if op == "gain":
                arg = -np.exp(-g) * (-np.expm1(-x))
                if arg <= -1.0:
                    return float("nan"), float("nan")
                x_in = -np.log1p(arg)
                g = g + x - x_in
                x = x_in
            else:
                x = x / transmission ** op
        if x >= x_prev:  # no net gain backwards: never reaches the seed level
            return float("nan"), float("nan")
        if x <= x_target:
            frac = (np.log(x_prev) - np.log(x_target)) / (np.log(x_prev) - np.log(x))
            return step - 1 + float(frac), float(g)
    return float("nan"), float("nan")


# ----- fitting -----------------------------------------------------------------------------


def fit_buildup(amplitudes, sigma: float, inputs: BuildupInputs = BuildupInputs(),
                anchor_round_trips: Optional[int] = None, fit_seed: bool = False,
                dump_index: Optional[int] = None) -> FitResult:
    """Least-squares fit of the build-up model to measured pulse amplitudes.

    amplitudes: one per round trip, from the first measured pulse to the observed switch-out
    (inclusive; later ones are ignored when ``dump_index`` is given); sigma: noise of one
    amplitude (only relative weights matter: the covariance is rescaled by the residuals).
    anchor_round_trips: round trips from injection to the first measured pulse, if known.
    """
    from scipy.optimize import least_squares

    a_all = np.asarray(amplitudes, dtype=float)
    a = a_all if dump_index is None else a_all[: dump_index + 1]
    n = a.size
    notes: list = []
    ops, decay, g_eq, rings = inputs.ops, inputs.decay, inputs.g_eq, inputs.rings
    amax = float(a.max())
    anchored = anchor_round_trips is not None and inputs.seed_energy and inputs.e_sat
    x_seed = inputs.seed_energy / inputs.e_sat if inputs.seed_energy and inputs.e_sat else None
    r_est = _growth_estimate(a, sigma)
    loss0 = inputs.round_trip_loss if inputs.round_trip_loss is not None else 0.05
    npass = max(1, inputs.gain_passes)

    if anchored:
        m = int(anchor_round_trips)

        def unpack(p):
            g0, loss, ls = p[0], p[1], p[2]
            xs = np.exp(p[3]) if fit_seed else x_seed
            return g0, loss, ls, xs

        def model(p, extra=0):
            g0, loss, ls, xs = unpack(p)
            x, _ = envelope(xs, g0, 1.0 - loss, m + n + extra, ops, decay, g_eq, rings)
            return np.exp(ls) * x[m:]

        starts = []
        for loss in _loss_grid(loss0):
            g0 = (np.log(r_est) - np.log1p(-loss)) / npass
            if inputs.initial_log_gain is not None:
                g0 = inputs.initial_log_gain
            p = [g0, loss, 0.0] + ([np.log(x_seed)] if fit_seed else [])
            xm = model(np.array(p))
            s = _best_scale(a, xm)
            p[2] = np.log(s) if s > 0 else np.log(amax)
            starts.append(p)
        lb = [-5.0, 0.0, -np.inf] + ([np.log(_X_MIN)] if fit_seed else [])
        ub = [30.0, 0.99, np.inf] + ([np.log(_X_MAX)] if fit_seed else [])
    else:
        def model(p, extra=0):
            x, _ = envelope(np.exp(p[2]), p[0], 1.0 - p[1], n + extra, ops, decay, g_eq, rings)
            return np.exp(p[3]) * x

        # the first measured pulse has at least the injected energy (it has grown since)
        lx_min = np.log(x_seed) if x_seed else np.log(_X_MIN)
        starts = _free_starts(a, r_est, loss0, npass, ops, decay, g_eq, rings, lx_min)
        lb = [-5.0, 0.0, lx_min, -np.inf]
        ub = [30.0, 0.99, np.log(_X_MAX), np.inf]

    prior = _priors(inputs)

    def resid(p):
        r = (model(p) - a) / sigma
        if prior:
            r = np.concatenate([r, [(p[i] - mu) / sd for i, mu, sd in prior]])
        return r

    best = None
    for p0 in starts:
        p0 = np.clip(np.asarray(p0, dtype=float), np.array(lb) + 1e-9, np.array(ub) - 1e-9)
        try:
            r = least_squares(resid, p0, bounds=(lb, ub), x_scale="jac", method="trf",
                              max_nfev=400 * len(p0))
        except ValueError:
            continue
        if best is None or r.cost < best.cost:
            best = r
    if best is None:
        raise RuntimeError("the build-up fit did not start (no finite model at any start point)")
    p = best.x
    dof = max(n + len(prior) - p.size, 1)
    s2 = max(2.0 * best.cost / dof, 1.0)  # never claim less noise than measured
    cov = _covariance(best.jac, s2)
    sig = np.sqrt(np.clip(np.diag(cov), 0, None))
    fitted = model(p)

    # predicted envelope past the data until the peak (and a little beyond)
    ext, peak = _extend(model, p, n)
    peak_range = _peak_spread(model, p, cov, n, lb, ub, peak)
    values, sigmas = {}, {}
    if anchored:
        values["initial_log_gain"], sigmas["initial_log_gain"] = p[0], sig[0]
        values["round_trip_loss"], sigmas["round_trip_loss"] = p[1], sig[1]
        values["round_trips_before_first_pulse"], sigmas["round_trips_before_first_pulse"] = float(m), 0.0
        if fit_seed:
            values["seed_energy_J"] = np.exp(p[3]) * inputs.e_sat
            sigmas["seed_energy_J"] = values["seed_energy_J"] * sig[3]
        else:
            values["seed_energy_J"], sigmas["seed_energy_J"] = inputs.seed_energy, 0.0
        ls, dls = p[2], sig[2]
    else:
        g1, loss, x1 = p[0], p[1], np.exp(p[2])
        values["round_trip_loss"], sigmas["round_trip_loss"] = loss, sig[1]
        values["start_log_gain"], sigmas["start_log_gain"] = g1, sig[0]
        if x_seed is not None:
            m_back, g0 = backward(x1, g1, 1.0 - loss, x_seed, ops, decay, g_eq)
            values["initial_log_gain"], sigmas["initial_log_gain"] = g0, sig[0]
            values["round_trips_before_first_pulse"] = m_back
            # ln x1 uncertainty over the growth per round trip
            growth = abs(np.log(max(r_est, 1.0 + 1e-9)))
            sigmas["round_trips_before_first_pulse"] = sig[2] / growth if growth > 0 else float("nan")
            values["seed_energy_J"], sigmas["seed_energy_J"] = inputs.seed_energy, 0.0
        else:
            values["initial_log_gain"], sigmas["initial_log_gain"] = g1, sig[0]
            notes.append("no seed energy or saturation energy from the file: the log gain is the "
                         "one at the first measured pulse")
        if inputs.e_sat:
            values["start_energy_J"] = x1 * inputs.e_sat
            sigmas["start_energy_J"] = values["start_energy_J"] * sig[2]
        ls, dls = p[3], sig[3]
    if inputs.e_sat:
        values["scale_per_J"] = float(np.exp(ls) / inputs.e_sat)
        sigmas["scale_per_J"] = values["scale_per_J"] * dls
    else:
        values["scale_per_E_sat"] = float(np.exp(ls))
        sigmas["scale_per_E_sat"] = values["scale_per_E_sat"] * dls
    values["single_pass_gain"] = float(np.exp(values["initial_log_gain"]))
    sigmas["single_pass_gain"] = values["single_pass_gain"] * sigmas["initial_log_gain"]
    file_values = {
        "initial_log_gain": inputs.initial_log_gain,
        "single_pass_gain": None if inputs.initial_log_gain is None else float(np.exp(inputs.initial_log_gain)),
        "round_trip_loss": inputs.round_trip_loss,
        "seed_energy_J": inputs.seed_energy,
    }
    if not anchored and x_seed and p[2] <= lb[2] + 1e-3:
        notes.append("the fit put the first measured pulse at the injected seed energy (a bound): "
                     "the record shows too little of the build-up; the predicted peak rests on the "
                     "file's gain and loss and may be off by a few round trips")
    if peak is not None and peak_range[1] - peak_range[0] > 10:
        notes.append("the data fix the peak poorly (little saturation in the record): "
                     f"its index spans {peak_range[0]}…{peak_range[1]} over the fit's uncertainty")
    peak_amp = float(ext[peak]) if peak is not None else float("nan")
    peak_energy = peak_amp / np.exp(ls) * inputs.e_sat if inputs.e_sat and peak is not None else None
    rms = float(np.sqrt(np.mean((fitted - a) ** 2)) / amax)
    model_all = model(p, extra=max(0, a_all.size - n))[: a_all.size]
    return FitResult(mode="anchored" if anchored else "free start",
                     values={k: float(v) for k, v in values.items()},
                     sigmas={k: float(v) for k, v in sigmas.items()},
                     file_values=file_values, model=model_all, extended=ext, peak_index=peak,
                     peak_range=peak_range, peak_amplitude=peak_amp,
                     peak_energy=None if peak_energy is None else float(peak_energy),
                     rms_residual=rms, dof=dof, success=bool(best.success), message=str(best.message),
                     notes=notes)


def _priors(inputs: BuildupInputs) -> list:
    """Weak priors from the cavity file: [(parameter index, mean, σ)].

    They only matter when the record cannot separate gain from loss (few pulses, no
    saturation); σ is wide on purpose (30 % of g₀, at least 0.1; half the loss, at least 3 %).
    Both fit modes keep the log gain at index 0 and the loss at index 1.
    """
    out = []
    if inputs.initial_log_gain is not None:
        out.append((0, inputs.initial_log_gain, max(0.3 * abs(inputs.initial_log_gain), 0.1)))
    if inputs.round_trip_loss is not None:
        out.append((1, inputs.round_trip_loss, max(0.5 * inputs.round_trip_loss, 0.03)))
    return out


def _loss_grid(loss0: float) -> list:
    grid = [loss0, 0.02, 0.08, 0.2, 0.4]
    out = []
    for v in grid:
        if all(abs(v - w) > 0.005 for w in out):
            out.append(min(max(v, 0.0), 0.95))
    return out


def _growth_estimate(a: np.ndarray, sigma: float) -> float:
    """Net growth per round trip from the early, clean, unsaturated part (ln-linear fit)."""
    amax = a.max()
    ok = (a > 5 * sigma) & (a < 0.2 * amax)
    imax = int(np.argmax(a))
    ok[imax:] = False
    idx = np.flatnonzero(ok)
    if idx.size < 3:
        idx = np.flatnonzero(a[: imax + 1] > 3 * sigma)
    if idx.size < 2:
        return 2.0
    slope = np.polyfit(idx, np.log(a[idx]), 1)[0]
    return float(np.clip(np.exp(slope), 1.01, 1e4))


def _best_scale(a: np.ndarray, x: np.ndarray) -> float:
    den = float(np.dot(x, x))
    return float(np.dot(a, x) / den) if den > 0 else 0.0


def _free_starts(a, r_est, loss0, npass, ops, decay, g_eq, rings, lx_min, keep: int = 4) -> list:
    """Grid over (loss, ln x1) with g1 from the observed growth; best `keep` as starts."""
    n = a.size
    losses = np.array(_loss_grid(loss0))
    lx = np.linspace(max(np.log(1e-12), lx_min + 1e-6), np.log(5.0), 70)
    L, LX = np.meshgrid(losses, lx, indexing="ij")
    G = (np.log(r_est) - np.log1p(-L)) / npass
    x, _ = envelope(np.exp(LX), G, 1.0 - L, n, ops, decay, g_eq, rings)  # (n, nl, nx)
    num = np.einsum("k,k...->...", a, x)
    den = np.einsum("k...,k...->...", x, x)
    s = np.where(den > 0, num / np.where(den > 0, den, 1), 0.0)
    cost = ((s[None] * x - a[:, None, None]) ** 2).sum(0)
    cost = np.where(s > 0, cost, np.inf)
    order = np.argsort(cost, axis=None)[:keep]
    starts = []
    for o in order:
        i, j = np.unravel_index(o, cost.shape)
        starts.append([G[i, j], L[i, j], LX[i, j], np.log(max(s[i, j], 1e-300))])
    return starts


def _covariance(jac: np.ndarray, s2: float) -> np.ndarray:
    jtj = jac.T @ jac
    try:
        return np.linalg.pinv(jtj, rcond=1e-12) * s2
    except np.linalg.LinAlgError:
        return np.full(jtj.shape, np.nan)


def _extend(model, p, n) -> tuple[np.ndarray, Optional[int]]:
    extra = 50
    while True:
        ext = model(p, extra=extra)
        k = int(np.argmax(ext))
        if k < ext.size - 3 or extra >= _MAX_EXTRA:
            break
        extra *= 4
    if k >= ext.size - 3:
        return ext, None
    stop = min(ext.size, max(n, k) + max(5, (k + 1) // 5))
    return ext[:stop], k


def _peak_spread(model, p, cov, n, lb, ub, peak) -> tuple:
    """16th–84th percentile of the predicted peak index over draws of the fit covariance."""
    if not np.all(np.isfinite(cov)):
        return (-1, -1)
    rng = np.random.default_rng(12345)  # fixed: the report must not change from run to run
    try:
        draws = rng.multivariate_normal(p, cov, size=_DRAWS, method="eigh")
    except (np.linalg.LinAlgError, ValueError):
        return (-1, -1)
    draws = np.clip(draws, np.array(lb) + 1e-12, np.array(ub) - 1e-12)
    horizon = min(_MAX_EXTRA, 3 * max(peak or n, n) + 50)
    with np.errstate(all="ignore"):
        ext = model(draws.T, extra=horizon)  # (k, draws): the model broadcasts over draws
    k = np.argmax(np.where(np.isfinite(ext), ext, -np.inf), axis=0)
    k = np.where(k >= ext.shape[0] - 2, n + _MAX_EXTRA, k)
    lo, hi = np.percentile(k, [16, 84])
    return (int(np.floor(lo)), int(np.ceil(hi)))
