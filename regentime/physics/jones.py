"""Jones calculus of the cell arm: polarizer, rotated retarders, the Pockels cell, double passes.

Conventions
-----------
* Basis (x, y) = (P, S) of the cavity polarizer: P is transmitted, S is reflected into the
  in/out port.  Angles are measured from the P direction.
* A linear retarder of retardance Γ (rad) with its fast axis at θ (rad)::

      J(Γ, θ) = R(θ) · diag(e^{−iΓ/2}, e^{+iΓ/2}) · R(−θ),   R(θ) = [[cos θ, −sin θ], [sin θ, cos θ]]

  (R. C. Jones, J. Opt. Soc. Am. 31, 488 (1941); C. A. DiMarzio, Optics for Engineers,
  CRC 2011, ch. 6; A. Yariv & P. Yeh, Optical Waves in Crystals, 1984, ch. 5).
* Polarizer: diag(t_pass, t_block) (amplitudes).  The cavity polarizer has two ports:
  transmitted diag(√T_p, √(1 − R_s)) and reflected diag(√(R_s/ER), √R_s), ER being the
  extinction ratio R_s/R_p of the reflected port (docs/definitions.md, "Contrast").
* Double pass through an arm with an end mirror at normal incidence: the arm is unfolded
  and the return pass uses the same matrix as the outward pass (a linear retarder's Jones
  matrix is symmetric, as reciprocity requires in this frame); the mirror is the identity.
  So a quarter-wave plate at 45° crossed twice acts as a half-wave plate at 45° and turns P
  into S (standard result, e.g. Yariv & Yeh ch. 5).
* The Pockels cell is a retarder whose induced axes are at 45° to P; its retardance per
  crossing is Γ(t) = Γ_full · v(t).
* Static contrast C of the cell (the crossed-to-parallel transmission ratio with no
  voltage is 1/C) is a *depolarisation*: it cannot be written as one Jones matrix.  Each
  Jones matrix is therefore turned into its Mueller matrix with the standard relation
  M = A (J ⊗ J*) A⁻¹ (e.g. D. H. Goldstein, Polarized Light, 2nd ed., Marcel Dekker 2003,
  ch. 6 — from memory), and each crossing of the cell is followed by the depolariser
  diag(1, 1−q, 1−q, 1−q) with q = 2/C: a share q of the light becomes unpolarised, half
  of which lands in the crossed state, giving the crossed-polarizer leak q/2 = 1/C.
  Stokes vectors are (I, Q, U, V) with Q = |E_P|² − |E_S|².

Everything here is pure numpy, vectorised over leading array axes; no I/O.
"""

from __future__ import annotations

import math
from typing import Sequence

import numpy as np


CELL_AXIS = math.pi / 4  # rad, induced axes of the cell relative to P (the usual mounting)

_A = np.array([[1, 0, 0, 1], [1, 0, 0, -1], [0, 1, 1, 0], [0, 1j, -1j, 0]], dtype=complex)
_A_INV = np.linalg.inv(_A)

STOKES_P = np.array([1.0, 1.0, 0.0, 0.0])  # unit intensity, P polarised
STOKES_S = np.array([1.0, -1.0, 0.0, 0.0])  # unit intensity, S polarised


# ----- Jones matrices ---------------------------------------------------------------------


def rotation(theta) -> np.ndarray:
    """Rotation matrix R(θ) = [[cos θ, −sin θ], [sin θ, cos θ]], θ in rad (array-friendly)."""
    t = np.asarray(theta, dtype=float)
    c, s = np.cos(t), np.sin(t)
    out = np.empty(t.shape + (2, 2))
    out[..., 0, 0], out[..., 0, 1], out[..., 1, 0], out[..., 1, 1] = c, -s, s, c
    return out


def polarizer(t_pass: float, t_block: float) -> np.ndarray:
    """Jones matrix diag(t_pass, t_block) of a polarizer passing P (amplitude transmissions)."""
    return np.array([[t_pass, 0.0], [0.0, t_block]], dtype=complex)


