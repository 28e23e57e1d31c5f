"""Numbers with units, as written in a cavity file, to SI floats and back.

A small hand parser (no unit registry at run time, so ``regentime plan`` starts fast).
A quantity is one string: a number (``12``, ``-3.5``, ``1e-3``, ``.5``) and a unit, with or
without a space between them: ``"250 mm"``, ``"3.5ns"``, ``"0.9 J/cm^2"``, ``"0.9 J/cm²"``,
``"3.2 µs"``.  The unit is a product of symbols with optional integer powers joined by ``/``
or ``*`` (``"cm^2/W"``, ``"1/cm^3"``, ``"cm^-3"``); each symbol is an optional SI prefix and a
base unit.  Case matters (``mJ`` is not ``MJ``); unknown spellings (``"12 nS"``, ``"mj"``)
are rejected with a suggestion.

Each *dimension* (``"length"``, ``"time"`` ...) is checked by exponent vector over the base
symbols m, s, J, V, rad (W = J/s, Hz = 1/s), so ``"J/cm^2"`` and ``"mJ/mm^2"`` are both
fluences and ``"250 ns"`` for a length is an error naming the expected dimension.

Dimensionless dimensions: ``ratio`` (a bare number or a percentage, ``"99.8 %"`` -> 0.998),
``number`` (a bare number), ``count`` (an integer), ``ratio_or_db`` (a bare number,
``"27 dB"`` -> 10^(27/10), or ``"500:1"``).

Public API: :func:`parse_quantity`, :func:`format_quantity`, :data:`DIMENSIONS`,
:func:`describe` (the "a length, e.g. '250 mm'" text used in error messages).
"""

from __future__ import annotations

import math
import re
import unicodedata
from decimal import Decimal, InvalidOperation
from dataclasses import dataclass
from typing import Any

from regentime.errors import InputError

# SI prefixes accepted in front of every base unit (c only in front of m).  u, µ (U+00B5) and
# μ (U+03BC) are the same micro; NFKC turns U+00B5 into U+03BC before the lookup.
# Stored as powers of ten so that "3.5 ns" gives exactly the float nearest to 3.5e-9.
PREFIXES: dict[str, int] = {
    "f": -15, "p": -12, "n": -9, "u": -6, "\u03bc": -6, "m": -3,
    "c": -2, "k": 3, "M": 6, "G": 9, "T": 12,
}

# Base symbols: (SI factor, exponent vector over (m, s, J, V, rad)).
_BASES: dict[str, tuple[float, tuple[int, ...]]] = {
    "m": (1.0, (1, 0, 0, 0, 0)),
    "s": (1.0, (0, 1, 0, 0, 0)),
    "J": (1.0, (0, 0, 1, 0, 0)),
    "W": (1.0, (0, -1, 1, 0, 0)),
    "Hz": (1.0, (0, -1, 0, 0, 0)),
    "V": (1.0, (0, 0, 0, 1, 0)),
    "rad": (1.0, (0, 0, 0, 0, 1)),
    "deg": (math.pi / 180.0, (0, 0, 0, 0, 1)),
    "\u00b0": (math.pi / 180.0, (0, 0, 0, 0, 1)),
}
_NO_PREFIX = {"deg", "\u00b0"}
_CENTI_OK = {"m"}


@dataclass(frozen=True)
class Dimension:
    name: str
    what: str  # "a length"
    example: str  # "250 mm"
    vector: tuple[int, ...] | None  # None: dimensionless kinds handled separately
    common: tuple[str, ...] = ()  # spellings offered as suggestions
    display: tuple[tuple[str, float], ...] = ()  # (unit, SI factor) for format_quantity
    scientific: bool = False  # format as mantissa e exponent in display[0]


def _v(m=0, s=0, j=0, v=0, rad=0) -> tuple[int, ...]:
    return (m, s, j, v, rad)


