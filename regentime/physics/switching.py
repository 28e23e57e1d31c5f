"""High-voltage edges, the time-sliced pulse crossing the cell, and the switching windows.

Edge waveform v(t) (normalised high voltage at the cell, 0 … 1), 50 % point at t_e:

* ``linear`` (default): v = clip(½ + (t − t_e)/T₀, 0, 1) with T₀ = t_r/0.8 the 0–100 %
  duration of a ramp whose 10–90 % time is t_r (geometry of a straight line);
* ``erf``: v = ½ [1 + erf((t − t_e)/(σ√2))], σ = t_r/(2·1.28155) because the 10 % and 90 %
  points of the normal distribution lie at ∓1.28155 σ (any table of the normal
  distribution, e.g. Abramowitz & Stegun 26.2);
* ``step`` (t_r = 0): the ideal instant switch.
A falling edge is 1 − v.

Pulse: Gaussian intensity, FWHM τ_p, σ_p = τ_p/(2√(2 ln 2)), cut into time slices τ_j at
the nodes of Gauss–Hermite quadrature: ∫ e^(−x²) f(x) dx ≈ Σ_j W_j f(x_j) (Abramowitz &
Stegun 1964, 25.4.46; nodes and weights from ``numpy.polynomial.hermite.hermgauss``), so
τ_j = √2 σ_p x_j and w_j = W_j/√π (they sum to 1).  21 nodes integrate the smooth share
of a pulse against a ns edge to < 10⁻⁷ of the share; the outermost nodes lie at ±7.8 σ_p.
Slice j crosses the cell at t_c + τ_j and sees Γ = Γ_full · v(t_c + τ_j), its own
retardance at its own instant (docs/definitions.md, "Switching").

Share of a switching *event*: the pulse makes consecutive cell-arm double passes (crossing
times given), the polarizer's transmitted port is applied twice between them (polarizer →
gain arm → polarizer), and after the last pass the measured share is either the light that
stays in the cavity (P after the transmitted port: ``trapped``) or the light reflected out
of the in/out port (``ejected``); shares are weighted sums over the slices.  The polarisation
of each pass comes from :mod:`regentime.physics.jones`.

Window: the range of 50 % edge times t_e for which the share is at least ``threshold``
(99 %) of the share of an ideal instant switch placed in the middle of the gap between the
crossings the edge must fall between.  Found on a grid and refined by bisection.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Optional, Sequence

import numpy as np

from regentime.physics import jones

LINEAR_10_90 = 0.8  # a straight ramp spends 80 % of its 0-100 % time between 10 % and 90 %
ERF_10_90 = 2.0 * 1.2815515655446004  # 10-90 % span of the normal CDF in units of sigma
FWHM_PER_SIGMA = 2.0 * math.sqrt(2.0 * math.log(2.0))
SLICE_SPAN = 4.5  # sigmas each side counted as "the pulse" in search ranges (2 Q(4.5) = 6.8e-6)
SLICES = 21  # Gauss-Hermite nodes
THRESHOLD = 0.99  # docs/definitions.md, "Switching windows": at least 99 % of an ideal instant switch
_GRID = 300  # grid points of the window search (edges then refined; finds windows ≳ 0.1 ns)
_BISECT_TOL = 0.05e-12  # s, window edges refined to 0.05 ps (well below any generator step)


# ----- edges and slices -------------------------------------------------------------------


def edge(t, t50, rise: float, shape: str = "linear", rising: bool = True) -> np.ndarray:
    """Normalised high voltage v(t) of one edge with its 50 % point at ``t50`` (s).

    ``rise``: 10–90 % time (s; 0 gives the ideal step), ``shape``: ``linear`` | ``erf``.
    See the module notes for the formulas.  Returns an array broadcast from t and t50.
    """
    x = np.asarray(t, dtype=float) - np.asarray(t50, dtype=float)
    if rise <= 0.0:
        v = (x >= 0.0).astype(float)
    elif shape == "erf":
        sigma = rise / ERF_10_90
        v = 0.5 * (1.0 + _erf(x / (sigma * math.sqrt(2.0))))
    elif shape == "linear":
        v = np.clip(0.5 + x / (rise / LINEAR_10_90), 0.0, 1.0)
    else:
        raise ValueError(f"edge shape must be 'linear' or 'erf', got {shape!r}")
    return v if rising else 1.0 - v


def edge_extent(rise: float, shape: str = "linear") -> float:
    """Half-width (s) around the 50 % point outside which the edge is within 10⁻⁴ of its end values."""
    if rise <= 0.0:
        return 0.0
    if shape == "erf":
        return 3.72 * rise / ERF_10_90  # normal tail Q(3.72) = 1e-4
    return 0.5 * rise / LINEAR_10_90


def _erf(x: np.ndarray) -> np.ndarray:
    return np.frompyfunc(math.erf, 1, 1)(x).astype(float)


_HERMITE: dict = {}


def _hermite_nodes(n: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss–Hermite nodes x_j and weights W_j/√π (A&S 25.4.46), cached per n."""
    if n not in _HERMITE:
        from numpy.polynomial.hermite import hermgauss

        x, wt = hermgauss(n)
        _HERMITE[n] = (x, wt / wt.sum())  # Σ W_j = √π exactly; dividing by the sum keeps Σ w = 1
    return _HERMITE[n]


