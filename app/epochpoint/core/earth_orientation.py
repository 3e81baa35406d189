"""UT1-UTC, polar motion and leap seconds from the cached IERS tables (see iers_cache.py).

Interpolation is astropy's, step for step, so the numbers are the ones astropy gives from the
same tables (astropy.utils.iers.IERS._interpolate, IERS_Auto): linear between the daily
values, as TEMPO does for UT1-UTC, after removing a leap second's one-second jump from the
UT1-UTC difference; before the table's first day and after its last prediction the end
value is held. The tables are IERS Bulletin A (finals2000A) with the final IERS EOP 14 C04
values wherever they exist; their stated accuracy is ~0.1 ms in UT1 and ~0.1 mas in polar
motion for final values, growing to ~10 ms and ~10 mas after months of prediction (IERS
Bulletin A explanatory notes).

Leap seconds follow astropy's start-up check (astropy.time.update_leap_seconds with
astropy.utils.iers.LeapSeconds.auto_open): ERFA's built-in list is kept unless the
astropy-iers-data list expires later, in which case that list is merged into ERFA's
(erfa.leap_seconds.update), so ERFA's dat() and every astropy Time see the same TAI-UTC.
The list's URLs in astropy's download cache are not consulted: nothing here goes online.

When a program has chosen its own astropy Earth-orientation table
(astropy.utils.iers.earth_orientation_table.set(...)), that table is used instead.

Cost: the cache loads in about 1 ms at import; one interpolation is a few microseconds.
"""
from __future__ import annotations

import datetime as _dt
import functools
import importlib.abc
import sys
from dataclasses import dataclass

import erfa
import numpy as np

from .iers_cache import load_tables

MJD_ZERO = 2400000.5  # JD of MJD 0
# astropy picks a leap-second list that expires more than this many days from today
# (180 - astropy.utils.iers.conf.auto_max_age, which is None here, counted as 30).
_GOOD_ENOUGH_DAYS = 150
_IERS_MODULE = "astropy.utils.iers.iers"


@dataclass(frozen=True)
class EarthOrientationTable:
    """The daily table: MJD (UTC), UT1-UTC (s), polar motion (arcsec), predicted flags."""

    mjd: np.ndarray
    ut1_utc_s: np.ndarray
    pm_x_arcsec: np.ndarray
    pm_y_arcsec: np.ndarray
    ut1_predicted: np.ndarray

    @property
    def first_mjd(self) -> float:
        return float(self.mjd[0])

    @property
    def last_measured_mjd(self) -> float:
        """MJD of the last UT1-UTC that is measured rather than predicted."""
        measured = ~self.ut1_predicted
        return float(self.mjd[measured][-1] if measured.any() else self.mjd[0])

    @property
    def predictions_end_mjd(self) -> float:
        return float(self.mjd[-1])

    def interpolate(self, jd1, jd2, columns: tuple) -> list:
        """Each column interpolated at UTC two-part Julian dates (astropy's IERS._interpolate)."""
        jd1, jd2 = np.asarray(jd1, dtype=float), np.asarray(jd2, dtype=float)
        scalar = np.ndim(jd1 + jd2) == 0
        # Integer MJD and fraction of day, as astropy splits them.
        mjd = np.atleast_1d(np.floor(jd1 - MJD_ZERO + jd2))
        utc = np.atleast_1d(jd1 - (MJD_ZERO + mjd) + jd2)
        # The table day at or just below each instant, kept inside the table.
        i = np.searchsorted(self.mjd, mjd, side="right")
        i1 = np.clip(i, 1, len(self.mjd) - 1)
        i0 = i1 - 1
        mjd_0, mjd_1 = self.mjd[i0], self.mjd[i1]
        results = []
        for column in columns:
            values = getattr(self, column)
            val_0, val_1 = values[i0], values[i1]
            d_val = val_1 - val_0
            if column == "ut1_utc_s":
                # Remove a leap second's jump from the difference (it falls on the 2nd point).
                d_val -= d_val.round()
            val = val_0 + (mjd - mjd_0 + utc) / (mjd_1 - mjd_0) * d_val
            # Hold the end values outside the table, never extrapolate.
            val[i == 0] = values[0]
            val[i == len(self.mjd)] = values[-1]
            results.append(val[0] if scalar else val.reshape(np.shape(jd1 + jd2)))
        return results


@functools.lru_cache(maxsize=1)
def _cached() -> tuple[EarthOrientationTable, dict]:
    tables = load_tables()
    table = EarthOrientationTable(
        mjd=tables["mjd"], ut1_utc_s=tables["ut1_utc_s"], pm_x_arcsec=tables["pm_x_arcsec"],
        pm_y_arcsec=tables["pm_y_arcsec"], ut1_predicted=tables["ut1_flag"] == "P")
    return table, tables


def table() -> EarthOrientationTable:
    """The shipped Earth-orientation table (loaded from the cache once per process)."""
    return _cached()[0]


def astropy_table_chosen():
    """The astropy IERS table a program has chosen itself, or None (the shipped one is used)."""
    module = sys.modules.get(_IERS_MODULE)
    if module is None:
        return None
    return getattr(module.earth_orientation_table, "_value", None)


