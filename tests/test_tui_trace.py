"""Pilot tests of the planner's photodiode-trace overlay (keys t, a, T).

The trace is invented: made in this file with :mod:`regentime.trace.synthetic` from the
project's own build-up of the invented Nd:YLF example whose first space is made 12 mm longer
than the file says, switched out two round trips after that build-up's peak.  The screen must
show what the trace API gives for the same files (the TUI computes nothing), and the known
construction gives outside references: the length error is (T_real − T_file)·c/2 with c from
scipy.constants, to the issue's 2 mm; the switch-out offset is −2 to the issue's ±1 round trip.
"""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path

import numpy as np
import pytest
from scipy.constants import c as SPEED_OF_LIGHT  # CODATA value, scipy.constants

from regentime.fileformat import load_cavity
from regentime.tui.app import PlannerApp
from regentime.tui.dialogs import TraceScreen

from test_tui import screen_text, settle, summary

ROOT = Path(__file__).resolve().parents[1]
CAVITY = ROOT / "cavities" / "nd_ylf_ps_10hz.yaml"
SIZE = (160, 48)
LONGER = 0.012  # m added to the first space of the "real" cavity
AFTER_PEAK = 2  # the invented trace is switched out this many round trips after its peak


@pytest.fixture(scope="module")
def scope(tmp_path_factory):
    """(cavity copy, trace file, real round trip, file round trip, real peak round trip)."""
    from regentime.model import Space
    from regentime.planning.optics import cavity_optics
    from regentime.planning.buildup_plan import plan_buildup
    from regentime.trace.synthetic import synthetic_trace

    folder = tmp_path_factory.mktemp("trace")
    cav_path = folder / "regen.yaml"
    shutil.copyfile(CAVITY, cav_path)
    cav = load_cavity(str(cav_path))
    els = list(cav.elements)
    i = next(k for k, e in enumerate(els) if isinstance(e, Space))
    els[i] = dataclasses.replace(els[i], length=els[i].length + LONGER)
    real = dataclasses.replace(cav, elements=tuple(els))
    optics = cavity_optics(real)
    energy = plan_buildup(real, optics).result.energy
    peak = int(np.argmax(energy))
    t, v = synthetic_trace(energy, optics.round_trip_time, peak + AFTER_PEAK, dt=100e-12,
                           seed=11)
    trace_path = folder / "scope.csv"
    with open(trace_path, "w") as fh:
        fh.write("# invented demo trace: synthetic, not a measurement\ntime (ns),photodiode (V)\n")
        np.savetxt(fh, np.c_[t * 1e9, v], fmt="%.5f", delimiter=",")
    return cav_path, trace_path, optics.round_trip_time, cavity_optics(cav).round_trip_time, peak


async def load_trace(app, pilot, path: str, channel: str = "") -> None:
    """t, type the path (and channel), enter; wait for the fit or its error."""
    await pilot.press("t")
    await pilot.pause()
    assert isinstance(app.screen, TraceScreen)
    app.screen.query_one("#path").value = path
    app.screen.query_one("#channel").value = channel
    gen = app._trace_generation
    await pilot.press("enter")
    for _ in range(400):
        await pilot.pause(0.02)
        await app.workers.wait_for_complete()
        if app._trace_generation > gen and not any(
                w.group == "trace" and not w.is_finished for w in app.workers):
            break
    await pilot.pause()


def panel_text(app) -> str:
    return " ".join(str(app.query_one("#trace").content).split())