DIMENSIONS: dict[str, Dimension] = {d.name: d for d in (
    Dimension("length", "a length", "250 mm", _v(m=1),
              ("nm", "um", "µm", "mm", "cm", "m", "km"),
              (("pm", 1e-12), ("nm", 1e-9), ("µm", 1e-6), ("mm", 1e-3), ("m", 1.0))),
    Dimension("time", "a time", "3.5 ns", _v(s=1),
              ("fs", "ps", "ns", "us", "µs", "ms", "s"),
              (("fs", 1e-15), ("ps", 1e-12), ("ns", 1e-9), ("µs", 1e-6), ("ms", 1e-3),
               ("s", 1.0))),
    Dimension("energy", "an energy", "9 mJ", _v(j=1),
              ("fJ", "pJ", "nJ", "uJ", "µJ", "mJ", "J"),
              (("fJ", 1e-15), ("pJ", 1e-12), ("nJ", 1e-9), ("µJ", 1e-6), ("mJ", 1e-3),
               ("J", 1.0))),
    Dimension("power", "a power", "30 W", _v(s=-1, j=1),
              ("uW", "µW", "mW", "W", "kW", "MW", "GW", "TW"),
              (("µW", 1e-6), ("mW", 1e-3), ("W", 1.0), ("kW", 1e3), ("MW", 1e6),
               ("GW", 1e9), ("TW", 1e12))),
    Dimension("frequency", "a frequency", "1 kHz", _v(s=-1),
              ("Hz", "kHz", "MHz", "GHz"),
              (("Hz", 1.0), ("kHz", 1e3), ("MHz", 1e6), ("GHz", 1e9))),
    Dimension("fluence", "a fluence", "0.9 J/cm^2", _v(m=-2, j=1),
              ("J/cm^2", "mJ/cm^2", "uJ/cm^2", "J/m^2"),
              (("µJ/cm^2", 1e-2), ("mJ/cm^2", 10.0), ("J/cm^2", 1e4))),
    Dimension("intensity", "an intensity", "5 GW/cm^2", _v(m=-2, s=-1, j=1),
              ("W/cm^2", "kW/cm^2", "MW/cm^2", "GW/cm^2", "TW/cm^2", "W/m^2"),
              (("W/cm^2", 1e4), ("kW/cm^2", 1e7), ("MW/cm^2", 1e10), ("GW/cm^2", 1e13),
               ("TW/cm^2", 1e16))),
    Dimension("area", "an area", "2.8e-19 cm^2", _v(m=2),
              ("cm^2", "mm^2", "m^2"), (("cm^2", 1e-4),), scientific=True),
    Dimension("n2", "a nonlinear index n2", "3.2e-16 cm^2/W", _v(m=2, s=1, j=-1),
              ("cm^2/W", "m^2/W"), (("cm^2/W", 1e-4),), scientific=True),
    Dimension("number_density", "a number density", "1e20 cm^-3", _v(m=-3),
              ("cm^-3", "m^-3"), (("cm^-3", 1e6),), scientific=True),
    Dimension("voltage", "a voltage", "3.4 kV", _v(v=1),
              ("V", "kV"), (("V", 1.0), ("kV", 1e3))),
    Dimension("eo_coefficient", "an electro-optic coefficient", "2.2 pm/V", _v(m=1, v=-1),
              ("pm/V", "m/V"), (("pm/V", 1e-12),)),
    Dimension("angle", "an angle", "45 deg", _v(rad=1),
              ("deg", "rad", "mrad"), (("deg", math.pi / 180.0),)),
    Dimension("ratio", "a ratio", "99.8 %", None, ("%",)),
    Dimension("number", "a number", "1.5", None),
    Dimension("count", "a whole number", "64", None),
    Dimension("ratio_or_db", "a ratio", "500 or '27 dB'", None, ("dB",)),
)}

_NUMBER = re.compile(r"\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$", re.S)
_SUPER = {"\u00b2": "2", "\u00b3": "3", "\u00b9": "1", "\u2070": "0", "\u2074": "4",
          "\u207b": "-"}
_SUPER_RUN = re.compile("[" + "".join(_SUPER) + "]+")
_TERM = re.compile(r"([^\^]+)(?:\^([+-]?\d+))?$")


def describe(dimension: str) -> str:
    """Text for error messages: ``"a length, e.g. '250 mm'"``."""
    d = DIMENSIONS[dimension]
    if dimension == "ratio_or_db":
        return "a ratio > 1: a number like 500, or decibels like '27 dB'"
    if dimension == "ratio":
        return "a ratio: a number like 0.998 or a percentage like '99.8 %'"
    if dimension == "number":
        return "a number, e.g. 1.5"
    if dimension == "count":
        return "a whole number, e.g. 64"
    return f"{d.what}, e.g. '{d.example}'"


def _normalise(text: str) -> str:
    text = _SUPER_RUN.sub(lambda m: "^" + "".join(_SUPER[c] for c in m.group(0)), text)
    text = unicodedata.normalize("NFKC", text)
    return text.replace("\u2212", "-").replace("\u00b7", "*").replace("\u22c5", "*")


