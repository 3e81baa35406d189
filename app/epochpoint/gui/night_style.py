"""The drawing the night palette cannot reach: standard icons and check indicators.

Qt's standard icons (the message-box symbols, folders and files, the arrows of a file dialog)
are coloured pictures that ignore the palette, so a red night theme would still show bright
yellow, blue and green. In the night theme each one is redrawn in red by its own brightness:
shapes stay readable, the light is red only (red light barely affects the eyes' dark
adaptation: common practice at observatories).

Fusion outlines an unchecked check box or radio button in a shade of the window colour, which
is invisible on a near-black window. In the night theme they get an outline in the text
colour, which keeps the contrast of a control's parts with its background at least 3:1
(WCAG 2.1, success criterion 1.4.11, non-text contrast). Qt draws a line edit's text cursor
by inverting the pixels under it, which turns near-black into white; at night the focused line
edit gets a steady cursor in the accent colour instead. The light theme draws as Fusion does.
"""
from __future__ import annotations

import numpy as np
from PySide6.QtCore import QEvent, QObject, QPointF, QRect, QRectF, QSize, Qt
from PySide6.QtGui import QColor, QIcon, QImage, QPainter, QPen, QPixmap
from PySide6.QtWidgets import QLineEdit, QProxyStyle, QStyle

ICON_SIZES = (16, 22, 24, 32, 48, 64)
# Green and blue of a redrawn icon pixel, as a fraction of its red (kept below 0x40 overall).
ICON_GREEN_BLUE = 0.12
CHECK_INDICATORS = (QStyle.PrimitiveElement.PE_IndicatorCheckBox,
                    QStyle.PrimitiveElement.PE_IndicatorItemViewItemCheck)


def red_image(image: QImage, brightest: QColor) -> QImage:
    """`image` redrawn in shades of `brightest` by each pixel's brightness, alpha kept."""
    argb = image.convertToFormat(QImage.Format.Format_ARGB32)
    height, width, stride = argb.height(), argb.width(), argb.bytesPerLine()
    pixels = np.array(argb.constBits(), dtype=np.uint8, copy=True).reshape(height, stride)
    bgra = pixels[:, :width * 4].reshape(height, width, 4).astype(float)
    # Brightness by the Rec. 601 weights, lifted a little so dark outlines stay visible.
    level = (0.299 * bgra[..., 2] + 0.587 * bgra[..., 1] + 0.114 * bgra[..., 0]) / 255.0
    level = 0.25 + 0.75 * level
    red = level * brightest.red()
    bgra[..., 2] = red
    bgra[..., 1] = np.minimum(red * ICON_GREEN_BLUE, brightest.green())
    bgra[..., 0] = np.minimum(red * ICON_GREEN_BLUE, brightest.blue())
    pixels[:, :width * 4] = bgra.round().astype(np.uint8).reshape(height, width * 4)
    out = QImage(pixels.tobytes(), width, height, stride, QImage.Format.Format_ARGB32)
    return out.copy()  # own the pixels (the bytes above are temporary)


def red_icon(icon: QIcon, brightest: QColor) -> QIcon:
    """A copy of `icon` redrawn in red at every usual size."""
    if icon.isNull():
        return icon
    out = QIcon()
    sizes = {s.width() for s in icon.availableSizes()} | set(ICON_SIZES)
    for size in sorted(sizes):
        pixmap = icon.pixmap(QSize(size, size))
        if not pixmap.isNull():
            out.addPixmap(QPixmap.fromImage(red_image(pixmap.toImage(), brightest)))
    return out


class NightCaret(QObject):
    """Paints the text cursor of the focused line edit in the accent colour (night only)."""

    def __init__(self, style: "ThemedStyle"):
        super().__init__()
        self.style = style

    def eventFilter(self, watched, event):  # noqa: N802 (Qt name)
        if (event.type() != QEvent.Type.Paint or not self.style.night
                or not isinstance(watched, QLineEdit) or not watched.hasFocus()
                or watched.isReadOnly()):
            return False
        watched.event(event)  # the line edit draws itself (its own cursor has no width)
        caret = watched.inputMethodQuery(Qt.InputMethodQuery.ImCursorRectangle)
        painter = QPainter(watched)
        # Qt widens the cursor's rectangle by 5 pixels each side for repainting; the middle.
        painter.fillRect(QRect(caret.left() + (caret.width() + 1) // 2 - 1, caret.top(), 2,
                               caret.height()),
                         QColor(self.style.night["accent"]))
        painter.end()
        return True


