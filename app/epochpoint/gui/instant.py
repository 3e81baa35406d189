"""The shown instant: the one moment the target table, the pointing verdicts and the correction
ledger refer to, said in the site's local time with its zone's abbreviation.

    instant_label(iso, zone_name) -> '01:40 -03'
    InstantBar                   the line that names the instant, with a button back to now

The instant itself is chosen by the main window and resolved in a worker
(gui.recompute.shown_instant): the present on the night that holds it, otherwise the middle of
the chosen night, or wherever the user clicked the night chart or the timeline.
"""
from __future__ import annotations

import datetime as dt

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QFrame, QHBoxLayout, QLabel, QPushButton

from epochpoint.core.zones import zone_or_utc

HINT = "click the night chart or a block to move it"


def utc_datetime(iso: str) -> dt.datetime | None:
    """An aware UTC datetime from ISO 8601 text with a Z (None for a leap second or bad text)."""
    try:
        return dt.datetime.fromisoformat(iso.replace("Z", "+00:00")).astimezone(dt.timezone.utc)
    except (ValueError, AttributeError):
        return None


def local_datetime(iso: str, zone_name: str | None) -> dt.datetime | None:
    instant = utc_datetime(iso)
    return None if instant is None else instant.astimezone(zone_or_utc(zone_name or "UTC"))


def instant_label(iso: str, zone_name: str | None) -> str:
    """'01:40 -03': local hours and minutes with the zone's abbreviation (or offset)."""
    local = local_datetime(iso, zone_name)
    if local is None:
        return iso
    return f"{local:%H:%M} {local.tzname()}"


class InstantBar(QFrame):
    """'Shown instant: 2027-01-20 01:40 -03 (04:40 UTC), middle of the night' and a button
    that returns to the present; emits back_to_now."""

    back_to_now = Signal()

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("instantBar")
        self.label = QLabel("Shown instant: …")
        self.label.setToolTip("The instant of the target table's altitude, pointing and drift "
                              f"columns and of the correction ledger; {HINT}")
        self.now_button = QPushButton("Back to now")
        self.now_button.setToolTip("Show the present instant (and tonight's night if another "
                                   "night is shown)  (Ctrl+Shift+P)")
        self.now_button.clicked.connect(self.back_to_now)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(8, 0, 8, 2)
        layout.addWidget(self.label, 1)
        layout.addWidget(self.now_button)

    def show_instant(self, iso: str, kind: str, zone_name: str | None) -> None:
        local, instant = local_datetime(iso, zone_name), utc_datetime(iso)
        if local is None or instant is None:
            when = iso
        else:
            when = f"{local:%Y-%m-%d %H:%M} {local.tzname()} ({instant:%H:%M} UTC)"
        self.label.setText(f"<b>Shown instant:</b> {when}, {kind} — {HINT}")
        self.now_button.setEnabled(kind != "now")

    def text(self) -> str:
        return self.label.text()
