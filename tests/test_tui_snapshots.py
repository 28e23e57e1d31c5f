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


async def shot(size, keys=()) -> str:
    app = PlannerApp(path=str(CAVITY), watch_interval=0)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        for _ in range(100):
            await app.workers.wait_for_complete()
            await pilot.pause()
            if not app.planning:
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
