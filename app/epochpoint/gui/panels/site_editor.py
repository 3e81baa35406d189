"""The Site & limits tab (skeleton; being built out)."""
from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QWidget


class SiteEditor(QWidget):
    site_edited = Signal(object)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.site = None

    def set_site(self, site) -> None:
        self.site = site
