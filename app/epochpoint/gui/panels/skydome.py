"""The Sky dome tab: the site's sky at a chosen instant of the night (charts.sky_chart).

A slider runs over the night (sunset to sunrise, half an hour either side). The main window
sets it to its shown instant (gui.instant); on its own it starts at the present moment when
that falls in the night, else at the middle of the darkest stretch.
Clicking near a target's marker selects it.
"""
from __future__ import annotations

import datetime as dt

import numpy as np
from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtWidgets import QHBoxLayout, QLabel, QPushButton, QSlider, QVBoxLayout, QWidget

from ...charts.night_chart import darkness_spans_s, time_span
from ...charts.plan_clock import clock_text, seconds_of
from ...charts.sky_chart import draw_sky_chart
from .chart_canvas import ChartCanvas, nearest_point
from .theme_link import theme_chart_style, watch_theme

SLIDER_STEP_S = 60
REDRAW_DELAY_MS = 60  # coalesce slider drags into one redraw


def default_instant(plan, now: dt.datetime | None = None) -> float:
    """Seconds from t_ref: now if inside the chart's span of the night, else mid-darkness."""
    start, end = time_span(plan)
    now_s = seconds_of(plan, now or dt.datetime.now(dt.timezone.utc))
    if start <= now_s <= end:
        return now_s
    spans = darkness_spans_s(plan)
    if spans:
        _, a, b = spans[-1]  # the deepest darkness the night reaches
        return 0.5 * (a + b)
    return 0.5 * (start + end)


class SkyDomePanel(QWidget):
    """Sky map at an instant of the plan; emits target_clicked(index) on a click."""

    target_clicked = Signal(int)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.plan = None
        self.selected = None
        self.t_seconds = None
        self.ax = None
        self.marks = None

        self.slider = QSlider(Qt.Orientation.Horizontal)
        self.slider.setToolTip("Instant of the night shown on the map")
        self.slider.valueChanged.connect(self._on_slider)
        self.time_label = QLabel("")
        self.time_label.setMinimumWidth(190)
        self.now_button = QPushButton("Now")
        self.now_button.setToolTip("Show the sky at the present moment (or mid-darkness "
                                   "when the night shown is not tonight)")
        self.now_button.clicked.connect(lambda: self.set_time(None))
        self.status = QLabel("")
        self.canvas = ChartCanvas(self, size_in=(7.0, 6.0), min_height_px=300)
        self.canvas.mpl_connect("button_press_event", self._on_press)
        self._redraw = QTimer(self)
        self._redraw.setSingleShot(True)
        self._redraw.setInterval(REDRAW_DELAY_MS)
        self._redraw.timeout.connect(self._draw)

        row = QHBoxLayout()
        row.addWidget(QLabel("Time:"))
        row.addWidget(self.slider, 1)
        row.addWidget(self.time_label)
        row.addWidget(self.now_button)
        layout = QVBoxLayout(self)
        layout.addLayout(row)
        layout.addWidget(self.canvas, 1)
        layout.addWidget(self.status)
        watch_theme(self, lambda: self.set_chart_style(theme_chart_style()))

    # -- the contract -------------------------------------------------------------------
    def set_plan(self, plan) -> None:
        self.plan = plan
        self.slider.setEnabled(plan is not None)
        self.now_button.setEnabled(plan is not None)
        if plan is None:
            self.t_seconds = None
            self._draw()
            return
        start, end = time_span(plan)
        self.slider.blockSignals(True)
        self.slider.setRange(0, int((end - start) // SLIDER_STEP_S))
        self.slider.blockSignals(False)
        self.set_time(self.t_seconds if self.t_seconds is not None
                      and start <= self.t_seconds <= end else None)

    def set_time(self, seconds) -> None:
        """Show the sky `seconds` after plan.t_ref (None: now or mid-darkness)."""
        if self.plan is None:
            self.t_seconds = seconds
            return
        start, end = time_span(self.plan)
        t = default_instant(self.plan) if seconds is None else float(seconds)
        self.t_seconds = min(max(t, start), end)
        self.slider.blockSignals(True)
        self.slider.setValue(int(round((self.t_seconds - start) / SLIDER_STEP_S)))
        self.slider.blockSignals(False)
        self._draw()

    def set_selected(self, index) -> None:
        index = None if index is None else int(index)
        if index != self.selected:
            self.selected = index
            self._draw()

    def set_chart_style(self, style: dict | None) -> None:
        """Chart colours of the current theme (gui.themes.chart_style); None: default look."""
        self.canvas.style = style
        self._draw()

    # -- drawing ------------------------------------------------------------------------
    def _on_slider(self, value: int) -> None:
        if self.plan is None:
            return
        self.t_seconds = time_span(self.plan)[0] + value * SLIDER_STEP_S
        self.time_label.setText(clock_text(self.plan, self.t_seconds))
        self._redraw.start()

    def _draw(self) -> None:
        self._redraw.stop()
        figure = self.canvas.figure
        if self.plan is None or self.t_seconds is None:
            figure.clear()
            self.ax, self.marks = None, None
            self.time_label.setText("")
            self.status.setText("No plan yet: open a target list and a site.")
            self.canvas.draw_idle()
            return
        self.ax, self.marks = draw_sky_chart(figure, self.plan, self.t_seconds,
                                             selected=self.selected, style=self.canvas.style)
        self.time_label.setText(clock_text(self.plan, self.t_seconds))
        n_up, n_ok = len(self.marks.indices), int(np.sum(self.marks.observable))
        self.status.setText(f"{n_up} targets above the horizon, {n_ok} observable now "
                            f"(every limit met, inside {self.plan.constraints.darkness} "
                            "darkness). Click a marker to select its target.")
        self.canvas.draw_idle()

    def marker_positions(self) -> np.ndarray:
        """(n, 2) display pixels of the drawn target markers, in marks.indices order."""
        m = self.marks
        return self.canvas.display_xy(self.ax, np.radians(m.az), 90.0 - m.alt)

    def _on_press(self, event) -> None:
        if event.button != 1 or self.ax is None or event.inaxes is not self.ax:
            return
        k = nearest_point(self.marker_positions(), event.x, event.y)
        if k is not None:
            self.target_clicked.emit(int(self.marks.indices[k]))
