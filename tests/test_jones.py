"""Jones calculus of the cell arm against textbook results (sources named beside each check)."""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest

import _switch_cavity as tc  # noqa: E402

from regentime.planning import cell_model
from regentime.materials.electrooptic import half_wave_voltage, quarter_wave_voltage  # noqa: E402
from regentime.physics import jones  # noqa: E402
from regentime.planning.optics import cavity_optics  # noqa: E402


def test_crossed_polarizers_follow_sin_squared_law():
    # Electro-optic modulator between crossed polarizers: T = sin²(πV/(2V_π))
    # (A. Yariv & P. Yeh, Optical Waves in Crystals, 1984, ch. 7; Saleh & Teich, Fundamentals
    # of Photonics, ch. 20) — from the pure Jones product analyser · cell · polarizer.
    v_pi = 7700.0
    volts = np.linspace(0.0, 2.0 * v_pi, 41)
    e_in = np.array([1.0, 0.0])  # P after the input polarizer
    analyser = jones.polarizer(0.0, 1.0)  # passes S only: crossed
    got = []
    for v in volts:
        e = analyser @ jones.retarder(math.pi * v / v_pi, math.pi / 4) @ jones.polarizer(1.0, 0.0) @ e_in
        got.append(float(np.sum(np.abs(e) ** 2)))
    np.testing.assert_allclose(got, np.sin(np.pi * volts / (2 * v_pi)) ** 2, atol=1e-12)
    # the same law through the Mueller form used for depolarisation
    np.testing.assert_allclose(jones.crossed_polarizer_transmission(volts, v_pi),
                               np.sin(np.pi * volts / (2 * v_pi)) ** 2, atol=1e-12)


def test_static_contrast_is_the_crossed_polarizer_leak_at_zero_volts():
    # Definition of a cell's static contrast (common practice): crossed/parallel transmission
    # with no voltage = 1/C.
    for c in (100.0, 1000.0, 3e4):
        assert jones.crossed_polarizer_transmission(0.0, 5000.0, contrast=c) == pytest.approx(1 / c, rel=1e-12)


def test_closed_form_mueller_matches_jones_conversion():
    # Linear-retarder Mueller matrix (closed form, e.g. Goldstein, Polarized Light, ch. 6 —
    # from memory) against the Jones → Mueller conversion M = A (J ⊗ J*) A⁻¹.
    rng = np.random.default_rng(3)
    for _ in range(20):
        g, th = rng.uniform(-7, 7), rng.uniform(-3, 3)
        s = rng.normal(size=4)
        np.testing.assert_allclose(jones.apply_retarder(s, g, th), jones.mueller(jones.retarder(g, th)) @ s,
                                   atol=1e-12)


def test_quarter_wave_plate_double_pass_turns_p_into_s():
    # Standard result (Yariv & Yeh ch. 5): a quarter-wave plate at 45° crossed twice acts as a
    # half-wave plate at 45° and rotates linear polarisation by 90°.
    j = jones.retarder(math.pi / 2, math.pi / 4)
    e = j @ j @ np.array([1.0, 0.0])
    assert abs(e[1]) ** 2 == pytest.approx(1.0, abs=1e-12)
    assert abs(e[0]) ** 2 == pytest.approx(0.0, abs=1e-12)


def test_retarders_compose_like_one_of_summed_retardance():
    # Coaxial retarders add their retardances (Jones 1941; Yariv & Yeh ch. 5).
    a = jones.retarder(0.3, 0.4) @ jones.retarder(1.1, 0.4)
    np.testing.assert_allclose(a, jones.retarder(1.4, 0.4), atol=1e-12)


def test_pockels_voltages_from_r63_and_r22_match_references():
    # docs/references.md [D]: KD*P λ/4 voltage at 1064 nm ≈ 3.3 kV; BBO V_π at 1030 nm with d/L = 3/20
    # ≈ 7.7 kV; published coefficients are ±15 % (M. J. Weber, Handbook of Optical Materials).
    assert quarter_wave_voltage("dkdp", 1064e-9) == pytest.approx(3.3e3, rel=0.15)
    assert half_wave_voltage("bbo", 1030e-9, length=20e-3, aperture=3e-3) == pytest.approx(7.7e3, rel=0.15)