class ThemedStyle(QProxyStyle):
    """Fusion, with red icons and visible check indicators while `night` holds the night
    theme's colours (a dict of hex strings from gui.themes); None draws as Fusion."""

    def __init__(self):
        super().__init__("Fusion")
        self.night: dict | None = None
        self.caret = NightCaret(self)

    def polish(self, target):
        """Every line edit gets the night's text cursor (it draws only at night)."""
        if isinstance(target, QLineEdit):
            target.installEventFilter(self.caret)
        return super().polish(target)

    def pixelMetric(self, metric, option=None, widget=None):  # noqa: N802 (Qt name)
        if self.night and metric == QStyle.PixelMetric.PM_TextCursorWidth:
            return 0  # NightCaret draws it
        return super().pixelMetric(metric, option, widget)

    def _icon_colour(self) -> QColor:
        return QColor(self.night["text"])

    def standardIcon(self, standard_icon, option=None, widget=None):  # noqa: N802 (Qt name)
        icon = super().standardIcon(standard_icon, option, widget)
        return red_icon(icon, self._icon_colour()) if self.night else icon

    def standardPixmap(self, standard_pixmap, option=None, widget=None):  # noqa: N802
        pixmap = super().standardPixmap(standard_pixmap, option, widget)
        if not self.night or pixmap.isNull():
            return pixmap
        return QPixmap.fromImage(red_image(pixmap.toImage(), self._icon_colour()))

    def generatedIconPixmap(self, mode, pixmap, option):  # noqa: N802
        """Disabled and selected icons: Fusion greys them; at night they stay red, dimmer."""
        made = super().generatedIconPixmap(mode, pixmap, option)
        if not self.night or made.isNull():
            return made
        colour = QColor(self.night["muted"] if mode == QIcon.Mode.Disabled
                        else self.night["text"])
        return QPixmap.fromImage(red_image(made.toImage(), colour))

    def drawPrimitive(self, element, option, painter, widget=None):  # noqa: N802
        if self.night and element in CHECK_INDICATORS:
            self._draw_check(option, painter)
        elif self.night and element == QStyle.PrimitiveElement.PE_IndicatorRadioButton:
            self._draw_radio(option, painter)
        elif self.night and element == QStyle.PrimitiveElement.PE_FrameFocusRect:
            self._draw_focus(option, painter)
        else:
            super().drawPrimitive(element, option, painter, widget)

    def drawControl(self, element, option, painter, widget=None):  # noqa: N802 (Qt name)
        if self.night and element == QStyle.ControlElement.CE_Splitter:
            self._draw_splitter(option, painter)
        elif self.night and element == QStyle.ControlElement.CE_SizeGrip:
            self._draw_size_grip(option, painter)
        elif self.night and element == QStyle.ControlElement.CE_ToolBar:
            self._draw_tool_bar(option, painter)
        else:
            super().drawControl(element, option, painter, widget)

    # -- the night's check indicators and focus frame ------------------------------------
    def _pens(self, option):
        enabled = bool(option.state & QStyle.StateFlag.State_Enabled)
        c = self.night
        edge = QColor(c["text"] if enabled else c["muted"])
        mark = QColor(c["accent"] if enabled else c["muted"])
        return edge, mark, QColor(c["base"])

    def _box(self, option) -> QRectF:
        side = min(option.rect.width(), option.rect.height()) - 2
        box = QRectF(0, 0, side, side)
        box.moveCenter(QRectF(option.rect).center())
        return box

    def _draw_check(self, option, painter) -> None:
        edge, mark, fill = self._pens(option)
        box = self._box(option)
        painter.save()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(edge, 1.5))
        painter.setBrush(fill)
        painter.drawRoundedRect(box, 2.0, 2.0)
        inner = box.adjusted(3, 3, -3, -3)
        if option.state & QStyle.StateFlag.State_On:
            painter.setPen(QPen(mark, 2.0, Qt.PenStyle.SolidLine, Qt.PenCapStyle.RoundCap,
                                Qt.PenJoinStyle.RoundJoin))
            painter.drawPolyline([QPointF(inner.left(), inner.center().y()),
                                  QPointF(inner.left() + inner.width() * 0.4, inner.bottom()),
                                  QPointF(inner.right(), inner.top())])
        elif option.state & QStyle.StateFlag.State_NoChange:
            painter.setPen(QPen(mark, 2.0))
            y = inner.center().y()
            painter.drawLine(QPointF(inner.left(), y), QPointF(inner.right(), y))
        painter.restore()

    def _draw_radio(self, option, painter) -> None:
        edge, mark, fill = self._pens(option)
        box = self._box(option)
        painter.save()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(edge, 1.5))
        painter.setBrush(fill)
        painter.drawEllipse(box)
        if option.state & QStyle.StateFlag.State_On:
            painter.setPen(Qt.PenStyle.NoPen)
            painter.setBrush(mark)
            painter.drawEllipse(box.adjusted(4, 4, -4, -4))
        painter.restore()

    def _draw_focus(self, option, painter) -> None:
        """A dotted frame in the text colour (the common style inverts the background: white)."""
        painter.save()
        painter.setPen(QPen(QColor(self.night["text"]), 1.0, Qt.PenStyle.DotLine))
        painter.setBrush(Qt.BrushStyle.NoBrush)
        painter.drawRect(option.rect.adjusted(0, 0, -1, -1))
        painter.restore()

    def _draw_splitter(self, option, painter) -> None:
        """A splitter handle's grip as three dots in the border colour (Fusion's are grey)."""
        painter.save()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(QColor(self.night["muted"]))
        centre = QRectF(option.rect).center()
        across = option.state & QStyle.StateFlag.State_Horizontal
        for k in (-4.0, 0.0, 4.0):
            dot = centre + (QPointF(0.0, k) if across else QPointF(k, 0.0))
            painter.drawEllipse(dot, 1.2, 1.2)
        painter.restore()

    def _draw_size_grip(self, option, painter) -> None:
        """A window's size grip as a triangle of dots in the muted colour (Fusion's are white)."""
        painter.save()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(QColor(self.night["muted"]))
        corner = QRectF(option.rect).bottomRight() - QPointF(3.0, 3.0)
        for row in range(3):
            for col in range(3 - row):
                painter.drawEllipse(corner - QPointF(4.0 * col, 4.0 * row), 1.0, 1.0)
        painter.restore()

    def _draw_tool_bar(self, option, painter) -> None:
        """A tool bar on the window colour with a border-coloured line below (Fusion's lines
        are light grey)."""
        painter.save()
        rect = option.rect
        painter.fillRect(rect, QColor(self.night["window"]))
        painter.setPen(QColor(self.night["border"]))
        painter.drawLine(rect.bottomLeft(), rect.bottomRight())
        painter.restore()
