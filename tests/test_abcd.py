"""Cavity mode from ABCD matrices checked against closed forms from the literature."""

import math

import pytest

from regentime.physics.abcd import (
    Item,
    cavity_mode,
    interface,
    mirror_focal_lengths,
    multiply,
    space,
    thermal_focal_length,
)

LAMBDA = 1030e-9


def test_two_mirror_resonator_against_kogelnik_li():
    # Kogelnik & Li, Appl. Opt. 5, 1550 (1966), eqs. for a two-mirror resonator:
    # g_i = 1 − L/R_i, half trace 2·g1·g2 − 1, w1² = (λL/π)·sqrt(g2 / (g1(1 − g1 g2))).
    L, r1, r2 = 0.8, 2.0, 1.5
    g1, g2 = 1 - L / r1, 1 - L / r2
    mode = cavity_mode((Item("gap", L),), r1 / 2, r2 / 2, LAMBDA)
    assert mode.stable
    assert mode.half_trace == pytest.approx(2 * g1 * g2 - 1, rel=1e-12)
    w1 = math.sqrt(LAMBDA * L / math.pi * math.sqrt(g2 / (g1 * (1 - g1 * g2))))
    w2 = math.sqrt(LAMBDA * L / math.pi * math.sqrt(g1 / (g2 * (1 - g1 * g2))))
    radii = dict(mode.radii)
    assert radii["end mirror 1"] == pytest.approx(w1, rel=1e-9)
    assert radii["gap"] == pytest.approx(w2, rel=1e-9)


@pytest.mark.parametrize("length,stable", [(0.5, True), (1.9, True), (2.1, False), (4.5, False)])
def test_g_parameter_stability(length, stable):
    # Kogelnik & Li (1966): stable when 0 < g1·g2 < 1; here R1 = R2 = 1 m, so 0 < L < 2 m.
    g = 1 - length / 1.0
    assert (0 < g * g < 1) == stable
    assert cavity_mode((Item("gap", length),), 0.5, 0.5, LAMBDA).stable == stable


def test_flat_concave_waist_closed_form():
    # Flat–concave cavity: the waist sits on the flat mirror, w0² = (λ/π)·sqrt(L(R − L))
    # (Siegman, Lasers, ch. 19.1).
    L, R = 0.3, 1.0
    mode = cavity_mode((Item("gap", L),), math.inf, R / 2, LAMBDA)
    w0 = math.sqrt(LAMBDA / math.pi * math.sqrt(L * (R - L)))
    assert dict(mode.radii)["end mirror 1"] == pytest.approx(w0, rel=1e-9)


def test_thin_lens_in_flat_flat_cavity():
    # Flat – d – lens f – d – flat: by symmetry the beam curvature at the lens is 2f, so
    # z_R² = d(2f − d) and w0² = (λ/π)·sqrt(d(2f − d)) on the flat mirrors
    # (Gaussian-beam curvature R(z) = z(1 + z_R²/z²), Siegman, Lasers, ch. 17).
    d, f = 0.4, 0.5
    items = (Item("arm 1", d), Item("lens", 0.0, f), Item("arm 2", d))
    mode = cavity_mode(items, math.inf, math.inf, LAMBDA)
    w0 = math.sqrt(LAMBDA / math.pi * math.sqrt(d * (2 * f - d)))
    radii = dict(mode.radii)
    assert radii["end mirror 1"] == pytest.approx(w0, rel=1e-9)
    assert radii["arm 2"] == pytest.approx(w0, rel=1e-9)
    # Beyond d = 2f the lens can no longer refocus: unstable.
    assert not cavity_mode((Item("a", 1.1), Item("l", 0.0, f), Item("b", 1.1)),
                           math.inf, math.inf, LAMBDA).stable


def test_reduced_distance_equals_slab_with_refraction():
    # A slab of index n and length L between two flat faces: interface(1→n)·space(L)·
    # interface(n→1) = [[1, L/n], [0, 1]] (Siegman, Lasers, ch. 15.1).
    n, L = 1.82, 0.02
    slab = multiply(interface(n, 1.0), space(L), interface(1.0, n))
    assert slab == pytest.approx(space(L / n), abs=1e-15)


def test_fold_mirror_focal_lengths():
    # Kogelnik et al., IEEE J. Quantum Electron. 8, 373 (1972): f_t = R cosθ/2, f_s = R/(2cosθ).
    ft, fs = mirror_focal_lengths(1.0, math.radians(60))
    assert ft == pytest.approx(0.25)
    assert fs == pytest.approx(1.0)
    assert mirror_focal_lengths(1.0) == (0.5, 0.5)


