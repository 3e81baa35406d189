"""The correction ledger dock (skeleton; being built out)."""
from __future__ import annotations

from PySide6.QtWidgets import QWidget


class LedgerPanel(QWidget):
    def __init__(self, parent=None):
        super().__init__(parent)
        self.row = None

    def set_row(self, row) -> None:
        self.row = row