def retarder(gamma, theta) -> np.ndarray:
    """Linear retarder J(Γ, θ) = R(θ) diag(e^{−iΓ/2}, e^{iΓ/2}) R(−θ).

    Γ: retardance (rad), θ: fast-axis angle from P (rad); arrays broadcast, the result has
    shape broadcast(Γ, θ) + (2, 2).  Valid for any Γ, θ (Jones 1941; DiMarzio ch. 6).
    """
    g, t = np.broadcast_arrays(np.asarray(gamma, dtype=float), np.asarray(theta, dtype=float))
    c, s = np.cos(t), np.sin(t)
    a, b = np.exp(-0.5j * g), np.exp(0.5j * g)
    out = np.empty(g.shape + (2, 2), dtype=complex)
    out[..., 0, 0] = a * c * c + b * s * s
    out[..., 1, 1] = a * s * s + b * c * c
    off = (a - b) * c * s
    out[..., 0, 1] = off
    out[..., 1, 0] = off
    return out


# ----- Mueller form (for depolarisation) --------------------------------------------------


def mueller(jones: np.ndarray) -> np.ndarray:
    """Mueller matrix of a (stack of) Jones matrices: M = A (J ⊗ J*) A⁻¹ (real part)."""
    j = np.asarray(jones, dtype=complex)
    k = np.einsum("...ij,...kl->...ikjl", j, j.conj()).reshape(j.shape[:-2] + (4, 4))
    return np.real(_A @ k @ _A_INV)


def depolariser(q) -> np.ndarray:
    """Mueller matrix diag(1, 1−q, 1−q, 1−q): a share q of the light becomes unpolarised."""
    q = np.asarray(q, dtype=float)
    out = np.zeros(q.shape + (4, 4))
    out[..., 0, 0] = 1.0
    for i in (1, 2, 3):
        out[..., i, i] = 1.0 - q
    return out


def depolarisation_of_contrast(contrast: float) -> float:
    """q = 2/C: the share made unpolarised per crossing by a cell of static contrast C.

    Between crossed polarizers the unpolarised share leaks half of itself, q/2 = 1/C, which
    is how a cell's contrast is quoted (crossed/parallel transmission with no voltage).
    """
    if not contrast > 0 or math.isinf(contrast):
        return 0.0
    return min(1.0, 2.0 / contrast)


def p_share(stokes: np.ndarray) -> np.ndarray:
    """Intensity in P of Stokes vector(s): (I + Q)/2."""
    return 0.5 * (stokes[..., 0] + stokes[..., 1])


def s_share(stokes: np.ndarray) -> np.ndarray:
    """Intensity in S of Stokes vector(s): (I − Q)/2."""
    return 0.5 * (stokes[..., 0] - stokes[..., 1])


# ----- the cavity polarizer ---------------------------------------------------------------


def transmitted_port(pol) -> np.ndarray:
    """Jones matrix of the polarizer's transmitted (intra-cavity) port: diag(√T_p, √(1−R_s))."""
    return polarizer(math.sqrt(pol.transmission_p), math.sqrt(max(0.0, 1.0 - pol.reflection_s)))


def reflected_port(pol) -> np.ndarray:
    """Jones matrix of the reflected (in/out) port: diag(√(R_s/ER), √R_s), ER = R_s/R_p."""
    er = pol.extinction_ratio
    r_p = 0.0 if math.isinf(er) else pol.reflection_s / er
    return polarizer(math.sqrt(r_p), math.sqrt(pol.reflection_s))


def reflected_intensity(pol, stokes: np.ndarray) -> np.ndarray:
    er = pol.extinction_ratio
    r_p = 0.0 if math.isinf(er) else pol.reflection_s / er
    return pol.reflection_s * s_share(stokes) + r_p * p_share(stokes)


# ----- the cell arm -----------------------------------------------------------------------


def cell_arm_elements(arm: Sequence) -> list:
    """The polarisation-active elements of the cell arm, polarizer outward (cell and plates)."""
    return [e for e in arm if e.kind in ("pockels_cell", "waveplate")]


def cell_arm_mueller(arm: Sequence, gamma_out, gamma_back, contrast: float) -> np.ndarray:
    """Mueller matrix of one cell-arm double pass (polarizer → end mirror → polarizer).

    ``arm``: the cell arm's elements from the polarizer outward (``CavityOptics.cell_arm``);
    ``gamma_out``/``gamma_back``: the cell's retardance (rad) at its outward and return
    crossings (arrays broadcast: one matrix per time slice); ``contrast``: the cell's static
    contrast C.  Waveplates are retarders of 2π·retardance at their axis; the cell is
    J(Γ, 45°) followed by the depolariser q = 2/C.  Passive transmissions are not included
    (they do not depend on polarisation here).
    """
    q = depolarisation_of_contrast(contrast)
    dep = depolariser(q)
    g_out = np.asarray(gamma_out, dtype=float)
    g_back = np.asarray(gamma_back, dtype=float)
    shape = np.broadcast_shapes(g_out.shape, g_back.shape)
    total = np.broadcast_to(np.eye(4), shape + (4, 4)).copy()
    active = cell_arm_elements(arm)
    for e in active:  # outward
        total = _step(e, g_out, dep) @ total
    for e in reversed(active):  # back (mirror: identity in the unfolded frame)
        total = _step(e, g_back, dep) @ total
    return total


