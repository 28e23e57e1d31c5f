"""The library API: ``regentime.plan`` against the CLI's JSON, overrides against an edited copy
of the file, bad overrides as InputError naming the key path."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

import regentime
from regentime.errors import InputError

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "cavities").glob("*.yaml"))


def _cli_json(path: str) -> dict:
    out = subprocess.run([sys.executable, "-m", "regentime", "plan", path, "--format", "json"],
                         capture_output=True, text=True, cwd=ROOT)
    assert out.returncode in (0, 3), out.stderr
    return json.loads(out.stdout)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_to_dict_equals_cli_json(path):
    rel = str(path.relative_to(ROOT))
    assert regentime.plan(ROOT / rel).to_dict() | {"source": rel} == _cli_json(rel)


def test_text_and_mapping_sources_plan_like_the_file():
    path = ROOT / "cavities" / "ti_sapphire_1khz.yaml"
    text = path.read_text(encoding="utf-8")
    from ruamel.yaml import YAML

    data = YAML(typ="safe").load(text)
    a = regentime.plan(path).to_dict()
    b = regentime.plan(text).to_dict()
    c = regentime.plan(data).to_dict()
    assert b["dump"] == a["dump"] and c["dump"] == a["dump"]
    assert c["timing_table"] == a["timing_table"]
    cav = regentime.plan(path).cavity
    assert regentime.plan(cav).to_dict() == a


def test_overrides_equal_an_edited_copy(tmp_path):
    src = ROOT / "cavities" / "ti_sapphire_1khz.yaml"
    from regentime.fileformat import CavityDocument

    doc = CavityDocument.load(str(src))
    doc.set("pump.energy", "8 mJ")
    doc.set("seed.energy", "0.5 nJ")
    copy = tmp_path / "edited.yaml"
    copy.write_text(doc.text(), encoding="utf-8")
    expected = _cli_json(str(copy))
    got = regentime.plan(src, overrides={"pump.energy": "8 mJ", "seed.energy": "0.5 nJ"}).to_dict()
    for key in ("source", "name"):
        expected.pop(key), got.pop(key)
    assert got == expected
    # and the override really changed the plan (8 mJ is not the file's pump energy)
    assert got["dump"] != regentime.plan(src).to_dict()["dump"]


def test_dump_argument_matches_cli_option():
    src = "cavities/ti_sapphire_1khz.yaml"
    assert regentime.plan(ROOT / src, dump=9).to_dict()["dump"]["round_trip"] == 9
    with pytest.raises(InputError, match="dump"):
        regentime.plan(ROOT / src, dump=0)


@pytest.mark.parametrize("overrides, key", [
    ({"pump.energyy": "8 mJ"}, "pump.energyy"),
    ({"pump.energy": "8 mm"}, "pump.energy"),
    ({"cavity[99].length": "1 m"}, "cavity[99]"),
])
def test_bad_override_names_the_key(overrides, key):
    with pytest.raises(InputError) as err:
        regentime.plan(ROOT / "cavities" / "ti_sapphire_1khz.yaml", overrides=overrides)
    assert key in str(err.value)


def test_repr_markdown_is_the_setup_card():
    p = regentime.plan(ROOT / "cavities" / "ti_sapphire_1khz.yaml")
    md = p._repr_markdown_()
    assert md.startswith("# Setup card") and "IEC 60825-1" in md


def test_plots_return_axes():
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    p = regentime.plan(ROOT / "cavities" / "ti_sapphire_1khz.yaml")
    fig, ax = plt.subplots()
    assert p.plot_buildup(ax) is ax
    assert ax.get_lines()  # something was drawn
    assert p.plot_contrast() is not None
    plt.close("all")


def test_notebook_example_runs():
    pytest.importorskip("matplotlib")
    out = subprocess.run([sys.executable, str(ROOT / "docs" / "notebook_example.py")],
                         capture_output=True, text=True, cwd=ROOT, timeout=300)
    assert out.returncode == 0, out.stderr
    assert "switch out after 25 round trips" in out.stdout  # the Ti:sapphire example's auto rule
    assert out.stdout.count(" mJ ") >= 4  # the sweep's table has its rows
