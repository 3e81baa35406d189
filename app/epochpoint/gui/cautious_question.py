"""A question whose yes does something that matters (moves the mount, lets the Sun be a
target): the text, a button naming the action, and Cancel as the default, so Enter or Escape
do nothing."""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QLabel, QVBoxLayout


class CautiousQuestion(QDialog):
    """Accept (the `action` button) only by an explicit click; the text stays selectable."""

    def __init__(self, title: str, text: str, action: str, text_name: str,
                 min_width: int = 480, parent=None):
        super().__init__(parent)
        self.setWindowTitle(title)
        self.message = QLabel(text)
        self.message.setObjectName(text_name)
        self.message.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.message.setWordWrap(True)
        self.message.setMinimumWidth(min_width)
        buttons = QDialogButtonBox()
        go = buttons.addButton(action, QDialogButtonBox.ButtonRole.AcceptRole)
        cancel = buttons.addButton(QDialogButtonBox.StandardButton.Cancel)
        go.setAutoDefault(False)
        cancel.setDefault(True)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.message)
        layout.addWidget(buttons)

    def text(self) -> str:
        return self.message.text()
