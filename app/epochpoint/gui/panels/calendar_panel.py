"""The Nights tab: the coming nights as a calendar, one row per night, from which a night is
opened in the planning view.

Each row shows the night's darkness, where the Moon is up (and how much of it is lit) and the
timed events of the target list as bars coloured by observability (charts.calendar_chart).
The calendar is computed in a worker (gui.recompute.calendar_of_nights: epochpoint.events and
the nights' boundaries) when the tab is shown after a change, or on request. A click selects a
night; a double click, Enter or "Open this night" asks for it in the planning view
(night_chosen with the date; the main window changes the plan's night, undoably).
"""
from __future__ import annotations

from PySide6.QtCore import QDate, Qt, Signal
from PySide6.QtWidgets import (QHBoxLayout, QLabel, QPushButton, QSpinBox, QVBoxLayout,
                               QWidget)

from ...charts.calendar_chart import clock_hours, draw_calendar
from .. import workers
from ..date_field import DateField
from ..recompute import calendar_of_nights, tonight_date
from .chart_canvas import ChartCanvas
from .theme_link import theme_chart_style, watch_theme

DEFAULT_NIGHTS = 30
MAX_NIGHTS = 366
HINT = ("Click a night to select it, double-click (or Enter) to open it in the Tonight tab; "
        "point at an event to read it.")


