"""The Tonight tab: the night chart with a live readout, and the schedule timeline below it.

Pointing at the chart reads the nearest target line under the cursor: local time and UTC,
the target's observed altitude and its airmass (Kasten & Young 1989, via core.observed).
Clicking a line (or a scheduled block on it, or a block on the timeline) selects the target.
Any click on the chart or the timeline also moves the window's shown instant there
(instant_clicked); a vertical line marks the shown instant on both.
"""
from __future__ import annotations

import datetime as dt

import matplotlib.dates as mdates
import numpy as np
from PySide6.QtCore import Signal
from PySide6.QtWidgets import QHBoxLayout, QLabel, QSpinBox, QVBoxLayout, QWidget

from ...charts.chart_style import line_cycle, resolve_style
from ...charts.night_chart import draw_night_chart, seconds_at, time_span
from ...charts.plan_clock import clock_text
from ...core.constants import DEG_TO_RAD
from ...core.observed import kasten_young_airmass
from ..instant import utc_datetime
from ..number_text import fixed
from .chart_canvas import ChartCanvas, nearest_point
from .theme_link import theme_chart_style, watch_theme
from .timeline import ScheduleTimeline

DEFAULT_LINES = 12
HINT = ("Point at a line to read it; click to show that instant everywhere, on a line or a "
        "block to select its target too.")


