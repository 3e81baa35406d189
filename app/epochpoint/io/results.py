"""Result tables (what the engine computes) to CSV, JSON, ECSV, VOTable or a table for people.

A result is an ordered mapping column name -> numpy array (floats in degrees, arcseconds, ...;
names as strings), plus `meta`, a dict of scalars such as {"time": "2027-01-20T23:10:00Z"}.
NaN (or None) means "no value": an empty CSV cell, JSON null, a masked ECSV/VOTable cell.

- csv: `# key: value` comment lines for meta, a header row, shortest round-trip float text.
  (io.resultstream writes csv, json and ecsv chunk by chunk with the same text.)
- json: a list of objects, one per row, exactly that shape (meta is not included); plain
  Python numbers only, NaN -> null (RFC 8259 has no NaN).
- ecsv / votable: astropy.table with units from `units`; meta in the ECSV header, and as
  VOTable INFO elements (IVOA VOTable 1.4, section 4.7).
- table: aligned text for people (peopletable.format_people_table).
"""
from __future__ import annotations

import io
import os

import numpy as np

from .atomic import atomic_write_text
from .errors import InputError
from .peopletable import format_people_table
from .resultstream import python_value, write_chunks

RESULT_FORMATS = ("csv", "json", "ecsv", "votable", "table")


def result_csv(columns, meta) -> str:
    """CSV text: `# key: value` meta lines, a header row, one row per result row."""
    out = io.StringIO()
    write_chunks(out, [columns], list(columns), meta, "csv")
    return out.getvalue()


def result_json(columns) -> str:
    """A JSON list with one object per row, one row per line."""
    out = io.StringIO()
    write_chunks(out, [columns], list(columns), None, "json")
    return out.getvalue()


def result_table(columns, meta, units):
    """An astropy Table of a result: NaN/None masked, units attached, meta as plain scalars."""
    # astropy.table (about 0.1 s to import) is loaded by the formats that need it.
    from astropy.table import MaskedColumn, Table

    table = Table()
    for name, values in columns.items():
        values = np.asarray(values)
        unit = (units or {}).get(name) or None
        if values.dtype.kind == "f":
            table[name] = MaskedColumn(values, mask=~np.isfinite(values), unit=unit)
        elif values.dtype.kind in "OSU":
            none = np.array([v is None for v in values], dtype=bool)
            text = np.array(["" if v is None else str(v) for v in values], dtype=str)
            table[name] = MaskedColumn(text, mask=none, unit=unit) if none.any() else text
        else:
            table[name] = MaskedColumn(values, unit=unit) if unit else values
    table.meta.update({str(k): python_value(v) for k, v in (meta or {}).items()})
    return table


def format_result(columns, meta, format: str, units=None, formatters=None) -> str:
    """The text of a result in one of RESULT_FORMATS."""
    if format == "csv":
        return result_csv(columns, meta)
    if format == "json":
        return result_json(columns)
    if format in ("ecsv", "votable"):
        from .astropytables import table_bytes

        return table_bytes(result_table(columns, meta, units), format).decode("utf-8")
    if format == "table":
        return format_people_table(columns, formatters, meta, units)
    raise InputError(None, f"unknown result format {format!r} (use {', '.join(RESULT_FORMATS)})")


def write_result(columns, meta, path=None, format="csv", units=None, formatters=None):
    """Write a result table to `path` atomically, or return its text when path is None.

    columns: ordered mapping name -> array; meta: dict of scalars; format: one of
    RESULT_FORMATS; units: optional name -> unit string; formatters: per-column text
    formatters for the 'table' format.
    """
    text = format_result(columns, meta, format, units=units, formatters=formatters)
    if path is None:
        return text
    try:
        atomic_write_text(path, text)
    except OSError as err:
        raise InputError(os.fspath(path), f"cannot be written ({err.strerror or err})") from None
    return None
