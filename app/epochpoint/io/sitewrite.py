"""Writing a site file (TOML, read back by sitefile.read_site_file) and a horizon file (the
two-column text read by sitelimits.read_horizon_file), both saved atomically.

The site file's tables are flat: text, numbers and, for the horizon, a list of [azimuth,
altitude] pairs. A small writer for exactly these values follows the TOML 1.0 specification
(toml.io/en/v1.0.0: basic strings with backslash escapes, decimal floats, arrays), so no
TOML-writing package is needed; tests read the output back with Python's tomllib.
"""
from __future__ import annotations

import math
import os

from epochpoint.core.site import Site

from .atomic import atomic_write_text
from .sitefile import site_to_tables

TABLE_ORDER = ("site", "weather", "mount", "safety", "horizon")
# TOML basic-string escapes (TOML 1.0, "String"); other control characters as \uXXXX.
_ESCAPES = {'"': '\\"', "\\": "\\\\", "\b": "\\b", "\t": "\\t", "\n": "\\n", "\f": "\\f",
            "\r": "\\r"}


def _toml_string(text: str) -> str:
    out = []
    for ch in text:
        if ch in _ESCAPES:
            out.append(_ESCAPES[ch])
        elif ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def _toml_value(value) -> str:
    """One TOML value: text, a boolean, a number (floats keep every digit) or a list."""
    if isinstance(value, str):
        return _toml_string(value)
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)  # shortest text that reads back as the same float
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    raise TypeError(f"cannot write {type(value).__name__} to a site file")


def tables_to_toml(tables: dict) -> str:
    """TOML text for flat tables ({table: {key: value}}); keys with None are left out."""
    lines = []
    names = [n for n in TABLE_ORDER if n in tables] + [n for n in tables if n not in TABLE_ORDER]
    for name in names:
        lines.append(f"[{name}]")
        for key, value in tables[name].items():
            if value is not None:
                lines.append(f"{key} = {_toml_value(value)}")
        lines.append("")
    return "\n".join(lines)


def site_file_text(site: Site) -> str:
    """The site file for `site`: read back with read_site_file it gives an equal Site."""
    header = "# Epochpoint site file (degrees, metres, hPa, degrees C; see the README)\n\n"
    return header + tables_to_toml(site_to_tables(site))


def write_site_file(path, site: Site) -> None:
    """Save `site` as a TOML site file at `path`, atomically."""
    atomic_write_text(os.fspath(path), site_file_text(site))


def horizon_file_text(azimuth_deg, altitude_deg) -> str:
    """Two columns, azimuth and altitude in degrees, one point per line."""
    rows = "".join(f"{float(a)!r} {float(h)!r}\n" for a, h in zip(azimuth_deg, altitude_deg))
    return "# azimuth altitude (degrees; azimuth from north through east)\n" + rows


def write_horizon_file(path, azimuth_deg, altitude_deg) -> None:
    """Save horizon points as the two-column text read by read_horizon_file, atomically."""
    atomic_write_text(os.fspath(path), horizon_file_text(azimuth_deg, altitude_deg))
