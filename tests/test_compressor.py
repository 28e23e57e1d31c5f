import math

import pytest

from regentime.physics.compressor import diffraction_angle, grating_pair_per_separation


def test_treacy_worked_figure():
    # Treacy 1969 formula, worked figure: 1480 /mm, 52 deg, 800 nm -> θd ≈ 23.3°,
    # GDD/G ≈ −5,130 fs²/mm (hand computation from the formula)
    td = diffraction_angle(800e-9, 1480e3, math.radians(52), -1)
    assert math.degrees(td) == pytest.approx(23.3, abs=0.1)
    gdd, tod = grating_pair_per_separation(800e-9, 1480e3, math.radians(52), -1)
    assert gdd * 1e30 / 1e3 == pytest.approx(-5130, rel=0.01)
    assert tod > 0  # grating pairs: TOD of opposite sign to GDD (Treacy 1969)
    with pytest.raises(ValueError):
        diffraction_angle(800e-9, 3000e3, math.radians(10), -1)


def test_treacy_against_numerical_phase_derivative():
    # independent check: the phase across the pair is the normal wave-vector component times
    # the perpendicular separation, φ(ω) = 2 (ω G / c) cos θd(ω) for the double pass (Treacy
    # 1969), θd(ω) from the grating equation; GDD and TOD by finite differences in ω
    import numpy as np
    from scipy.constants import c
    dens, ti, G = 1480e3, math.radians(52), 1.0

    def phi(w):
        s = (2 * math.pi * c / w) * dens - math.sin(ti)  # sin θd, |m| = 1
        return 2 * w * G / c * math.sqrt(1 - s * s)

    w0 = 2 * math.pi * c / 800e-9
    h = w0 * 2e-3
    p = np.array([phi(w0 + k * h) for k in (-2, -1, 0, 1, 2)])
    gdd_num = (-p[0] + 16 * p[1] - 30 * p[2] + 16 * p[3] - p[4]) / (12 * h * h)
    tod_num = (-p[0] + 2 * p[1] - 2 * p[3] + p[4]) / (2 * h ** 3)
    gdd, tod = grating_pair_per_separation(800e-9, dens, ti, -1)
    assert gdd == pytest.approx(gdd_num, rel=1e-3)
    assert tod == pytest.approx(tod_num, rel=1e-2)