class CalendarPanel(QWidget):
    """The calendar of nights; emits night_chosen('YYYY-MM-DD') and computed() after each
    drawing of a new calendar."""

    night_chosen = Signal(str)
    computed = Signal()
    failed = Signal(str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.calendar = None
        self.drawing = None
        self.selected: int | None = None
        self.inputs = None  # (targets, site, darkness, min_altitude)
        self.stale = False
        self._task = None
        self._generation = 0

        self.from_date = DateField()
        self.from_date.setToolTip("Local date of the evening of the first night shown")
        self.nights_box = QSpinBox()
        self.nights_box.setRange(1, MAX_NIGHTS)
        self.nights_box.setValue(DEFAULT_NIGHTS)
        self.nights_box.setSuffix(" nights")
        self.nights_box.setKeyboardTracking(False)
        self.nights_box.setToolTip("How many nights to show")
        self.open_button = QPushButton("&Open this night")
        self.open_button.setToolTip("Plan the selected night in the Tonight tab")
        self.open_button.setEnabled(False)
        self.open_button.clicked.connect(self.open_selected)
        self.readout = QLabel(HINT)
        self.readout.setWordWrap(True)
        self.canvas = ChartCanvas(self, size_in=(9.0, 7.0), min_height_px=320)
        self.canvas.setFocusPolicy(Qt.FocusPolicy.StrongFocus)

        top = QHBoxLayout()
        label = QLabel("&From")
        label.setBuddy(self.from_date)
        for widget in (label, self.from_date, self.nights_box):
            top.addWidget(widget)
        top.addStretch(1)
        top.addWidget(self.open_button)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(self.canvas, 1)
        layout.addWidget(self.readout)

        self.from_date.dateChanged.connect(lambda _d: self.refresh())
        self.nights_box.valueChanged.connect(lambda _n: self.refresh())
        self.canvas.mpl_connect("button_press_event", self._on_press)
        self.canvas.mpl_connect("motion_notify_event", self._on_motion)
        self.canvas.mpl_connect("key_press_event", self._on_key)
        watch_theme(self, self._on_theme)

    # -- the contract -------------------------------------------------------------------
    def set_inputs(self, targets, site, darkness: str = "astronomical",
                   min_altitude: float | None = None) -> None:
        """The document's targets, site and night limits; the calendar follows when shown.
        The first nights start at tonight at the site."""
        first = self.inputs is None
        self.inputs = (targets, site, darkness, min_altitude)
        if first:
            self.set_start(tonight_date(site), refresh=False)
        self.refresh()

    def set_start(self, date: str, refresh: bool = True) -> None:
        """Show nights from `date` ('YYYY-MM-DD')."""
        self.from_date.blockSignals(True)
        self.from_date.setDate(QDate.fromString(date, Qt.DateFormat.ISODate))
        self.from_date.blockSignals(False)
        if refresh:
            self.refresh()

    def start(self) -> str:
        return self.from_date.date().toString(Qt.DateFormat.ISODate)

    def refresh(self) -> None:
        """Compute the calendar now if the tab is shown, else when it is next shown."""
        self.stale = True
        if self.isVisible():
            self.compute()

    def compute(self) -> None:
        """Start the calendar's computation in a worker (an older one is cancelled)."""
        if self.inputs is None:
            return
        self.stale = False
        if self._task is not None:
            self._task.cancel()
        self._generation += 1
        generation = self._generation
        targets, site, darkness, min_altitude = self.inputs
        self.readout.setText("Computing the nights…")
        self._task = workers.run_in_worker(
            self, calendar_of_nights, targets, site, self.start(), self.nights_box.value(),
            darkness, min_altitude,
            on_done=lambda cal: self._on_done(generation, cal),
            on_error=lambda message: self._on_error(generation, message),
            progress_label="Calendar of nights…")

    def showEvent(self, event):  # noqa: N802 (Qt name)
        super().showEvent(event)
        if self.stale:
            self.compute()

    def select_night(self, row: int | None) -> None:
        if self.calendar is None or row is None or not 0 <= row < len(self.calendar.nights):
            row = None
        self.selected = row
        self.open_button.setEnabled(row is not None)
        self._draw()

    def open_selected(self) -> None:
        if self.calendar is not None and self.selected is not None:
            self.night_chosen.emit(self.calendar.nights[self.selected].date)

    # -- results ------------------------------------------------------------------------
    def _on_done(self, generation: int, cal) -> None:
        if generation != self._generation:
            return
        self.calendar = cal
        if self.selected is not None and self.selected >= len(cal.nights):
            self.selected = None
        self.open_button.setEnabled(self.selected is not None)
        self.readout.setText(self._summary())
        self._draw()
        self.computed.emit()

    def _on_error(self, generation: int, message: str) -> None:
        if generation == self._generation:
            self.readout.setText(f"The nights could not be computed: {message}")
            self.failed.emit(message)

    def _summary(self) -> str:
        events = self.calendar.events
        if events is None:
            return "No timed events in the list (event_epoch, event_period, event_duration). " \
                + HINT
        seen = list(events["observable"])
        return (f"{len(seen)} events in {len(self.calendar.nights)} nights: "
                f"{seen.count('full')} full, {seen.count('partial')} partial, "
                f"{seen.count('none')} not observable. " + HINT)

    def _on_theme(self) -> None:
        self.canvas.style = theme_chart_style()
        self._draw()

    def _draw(self) -> None:
        if self.calendar is None:  # an empty figure in the theme's colours until computed
            self.canvas.draw_blank()
            return
        self.drawing = draw_calendar(self.canvas.figure, self.calendar, self.canvas.style,
                                     self.selected)
        self.canvas.figure.set_layout_engine("tight")
        self.canvas.draw_idle()

    # -- mouse and keys -----------------------------------------------------------------
    def row_at(self, event) -> int | None:
        """The night row under a matplotlib mouse event, or None."""
        if self.drawing is None or event.inaxes is not self.drawing.ax or event.ydata is None:
            return None
        row = int(round(event.ydata))
        return row if 0 <= row < len(self.calendar.nights) else None

    def event_at(self, event) -> int | None:
        """The event row (in calendar.events) whose bar is under the mouse, or None."""
        if self.drawing is None or event.inaxes is not self.drawing.ax:
            return None
        for patch in self.drawing.ax.patches:
            gid = patch.get_gid()
            if gid and gid.startswith("event:") and patch.contains(event)[0]:
                return int(gid.split(":")[1])
        return None

    def _on_press(self, event) -> None:
        if event.button != 1:
            return
        row = self.row_at(event)
        if row is None:
            return
        self.select_night(row)
        if event.dblclick:
            self.open_selected()

    def _on_key(self, event) -> None:
        if event.key == "enter":
            self.open_selected()
        elif event.key in ("up", "down") and self.calendar is not None:
            step = -1 if event.key == "up" else 1
            row = 0 if self.selected is None else self.selected + step
            self.select_night(min(max(row, 0), len(self.calendar.nights) - 1))

    def _on_motion(self, event) -> None:
        j = self.event_at(event)
        if j is None:
            return
        e, zone = self.calendar.events, self.calendar.site.timezone
        mid_h = clock_hours(e["mid"][j], e["night"][j], zone) % 24.0
        lost = f"; lost: {e['lost'][j]}" if e["lost"][j] else ""
        self.readout.setText(
            f"{e['name'][j]} {e['kind'][j]} cycle {e['cycle'][j]}: mid-event "
            f"{int(mid_h):02d}:{int(round(mid_h % 1 * 60)) % 60:02d} local "
            f"({e['mid'][j][11:16]} UTC), {e['observable'][j]}{lost}")
