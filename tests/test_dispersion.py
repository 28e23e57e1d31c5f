"""Dispersion library against published formulas and check values (docs/references.md).

Flags as in docs/references.md: [C] confirmed in the cited source; [D] derived by us from the
cited formula (recomputed here from the published coefficients, independently of the
library, and also compared with the number docs/references.md gives).
"""

import math

import numpy as np
import pytest

from regentime.materials import dispersion as d
from regentime.materials.dispersion import MATERIALS, group_index, refractive_index

NM = 1e-9


def sellmeier(lam_um, B, C):
    """Malitson form n² − 1 = Σ B λ²/(λ² − C²), written out independently of the library."""
    x = lam_um ** 2
    return math.sqrt(1.0 + sum(b * x / (x - c * c) for b, c in zip(B, C)))


# ----- fused silica: I. H. Malitson, JOSA 55, 1205 (1965) ---------------------------------
MALITSON_B = (0.6961663, 0.4079426, 0.8974794)
MALITSON_C = (0.0684043, 0.1162414, 9.896161)


def test_fused_silica_sodium_d_line_confirmed():
    # [C] Malitson (1965): n = 1.45846 at 587.6 nm (helium d line)
    assert refractive_index("fused_silica", 587.6 * NM) == pytest.approx(1.45846, abs=1e-5)


def test_fused_silica_800nm_derived():
    # [D] from the Malitson formula: n(800) = 1.45332, n_g(800) = 1.4671 (docs/references.md)
    n_formula = sellmeier(0.8, MALITSON_B, MALITSON_C)
    h = 1e-4  # µm, central difference of the independent formula
    dn = (sellmeier(0.8 + h, MALITSON_B, MALITSON_C)
          - sellmeier(0.8 - h, MALITSON_B, MALITSON_C)) / (2 * h)
    ng_formula = n_formula - 0.8 * dn
    assert refractive_index("fused_silica", 800 * NM) == pytest.approx(n_formula, abs=1e-9)
    assert group_index("fused_silica", 800 * NM) == pytest.approx(ng_formula, abs=1e-7)
    assert n_formula == pytest.approx(1.45332, abs=1e-5)
    assert ng_formula == pytest.approx(1.4671, abs=1e-4)


# ----- sapphire: Malitson & Dodge, JOSA 62, 1405 (1972) -----------------------------------
SAPPHIRE_O = ((1.4313493, 0.65054713, 5.3414021), (0.0726631, 0.1193242, 18.028251))
SAPPHIRE_E = ((1.5039759, 0.55069141, 6.5927379), (0.0740288, 0.1216529, 20.072248))


def test_sapphire_800nm_derived():
    # [D] n_o(800) = 1.76013, n_e(800) = 1.75220, n_g,o(800) = 1.7816 (docs/references.md)
    no = sellmeier(0.8, *SAPPHIRE_O)
    ne = sellmeier(0.8, *SAPPHIRE_E)
    h = 1e-4
    ng = no - 0.8 * (sellmeier(0.8 + h, *SAPPHIRE_O) - sellmeier(0.8 - h, *SAPPHIRE_O)) / (2 * h)
    assert refractive_index("sapphire", 800 * NM, "o") == pytest.approx(no, abs=1e-9)
    assert refractive_index("sapphire", 800 * NM, "e") == pytest.approx(ne, abs=1e-9)
    assert group_index("sapphire", 800 * NM, "o") == pytest.approx(ng, abs=1e-7)
    assert (no, ne) == pytest.approx((1.76013, 1.75220), abs=1e-5)
    assert ng == pytest.approx(1.7816, abs=1e-4)


def test_yag_1064_derived():
    # [D] Zelmon, Small & Page, Appl. Opt. 37, 4933 (1998): n(1064) = 1.81465
    x = 1.064 ** 2
    n = math.sqrt(1 + 2.28200 * x / (x - 0.01185) + 3.27644 * x / (x - 282.734))
    assert refractive_index("yag", 1064 * NM) == pytest.approx(n, abs=1e-9)
    assert n == pytest.approx(1.81465, abs=1e-5)


def test_bbo_1064_derived():
    # [D] Eimerl et al., J. Appl. Phys. 62, 1968 (1987): n_o/n_e(1064) = 1.65513/1.54256
    x = 1.064 ** 2
    no = math.sqrt(2.7405 + 0.0184 / (x - 0.0179) - 0.0155 * x)
    ne = math.sqrt(2.3730 + 0.0128 / (x - 0.0156) - 0.0044 * x)
    assert refractive_index("bbo", 1064 * NM, "o") == pytest.approx(no, abs=1e-9)
    assert refractive_index("bbo", 1064 * NM, "e") == pytest.approx(ne, abs=1e-9)
    assert (no, ne) == pytest.approx((1.65513, 1.54256), abs=1e-5)


