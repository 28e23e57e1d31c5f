"""``regentime materials [NAME]``: the built-in material library with a source for every value.

Front end only: the records come from :mod:`regentime.materials.catalog`; this module
formats them (text tables in engineering units, Markdown, CSV in long form, JSON in SI).
"""

from __future__ import annotations

import argparse
import json
from typing import Any

from regentime.commands.common import add_output_options, emit

FLAG_LETTER = {"confirmed": "C", "derived": "D", "from memory": "M", "common practice": "P",
               "exact": "C"}
LEGEND = ("Flags: [C] confirmed in the cited source, [D] derived by us (formula or "
          "definition), [M] from memory (not checked against the source: override it in the "
          "cavity file if you have a better value), [P] common practice. "
          "* = outside the formula's fitted wavelength range (extrapolated).")

EPILOG = """examples:
  regentime materials                    every gain medium, dispersion formula and crystal
  regentime materials yb_yag             one entry in detail, with the source of each value
  regentime materials --format json -o materials.json"""


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "materials", help="list the built-in material library and its sources",
        description="List the built-in gain media (cross-sections, lifetime, saturation "
                    "fluence, n2, damage fluence), dispersion formulas (n and group index) "
                    "and electro-optic crystals (coefficient, half- and quarter-wave "
                    "voltage), each value with its source.",
        epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("name", nargs="?", metavar="NAME",
                   help="one material key (e.g. ti_sapphire, sapphire, bbo) to show in detail")
    add_output_options(p)
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from regentime.materials import catalog as cat

    if args.name:
        try:
            data = cat.lookup(args.name)
        except ValueError:
            from regentime.errors import InputError

            raise InputError("NAME", args.name,
                             "one of: " + ", ".join(cat.all_names())) from None
        detail = True
    else:
        data = cat.catalog()
        detail = False
    fmt = getattr(args, "format", "text")
    if fmt == "json":
        text = json.dumps(data, indent=2, ensure_ascii=False)
    elif fmt == "csv":
        text = format_csv(data)
    else:
        text = format_tables(data, markdown=(fmt == "md"), detail=detail)
    emit(args, text)
    return 0


# ----- number formatting (engineering units of the trade) ----------------------------------


def sig(value: float, digits: int = 3) -> str:
    """``digits`` significant digits, trailing zeros kept; plain decimals for 1e-3..1e5."""
    import math

    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    if -3 <= mag < 5:
        return f"{value:.{max(0, digits - 1 - mag)}f}"
    return sci(value, digits)


def sci(value: float, digits: int = 3) -> str:
    """Scientific notation with ``digits`` significant digits: 3.00e-19."""
    if value == 0:
        return "0"
    mant, exp = f"{value:.{digits - 1}e}".split("e")
    return f"{mant}e{int(exp)}"


def _f(text: str, flag: str, markdown: bool) -> str:
    letter = FLAG_LETTER.get(flag, "?")
    return f"{text} [{letter}]" if not markdown else f"{text} \\[{letter}\\]"


# ----- tables ------------------------------------------------------------------------------


def _gain_rows(records, md):
    rows = []
    for r in records:
        f = r["flags"]
        rows.append([
            r["key"],
            _f(f"{r['wavelength_m'] * 1e9:.0f}", f["wavelength"], md),
            _f(sci(r["emission_cross_section_m2"] * 1e4), f["emission_cross_section"], md),
            _f(sci(r["absorption_cross_section_m2"] * 1e4), f["absorption_cross_section"], md),
            _f(sig(r["upper_state_lifetime_s"] * 1e6), f["upper_state_lifetime"], md),
            _f(sig(r["saturation_fluence_J_per_m2"] * 1e-4), f["saturation_fluence"], md),
            _f(sci(r["n2_m2_per_W"] * 1e4, 2), f["n2"], md),
            _f(f"{sig(r['damage_fluence_J_per_m2'] * 1e-4, 2)} @ "
               f"{sig(r['damage_duration_s'] * 1e9, 2)} ns", f["damage_fluence"], md),
            _f(sci(r["doping_density_per_m3"] * 1e-6), f["doping_density"], md),
            f"{r['host']} ({r['axis']})",
        ])
    return rows


