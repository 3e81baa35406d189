"""The Pointing model tab: fit a mount's pointing model to a file of centred stars.

Choose a samples file (io.pointing_samples: one centred star a row, as the mount tab's Record
button or `epochpoint pointing record` writes them) and the mount type (set to the site's when
that changes; a German equatorial mount's samples carry their pier side); the fit runs
in a worker (pointing_fit.fit_samples_file) at the site's latitude. Shown: a table of the
terms (value, standard error, significance; terms the samples cannot determine, with the
reason), the fit's figures and notes (the samples on each pier side), and the charts of
charts.pointing_chart, which frame each sample by its pier side. "Save model…" writes the
model file (JSON, atomically) that the mount tab and `epochpoint mount slew --model` use.
A bad file is reported in one line; the last good fit stays shown.
"""
from __future__ import annotations

import json
import math

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (QAbstractItemView, QComboBox, QFileDialog, QHBoxLayout,
                               QHeaderView, QLabel, QLineEdit, QPushButton, QSplitter,
                               QTableWidget, QTableWidgetItem, QVBoxLayout, QWidget)

from ...charts.pointing_chart import draw_pointing_charts
from ...core.limits import MOUNT_TYPE_NAMES
from ...core.pointing_model.terms import MOUNT_TYPES, TERMS
from ..workers import run_in_worker
from .chart_canvas import ChartCanvas
from .pointing_fit import fit_samples_file
from .theme_link import theme_chart_style, theme_colour, watch_theme

SAMPLES_FILTER = "Pointing samples (*.csv);;All files (*)"
MODEL_FILTER = "Pointing model (*.json);;All files (*)"
TABLE_HEADERS = ("Term", "Value (″)", "Error (″)", "Significance", "Note")


def term_rows(model) -> list[tuple]:
    """(name, value, error, significance, note) for every term the fit tried: fitted ones
    with their numbers, left-out ones with the reason from the model's notes."""
    rows = []
    for name, value in model.values.items():
        error = model.errors.get(name, float("nan"))
        significance = abs(value) / error if error > 0 else float("nan")
        rows.append((name, value, error, significance, ""))
    for note in model.notes:
        name = note.split(" ", 1)[0]
        if name in TERMS[model.mount_type] and name not in model.values:
            rows.append((name, float("nan"), float("nan"), float("nan"), note))
    return rows


def _sides_text(model, sides) -> str:
    """The samples on each pier side (framed in the charts), and for a German model which
    side its values are seen from; "" without sides."""
    if sides is None:
        return ""
    east = sum(1 for s in sides if s == "east")
    west = sum(1 for s in sides if s == "west")
    text = f"\nPier sides: {east} samples east (square frames), {west} west (diamond frames)"
    if model.german:
        text += ("; values as seen on the east side, the declination axis's terms reversed "
                 "on the west")
    return text + "."


def _number(value: float, digits: int) -> str:
    return f"{value:.{digits}f}" if math.isfinite(value) else "—"


