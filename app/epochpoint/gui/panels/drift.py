"""The Drift tab: how far each target has moved from its catalogue position, and when it
crosses the tolerance; with the selected target's position uncertainty at the chosen date.

All numbers come from core.drift.drift and core.positions (propagated place, no site), run
through the shell's worker helper so long lists never freeze the window. Targets over the
tolerance are marked with a sign and the word "over" (and bold type), never by colour alone.
"""
from __future__ import annotations

import datetime as dt

import numpy as np
from PySide6.QtCore import QDate, Qt, QTimer, Signal
from PySide6.QtWidgets import (QAbstractItemView, QDoubleSpinBox, QHBoxLayout,
                               QHeaderView, QLabel, QPushButton, QSplitter, QTableView,
                               QVBoxLayout, QWidget)

from ...charts.ellipse_chart import draw_error_ellipse
from .. import workers
from ..date_field import DateField
from .chart_canvas import ChartCanvas
from .drift_model import OVER_MARK, DriftModel, DriftSortProxy
from .theme_link import theme_chart_style, watch_theme

DEFAULT_TOLERANCE_ARCSEC = 1.0
TOLERANCE_DELAY_MS = 400  # wait for the typing to stop before recomputing


def drift_job(targets, when: str, tolerance_arcsec: float) -> dict:
    """Worker body: drift table and propagated positions of all targets at `when`."""
    from ...core.drift import drift
    from ...core.positions import positions

    table = drift(targets, when, tolerance_arcsec)
    place = positions(targets, None, when)
    return {"drift": table, "ra_propagated": np.asarray(place["ra_propagated"]),
            "dec_propagated": np.asarray(place["dec_propagated"]), "when": when,
            "tolerance": float(tolerance_arcsec), "time": table.meta.get("time", when)}


def instant_for(date: dt.date, today: dt.date | None = None) -> str:
    """The instant the drift is computed for: now for today's date, else 00:00 UTC of date."""
    today = today or dt.datetime.now(dt.timezone.utc).date()
    if date == today:
        return "now"
    return f"{date.isoformat()}T00:00:00Z"


