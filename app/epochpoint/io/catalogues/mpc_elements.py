"""Orbital elements in the IAU Minor Planet Center's one-line formats, read into Targets.

Source: the Minor Planet Center's published column layouts (an open standard of the trade),
"Export Format for Minor-Planet Orbits" (the MPCORB file) and "Export Format for Comet
Orbits" (the comet elements file); columns below are 1-based and inclusive, as there:

Minor planets: 1-7 designation (packed), 9-13 H, 15-19 G, 21-25 epoch (packed, 0h TT),
27-35 mean anomaly, 38-46 argument of perihelion, 49-57 ascending node, 60-68 inclination
(degrees, ecliptic and equinox J2000), 71-79 eccentricity, 81-91 mean daily motion (deg/day,
not used: it follows from a), 93-103 semimajor axis (au), 167-194 readable designation.

Comets: 1-4 periodic number, 5 orbit type, 6-12 provisional designation (packed), 15-18, 20-21,
23-29 year, month and day (with fraction, TT) of perihelion, 31-39 perihelion distance (au),
42-49 eccentricity, 52-59 argument of perihelion, 62-69 ascending node, 72-79 inclination
(degrees, J2000), 82-85, 86-87, 88-89 year, month, day of the osculation epoch, 92-95 absolute
magnitude, 97-100 slope parameter n, 103-158 designation and name. The total magnitude is
m = H + 5 log10(Delta) + 2.5 n log10(r), so the slope column gives comet_k1 = 2.5 n (from
memory of the format's description).

Packed epoch (5 characters): a century letter (I = 1800, J = 1900, K = 2000), two digits of
the year, then month and day each as one character 1-9, A = 10, B = 11, ... V = 31.

Header lines (the MPCORB file's preamble down to its line of dashes), blank lines and lines
starting with '#' are skipped. A line is a minor planet or a comet by its layout; a field that
cannot be read is an InputError naming the file, line and column range (with skip_bad_rows,
that line is reported and left out, as a bad row of a target list is). The result is the
target-file vocabulary of element columns (io/bodyfields.py) in Targets.extra, with
placeholder RA/Dec, so the same engine computes them (core/bodies/).
"""
from __future__ import annotations

import re

import numpy as np

from ..errors import InputError, quote

# (extra column, first, last column, description) of each format's numeric fields.
ASTEROID_FIELDS = (("abs_magnitude", 9, 13, "H"), ("slope", 15, 19, "G"),
                   ("mean_anomaly", 27, 35, "mean anomaly"),
                   ("argument_of_perihelion", 38, 46, "argument of perihelion"),
                   ("ascending_node", 49, 57, "ascending node"),
                   ("inclination", 60, 68, "inclination"),
                   ("eccentricity", 71, 79, "eccentricity"),
                   ("semimajor_axis", 93, 103, "semimajor axis"))
ASTEROID_OPTIONAL = ("abs_magnitude", "slope")
COMET_FIELDS = (("perihelion_distance", 31, 39, "perihelion distance"),
                ("eccentricity", 42, 49, "eccentricity"),
                ("argument_of_perihelion", 52, 59, "argument of perihelion"),
                ("ascending_node", 62, 69, "ascending node"),
                ("inclination", 72, 79, "inclination"),
                ("comet_m1", 92, 95, "absolute magnitude"),
                ("comet_slope_n", 97, 100, "slope parameter"))
COMET_OPTIONAL = ("comet_m1", "comet_slope_n")
# Where each element sits on its line, for the messages ("27-35").
_COLUMN_RANGES = {key: f"{a}-{b}" for key, a, b, _ in ASTEROID_FIELDS + COMET_FIELDS}
ELEMENT_COLUMNS = ("semimajor_axis", "perihelion_distance", "eccentricity", "inclination",
                   "ascending_node", "argument_of_perihelion", "mean_anomaly", "orbit_epoch",
                   "perihelion_time", "abs_magnitude", "slope", "comet_m1", "comet_k1")
_PACKED_DIGITS = "123456789ABCDEFGHIJKLMNOPQRSTUV"  # 1 .. 31
_CENTURIES = {"I": 1800, "J": 1900, "K": 2000}
# Layout tests: blanks where the formats put them (fields are then read one by one).
_ASTEROID_LINE = re.compile(r"^\S.{6} .{5} .{5} \S{5} .{9}  .{9}  .{9}  ")
_COMET_LINE = re.compile(r"^.{14}\d{4} \d\d [ \d]\d\.")


def is_mpc_line(line: str) -> bool:
    """Whether a line has the layout of an MPC minor-planet or comet elements line."""
    return bool(_ASTEROID_LINE.match(line) or _COMET_LINE.match(line))


def looks_like_mpc(data: bytes) -> bool:
    """Whether a file's first data line (after any MPCORB preamble) is an elements line."""
    text = data[:65536].decode("utf-8", "replace").lstrip("\ufeff")
    lines = text.splitlines()
    if any(line.startswith("-----") for line in lines):
        lines = lines[next(i for i, line in enumerate(lines) if line.startswith("-----")) + 1:]
    for line in lines:
        if line.strip() and not line.lstrip().startswith("#"):
            return is_mpc_line(line)
    return False


def _field(path, number: int, line: str, first: int, last: int, what: str,
           optional: bool = False) -> float:
    """The number in columns first..last (1-based, inclusive); NaN when optional and blank."""
    text = line[first - 1:last].strip()
    if not text and optional:
        return np.nan
    try:
        value = float(text)
    except ValueError:
        value = np.nan
    if not np.isfinite(value):
        shown = quote(text) if text else "nothing"
        raise InputError(path, f"{shown} is not a number ({what})", line=number,
                         column=f"{first}-{last}") from None
    return value