def pulse_slices(fwhm: float, n: int = SLICES) -> tuple[np.ndarray, np.ndarray]:
    """Time offsets τ_j (s) and weights w_j (sum 1) of a Gaussian pulse of FWHM ``fwhm`` (s):
    the Gauss–Hermite rule of the module notes, τ_j = √2 σ x_j, w_j = W_j/√π."""
    if fwhm <= 0.0:
        return np.zeros(1), np.ones(1)
    sigma = fwhm / FWHM_PER_SIGMA
    x, w = _hermite_nodes(n)
    return math.sqrt(2.0) * sigma * x, w.copy()


# ----- one switching event ----------------------------------------------------------------


@dataclass(frozen=True)
class SwitchEvent:
    """A switching edge and the cell-arm double passes it decides.

    ``passes``: (t_out, t_back) crossing instants of the pulse centre at the cell (s, any
    common time origin), in order; ``gap``: (start, end) the interval between the crossings
    the edge must fall between (for the ideal switch and the search range); ``rising``:
    switch-on (True) or switch-off; ``start``: 'S' (a seed pulse just reflected in) or 'P'
    (the trapped pulse); ``measure``: 'trapped' or 'ejected'.
    """

    passes: tuple
    gap: tuple
    rising: bool
    start: str
    measure: str
    arm: tuple
    gamma_full: float
    contrast: float
    polarizer: object

    def shifted(self, delta: float, from_crossing: int) -> "SwitchEvent":
        """The same event with every crossing from number ``from_crossing`` on (0-based, in
        time order) later by ``delta`` s: used to ask how much more gap would be needed."""
        flat = [t for p in self.passes for t in p]
        flat = [t + (delta if i >= from_crossing else 0.0) for i, t in enumerate(flat)]
        passes = tuple((flat[2 * i], flat[2 * i + 1]) for i in range(len(self.passes)))
        return replace(self, passes=passes, gap=(self.gap[0], self.gap[1] + delta))


def event_share(ev: SwitchEvent, t50, rise: float, shape: str, fwhm: float,
                gamma_scale: float = 1.0, n_slices: int = SLICES) -> np.ndarray:
    """Trapped or ejected share of the event for edge 50 % times ``t50`` (array, s).

    Weighted over the pulse slices; the polarisation of every pass from the Jones model
    with the cell's retardance Γ = gamma_scale · Γ_full · v(t) at each slice's crossing.
    """
    t50 = np.atleast_1d(np.asarray(t50, dtype=float))
    tau, w = pulse_slices(fwhm, n_slices)
    tt = t50[:, None]
    stokes = np.broadcast_to(jones.STOKES_S if ev.start == "S" else jones.STOKES_P,
                             (t50.size, tau.size, 4)).copy()
    port = jones.mueller(jones.transmitted_port(ev.polarizer))
    g = ev.gamma_full * gamma_scale
    for k, (t_out, t_back) in enumerate(ev.passes):
        if k:
            stokes = stokes @ (port @ port).T
        g_out = g * edge(t_out + tau[None, :], tt, rise, shape, ev.rising)
        g_back = g * edge(t_back + tau[None, :], tt, rise, shape, ev.rising)
        stokes = jones.apply_cell_arm(stokes, ev.arm, g_out, g_back, ev.contrast)
    if ev.measure == "trapped":
        share = jones.p_share(stokes @ port.T)
    else:
        share = jones.reflected_intensity(ev.polarizer, stokes)
    return share @ w


