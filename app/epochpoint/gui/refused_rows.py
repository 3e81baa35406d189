"""Importing a target list that has bad rows: the good rows on request, the bad ones listed.

A list with one bad cell is not refused whole. `read_good_rows` reads it again the way the
command line's --skip-bad-rows does (io.read_targets with skip_bad_rows and on_skip), and
`RefusedRowsDialog` shows every refused row (line, target, column, reason) with the choice:
import the good rows, or import nothing. Nothing is imported until the user says so.
"""
from __future__ import annotations

from PySide6.QtWidgets import (QAbstractItemView, QDialog, QDialogButtonBox, QHeaderView,
                               QLabel, QTableWidget, QTableWidgetItem, QVBoxLayout)

from epochpoint.io import read_targets
from epochpoint.io.errors import InputError

REFUSED_COLUMNS = ("Line", "Target", "Column", "Reason")


def read_good_rows(path: str):
    """(targets, [InputError per refused row]) from a list read without its bad rows, or
    None when no row is usable or the file as a whole cannot be read."""
    refused: list[InputError] = []
    try:
        targets = read_targets(path, skip_bad_rows=True, on_skip=refused.append)
    except (InputError, ValueError, OSError):
        return None
    return (targets, refused) if refused else None


def refused_cells(error: InputError) -> tuple[str, str, str, str]:
    """The table cells of one refused row: line (or row), target, column, reason."""
    line = "" if error.line is None else f"{error.row_word} {error.line}"
    return line, error.target or "", error.column or "", error.message


class RefusedRowsDialog(QDialog):
    """The refused rows of a target list and the choice; accepted means import the good ones."""

    def __init__(self, path: str, refused: list, good_count: int, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Some rows cannot be read")
        self.summary = QLabel(
            f"{len(refused)} row(s) of {path} cannot be read and are listed below. The other "
            f"{good_count} row(s) are fine. Import the good rows and leave these out, or "
            "import nothing and fix the file first?")
        self.summary.setWordWrap(True)
        self.table = QTableWidget(len(refused), len(REFUSED_COLUMNS))
        self.table.setObjectName("refusedRows")
        self.table.setHorizontalHeaderLabels(list(REFUSED_COLUMNS))
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setWordWrap(False)
        for r, error in enumerate(refused):
            for c, text in enumerate(refused_cells(error)):
                item = QTableWidgetItem(text)
                item.setToolTip(str(error))
                self.table.setItem(r, c, item)
        header = self.table.horizontalHeader()
        for c in range(len(REFUSED_COLUMNS) - 1):
            header.setSectionResizeMode(c, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(len(REFUSED_COLUMNS) - 1, QHeaderView.ResizeMode.Stretch)
        self.table.setMinimumSize(620, 160)
        buttons = QDialogButtonBox()
        self.import_button = buttons.addButton(f"Import the {good_count} good rows",
                                               QDialogButtonBox.ButtonRole.AcceptRole)
        cancel = buttons.addButton("Import nothing", QDialogButtonBox.ButtonRole.RejectRole)
        cancel.setDefault(True)  # Enter imports nothing: leaving rows out is a choice
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.summary)
        layout.addWidget(self.table, 1)
        layout.addWidget(buttons)

    def rows(self) -> list[tuple[str, ...]]:
        """The table's cells, row by row (what the user reads)."""
        return [tuple(self.table.item(r, c).text() for c in range(self.table.columnCount()))
                for r in range(self.table.rowCount())]