def test_kdp_1064_derived():
    # [D] Zernike, JOSA 54, 1215 (1964): n_o/n_e(1064) = 1.4938/1.4599
    x = 1.064 ** 2
    no = math.sqrt(2.259276 + 0.01008956 / (x - 0.0129426) + 13.00522 * x / (x - 400))
    ne = math.sqrt(2.132668 + 0.008637494 / (x - 0.0122810) + 3.2279924 * x / (x - 400))
    assert refractive_index("kdp", 1064 * NM, "o") == pytest.approx(no, abs=1e-9)
    assert refractive_index("kdp", 1064 * NM, "e") == pytest.approx(ne, abs=1e-9)
    assert (no, ne) == pytest.approx((1.4938, 1.4599), abs=1e-4)


def test_caf2_1030_derived():
    # [D] Malitson, Appl. Opt. 2, 1103 (1963): n(1030) = 1.4287
    n = sellmeier(1.03, (0.5675888, 0.4710914, 3.8484723), (0.050263605, 0.1003909, 34.649040))
    assert refractive_index("caf2", 1030 * NM) == pytest.approx(n, abs=1e-9)
    assert n == pytest.approx(1.4287, abs=1e-4)


@pytest.mark.parametrize("lam_nm", [800, 1030, 1064])
def test_air_group_index_near_1_0003(lam_nm):
    # docs/references.md: air group index ≈ 1.0003 in the near infrared (Ciddor 1996 standard
    # air); n − 1 of dry air at 15 °C is 2.7e-4 to 2.8e-4 here (Ciddor, from memory).
    ng = group_index("air", lam_nm * NM)
    n = refractive_index("air", lam_nm * NM)
    assert 1.00027 < ng < 1.00030
    assert 2.7e-4 < n - 1 < 2.8e-4
    assert ng > n  # normal dispersion


def test_air_matches_ciddor_two_term_form():
    # Ciddor (1996) eq. (1), written with σ = 1/λ (µm⁻¹) as in the paper (from memory).
    sigma2 = 1 / 0.6328 ** 2
    n = 1 + 1e-8 * (5792105 / (238.0185 - sigma2) + 167917 / (57.362 - sigma2))
    assert refractive_index("air", 632.8 * NM) == pytest.approx(n, abs=1e-12)


def test_vacuum_is_exactly_one():
    # definition: n = n_g = 1
    assert refractive_index("vacuum", 800 * NM) == 1.0
    assert group_index("vacuum", 1064 * NM) == 1.0


def test_quartz_ordinary_index_sodium_line():
    # handbook value (from memory): crystalline quartz n_o = 1.5443, n_e = 1.5534 at 589.3 nm
    assert refractive_index("quartz", 589.3 * NM, "o") == pytest.approx(1.5443, abs=2e-4)
    assert refractive_index("quartz", 589.3 * NM, "e") == pytest.approx(1.5534, abs=2e-4)


def test_yvo4_matches_tabulated_indices():
    # Tabulated n_o/n_e of YVO4 at 1.30 and 1.55 µm (Wikipedia "Yttrium orthovanadate",
    # secondary source): 1.9500/2.1554 and 1.9447/2.1486.  Checks our transcription.
    assert refractive_index("yvo4", 1.30e-6, "o") == pytest.approx(1.9500, abs=2e-4)
    assert refractive_index("yvo4", 1.30e-6, "e") == pytest.approx(2.1554, abs=2e-4)
    assert refractive_index("yvo4", 1.55e-6, "o") == pytest.approx(1.9447, abs=2e-4)
    assert refractive_index("yvo4", 1.55e-6, "e") == pytest.approx(2.1486, abs=2e-4)


def test_kgw_reproduces_its_633nm_anchor_points():
    # KGW principal indices at 633 nm: n_p = 2.0135, n_m = 2.0458, n_g = 2.0860
    # (Appl. Opt. 51, 2951 (2012), abstract) — the points the approximation was fitted to.
    for axis, n in (("p", 2.0135), ("m", 2.0458), ("g", 2.0860)):
        assert refractive_index("kgw", 632.8e-9, axis) == pytest.approx(n, abs=3e-4)


