"""File handling of the main window: new, open, import, save, save as, export positions,
recent files, the question before unsaved changes are dropped, and what the user is told when
an autosave fails. Mixed into MainWindow, whose document, settings, autosaver, status line and
message helpers it uses."""
from __future__ import annotations

import os

from PySide6.QtGui import QKeySequence
from PySide6.QtWidgets import QDialog, QFileDialog, QMessageBox

from epochpoint.io import read_targets
from epochpoint.io.errors import InputError
from epochpoint.io.planfile import write_plan_file

from .document import empty_plan
from .loading import PLAN_FILE_FILTER, TARGET_FILE_FILTER, is_plan_file, load_path
from .site_guard import site_edits_settled
from .recovery import (add_recent_file, newer_recovery, recent_files, recovery_path,
                       remove_recent_file, salvage_recovery)
from .refused_rows import RefusedRowsDialog, read_good_rows


class FileActions:
    """The File menu's work (see module docstring)."""

    def new_document(self) -> None:
        if not self.maybe_save():
            return
        self.document.load(empty_plan(), None)

    def open_dialog(self) -> None:
        if not self.maybe_save():
            return
        path, _ = QFileDialog.getOpenFileName(self, "Open plan or target list",
                                              self._start_folder(),
                                              f"{PLAN_FILE_FILTER};;{TARGET_FILE_FILTER};;"
                                              "All files (*)")
        if path:
            self.open_path(path)

    def open_path(self, path: str, site_spec: str | None = None, night: str | None = None,
                  offer_recovery: bool = True) -> bool:
        """Open a plan file or a target list; on bad input show the error, keep the document."""
        try:
            doc, kept_path = load_path(path, site_spec, night)
        except (InputError, ValueError, OSError) as err:
            if offer_recovery and self._open_recovery_of_unreadable(path, err, site_spec,
                                                                    night):
                return True
            opened = self._open_good_rows(path, err, site_spec, night)
            if opened is not None:
                return opened
            self.show_error("Cannot open", one_line(err))
            return False
        restored = False
        recovery = newer_recovery(self.autosaver.folder, kept_path) if offer_recovery else None
        if recovery and self.interactive and self.ask(
                "Restore unsaved changes?",
                f"Unsaved changes to {os.path.basename(path)} were kept from an earlier "
                "session. Restore them?"):
            restored_doc = self._load_recovery(recovery, site_spec, night)
            if restored_doc is not None:
                doc, restored = restored_doc, True
        self.document.load(doc, kept_path, dirty=restored or kept_path is None)
        if kept_path:
            self._remember(kept_path)
        self.show_message(f"Opened {path}" + (" (with restored changes)" if restored else ""))
        self.recompute_timer.start()
        return True

    def _open_recovery_of_unreadable(self, path: str, err, site_spec, night) -> bool:
        """The plan file cannot be read: offer its recovery file, if there is one."""
        recovery = recovery_path(self.autosaver.folder, path)
        if not (is_plan_file(path) and os.path.exists(recovery) and self.interactive):
            return False
        if not self.ask("Open the recovered plan?",
                        f"{one_line(err)}\n\nChanges to {os.path.basename(path)} were kept "
                        "from an earlier session. Open them instead? The damaged file stays "
                        "as it is until you save."):
            return False
        doc = self._load_recovery(recovery, site_spec, night)
        if doc is None:
            return False
        self.document.load(doc, path, dirty=True)
        self._remember(path)
        self.show_message(f"Opened the recovered changes of {path} (not yet saved)")
        self.recompute_timer.start()
        return True

    def _open_good_rows(self, path: str, err, site_spec, night) -> bool | None:
        """A target list with bad rows: offer its good rows, as the import does (None when
        there is nothing to offer: a plan file, a file unreadable as a whole, no dialogs)."""
        if is_plan_file(path) or not isinstance(err, InputError) or err.line is None \
                or not self.interactive:
            return None
        partial = read_good_rows(path)
        if partial is None:
            return None
        targets, refused = partial
        if not self.confirm_good_rows(path, refused, len(targets)):
            self.show_message(f"Nothing opened: {len(refused)} row(s) of {path} cannot be "
                              "read.", 15000)
            return False
        try:
            doc, kept_path = load_path(path, site_spec, night, targets=targets)
        except (InputError, ValueError, OSError) as other:
            self.show_error("Cannot open", one_line(other))
            return False
        self.document.load(doc, kept_path, dirty=True)
        self.show_message(f"Opened {len(targets)} targets from {path}; {len(refused)} "
                          "unreadable row(s) left out", 15000)
        self.recompute_timer.start()
        return True

    def _load_recovery(self, recovery: str, site_spec=None, night=None):
        """The document in a recovery file, or None (the file is then kept for salvage)."""
        try:
            return load_path(recovery, site_spec, night)[0]
        except (InputError, ValueError, OSError) as err:
            kept = salvage_recovery(recovery)
            self.show_error("Cannot restore", f"{one_line(err)}. The recovery file is kept "
                                              f"for salvage as {kept}")
            return None

    def offer_untitled_recovery(self) -> bool:
        """At start without a file: offer the unsaved untitled plan of an earlier session."""
        recovery = newer_recovery(self.autosaver.folder, None)
        if not (recovery and self.interactive and self.ask(
                "Restore unsaved plan?", "An unsaved plan was kept from an earlier session. "
                                         "Restore it?")):
            return False
        doc = self._load_recovery(recovery)
        if doc is None:
            return False
        self.document.load(doc, None, dirty=True)
        return True

    def import_dialog(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Import targets", self._start_folder(),
                                              f"{TARGET_FILE_FILTER};;All files (*)")
        if path:
            self.import_path(path)

    def import_path(self, path: str) -> bool:
        """Import a target list; with bad rows, offer the good ones (refused_rows.py)."""
        refused = []
        try:
            targets = read_targets(path)
        except InputError as err:
            partial = read_good_rows(path) if err.line is not None else None
            if partial is None or not self.interactive:
                self.show_error("Cannot import", one_line(err))
                return False
            targets, refused = partial
            if not self.confirm_good_rows(path, refused, len(targets)):
                self.show_message(f"Nothing imported: {len(refused)} row(s) of {path} cannot "
                                  "be read.", 15000)
                return False
        except (ValueError, OSError) as err:
            self.show_error("Cannot import", one_line(err))
            return False
        try:
            self.document.import_targets(targets, path)
        except (InputError, ValueError) as err:
            self.show_error("Cannot import", one_line(err))
            return False
        left_out = f"; {len(refused)} unreadable row(s) left out" if refused else ""
        self.show_message(f"Imported {len(targets)} targets from {path}{left_out}", 15000)
        return True

    def confirm_good_rows(self, path: str, refused: list, good_count: int) -> bool:
        """Ask whether to import the good rows, listing the refused ones."""
        dialog = RefusedRowsDialog(path, refused, good_count, self)
        return dialog.exec() == QDialog.DialogCode.Accepted

    def save(self) -> bool:
        path = self.document.path
        if not path or not path.lower().endswith(".json"):
            return self.save_as()
        return self.save_to(path)

    def save_as(self) -> bool:
        suggestion = self.document.path or os.path.join(self._start_folder(), "plan.json")
        if not suggestion.lower().endswith(".json"):
            suggestion = os.path.splitext(suggestion)[0] + ".json"
        path, _ = QFileDialog.getSaveFileName(self, "Save plan", suggestion, PLAN_FILE_FILTER)
        if not path:
            return False
        if not path.lower().endswith(".json"):
            path += ".json"
        return self.save_to(path)

    def save_to(self, path: str) -> bool:
        if not site_edits_settled(self, "save"):
            return False  # the Site & limits form holds edits it could not apply
        try:
            write_plan_file(path, self.document.to_plan_document())
        except (OSError, ValueError) as err:
            self.show_error("Cannot save", one_line(err))
            return False
        self.document.mark_saved(path)
        self.autosaver.clear()
        self._remember(path)
        self.show_message(f"Saved {path}", 5000)
        return True

    def export_positions_dialog(self) -> None:
        """File > Export positions: the dialog on a snapshot of the targets and the site."""
        from .export_dialog import ExportDialog

        if self.document.row_count() == 0:
            self.show_message("No targets to export.")
            return
        plan = self.plan if self._plan_generation == self.document.generation else None
        stem = os.path.splitext(os.path.basename(self.document.path or "plan"))[0]
        self.export_dialog = ExportDialog(
            self.document.targets(), self.document.site, plan=plan,
            tolerance_arcsec=self.document.tolerance,
            path=os.path.join(self._start_folder(), f"{stem}-positions.csv"), parent=self)
        self.export_dialog.exported.connect(
            lambda s: self.show_message(f"Exported {s.exported} target(s) to {s.path}"))
        self.export_dialog.open()

    def _on_autosave_failed(self, err) -> None:
        """Say so in the status line every time, and in a dialog once until one works."""
        text = f"Autosave failed: {one_line(err)}"
        self.autosave_note.setText(f"⚠ {text}")
        self.autosave_note.setToolTip(f"{text}. Unsaved changes are not kept for recovery; "
                                      "save the plan (Ctrl+S) to keep them.")
        self.autosave_note.show()
        self.show_message(text, 15000)
        if not self._autosave_warned:
            self._autosave_warned = True
            if self.interactive:
                QMessageBox.warning(self, "Autosave failed",
                                    f"{text}\n\nUnsaved changes are not kept for recovery "
                                    "until this is fixed: save the plan (Ctrl+S) to keep "
                                    "them. This is said once; the status line keeps showing "
                                    "it.")

    def _on_autosave_saved(self, _path: str) -> None:
        self._autosave_warned = False
        self.autosave_note.hide()

    def maybe_save(self) -> bool:
        """True when it is fine to drop the document (saved, discarded or clean)."""
        if self.interactive and not site_edits_settled(self, "close the plan"):
            return False
        if not self.document.dirty or not self.interactive:
            return True
        answer = QMessageBox.question(
            self, "Unsaved changes", "The plan has unsaved changes. Save them first?",
            QMessageBox.StandardButton.Save | QMessageBox.StandardButton.Discard
            | QMessageBox.StandardButton.Cancel)
        if answer == QMessageBox.StandardButton.Save:
            return self.save()
        return answer == QMessageBox.StandardButton.Discard

    def _start_folder(self) -> str:
        files = recent_files(self.settings)
        return os.path.dirname(files[0]) if files else os.getcwd()

    def _remember(self, path: str) -> None:
        add_recent_file(self.settings, path)
        self._fill_recent_menu()

    def _fill_recent_menu(self) -> None:
        self.recent_menu.clear()
        files = recent_files(self.settings)
        for i, path in enumerate(files):
            action = self.recent_menu.addAction(f"&{i + 1} {os.path.basename(path)}")
            action.setToolTip(path)
            action.setShortcut(QKeySequence(f"Alt+Shift+{i + 1}"))
            action.triggered.connect(lambda _=False, p=path: self._open_recent(p))
        self.recent_menu.setEnabled(bool(files))

    def _open_recent(self, path: str) -> None:
        if not os.path.exists(path):
            remove_recent_file(self.settings, path)
            self._fill_recent_menu()
            self.show_error("Cannot open", f"{path}: the file no longer exists")
            return
        if self.maybe_save():
            self.open_path(path)


def one_line(err: BaseException) -> str:
    if isinstance(err, OSError) and err.filename:
        return f"{err.filename}: {err.strerror or err}"
    return " ".join(str(err).split()) or type(err).__name__
