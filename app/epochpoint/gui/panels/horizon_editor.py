"""The horizon mask as an editable table of (azimuth, altitude) points with a live drawing.

The table only gathers numbers; the site editor builds the core's HorizonMask from them, so
the mask's rules (azimuths in [0, 360) and increasing, altitudes in [-5, 90]) live in the core.
"""
from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (QAbstractItemView, QGridLayout, QGroupBox, QHBoxLayout,
                               QHeaderView, QLabel, QPushButton, QTableWidget, QTableWidgetItem)

from ...charts.horizon_chart import draw_horizon_profile
from .chart_canvas import ChartCanvas

NEW_POINT_STEP_DEG = 10.0


class HorizonCellError(ValueError):
    """A table cell that is not a number (row is 1-based, column 'azimuth' or 'altitude')."""


class HorizonEditor(QGroupBox):
    """Points table, add/remove buttons, an error line and the mask's profile.

    `edited` fires after every finished cell edit, added or removed point.
    """

    edited = Signal()

    def __init__(self, parent=None):
        super().__init__("Horizon mask (lowest observed altitude by azimuth)", parent)
        self.table = QTableWidget(0, 2)
        self.table.setHorizontalHeaderLabels(["Azimuth (°, N→E)", "Altitude (°)"])
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(self.fontMetrics().height() + 6)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setMinimumHeight(150)
        self.table.setMaximumWidth(320)
        self.table.itemChanged.connect(lambda _: self.edited.emit())
        add, remove = QPushButton("Add point"), QPushButton("Remove point")
        add.clicked.connect(self.add_row)
        remove.clicked.connect(self.remove_rows)
        # Reading and writing horizon files is the site editor's (site_files.py).
        self.load_button, self.save_button = QPushButton("Load…"), QPushButton("Save…")
        self.load_button.setToolTip("Read a horizon file: azimuth and altitude per line")
        self.save_button.setToolTip("Write the points as a horizon file")
        self.error = QLabel("")
        self.error.setObjectName("fieldError")
        self.error.setWordWrap(True)
        self.canvas = ChartCanvas(self, size_in=(5.0, 2.2), min_height_px=190)
        note = QLabel("Points are joined by straight lines, wrapping through north; empty "
                      "table: no mask.")
        note.setWordWrap(True)
        note.setProperty("role", "fieldLabel")

        buttons = QHBoxLayout()
        for button in (add, remove, self.load_button, self.save_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        layout = QGridLayout(self)
        layout.addWidget(self.table, 0, 0)
        layout.addLayout(buttons, 1, 0)
        layout.addWidget(self.error, 2, 0, 1, 2)
        layout.addWidget(self.canvas, 0, 1, 2, 1)
        layout.addWidget(note, 3, 0, 1, 2)
        layout.setColumnStretch(1, 1)

    def set_mask(self, mask) -> None:
        """Show a HorizonMask's points (or none); sends nothing."""
        self.table.blockSignals(True)
        self.table.setRowCount(0)
        if mask is not None:
            for az, alt in zip(mask.azimuth, mask.altitude):
                self._append_row(f"{az:g}", f"{alt:g}")
        self.table.blockSignals(False)

    def points(self, strict: bool = True) -> list:
        """[(azimuth, altitude)] in table order; HorizonCellError for a non-number (strict)
        or rows skipped (not strict)."""
        out = []
        for r in range(self.table.rowCount()):
            texts = [self.table.item(r, c).text() if self.table.item(r, c) else ""
                     for c in (0, 1)]
            values = []
            for column, text in zip(("azimuth", "altitude"), texts):
                try:
                    values.append(float(text))
                except ValueError:
                    if strict:
                        raise HorizonCellError(f"row {r + 1}, {column}: {text!r} is not a "
                                               "number") from None
            if len(values) == 2:
                out.append(tuple(values))
        return out

    def add_row(self) -> None:
        """A new point after the last one (10° further on, same altitude)."""
        points = self.points(strict=False)
        az, alt = ((points[-1][0] + NEW_POINT_STEP_DEG, points[-1][1]) if points
                   else (0.0, 0.0))
        self.table.blockSignals(True)
        self._append_row(f"{min(az, 359.0):g}", f"{alt:g}")
        self.table.blockSignals(False)
        self.edited.emit()

    def remove_rows(self) -> None:
        """Remove the selected points (the last one when none is selected)."""
        rows = sorted({i.row() for i in self.table.selectedIndexes()}) or (
            [self.table.rowCount() - 1] if self.table.rowCount() else [])
        self.table.blockSignals(True)
        for r in reversed(rows):
            self.table.removeRow(r)
        self.table.blockSignals(False)
        self.edited.emit()

    def draw(self, mask, min_altitude_deg) -> None:
        draw_horizon_profile(self.canvas.figure, mask, min_altitude_deg,
                             style=self.canvas.style)
        self.canvas.draw_idle()

    def _append_row(self, az_text: str, alt_text: str) -> None:
        r = self.table.rowCount()
        self.table.insertRow(r)
        for c, text in enumerate((az_text, alt_text)):
            item = QTableWidgetItem(text)
            item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            self.table.setItem(r, c, item)
