"""Pilot tests of the terminal planner (``App.run_test``): what a user does, what they see.

The TUI computes nothing itself, so the reference for every number on screen is the plan
that ``regentime plan`` would make from the same text (load_cavity_text + make_plan); the
physics behind those numbers is tested in the core, timing and contrast tests.  Where a test
checks a relation between numbers, the source of the relation is named beside it.
"""

from __future__ import annotations

import difflib
import json
import os
import shutil
import stat
from pathlib import Path

import pytest
from scipy.constants import c as SPEED_OF_LIGHT  # CODATA value, scipy.constants

from regentime.fileformat.loader import load_cavity_text
from regentime.planning.plan import CAUTION, CAUTION_SHORT, make_plan
from regentime.numfmt import eng
from regentime.tui.app import KEYS, PlannerApp
from regentime.tui.dialogs import ConfirmScreen, PathScreen
from regentime.tui.help_screen import HelpScreen
from regentime.tui.load_error_screen import LoadErrorScreen
from regentime.tui import view

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "cavities" / "ti_sapphire_1khz.yaml"
SIZE = (120, 40)


@pytest.fixture
def cavity_file(tmp_path: Path) -> Path:
    """A copy of the invented Ti:sapphire example, so tests may save over it."""
    target = tmp_path / "regen.yaml"
    shutil.copyfile(EXAMPLE, target)
    return target


async def settle(app, pilot) -> None:
    """Let the planning worker finish and its result reach the screen."""
    await pilot.pause()
    for _ in range(100):
        await app.workers.wait_for_complete()
        await pilot.pause()
        if not app.planning:
            return
    raise AssertionError("planning did not settle")


async def type_into(app, pilot, path: str, text: str) -> None:
    """Focus the editor box of ``path`` (its text is selected on focus) and type ``text``."""
    row = app.query_one("#editor").row(path)
    assert row is not None, f"no editor row for {path}"
    row.input.focus()
    await pilot.pause()
    row.input.select_all()
    await pilot.press(*text)
    await settle(app, pilot)


def screen_text(app) -> str:
    """The screen as plain text (what a user reads), without styles."""
    import io

    from rich.console import Console

    console = Console(width=app.size[0], height=app.size[1], file=io.StringIO(), record=True,
                      force_terminal=True, color_system="truecolor", legacy_windows=False,
                      safe_box=False)
    console.print(app.screen._compositor.render_update(full=True))
    return console.export_text(styles=False)


def summary(app) -> str:
    return str(app.query_one("#summary").content)


def timing_text(app) -> str:
    return str(app.query_one("#timing").content)


def reference_plan(text: str, dump=None):
    """The plan ``regentime plan`` makes from the same file text."""
    return make_plan(load_cavity_text(text, None), dump=dump)


async def test_opens_file_and_shows_the_plans_numbers(cavity_file: Path) -> None:
    before = cavity_file.read_bytes()
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        ref = reference_plan(before.decode())
        bar = summary(app)
        assert f"round trip {ref.round_trip_time * 1e9:.4f} ns" in bar
        assert f"switch-out after {ref.dump_round_trip} " in bar
        assert eng(ref.buildup.output_energy, "J", 4) in bar
        assert "regen.yaml" in app.sub_title and "modified" not in app.sub_title
        assert CAUTION_SHORT in str(app.query_one("#caution").content)
        await pilot.press("ctrl+q")
        await pilot.pause()
    assert app.return_value == 0
    assert cavity_file.read_bytes() == before  # untouched without a save


