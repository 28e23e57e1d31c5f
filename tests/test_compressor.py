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