def _symbol(sym: str) -> tuple[int, float, tuple[int, ...]] | None:
    if sym in _BASES:
        return (0,) + _BASES[sym]
    for p, e in PREFIXES.items():
        if sym.startswith(p):
            base = sym[len(p):]
            if base in _BASES and base not in _NO_PREFIX and (p != "c" or base in _CENTI_OK):
                factor, vec = _BASES[base]
                return e, factor, vec
    return None


def _parse_unit(unit: str) -> tuple[int, float, tuple[int, ...]] | None:
    unit = unit.replace(" ", "")
    if not unit:
        return None
    exp10, factor, vec = 0, 1.0, [0, 0, 0, 0, 0]
    parts = re.split(r"([/*])", unit)
    sign = 1
    for i, part in enumerate(parts):
        if part == "/":
            sign = -1
            continue
        if part == "*":
            sign = 1
            continue
        if i == 0 and part in ("1", "") and len(parts) > 1:  # "1/cm^3", "/cm^3"
            continue
        m = _TERM.match(part)
        if not m:
            return None
        hit = _symbol(m.group(1))
        if hit is None:
            return None
        power = sign * int(m.group(2) or 1)
        exp10 += power * hit[0]
        factor *= hit[1] ** power
        vec = [a + power * b for a, b in zip(vec, hit[2])]
    return exp10, factor, tuple(vec)


def parse_unit(unit: str) -> tuple[float, tuple[int, ...]] | None:
    """``"J/cm^2"`` -> (SI factor, exponent vector over m, s, J, V, rad); None if unknown."""
    parsed = _parse_unit(_normalise(unit))
    if parsed is None:
        return None
    return 10.0 ** parsed[0] * parsed[1], parsed[2]


def _suggest(unit: str, dimension: str) -> str:
    common = DIMENSIONS[dimension].common
    exact = [c for c in common if c.lower() == unit.lower()]
    import difflib  # only when a suggestion is needed (start-up time)

    picks = exact or difflib.get_close_matches(unit, common, n=2, cutoff=0.5)
    if not picks:
        return ""
    return "; did you mean " + " or ".join(f"'{p}'" for p in picks) + "?"


def parse_quantity(value: Any, dimension: str, path: str = "") -> float:
    """Turn a file value into an SI float (or an int for ``count``).

    ``value`` is what the YAML loader gives: a string such as ``"250 mm"``, or an int/float
    for dimensionless quantities.  Raises :class:`InputError` (with ``path``) for a wrong unit,
    a missing number, a bare number where a unit is needed, NaN, infinity, booleans, lists and
    mappings.  Range checks are the caller's (the schema's).
    """
    if dimension not in DIMENSIONS:
        raise KeyError(f"unknown dimension {dimension!r}")
    dim = DIMENSIONS[dimension]
    if isinstance(value, bool) or value is None or isinstance(value, (list, tuple, dict)):
        kind = {bool: "a yes/no value", type(None): "nothing"}.get(type(value))
        if isinstance(value, (list, tuple)):
            kind = "a list"
        elif isinstance(value, dict):
            kind = "a mapping"
        raise InputError(path, value, f"{describe(dimension)} (got {kind})")
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise InputError(path, value, f"a finite value: {describe(dimension)}")
        if dimension == "count":
            if isinstance(value, float) and not value.is_integer():
                raise InputError(path, value, describe(dimension))
            return int(value)
        if dim.vector is not None:
            raise InputError(path, value, f"a unit after the number: {describe(dimension)}")
        return float(value)
    if not isinstance(value, str):
        raise InputError(path, str(value), describe(dimension))
    text = _normalise(value).strip()
    if dimension == "ratio_or_db":
        m = re.fullmatch(r"([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*:\s*1", text)
        if m:
            text = m.group(1)
    m = _NUMBER.fullmatch(text)
    if not m:
        low = text.lower().split()[0] if text.split() else ""
        if low in ("nan", "inf", "+inf", "-inf", "infinity", ".nan", ".inf", "-.inf"):
            raise InputError(path, value, f"a finite value: {describe(dimension)}")
        raise InputError(path, value, f"a number first: {describe(dimension)}")
    number = float(m.group(1))
    number_text = m.group(1)
    unit = m.group(2)
    if not math.isfinite(number):
        raise InputError(path, value, f"a finite value: {describe(dimension)}")
    if dimension == "count":
        if unit or not number.is_integer():
            raise InputError(path, value, describe(dimension))
        return int(number)
    if dim.vector is None:
        if not unit:
            return number
        if unit == "%" and dimension == "ratio":
            return float(Decimal(number_text).scaleb(-2))  # 99.9 % -> 0.999 exactly rounded
        if unit == "dB" and dimension == "ratio_or_db":
            if abs(number) > 3000.0:  # 10^300: beyond any float; range checks name the key
                raise InputError(path, value, f"a ratio in dB between -3000 and 3000; {describe(dimension)}")
            return 10.0 ** (number / 10.0)
        allowed = {"ratio": "no unit or '%'", "ratio_or_db": "no unit or 'dB'"}.get(
            dimension, "no unit")
        raise InputError(path, value, f"{allowed} (unknown unit '{unit}'"
                         f"{_suggest(unit, dimension)}); {describe(dimension)}")
    if not unit:
        raise InputError(path, value, f"a unit after the number: {describe(dimension)}")
    parsed = _parse_unit(unit)
    if parsed is None:
        raise InputError(path, value,
                         f"a known unit (unknown unit '{unit}'{_suggest(unit, dimension)}); "
                         f"{describe(dimension)}")
    exp10, factor, vec = parsed
    if vec != dim.vector:
        other = next((d.what for d in DIMENSIONS.values() if d.vector == vec), None)
        got = f"'{unit}' is {other}" if other else f"'{unit}' is not {dim.what}"
        raise InputError(path, value, f"{describe(dimension)} ({got})")
    # exact decimal scaling, then one rounding: "3.5 ns" -> 3.5e-9 exactly as float("3.5e-9")
    try:
        result = float(Decimal(number_text).scaleb(exp10)) * factor
    except (InvalidOperation, OverflowError):
        result = math.inf
    if not math.isfinite(result):
        raise InputError(path, value, f"a finite value: {describe(dimension)}")
    return result