def ut1_utc_s(t):
    """UT1-UTC in seconds at the instants of astropy Time t, as astropy would interpolate."""
    chosen = astropy_table_chosen()
    utc = t.utc
    if chosen is not None:
        return chosen.ut1_utc(utc.jd1, utc.jd2).to_value("s")
    return table().interpolate(utc.jd1, utc.jd2, ("ut1_utc_s",))[0]


def polar_motion_rad(t) -> tuple:
    """Polar motion x_p, y_p (rad) at the instants of astropy Time t."""
    chosen = astropy_table_chosen()
    if chosen is not None:
        xp, yp = chosen.pm_xy(t)
        return xp.to_value("rad"), yp.to_value("rad")
    utc = t.utc
    xp, yp = table().interpolate(utc.jd1, utc.jd2, ("pm_x_arcsec", "pm_y_arcsec"))
    return xp * _arcsec_to_rad(), yp * _arcsec_to_rad()


def with_ut1_utc(t):
    """The UTC Time t with its UT1-UTC set from the table, so that astropy's `t.ut1` reads
    no IERS file (a value the caller set already is kept)."""
    utc = t.utc
    if not hasattr(utc, "_delta_ut1_utc"):
        utc.delta_ut1_utc = ut1_utc_s(utc)
    return utc


@functools.lru_cache(maxsize=1)
def _arcsec_to_rad() -> float:
    """astropy's own factor from arcseconds to radians, so converted values match it to the
    bit."""
    import astropy.units as u

    return u.arcsec.to(u.rad)


class _LeapSecondList:
    """A leap-second list as erfa.leap_seconds.update reads it: columns and an expiry."""

    def __init__(self, year, month, tai_utc, expires: _dt.datetime):
        self._array = np.rec.fromarrays([year, month, tai_utc],
                                        dtype=erfa.dt_eraLEAPSECOND)
        self.expires = expires

    def __array__(self, dtype=None, copy=None):
        return np.asarray(self._array)


def install_leap_seconds(today: _dt.datetime | None = None) -> bool:
    """Give ERFA the leap seconds astropy would at start-up, from the cache; then tell astropy
    its own check is done (it would import astropy.table and parse the list again).
    Returns True when the astropy-iers-data list was merged into ERFA's."""
    tables = _cached()[1]
    year, month, day = (int(x) for x in str(tables["leap_expires"]).split("-"))
    shipped = _LeapSecondList(tables["leap_year"], tables["leap_month"],
                              tables["leap_tai_utc"], _dt.datetime(year, month, day))
    # astropy counts from today's UTC date.
    today = today or _dt.datetime.combine(_dt.datetime.now(_dt.timezone.utc).date(), _dt.time())
    good_enough = today + _dt.timedelta(days=_GOOD_ENOUGH_DAYS)
    # astropy's order: ERFA's own list first, then the shipped one if it expires later.
    erfa_expires = erfa.leap_seconds.expires
    merged = erfa_expires <= good_enough and shipped.expires > erfa_expires
    if merged:
        erfa.leap_seconds.update(shipped)
    _mark_astropy_leap_second_check_done()
    return merged


def _mark_astropy_leap_second_check_done() -> None:
    """astropy.time checks the leap seconds once, at the first UTC conversion; that check is
    what was done here. An astropy without these names keeps its own check (slower, same)."""
    from astropy.time import core as time_core

    check = getattr(time_core, "_LeapSecondsCheck", None)
    if check is not None and hasattr(time_core, "_LEAP_SECONDS_CHECK"):
        time_core._LEAP_SECONDS_CHECK = check.DONE


def _offline(iers_module) -> None:
    """astropy's IERS settings for offline use: never download, never refuse an old table,
    never fail outside the table (the staleness warning here says it in our words)."""
    iers_module.conf.auto_download = False
    iers_module.conf.auto_max_age = None
    iers_module.conf.iers_degraded_accuracy = "ignore"


class _OfflineOnImport(importlib.abc.MetaPathFinder):
    """Applies `_offline` the moment astropy's IERS module is imported, by anyone. It is not
    imported here: it brings astropy.table with it (about 0.1 s)."""

    def find_spec(self, fullname, path, target=None):
        if fullname != _IERS_MODULE:
            return None
        for finder in sys.meta_path:
            find = getattr(finder, "find_spec", None)
            if finder is self or find is None:
                continue
            spec = find(fullname, path, target)
            if spec is not None and spec.loader is not None:
                break
        else:
            return None
        run_module = spec.loader.exec_module

        def exec_module(module):
            run_module(module)
            _offline(module)
            if self in sys.meta_path:  # its work is done
                sys.meta_path.remove(self)

        spec.loader.exec_module = exec_module
        return spec


def keep_astropy_offline() -> None:
    """Set astropy's IERS module offline now if it is loaded, else as soon as it is."""
    module = sys.modules.get(_IERS_MODULE)
    if module is not None and hasattr(module, "conf"):
        _offline(module)
    elif not any(isinstance(f, _OfflineOnImport) for f in sys.meta_path):
        sys.meta_path.insert(0, _OfflineOnImport())
