"""The Site & limits tab: the observing site, its weather, the mount's limits, Sun avoidance,
the solar option (solar_option.py) and the horizon mask, as one form.

Every finished edit (Enter, leaving a field, a table cell or a choice) is checked by building
the core objects themselves (MountLimits, HorizonMask, Interlocks, Site), so the rules live in
one place. Their messages appear next to the field at fault; the site in force stays as it was
and nothing is sent. A valid edit sends the new Site (site_edited). Numbers are typed in plain
fields rather than spin boxes so an out-of-range value is shown with the reason, not silently
clamped.
"""
from __future__ import annotations

from zoneinfo import available_timezones

import numpy as np
from PySide6.QtCore import Signal
from PySide6.QtWidgets import (QComboBox, QGridLayout, QGroupBox, QHBoxLayout, QLabel, QLineEdit,
                               QScrollArea, QVBoxLayout, QWidget)

from ...core.limits import (MOUNT_TYPE_NAMES, MOUNT_TYPES, HorizonMask, Interlocks, LimitError,
                             MountLimits)
from ...core.site import Site, SiteError
from .horizon_editor import HorizonCellError, HorizonEditor
from .site_files import SiteFiles
from .solar_option import SolarOption
from .theme_link import theme_chart_style, theme_colour, watch_theme

SUN_AVOIDANCE_WARN_DEG = 30.0

# key, label, tooltip; the key is the core's field name (Site, MountLimits or Interlocks).
PLACE_FIELDS = (
    ("name", "Name", "Free text"),
    ("latitude", "Latitude (°)", "Geodetic (WGS84), north positive"),
    ("longitude", "Longitude (°)", "East positive"),
    ("height", "Height (m)", "Above the WGS84 ellipsoid"),
)
WEATHER_FIELDS = (
    ("pressure", "Pressure (hPa)", "Empty: standard atmosphere at the site's height; "
     "0 turns refraction off"),
    ("temperature", "Temperature (°C)", ""),
    ("humidity", "Humidity (0–1)", "Relative humidity as a fraction"),
    ("wavelength", "Wavelength (µm)", "Effective wavelength of the observation"),
)
MOUNT_FIELDS = (
    ("min_altitude", "Minimum altitude (°)", "Lowest observed altitude the telescope may "
     "point at"),
    ("ha_east", "Hour angle east (h)", "How far east of the meridian it may point"),
    ("ha_west", "Hour angle west (h)", "How far west of the meridian it may point"),
    ("dec_min", "Declination min (°)", ""),
    ("dec_max", "Declination max (°)", ""),
    ("meridian_limit", "Meridian limit (°)", "German equatorial mounts: how far past the "
     "meridian, in ° of hour angle, it may track before it must flip"),
    ("slew_rate", "Slew rate (°/s)", "Per axis"),
    ("settle", "Settle time (s)", "After each slew"),
)
SAFETY_FIELDS = (
    ("sun_avoidance", "Sun avoidance radius (°)", "Never point closer to the Sun than this"),
)
NUMBER_FIELDS = tuple(k for k, _, _ in PLACE_FIELDS[1:] + WEATHER_FIELDS + MOUNT_FIELDS
                      + SAFETY_FIELDS)


class FieldProblem(ValueError):
    """A value the form cannot turn into a number, naming its field."""

    def __init__(self, field: str, message: str):
        super().__init__(f"{field}: {message}")
        self.field, self.message = field, message


def _text_of(value) -> str:
    return "" if value is None else str(float(value))


def _parse_number(field: str, text: str, optional: bool = False):
    text = text.strip()
    if not text:
        if optional:
            return None
        raise FieldProblem(field, "a number is needed")
    try:
        return float(text)
    except ValueError:
        raise FieldProblem(field, f"{text!r} is not a number") from None


def _core_message(error: Exception) -> str:
    """The core's message without its 'site field:' / 'field:' prefix (shown by the field)."""
    text = str(error)
    field = getattr(error, "field", "")
    for prefix in (f"site {field}: ", f"{field}: "):
        if text.startswith(prefix):
            return text[len(prefix):]
    return text


