"""The Tonight tab (skeleton; being built out)."""
from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QWidget


class TonightPanel(QWidget):
    target_clicked = Signal(int)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.plan = None
        self.selected = None

    def set_plan(self, plan) -> None:
        self.plan = plan

    def set_selected(self, index) -> None:
        self.selected = index
