"""The status line's clocks, updated every second: UTC, the site's local civil time, the local
apparent sidereal time and the age of the Earth-orientation table.

The sidereal time is the core's (core.context.make_context: Greenwich apparent sidereal time,
IAU 2006/2000A via ERFA gst06a, plus the site's east longitude), printed as the command line
prints it (io.angles.sidereal_time_text); one context per second costs about 1.5 ms. The
table age is counted from its last measured value; past core.timescale.STALE_AFTER_DAYS it is
shown in the warning style.
"""
from __future__ import annotations

import datetime as dt
import math
import warnings

from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QHBoxLayout, QLabel, QWidget

from epochpoint.charts.plan_clock import site_zone
from epochpoint.core.context import make_context
from epochpoint.core.site import Site
from epochpoint.core.timescale import STALE_AFTER_DAYS, earth_orientation_status, parse_time
from epochpoint.io.angles import sidereal_time_text

TICK_MS = 1000
HOURS_PER_RADIAN = 12.0 / math.pi


class StatusClocks(QWidget):
    """Four labels in the status bar; `set_site` changes the site the clocks refer to."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(2)
        self.utc, self.local, self.sidereal, self.table_age = (QLabel() for _ in range(4))
        for label in (self.utc, self.local, self.sidereal, self.table_age):
            label.setProperty("role", "status")
            layout.addWidget(label)
        self.utc.setToolTip("Coordinated Universal Time")
        self.local.setToolTip("Civil time at the site (its IANA time zone)")
        self.sidereal.setToolTip("Local apparent sidereal time at the site")
        self.site: Site | None = None
        self.stale = False
        self.timer = QTimer(self)
        self.timer.setInterval(TICK_MS)
        self.timer.timeout.connect(self.refresh)
        self.timer.start()

    def set_site(self, site: Site) -> None:
        self.site = site
        self.refresh()

    def refresh(self, now: dt.datetime | None = None) -> None:
        now = now or dt.datetime.now(dt.timezone.utc)
        self.utc.setText(f"UTC {now:%H:%M:%S}")
        if self.site is None:
            return
        local = now.astimezone(site_zone(self.site.timezone))
        self.local.setText(f"Local {local:%H:%M:%S} {local.tzname()}")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # staleness is shown by the table-age label
            ctx = make_context(parse_time(now), self.site)
        self.sidereal.setText(sidereal_time_text(ctx.site.last_rad * HOURS_PER_RADIAN))
        self._show_table_age()

    def _show_table_age(self) -> None:
        status = earth_orientation_status()
        stale = status.age_days > STALE_AFTER_DAYS
        self.table_age.setText(f"Earth orientation: {status.age_days:.0f} d old"
                               + (" - STALE" if stale else ""))
        self.table_age.setToolTip(
            f"IERS table (astropy-iers-data): last measured value {status.last_measured[:10]}, "
            f"predictions to {status.predictions_end[:10]}."
            + (f" Older than {STALE_AFTER_DAYS:.0f} days: pointing may be off by 0.1-1″;"
               " update astropy-iers-data." if stale else ""))
        if stale != self.stale or self.table_age.property("stale") is None:
            self.stale = stale
            self.table_age.setProperty("stale", "true" if stale else "false")
            self.table_age.style().unpolish(self.table_age)
            self.table_age.style().polish(self.table_age)
