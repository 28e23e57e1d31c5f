"""The file side of the terminal planner: save (asking again when the file changed on disk
since it was read), save as, export, reload, watching the file, quitting with unsaved edits,
and keeping the edits in an autosave file when the app stops on an unexpected error."""

from __future__ import annotations

import os
from typing import Optional

from textual import work

from regentime.errors import InputError, InputErrors
from regentime.fileformat.document import CavityDocument
from regentime.tui.dialogs import ConfirmScreen, PathScreen


class FileActions:
    """Mixin for :class:`~regentime.tui.app.PlannerApp` (uses its ``doc``, ``plan``,
    ``saved_text``, ``disk_stamp``, ``path`` and ``open_document``)."""

    # ---- files -------------------------------------------------------------------------------
    def action_save(self) -> None:
        if self.doc is None:
            return
        if not self.doc.source:
            self.action_save_as()
            return
        self._save(None)

    def action_save_as(self) -> None:
        if self.doc is None:
            return
        start = self.doc.source or "my-regen.yaml"
        self.push_screen(PathScreen("Save the cavity file as:", start,
                                    "YAML; the file's comments and key order are kept."),
                         self._save_as_chosen)

    def _save_as_chosen(self, path: Optional[str]) -> None:
        if not path:
            return
        if os.path.exists(path) and os.path.realpath(path) != os.path.realpath(self.doc.source or ""):
            self.push_screen(ConfirmScreen(f"{path} exists. Replace it?",
                                           [("yes", "Replace"), ("no", "Cancel")]),
                             lambda a: self._save(path) if a == "yes" else None)
            return
        self._save(path)

    def _save(self, path: Optional[str], then_quit: bool = False, force: bool = False) -> bool:
        if not force and path is None and self._changed_outside():
            self.push_screen(ConfirmScreen(
                "The file changed on disk since it was read. Save over the outside change?",
                [("overwrite", "Save over it"), ("cancel", "Cancel")]),
                lambda a: self._save(None, then_quit, force=True) if a == "overwrite" else None)
            return False
        try:
            written = self.doc.save(path)
        except (InputError, OSError) as exc:
            msg = exc.one_line() if isinstance(exc, InputError) else str(exc)
            self.notify(f"not saved: {msg}", severity="error", timeout=10)
            return False
        self.saved_text = self.doc.text()
        self.disk_stamp = _stamp(written)
        self.path = written
        self._update_title()
        note = "" if not self.input_problems else " (note: the file has problems, see checks)"
        self.notify(f"saved {written}{note}", severity="warning" if note else "information")
        if then_quit:
            self.exit(0)
        return True

    def _changed_outside(self) -> bool:
        """True when the file on disk is neither what was last read or saved nor the edits."""
        if self.doc is None or not self.doc.source:
            return False
        try:
            with open(self.doc.source, encoding="utf-8") as fh:
                on_disk = fh.read()
        except FileNotFoundError:
            return False
        except (OSError, UnicodeDecodeError):
            return True
        return on_disk not in (self.saved_text, self.doc.text())

    def pop_screen(self):
        """Pop the top screen; a second dismissal of a screen already gone (a modal or the
        command palette answered twice by queued keys) is ignored instead of popping the
        main screen."""
        if len(self.screen_stack) <= 1:
            from textual.await_complete import AwaitComplete

            async def nothing() -> None:
                return None

            return AwaitComplete(nothing())
        return super().pop_screen()

    def _handle_exception(self, error: Exception) -> None:
        """An unexpected error ends the app (Textual shows it); unsaved edits are written
        first to the autosave file beside the cavity file so they are never lost."""
        self.autosaved = self._autosave()
        super()._handle_exception(error)

    def _autosave(self) -> Optional[str]:
        if self.doc is None or not self.modified:
            return None
        from regentime.atomic_write import write_atomic

        target = autosave_path(self.doc.source)
        try:
            write_atomic(target, self.doc.text())
        except OSError:
            return None
        return target

    def action_export(self) -> None:
        if self.plan is None:
            self.notify("no valid plan to export yet", severity="warning")
            return
        from regentime.tui.exporting import FORMATS, default_name

        hint = "The ending picks the format: " + ", ".join(f"{e} {w}" for e, w in FORMATS.items())
        self.push_screen(PathScreen("Export to:", default_name(self.doc.source), hint),
                         self._export_chosen)

    def _export_chosen(self, path: Optional[str]) -> None:
        if path and self.plan is not None:
            self._export_worker(self.plan, path)

    @work(thread=True, group="export", exit_on_error=False)
    def _export_worker(self, plan, path: str) -> None:
        from regentime.tui.exporting import export

        try:
            what = export(plan, path)
        except InputError as exc:
            self.call_from_thread(self.notify, f"not exported: {exc.one_line()}", severity="error")
        except Exception as exc:  # noqa: BLE001 - shown to the user, never a crash
            self.call_from_thread(self.notify, f"not exported: {type(exc).__name__}: {exc}",
                                  severity="error")
        else:
            self.call_from_thread(self.notify, f"{what} written to {path}")

    def action_reload(self) -> None:
        if self.doc is None or not self.doc.source:
            self.notify("the built-in demo has no file to reload", severity="warning")
            return
        if self.modified:
            self.push_screen(ConfirmScreen("Reload the file from disk and drop your unsaved edits?",
                                           [("reload", "Reload"), ("keep", "Keep my edits")]),
                             lambda a: self.call_later(self._reload) if a == "reload" else None)
            return
        self.call_later(self._reload)

    async def _reload(self) -> None:
        try:
            doc = CavityDocument.load(self.doc.source)
        except (InputError, InputErrors) as exc:
            self.disk_stamp = _stamp(self.doc.source)
            self.notify("not reloaded: " + "; ".join(_lines(exc)), severity="error", timeout=10)
            return
        await self.open_document(doc)
        self.notify(f"reloaded {doc.source}")

    def _check_disk(self) -> None:
        if self.doc is None or not self.doc.source or self._asking_disk:
            return
        stamp = _stamp(self.doc.source)
        if stamp is None or stamp == self.disk_stamp:
            return
        self.disk_stamp = stamp
        try:
            with open(self.doc.source, encoding="utf-8") as fh:
                on_disk = fh.read()
        except (OSError, UnicodeDecodeError):
            return
        if on_disk in (self.saved_text, self.doc.text()):
            return
        if not self.modified:
            self.call_later(self._reload)
            return
        self._asking_disk = True

        def answer(a: Optional[str]) -> None:
            self._asking_disk = False
            if a == "reload":
                self.call_later(self._reload)

        self.push_screen(ConfirmScreen("The file changed on disk. Reload it and drop your unsaved "
                                       "edits?", [("reload", "Reload"), ("keep", "Keep my edits")]),
                         answer)

    async def action_quit(self) -> None:
        if not self.modified:
            self.exit(0)
            return
        name = os.path.basename(self.doc.source) if self.doc.source else "the demo"

        def answer(a: Optional[str]) -> None:
            if a == "save":
                if self.doc.source:
                    self._save(None, then_quit=True)
                else:
                    self.action_save_as()
            elif a == "discard":
                self.exit(0)

        self.push_screen(ConfirmScreen(f"{name} has unsaved changes. Save them before quitting?",
                                       [("save", "Save and quit"), ("discard", "Quit without saving"),
                                        ("cancel", "Cancel")]), answer)

def autosave_path(source: Optional[str]) -> str:
    """Where unsaved edits go when the app stops on an unexpected error: beside the cavity
    file (``regen.yaml`` -> ``regen.yaml.autosave``), or ``regentime-demo.yaml.autosave``
    in the working folder for the built-in demo."""
    return (source or "regentime-demo.yaml") + ".autosave"


def _lines(exc: Exception) -> list[str]:
    if isinstance(exc, InputErrors):
        return [e.one_line() for e in exc.errors]
    return [exc.one_line() if isinstance(exc, InputError) else str(exc)]


def _stamp(path: Optional[str]) -> Optional[tuple]:
    if not path:
        return None
    try:
        st = os.stat(path)
    except OSError:
        return None
    return (st.st_mtime_ns, st.st_size)
