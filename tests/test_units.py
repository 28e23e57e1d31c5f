"""Unit parser and formatter, checked against scipy.constants (SI prefixes, degree) and, where
installed, against the pint unit library as an independent oracle."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as sc

from regentime.errors import InputError
from regentime.units import DIMENSIONS, format_quantity, parse_quantity

# SI prefix values from scipy.constants (the SI brochure's prefixes)
PREFIX = {"f": sc.femto, "p": sc.pico, "n": sc.nano, "u": sc.micro, "µ": sc.micro,
          "μ": sc.micro, "m": sc.milli, "k": sc.kilo, "M": sc.mega, "G": sc.giga, "T": sc.tera}


@pytest.mark.parametrize("prefix", sorted(PREFIX))
@pytest.mark.parametrize("base,dimension", [("s", "time"), ("J", "energy"), ("W", "power"),
                                            ("V", "voltage"), ("m", "length")])
def test_prefix_table_matches_scipy(prefix, base, dimension):
    assert parse_quantity(f"2.5 {prefix}{base}", dimension) == pytest.approx(
        2.5 * PREFIX[prefix], rel=1e-15)


@pytest.mark.parametrize("text,dimension,si", [
    ("250 mm", "length", 250 * sc.milli),
    ("250mm", "length", 250 * sc.milli),
    ("1.5 m", "length", 1.5),
    ("800 nm", "length", 800 * sc.nano),
    ("3.5 ns", "time", 3.5 * sc.nano),
    ("3.2 us", "time", 3.2 * sc.micro),
    ("3.2 µs", "time", 3.2 * sc.micro),  # U+00B5 MICRO SIGN
    ("3.2 μs", "time", 3.2 * sc.micro),  # U+03BC GREEK SMALL LETTER MU
    ("150 fs", "time", 150 * sc.femto),
    ("1e-3 s", "time", 1e-3),
    ("+2 ps", "time", 2 * sc.pico),
    (".5 ns", "time", 0.5 * sc.nano),
    ("9 mJ", "energy", 9 * sc.milli),
    ("30 W", "power", 30.0),
    ("1 kHz", "frequency", 1e3),
    ("80 MHz", "frequency", 80e6),
    ("0.9 J/cm^2", "fluence", 0.9 / sc.centi ** 2),
    ("0.9 J/cm²", "fluence", 0.9 / sc.centi ** 2),
    ("900 mJ/cm^2", "fluence", 0.9 / sc.centi ** 2),
    ("5 GW/cm^2", "intensity", 5 * sc.giga / sc.centi ** 2),
    ("2.8e-19 cm^2", "area", 2.8e-19 * sc.centi ** 2),
    ("3.2e-16 cm^2/W", "n2", 3.2e-16 * sc.centi ** 2),
    ("1e20 cm^-3", "number_density", 1e20 / sc.centi ** 3),
    ("1e20 /cm^3", "number_density", 1e20 / sc.centi ** 3),
    ("1e20 1/cm³", "number_density", 1e20 / sc.centi ** 3),
    ("1e20 cm⁻³", "number_density", 1e20 / sc.centi ** 3),
    ("3.4 kV", "voltage", 3.4e3),
    ("2.2 pm/V", "eo_coefficient", 2.2 * sc.pico),
    ("45 deg", "angle", 45 * sc.degree),
    ("45°", "angle", 45 * sc.degree),
    ("0.5 rad", "angle", 0.5),
    ("99.8 %", "ratio", 0.998),
    ("99.8%", "ratio", 0.998),
    ("0.85", "ratio", 0.85),
    (0.85, "ratio", 0.85),
    (500, "ratio_or_db", 500.0),
    ("500:1", "ratio_or_db", 500.0),
    # decibel as a power ratio: 10^(dB/10) (IEC 60027-3 definition of the decibel)
    ("27 dB", "ratio_or_db", 10 ** 2.7),
    ("30 dB", "ratio_or_db", 1000.0),
    (64, "count", 64),
    (1.5, "number", 1.5),
])
def test_spellings(text, dimension, si):
    assert parse_quantity(text, dimension) == pytest.approx(si, rel=1e-12)


def test_decimal_scaling_is_exactly_rounded():
    # "3.5 ns" must give the same float as the literal 3.5e-9 (no 3.5000000000000003e-09)
    assert parse_quantity("3.5 ns", "time") == 3.5e-9
    assert parse_quantity("99.9 %", "ratio") == 0.999
    assert parse_quantity("9 mJ", "energy") == 9e-3


def test_micro_spellings_are_equal():
    values = {parse_quantity(f"3.2 {u}s", "time") for u in ("u", "\u00b5", "\u03bc")}
    assert values == {3.2e-6}


@pytest.mark.parametrize("text,dimension,needle", [
    ("12 nS", "time", "did you mean 'ns'?"),
    ("9 mj", "energy", "did you mean 'mJ'?"),
    ("1 mhz", "frequency", "did you mean 'MHz'?"),
    ("5 cm2", "area", "did you mean 'cm^2'"),
    ("250 ns", "length", "'ns' is a time"),
    ("9 ns", "energy", "'ns' is a time"),
    ("250", "length", "a unit after the number"),
    (250, "length", "a unit after the number"),
    ("mm", "length", "a number first"),
    ("3 %", "ratio_or_db", "unknown unit '%'"),
    ("5 kg", "energy", "unknown unit 'kg'"),
    ("1.5", "count", "whole number"),
    ("12 dB", "ratio", "unknown unit 'dB'"),
])
def test_errors_name_path_and_expectation(text, dimension, needle):
    with pytest.raises(InputError) as info:
        parse_quantity(text, dimension, "pump.energy")
    message = str(info.value)
    assert message.startswith("pump.energy: ")
    assert needle in message
    assert DIMENSIONS[dimension].what.split()[-1] in message  # the expected kind is named


@pytest.mark.parametrize("value", [float("nan"), float("inf"), -float("inf"), "nan ns",
                                   "inf ns", "NaN", True, False, None, [1], ["3 ns"],
                                   {"a": 1}, "1e400 s", object()])
def test_rejects_non_values(value):
    with pytest.raises(InputError):
        parse_quantity(value, "time", "x")


@pytest.mark.parametrize("value", [float("nan"), True, [0.5], {"v": 1}])
def test_rejects_non_values_for_ratios(value):
    with pytest.raises(InputError):
        parse_quantity(value, "ratio", "x")


@pytest.mark.parametrize("si,dimension,text", [
    (3.4e-9, "time", "3.4 ns"),
    (0.25, "length", "250 mm"),
    (8e-7, "length", "800 nm"),
    (9e-3, "energy", "9 mJ"),
    (2e-9, "energy", "2 nJ"),
    (0.998, "ratio", "99.8 %"),
    (2.8e-23, "area", "2.8e-19 cm^2"),
    (3400.0, "voltage", "3.4 kV"),
    (1e3, "frequency", "1 kHz"),
    (1e-18, "energy", "1e-18 J"),
    (0.0, "time", "0 fs"),
])
def test_format_quantity(si, dimension, text):
    assert format_quantity(si, dimension) == text


def test_format_ascii_only():
    assert format_quantity(3.2e-6, "time", ascii_only=True) == "3.2 us"


_FORMATTABLE = [d for d, spec in DIMENSIONS.items() if spec.vector is not None] + ["ratio"]


@settings(max_examples=300, deadline=None)
@given(st.sampled_from(_FORMATTABLE), st.floats(min_value=-30, max_value=12),
       st.booleans())
def test_format_parse_round_trip(dimension, log10, negative):
    value = (-1 if negative else 1) * 10.0 ** log10
    back = parse_quantity(format_quantity(value, dimension), dimension)
    assert back == pytest.approx(value, rel=1e-5)


# ---- independent oracle: the pint unit library (dev-only dependency) ----------------------

PINT_GRID = ["mm", "cm", "m", "nm", "um", "µm", "μm", "ps", "ns", "us", "µs", "ms", "fs",
             "pJ", "nJ", "uJ", "mJ", "J", "mW", "W", "kW", "Hz", "kHz", "MHz", "GHz",
             "J/cm^2", "mJ/cm^2", "J/m^2", "W/cm^2", "GW/cm^2", "cm^2", "m^2", "mm^2",
             "cm^2/W", "m^2/W", "V", "kV", "pm/V", "deg", "rad", "mrad", "cm^-3", "m^-3"]
PINT_NUMBERS = ["1", "2.5", "0.9", "1e-3", "3.2e2", "-7"]


def _dimension_of(unit: str) -> str:
    from regentime.units import parse_unit

    vec = parse_unit(unit)[1]
    return next(d for d, spec in DIMENSIONS.items() if spec.vector == vec)


@pytest.fixture(scope="module")
def ureg():
    pint = pytest.importorskip("pint")
    return pint.UnitRegistry()


@pytest.mark.parametrize("unit", PINT_GRID)
def test_against_pint(unit, ureg):
    dimension = _dimension_of(unit)
    for number in PINT_NUMBERS:
        text = f"{number} {unit}"
        expected = ureg.Quantity(text).to_base_units().magnitude
        if dimension == "n2":
            expected = ureg.Quantity(text).to("m^2/W").magnitude
        elif dimension in ("intensity", "power"):
            expected = ureg.Quantity(text).to("W/m^2" if dimension == "intensity"
                                              else "W").magnitude
        elif dimension == "fluence":
            expected = ureg.Quantity(text).to("J/m^2").magnitude
        elif dimension == "energy":
            expected = ureg.Quantity(text).to("J").magnitude
        elif dimension == "eo_coefficient":
            expected = ureg.Quantity(text).to("m/V").magnitude
        elif dimension == "voltage":
            expected = ureg.Quantity(text).to("V").magnitude
        got = parse_quantity(text, dimension)
        assert got == pytest.approx(expected, rel=1e-12), text


def test_pint_traps_we_refuse():
    # pint reads "12 nS" as nanosiemens; for a time we refuse it rather than guess
    with pytest.raises(InputError, match="nS"):
        parse_quantity("12 nS", "time")
    assert math.isclose(parse_quantity("12 ns", "time"), 12e-9)
