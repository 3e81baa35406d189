"""The correction ledger: what each step from catalogue to telescope did to one target.

One row per effect (its size in arcsec, as core.positions(..., ledger=True) reports it) with
a bar on a logarithmic scale, since the steps span seven orders of magnitude (a milliarcsecond
of light deflection, a degree of precession since J2000 or of refraction at the horizon). Then
the places the steps lead to, the pointing geometry and the instant, and, when the site's
interlocks refuse the pointing, the reason in plain words. The title and the verdict name the
instant (the window's shown instant, in the site's local time: row key "instant_label").
"""
from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QFont, QFontDatabase, QPainter, QPen
from PySide6.QtWidgets import (QAbstractItemView, QFrame, QGridLayout, QHBoxLayout, QHeaderView,
                               QLabel, QScrollArea, QStyledItemDelegate, QTableWidget,
                               QTableWidgetItem, QVBoxLayout, QWidget)

from ...io.angles import format_dec_dms, format_hours, format_ra_hms
from ..number_text import fixed
from .theme_link import theme_colour, watch_theme

EFFECTS = (
    ("ledger_space_motion", "Space motion", "Proper motion, parallax change and radial "
     "velocity from the catalogue epoch to the instant"),
    ("ledger_parallax", "Parallax", "Seen from the Earth instead of the Solar System barycentre"),
    ("ledger_light_deflection", "Light deflection", "Bending of light by the Sun's gravity"),
    ("ledger_annual_aberration", "Annual aberration", "The Earth's orbital velocity"),
    ("ledger_precession_nutation", "Precession-nutation",
     "Frame bias, precession and nutation: to the true equator and equinox of date"),
    ("ledger_diurnal_aberration", "Diurnal aberration", "The site's velocity from the Earth's "
     "rotation"),
    ("ledger_refraction", "Refraction", "Bending by the atmosphere at the site's weather"),
)
# The bar scale: 0.1 mas at the left end, one degree at the right, ticks at 1 mas, 1", 1'.
BAR_LOW_ARCSEC, BAR_HIGH_ARCSEC = 1e-4, 3600.0
BAR_TICKS_ARCSEC = (1e-3, 1.0, 60.0)
BAR_ROLE = Qt.ItemDataRole.UserRole


def bar_fraction(size_arcsec: float) -> float:
    """Where a size falls on the bar's logarithmic scale, 0..1 (0 for zero or unknown)."""
    if not (size_arcsec is not None and math.isfinite(size_arcsec) and size_arcsec > 0):
        return 0.0
    span = math.log10(BAR_HIGH_ARCSEC / BAR_LOW_ARCSEC)
    return min(1.0, max(0.0, math.log10(size_arcsec / BAR_LOW_ARCSEC) / span))


def size_text(size_arcsec) -> str:
    """An effect's size in arcsec with sensible digits."""
    if size_arcsec is None or not math.isfinite(size_arcsec):
        return "—"
    if size_arcsec < 0.01:
        return f"{size_arcsec:.5f}"
    if size_arcsec < 100.0:
        return f"{size_arcsec:.3f}"
    return f"{size_arcsec:.1f}"


class _BarDelegate(QStyledItemDelegate):
    """Paints the log-scale bar of a row, with faint ticks at 1 mas, 1" and 1'."""

    def paint(self, painter: QPainter, option, index):
        fraction = index.data(BAR_ROLE) or 0.0
        palette = option.palette
        area = QRectF(option.rect).adjusted(4, 5, -4, -5)
        painter.save()
        painter.setPen(QPen(palette.mid().color(), 1.0))
        for tick in BAR_TICKS_ARCSEC:
            x = area.left() + bar_fraction(tick) * area.width()
            painter.drawLine(int(x), int(area.top()) - 2, int(x), int(area.bottom()) + 2)
        if fraction > 0:
            bar = QRectF(area.left(), area.top(), max(2.0, fraction * area.width()), area.height())
            colour = palette.highlight().color()
            colour.setAlphaF(0.6)  # large areas stay dim (a night theme keeps eyes dark)
            painter.fillRect(bar, colour)
        painter.restore()


def _fixed_font() -> QFont:
    return QFontDatabase.systemFont(QFontDatabase.SystemFont.FixedFont)