def _calendar_jd(path, number, year: int, month: int, day: float, where: str) -> float:
    """Julian date (TT) of a calendar date with fractional day (ERFA cal2jd, IAU SOFA)."""
    import erfa

    try:
        jd1, jd2 = erfa.cal2jd(year, month, int(np.floor(day)))
    except (ValueError, erfa.ErfaError):
        raise InputError(path, f"{year:04d}-{month:02d}-{day:g} is not a date", line=number,
                         column=where) from None
    return float(jd1 + jd2 + (day - np.floor(day)))


def unpack_epoch(path, number: int, packed: str) -> float:
    """TT Julian date (0h) of an MPC packed epoch such as 'K2555' (2025-05-05)."""
    packed = packed.strip()
    if (len(packed) != 5 or packed[0] not in _CENTURIES or not packed[1:3].isdigit()
            or packed[3] not in _PACKED_DIGITS[:12] or packed[4] not in _PACKED_DIGITS):
        raise InputError(path, f"{quote(packed)} is not a packed epoch (e.g. K2555)",
                         line=number, column="21-25")
    year = _CENTURIES[packed[0]] + int(packed[1:3])
    return _calendar_jd(path, number, year, _PACKED_DIGITS.index(packed[3]) + 1,
                        float(_PACKED_DIGITS.index(packed[4]) + 1), "21-25")


def _asteroid(path, number: int, line: str) -> tuple[str, dict]:
    row = {name: _field(path, number, line, a, b, what, name in ASTEROID_OPTIONAL)
           for name, a, b, what in ASTEROID_FIELDS}
    row["orbit_epoch"] = unpack_epoch(path, number, line[20:25])
    name = line[166:194].strip() or line[0:7].strip()
    return name, row


def _comet(path, number: int, line: str) -> tuple[str, dict]:
    row = {name: _field(path, number, line, a, b, what, name in COMET_OPTIONAL)
           for name, a, b, what in COMET_FIELDS}
    year = _field(path, number, line, 15, 18, "perihelion year")
    month = _field(path, number, line, 20, 21, "perihelion month")
    day = _field(path, number, line, 23, 29, "perihelion day")
    row["perihelion_time"] = _calendar_jd(path, number, int(year), int(month), day, "15-29")
    if line[81:89].strip():
        epoch = [_field(path, number, line, a, b, f"epoch {w}")
                 for a, b, w in ((82, 85, "year"), (86, 87, "month"), (88, 89, "day"))]
        row["orbit_epoch"] = _calendar_jd(path, number, int(epoch[0]), int(epoch[1]),
                                          epoch[2], "82-89")
    row["comet_k1"] = 2.5 * row.pop("comet_slope_n")
    name = line[102:158].strip() or (line[0:4].strip() + line[4:12].strip())
    return name, row


def parse_mpc_elements(path, text: str, skip_bad_rows: bool = False, on_skip=None):
    """Targets (core/targets.py) of every elements line of an MPC-format text.

    A bad line raises InputError (file, line, column range); with skip_bad_rows it is passed
    to on_skip(InputError) instead (default: a SkippedRowWarning, as for target lists) and
    left out."""
    from epochpoint.core.targets import Targets

    from ..targetrows import warn_skipped

    lines = text.replace("\r\n", "\n").replace("\r", "\n").split("\n")
    start = next((i + 1 for i, line in enumerate(lines) if line.startswith("-----")), 0)
    names, rows, bad = [], [], 0
    for number, line in enumerate(lines[start:], start=start + 1):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        try:
            name, row = _element_line(path, number, line)
            _check_orbit(path, number, name, row)
        except InputError as err:
            if not skip_bad_rows:
                raise
            (on_skip or warn_skipped)(err)
            bad += 1
            continue
        names.append(name)
        rows.append(row)
    if not rows:
        raise InputError(path, f"no usable orbital elements: all {bad} lines have errors"
                         if bad else "holds no orbital elements")
    extra = {c: np.array([row.get(c, np.nan) for row in rows], dtype=float)
             for c in ELEMENT_COLUMNS if any(c in row for row in rows)}
    n = len(rows)
    return Targets.from_columns(ra=np.zeros(n), dec=np.zeros(n), name=names, extra=extra)


def _element_line(path, number: int, line: str) -> tuple[str, dict]:
    """(name, element cells) of one line, a minor planet or a comet by its layout."""
    if _ASTEROID_LINE.match(line):
        return _asteroid(path, number, line)
    if _COMET_LINE.match(line):
        return _comet(path, number, line)
    raise InputError(path, "is neither a minor-planet nor a comet elements line in the MPC "
                           "layout", line=number)


def _check_orbit(path, number: int, name: str, row: dict) -> None:
    """The line's orbit through the engine's rules (core/bodies/rows.py), so an element no
    orbit allows (e >= 1 with a mean anomaly, a negative distance) is refused with its line
    and columns."""
    from epochpoint.core.bodies.rows import BodyRowError, source_of_row

    try:
        source_of_row({c: np.array([v]) for c, v in row.items()}, 0, name)
    except BodyRowError as err:
        raise InputError(path, str(err).split(": ", 1)[-1], line=number,
                         column=_COLUMN_RANGES.get(err.column, err.column),
                         target=name) from None


def read_mpc_elements(path, skip_bad_rows: bool = False, on_skip=None):
    """The bodies of an MPC elements file as Targets (InputError on bad content; with
    skip_bad_rows, bad lines reported to on_skip and left out)."""
    from ..filebytes import decode_utf8, read_file_bytes

    data = read_file_bytes(path)
    return parse_mpc_elements(path, decode_utf8(path, data), skip_bad_rows=skip_bad_rows,
                              on_skip=on_skip)
