"""The night settings bar above the tabs: date, darkness, altitude and airmass limits, and the
distance kept from the Moon. Each change becomes one undoable document change (consecutive
changes of the same field merge); changes from the document (undo, opening a file) refill the
controls without echoing back."""
from __future__ import annotations

import datetime as dt
from dataclasses import replace

from PySide6.QtCore import QDate, Qt, Signal
from PySide6.QtWidgets import (QCheckBox, QComboBox, QDoubleSpinBox, QFrame,
                               QHBoxLayout, QLabel)

from epochpoint.core.plan import DARKNESS_LEVELS
from epochpoint.io.planfile import NightSettings

from .date_field import DateField

# Spin-box values that stand for "no limit of this kind" (shown as words).
MIN_ALT_NONE = -6.0
AIRMASS_NONE = 1.0


class NightBar(QFrame):
    """Emits night_edited(NightSettings, field) after a user change."""

    night_edited = Signal(object, str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("nightBar")
        self.night = NightSettings(date=dt.date.today().isoformat())
        self.date = DateField()
        self.date.setToolTip("Local date of the evening the night starts")
        self.darkness = QComboBox()
        self.darkness.addItems(list(DARKNESS_LEVELS))
        self.darkness.setToolTip("How dark the sky must be: civil (Sun below -6°), nautical "
                                 "(-12°) or astronomical (-18°)")
        self.min_alt = self._spin(MIN_ALT_NONE, 89.0, 1, "°", "mount limit",
                                  "Lowest observed altitude (the mount's own limit always "
                                  "applies)")
        self.max_airmass = self._spin(AIRMASS_NONE, 40.0, 2, "", "none", "Highest airmass")
        self.max_airmass.setSingleStep(0.1)
        self.moon_sep = self._spin(0.0, 180.0, 0, "°", "none",
                                   "Smallest distance from the Moon while it is up")
        self.moon_scaled = QCheckBox("&scaled by illuminated fraction")
        self.moon_scaled.setToolTip("Multiply the Moon distance by the Moon's illuminated "
                                    "fraction (0 at new Moon, 1 at full; a thin crescent "
                                    "barely matters)")
        layout = QHBoxLayout(self)
        layout.setContentsMargins(8, 4, 8, 4)
        layout.setSpacing(6)
        title = QLabel("<b>Night</b>")
        layout.addWidget(title)
        for text, widget in (("&Date", self.date), ("Dar&kness", self.darkness),
                             ("Min &altitude", self.min_alt), ("Max air&mass", self.max_airmass),
                             ("Moon &distance", self.moon_sep)):
            label = QLabel(text)
            label.setProperty("role", "fieldLabel")
            label.setBuddy(widget)
            layout.addSpacing(6)
            layout.addWidget(label)
            layout.addWidget(widget)
        layout.addWidget(self.moon_scaled)
        layout.addStretch(1)
        self.date.dateChanged.connect(lambda d: self._edited("date", date=d.toString(
            Qt.DateFormat.ISODate)))
        self.darkness.currentTextChanged.connect(lambda t: self._edited("darkness", darkness=t))
        self.min_alt.valueChanged.connect(lambda v: self._edited(
            "min altitude", min_altitude=None if v <= MIN_ALT_NONE else v))
        self.max_airmass.valueChanged.connect(lambda v: self._edited(
            "max airmass", max_airmass=None if v <= AIRMASS_NONE else v))
        self.moon_sep.valueChanged.connect(lambda v: self._edited("Moon distance",
                                                                  moon_separation=v))
        self.moon_scaled.toggled.connect(lambda on: self._edited("Moon scaling",
                                                                 moon_scaled=on))

    def _spin(self, low, high, decimals, suffix, none_text, tip) -> QDoubleSpinBox:
        box = QDoubleSpinBox()
        box.setRange(low, high)
        box.setDecimals(decimals)
        box.setSuffix(suffix)
        box.setSpecialValueText(none_text)
        box.setToolTip(tip)
        box.setKeyboardTracking(False)  # one change when typing ends, not one per key
        return box

    def _edited(self, field: str, **changes) -> None:
        night = replace(self.night, **changes)
        if night != self.night:
            self.night = night
            self.night_edited.emit(night, field)

    def set_night(self, night: NightSettings) -> None:
        """Show `night` (from the document) without emitting night_edited."""
        self.night = night
        widgets = (self.date, self.darkness, self.min_alt, self.max_airmass, self.moon_sep,
                   self.moon_scaled)
        for w in widgets:
            w.blockSignals(True)
        self.date.setDate(QDate.fromString(night.date, Qt.DateFormat.ISODate))
        self.darkness.setCurrentText(night.darkness)
        self.min_alt.setValue(MIN_ALT_NONE if night.min_altitude is None else night.min_altitude)
        self.max_airmass.setValue(AIRMASS_NONE if night.max_airmass is None
                                  else night.max_airmass)
        self.moon_sep.setValue(night.moon_separation)
        self.moon_scaled.setChecked(night.moon_scaled)
        for w in widgets:
            w.blockSignals(False)