class SiteEditor(SiteFiles, QWidget):
    """Form for a Site; emits site_edited(Site) after each valid user edit. Site and horizon
    files load and save through SiteFiles (site_files.py)."""

    site_edited = Signal(object)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.site: Site | None = None
        self.fields: dict = {}
        self.errors: dict = {}
        self._filling = False
        self.problems: dict = {}
        # The mount's park position has no field: kept from the site last shown.
        self.park: tuple = (None, None)

        inner = QWidget()
        rows = QVBoxLayout(inner)
        columns = QHBoxLayout()
        left, right = QVBoxLayout(), QVBoxLayout()
        columns.addLayout(left, 1)
        columns.addLayout(right, 1)
        rows.addLayout(columns)
        left.addWidget(self._group("Place", PLACE_FIELDS, extra=self._timezone_row))
        left.addWidget(self._group("Weather", WEATHER_FIELDS))
        left.addStretch(1)
        right.addWidget(self._group("Mount limits", MOUNT_FIELDS, extra=self._mount_type_row,
                                    extra_first=True))
        right.addWidget(self._group("Safety", SAFETY_FIELDS, extra=self._safety_rows))
        right.addStretch(1)
        self.horizon = HorizonEditor()
        self.horizon.edited.connect(self.commit)
        self.errors["horizon"] = self.horizon.error
        rows.addWidget(self.horizon, 1)
        rows.insertLayout(0, self._file_row())

        self.status = QLabel("")
        self.status.setWordWrap(True)
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setWidget(inner)
        layout = QVBoxLayout(self)
        layout.addWidget(scroll, 1)
        layout.addWidget(self.status)
        watch_theme(self, self._restyle)
        self.setEnabled(False)

    # -- building the form ----------------------------------------------------------------
    def _group(self, title, specs, extra=None, extra_first=False) -> QGroupBox:
        box = QGroupBox(title)
        grid = QGridLayout(box)
        grid.setColumnStretch(2, 1)
        row = 0
        if extra is not None and extra_first:
            row = extra(grid, row)
        for key, label, tip in specs:
            edit = QLineEdit()
            edit.setToolTip(tip)
            edit.setMaximumWidth(180)
            edit.editingFinished.connect(self.commit)
            self._add_row(grid, row, key, label, edit)
            row += 1
        if extra is not None and not extra_first:
            extra(grid, row)
        return box

    def _add_row(self, grid: QGridLayout, row: int, key: str, label: str, widget) -> None:
        caption = QLabel(label)
        caption.setBuddy(widget)
        error = QLabel("")
        error.setWordWrap(True)
        error.setObjectName("fieldError")
        grid.addWidget(caption, row, 0)
        grid.addWidget(widget, row, 1)
        grid.addWidget(error, row, 2)
        self.fields[key] = widget
        self.errors[key] = error

    def _timezone_row(self, grid: QGridLayout, row: int) -> int:
        combo = QComboBox()
        combo.setEditable(True)
        combo.addItems(sorted(available_timezones()))
        combo.setInsertPolicy(QComboBox.InsertPolicy.NoInsert)
        combo.setToolTip("IANA time zone name for local times (e.g. America/Santiago); leave "
                         "empty to take the zone of the coordinates")
        combo.setMaximumWidth(260)
        combo.lineEdit().editingFinished.connect(self.commit)
        combo.activated.connect(lambda _: self.commit())
        self._add_row(grid, row, "timezone", "Time zone", combo)
        return row + 1

    def _mount_type_row(self, grid: QGridLayout, row: int) -> int:
        combo = QComboBox()
        for key in MOUNT_TYPES:
            combo.addItem(MOUNT_TYPE_NAMES.get(key, key), key)
        combo.activated.connect(lambda _: self.commit())
        self._add_row(grid, row, "mount_type", "Mount type", combo)
        return row + 1

    def _safety_rows(self, grid: QGridLayout, row: int) -> int:
        """The Sun-avoidance warning, then the solar option (asks before it goes on)."""
        self.sun_warning = QLabel("")
        self.sun_warning.setObjectName("sunWarning")
        self.sun_warning.setWordWrap(True)
        self.sun_warning.setVisible(False)
        grid.addWidget(self.sun_warning, row, 0, 1, 3)
        self.solar_option = SolarOption()
        self.solar_option.changed.connect(self.commit)
        grid.addWidget(self.solar_option, row + 1, 0, 1, 3)
        return row + 2

    # -- the contract -----------------------------------------------------------------------
    def set_site(self, site: Site | None) -> None:
        """Fill the form from a site; sends nothing."""
        self.site = site
        self.setEnabled(site is not None)
        if site is None:
            return
        self._filling = True
        mount, locks = site.interlocks.mount, site.interlocks
        self.fields["name"].setText(site.name)
        for key in ("latitude", "longitude", "height", "pressure", "temperature", "humidity",
                    "wavelength"):
            self.fields[key].setText(_text_of(getattr(site, key)))
        # A zone found from the coordinates shows empty, so it follows them when they change.
        zone = self.fields["timezone"]
        zone.setCurrentText("" if site.timezone_from_coordinates else site.timezone)
        zone.lineEdit().setPlaceholderText(f"from the coordinates ({site.timezone})"
                                           if site.timezone_from_coordinates else "")
        self.park = (mount.park_ha, mount.park_dec)
        combo = self.fields["mount_type"]
        combo.setCurrentIndex(combo.findData(mount.mount_type))
        for key, _, _ in MOUNT_FIELDS:
            self.fields[key].setText(_text_of(getattr(mount, key)))
        self.fields["sun_avoidance"].setText(_text_of(locks.sun_avoidance))
        self.solar_option.set_on(locks.solar_filter_fitted)
        self.horizon.set_mask(locks.horizon)
        self._filling = False
        self._show_problems({})
        self._show_sun_warning(locks.sun_avoidance)
        self.horizon.draw(locks.horizon, mount.min_altitude)
        self.status.setText("")

    # -- validating and sending ---------------------------------------------------------------
    def commit(self) -> None:
        """Check the whole form; send the new Site if it is valid and differs from the old."""
        if self._filling or self.site is None:
            return
        site, problems, mask = self.build_site()
        self._show_problems(problems)
        radius = self.fields["sun_avoidance"].text()
        if _is_number(radius):
            self._show_sun_warning(float(radius))
        if mask is not False:
            self.horizon.draw(mask, self._safe_min_altitude())
        if problems:
            unplaced = [f"{k}: {m}" for k, m in problems.items() if k not in self.errors]
            self.status.setText("Not applied: fix the fields marked ✖ (the site in force is "
                                "unchanged). " + "; ".join(unplaced))
            return
        if site.interlocks.horizon is not None:
            self.horizon.set_mask(site.interlocks.horizon)  # shown in azimuth order
        if site == self.site:
            self.status.setText("")
            return
        self.site = site
        self.status.setText("Applied.")
        self.site_edited.emit(site)

    def build_site(self):
        """(Site or None, {field: message}, horizon mask or None or False if unreadable)."""
        problems: dict = {}
        values: dict = {}
        for key in NUMBER_FIELDS:
            try:
                values[key] = _parse_number(key, self.fields[key].text(),
                                            optional=(key == "pressure"))
            except FieldProblem as p:
                problems[p.field] = p.message
        mount = self._try(problems, lambda: MountLimits(
            mount_type=self.fields["mount_type"].currentData(), park_ha=self.park[0],
            park_dec=self.park[1], **{k: values[k] for k, _, _ in MOUNT_FIELDS}),
            needs=[k for k, _, _ in MOUNT_FIELDS])
        mask = False
        try:
            points = self.horizon.points()
            if points:
                points.sort()
                mask = HorizonMask(np.array([p[0] for p in points]),
                                   np.array([p[1] for p in points]))
            else:
                mask = None
        except HorizonCellError as error:
            problems["horizon"] = str(error)
        except LimitError as error:
            problems["horizon"] = _core_message(error)
        interlocks = self._try(problems, lambda: Interlocks(
            mount=mount or MountLimits(), horizon=mask if mask is not False else None,
            sun_avoidance=values["sun_avoidance"],
            solar_filter_fitted=self.solar_option.is_on()), needs=["sun_avoidance"])
        # An empty zone is found from the coordinates; the core checks a named one.
        zone = self.fields["timezone"].currentText().strip() or None
        site_keys = [k for k, _, _ in PLACE_FIELDS[1:] + WEATHER_FIELDS]
        site = self._try(problems, lambda: Site(
            name=self.fields["name"].text().strip(), timezone=zone,
            interlocks=interlocks or Interlocks(),
            **{k: values[k] for k in site_keys}), needs=site_keys)
        if problems:
            return None, problems, mask
        return site, problems, mask

    @staticmethod
    def _try(problems: dict, make, needs):
        """make() unless a field it needs is already unreadable; core errors go to problems."""
        if any(k in problems for k in needs):
            return None
        try:
            return make()
        except (SiteError, LimitError) as error:
            problems[error.field] = _core_message(error)
            return None

    def _safe_min_altitude(self):
        try:
            return float(self.fields["min_altitude"].text())
        except ValueError:
            return None

    # -- showing -------------------------------------------------------------------------------
    def _show_problems(self, problems: dict) -> None:
        for key, label in self.errors.items():
            message = problems.get(key, "")
            label.setText(f"✖ {message}" if message else "")
            label.setToolTip(message)
        self.problems = dict(problems)

    def _show_sun_warning(self, radius_deg: float) -> None:
        if radius_deg <= 0.0:
            text = ("⚠ Sun avoidance is OFF: nothing stops the telescope from pointing at the "
                    "Sun. Point near the Sun only with a proper solar filter.")
        elif radius_deg < SUN_AVOIDANCE_WARN_DEG:
            text = (f"⚠ Sun avoidance {radius_deg:g}° is below {SUN_AVOIDANCE_WARN_DEG:g}°: "
                    "the telescope may point close to the Sun. Keep a solar filter on when it "
                    "does.")
        else:
            text = ""
        self.sun_warning.setText(text)
        self.sun_warning.setVisible(bool(text))

    def _restyle(self) -> None:
        """Theme colours for the error and warning text (their symbols carry the meaning)."""
        danger, warning = theme_colour("danger"), theme_colour("warning")
        self.setStyleSheet(f"QLabel#fieldError {{ color: {danger}; }} "
                           f"QLabel#sunWarning, QLabel#solarNote {{ color: {warning}; "
                           f"font-weight: bold; "
                           f"border: 2px solid {warning}; padding: 4px; }}")
        self.horizon.canvas.style = theme_chart_style()
        if self.site is not None:
            locks = self.site.interlocks
            self.horizon.draw(locks.horizon, locks.mount.min_altitude)


def _is_number(text: str) -> bool:
    try:
        float(text)
        return True
    except ValueError:
        return False
