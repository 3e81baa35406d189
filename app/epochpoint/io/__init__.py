"""Epochpoint's file layer: target lists, site files and result tables in and out.

Every reader turns bad content into `InputError`, a ValueError whose text is one line naming
file, line (or row), target and column. Every writer saves atomically.

Target lists (CSV, ECSV, VOTable; Gaia archive column names accepted; FK5/FK4 rows converted
to ICRS)::

    targets = read_targets("targets.csv", skip_bad_rows=False, on_skip=None)
    write_targets(targets, "targets.ecsv")          # format from the extension, or format=

Sites (TOML file or 'LAT,LON,HEIGHT')::

    site = read_site("observatory.toml")            # or read_site("-24.6,-70.4,2635")
    site, reserved = read_site_file("observatory.toml")

Results::

    text = write_result(columns, meta, None, "json")   # path None: return the text
    write_result(columns, meta, "out.votable", "votable", units={"alt": "deg"})

Angles and epochs: parse_ra, parse_dec, parse_epoch; format_ra_hms, format_dec_dms,
format_hours, sidereal_time_text. Atomic saves: atomic_write_bytes, atomic_write_text.
"""
import importlib

from .errors import InputError, SkippedRowWarning, TargetValueWarning

# Each name is imported from its module when first used, so that a command pays only for the
# file formats it touches (the table and Arrow readers cost a few tenths of a second).
_HOMES = {
    "angles": ("format_dec_dms", "format_hours", "format_ra_hms", "parse_dec", "parse_ra",
               "sidereal_time_text"),
    "atomic": ("atomic_write_bytes", "atomic_write_text"),
    "epochs": ("parse_epoch",),
    "peopletable": ("format_people_table",),
    "results": ("RESULT_FORMATS", "format_result", "write_result"),
    "sitefile": ("parse_site_spec", "read_site", "read_site_file"),
    "targetfile": ("TARGET_FORMATS", "read_targets", "target_format", "write_targets"),
}
_HOME_OF = {name: module for module, names in _HOMES.items() for name in names}

__all__ = [
    "InputError", "SkippedRowWarning", "TargetValueWarning",
    "read_targets", "write_targets", "target_format", "TARGET_FORMATS",
    "read_site", "read_site_file", "parse_site_spec",
    "write_result", "format_result", "format_people_table", "RESULT_FORMATS",
    "parse_ra", "parse_dec", "parse_epoch", "format_ra_hms", "format_dec_dms", "format_hours",
    "sidereal_time_text",
    "atomic_write_bytes", "atomic_write_text",
]


def __getattr__(name):
    module = _HOME_OF.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_HOME_OF))
