"""The interlock tables of a site file: [horizon], [mount] and [safety].

    [horizon]                 # lowest observed altitude by azimuth (north through east)
    points = [[0, 12], [90, 20], [180, 8], [270, 15]]    # [azimuth, altitude] pairs, degrees
    # or: file = "horizon.txt"  two columns "azimuth altitude", relative to the site file

    [mount]
    type = "german"           # equatorial | german | altaz
    min_altitude = 15.0       # degrees
    ha_east = 5.5             # hours east of the meridian it may point (max 12)
    ha_west = 5.5             # hours west
    dec_min = -80.0           # degrees
    dec_max = 60.0
    meridian_limit = 5.0      # German mounts: degrees of hour angle it may track past the meridian
    slew_rate = 3.0           # degrees per second on each axis
    settle = 10.0             # seconds after each slew
    park_ha = -90.0           # where it rests before the night: hour angle, degrees, west
    park_dec = 90.0           #   positive, and declination; both or neither (default: the
                              #   elevated pole, counterweight down: HA -90 German, else 0)

    [safety]
    sun_avoidance = 30.0      # degrees: never point closer to the Sun (0 turns it off)
    solar_filter_fitted = false   # true only with a full-aperture solar filter on: the Sun
                                  # may then be a target (a caution is shown every time)

Every key is optional; missing ones keep the defaults of core.limits, which keep the
interlocks on. Errors name the file, the table and the key (or the line of a horizon file).
"""
from __future__ import annotations

import os

import numpy as np

from epochpoint.core.limits import HorizonMask, Interlocks, LimitError, MountLimits

from .errors import InputError, quote
from .filebytes import decode_utf8, read_file_bytes

MOUNT_KEYS = {"type": "mount_type", "min_altitude": "min_altitude", "ha_east": "ha_east",
              "ha_west": "ha_west", "dec_min": "dec_min", "dec_max": "dec_max",
              "meridian_limit": "meridian_limit", "slew_rate": "slew_rate", "settle": "settle",
              "park_ha": "park_ha", "park_dec": "park_dec"}
SAFETY_KEYS = ("sun_avoidance", "solar_filter_fitted")
HORIZON_KEYS = ("points", "file")


def _number(path, table, key, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputError(path, f"table [{table}], key {key}: {quote(value)} is not a number")
    return float(value)


def _unknown(path, table, data: dict, allowed) -> None:
    for key in data:
        if key not in allowed:
            raise InputError(path, f"table [{table}], key {quote(key)}: unknown key "
                                   f"(known: {', '.join(allowed)})")


def read_horizon_file(path) -> HorizonMask:
    """A horizon mask from a plain two-column text file: azimuth and altitude in degrees per
    line (spaces, tabs or a comma between them), '#' starts a comment."""
    path = os.fspath(path)
    rows = []
    for number, line in enumerate(decode_utf8(path, read_file_bytes(path)).splitlines(), 1):
        text = line.split("#", 1)[0].replace(",", " ").split()
        if not text:
            continue
        if len(text) != 2:
            raise InputError(path, "needs two numbers, azimuth and altitude", line=number)
        try:
            rows.append((float(text[0]), float(text[1])))
        except ValueError:
            raise InputError(path, f"{quote(' '.join(text))} is not two numbers",
                             line=number) from None
    if not rows:
        raise InputError(path, "has no azimuth/altitude lines")
    rows.sort()
    return _mask(path, [r[0] for r in rows], [r[1] for r in rows])


def _mask(path, azimuth, altitude) -> HorizonMask:
    try:
        return HorizonMask(np.asarray(azimuth, dtype=float), np.asarray(altitude, dtype=float))
    except LimitError as err:
        raise InputError(path, f"horizon mask: {str(err).split(': ', 1)[-1]}") from None


def _horizon(path, table: dict) -> HorizonMask | None:
    _unknown(path, "horizon", table, HORIZON_KEYS)
    if "points" in table and "file" in table:
        raise InputError(path, "table [horizon]: give points or file, not both")
    if "file" in table:
        if not isinstance(table["file"], str):
            raise InputError(path, "table [horizon], key file: must be text in quotes")
        return read_horizon_file(os.path.join(os.path.dirname(path), table["file"]))
    points = table.get("points")
    if points is None:
        return None
    if not isinstance(points, list) or not all(isinstance(p, list) and len(p) == 2
                                                for p in points):
        raise InputError(path, "table [horizon], key points: must be [[azimuth, altitude], ...]")
    pairs = sorted((_number(path, "horizon", "points", a), _number(path, "horizon", "points", h))
                   for a, h in points)
    return _mask(path, [p[0] for p in pairs], [p[1] for p in pairs])


def read_interlocks(path, reserved: dict) -> Interlocks:
    """Interlocks from the [horizon], [mount] and [safety] tables of a site file."""
    mount_table = reserved.get("mount", {})
    safety_table = reserved.get("safety", {})
    _unknown(path, "mount", mount_table, tuple(MOUNT_KEYS))
    _unknown(path, "safety", safety_table, SAFETY_KEYS)
    mount_values = {}
    for key, value in mount_table.items():
        if key == "type":
            if not isinstance(value, str):
                raise InputError(path, "table [mount], key type: must be text in quotes")
            mount_values["mount_type"] = value
        else:
            mount_values[MOUNT_KEYS[key]] = _number(path, "mount", key, value)
    horizon = _horizon(path, reserved.get("horizon", {}))
    try:
        mount = MountLimits(**mount_values)
        sun = _number(path, "safety", "sun_avoidance", safety_table.get("sun_avoidance", 30.0))
        return Interlocks(mount=mount, horizon=horizon, sun_avoidance=sun,
                          solar_filter_fitted=safety_table.get("solar_filter_fitted", False))
    except LimitError as err:
        table = "safety" if err.field in ("sun_avoidance", "solar_filter_fitted") else "mount"
        key = "type" if err.field == "mount_type" else err.field
        raise InputError(path, f"table [{table}], key {key}: "
                               f"{str(err).split(': ', 1)[-1]}") from None


def interlocks_to_tables(interlocks: Interlocks) -> dict:
    """The [horizon], [mount] and [safety] tables for `interlocks` (the inverse of
    read_interlocks); a horizon mask is written as [azimuth, altitude] points."""
    mount = interlocks.mount
    tables = {"mount": {key: getattr(mount, field) for key, field in MOUNT_KEYS.items()
                        if getattr(mount, field) is not None},
              "safety": {"sun_avoidance": float(interlocks.sun_avoidance)}}
    if interlocks.solar_filter_fitted:
        tables["safety"]["solar_filter_fitted"] = True
    if interlocks.horizon is not None:
        mask = interlocks.horizon
        tables["horizon"] = {"points": [[float(a), float(h)]
                                        for a, h in zip(mask.azimuth, mask.altitude)]}
    return tables
