"""Snapshot tests of the planner's screens: the text a user reads, compared with stored files.

Each snapshot is the screen as plain text (no colours), taken from Textual's compositor the
same way ``App.export_screenshot`` does, on the fixed cavity ``tests/snapshots/tui_cavity.yaml``
at a fixed terminal size.  Plain text keeps the comparison robust (no SVG ids or colour
values) while still catching a moved region, a lost label or a changed number.

When a change to the screen is intended (or a planning stage changes its numbers), look at
the new screen and accept it by writing the snapshots again::

    REGENTIME_UPDATE_SNAPSHOTS=1 python -m pytest tests/test_tui_snapshots.py

then read the diff of ``tests/snapshots/*.txt`` before committing it.
"""

from __future__ import annotations

import difflib
import io
import os
from pathlib import Path

import pytest
from rich.console import Console

from regentime.tui.app import PlannerApp

HERE = Path(__file__).resolve().parent / "snapshots"
CAVITY = HERE / "tui_cavity.yaml"
UPDATE = os.environ.get("REGENTIME_UPDATE_SNAPSHOTS") == "1"


def screen_text(app) -> str:
    console = Console(width=app.size[0], height=app.size[1], file=io.StringIO(), record=True,
                      force_terminal=True, color_system="truecolor", legacy_windows=False,
                      safe_box=False)
    console.print(app.screen._compositor.render_update(full=True))
    return "\n".join(line.rstrip() for line in console.export_text(styles=False).splitlines()) + "\n"


def compare(name: str, text: str) -> None:
    path = HERE / f"{name}.txt"
    if UPDATE or not path.exists():
        if not UPDATE:
            pytest.fail(f"no snapshot {path.name} yet: look at the screen, then run with "
                        "REGENTIME_UPDATE_SNAPSHOTS=1 to store it")
        path.write_text(text, encoding="utf-8")
        return
    want = path.read_text(encoding="utf-8")
    if text != want:
        diff = "\n".join(difflib.unified_diff(want.splitlines(), text.splitlines(),
                                              "stored", "now", lineterm="", n=1))
        pytest.fail(f"screen differs from {path.name} (REGENTIME_UPDATE_SNAPSHOTS=1 accepts "
                    f"it after a look):\n{diff}")


async def shot(size, keys=(), trace: str | None = None) -> str:
    app = PlannerApp(path=str(CAVITY), watch_interval=0)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        for _ in range(100):
            await app.workers.wait_for_complete()
            await pilot.pause()
            if not app.planning:
                break
        if trace is not None:  # t, the file name, enter; wait for the fit
            await pilot.press("t")
            await pilot.pause()
            app.screen.query_one("#path").value = trace
            await pilot.press("enter")
            for _ in range(400):
                await pilot.pause(0.02)
                if app.trace_result is not None:
                    break
        if keys:
            await pilot.press(*keys)
            for _ in range(100):
                await app.workers.wait_for_complete()
                await pilot.pause()
                if not app.planning:
                    break
        app.clear_notifications()
        await pilot.pause()
        return screen_text(app)


async def test_main_screen_120x40() -> None:
    """The main screen at the size the layout is designed for: summary bar with the round
    trip, editor on the left, build-up plot, switching and generator table, contrast, checks,
    caution line and footer."""
    compare("main_120x40", await shot((120, 40)))


async def test_main_screen_80x24() -> None:
    """A small terminal: the editor starts hidden, the results take the width, the summary
    bar wraps, the caution stays."""
    compare("main_80x24", await shot((80, 24)))


async def test_later_switch_out_linear_with_sensitivity_160x48() -> None:
    """A big terminal after ']' (one round trip later), 'l' (linear axis) and 'v'
    (sensitivity strip): the solid marker leaves the dashed peak marker, the summary says the
    round trip was chosen here."""
    compare("later_linear_sensitivity_160x48",
            await shot((160, 48), ("right_square_bracket", "l", "v")))


async def test_help_screen_120x40() -> None:
    """The help screen over the main screen: keys, regions and the start of the caution."""
    compare("help_120x40", await shot((120, 40), ("f1",)))


async def test_trace_overlay_160x48(tmp_path) -> None:
    """A photodiode trace loaded (t): the measured pulses on the build-up plot, the trace
    panel under it with the measured round trip, the length error, the fit and the suggested
    switch-out.  The trace is invented: made from the frozen cavity's own build-up with the
    first space 2 mm longer, switched out one round trip before its peak (fixed noise seed)."""
    import dataclasses

    import numpy as np

    from regentime.fileformat import load_cavity
    from regentime.model import Space
    from regentime.planning.optics import cavity_optics
    from regentime.planning.buildup_plan import plan_buildup
    from regentime.trace.synthetic import synthetic_trace

    cav = load_cavity(str(CAVITY))
    els = list(cav.elements)
    i = next(k for k, e in enumerate(els) if isinstance(e, Space))
    els[i] = dataclasses.replace(els[i], length=els[i].length + 2e-3)
    real = dataclasses.replace(cav, elements=tuple(els))
    optics = cavity_optics(real)
    energy = plan_buildup(real, optics).result.energy
    t, v = synthetic_trace(energy, optics.round_trip_time, int(np.argmax(energy)) - 1,
                           dt=100e-12, seed=3)
    path = tmp_path / "scope.csv"
    with open(path, "w") as fh:
        fh.write("# invented demo trace: synthetic, not a measurement\ntime (ns),photodiode (V)\n")
        np.savetxt(fh, np.c_[t * 1e9, v], fmt="%.5f", delimiter=",")
    text = await shot((160, 48), trace=str(path))
    compare("trace_160x48", text.replace(str(tmp_path), "TMP"))
