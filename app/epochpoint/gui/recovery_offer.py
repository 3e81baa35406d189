"""At start-up, every recovery file left by an earlier session is offered, by the name of the
document it keeps and the time it was written (recovery.recovery_files), not only the one of
a file opened again later.

The person picks one to restore (it opens as that document, unsaved) or leaves them all for
later; nothing is deleted here. A recovery file that cannot be read is kept for salvage
(FileActions._load_recovery).
"""
from __future__ import annotations

import os

from PySide6.QtWidgets import (QDialog, QDialogButtonBox, QLabel, QListWidget, QListWidgetItem,
                               QVBoxLayout)

from .loading import is_plan_file
from .recovery import recovery_files, remove_recovery


class RecoveryDialog(QDialog):
    """The list of recovery files; `chosen()` is the one selected when Restore is pressed."""

    def __init__(self, files, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Restore unsaved changes?")
        self.files = list(files)
        intro = QLabel("Epochpoint did not close normally last time. Unsaved changes were kept "
                       "for these plans (times in UTC). Restore one now? The others stay kept "
                       "and are offered again.")
        intro.setWordWrap(True)
        self.list = QListWidget()
        for f in self.files:
            item = QListWidgetItem(f"{f.document_name} — changes kept at {f.written}")
            item.setToolTip(f"{f.document_path or 'never saved'}\nkept in {f.path}")
            self.list.addItem(item)
        self.list.setCurrentRow(0)
        self.list.itemDoubleClicked.connect(lambda _item: self.accept())
        buttons = QDialogButtonBox()
        buttons.addButton("Restore", QDialogButtonBox.ButtonRole.AcceptRole)
        buttons.addButton("Not now", QDialogButtonBox.ButtonRole.RejectRole)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(intro)
        layout.addWidget(self.list, 1)
        layout.addWidget(buttons)
        self.resize(560, 300)

    def chosen(self):
        row = self.list.currentRow()
        return self.files[row] if 0 <= row < len(self.files) else None


def offer_recoveries(window, skip: str | None = None) -> bool:
    """Offer every recovery file in the window's recovery folder except `skip` (the one of a
    file already opened and offered); True when one was restored."""
    files = [f for f in recovery_files(window.autosaver.folder)
             if skip is None or os.path.abspath(f.path) != os.path.abspath(skip)]
    if not files or not window.interactive:
        return False
    dialog = RecoveryDialog(files, window)
    if dialog.exec() != QDialog.DialogCode.Accepted or dialog.chosen() is None:
        window.show_message(f"{len(files)} set(s) of unsaved changes kept for later.")
        return False
    chosen = dialog.chosen()
    if not window.maybe_save():
        return False
    doc = window._load_recovery(chosen.path)
    if doc is None:
        return False
    # A plan file is saved back where it came from; a target list becomes a new plan.
    path = chosen.document_path if chosen.document_path and is_plan_file(
        chosen.document_path) else None
    window.document.load(doc, path, dirty=True)
    written = window.autosaver.save_now()  # kept again at once, under the restored name
    if written and os.path.abspath(written) != os.path.abspath(chosen.path):
        remove_recovery(chosen.path)
    window.show_message(f"Restored the unsaved changes of {chosen.document_name} "
                        f"(kept at {chosen.written}); not yet saved.", 15000)
    window.recompute_timer.start()
    return True
