"""The Drift tab (skeleton; being built out)."""
from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QWidget


class DriftPanel(QWidget):
    target_clicked = Signal(int)
    tolerance_changed = Signal(float)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.targets = None
        self.tolerance = 1.0
        self.selected = None

    def set_targets(self, targets) -> None:
        self.targets = targets

    def set_tolerance(self, arcsec: float) -> None:
        self.tolerance = float(arcsec)

    def set_selected(self, index) -> None:
        self.selected = index
