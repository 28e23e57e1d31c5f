"""pump.overlap: default 1; with a Gaussian profile it is the share stored at all, and a value
below 1 there is flagged (the radial profiles already count the mode/pump mismatch)."""

from __future__ import annotations

from pathlib import Path

from regentime import fileformat
from regentime.planning.plan import make_plan

EXAMPLE = Path(__file__).resolve().parent.parent / "cavities" / "yb_100khz_cw.yaml"


def _load(tmp_path, old, new):
    text = EXAMPLE.read_text(encoding="utf-8")
    assert old in text
    f = tmp_path / "cav.yaml"
    f.write_text(text.replace(old, new), encoding="utf-8")
    return fileformat.load_cavity(str(f))


def test_overlap_defaults_to_one(tmp_path):
    cav = _load(tmp_path, "  overlap: 0.7 ", "  # no overlap ")
    assert cav.pump.overlap == 1.0


def test_gaussian_profile_with_overlap_below_one_warns(tmp_path):
    cav = _load(tmp_path, "  overlap: 0.7 ", "  overlap: 0.7 ")
    names = [(c.level, c.name) for c in make_plan(cav).checks]
    assert ("warning", "overlap") in names


def test_flat_top_or_overlap_one_does_not_warn(tmp_path):
    flat = _load(tmp_path, "profile: gaussian  ", "profile: flat-top  ")
    assert "overlap" not in [c.name for c in make_plan(flat).checks]
    one = _load(tmp_path, "  overlap: 0.7 ", "  overlap: 1   ")
    assert "overlap" not in [c.name for c in make_plan(one).checks]