class TonightPanel(QWidget):
    """Night chart + schedule timeline; emits target_clicked(index) and instant_clicked(ISO
    UTC instant) on a click."""

    target_clicked = Signal(int)
    instant_clicked = Signal(str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.plan = None
        self.selected = None
        self.instant: dt.datetime | None = None  # the window's shown instant (UTC)
        self.ax = None
        self.drawn = np.zeros(0, dtype=int)

        self.readout = QLabel(HINT)
        self.readout.setObjectName("tonightReadout")
        font = self.readout.font()
        font.setPointSizeF(font.pointSizeF() * 1.1)
        self.readout.setFont(font)
        self.lines_box = QSpinBox()
        self.lines_box.setRange(1, 60)
        self.lines_box.setValue(DEFAULT_LINES)
        self.lines_box.setPrefix("lines: ")
        self.lines_box.setToolTip("How many targets to draw (highest priority first)")
        self.lines_box.valueChanged.connect(lambda _: self._draw())
        self.summary = QLabel("")
        self.canvas = ChartCanvas(self, size_in=(9.0, 5.0), min_height_px=240)
        self.timeline = ScheduleTimeline(self)

        top = QHBoxLayout()
        top.addWidget(self.readout, 1)
        top.addWidget(self.lines_box)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(self.canvas, 1)
        layout.addWidget(self.timeline)
        layout.addWidget(self.summary)

        self.canvas.mpl_connect("motion_notify_event", self._on_motion)
        # The readout describes the point under the mouse: none once it leaves the chart.
        self.canvas.mpl_connect("figure_leave_event", lambda _: self._clear_readout())
        self.canvas.mpl_connect("axes_leave_event", lambda _: self._clear_readout())
        self.canvas.mpl_connect("button_press_event", self._on_press)
        self.canvas.mpl_connect("draw_event", lambda _: self._align_timeline())
        self.timeline.block_clicked.connect(self.target_clicked)
        self.timeline.seconds_clicked.connect(self._emit_instant)
        watch_theme(self, lambda: self.set_chart_style(theme_chart_style()))

    # -- the contract -------------------------------------------------------------------
    def set_plan(self, plan) -> None:
        self.plan = plan
        self.timeline.set_plan(plan)
        self.readout.setText(HINT)
        self._draw()

    def set_selected(self, index) -> None:
        index = None if index is None else int(index)
        if index == self.selected:
            return
        self.selected = index
        self.timeline.set_selected(index)
        self._draw()

    def set_instant(self, iso: str | None) -> None:
        """Mark the window's shown instant (ISO 8601 UTC) on the chart and the timeline."""
        instant = utc_datetime(iso) if iso else None
        if instant == self.instant:
            return
        self.instant = instant
        self.timeline.set_instant(instant)
        self._draw()

    def set_chart_style(self, style: dict | None) -> None:
        """Chart colours of the current theme (gui.themes.chart_style); None: default look."""
        self.canvas.style = style
        self.timeline.set_chart_style(style)
        self._draw()

    # -- drawing ------------------------------------------------------------------------
    def _draw(self) -> None:
        figure = self.canvas.figure
        if self.plan is None:
            figure.clear()
            self.ax, self.drawn = None, np.zeros(0, dtype=int)
            self.summary.setText("")
            self.readout.setText("No plan yet: open a target list and a site.")
            self.canvas.draw_idle()
            return
        self.ax, self.drawn = draw_night_chart(figure, self.plan, top_n=self.lines_box.value(),
                                               selected=self.selected, style=self.canvas.style)
        if self.instant is not None:
            look = resolve_style(self.canvas.style)
            self.ax.axvline(mdates.date2num(self.instant), color=look["accent"], lw=1.4,
                            ls="--", zorder=1.5, label="_shown instant")
        figure.set_layout_engine("tight")
        cycle = line_cycle(resolve_style(self.canvas.style))
        self.timeline.set_colours({int(i): cycle[k % len(cycle)][0]
                                   for k, i in enumerate(self.drawn)})
        self.summary.setText(self._summary_text())
        self.canvas.draw_idle()

    def _summary_text(self) -> str:
        s, w = self.plan.schedule, self.plan.windows
        busy_h = float(np.sum(s.end_s - s.start_s)) / 3600.0
        text = f"{len(s.index)} blocks scheduled ({busy_h:.1f} h)"
        if s.unscheduled:
            text += f"; not scheduled: {len(s.unscheduled)}"
            names = ", ".join(str(w.names[u.index]) for u in s.unscheduled[:6])
            more = "…" if len(s.unscheduled) > 6 else ""
            text += f" ({names}{more})"
        return text

    def _align_timeline(self) -> None:
        """Give the timeline the chart axes' left and right margins, so times line up."""
        if self.ax is None:
            return
        box = self.ax.get_position()  # figure fractions; canvas and timeline share a column
        width = self.canvas.width()
        self.timeline.set_margins(box.x0 * width, (1.0 - box.x1) * width)

    # -- reading the chart -----------------------------------------------------------------
    def line_under(self, event):
        """(target index, seconds, altitude) of the drawn line nearest the mouse, or None."""
        if self.ax is None or event.inaxes is not self.ax or event.xdata is None:
            return None
        t = seconds_at(self.plan, event.xdata)
        start, end = time_span(self.plan)
        if not start <= t <= end or len(self.drawn) == 0:
            return None
        alt, _ = self.plan.windows.observed_altaz(self.drawn, np.full(len(self.drawn), t))
        points = self.canvas.display_xy(self.ax, np.full(len(alt), event.xdata), alt)
        k = nearest_point(points, event.x, event.y)
        if k is None:
            return None
        return int(self.drawn[k]), t, float(alt[k])

    def _on_motion(self, event) -> None:
        if self.plan is None:
            return
        if self.ax is None or event.inaxes is not self.ax or event.xdata is None:
            self.readout.setText(HINT)
            return
        t = seconds_at(self.plan, event.xdata)
        text = clock_text(self.plan, t)
        hit = self.line_under(event)
        if hit is not None:
            index, _, alt = hit
            airmass = kasten_young_airmass(np.array([alt * DEG_TO_RAD]))[0]
            airmass_text = f"airmass {airmass:.2f}" if np.isfinite(airmass) else "below horizon"
            text += f"   {self.plan.windows.names[index]}: altitude {fixed(alt, 1)}°, {airmass_text}"
        self.readout.setText(text)

    def _clear_readout(self) -> None:
        if self.plan is not None:
            self.readout.setText(HINT)

    def _on_press(self, event) -> None:
        if event.button != 1 or self.plan is None:
            return
        hit = self.line_under(event)
        if hit is not None:
            self.target_clicked.emit(hit[0])
        if self.ax is not None and event.inaxes is self.ax and event.xdata is not None:
            self._emit_instant(seconds_at(self.plan, event.xdata))

    def _emit_instant(self, seconds: float) -> None:
        start, end = time_span(self.plan) if self.plan is not None else (0.0, -1.0)
        if start <= seconds <= end:
            self.instant_clicked.emit(self.plan.iso(seconds))
