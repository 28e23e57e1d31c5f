"""Every generator row carries a status (ok / marginal / cannot) and a reason, decided by the
Jones-model window alone (docs/timing.md, "Row status")."""

from __future__ import annotations

from dataclasses import replace

import _switch_cavity as tc

from regentime.planning.plan import make_plan


def _plan(a_mm: float, jitter: float):
    cav = tc.load(scheme="half-wave", a=a_mm, rise="4 ns", resolution="250 ps", rep="10 Hz")
    return make_plan(replace(cav, switch=replace(cav.switch, jitter=jitter)))


def _rows(plan):
    return {r.drives: r for r in plan.timing.rows}


def test_thin_margin_is_marginal_never_ok():
    # half-wave, cell 650 mm from its end mirror: the two crossings are 2·0.65 m/c = 4.34 ns
    # apart (scipy.constants.c), about the 4 ns rise time; 300 ps rms jitter and a 250 ps step
    plan = _plan(650.0, 300e-12)
    sp = plan.switching
    assert sp.on_window is not None and sp.off_window is not None  # the Jones model finds windows
    for drives in ("switch_on", "switch_off"):
        row = _rows(plan)[drives]
        margin = 0.5 * (sp.on_window[1] - sp.on_window[0]) if drives == "switch_on" else \
            0.5 * (sp.off_window[1] - sp.off_window[0])
        # marginal: margin below 3 σ (common practice) or the step above a quarter of it
        assert margin < 3 * 300e-12 or 250e-12 > 0.25 * margin
        assert row.status == "marginal" and "σ" in row.reason or "step" in row.reason
    assert not plan.cannot_be_met  # marginal is a warning, not exit 3
    assert any(c.name == "timing" and c.level == "warning" and "marginal" in c.message
               for c in plan.checks)


def test_short_gap_is_never_ok_and_cannot_means_exit_3():
    # the cell close to its end mirror: 2·L/c between the crossings (scipy.constants.c) is far
    # below the 4 ns edge; the Jones model decides whether any edge time still works
    for a_mm in (100.0, 20.0, 5.0):
        plan = _plan(a_mm, 300e-12)
        rows = [r for r in plan.timing.rows if r.drives in ("switch_on", "switch_off")]
        assert all(r.status in ("marginal", "cannot") and r.reason for r in rows), a_mm
        windows = (plan.switching.on_window, plan.switching.off_window)
        # cannot exactly when the Jones model finds no window, and then exit 3
        assert any(r.status == "cannot" for r in rows) == (None in windows), a_mm
        assert plan.cannot_be_met == any(c.level == "error" for c in plan.checks)
        if None in windows:
            assert plan.cannot_be_met


def test_wide_window_is_ok():
    plan = _plan(650.0, 10e-12)
    cav = tc.load(scheme="quarter-wave")  # the roomy quarter-wave test cavity, 100 ps jitter
    rows = _rows(make_plan(cav))
    assert rows["switch_on"].status == rows["switch_off"].status == "ok"
    assert rows["switch_on"].reason == ""
    d = rows["switch_on"].to_dict()
    assert d["status"] == "ok" and d["reason"] == ""
    assert plan is not None