_SI_UNIT = {"length": "m", "time": "s", "energy": "J", "power": "W", "frequency": "Hz",
            "fluence": "J/m^2", "intensity": "W/m^2", "voltage": "V", "eo_coefficient": "m/V",
            "angle": "rad"}


def _trim(x: float, digits: int) -> str:
    s = f"{x:.{digits}g}"
    if "e" in s or "E" in s:
        mant, exp = s.lower().split("e")
        if "." in mant:
            mant = mant.rstrip("0").rstrip(".")
        return f"{mant}e{int(exp)}"
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return s


def format_quantity(si_value: float, dimension: str, digits: int = 6,
                    ascii_only: bool = False) -> str:
    """SI float -> engineering-unit string that :func:`parse_quantity` reads back.

    ``3.4e-9, "time"`` -> ``"3.4 ns"``; ``0.998, "ratio"`` -> ``"99.8 %"``;
    ``2.8e-23, "area"`` -> ``"2.8e-19 cm^2"``.  ``digits`` significant digits, trailing zeros
    dropped.  ``ascii_only`` writes ``u`` instead of ``µ``.
    """
    dim = DIMENSIONS[dimension]
    if dimension == "count":
        return str(int(si_value))
    if dimension in ("number", "ratio_or_db"):
        return _trim(float(si_value), digits)
    if dimension == "ratio":
        return _trim(float(si_value) * 100.0, digits) + " %"
    if not math.isfinite(si_value):
        raise ValueError(f"cannot format {si_value!r}")
    unit, factor = dim.display[0]
    if not dim.scientific and 0 < abs(si_value) < factor:  # below the smallest unit: 1e-18 J
        unit, factor = _SI_UNIT[dimension], 1.0
        shown = f"{_trim(si_value, digits)} {unit}"
    elif dim.scientific or si_value == 0:
        shown = f"{_trim(si_value / factor, digits)} {unit}"
    else:
        mag = abs(si_value)
        for u, f in dim.display:
            if mag / f >= 1.0:
                unit, factor = u, f
        # rounding can push 999.9999 up to "1000": move one unit up if there is one
        text = _trim(si_value / factor, digits)
        idx = [u for u, _ in dim.display].index(unit)
        if abs(float(text)) >= 1000 and idx + 1 < len(dim.display):
            unit, factor = dim.display[idx + 1]
            text = _trim(si_value / factor, digits)
        shown = f"{text} {unit}"
    if ascii_only:
        shown = shown.replace("µ", "u")
    return shown
