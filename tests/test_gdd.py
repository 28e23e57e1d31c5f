"""Material GDD/TOD/FOD from the analytic derivatives of the dispersion formulas."""

import numpy as np
import pytest

from regentime.materials.dispersion import refractive_index
from regentime.physics.gdd import index_derivatives, material_dispersion

LAM = 800e-9


def test_fused_silica_gdd_tod_at_800nm():
    # Malitson, JOSA 55, 1205 (1965) Sellmeier: GDD 36.16 fs²/mm, TOD 27.4 fs³/mm at 800 nm
    # (the figures commonly tabulated from that formula, e.g. refractiveindex.info; from memory)
    d = material_dispersion("fused_silica", LAM, 1e-3)
    assert d.gdd * 1e30 == pytest.approx(36.16, rel=0.005)
    assert d.tod * 1e45 == pytest.approx(27.4, rel=0.02)


def test_sapphire_and_bbo_gdd_at_800nm():
    # sapphire (Malitson & Dodge 1972), ordinary ray: ≈ 58 fs²/mm at 800 nm (tabulated, from
    # memory); BBO (Eimerl et al. 1987) ordinary: ≈ 72 fs²/mm (from memory)
    assert material_dispersion("sapphire", LAM, 1e-3, "o").gdd * 1e30 == pytest.approx(58.0, rel=0.02)
    assert material_dispersion("bbo", LAM, 1e-3, "o").gdd * 1e30 == pytest.approx(71.9, rel=0.02)


@pytest.mark.parametrize("material,axis", [("fused_silica", "o"), ("sapphire", "e"),
                                           ("bbo", "o"), ("kdp", "e"), ("air", "o"),
                                           ("quartz", "o")])
def test_analytic_derivatives_match_finite_differences(material, axis):
    # independent check: numpy finite differences of n(λ) (5- and 7-point central stencils)
    d = index_derivatives(material, LAM, axis)
    h = 2e-9
    lam = LAM + h * np.arange(-3, 4)
    n = np.array([refractive_index(material, x, axis) for x in lam])
    d2 = (-n[1] + 16 * n[2] - 30 * n[3] + 16 * n[4] - n[5]) / (12 * h ** 2)
    d3 = (n[0] - 8 * n[1] + 13 * n[2] - 13 * n[4] + 8 * n[5] - n[6]) / (8 * h ** 3)
    d4 = (-n[0] + 12 * n[1] - 39 * n[2] + 56 * n[3] - 39 * n[4] + 12 * n[5] - n[6]) / (6 * h ** 4)
    assert d[0] == pytest.approx(n[3], rel=1e-12)
    assert d[2] == pytest.approx(d2, rel=1e-5)
    assert d[3] == pytest.approx(d3, rel=1e-3)
    assert d[4] == pytest.approx(d4, rel=2e-2)


def test_gdd_against_numerical_phase_derivative():
    # definition GDD = d²(n ω L / c)/dω², by finite differences in ω (scipy.constants.c)
    from scipy.constants import c
    L = 5e-3
    w0 = 2 * np.pi * c / LAM
    dw = w0 * 1e-3
    phi = [refractive_index("sapphire", 2 * np.pi * c / w, "e") * w * L / c
           for w in (w0 - dw, w0, w0 + dw)]
    gdd_num = (phi[0] - 2 * phi[1] + phi[2]) / dw ** 2
    assert material_dispersion("sapphire", LAM, L, "e").gdd == pytest.approx(gdd_num, rel=1e-3)


def test_waveplate_mean_and_errors():
    o = material_dispersion("quartz", LAM, 1e-3, "o").gdd
    e = material_dispersion("quartz", LAM, 1e-3, "e").gdd
    assert material_dispersion("quartz", LAM, 1e-3, "mean").gdd == pytest.approx((o + e) / 2)
    with pytest.raises(ValueError):
        material_dispersion("bbo", LAM, 1e-3, "z")
    assert material_dispersion("vacuum", LAM, 1.0).gdd == 0.0
