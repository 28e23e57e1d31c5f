"""``regentime materials``: exact values in every format, detail view, errors, --output."""

import csv
import io
import json

import pytest
from scipy.constants import c, h

from regentime.cli import main


def run(capsys, *argv):
    code = main(["materials", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_text_listing_shows_library_values(capsys):
    code, out, err = run(capsys)
    assert code == 0 and err == ""
    # J_sat [D] docs/references.md: Ti:sapphire 0.828, Nd:YAG 0.667, Yb:YAG 9.10 J/cm²
    assert "0.828 [D]" in out and "0.667 [D]" in out and "9.10 [D]" in out
    assert "3.00e-19 [M]" in out  # Ti:sapphire σ_e in cm² (Moulton 1986, number from memory)
    assert "2400 [M]" in out  # Yb:CaF2 lifetime in µs
    # fused silica n(800) = 1.45332 [D] and n_g(800) = 1.46714 (Malitson 1965 formula)
    line = next(l for l in out.splitlines() if l.strip().startswith("fused_silica "))
    assert "1.45332" in line and "1.46714" in line
    # sapphire n_o(800) = 1.76013 [D]; BBO at 1064 nm is past the fitted range: starred
    assert "1.76013" in out and "1.65513*" in out
    # KD*P λ/4 at 1064 nm ≈ 3.3 kV [D]; BBO example cell d/L = 3/20 with r22 = 2.5 pm/V
    dkdp = next(l for l in out.splitlines() if l.strip().startswith("dkdp ") and "r63" in l)
    assert dkdp.split()[-1] == "3.33"
    assert "r22 = 2.50 pm/V [C]" in out
    assert "IEC 60825-1" in out and "IEC 61010-1" in out and "laser safety officer" in out
    for key in ("ti_sapphire", "yb_caf2", "air", "vacuum", "quartz", "kgw", "rtp"):
        assert key in out


def test_detail_of_a_gain_medium_names_every_source(capsys):
    code, out, _ = run(capsys, "yb_yag")
    assert code == 0
    assert "Ostermeyer and A. Straesser, Opt. Commun. 274, 422 (2007)" in out
    for prop in ("wavelength", "emission_cross_section", "absorption_cross_section",
                 "upper_state_lifetime", "n2", "damage_fluence", "damage_duration",
                 "doping_density", "host", "saturation_fluence"):
        assert f"\n  {prop} " in out
    assert "Zelmon" in out  # the host's dispersion formula comes along
    assert "ti_sapphire" not in out


def test_detail_of_a_crystal_shows_dispersion_and_pockels_data(capsys):
    code, out, _ = run(capsys, "bbo")
    assert code == 0
    assert "Eimerl" in out and "Weber" in out and "Yariv" in out
    assert "axis e: extraordinary" in out


def test_json_is_si_with_sources(capsys):
    code, out, _ = run(capsys, "--format", "json")
    assert code == 0
    data = json.loads(out, parse_constant=lambda name: pytest.fail(f"non-JSON {name}"))
    gm = {r["key"]: r for r in data["gain_media"]}
    # J_sat = hν/(σ_e+σ_a) with scipy.constants, Yb:YAG 2.0e-20 + 0.12e-20 cm² [D]
    assert gm["yb_yag"]["saturation_fluence_J_per_m2"] == pytest.approx(
        h * c / 1030e-9 / 2.12e-24, rel=1e-12)
    assert gm["ti_sapphire"]["emission_cross_section_m2"] == pytest.approx(3.0e-23)
    assert set(gm["nd_yag"]["sources"]) >= {"wavelength", "n2", "damage_fluence", "host"}
    disp = {r["key"]: r for r in data["dispersion"]}
    fs = next(i for i in disp["fused_silica"]["indices"] if i["wavelength_m"] == 800e-9)
    assert fs["n"] == pytest.approx(1.45332, abs=1e-5)  # [D] Malitson formula
    assert disp["vacuum"]["valid_range_m"] == [0.0, None]
    eo = {r["key"]: r for r in data["electro_optic"]}
    assert eo["dkdp"]["quarter_wave_voltage_V"] == pytest.approx(3.3e3, rel=0.15)  # [D]
    assert eo["bbo"]["half_wave_voltage_V"] == pytest.approx(7.7e3, rel=0.15)  # [D]
    assert "IEC 60825-1" in data["cautions"][0]


def test_csv_is_long_form_with_a_source_per_row(capsys):
    code, out, _ = run(capsys, "--format", "csv")
    assert code == 0
    rows = list(csv.DictReader(io.StringIO(out)))
    assert rows and all(r["source"].strip() for r in rows)
    row = next(r for r in rows if r["key"] == "nd_yag" and r["property"] == "saturation_fluence")
    assert float(row["value"]) == pytest.approx(h * c / 1064e-9 / 2.8e-23)  # [D] 0.667 J/cm²
    assert row["unit"] == "J/m^2" and row["flag"] == "derived"


def test_markdown_has_tables(capsys):
    code, out, _ = run(capsys, "--format", "md")
    assert code == 0
    assert "## Gain media" in out and "| ti_sapphire |" in out and "0.828 \\[D\\]" in out


def test_unknown_name_is_an_input_error(capsys):
    code, out, err = run(capsys, "unobtainium")
    assert code == 2 and out == ""
    assert err.startswith("error: NAME: got 'unobtainium'; expected one of: air, bbo,")
    assert "Traceback" not in err


def test_output_file(tmp_path, capsys):
    target = tmp_path / "m.json"
    code, out, _ = run(capsys, "ti_sapphire", "-f", "json", "-o", str(target))
    assert code == 0 and out == ""
    data = json.loads(target.read_text())
    assert [r["key"] for r in data["gain_media"]] == ["ti_sapphire"]
    assert data["dispersion"][0]["key"] == "sapphire"


def test_help_has_an_example(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["materials", "--help"])
    assert exc.value.code == 0
    assert "regentime materials yb_yag" in capsys.readouterr().out