class PointingPanel(QWidget):
    """Samples file -> fitted model, its terms and its residual charts (module docstring)."""

    status_message = Signal(str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.latitude: float | None = None
        self.site_mount_type: str | None = None  # the last site's, to follow its changes
        self.fitted = None  # the last good pointing_fit.FittedSamples
        self.task = None

        self.path_edit = QLineEdit()
        self.path_edit.setPlaceholderText("a CSV of centred stars (time, name, ha_target, …)")
        self.path_edit.returnPressed.connect(self.fit)
        browse = QPushButton("&Browse…")
        browse.clicked.connect(self._browse)
        self.mount_combo = QComboBox()
        for mount_type in MOUNT_TYPES:
            self.mount_combo.addItem(MOUNT_TYPE_NAMES[mount_type], mount_type)
        self.mount_combo.setToolTip("fork equatorial: hour angle and declination axes; German "
                                    "equatorial: the same, on two pier sides (the samples' "
                                    "pier_side column); alt-az: azimuth and altitude axes")
        self.fit_button = QPushButton("&Fit")
        self.fit_button.clicked.connect(self.fit)
        self.save_button = QPushButton("Save &model…")
        self.save_button.setEnabled(False)
        self.save_button.clicked.connect(self._save_dialog)
        top = QHBoxLayout()
        top.addWidget(QLabel("Samples"))
        top.addWidget(self.path_edit, 1)
        top.addWidget(browse)
        top.addWidget(QLabel("Mount"))
        top.addWidget(self.mount_combo)
        top.addWidget(self.fit_button)
        top.addWidget(self.save_button)

        self.summary = QLabel("Choose a samples file and press Fit.")
        self.summary.setWordWrap(True)
        self.summary.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.problem = QLabel("")
        self.problem.setWordWrap(True)
        self.problem.setObjectName("pointingProblem")
        self.table = QTableWidget(0, len(TABLE_HEADERS))
        self.table.setHorizontalHeaderLabels(TABLE_HEADERS)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        header = self.table.horizontalHeader()
        for column in range(len(TABLE_HEADERS) - 1):
            header.setSectionResizeMode(column, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(len(TABLE_HEADERS) - 1, QHeaderView.ResizeMode.Stretch)
        self.canvas = ChartCanvas(self, size_in=(8.0, 6.0), min_height_px=300)
        self.axes = {}

        upper = QWidget()
        upper_layout = QVBoxLayout(upper)
        upper_layout.setContentsMargins(0, 0, 0, 0)
        upper_layout.addWidget(self.summary)
        upper_layout.addWidget(self.table, 1)
        splitter = QSplitter(Qt.Orientation.Vertical)
        splitter.addWidget(upper)
        splitter.addWidget(self.canvas)
        splitter.setStretchFactor(1, 2)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(self.problem)
        layout.addWidget(splitter, 1)
        watch_theme(self, self._apply_theme)

    # -- inputs ----------------------------------------------------------------------------
    def set_site(self, site) -> None:
        """The model's latitude is the site's (tube sag depends on it); a site whose mount
        type changed chooses that type."""
        self.latitude = float(site.latitude)
        mount_type = site.interlocks.mount.mount_type
        if mount_type != self.site_mount_type:
            self.site_mount_type = mount_type
            self.set_mount_type(mount_type)

    def set_mount_type(self, mount_type: str) -> None:
        """Choose the mount type to fit ("equatorial", "german" or "altaz")."""
        self.mount_combo.setCurrentIndex(self.mount_combo.findData(mount_type))

    def mount_type(self) -> str:
        return self.mount_combo.currentData()

    def set_samples_path(self, path: str, mount_type: str | None = None) -> None:
        """The samples file, and the mount type when given (else the one chosen)."""
        self.path_edit.setText(str(path))
        if mount_type is not None:
            self.set_mount_type(mount_type)

    def _browse(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Pointing samples", self.path_edit.text(),
                                              SAMPLES_FILTER)
        if path:
            self.path_edit.setText(path)
            self.fit()

    # -- fitting ---------------------------------------------------------------------------
    def fit(self) -> None:
        """Fit the chosen file in a worker; the result or a one-line problem comes back."""
        path = self.path_edit.text().strip()
        if not path:
            self._show_problem("Choose a samples file first.")
            return
        if self.latitude is None:
            self._show_problem("Set the site first: the model depends on its latitude.")
            return
        if self.task is not None:
            self.task.cancel()
        self._show_problem("")
        self.fit_button.setEnabled(False)
        self.task = run_in_worker(self, fit_samples_file, path, self.mount_type(),
                                  self.latitude, on_done=self._on_fitted,
                                  on_error=self._on_failed,
                                  progress_label="Fitting the pointing model")
        self.task.finished.connect(lambda: self.fit_button.setEnabled(True))

    def _on_fitted(self, fitted) -> None:
        self.task = None
        self.fitted = fitted
        self.save_button.setEnabled(True)
        self._show_model(fitted.fit.model, fitted.pier_side)
        self._draw()
        self.status_message.emit(f"Pointing model fitted: rms "
                                 f"{fitted.fit.model.rms_after_arcsec:.1f}″ after the model")

    def _on_failed(self, message: str) -> None:
        self.task = None
        self._show_problem(f"Not fitted: {message}")

    def _show_problem(self, text: str) -> None:
        self.problem.setText(text)
        self.problem.setStyleSheet(f"color: {theme_colour('danger')}; font-weight: bold;"
                                   if text else "")

    # -- showing ---------------------------------------------------------------------------
    def _show_model(self, model, sides=None) -> None:
        rows = term_rows(model)
        meanings = TERMS[model.mount_type]
        self.table.setRowCount(len(rows))
        for r, (name, value, error, significance, note) in enumerate(rows):
            cells = (name, _number(value, 2), _number(error, 2), _number(significance, 1),
                     note)
            for c, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if c in (1, 2, 3):
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                item.setToolTip(note or meanings[name].meaning)
                self.table.setItem(r, c, item)
        rejected = (f"; rejected {len(model.rejected)}: {', '.join(map(str, model.rejected))}"
                    if model.rejected else "; none rejected")
        notes = [n for n in model.notes if n.split(" ", 1)[0] not in meanings]
        self.summary.setText(
            f"{MOUNT_TYPE_NAMES[model.mount_type]} mount at latitude {model.latitude:+.4f}°: "
            f"{model.samples} samples used{rejected}. RMS on the sky "
            f"{model.rms_before_arcsec:.1f}″ before, {model.rms_after_arcsec:.1f}″ after the "
            f"model." + _sides_text(model, sides) + "".join(f"\nNote: {n}." for n in notes))

    def _draw(self) -> None:
        f = self.fitted
        if f is None:  # an empty figure in the theme's colours until a fit
            self.canvas.draw_blank()
            return
        self.axes = draw_pointing_charts(self.canvas.figure, f.mount_type, f.first, f.second,
                                         f.ha, f.dec, f.alt, f.az, f.fit.before_arcsec,
                                         f.fit.after_arcsec, f.fit.kept, style=self.canvas.style,
                                         pier_side=f.pier_side)
        self.canvas.draw_idle()

    def _apply_theme(self) -> None:
        self.canvas.style = theme_chart_style()
        self._draw()
        self._show_problem(self.problem.text())

    # -- saving ----------------------------------------------------------------------------
    def _save_dialog(self) -> None:
        if self.fitted is None:
            return
        path, _ = QFileDialog.getSaveFileName(self, "Save the pointing model",
                                              "pointing-model.json", MODEL_FILTER)
        if path:
            self.save_model(path)

    def save_model(self, path) -> bool:
        """Write the fitted model's JSON atomically; a failure is shown in one line."""
        from ...io.atomic import atomic_write_text

        if self.fitted is None:
            return False
        try:
            atomic_write_text(path, json.dumps(self.fitted.fit.model.to_dict(), indent=2)
                              + "\n")
        except (OSError, ValueError) as err:
            self._show_problem(f"Not saved: {' '.join(str(err).split())}")
            return False
        self.status_message.emit(f"Pointing model saved to {path}")
        return True

