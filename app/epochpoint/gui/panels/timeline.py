"""The schedule timeline: the night's observing blocks on a local-time axis.

A light painted widget under the night chart: the darkness levels as bands, each scheduled
block as a box named for its target (in the colour of its line on the chart), each block
reserved for a timed event (core.plan_events) hatched and outlined so it reads as fixed,
hourly ticks in the site's local time and a marker for the window's shown instant. Clicking a
block selects it; any click in the night moves the shown instant there (seconds_clicked).
"""
from __future__ import annotations

import datetime as dt

from PySide6.QtCore import QRectF, Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont, QPainter, QPen
from PySide6.QtWidgets import QToolTip, QWidget

from ...charts.chart_style import is_dark, resolve_style
from ...charts.night_chart import DARKNESS_SPANS, darkness_spans_s, time_span
from ...charts.plan_clock import local_datetime, seconds_of

BAND_HEIGHT_PX = 46
TICK_SPACE_PX = 18


class ScheduleTimeline(QWidget):
    """Blocks of a plan's schedule against time; emits block_clicked(target index) and
    seconds_clicked(seconds from the plan's reference instant)."""

    block_clicked = Signal(int)
    seconds_clicked = Signal(float)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.plan = None
        self.selected = None
        self.instant: dt.datetime | None = None
        self.colours: dict = {}
        self.style = None
        self.margins_px = (50, 12)
        self.span = (0.0, 1.0)
        self.setMinimumHeight(BAND_HEIGHT_PX + TICK_SPACE_PX + 8)
        self.setMaximumHeight(BAND_HEIGHT_PX + TICK_SPACE_PX + 30)
        self.setMouseTracking(True)
        self.setToolTip("")

    # -- inputs -----------------------------------------------------------------------
    def set_plan(self, plan) -> None:
        self.plan = plan
        if plan is not None:
            self.span = time_span(plan)
        self.update()

    def set_selected(self, index) -> None:
        self.selected = None if index is None else int(index)
        self.update()

    def set_instant(self, instant: dt.datetime | None) -> None:
        """The window's shown instant (aware UTC datetime), marked with a line."""
        self.instant = instant
        self.update()

    def set_colours(self, colours: dict) -> None:
        """Colour of each target's block (target index -> colour), matching the chart."""
        self.colours = dict(colours)
        self.update()

    def set_chart_style(self, style: dict | None) -> None:
        self.style = style
        self.update()

    def set_margins(self, left_px: int, right_px: int) -> None:
        """Line the time axis up with the chart's axes above."""
        self.margins_px = (max(0, int(left_px)), max(0, int(right_px)))
        self.update()

    # -- geometry -----------------------------------------------------------------------
    def x_of(self, seconds: float) -> float:
        left, right = self.margins_px
        width = max(1, self.width() - left - right)
        start, end = self.span
        return left + (seconds - start) / (end - start) * width

    def seconds_at_x(self, x_px: float) -> float:
        left, right = self.margins_px
        width = max(1, self.width() - left - right)
        start, end = self.span
        return start + (x_px - left) / width * (end - start)

    def block_rects(self) -> list:
        """(target index, QRectF, start_s, end_s) of every scheduled block."""
        if self.plan is None:
            return []
        out = []
        s = self.plan.schedule
        for i, start, end in zip(s.index, s.start_s, s.end_s):
            x0, x1 = self.x_of(start), self.x_of(end)
            out.append((int(i), QRectF(x0, 6.0, max(2.0, x1 - x0), BAND_HEIGHT_PX - 12.0),
                        float(start), float(end)))
        return out

    def fixed_rects(self) -> list:
        """(target index, QRectF, start_s, end_s) of every block reserved for a timed event."""
        reservations = None if self.plan is None else self.plan.reservations
        if reservations is None:
            return []
        return [(int(b.index), QRectF(self.x_of(b.start_s), 3.0, max(
            2.0, self.x_of(b.end_s) - self.x_of(b.start_s)), BAND_HEIGHT_PX - 6.0),
                 float(b.start_s), float(b.end_s)) for b in reservations.fixed]

    def block_at(self, x_px: float, y_px: float):
        for i, rect, start, end in self.block_rects() + self.fixed_rects():
            if rect.adjusted(-1, -4, 1, 4).contains(x_px, y_px):
                return i, start, end
        return None

    # -- painting -----------------------------------------------------------------------
    def paintEvent(self, event):  # noqa: N802 (Qt name)
        painter = QPainter(self)
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        look = resolve_style(self.style)
        palette = self.palette()
        base, text = palette.base().color(), palette.text().color()
        painter.fillRect(self.rect(), base)
        if self.plan is None:
            painter.setPen(text)
            painter.drawText(self.rect(), Qt.AlignmentFlag.AlignCenter, "no plan")
            return
        band = QRectF(self.x_of(self.span[0]), 0.0, self.x_of(self.span[1]) - self.x_of(
            self.span[0]), BAND_HEIGHT_PX)
        painter.fillRect(band, QColor(look["background"]))
        for level, a, b in darkness_spans_s(self.plan):
            colour = QColor(look["shades"][DARKNESS_SPANS.index(level)])
            painter.fillRect(QRectF(self.x_of(a), 0.0, self.x_of(b) - self.x_of(a),
                                    BAND_HEIGHT_PX), colour)
        self._paint_blocks(painter, look)
        self._paint_fixed(painter, look)
        self._paint_ticks(painter, text)
        self._paint_instant(painter, look)

    def _paint_blocks(self, painter: QPainter, look: dict) -> None:
        names = self.plan.windows.names
        font = QFont(self.font())
        dark = is_dark(look)
        # Names on the blocks: the background colour on a dark theme's bright blocks.
        ink = QColor(look["background"] if dark else look["foreground"])
        for i, rect, _, _ in self.block_rects():
            fill = QColor(self.colours.get(i, look["muted"]))
            fill.setAlphaF(1.0 if dark else 0.75)
            painter.setPen(QPen(QColor(look["background"]), 1.0))
            painter.setBrush(fill)
            painter.drawRoundedRect(rect, 3, 3)
            if i == self.selected:
                painter.setPen(QPen(QColor(look["accent"]), 3.0))
                painter.setBrush(Qt.BrushStyle.NoBrush)
                painter.drawRoundedRect(rect.adjusted(-2, -3, 2, 3), 4, 4)
            font.setBold(i == self.selected)
            painter.setFont(font)
            label = painter.fontMetrics().elidedText(str(names[i]), Qt.TextElideMode.ElideRight,
                                                     int(rect.width()) - 4)
            if label and label != "…":
                painter.setPen(ink)
                painter.save()
                painter.translate(rect.center())
                painter.rotate(-90 if rect.width() < rect.height() * 0.6 else 0)
                if rect.width() < rect.height() * 0.6:
                    label = painter.fontMetrics().elidedText(
                        str(names[i]), Qt.TextElideMode.ElideRight, int(rect.height()) - 2)
                w = painter.fontMetrics().horizontalAdvance(label)
                painter.drawText(int(-w / 2), int(painter.fontMetrics().ascent() / 2 - 1), label)
                painter.restore()

    def _paint_fixed(self, painter: QPainter, look: dict) -> None:
        """Reserved event blocks: diagonal hatching in the observable colour under a solid
        outline, named for the target and the event."""
        names = self.plan.windows.names
        colour = QColor(look["observable"])
        for i, rect, _, _ in self.fixed_rects():
            painter.setPen(Qt.PenStyle.NoPen)
            painter.setBrush(QBrush(colour, Qt.BrushStyle.BDiagPattern))
            painter.drawRect(rect)
            width = 3.0 if i == self.selected else 2.0
            painter.setPen(QPen(QColor(look["accent"] if i == self.selected else colour), width))
            painter.setBrush(Qt.BrushStyle.NoBrush)
            painter.drawRect(rect)
            label = painter.fontMetrics().elidedText(f"{names[i]} (fixed)",
                                                     Qt.TextElideMode.ElideRight,
                                                     int(rect.width()) - 6)
            if label and label != "…":
                painter.setPen(QColor(look["foreground"]))
                painter.drawText(rect, Qt.AlignmentFlag.AlignCenter, label)

    def _paint_ticks(self, painter: QPainter, text: QColor) -> None:
        painter.setPen(text)
        font = QFont(self.font())
        font.setBold(False)
        painter.setFont(font)
        first = local_datetime(self.plan, self.span[0])
        hour = first.replace(minute=0, second=0, microsecond=0) + dt.timedelta(hours=1)
        while True:
            s = seconds_of(self.plan, hour)
            if s > self.span[1]:
                break
            x = self.x_of(s)
            painter.drawLine(int(x), BAND_HEIGHT_PX, int(x), BAND_HEIGHT_PX + 4)
            label = f"{hour:%H}"
            w = painter.fontMetrics().horizontalAdvance(label)
            painter.drawText(int(x - w / 2), BAND_HEIGHT_PX + 4 + painter.fontMetrics().ascent(),
                             label)
            hour += dt.timedelta(hours=1)
        zone = local_datetime(self.plan, self.span[0]).tzname()
        painter.drawText(2, BAND_HEIGHT_PX + 4 + painter.fontMetrics().ascent(), f"{zone}")

    def _paint_instant(self, painter: QPainter, look: dict) -> None:
        if self.instant is None:
            return
        shown = seconds_of(self.plan, self.instant)
        if self.span[0] <= shown <= self.span[1]:
            x = self.x_of(shown)
            painter.setPen(QPen(QColor(look["accent"]), 2.0, Qt.PenStyle.DashLine))
            painter.drawLine(int(x), 0, int(x), BAND_HEIGHT_PX)

    # -- mouse --------------------------------------------------------------------------
    def mousePressEvent(self, event):  # noqa: N802
        if event.button() == Qt.MouseButton.LeftButton and self.plan is not None:
            hit = self.block_at(event.position().x(), event.position().y())
            if hit is not None:
                self.block_clicked.emit(hit[0])
            self.seconds_clicked.emit(self.seconds_at_x(event.position().x()))
        super().mousePressEvent(event)

    def mouseMoveEvent(self, event):  # noqa: N802
        if self.plan is None:
            return
        hit = self.block_at(event.position().x(), event.position().y())
        if hit is None:
            QToolTip.hideText()
            return
        i, start, end = hit
        a, b = local_datetime(self.plan, start), local_datetime(self.plan, end)
        QToolTip.showText(event.globalPosition().toPoint(),
                          f"{self.plan.windows.names[i]}: {a:%H:%M}–{b:%H:%M} {b.tzname()} "
                          f"({(end - start) / 60:.0f} min)", self)
