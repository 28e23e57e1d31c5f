"""Gain-media library: saturation fluences from scipy.constants, sources for every value."""

import dataclasses

import pytest
from scipy.constants import c, h

from regentime.materials.dispersion import MATERIALS
from regentime.materials.gain_media import (GAIN_MEDIA, get_medium, saturation_fluence,
                                            transparency_fluence)
from regentime.model import GainMedium

J_PER_CM2 = 1e4  # J/m² per J/cm²


def test_ti_sapphire_saturation_fluence_derived():
    # [D] docs/references.md: hν/σ with σ = 3.0e-19 cm² at 800 nm → 0.828 J/cm²
    expected = h * c / 800e-9 / 3.0e-23
    assert saturation_fluence("ti_sapphire") == pytest.approx(expected, rel=1e-12)
    assert expected / J_PER_CM2 == pytest.approx(0.828, abs=1e-3)


def test_nd_yag_saturation_fluence_derived():
    # [D] docs/references.md: Nd:YAG, 2.8e-19 cm² at 1064 nm → 0.667 J/cm²
    expected = h * c / 1064e-9 / 2.8e-23
    assert saturation_fluence("nd_yag") == pytest.approx(expected, rel=1e-12)
    assert expected / J_PER_CM2 == pytest.approx(0.667, abs=1e-3)


def test_yb_yag_quasi_three_level_saturation_fluence_derived():
    # [D] docs/references.md: J_sat = hν/(σ_e + σ_a), 2.0e-20 + 0.12e-20 cm² at 1030 nm → 9.10 J/cm²
    expected = h * c / 1030e-9 / (2.0e-24 + 0.12e-24)
    assert saturation_fluence("yb_yag") == pytest.approx(expected, rel=1e-12)
    assert expected / J_PER_CM2 == pytest.approx(9.10, abs=0.01)


def test_saturation_fluence_accepts_a_medium_and_another_wavelength():
    m = dataclasses.replace(GAIN_MEDIA["ti_sapphire"], emission_cross_section=4.0e-23)
    # J_sat ∝ 1/σ and ∝ 1/λ (definition hν/σ)
    assert saturation_fluence(m) == pytest.approx(saturation_fluence("ti_sapphire") * 0.75)
    assert saturation_fluence("ti_sapphire", 760e-9) == pytest.approx(
        saturation_fluence("ti_sapphire") * 800 / 760)


def test_transparency_fluence():
    # J_tr = J_sat σ_a N_t L (docs/definitions.md gain law, zero gain at N₂/N_t = σ_a/(σ_e+σ_a)).
    m = GAIN_MEDIA["yb_yag"]
    L = 2e-3
    expected = h * c / m.wavelength * L * m.doping_density * (
        m.absorption_cross_section / (m.emission_cross_section + m.absorption_cross_section))
    assert transparency_fluence("yb_yag", L) == pytest.approx(expected, rel=1e-12)
    assert transparency_fluence("nd_yag", L) == 0.0  # four-level
    with pytest.raises(ValueError, match="length"):
        transparency_fluence("yb_yag", -1.0)


def test_bad_inputs():
    with pytest.raises(ValueError, match="unknown gain medium 'nd_glass'.*ti_sapphire"):
        get_medium("nd_glass")
    with pytest.raises(ValueError, match="wavelength"):
        saturation_fluence("nd_yag", 0.0)
    zero = dataclasses.replace(GAIN_MEDIA["nd_yag"], emission_cross_section=0.0)
    with pytest.raises(ValueError, match="positive"):
        saturation_fluence(zero)


def test_library_keys_and_types():
    assert set(GAIN_MEDIA) == {"ti_sapphire", "nd_yag", "nd_ylf", "nd_yvo4", "yb_yag",
                               "yb_kgw", "yb_caf2"}
    for key, m in GAIN_MEDIA.items():
        assert isinstance(m, GainMedium) and m.key == key


PROPERTIES = ("wavelength", "emission_cross_section", "absorption_cross_section",
              "upper_state_lifetime", "n2", "damage_fluence", "damage_duration",
              "doping_density", "host")


@pytest.mark.parametrize("key", sorted(GAIN_MEDIA))
def test_every_property_has_a_source(key):
    m = GAIN_MEDIA[key]
    for prop in PROPERTIES:
        assert m.sources.get(prop, "").strip(), f"{key}.{prop} has no source"


@pytest.mark.parametrize("key", sorted(GAIN_MEDIA))
def test_values_are_physical_and_host_is_in_dispersion_library(key):
    # Broad physical bounds (orders of magnitude of solid-state laser media, Koechner ch. 2):
    m = GAIN_MEDIA[key]
    assert 700e-9 < m.wavelength < 1100e-9
    assert 1e-25 < m.emission_cross_section < 1e-21  # 1e-21 .. 1e-17 cm²
    assert 0 <= m.absorption_cross_section < m.emission_cross_section
    assert 1e-6 < m.upper_state_lifetime < 1e-2
    assert 1e-21 < m.n2 < 1e-18
    assert 1e3 < m.damage_fluence < 1e6 and 1e-12 < m.damage_duration < 1e-6
    assert 1e24 < m.doping_density < 1e28
    assert m.host in MATERIALS and m.axis in MATERIALS[m.host].axes


def test_quasi_three_level_media_have_absorption_at_the_laser_line():
    # Yb media lase into the thermally populated ground manifold (quasi-three-level,
    # Koechner ch. 3); Nd and Ti media are four-level at these lines.
    for key, m in GAIN_MEDIA.items():
        if key.startswith("yb_"):
            assert m.absorption_cross_section > 0
        else:
            assert m.absorption_cross_section == 0


def test_yb_yag_doping_typical_value():
    # brief / common practice: Yb:YAG 10 at.% ≈ 1.38e27 m^-3 (YAG has 1.38e22 Y sites per cm³,
    # from memory)
    assert GAIN_MEDIA["yb_yag"].doping_density == pytest.approx(1.38e27, rel=1e-3)
