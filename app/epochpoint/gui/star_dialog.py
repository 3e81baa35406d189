"""Adding a star by its Hipparcos number: type `HIP 87937`, get the star's catalogue row.

The astrometry (position at 1991.25, proper motions, parallax and their errors) comes from the
on-board Hipparcos new reduction through io.catalogues.hipparcos, as for `HIP n` rows of a
target file (io.hipnames); a number not in the catalogue is one line under the field, and
what was typed stays there to be corrected.
"""
from __future__ import annotations

from PySide6.QtWidgets import (QDialog, QDialogButtonBox, QFormLayout, QLabel, QLineEdit,
                               QVBoxLayout)

from .body_dialogs import append_targets


def hipparcos_target(text: str):
    """The one-row Targets for `HIP n` (ValueError in one line when it is not one)."""
    from ..io.catalogues.hipparcos import hipparcos_number, hipparcos_stars

    number = hipparcos_number(text)
    if number is None:
        raise ValueError(f"{text.strip()!r} is not a Hipparcos name: write it as HIP n, "
                         "e.g. HIP 87937")
    return hipparcos_stars([number])


class AddStarDialog(QDialog):
    """Ask for `HIP n`; on OK `targets` holds the star (module docstring)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Add a star by Hipparcos number")
        self.targets = None
        self.name_edit = QLineEdit()
        self.name_edit.setPlaceholderText("HIP 87937")
        self.error = QLabel("")
        self.error.setWordWrap(True)
        self.error.setObjectName("starError")
        form = QFormLayout()
        form.addRow("&Star:", self.name_edit)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok
                                   | QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.try_accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addWidget(self.error)
        layout.addWidget(buttons)

    def try_accept(self) -> bool:
        """Look the star up; an unknown one is shown in one line and the text kept."""
        try:
            self.targets = hipparcos_target(self.name_edit.text())
        except ValueError as err:
            self.targets = None
            self.error.setText(" ".join(str(err).split()))
            return False
        self.accept()
        return True


def add_star_dialog(window) -> None:
    dialog = AddStarDialog(window)
    if dialog.exec() == QDialog.DialogCode.Accepted and dialog.targets is not None:
        append_targets(window, dialog.targets, str(dialog.targets.names()[0]))