def test_full_retardance_from_voltage_and_crystal_when_no_wave_voltage_given():
    # Only `voltage:` given: Γ = π V / V_π with V_π from the crystal (Yariv & Yeh ch. 7).  A BBO
    # cell, d/L = 3/20 at 1030 nm, driven at 3.85 kV (half of the ≈ 7.7 kV of docs/references.md [D])
    # is a quarter-wave cell within the published ±15 %.
    cav = tc.load(voltage="voltage: 3.85 kV, aperture: 3 mm, ")
    cell = cav.elements_of(__import__("regentime.model", fromlist=["PockelsCell"]).PockelsCell)[0]
    cell = replace(cell, length=20e-3)
    cav = replace(cav, wavelength=1030e-9)
    assert cell_model.full_retardance(cav, cell) == pytest.approx(math.pi / 2, rel=0.15)
    # and with a quarter-wave voltage in the file, Γ scales linearly with the applied voltage
    cav2 = tc.load(voltage="quarter_wave_voltage: 3.4 kV, voltage: 3.57 kV, ")
    assert cell_model.full_retardance(cav2) == pytest.approx(math.pi / 2 * 3.57 / 3.4, rel=1e-12)


def test_leak_per_return_ideal_cell_is_reflection_over_extinction():
    # docs/definitions.md "Contrast": a purely P-polarised pulse leaks reflection_s/extinction_ratio.
    cav = tc.load(contrast=1e9, er=500)
    optics = cavity_optics(cav)
    assert cell_model.leak_per_return(cav, optics) == pytest.approx(0.995 / 500, rel=1e-5)


def test_leak_per_return_adds_the_cell_contrast():
    # Definition of contrast (common practice): each crossing leaks 1/C into S, two crossings per
    # return ≈ 2/C, reflected with R_s; with a near-ideal polarizer (ER = 1e9).
    cav = tc.load(contrast=1000, er=1e9)
    optics = cavity_optics(cav)
    assert cell_model.leak_per_return(cav, optics) == pytest.approx(0.995 * 2 / 1000, rel=2e-3)


def test_seed_return_shares_with_ideal_optics():
    # With ideal optics (C, ER = 1e9, the largest the file takes) the quarter-wave cell arm returns the seed after one round
    # trip with R_s (in) · T_p² · R_s (out); the half-wave one reflects it straight back, R_s².
    # (Polarizer factors from the file: T_p = 98 %, R_s = 99.5 %; docs/definitions.md "Contrast".)
    qw = tc.load(contrast=1e9, er=1e9)
    assert cell_model.seed_return_share(qw, cavity_optics(qw)) == pytest.approx(0.995 ** 2 * 0.98 ** 2, rel=1e-6)
    hw = tc.load(scheme="half-wave", contrast=1e9, er=1e9)
    assert cell_model.seed_return_share(hw, cavity_optics(hw)) == pytest.approx(0.995 ** 2, rel=1e-6)
    straight, _ = cell_model.seed_return_shares(qw, cavity_optics(qw))
    assert straight == pytest.approx(0.0, abs=1e-8)


def test_trapped_pass_leak_versus_voltage_error():
    # Derived [D] from the coaxial-retarder sum (Yariv & Yeh ch. 5): quarter-wave scheme, cell
    # at Γ = (π/2)(1+ε) plus the plate: double-pass retardance 2π + πε → S share sin²(πε/2);
    # half-wave scheme: 2π(1+ε) → sin²(πε).
    for scheme, k in (("quarter-wave", 0.5), ("half-wave", 1.0)):
        cav = tc.load(scheme=scheme, contrast=1e9)
        optics = cavity_optics(cav)
        for eps in (0.01, 0.05, 0.1):
            g = cell_model.full_retardance(cav) * (1 + eps)
            out = jones.cell_arm_mueller(optics.cell_arm, g, g, math.inf) @ jones.STOKES_P
            assert float(jones.s_share(out)) == pytest.approx(math.sin(k * math.pi * eps) ** 2, rel=1e-9)