async def test_trace_overlay_shows_the_analysis_and_a_applies_its_shift(scope) -> None:
    from regentime.trace import analyse_trace, inputs_from_plan, read_trace

    cav_path, trace_path, t_real, t_file, _ = scope
    before = cav_path.read_bytes()
    app = PlannerApp(path=str(cav_path), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        plan = app.plan
        base = plan.dump_round_trip
        assert not app.query_one("#trace").has_class("loaded")  # hidden until a trace is loaded
        await load_trace(app, pilot, str(trace_path))
        result = app.trace_result
        assert result is not None and app.query_one("#trace").has_class("loaded")
        # the same numbers as the trace API on the same files
        ref = analyse_trace(read_trace(str(trace_path)), inputs_from_plan(plan))
        assert result.measured_round_trip_s == pytest.approx(ref.measured_round_trip_s, rel=1e-12)
        assert result.dump_offset_round_trips == ref.dump_offset_round_trips
        text = panel_text(app)
        assert f"round trip {ref.measured_round_trip_s * 1e9:.4f} ns" in text
        assert f"length error {ref.length_error_m * 1e3:+.2f} mm" in text
        assert f"(file {ref.fit.file_values['initial_log_gain']:.4g})" in text
        # against the construction: (T_real − T_file)·c/2 (scipy.constants c), issue: ±2 mm
        assert result.length_error_m == pytest.approx((t_real - t_file) * SPEED_OF_LIGHT / 2,
                                                      abs=2e-3)
        assert -AFTER_PEAK - 1 <= result.dump_offset_round_trips <= -AFTER_PEAK + 1  # issue: ±1
        # the overlay on the plot: the measured pulses, scaled by the fit
        plot = app.query_one("#plot")
        assert plot.overlay is not None and len(plot.overlay.energies) == \
            result.observed_dump_index + 1
        scale = result.fit.values["scale_per_J"]
        assert plot.overlay.energies[0] == pytest.approx(result.train.amplitudes[0] / scale)
        assert "measured pulses" in screen_text(app)
        # a: switch out where the trace says, like [ and ] (no edit of the file)
        await pilot.press("a")
        await settle(app, pilot)
        target = base + result.dump_offset_round_trips
        assert app.plan.dump_round_trip == target
        assert f"switch-out after {target} " in summary(app) and "w writes it" in summary(app)
        assert not app.modified and "applied" in panel_text(app)
        await pilot.press("a")  # pressing it again does not move it further
        await settle(app, pilot)
        assert app.plan.dump_round_trip == target
        await pilot.press("w")  # written: now the document has it
        await settle(app, pilot)
        assert app.doc.get("dump") == target and app.modified
        # T removes the overlay
        await pilot.press("T")
        await pilot.pause()
        assert app.trace_result is None and plot.overlay is None
        assert not app.query_one("#trace").has_class("loaded")
    assert cav_path.read_bytes() == before  # nothing saved


async def test_bad_trace_file_shows_one_line_error(scope, tmp_path: Path) -> None:
    cav_path = scope[0]
    bad = tmp_path / "bad.csv"
    rows = [f"{0.1 * k:.1f},0.01" for k in range(60)]
    rows[37] = "3.7,oops"  # file line 39: after the header line
    bad.write_text("time (ns),photodiode (V)\n" + "\n".join(rows) + "\n")
    app = PlannerApp(path=str(cav_path), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        for path in (str(bad), str(tmp_path / "missing.csv")):
            await load_trace(app, pilot, path)
            errors = [n for n in app._notifications if n.severity == "error"]
            assert errors, f"no error shown for {path}"
            message = errors[-1].message
            assert message.startswith("trace not loaded: ") and "\n" not in message
            assert app.trace_result is None and app.plan is not None  # still running
        assert "bad.csv:39:" in errors[0].message  # names the line
        # a channel that is not in the file
        await load_trace(app, pilot, str(scope[1]), channel="CH7")
        assert app.trace_result is None
        assert "CH7" in [n for n in app._notifications if n.severity == "error"][-1].message


async def test_a_without_a_trace_says_how_to_load_one(scope) -> None:
    app = PlannerApp(path=str(scope[0]), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        n = app.plan.dump_round_trip
        await pilot.press("a")
        await settle(app, pilot)
        assert app.plan.dump_round_trip == n
        assert any("t loads one" in x.message for x in app._notifications)