def perfect_share(ev: SwitchEvent) -> float:
    """Share with perfect polarisation optics (the normalisation to report shares as 0 … 1).

    Trapped: S in → P out of the first pass, T_p at each polarizer transmission; ejected: the
    trapped P pulse leaves by R_s after its transmissions.
    """
    pol = ev.polarizer
    n_t = 2 * (len(ev.passes) - 1) + (1 if ev.measure == "trapped" else 0)
    tp = pol.transmission_p ** n_t
    return tp if ev.measure == "trapped" else tp * pol.reflection_s


# ----- windows ----------------------------------------------------------------------------


@dataclass
class WindowResult:
    """Outcome of a window search (times in the event's time origin, s)."""

    window: Optional[tuple]  # (start, end) of 50 % edge times, None when there is none
    ideal: float  # share of an ideal instant switch in the middle of the gap
    nominal: float  # share of an ideal switch with an infinitely short pulse
    best: float  # best share found with the real edge
    best_time: float  # where
    threshold: float = THRESHOLD
    grid: tuple = field(default=(), repr=False)  # (t50 array, share array) for plots

    @property
    def exists(self) -> bool:
        return self.window is not None

    @property
    def middle(self) -> Optional[float]:
        return None if self.window is None else 0.5 * (self.window[0] + self.window[1])

    @property
    def width(self) -> float:
        return 0.0 if self.window is None else self.window[1] - self.window[0]


def find_window(ev: SwitchEvent, rise: float, shape: str, fwhm: float,
                threshold: float = THRESHOLD) -> WindowResult:
    """The range of 50 % edge times with share ≥ threshold × (ideal instant switch's share).

    Grid of ``_GRID`` points over the gap widened by the edge and pulse extents, then
    refinement of both ends to ``_BISECT_TOL``.  The run of the grid that holds the best
    point is taken (there is one run for any edge shape used here).
    """
    a, b = ev.gap
    mid = 0.5 * (a + b)
    ideal = float(event_share(ev, mid, 0.0, "linear", fwhm)[0])
    nominal = float(event_share(ev, mid, 0.0, "linear", 0.0)[0])
    sig = fwhm / FWHM_PER_SIGMA
    ext = edge_extent(rise, shape) + SLICE_SPAN * sig
    t = np.linspace(a - ext, b + ext, _GRID)
    s = event_share(ev, t, rise, shape, fwhm)
    target = threshold * ideal
    i_best = int(np.argmax(s - 1e-12 * np.abs(t - mid) / max(b - a, 1e-15)))  # ties: nearest mid
    ok = s >= target
    if not ok[i_best]:
        return WindowResult(None, ideal, nominal, float(s[i_best]), float(t[i_best]), threshold, (t, s))
    lo = i_best
    while lo > 0 and ok[lo - 1]:
        lo -= 1
    hi = i_best
    while hi < t.size - 1 and ok[hi + 1]:
        hi += 1

    def f(x):
        return event_share(ev, x, rise, shape, fwhm) - target

    start = t[lo] if lo == 0 else _refine(f, t[lo - 1], t[lo])
    end = t[hi] if hi == t.size - 1 else _refine(f, t[hi + 1], t[hi])
    return WindowResult((float(start), float(end)), ideal, nominal, float(s[i_best]),
                        float(t[i_best]), threshold, (t, s))