def _number(row: dict, key: str) -> float:
    value = row.get(key)
    try:
        return float(value)
    except (TypeError, ValueError):
        return float("nan")


class LedgerPanel(QWidget):
    """The ledger of one target's row from core.positions(..., ledger=True)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.row = None
        self.title = QLabel("No target selected.")
        font = self.title.font()
        font.setBold(True)
        font.setPointSizeF(font.pointSizeF() * 1.15)
        self.title.setFont(font)
        # A long target name wraps at its words, never cut off at the panel's edge.
        self.title.setWordWrap(True)
        self.verdict = QLabel("")
        self.verdict.setObjectName("ledgerVerdict")
        self.verdict.setWordWrap(True)
        self.verdict.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)

        self.effects = QTableWidget(len(EFFECTS), 3)
        self.effects.setHorizontalHeaderLabels(
            ["Correction", "Size (″)", "log scale: ticks at 1 mas, 1″, 1′; full = 1°"])
        self.effects.verticalHeader().setVisible(False)
        self.effects.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.effects.setSelectionMode(QAbstractItemView.SelectionMode.NoSelection)
        self.effects.setFocusPolicy(Qt.FocusPolicy.NoFocus)
        self.effects.setItemDelegateForColumn(2, _BarDelegate(self.effects))
        header = self.effects.horizontalHeader()
        header.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(1, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(2, QHeaderView.ResizeMode.Stretch)
        for r, (key, label, tip) in enumerate(EFFECTS):
            item = QTableWidgetItem(label)
            item.setToolTip(tip)
            self.effects.setItem(r, 0, item)
            size = QTableWidgetItem("—")
            size.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            size.setFont(_fixed_font())
            self.effects.setItem(r, 1, size)
            self.effects.setItem(r, 2, QTableWidgetItem(""))
        self.effects.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)

        self.places = QGridLayout()
        self.place_values: dict = {}
        rows = (("propagated", "Propagated (ICRS, at the instant)", "RA", "Dec"),
                ("apparent", "Apparent (true equator and equinox of date)", "RA of date",
                 "Dec of date"),
                ("cirs", "Intermediate (CIRS)", "RA", "Dec"),
                ("observed", "Observed", "HA", "Dec"),
                ("horizon", "Horizon (refracted)", "Alt", "Az"),
                ("geometry", "Pointing", "Airmass", "Parallactic angle"),
                ("instant", "Instant", "UTC", "Local time at the site"))
        for r, (key, label, first, second) in enumerate(rows):
            name = QLabel(label)
            name.setProperty("role", "fieldLabel")
            self.places.addWidget(name, r, 0)
            values = []
            for c, caption in enumerate((first, second)):
                text = QLabel("")
                text.setFont(_fixed_font())
                text.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
                text.setToolTip(caption)
                self.places.addWidget(text, r, 1 + c)
                values.append(text)
            self.place_values[key] = values
        self.places.setColumnStretch(3, 1)

        # The title spans the panel above everything (outside the scroll area, so it wraps to
        # the width shown); effects on the left, places on the right: the ledger usually
        # lives in a wide, low dock; a scroll area keeps everything reachable when it is small.
        left = QVBoxLayout()
        left.addWidget(self.verdict)
        left.addWidget(self.effects)
        left.addStretch(1)
        right = QVBoxLayout()
        right.addLayout(self.places)
        right.addStretch(1)
        inner = QWidget()
        columns = QHBoxLayout(inner)
        columns.addLayout(left, 3)
        columns.addSpacing(12)
        columns.addLayout(right, 2)
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QFrame.Shape.NoFrame)
        scroll.setWidget(inner)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.title)
        layout.addWidget(scroll, 1)
        watch_theme(self, self._style_verdict)
        self.set_row(None)

    # -- the contract -------------------------------------------------------------------
    def set_row(self, row: dict | None) -> None:
        self.row = None if row is None else dict(row)
        if row is None:
            self.title.setText("No target selected.")
            self.verdict.setText("")
            self.verdict.setVisible(False)
            for r in range(len(EFFECTS)):
                self._set_effect(r, float("nan"))
            for values in self.place_values.values():
                for label in values:
                    label.setText("")
            return
        at = str(row.get("instant_label") or row.get("time") or "this instant")
        self.title.setText(f"Correction ledger: {row.get('name', '')} at {at}")
        refused = str(row.get("refused") or "")
        self.verdict.setVisible(True)
        self.verdict.setProperty("refused", bool(refused))
        self.verdict.setText(f"✖ Refused for pointing at {at}: {refused}" if refused
                             else f"✓ Allowed by the site's interlocks at {at}.")
        self._style_verdict()
        for r, (key, _, _) in enumerate(EFFECTS):
            self._set_effect(r, _number(row, key))
        self._fill_places(row)

    def _fit_effects(self) -> None:
        """Make the effects table exactly as tall as its rows (fonts follow the theme)."""
        row_px = self.effects.fontMetrics().height() + 6
        for r in range(len(EFFECTS)):
            self.effects.setRowHeight(r, row_px)
        height = (self.effects.horizontalHeader().sizeHint().height()
                  + sum(self.effects.rowHeight(r) for r in range(len(EFFECTS)))
                  + 2 * self.effects.frameWidth())
        self.effects.setFixedHeight(height)

    def showEvent(self, event):  # noqa: N802 (Qt name)
        self._fit_effects()
        super().showEvent(event)

    def effect_sizes(self) -> dict:
        """Effect label -> size text as shown (for tests and copying)."""
        return {self.effects.item(r, 0).text(): self.effects.item(r, 1).text()
                for r in range(len(EFFECTS))}

    def place_text(self, key: str) -> tuple:
        return tuple(label.text() for label in self.place_values[key])

    # -- filling --------------------------------------------------------------------------
    def _set_effect(self, r: int, size: float) -> None:
        self.effects.item(r, 1).setText(size_text(size))
        bar = self.effects.item(r, 2)
        bar.setData(BAR_ROLE, bar_fraction(size))
        bar.setToolTip("" if not math.isfinite(size) else f"{size_text(size)}″")

    def _fill_places(self, row: dict) -> None:
        def radec(prefix):
            ra, dec = _number(row, f"ra_{prefix}"), _number(row, f"dec_{prefix}")
            return (f"RA {format_ra_hms(ra, 3)}" if np.isfinite(ra) else "",
                    f"Dec {format_dec_dms(dec, 2)}" if np.isfinite(dec) else "")

        def show(key, texts):
            for label, text in zip(self.place_values[key], texts):
                label.setText(text)

        show("propagated", radec("propagated"))
        ra_app, dec_app = radec("apparent")
        show("apparent", (ra_app.replace("RA ", "RA of date ", 1),
                          dec_app.replace("Dec ", "Dec of date ", 1)))
        show("cirs", radec("cirs"))
        ha, dec_obs = _number(row, "ha"), _number(row, "dec_observed")
        show("observed", (f"HA {format_hours(ha, 2)}" if np.isfinite(ha) else "no site",
                          f"Dec {format_dec_dms(dec_obs, 1)}" if np.isfinite(dec_obs) else ""))
        alt, az = _number(row, "alt"), _number(row, "az")
        show("horizon", (f"Alt {fixed(alt, 4, signed=True)}°" if np.isfinite(alt) else "",
                         f"Az {fixed(az, 4)}°" if np.isfinite(az) else ""))
        airmass, pa = _number(row, "airmass"), _number(row, "parallactic_angle")
        show("geometry", (f"airmass {airmass:.3f}" if np.isfinite(airmass)
                          else ("below the horizon" if np.isfinite(alt) else ""),
                          f"parallactic angle {fixed(pa, 2, signed=True)}°" if np.isfinite(pa) else ""))
        kind = str(row.get("instant_kind") or "")
        local = str(row.get("instant_label") or "")
        show("instant", (str(row.get("time") or ""),
                         f"{local}, {kind}" if local and kind else local))

    def _style_verdict(self) -> None:
        """Refusals in the theme's danger colour and bold (the words carry the meaning)."""
        refused = bool(self.verdict.property("refused"))
        colour = theme_colour("danger" if refused else "ok")
        weight = "bold" if refused else "normal"
        border = f"border: 2px solid {colour}; padding: 4px;" if refused else "padding: 4px;"
        self.verdict.setStyleSheet(f"QLabel#ledgerVerdict {{ color: {colour}; "
                                   f"font-weight: {weight}; {border} }}")
        self._fit_effects()