def apply_retarder(stokes: np.ndarray, gamma, theta: float) -> np.ndarray:
    """Stokes vector(s) after a linear retarder J(Γ, θ), with the closed-form Mueller matrix

        [[1, 0, 0, 0], [0, c² + s² cos Γ, cs(1 − cos Γ), s sin Γ],
         [0, cs(1 − cos Γ), s² + c² cos Γ, −c sin Γ], [0, −s sin Γ, c sin Γ, cos Γ]]

    with c = cos 2θ, s = sin 2θ (the same matrix :func:`mueller` gives from the Jones
    matrix; written out so that many time slices are cheap).  ``stokes`` (..., 4), Γ
    broadcast against its leading axes.
    """
    g = np.asarray(gamma, dtype=float)
    c, s = math.cos(2.0 * theta), math.sin(2.0 * theta)
    cg, sg = np.cos(g), np.sin(g)
    i, q, u, v = stokes[..., 0], stokes[..., 1], stokes[..., 2], stokes[..., 3]
    out = np.empty(np.broadcast_shapes(stokes.shape, g.shape + (4,)))
    out[..., 0] = i
    out[..., 1] = (c * c + s * s * cg) * q + c * s * (1.0 - cg) * u + s * sg * v
    out[..., 2] = c * s * (1.0 - cg) * q + (s * s + c * c * cg) * u - c * sg * v
    out[..., 3] = -s * sg * q + c * sg * u + cg * v
    return out


def apply_cell_arm(stokes: np.ndarray, arm: Sequence, gamma_out, gamma_back,
                   contrast: float) -> np.ndarray:
    """Stokes vector(s) after one cell-arm double pass; the same physics as
    :func:`cell_arm_mueller` (element by element, for many time slices at once)."""
    keep = 1.0 - depolarisation_of_contrast(contrast)
    active = cell_arm_elements(arm)
    out = np.asarray(stokes, dtype=float)
    for gamma, order in ((gamma_out, active), (gamma_back, list(reversed(active)))):
        for e in order:
            if e.kind == "pockels_cell":
                out = apply_retarder(out, gamma, CELL_AXIS)
                out = out * np.array([1.0, keep, keep, keep])
            else:
                out = apply_retarder(out, 2.0 * math.pi * e.retardance, e.axis_angle)
    return out


def _step(e, gamma, dep) -> np.ndarray:
    if e.kind == "pockels_cell":
        return dep @ mueller(retarder(gamma, CELL_AXIS))
    return mueller(retarder(2.0 * math.pi * e.retardance, e.axis_angle))


# ----- retardance of the cell at the set voltage ------------------------------------------


def nominal_retardance(scheme: str) -> float:
    """Retardance per crossing the scheme needs with the cell on: π/2 (quarter-wave), π (half-wave)."""
    return math.pi / 2 if scheme == "quarter-wave" else math.pi


def crossed_polarizer_transmission(voltage, v_pi: float, contrast: float = math.inf) -> np.ndarray:
    """Transmission of a cell between crossed polarizers from the Jones model.

    P in, cell J(πV/V_π, 45°) (one crossing), analyser passing S.  Without depolarisation it
    equals sin²(πV/(2V_π)) (Yariv & Yeh 1984, ch. 7; Saleh & Teich); a finite contrast C
    adds ≈ 1/C at V = 0.
    """
    g = np.pi * np.asarray(voltage, dtype=float) / v_pi
    m = depolariser(depolarisation_of_contrast(contrast)) @ mueller(retarder(g, CELL_AXIS))
    return s_share(m @ STOKES_P)


__all__ = [
    "CELL_AXIS", "STOKES_P", "STOKES_S", "apply_cell_arm", "apply_retarder", "cell_arm_elements",
    "cell_arm_mueller", "crossed_polarizer_transmission", "depolarisation_of_contrast", "depolariser",
    "mueller", "nominal_retardance", "p_share", "polarizer", "reflected_intensity", "reflected_port",
    "retarder", "rotation", "s_share", "transmitted_port",
]