def test_ylf_indices_near_1_micron():
    # from memory: YLF n_o ≈ 1.448, n_e ≈ 1.470 near 1.05 µm (Barnes & Gettemy 1980)
    assert refractive_index("ylf", 1053 * NM, "o") == pytest.approx(1.448, abs=1e-3)
    assert refractive_index("ylf", 1047 * NM, "e") == pytest.approx(1.470, abs=1e-3)


# ----- group index = n − λ dn/dλ against a numerical derivative, every material, every axis --

CASES = [(key, axis) for key, mat in MATERIALS.items() for axis in mat.axes]


@pytest.mark.parametrize("key,axis", CASES)
def test_group_index_matches_central_difference(key, axis):
    # Definition n_g = n − λ dn/dλ (Saleh & Teich, Fundamentals of Photonics, ch. 5);
    # dn/dλ by a central difference of the library's own n(λ), step 0.01 nm
    # (on n_g: truncation ≈ λ h² n'''/6, far below 1e-12; rounding ≈ ε n λ/h ≈ 3e-11).
    lo, hi = MATERIALS[key].valid_range
    for lam in (800e-9, 1030e-9, 1064e-9):
        if not lo <= lam <= hi:
            lam = min(max(lam, lo * 1.05), hi / 1.05)
        h = 1e-11
        dn = (refractive_index(key, lam + h, axis) - refractive_index(key, lam - h, axis)) / (2 * h)
        expected = refractive_index(key, lam, axis) - lam * dn
        assert group_index(key, lam, axis) == pytest.approx(expected, abs=2e-7)
        assert d.dn_dlambda(key, lam, axis) == pytest.approx(dn, rel=1e-4, abs=1e-3)


@pytest.mark.parametrize("key", [k for k in MATERIALS if k != "vacuum"])
def test_normal_dispersion_in_the_near_infrared(key):
    # Transparent dielectrics have normal dispersion (n_g > n) in the near infrared
    # (any optics text, e.g. Saleh & Teich ch. 5).
    mat = MATERIALS[key]
    for axis in mat.axes:
        assert group_index(key, 1030e-9, axis) > refractive_index(key, 1030e-9, axis)


def test_arrays_in_arrays_out():
    lam = np.array([800e-9, 1030e-9, 1064e-9])
    n = refractive_index("yag", lam)
    assert isinstance(n, np.ndarray) and n.shape == (3,)
    assert n[1] == pytest.approx(refractive_index("yag", 1030e-9), abs=1e-15)
    assert isinstance(refractive_index("yag", 1030e-9), float)


def test_unknown_material_lists_valid_keys():
    with pytest.raises(ValueError, match="unknown material 'unobtainium'.*fused_silica"):
        refractive_index("unobtainium", 800e-9)


def test_unknown_axis_is_named():
    with pytest.raises(ValueError, match="unknown axis 'e' for kgw; valid axes: p, m, g"):
        refractive_index("kgw", 1030e-9, "e")
    with pytest.raises(ValueError, match="unknown axis 'z' for bbo"):
        refractive_index("bbo", 1030e-9, "z")


def test_isotropic_ignores_axis_and_biaxial_default():
    assert refractive_index("yag", 1030e-9, "e") == refractive_index("yag", 1030e-9, "o")
    assert refractive_index("kgw", 1030e-9) == refractive_index("kgw", 1030e-9, "m")
    assert refractive_index("rtp", 1064e-9) == refractive_index("rtp", 1064e-9, "y")


@pytest.mark.parametrize("bad", [0.0, -800e-9, float("nan"), 800.0])
def test_bad_wavelength_raises(bad):
    with pytest.raises(ValueError, match="wavelength"):
        refractive_index("yag", bad)


def test_every_entry_has_source_flag_and_range():
    required = {"yag", "sapphire", "bbo", "kdp", "dkdp", "rtp", "fused_silica", "caf2",
                "quartz", "air", "vacuum", "ylf", "yvo4", "kgw"}
    assert required <= set(MATERIALS)
    for key, mat in MATERIALS.items():
        assert mat.key == key
        assert mat.source.strip() and mat.formula.strip() and mat.label.strip()
        assert mat.flag in {"confirmed", "derived", "from memory", "exact"}
        lo, hi = mat.valid_range
        assert 0 <= lo < hi
        assert mat.default_axis in mat.axes
        if mat.flag == "from memory":
            assert "memory" in mat.source or "approximation" in mat.source
