"""The Earth-orientation and leap-second tables of astropy-iers-data, kept as a binary cache.

astropy parses the IERS text tables shipped by astropy-iers-data (Bulletin A `finals2000A.all`
with the IERS EOP 14 C04 series `eopc04.1962-now` substituted where it has final values, as
astropy's `IERS_Auto` combines them; the IERS Bulletin C list `Leap_Second.dat`) in about
1.2 s. Here they are parsed by astropy once, and the resulting columns saved as one
uncompressed `.npz` file that loads in about a millisecond:

    mjd, ut1_utc_s, pm_x_arcsec, pm_y_arcsec   the combined daily table, as astropy holds it
    ut1_flag                                   'B' final, 'I' Bulletin A measured, 'P' predicted
    leap_year, leap_month, leap_tai_utc        the leap-second list (TAI-UTC from that month)
    leap_expires                               the list's expiry date, 'YYYY-MM-DD'

The file lives in the user's cache folder (`platformdirs.user_cache_dir("epochpoint")`, or
$EPOCHPOINT_CACHE_DIR when set), named after a hash of its source key: the cache format, the
astropy and astropy-iers-data versions and each source file's path, size and modification
time. A changed or upgraded table gives a new key and the cache is rebuilt on its next use; a
cache file that cannot be read is rebuilt, never fatal; a cache folder that cannot be written
leaves the table in memory for this process only. Nothing is ever downloaded.
"""
from __future__ import annotations

import contextlib
import io
import os
import zlib
from pathlib import Path

import numpy as np

# Bump when the saved columns or their meaning change: old caches are then rebuilt.
CACHE_FORMAT = 1
CACHE_DIR_VARIABLE = "EPOCHPOINT_CACHE_DIR"
CACHE_PREFIX = "earth-orientation-"
COLUMNS = ("mjd", "ut1_utc_s", "pm_x_arcsec", "pm_y_arcsec", "ut1_flag",
           "leap_year", "leap_month", "leap_tai_utc", "leap_expires")


def cache_dir() -> Path:
    """The folder holding the cache: $EPOCHPOINT_CACHE_DIR, else the user's cache folder."""
    override = os.environ.get(CACHE_DIR_VARIABLE, "").strip()
    if override:
        return Path(override)
    import platformdirs

    return Path(platformdirs.user_cache_dir("epochpoint", appauthor=False))


def source_files() -> tuple[str, ...]:
    """The astropy-iers-data files the tables are read from."""
    import astropy_iers_data as data

    return (data.IERS_A_FILE, data.IERS_A_README, data.IERS_B_FILE, data.IERS_B_README,
            data.IERS_LEAP_SECOND_FILE)


def source_key() -> str:
    """What the cache was built from: versions, and each source file's size and mtime."""
    import astropy
    import astropy_iers_data

    lines = [f"cache format {CACHE_FORMAT}", f"astropy {astropy.__version__}",
             f"astropy-iers-data {astropy_iers_data.__version__}"]
    for path in source_files():
        stat = os.stat(path)
        lines.append(f"{path} {stat.st_size} {stat.st_mtime_ns}")
    return "\n".join(lines)


def cache_path(key: str) -> Path:
    """The cache file for a source key."""
    # A short name (the key itself is stored inside and compared on every read).
    digest = zlib.crc32(key.encode("utf-8"))
    return cache_dir() / f"{CACHE_PREFIX}{digest:08x}.npz"


def load_tables() -> dict:
    """The cached columns (see the module docstring), built from the tables on first use."""
    key = source_key()
    path = cache_path(key)
    tables = read_cache(path, key)
    if tables is None:
        tables = parse_tables()
        save_npz_cache(path, key, tables, CACHE_PREFIX)
    return tables


def read_cache(path: Path, key: str) -> dict | None:
    """The columns saved at `path` when it holds every column for `key`, else None."""
    try:
        with np.load(path, allow_pickle=False) as saved:
            if str(saved["key"]) != key:
                return None
            return {name: saved[name] for name in COLUMNS}
    except Exception:  # missing, truncated, corrupt or foreign: rebuilt by the caller
        return None


def parse_tables() -> dict:
    """Parse the astropy-iers-data tables with astropy (about 1.2 s) into plain columns."""
    import astropy_iers_data
    from astropy.utils import iers

    # The combined table astropy uses by default (IERS_Auto: Bulletin A with C04 finals).
    table = iers.IERS_Auto.open()
    leap = iers.LeapSeconds.open(astropy_iers_data.IERS_LEAP_SECOND_FILE)
    return {
        "mjd": np.asarray(table["MJD"].to_value("d"), dtype=float),
        "ut1_utc_s": np.asarray(table["UT1_UTC"].to_value("s"), dtype=float),
        "pm_x_arcsec": np.asarray(table["PM_x"].to_value("arcsec"), dtype=float),
        "pm_y_arcsec": np.asarray(table["PM_y"].to_value("arcsec"), dtype=float),
        "ut1_flag": np.asarray(table["UT1Flag"], dtype="U1"),
        "leap_year": np.asarray(leap["year"], dtype=np.int64),
        "leap_month": np.asarray(leap["month"], dtype=np.int64),
        "leap_tai_utc": np.asarray(leap["tai_utc"], dtype=float),
        "leap_expires": np.asarray(leap.expires.isot[:10], dtype="U10"),
    }


def save_npz_cache(path: Path, key: str, tables: dict, prefix: str) -> None:
    """Write a cache of named arrays (with its key) atomically, then remove older caches of the
    same prefix in its folder; a folder that cannot be written is not an error."""
    from ..io.atomic import atomic_write_bytes

    buffer = io.BytesIO()
    np.savez(buffer, key=np.asarray(key), **tables)
    with contextlib.suppress(OSError, ValueError):
        path.parent.mkdir(parents=True, exist_ok=True)
        atomic_write_bytes(path, buffer.getvalue())
        # Caches of older tables are never read again.
        for old in path.parent.glob(f"{prefix}*.npz"):
            if old != path:
                old.unlink(missing_ok=True)
