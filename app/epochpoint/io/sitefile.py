"""The observing site from a TOML site file or from a `LAT,LON,HEIGHT` string.

Site file schema (Epochpoint's own; TOML 1.0, read with tomllib)::

    [site]
    name = "..."            # free text (optional)
    latitude = -31.2        # degrees, north positive (required)
    longitude = -69.9       # degrees, east positive (required)
    height = 2410.0         # metres above the WGS84 ellipsoid (optional, default 0)
    timezone = "America/Argentina/San_Juan"   # IANA name, checked with zoneinfo (optional;
                            # default: the zone that holds the coordinates, found offline)

    [weather]               # default conditions (optional); command-line options override them
    pressure = 760.0        # hPa; omit: standard atmosphere at the site height; 0: no refraction
    temperature = 8.0       # degrees C (default 10)
    humidity = 0.25         # relative, 0..1 (default 0.5)
    wavelength = 0.55       # micrometres (default 0.55)

    [horizon]  [mount]  [safety]   # the interlocks: horizon mask, mount limits, Sun
                                   # avoidance (see sitelimits.py for their keys)

Any other table, or any other key in [site] or [weather], is an error naming file, table and
key, so a misspelt key never passes silently. Values outside their physical range are refused
by `Site` itself; its message reaches the user as one line naming the file.

The same tables, parsed into a dict from another container (the JSON plan file), become a
Site with `site_from_tables(tables, path)`; `site_to_tables(site)` writes them back.

The string form `LAT,LON[,HEIGHT]` gives degrees (north and east positive) and metres, e.g.
`-24.6,-70.4,2635`; the height defaults to 0, the weather to Site's defaults and the time zone
to the one that holds the coordinates.
"""
from __future__ import annotations

import os
import re
import tomllib
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from epochpoint.core.site import Site, SiteError

from .errors import InputError, quote
from .filebytes import decode_utf8, read_file_bytes
from .sitelimits import interlocks_to_tables, read_interlocks

SITE_KEYS = ("name", "latitude", "longitude", "height", "timezone")
WEATHER_KEYS = ("pressure", "temperature", "humidity", "wavelength")
RESERVED_TABLES = ("horizon", "mount", "safety")
TEXT_KEYS = ("name", "timezone")
REQUIRED_SITE_KEYS = ("latitude", "longitude")


def parse_site_spec(text: str) -> Site:
    """A Site from 'LAT,LON' or 'LAT,LON,HEIGHT' (degrees, east-positive; metres)."""
    label = f"site {quote(text)}"
    parts = [p.strip() for p in str(text).split(",")]
    if len(parts) not in (2, 3):
        raise InputError(None, f"{label} is not LAT,LON,HEIGHT (degrees, east-positive "
                               "longitude, metres; e.g. -24.6,-70.4,2635)")
    values = {}
    for key, part in zip(("latitude", "longitude", "height"), parts):
        try:
            values[key] = float(part)
        except ValueError:
            raise InputError(None, f"{label}: {key} {quote(part)} is not a number") from None
    return _make_site(None, label, values)


def read_site(spec) -> Site:
    """A Site from a TOML site file path or a 'LAT,LON,HEIGHT' string (an existing file wins)."""
    text = os.fspath(spec)
    if not os.path.exists(text):
        if "," in text:
            return parse_site_spec(text)
        raise InputError(text, "no such site file (give a TOML site file or LAT,LON,HEIGHT)")
    return read_site_file(text)[0]


def _check_keys(path: str, table_name: str, table: dict, allowed: tuple) -> None:
    for key in table:
        if key not in allowed:
            raise InputError(path, f"table [{table_name}], key {quote(key)}: unknown key "
                                   f"(known: {', '.join(allowed)})")


def _value(path: str, table_name: str, key: str, value):
    """A key's value, checked for type: text keys need strings, the others numbers."""
    if key in TEXT_KEYS:
        if not isinstance(value, str):
            raise InputError(path, f"table [{table_name}], key {key}: must be text in quotes")
        return value
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputError(path, f"table [{table_name}], key {key}: {quote(value)} is not a number")
    return float(value)