GAIN_HEADERS = ["medium", "λ nm", "σ_e cm²", "σ_a cm²", "τ µs", "J_sat J/cm²", "n2 cm²/W",
                "damage J/cm²", "doping cm⁻³", "host (axis)"]


def _disp_rows(records):
    rows = []
    for r in records:
        by_axis: dict[str, list] = {}
        for ix in r["indices"]:
            mark = "" if ix["in_valid_range"] else "*"
            by_axis.setdefault(ix["axis"], []).extend(
                [f"{ix['n']:.5f}{mark}", f"{ix['group_index']:.5f}{mark}"])
        lo, hi = r["valid_range_m"]
        rng = "all" if hi is None else f"{lo * 1e6:.2f}–{hi * 1e6:.2f}"
        for i, (axis, cells) in enumerate(by_axis.items()):
            first = i == 0
            axis_label = "—" if r["symmetry"] == "isotropic" else axis
            rows.append([r["key"] if first else "", axis_label, *cells,
                         rng if first else "", FLAG_LETTER[r["flag"]] if first else ""])
    return rows


def _disp_headers():
    from regentime.materials.catalog import LIST_WAVELENGTHS

    h = ["material", "axis"]
    for lam in LIST_WAVELENGTHS:
        h += [f"n {lam * 1e9:.0f}", f"n_g {lam * 1e9:.0f}"]
    return h + ["range µm", "flag"]


def _eo_rows(records, md):
    rows = []
    for r in records:
        coeff = _f(f"{r['coefficient_name']} = {sig(r['coefficient_m_per_V'] * 1e12)} pm/V",
                   r["flag"], md)
        if r["geometry"] == "longitudinal":
            cell = "any size"
        else:
            cell = (f"d {sig(r['example_aperture_m'] * 1e3, 2)} mm, "
                    f"L {sig(r['example_length_m'] * 1e3, 2)} mm")
        per = (f"{sig(r['half_wave_voltage_for_d_equal_L_V'] * 1e-3)} × d/L"
               if r["geometry"] == "transverse" else "—")
        rows.append([r["key"], coeff, r["geometry"], f"{r['wavelength_m'] * 1e9:.0f}",
                     f"{r['n']:.4f}", per, cell, sig(r["half_wave_voltage_V"] * 1e-3),
                     sig(r["quarter_wave_voltage_V"] * 1e-3)])
    return rows


EO_HEADERS = ["crystal", "coefficient", "geometry", "λ nm", "n", "V_π kV (transverse)",
              "cell", "V_π kV", "V_λ/4 kV"]


def format_tables(data: dict[str, Any], markdown: bool = False, detail: bool = False) -> str:
    from regentime.reports.tables import md_table, text_table

    def table(headers, rows, align=None):
        return md_table(headers, rows, align) if markdown else text_table(headers, rows, align)

    def heading(text):
        return f"## {text}" if markdown else text

    out: list[str] = []
    gm = data.get("gain_media", [])
    if gm:
        out.append(heading("Gain media (defaults; override any value under gain: in the "
                           "cavity file)"))
        out.append(table(GAIN_HEADERS, _gain_rows(gm, markdown), "l" + "r" * 8 + "l"))
        if detail:
            for r in gm:
                out.append(heading(f"Sources for {r['key']} ({r['label']})"))
                rows = [[p, FLAG_LETTER.get(r["flags"].get(p, ""), "—"), s]
                        for p, s in r["sources"].items()]
                out.append(table(["property", "flag", "source"], rows, "lcl"))
        out.append("")
    disp = data.get("dispersion", [])
    if disp:
        out.append(heading("Dispersion: refractive index n and group index n_g = n − λ dn/dλ "
                           "(λ in nm)"))
        out.append(table(_disp_headers(), _disp_rows(disp), "ll" + "r" * 6 + "lc"))
        out.append("")
        out.append(heading("Formulas and sources (λ in µm)"))
        for r in disp:
            line = f"{r['key']}: {r['formula']}"
            src = f"source [{FLAG_LETTER[r['flag']]}]: {r['source']}"
            if markdown:
                out.append(f"- **{r['key']}**: {r['formula']}  \n  {src}")
            else:
                out.append(f"  {line}\n      {src}")
            if detail:
                if r["note"]:
                    out.append(("  " if markdown else "      ") + f"note: {r['note']}")
                for axis, meaning in r["axes"].items():
                    if r["symmetry"] != "isotropic":
                        out.append(("  " if markdown else "      ") + f"axis {axis}: {meaning}")
        out.append("")
    eo = data.get("electro_optic", [])
    if eo:
        out.append(heading("Electro-optic crystals (Pockels cells; coefficients ±15 %, prefer "
                           "the cell's datasheet)"))
        out.append(table(EO_HEADERS, _eo_rows(eo, markdown), "llllrrlrr"))
        out.append(("" if markdown else "  ") + "Longitudinal: V_π = λ/(2 n_o³ r63); transverse "
                   "r22: V_π = λ d/(2 n_o³ r22 L); RTP: V_π = λ d/((n_z³ r33 − n_y³ r23) L) "
                   "(Yariv & Yeh, Optical Waves in Crystals, ch. 7).")
        if detail:
            for r in eo:
                out.append(heading(f"Sources for {r['key']} ({r['label']})"))
                out.append(table(["property", "source"], list(r["sources"].items()), "ll"))
                if r["note"]:
                    out.append(("" if markdown else "  ") + f"note: {r['note']}")
        out.append("")
    out.append(LEGEND)
    if not detail:
        out.append("Sources of every value: regentime materials NAME, or --format json.")
    out.extend(data.get("cautions", []))
    return "\n".join(out)