_REFINE_POINTS = 48  # per refinement stage: 48² ≈ 2300-fold narrowing in two vectorised calls


def _refine(f, bad: float, good: float) -> float:
    """Boundary between ``bad`` (f < 0) and ``good`` (f ≥ 0) to ``_BISECT_TOL``, by evaluating
    the vectorised ``f`` on a fine grid of the bracket and keeping the crossing cell (each
    stage narrows the bracket ``_REFINE_POINTS − 1`` times; same answer as bisection)."""
    for _ in range(8):
        if abs(good - bad) <= _BISECT_TOL:
            break
        x = np.linspace(bad, good, _REFINE_POINTS)
        ok = np.asarray(f(x)) >= 0.0
        ok[-1] = True  # ``good`` is good by construction
        i = int(np.argmax(ok))  # first good point from the bad side
        if i == 0:  # pragma: no cover - ``bad`` is bad by construction
            return float(bad)
        bad, good = float(x[i - 1]), float(x[i])
    return good


def window_exists(ev: SwitchEvent, rise: float, shape: str, fwhm: float,
                  threshold: float = THRESHOLD) -> bool:
    """Quick test: does the edge centred in the gap reach the threshold?  (The best edge time
    is the middle of the gap for the symmetric edges and pulses used here.)"""
    mid = 0.5 * (ev.gap[0] + ev.gap[1])
    ideal = float(event_share(ev, mid, 0.0, "linear", fwhm, n_slices=41)[0])
    real = float(event_share(ev, mid, rise, shape, fwhm, n_slices=41)[0])
    return real >= threshold * ideal


def _largest_passing(passes, hi: float) -> float:
    """Largest x in [0, hi] with passes(x) true, for a predicate true at 0 and false above
    some threshold (bisection to 0.5 % of hi)."""
    lo = 0.0
    for _ in range(30):
        if hi - lo <= 0.005 * hi:
            break
        m = 0.5 * (lo + hi)
        if passes(m):
            lo = m
        else:
            hi = m
    return lo


def largest_rise_time(ev: SwitchEvent, rise: float, shape: str, fwhm: float) -> float:
    """Longest 10–90 % time (s) that still gives a window (bisection, 1 % steps)."""
    if not window_exists(ev, 0.0, shape, fwhm):
        return 0.0
    return _largest_passing(lambda r: window_exists(ev, r, shape, fwhm), rise)


def longest_pulse(ev: SwitchEvent, rise: float, shape: str, fwhm: float) -> float:
    """Longest pulse FWHM (s) that still gives a window with this edge (0 if none)."""
    if not window_exists(ev, rise, shape, 0.0):
        return 0.0
    return _largest_passing(lambda w: window_exists(ev, rise, shape, w), fwhm)


def extra_gap_needed(ev: SwitchEvent, rise: float, shape: str, fwhm: float,
                     from_crossing: int) -> float:
    """Extra time (s) between the crossings that would give a window (bisection)."""
    hi = 2.0 * edge_extent(rise, shape) + 2 * SLICE_SPAN * fwhm / FWHM_PER_SIGMA + 1e-12
    while not window_exists(ev.shifted(hi, from_crossing), rise, shape, fwhm):
        hi *= 2.0
        if hi > 1e-3:
            return math.inf
    lo = 0.0
    for _ in range(40):
        if hi - lo <= 1e-12:
            break
        m = 0.5 * (lo + hi)
        if window_exists(ev.shifted(m, from_crossing), rise, shape, fwhm):
            hi = m
        else:
            lo = m
    return hi


def gap_crossings(passes: Sequence, scheme: str, edge_pass: int) -> tuple[float, float]:
    """The two crossings an edge must fall between.

    Quarter-wave scheme: after the return crossing of pass ``edge_pass`` and before the
    outward crossing of the next pass; half-wave scheme: between the outward and return
    crossings of pass ``edge_pass`` (docs/definitions.md, "Switching").
    """
    if scheme == "quarter-wave":
        return passes[edge_pass][1], passes[edge_pass + 1][0]
    return passes[edge_pass][0], passes[edge_pass][1]