def test_thermal_lens_formula():
    # Innocenzi et al., Appl. Phys. Lett. 56, 1831 (1990): f = π K w_p² / (P_heat dn/dT).
    # Nd:YAG values from memory: K ≈ 13 W/(m·K), dn/dT ≈ 7.3e-6 /K; 10 W heat, w_p = 0.5 mm
    # gives π·13·2.5e-7/(10·7.3e-6) ≈ 0.13987 m.
    f = thermal_focal_length(10.0, 13.0, 7.3e-6, 0.5e-3)
    assert f == pytest.approx(0.13987, rel=1e-4)
    assert thermal_focal_length(0.0, 13.0, 7.3e-6, 0.5e-3) == math.inf
    # Doubling the heat halves the focal length.
    assert thermal_focal_length(20.0, 13.0, 7.3e-6, 0.5e-3) == pytest.approx(f / 2)


def _flat_flat_with_lens(d1, d2, f):
    return cavity_mode((Item("arm 1", d1), Item("rod", 0.0, f), Item("arm 2", d2)),
                       math.inf, math.inf, LAMBDA)


def test_stable_range_two_zones_flat_flat_thermal_lens():
    # Flat – d1 – lens f – d2 – flat has g1 = 1 − d2/f, g2 = 1 − d1/f (equivalent-resonator
    # g-parameters, Magni, Appl. Opt. 25, 107 (1986), citation from memory);
    # 0 < g1 g2 < 1 gives two zones in 1/f: (0, 1/max(d)) and (1/min(d), 1/d1 + 1/d2).
    # The thermal lens is 1/f = P_heat·dn/dT/(π K w_p²).
    from regentime.physics.abcd import stable_ranges

    d1, d2, k, dndt, wp = 0.3, 0.6, 13.0, 7.3e-6, 0.5e-3
    per_watt = dndt / (math.pi * k * wp**2)  # 1/f per W of heat

    def m(p):
        return _flat_flat_with_lens(d1, d2, thermal_focal_length(p, k, dndt, wp)).half_trace

    zones = stable_ranges(m, 1e-3, 40.0)
    expected = [(1e-3, 1 / d2 / per_watt), (1 / d1 / per_watt, (1 / d1 + 1 / d2) / per_watt)]
    assert len(zones) == 2
    for (lo, hi), (elo, ehi) in zip(zones, expected):
        assert lo == pytest.approx(elo, rel=1e-6)
        assert hi == pytest.approx(ehi, rel=1e-6)


def test_stable_range_none_when_never_stable():
    from regentime.physics.abcd import stable_ranges

    assert stable_ranges(lambda p: 1.5 + p, 0.0, 10.0) == ()


def test_near_edge_within_ten_percent():
    # Warning rule (common practice): within 10 % of a zone's width from an edge.
    from regentime.physics.abcd import near_edge

    zones = ((0.0, 10.0), (20.0, 30.0))
    assert near_edge(9.5, zones)
    assert near_edge(20.5, zones)
    assert not near_edge(5.0, zones)
    assert not near_edge(15.0, zones)  # outside every zone: unstable, not "near"


def test_brewster_crystal_and_fold_give_elliptic_mode():
    # Brewster plate: d_t = L/n³, d_s = L/n (Kogelnik et al., IEEE J. Quantum Electron. 8,
    # 373 (1972)).  Each plane must equal the closed-form flat–concave waist
    # w0² = (λ/π)·sqrt(L(R − L)) with its own reduced length and mirror focal length.
    from regentime.physics.abcd import brewster_reduced_distances, two_plane_mode

    n, crystal, air, r, theta = 1.76, 0.02, 0.25, 1.0, math.radians(10)
    dt, ds = brewster_reduced_distances(crystal, n)
    assert (dt, ds) == pytest.approx((crystal / n**3, crystal / n))
    ft, fs = mirror_focal_lengths(r, theta)
    mode = two_plane_mode((Item("rod", dt), Item("air", air)), (Item("rod", ds), Item("air", air)),
                          (math.inf, math.inf), (ft, fs), LAMBDA)
    assert mode.stable
    w_t = math.sqrt(LAMBDA / math.pi * math.sqrt((dt + air) * (2 * ft - dt - air)))
    w_s = math.sqrt(LAMBDA / math.pi * math.sqrt((ds + air) * (2 * fs - ds - air)))
    name, big, ell = mode.radii[0]
    assert name == "end mirror 1"
    assert big == pytest.approx(max(w_t, w_s), rel=1e-9)
    assert ell == pytest.approx(min(w_t, w_s) / max(w_t, w_s), rel=1e-9)
    assert ell < 1.0