def _load_toml(path: str) -> dict:
    try:
        return tomllib.loads(decode_utf8(path, read_file_bytes(path)))
    except tomllib.TOMLDecodeError as err:
        match = re.search(r"line (\d+)", str(err))
        raise InputError(path, f"is not valid TOML: {err}",
                         line=int(match.group(1)) if match else None) from None


def read_site_file(path) -> tuple[Site, dict]:
    """(Site, {interlock table name: its raw contents}) from a TOML site file (schema above)."""
    path = os.fspath(path)
    document = _load_toml(path)
    site = site_from_tables(document, path)
    reserved = {name: document[name] for name in RESERVED_TABLES if name in document}
    return site, reserved


def site_from_tables(tables: dict, path) -> Site:
    """A Site from the tables of a site file already parsed into a dict ({"site": {...},
    "weather": {...}, "horizon": ..., "mount": ..., "safety": ...}), checked as for the TOML
    file; errors name `path`, the table and the key. A horizon `file` is relative to `path`."""
    path = os.fspath(path)
    for name, table in tables.items():
        if name not in ("site", "weather") + RESERVED_TABLES:
            known = ", ".join(f"[{t}]" for t in ("site", "weather") + RESERVED_TABLES)
            raise InputError(path, f"unknown table or key {quote(name)} (known tables: {known})")
        if not isinstance(table, dict):
            raise InputError(path, f"{name} must be a table, written [{name}]")
    if "site" not in tables:
        raise InputError(path, "has no [site] table")
    site_table, weather_table = tables["site"], tables.get("weather", {})
    _check_keys(path, "site", site_table, SITE_KEYS)
    _check_keys(path, "weather", weather_table, WEATHER_KEYS)
    for key in REQUIRED_SITE_KEYS:
        if key not in site_table:
            raise InputError(path, f"table [site] has no {key}")
    values = {key: _value(path, "site", key, v) for key, v in site_table.items()}
    values.update({key: _value(path, "weather", key, v) for key, v in weather_table.items()})
    if "timezone" in values:
        _check_timezone(path, values["timezone"])
    reserved = {name: tables[name] for name in RESERVED_TABLES if name in tables}
    values["interlocks"] = read_interlocks(path, reserved)
    return _make_site(path, None, values)


def site_to_tables(site: Site) -> dict:
    """The tables of a site file for `site` (the inverse of site_from_tables): every value is
    written out, so reading them back gives an equal Site (a zone found from the coordinates is
    left out, to be found again). The horizon is written as points."""
    tables = {
        "site": {"name": site.name, "latitude": site.latitude, "longitude": site.longitude,
                 "height": site.height},
        "weather": {"pressure": site.pressure, "temperature": site.temperature,
                    "humidity": site.humidity, "wavelength": site.wavelength},
    }
    if not site.timezone_from_coordinates:
        tables["site"]["timezone"] = site.timezone
    tables.update(interlocks_to_tables(site.interlocks))
    return tables


def _make_site(path, label, values: dict) -> Site:
    """Site(**values) with its validation errors as InputError (naming the TOML table and key
    for a file, prefixed by `label` for a LAT,LON,HEIGHT string)."""
    try:
        return Site(**values)
    except SiteError as err:
        detail = str(err).split(": ", 1)[-1]
        if label is None:
            table = "weather" if err.field in WEATHER_KEYS else "site"
            raise InputError(path, f"table [{table}], key {err.field}: {detail}") from None
        raise InputError(path, f"{label}: {err.field} {detail}") from None
    except (TypeError, ValueError) as err:  # a value Site's own checks did not foresee
        raise InputError(path, f"{label or 'site'}: values not usable ({err})") from None


def _check_timezone(path: str, name: str) -> None:
    try:
        ZoneInfo(name)
    except (ZoneInfoNotFoundError, ValueError, OSError):
        raise InputError(path, f"table [site], key timezone: {quote(name)} is not an IANA time "
                               "zone (e.g. America/Argentina/San_Juan)") from None