class DriftPanel(QWidget):
    """Drift table, tolerance and date controls, and the selected target's error ellipse."""

    target_clicked = Signal(int)
    tolerance_changed = Signal(float)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.targets = None
        self.selected = None
        self.result = None
        self._task = None
        self._generation = 0

        self.tolerance_box = QDoubleSpinBox()
        self.tolerance_box.setRange(0.001, 36000.0)
        self.tolerance_box.setDecimals(3)
        self.tolerance_box.setValue(DEFAULT_TOLERANCE_ARCSEC)
        self.tolerance_box.setSuffix(" ″")
        self.tolerance_box.setToolTip("Drift tolerance, ″: the largest offset of the true "
                                      "position from the catalogue position you accept (a "
                                      "field of view, a slit width)")
        self.tolerance_box.valueChanged.connect(self._on_tolerance_typed)
        self._tolerance_timer = QTimer(self)
        self._tolerance_timer.setSingleShot(True)
        self._tolerance_timer.setInterval(TOLERANCE_DELAY_MS)
        self._tolerance_timer.timeout.connect(self._tolerance_settled)
        self.tolerance_box.editingFinished.connect(self._tolerance_settled)

        self.date_edit = DateField()
        self.date_edit.setDateRange(QDate(1000, 1, 1), QDate(3000, 12, 31))
        self.date_edit.setDate(_qdate(dt.datetime.now(dt.timezone.utc).date()))
        self._date_timer = QTimer(self)
        self._date_timer.setSingleShot(True)
        self._date_timer.setInterval(TOLERANCE_DELAY_MS)
        self._date_timer.timeout.connect(self.recompute)
        self.date_edit.dateChanged.connect(lambda _: self._date_timer.start())
        today = QPushButton("Today")
        today.clicked.connect(
            lambda: self.date_edit.setDate(_qdate(dt.datetime.now(dt.timezone.utc).date())))
        plus1, plus5 = QPushButton("+1 yr"), QPushButton("+5 yr")
        plus1.clicked.connect(lambda: self.date_edit.setDate(self.date_edit.date().addYears(1)))
        plus5.clicked.connect(lambda: self.date_edit.setDate(self.date_edit.date().addYears(5)))
        self.status = QLabel("No targets.")
        self.status.setWordWrap(True)

        self.model = DriftModel(self)
        self.proxy = DriftSortProxy(self)
        self.proxy.setSourceModel(self.model)
        self.table = QTableView()
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.setAlternatingRowColors(True)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(self.fontMetrics().height() + 6)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setResizeContentsPrecision(200)  # size columns from the first rows only
        self.table.sortByColumn(-1, Qt.SortOrder.AscendingOrder)
        self.table.selectionModel().currentRowChanged.connect(self._on_row)

        self.ellipse_canvas = ChartCanvas(self, size_in=(3.2, 3.0), min_height_px=200)
        self.ellipse_canvas.setMinimumWidth(220)
        self.ellipse_canvas.setMaximumWidth(300)
        self.ellipse_text = QLabel("Select a target to see its position uncertainty.")
        self.ellipse_text.setWordWrap(True)
        self.ellipse_text.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)

        controls = QHBoxLayout()
        controls.addWidget(QLabel("Tolerance:"))
        controls.addWidget(self.tolerance_box)
        controls.addSpacing(16)
        controls.addWidget(QLabel("Date:"))
        controls.addWidget(self.date_edit)
        for button in (today, plus1, plus5):
            controls.addWidget(button)
        controls.addStretch(1)
        side = QWidget()
        side_layout = QVBoxLayout(side)
        side_layout.setContentsMargins(0, 0, 0, 0)
        side_layout.addWidget(self.ellipse_canvas, 1)
        side_layout.addWidget(self.ellipse_text)
        split = QSplitter(Qt.Orientation.Horizontal)
        split.addWidget(self.table)
        split.addWidget(side)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 1)
        split.setSizes([900, 280])
        layout = QVBoxLayout(self)
        layout.addLayout(controls)
        layout.addWidget(self.status)
        layout.addWidget(split, 1)
        watch_theme(self, lambda: self.set_chart_style(theme_chart_style()))

    # -- the contract -------------------------------------------------------------------
    def set_targets(self, targets) -> None:
        self.targets = targets
        self.result = None
        self.model.set_data(targets, None)
        self.recompute()

    def set_tolerance(self, arcsec: float) -> None:
        """Set the tolerance from outside: recomputes, does not emit tolerance_changed."""
        arcsec = float(arcsec)
        if abs(arcsec - self.tolerance_box.value()) < 5e-4 and self.result is not None:
            return
        self.tolerance_box.blockSignals(True)
        self.tolerance_box.setValue(arcsec)
        self.tolerance_box.blockSignals(False)
        self._tolerance_timer.stop()
        self.recompute()

    def set_selected(self, index) -> None:
        self.selected = None if index is None else int(index)
        self._select_row(self.selected)
        self._show_ellipse()

    def set_chart_style(self, style: dict | None) -> None:
        self.ellipse_canvas.style = style
        self._show_ellipse()

    def tolerance(self) -> float:
        return float(self.tolerance_box.value())

    def chosen_date(self) -> dt.date:
        return self.date_edit.date().toPython()

    # -- computing ----------------------------------------------------------------------
    def recompute(self) -> None:
        """Start the drift computation for the current targets, date and tolerance."""
        self._date_timer.stop()
        if self._task is not None:
            self._task.cancel()
            self._task = None
        self._generation += 1
        if self.targets is None or len(self.targets) == 0:
            self.status.setText("No targets.")
            return
        when = instant_for(self.chosen_date())
        generation = self._generation
        self.status.setText(f"Computing drift at {when} …")
        self._task = workers.run_in_worker(
            self, drift_job, self.targets, when, self.tolerance(),
            on_done=lambda result: self._on_done(generation, result),
            on_error=lambda message: self._on_error(generation, message),
            progress_label="Drift")

    def _on_done(self, generation: int, result: dict) -> None:
        if generation != self._generation:
            return  # an older request
        self._task = None
        self.result = result
        self.model.set_data(self.targets, result)
        over = int(np.sum(result["drift"]["over_tolerance"]))
        n = len(self.targets)
        self.status.setText(
            f"Drift at {result['time']}: {over} of {n} targets over {result['tolerance']:g}″ "
            f"(marked {OVER_MARK}).")
        self._select_row(self.selected)
        self._show_ellipse()

    def _on_error(self, generation: int, message: str) -> None:
        if generation != self._generation:
            return
        self._task = None
        self.status.setText(f"Drift could not be computed: {message}")

    def over_tolerance_rows(self) -> list:
        """Target indices currently marked over the tolerance."""
        if self.result is None:
            return []
        return [int(i) for i in np.flatnonzero(self.result["drift"]["over_tolerance"])]

    # -- interaction ----------------------------------------------------------------------
    def _on_tolerance_typed(self, _value) -> None:
        self._tolerance_timer.start()

    def _tolerance_settled(self) -> None:
        self._tolerance_timer.stop()
        value = self.tolerance()
        if self.result is not None and abs(value - self.result["tolerance"]) < 5e-4:
            return
        self.tolerance_changed.emit(value)
        self.recompute()

    def _on_row(self, current, _previous) -> None:
        if not current.isValid():
            return
        row = self.proxy.mapToSource(current).row()
        if row != self.selected:
            self.selected = row
            self._show_ellipse()
            self.target_clicked.emit(row)

    def _select_row(self, index) -> None:
        selection = self.table.selectionModel()
        selection.blockSignals(True)
        if index is None or self.targets is None or not 0 <= index < len(self.targets):
            selection.clearSelection()
        else:
            view_index = self.proxy.mapFromSource(self.model.index(index, 0))
            selection.setCurrentIndex(
                view_index, selection.SelectionFlag.ClearAndSelect | selection.SelectionFlag.Rows)
            self.table.scrollTo(view_index)
        selection.blockSignals(False)
        self.table.viewport().update()

    def ellipse_values(self):
        """(major mas, minor mas, pa deg) of the selected target at the date, or None."""
        i = self.selected
        if self.result is None or i is None or not 0 <= i < len(self.targets):
            return None
        d = self.result["drift"]
        if "error_major" not in d:
            return (np.nan, np.nan, np.nan)
        return (float(d["error_major"][i]), float(d["error_minor"][i]), float(d["error_pa"][i]))

    def _show_ellipse(self) -> None:
        values = self.ellipse_values()
        figure = self.ellipse_canvas.figure
        if values is None:
            figure.clear()
            self.ellipse_canvas.draw_idle()
            self.ellipse_text.setText("Select a target to see its position uncertainty.")
            return
        name = self.targets.names()[self.selected]
        date = self.result["time"][:10]
        major, minor, pa = values
        draw_error_ellipse(figure, major, minor, pa, title=f"{name}, 1σ at {date}",
                           style=self.ellipse_canvas.style)
        self.ellipse_canvas.draw_idle()
        if not np.isfinite(major):
            self.ellipse_text.setText(f"{name}: position errors unknown in the catalogue.")
        else:
            self.ellipse_text.setText(ellipse_text(major, minor, pa, self.ellipse_is_lower_bound()))

    def ellipse_is_lower_bound(self) -> bool:
        """True when the selected target's proper-motion errors are unknown (ellipse too small)."""
        d = None if self.result is None else self.result["drift"]
        return (d is not None and "error_lower_bound" in d and self.selected is not None
                and bool(d["error_lower_bound"][self.selected]))


def ellipse_text(major_mas: float, minor_mas: float, pa_deg: float,
                 lower_bound: bool = False) -> str:
    """The ellipse in words, as shown under the plot; "≥" where it is a lower bound."""
    at_least = "≥ " if lower_bound else ""
    text = (f"1σ error ellipse: semi-major {at_least}{major_mas:.3f} mas, semi-minor "
            f"{at_least}{minor_mas:.3f} mas, position angle {pa_deg:.1f}° (east of north)")
    if lower_bound:
        text += ". Proper-motion errors unknown: the true ellipse is at least this large."
    return text


def _qdate(date: dt.date) -> QDate:
    return QDate(date.year, date.month, date.day)