def format_csv(data: dict[str, Any]) -> str:
    """Long form: one row per value with its unit, flag and source."""
    from regentime.reports.tables import csv_table

    rows: list[list[Any]] = []
    units = {"wavelength": "m", "emission_cross_section": "m^2",
             "absorption_cross_section": "m^2", "upper_state_lifetime": "s",
             "saturation_fluence": "J/m^2", "n2": "m^2/W", "damage_fluence": "J/m^2",
             "damage_duration": "s", "doping_density": "m^-3"}
    for r in data.get("gain_media", []):
        for prop, unit in units.items():
            key = {"saturation_fluence": "saturation_fluence_J_per_m2",
                   "n2": "n2_m2_per_W", "doping_density": "doping_density_per_m3",
                   "emission_cross_section": "emission_cross_section_m2",
                   "absorption_cross_section": "absorption_cross_section_m2",
                   "upper_state_lifetime": "upper_state_lifetime_s",
                   "damage_fluence": "damage_fluence_J_per_m2",
                   "damage_duration": "damage_duration_s",
                   "wavelength": "wavelength_m"}[prop]
            rows.append(["gain_medium", r["key"], prop, "", "", r[key], unit,
                         r["flags"][prop], r["sources"][prop]])
        rows.append(["gain_medium", r["key"], "host", r["axis"], "", r["host"], "",
                     "", r["sources"]["host"]])
    for r in data.get("dispersion", []):
        for ix in r["indices"]:
            for prop in ("n", "group_index"):
                rows.append(["dispersion", r["key"], prop, ix["axis"], ix["wavelength_m"],
                             ix[prop], "", r["flag"], r["source"]])
    for r in data.get("electro_optic", []):
        src = r["sources"]
        rows.append(["electro_optic", r["key"], r["coefficient_name"], "", "",
                     r["coefficient_m_per_V"], "m/V", r["flag"], src["coefficient"]])
        if "secondary_coefficient_name" in r:
            rows.append(["electro_optic", r["key"], r["secondary_coefficient_name"], "", "",
                         r["secondary_coefficient_m_per_V"], "m/V", "from memory",
                         src["secondary_coefficient"]])
        for prop in ("half_wave_voltage_V", "quarter_wave_voltage_V"):
            rows.append(["electro_optic", r["key"], prop[:-2], r["index_axis"],
                         r["wavelength_m"], r[prop], "V", "derived", src["formula"]])
    for text in data.get("cautions", []):
        rows.append(["caution", "", "", "", "", "", "", "", text])
    return csv_table(["section", "key", "property", "axis", "wavelength_m", "value", "unit",
                      "flag", "source"], rows)
