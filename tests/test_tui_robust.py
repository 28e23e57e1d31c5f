"""Robustness of the terminal planner under what users really do: a file changed by someone
else while it is open, dialogs answered twice by queued keys, random key-mashing, and an
unexpected error (the edits must survive it).  These are checked against the file on disk
and Textual's screen stack, not against the project's own numbers."""

from __future__ import annotations

import os
import random
import shutil
from pathlib import Path

import pytest

from regentime.tui.app import PlannerApp, autosave_path
from regentime.tui.dialogs import ConfirmScreen

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "cavities" / "ti_sapphire_1khz.yaml"
SIZE = (120, 40)


@pytest.fixture
def cavity_file(tmp_path: Path) -> Path:
    target = tmp_path / "regen.yaml"
    shutil.copyfile(EXAMPLE, target)
    return target


async def settle(app, pilot) -> None:
    await pilot.pause()
    for _ in range(100):
        await app.workers.wait_for_complete()
        await pilot.pause()
        if not app.planning:
            return
    raise AssertionError("planning did not settle")


async def test_keep_my_edits_then_save_asks_again(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0.05)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        app.doc.set("seed.energy", "3 nJ")
        outside = cavity_file.read_text().replace("energy: 9 mJ", "energy: 7 mJ")
        assert outside != cavity_file.read_text()
        cavity_file.write_text(outside)
        os.utime(cavity_file, ns=(2, 2))
        await pilot.pause(0.3)
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.click("#answer-keep")
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen), "save over an outside change must ask"
        await pilot.click("#answer-cancel")
        await pilot.pause()
        assert cavity_file.read_text() == outside  # the outside change is still there
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.click("#answer-overwrite")
        await pilot.pause()
        assert app.doc.text() == cavity_file.read_text()
        assert not app.modified


async def test_dialog_answered_twice_does_not_pop_the_main_screen(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        screen = ConfirmScreen("?", [("yes", "Yes"), ("no", "No")])
        app.push_screen(screen)
        await pilot.pause()
        screen.dismiss("yes")
        screen.dismiss("no")  # queued second answer: Textual would raise ScreenStackError
        await pilot.pause()
        assert len(app.screen_stack) == 1
        assert app.is_running


async def test_random_keys_never_crash_the_app(cavity_file: Path) -> None:
    """Seeded, bounded key-mashing (300 keys) including the palette, save and every
    dialog key; the app must still run with one main screen under any open dialogs."""
    rng = random.Random(12)
    keys = (["ctrl+p", "ctrl+s", "escape", "enter", "tab", "shift+tab", "up", "down", "left",
             "right", "space", "backspace", "a", "e", "r", "x", "1", "m", "[", "]", "?", "f1"]
            + list("0123456789 .unJmk"))
    app = PlannerApp(path=str(cavity_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        for i in range(300):
            key = rng.choice(keys)
            if key in ("q", "ctrl+q", "ctrl+c"):
                continue
            await pilot.press(key)
            if i % 25 == 0:
                await pilot.pause()
            assert app.is_running, f"app stopped after key {i} ({key})"
        await pilot.pause()
        assert app.return_code is None
        assert len(app.screen_stack) >= 1


async def test_unexpected_error_keeps_the_edits(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file))
    with pytest.raises(RuntimeError, match="a bug"):  # Textual re-raises it after the app ends
        async with app.run_test(size=SIZE) as pilot:
            await settle(app, pilot)
            app.doc.set("seed.energy", "3 nJ")
            edited = app.doc.text()
            app.call_later(_boom)
            await pilot.pause()
    assert app.autosaved == autosave_path(str(cavity_file))
    assert Path(app.autosaved).read_text() == edited
    assert "3 nJ" not in cavity_file.read_text()  # the cavity file itself is untouched


def _boom() -> None:
    raise RuntimeError("a bug")
