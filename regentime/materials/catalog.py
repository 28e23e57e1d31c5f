"""The material library as plain records (SI, unit in every key), for ``regentime materials``.

Pure data assembly: no formatting, no printing.  Each value comes with its source text and
a flag; the flags are those of docs/references.md:

* ``confirmed`` — as given in the cited source (checked there);
* ``derived`` — computed by us from library values or a definition (J_sat, the zero
  absorption of a four-level line, n and n_g from a formula);
* ``from memory`` — recalled, not checked against the cited source here;
* ``common practice`` — a usual choice of the trade, no source.
"""

from __future__ import annotations

from typing import Any

from regentime.materials.dispersion import (MATERIALS, group_index, in_valid_range,
                                            refractive_index)
from regentime.materials.electrooptic import (EO_CRYSTALS, effective_n3r, half_wave_voltage,
                                              quarter_wave_voltage)
from regentime.materials.gain_media import GAIN_MEDIA, saturation_fluence

#: wavelengths of the index columns of the listing (m): Ti:sapphire and the two Yb/Nd lines
LIST_WAVELENGTHS = (800e-9, 1030e-9, 1064e-9)

CAUTION = ("Caution: regens are Class 4 lasers and Pockels cells run at kilovolts; library "
           "values are defaults, not guarantees. Follow IEC 60825-1 / ANSI Z136.1, IEC 61010-1, "
           "local codes and your site's laser safety officer.")

GAIN_PROPERTIES = ("wavelength", "emission_cross_section", "absorption_cross_section",
                   "upper_state_lifetime", "n2", "damage_fluence", "damage_duration",
                   "doping_density", "host")


_AXIS_WORDS = {"o": "ordinary", "e": "extraordinary"}


def flag_of(source: str) -> str:
    """Flag of one source text (see the module docstring)."""
    s = source.lower()
    if "from memory" in s or "estimate" in s:
        return "from memory"
    if "common practice" in s:
        return "common practice"
    if "confirmed" in s:
        return "confirmed"
    if "four-level" in s:
        return "derived"
    return "from memory"  # a citation without a confirmation is treated as unchecked


def gain_medium_record(key: str) -> dict[str, Any]:
    m = GAIN_MEDIA[key]
    sources = {p: m.sources[p] for p in GAIN_PROPERTIES}
    # the host is a choice of crystal and axis, not a measured value: no flag
    flags = {p: flag_of(sources[p]) for p in GAIN_PROPERTIES if p != "host"}
    sources["saturation_fluence"] = "J_sat = h c/(λ (σ_e + σ_a)) with scipy.constants"
    flags["saturation_fluence"] = "derived"
    return {
        "key": m.key,
        "label": m.label,
        "wavelength_m": m.wavelength,
        "emission_cross_section_m2": m.emission_cross_section,
        "absorption_cross_section_m2": m.absorption_cross_section,
        "upper_state_lifetime_s": m.upper_state_lifetime,
        "saturation_fluence_J_per_m2": saturation_fluence(m),
        "n2_m2_per_W": m.n2,
        "damage_fluence_J_per_m2": m.damage_fluence,
        "damage_duration_s": m.damage_duration,
        "doping_density_per_m3": m.doping_density,
        "host": m.host,
        "axis": m.axis,
        "sources": sources,
        "flags": flags,
    }


def dispersion_record(key: str) -> dict[str, Any]:
    mat = MATERIALS[key]
    indices = []
    for axis in mat.axes:
        for lam in LIST_WAVELENGTHS:
            indices.append({
                "axis": axis,
                "wavelength_m": lam,
                "n": refractive_index(key, lam, axis),
                "group_index": group_index(key, lam, axis),
                "in_valid_range": in_valid_range(key, lam),
            })
    return {
        "key": mat.key,
        "label": mat.label,
        "formula": mat.formula,
        "source": mat.source,
        "flag": mat.flag,
        # JSON has no infinity: an unbounded end is None (vacuum)
        "valid_range_m": [None if v == float("inf") else v for v in mat.valid_range],
        "symmetry": mat.symmetry,
        "axes": {a: mat.axis_names.get(a, _AXIS_WORDS.get(a, a)) for a in mat.axes},
        "default_axis": mat.default_axis,
        "note": mat.note,
        "indices": indices,
    }


def eo_record(key: str) -> dict[str, Any]:
    cr = EO_CRYSTALS[key]
    lam = cr.typical_wavelength
    rec: dict[str, Any] = {
        "key": cr.key,
        "label": cr.label,
        "coefficient_name": cr.coefficient_name,
        "coefficient_m_per_V": cr.coefficient,
        "flag": cr.flag,
        "geometry": cr.geometry,
        "index_axis": cr.index_axis,
        "wavelength_m": lam,
        "n": refractive_index(cr.key, lam, cr.index_axis),
        "effective_n3r_m_per_V": effective_n3r(key, lam),
        "note": cr.note,
        "sources": dict(cr.sources),
    }
    if cr.secondary_name:
        rec["secondary_coefficient_name"] = cr.secondary_name
        rec["secondary_coefficient_m_per_V"] = cr.secondary_coefficient
    if cr.geometry == "longitudinal":
        rec["half_wave_voltage_V"] = half_wave_voltage(key, lam)
        rec["quarter_wave_voltage_V"] = quarter_wave_voltage(key, lam)
    else:
        # V_π for d = L (multiply by d/L for a real cell) and for the example cell
        rec["half_wave_voltage_for_d_equal_L_V"] = half_wave_voltage(key, lam, 1.0, 1.0)
        rec["example_aperture_m"] = cr.example_aperture
        rec["example_length_m"] = cr.example_length
        rec["half_wave_voltage_V"] = half_wave_voltage(key, lam, cr.example_length,
                                                       cr.example_aperture)
        rec["quarter_wave_voltage_V"] = quarter_wave_voltage(key, lam, cr.example_length,
                                                             cr.example_aperture)
    return rec


def catalog() -> dict[str, Any]:
    """Everything: ``gain_media``, ``dispersion``, ``electro_optic`` lists and ``cautions``."""
    return {
        "gain_media": [gain_medium_record(k) for k in GAIN_MEDIA],
        "dispersion": [dispersion_record(k) for k in MATERIALS],
        "electro_optic": [eo_record(k) for k in EO_CRYSTALS],
        "cautions": [CAUTION],
    }


def all_names() -> list[str]:
    return sorted(set(GAIN_MEDIA) | set(MATERIALS) | set(EO_CRYSTALS))


def lookup(name: str) -> dict[str, Any]:
    """The records of one name (a name may be both a dispersion material and an
    electro-optic crystal).  ``ValueError`` listing every known name otherwise."""
    out: dict[str, Any] = {}
    if name in GAIN_MEDIA:
        out["gain_media"] = [gain_medium_record(name)]
        host = GAIN_MEDIA[name].host
        out["dispersion"] = [dispersion_record(host)]
    if name in MATERIALS:
        out["dispersion"] = [dispersion_record(name)]
    if name in EO_CRYSTALS:
        out["electro_optic"] = [eo_record(name)]
    if not out:
        raise ValueError(f"unknown material {name!r}; known names: {', '.join(all_names())}")
    out["cautions"] = [CAUTION]
    return out