async def test_edit_a_value_and_the_table_follows(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        table_before = timing_text(app)
        await type_into(app, pilot, "pump.energy", "12 mJ")
        ref = reference_plan(app.doc.text())
        assert app.doc.get("pump.energy") == "12 mJ"
        assert "modified" in app.sub_title
        assert eng(ref.buildup.output_energy, "J", 4) in summary(app)
        # more pump: the peak comes earlier, so the switch-off row of the table moves
        assert ref.dump_round_trip != reference_plan(EXAMPLE.read_text()).dump_round_trip
        assert timing_text(app) != table_before
        off = next(r for r in ref.timing.rows if r.drives == "switch_off")
        assert f"{off.delay * 1e9:.3f} ns" in timing_text(app)  # the setup card's ns format


async def test_switch_out_keys_move_gate_and_delay_by_one_round_trip(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        first = app.plan
        n = first.dump_round_trip
        await pilot.press("right_square_bracket")
        await settle(app, pilot)
        later = app.plan
        assert later.dump_round_trip == n + 1
        assert f"switch-out after {n + 1} " in summary(app)
        t_rt = first.round_trip_time
        # quarter-wave scheme: gate width = (N − 1)·T_rt (docs/definitions.md, "Gate width"), so one more
        # round trip adds exactly T_rt; the recommended edges are window middles, which move
        # with the crossings; 1 ps covers the window search's resolution
        assert later.switching.gate_width - first.switching.gate_width == pytest.approx(t_rt, abs=1e-12)
        off = {r.drives: r.delay for r in first.timing.rows}
        off2 = {r.drives: r.delay for r in later.timing.rows}
        res = first.cavity.generator.resolution or 0.0  # delays are rounded to this step
        assert off2["switch_off"] - off["switch_off"] == pytest.approx(t_rt, abs=res + 1e-12)
        assert off2["switch_on"] == pytest.approx(off["switch_on"], abs=res + 1e-12)
        assert f"gate width {later.switching.gate_width * 1e9:.3f} ns" in timing_text(app)
        # back twice: one earlier than the start
        await pilot.press("left_square_bracket", "left_square_bracket")
        await settle(app, pilot)
        assert app.plan.dump_round_trip == n - 1
        # to the steadiest and the peak: the planner's own rules
        await pilot.press("s")
        await settle(app, pilot)
        assert app.plan.dump_round_trip == reference_plan(app.doc.text(), "steady").dump_round_trip
        await pilot.press("p")
        await settle(app, pilot)
        assert app.plan.dump_round_trip == first.buildup.peak_round_trip
        assert not app.modified  # moving the switch-out alone does not edit the file


async def test_write_back_the_switch_out_round_trip(cavity_file: Path) -> None:
    original = cavity_file.read_text()
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        n = app.plan.dump_round_trip
        await pilot.press("right_square_bracket")
        await settle(app, pilot)
        await pilot.press("w")
        await settle(app, pilot)
        assert app.doc.get("dump") == n + 1
        assert app.modified
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert not app.modified
    saved = cavity_file.read_text()
    changed = [d for d in difflib.ndiff(original.splitlines(), saved.splitlines()) if d[:1] in "+-"]
    assert len(changed) == 2
    assert changed[0].startswith("- dump: auto ")
    assert changed[1].startswith(f"+ dump: {n + 1} ")
    assert changed[1].endswith("# switch out at the round trip of peak energy")


async def test_invalid_unit_is_marked_and_the_old_plan_stays(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        plan_before, bar_before = app.plan, summary(app)
        await type_into(app, pilot, "pump.energy", "9 ns")
        row = app.query_one("#editor").row("pump.energy")
        assert row.has_class("bad")
        assert "energy" in row.reason and "'ns' is a time" in row.reason
        assert app.plan is plan_before and summary(app) == bar_before
        assert app.doc.get("pump.energy") == "9 mJ"  # the document keeps the valid value
        # fixing it clears the mark
        await type_into(app, pilot, "pump.energy", "9 mJ")
        assert not row.has_class("bad")


async def test_whole_file_problem_keeps_last_plan(cavity_file: Path) -> None:
    """A value each key accepts but the file as a whole refuses (pump longer than laser)."""
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        plan_before = app.plan
        await type_into(app, pilot, "pump.wavelength", "900 nm")
        assert app.plan is plan_before
        assert app.input_problems, "the refusal must be shown"
        assert "input refused" in summary(app)
        assert app.query_one("#summary").has_class("stale")


async def test_save_keeps_comments_and_changes_only_the_value(cavity_file: Path) -> None:
    os.chmod(cavity_file, 0o640)
    original = cavity_file.read_text()
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        await type_into(app, pilot, "seed.energy", "3 nJ")
        await pilot.press("escape", "ctrl+s")
        await settle(app, pilot)
        assert "modified" not in app.sub_title
    saved = cavity_file.read_text()
    diff = [d for d in difflib.ndiff(original.splitlines(), saved.splitlines()) if d[:1] in "+-"]
    assert len(diff) == 2
    assert diff[0].startswith("-   energy: 2 nJ") and diff[1].startswith("+   energy: 3 nJ")
    assert diff[1].endswith("# nJ-class pulses from a mode-locked oscillator, after the stretcher")
    assert stat.S_IMODE(os.stat(cavity_file).st_mode) == 0o640  # permissions kept
    assert not [p for p in cavity_file.parent.iterdir() if p.name.startswith(".regentime-")]


async def test_quit_with_unsaved_changes_asks_first(cavity_file: Path) -> None:
    original = cavity_file.read_bytes()
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        await type_into(app, pilot, "pump.lead", "160 ns")
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.click("#answer-cancel")
        await pilot.pause()
        assert not isinstance(app.screen, ConfirmScreen) and app.is_running
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.click("#answer-discard")
        await pilot.pause()
    assert app.return_value == 0
    assert cavity_file.read_bytes() == original


async def test_help_screen_lists_every_key_and_the_caution() -> None:
    app = PlannerApp(watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        import io

        from rich.console import Console

        console = Console(width=100, file=io.StringIO(), record=True)
        console.print(app.screen.query_one("#help-keys").content)
        body = " ".join(console.export_text().split())
        for _, _, _, description, _, _ in KEYS:
            assert description in body
        assert "IEC 60825-1" in CAUTION
        assert str(app.screen.query_one("#help-caution").content) == CAUTION
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)


async def test_demo_without_a_file_says_so() -> None:
    app = PlannerApp(watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        assert "demo" in app.sub_title and "invented" in app.sub_title
        assert app.plan is not None


async def test_file_that_fails_to_load_offers_the_demo(tmp_path: Path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_text("format: regentime/1\nseed: [unclosed\n")
    app = PlannerApp(path=str(bad), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, LoadErrorScreen)
        shown = " ".join(str(s.content) for s in app.screen.query("Static"))
        assert "bad.yaml" in shown
        await pilot.press("d")
        await settle(app, pilot)
        assert "demo" in app.sub_title and app.plan is not None
    assert bad.read_text() == "format: regentime/1\nseed: [unclosed\n"


async def test_missing_file_quits_with_input_error_code(tmp_path: Path) -> None:
    app = PlannerApp(path=str(tmp_path / "nope.yaml"), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, LoadErrorScreen)
        await pilot.press("q")
        await pilot.pause()
    assert app.return_value == 2  # docs/definitions.md exit codes: 2 = input wrong


async def test_remove_an_element_changes_the_round_trip(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        t0 = app.plan.round_trip_time
        elements = app.query_one("#elements")
        index = next(i for i, item in enumerate(app.doc.get("cavity"))
                     if item.get("space") == "500 mm")  # the curved cavity stays stable
        elements.focus()
        elements.index = index
        await pilot.press("delete")
        await settle(app, pilot)
        assert len(app.doc.get("cavity")) == 10
        # 500 mm of air crossed twice per round trip: ΔT = 2 L n_g / c; n_g of air at 800 nm
        # is 1.00027…1.00029 for laboratory air (Ciddor 1996, from memory, bracketed)
        dt = t0 - app.plan.round_trip_time
        assert 2 * 0.5 * 1.00027 / SPEED_OF_LIGHT < dt < 2 * 0.5 * 1.00029 / SPEED_OF_LIGHT
        assert f"{app.plan.round_trip_time * 1e9:.4f} ns" in summary(app)
        # move the highlighted element up: the list and the file follow
        elements.index = 1
        await pilot.press("shift+down")
        await settle(app, pilot)
        assert "pockels_cell" in app.doc.get("cavity")[1]


async def test_add_an_element_opens_its_editor(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        elements = app.query_one("#elements")
        elements.focus()
        elements.index = 7  # after the space behind the polarizer
        await pilot.press("plus")
        await pilot.pause()
        kinds = app.screen.query_one("#kinds")
        kinds.highlighted = ["mirror", "space", "plate", "pockels_cell", "waveplate",
                             "polarizer", "gain_medium"].index("plate")
        await pilot.press("enter")
        await settle(app, pilot)
        assert "plate" in app.doc.get("cavity")[8]
        assert app.input_problems  # a plate needs a length: marked, last plan kept
        row = next(r for r in app.screen.query("FieldRow") if r.path.endswith(".length"))
        assert row.has_class("bad")
        t0 = app.plan.round_trip_time
        row.input.focus()
        await pilot.press(*"5 mm")
        await settle(app, pilot)
        assert not app.input_problems and not row.has_class("bad")
        # 5 mm of fused silica crossed twice: ΔT = 2 L (n_g − n_g,air) / c, taking the 5 mm out
        # of no space (the plate is added, not swapped); n_g of fused silica at 800 nm is
        # 1.4533 (Malitson 1965 Sellmeier, derived; from memory, ±0.001)
        dt = app.plan.round_trip_time - t0
        assert dt == pytest.approx(2 * 5e-3 * 1.4533 / SPEED_OF_LIGHT, rel=1e-3)
        await pilot.press("escape")
        await pilot.pause()
        assert "plate" in str(app.query_one("#elements").children[8].query_one("Label").content)


async def test_export_table_and_json(cavity_file: Path, tmp_path: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        for name in ("setup.csv", "setup.md", "plan.json"):
            await pilot.press("x")
            await pilot.pause()
            assert isinstance(app.screen, PathScreen)
            app.screen.query_one("#path").value = str(tmp_path / name)
            await pilot.press("enter")
            await settle(app, pilot)
        plan = app.plan
    csv_lines = (tmp_path / "setup.csv").read_text().splitlines()
    assert csv_lines[0].startswith("output,drives,delay_s,width_s")
    assert len(csv_lines) == 1 + len(plan.timing.rows)
    off = next(r for r in plan.timing.rows if r.drives == "switch_off")
    assert any(line.startswith(f"{off.output},switch_off,{off.delay!r},") for line in csv_lines)
    md = (tmp_path / "setup.md").read_text()
    assert "IEC 60825-1" in md and f"{off.delay * 1e9:.3f} ns" in md
    data = json.loads((tmp_path / "plan.json").read_text())
    assert data["round_trip_time_s"] == plan.round_trip_time


async def test_file_changed_on_disk_is_reloaded(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0.05)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        text = cavity_file.read_text().replace("energy: 9 mJ", "energy: 8 mJ")
        cavity_file.write_text(text)
        os.utime(cavity_file, ns=(1, 1))  # a different stamp even on coarse clocks
        await pilot.pause(0.3)
        await settle(app, pilot)
        assert app.doc.get("pump.energy") == "8 mJ"
        # with unsaved edits it asks first
        await type_into(app, pilot, "seed.energy", "3 nJ")
        cavity_file.write_text(text.replace("energy: 8 mJ", "energy: 7 mJ"))
        os.utime(cavity_file, ns=(2, 2))
        await pilot.pause(0.3)
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.click("#answer-keep")
        await pilot.pause()
        assert app.doc.get("seed.energy") == "3 nJ"


async def test_resize_to_small_terminal_keeps_working(cavity_file: Path) -> None:
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(app, pilot)
        assert app.screen.has_class("narrow") and app.screen.has_class("short")
        assert not app.query_one("#editor").display  # results first on a narrow terminal
        assert f"{app.plan.round_trip_time * 1e9:.4f} ns" in screen_text(app)
        await pilot.resize_terminal(160, 48)
        await pilot.pause()
        assert not app.screen.has_class("narrow") and app.screen.has_class("tall")
        await pilot.press("l", "v", "e", "n")
        await settle(app, pilot)
        assert not app.query_one("#plot").log_scale and app.query_one("#editor").display
        await pilot.resize_terminal(40, 12)
        await pilot.pause()
        assert app.is_running


async def test_stability_map_marks_the_setting(tmp_path: Path) -> None:
    """The map is the stability module's local_map around the plan's N and rate."""
    target = tmp_path / "cw.yaml"
    shutil.copyfile(ROOT / "cavities" / "yb_100khz_cw.yaml", target)
    app = PlannerApp(path=str(target), watch_interval=0)
    async with app.run_test(size=(120, 48)) as pilot:
        await settle(app, pilot)
        await pilot.press("m")
        await pilot.pause()
        screen = app.screen
        for _ in range(200):
            if screen.map is not None:
                break
            await pilot.pause(0.05)
        m = screen.map
        assert m is not None and m.file_point is not None
        i, j = m.file_point
        assert m.round_trips[i] == app.plan.dump_round_trip
        assert m.rates_Hz[j] == pytest.approx(app.plan.cavity.repetition_rate)
        assert "◉" in str(screen.query_one("#map").content)
        await pilot.press("escape")
        await pilot.pause()
        assert screen is not app.screen


async def test_emptying_an_optional_box_removes_the_key(cavity_file: Path) -> None:
    original = cavity_file.read_text()
    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        await type_into(app, pilot, "pump.latency", "")  # select all, then nothing typed
        row = app.query_one("#editor").row("pump.latency")
        await pilot.press("backspace")
        await settle(app, pilot)
        assert app.doc.get("pump.latency") is None and not row.has_class("bad")
        assert row.input.placeholder == "default: 0 s"  # the schema's default applies again
        removed = [d for d in difflib.ndiff(original.splitlines(), app.doc.text().splitlines())
                   if d[:1] in "+-"]
        assert removed == ["-   latency: 210 ns             # pump trigger input to pump light out"]
        assert app.modified
        # the plan on screen is the one `regentime plan` makes of the new text
        ref = reference_plan(app.doc.text())
        pump = next(r for r in ref.timing.rows if r.drives == "pump")
        assert f"{pump.delay * 1e9:.3f} ns" in timing_text(app)
        # a required key refuses, with the reason, and the file keeps it
        await type_into(app, pilot, "seed.energy", "")
        seed = app.query_one("#editor").row("seed.energy")
        await pilot.press("backspace")
        await settle(app, pilot)
        assert seed.has_class("bad") and "required" in seed.reason
        assert app.doc.get("seed.energy") == "2 nJ"


async def test_gain_rows_show_the_library_values(cavity_file: Path) -> None:
    from regentime.materials.gain_media import GAIN_MEDIA

    app = PlannerApp(path=str(cavity_file), watch_interval=0)
    async with app.run_test(size=SIZE) as pilot:
        await settle(app, pilot)
        editor = app.query_one("#editor")
        hint = editor.row("gain.emission_cross_section").input.placeholder
        assert hint == "library: 3e-19 cm²"
        # the library's Ti:sapphire value lies in the published range 2.8-4.1e-19 cm²
        # (P. F. Moulton, J. Opt. Soc. Am. B 3, 125 (1986), as quoted in the library's source)
        sigma = GAIN_MEDIA["ti_sapphire"].emission_cross_section
        assert 2.8e-23 <= sigma <= 4.1e-23
        assert editor.row("gain.upper_state_lifetime").input.placeholder == "library: 3.2 µs"
        assert editor.row("seed.bandwidth").input.placeholder == "e.g. 30 nm"
        assert editor.row("gain.pump_radius").input.placeholder == "default: 0.66 mm (= mode_radius)"
        # another medium: the hints follow (Nd:YAG upper-state lifetime 230 µs, from memory:
        # W. Koechner, Solid-State Laser Engineering, Nd:YAG table)
        await type_into(app, pilot, "gain.material", "nd_yag")
        assert editor.row("gain.upper_state_lifetime").input.placeholder == "library: 230 µs"
        await type_into(app, pilot, "gain.mode_radius", "0.5 mm")
        assert editor.row("gain.pump_radius").input.placeholder == "default: 0.5 mm (= mode_radius)"
