"""Adding solar-system targets: a major body (the Sun, the Moon, a planet) from a list, and
minor bodies from orbital elements pasted or read from a file in the Minor Planet Center's
one-line formats (io/catalogues/mpc_elements.py does the reading; nothing is computed here).

A bad elements line is shown as one line (naming the line and columns) under the text box;
the pasted text stays as typed, so it can be corrected and added again.
"""
from __future__ import annotations

import numpy as np
from PySide6.QtGui import QFontDatabase
from PySide6.QtWidgets import (QComboBox, QDialog, QDialogButtonBox, QFileDialog, QFormLayout,
                               QHBoxLayout, QLabel, QPlainTextEdit, QPushButton, QVBoxLayout)

from epochpoint.core.limits import SOLAR_CAUTION
from epochpoint.core.targets import Targets
from epochpoint.io.errors import InputError

from .body_kinds import BODY_CHOICES, kind_of_body

PASTED = "pasted elements"


def major_body_targets(body: str, name: str | None = None) -> Targets:
    """One body row (placeholder RA/Dec; the engine places it) named as shown."""
    label = name or dict(BODY_CHOICES)[body]
    return Targets.from_columns(ra=np.zeros(1), dec=np.zeros(1), name=[label],
                                extra={"body": np.array([body], dtype=object)})


def elements_targets(text: str, path=PASTED) -> Targets:
    """The minor bodies of MPC one-line elements text (InputError naming line and columns)."""
    from epochpoint.io.catalogues.mpc_elements import parse_mpc_elements

    return parse_mpc_elements(path, text)


class AddBodyDialog(QDialog):
    """Choose the Sun, the Moon or a planet; the Sun comes with the solar caution."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Add the Moon or a planet")
        self.choice = QComboBox()
        for key, shown in BODY_CHOICES:
            self.choice.addItem(f"{shown} ({kind_of_body(key)})", key)
        self.choice.setCurrentIndex([k for k, _ in BODY_CHOICES].index("moon"))
        self.note = QLabel()
        self.note.setWordWrap(True)
        self.choice.currentIndexChanged.connect(self._on_choice)
        form = QFormLayout()
        form.addRow("&Body:", self.choice)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok
                                   | QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addWidget(self.note)
        layout.addWidget(buttons)
        self._on_choice()

    def body(self) -> str:
        return str(self.choice.currentData())

    def _on_choice(self) -> None:
        sun = self.body() == "sun"
        self.note.setText(SOLAR_CAUTION + " The Sun is refused by the interlocks unless the "
                          "site declares a solar filter fitted." if sun else
                          "Its place is computed for every instant (DE421); RA and Dec show "
                          "its place of date.")


class ElementsDialog(QDialog):
    """Paste MPC one-line elements or read them from a file; parsed on Add."""

    def __init__(self, parent=None, start_folder: str = ""):
        super().__init__(parent)
        self.setWindowTitle("Add minor bodies from orbital elements")
        self.resize(760, 360)
        self.start_folder = start_folder
        self.targets: Targets | None = None
        self.source = PASTED
        intro = QLabel("Paste lines in the Minor Planet Center's one-line formats (asteroids "
                       "or comets), or read a file of them.")
        intro.setWordWrap(True)
        self.text = QPlainTextEdit()
        self.text.setFont(QFontDatabase.systemFont(QFontDatabase.SystemFont.FixedFont))
        self.text.setLineWrapMode(QPlainTextEdit.LineWrapMode.NoWrap)
        self.text.setPlaceholderText("one elements line per body")
        self.error = QLabel()
        self.error.setObjectName("elementsError")
        self.error.setProperty("stale", "true")  # the warning style
        self.error.setWordWrap(True)
        read_file = QPushButton("Read a &file…")
        read_file.clicked.connect(self.read_file_dialog)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Cancel)
        self.add_button = buttons.addButton("&Add", QDialogButtonBox.ButtonRole.AcceptRole)
        buttons.accepted.connect(self.try_accept)
        buttons.rejected.connect(self.reject)
        row = QHBoxLayout()
        row.addWidget(read_file)
        row.addStretch(1)
        row.addWidget(buttons)
        layout = QVBoxLayout(self)
        layout.addWidget(intro)
        layout.addWidget(self.text, 1)
        layout.addWidget(self.error)
        layout.addLayout(row)
        self.text.textChanged.connect(lambda: self.error.clear())

    def read_file_dialog(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Orbital elements", self.start_folder,
                                              "Elements (*.txt *.dat);;All files (*)")
        if path:
            self.read_file(path)

    def read_file(self, path: str) -> bool:
        """Put a file's text in the box (checked on Add, its lines named by the file)."""
        from epochpoint.io.filebytes import decode_utf8, read_file_bytes

        try:
            text = decode_utf8(path, read_file_bytes(path))
        except (InputError, OSError, ValueError) as err:
            self.error.setText(" ".join(str(err).split()))
            return False
        self.text.setPlainText(text)
        self.source = path
        return True

    def try_accept(self) -> bool:
        """Parse the text; on a bad line show it (one line) and keep everything as typed."""
        try:
            self.targets = elements_targets(self.text.toPlainText(), self.source)
        except (InputError, ValueError) as err:
            self.targets = None
            self.error.setText(" ".join(str(err).split()))
            return False
        self.accept()
        return True


def append_targets(window, targets: Targets, what: str) -> None:
    """Append the rows (undoable) and select the first of them."""
    first = window.document.row_count()
    window.document.import_targets(targets)
    window.filter_box.clear()
    window.select_target(first)
    window.show_message(f"Added {what}; Undo (Ctrl+Z) removes it.", 10000)


def add_body(window, body: str) -> None:
    """Append a major body (the Sun's row also brings the solar caution, main window)."""
    append_targets(window, major_body_targets(body), dict(BODY_CHOICES)[body])


def add_body_dialog(window) -> None:
    dialog = AddBodyDialog(window)
    if dialog.exec() == QDialog.DialogCode.Accepted:
        add_body(window, dialog.body())


def elements_dialog(window) -> None:
    dialog = ElementsDialog(window, window._start_folder())
    if dialog.exec() == QDialog.DialogCode.Accepted and dialog.targets is not None:
        add_elements(window, dialog.targets)


def add_elements(window, targets: Targets) -> None:
    names = list(targets.names())
    append_targets(window, targets, names[0] if len(names) == 1 else f"{len(names)} minor bodies")
