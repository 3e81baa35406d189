"""The target list's filter box: a line edit that Esc clears (then Esc does nothing more)."""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QLineEdit


class FilterBox(QLineEdit):
    def keyPressEvent(self, event):  # noqa: N802 (Qt name)
        if event.key() == Qt.Key.Key_Escape and self.text():
            self.clear()
            event.accept()
            return
        super().keyPressEvent(event)
