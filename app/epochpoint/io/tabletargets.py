"""Target lists as ECSV or VOTable, read and written through astropy.table with units.

Reading is unit-aware: ra/dec in any angle unit (deg, hourangle, rad, ...), proper motions to
mas/yr, parallax to mas, radial velocity to km/s, errors likewise; a column without a unit is in
our default unit (targetcolumns.DEFAULT_UNITS). Epoch numbers are Julian years whatever their
unit says; text columns are read like CSV cells (so sexagesimal ra/dec work, units ignored).
Masked cells mean "not given": zero motion, unknown error; an epoch the meta key or INFO/PARAM
`catalogue_epoch` states, or none (refused on a moving row; see targetchecks.py). Rows are numbered
1, 2, ... in data order. Planning columns keep their type (numbers stay numbers; masked numbers
become NaN, masked text becomes '').

Writing puts every Targets column in a table with its unit: unknown errors are masked (empty in
ECSV, null in VOTable), float text is round-trip exact in both formats.
"""
from __future__ import annotations

import astropy.units as u
import numpy as np
from astropy.table import Column, MaskedColumn, Table
from astropy.time import Time

from .astropytables import load_table, table_bytes
from .bodyfields import has_body_columns
from .errors import InputError, quote
from .targetcolumns import (ASTROMETRY_COLUMNS, DEFAULT_UNITS, UNCERTAINTY_COLUMNS,
                            match_columns)
from .targetchecks import CATALOGUE_EPOCH_KEY
from .targetrows import RawColumn, RawTable


def _as_text(values: np.ndarray) -> np.ndarray:
    """An object array of str from any column data (bytes decoded as UTF-8)."""
    return np.array([v.decode("utf-8", "replace") if isinstance(v, bytes) else str(v)
                     for v in values], dtype=object)


def _unit_factor(path: str, label: str, unit, canonical: str) -> float:
    """The factor from the column's unit to ours (1 without a unit)."""
    if unit is None:
        return 1.0
    ours = u.Unit(DEFAULT_UNITS[canonical])
    try:
        return float(u.Unit(unit).to(ours))
    except (u.UnitsError, ValueError, TypeError):
        wanted = ours.to_string() or "a plain number"
        raise InputError(path, f"unit {quote(unit)} cannot be converted to {wanted}",
                         column=label) from None


def _plain_column(path: str, label: str, canonical: str | None, column) -> Column:
    """A plain Column from astropy's mixin columns (ECSV can hold Time, SkyCoord, ...): a Time
    gives Julian years (TDB) for the epoch and ISO 8601 UTC text elsewhere."""
    if isinstance(column, Column):
        return column
    if isinstance(column, Time):
        values = column.tdb.jyear if canonical == "epoch" else [t + "Z" for t in column.utc.isot]
        return Column(values, name=label)
    if isinstance(column, u.Quantity):
        return Column(column.value, name=label, unit=column.unit)
    if canonical is not None:
        raise InputError(path, f"holds {type(column).__name__} objects, not plain values",
                         column=label)
    return Column([" ".join(str(v).split()) for v in column], name=label)


def _raw_column(path: str, canonical: str, column) -> RawColumn:
    """One known column in our units (numbers) or as text cells."""
    data, missing = np.ma.getdata(column), np.ma.getmaskarray(column).copy()
    if data.ndim != 1:
        raise InputError(path, "must hold one value per row", column=column.name)
    if data.dtype.kind in "biuf":
        if canonical in DEFAULT_UNITS and canonical != "epoch":
            factor = _unit_factor(path, column.name, column.unit, canonical)
            data = data.astype(float) * factor
        return RawColumn(column.name, data, missing)
    text = _as_text(data)
    stripped = np.array([t.strip() for t in text], dtype=object)
    return RawColumn(column.name, stripped, missing | (stripped == ""))


def _extra_values(column) -> np.ndarray:
    """A planning column kept in its type: masked numbers become NaN, masked text ''."""
    data, mask = np.ma.getdata(column), np.ma.getmaskarray(column)
    if data.dtype.kind in "iuf":
        if not mask.any():
            return np.array(data)
        values = data.astype(float)
        values[mask] = np.nan
        return values
    if data.dtype.kind == "b" and not mask.any():
        return np.array(data)
    text = _as_text(data) if data.ndim == 1 else np.array(data)
    if data.ndim == 1:
        text[mask] = ""
    return text


def read_table_targets(path: str, data: bytes, fmt: str) -> RawTable:
    """The rows of an ECSV ('ecsv') or VOTable ('votable') target file, ready for build_targets."""
    table = load_table(path, data, fmt)
    labels = list(table.colnames)
    try:
        known, extra = match_columns(labels)
    except ValueError as err:
        raise InputError(path, str(err)) from None
    for needed in ("ra", "dec"):  # not needed by body rows (bodyfields.py)
        if needed not in known and not has_body_columns(labels):
            raise InputError(path, f"has no {needed} column (columns: {', '.join(labels)[:60]})")
    if len(table) == 0:
        raise InputError(path, "has no targets")

    def column(i: int, canonical: str | None = None) -> Column:
        return _plain_column(path, labels[i], canonical, table.columns[i])

    return RawTable(path=path, row_numbers=np.arange(1, len(table) + 1), row_word="row",
                    columns={c: _raw_column(path, c, column(i, c)) for c, i in known.items()},
                    extra={labels[i]: _extra_values(column(i)) for i in extra},
                    catalogue_epoch=_stated_epoch(table.meta))


def _stated_epoch(meta) -> tuple[str, None] | None:
    """The file's `catalogue_epoch` (ECSV header meta, VOTable INFO or PARAM), if stated."""
    for key, value in meta.items():
        if str(key).strip().lower() == CATALOGUE_EPOCH_KEY:
            if isinstance(value, bytes):
                value = value.decode("utf-8", "replace")
            return str(np.ravel(value)[0] if np.ndim(value) else value), None
    return None


def _unit(canonical: str):
    return DEFAULT_UNITS[canonical] or None


def targets_table(targets) -> Table:
    """An astropy Table of a target list, every column with its unit."""
    table = Table()
    for col in ASTROMETRY_COLUMNS:
        table[col] = Column(np.asarray(getattr(targets, col), dtype=float), unit=_unit(col))
    # The name goes after ra/dec: astropy's ECSV writer leaves a leading '#' unquoted, which
    # would turn a first-column name like "#12" into a comment line.
    table.add_column(np.array([str(x) for x in targets.names()], dtype=str), name="name", index=2)
    for col in UNCERTAINTY_COLUMNS:
        if col in targets.errors:
            values = np.asarray(targets.errors[col], dtype=float)
            table[col] = MaskedColumn(values, mask=np.isnan(values), unit=_unit(col))
    for label, values in targets.extra.items():
        values = np.asarray(values)
        if values.dtype.kind == "O" or values.dtype.kind == "S":
            values = np.array(["" if v is None else str(v) for v in values], dtype=str)
        table[str(label)] = values
    table.meta["frame"] = "ICRS"
    table.meta["epoch"] = "Julian year (TDB)"
    return table


def format_table_targets(targets, fmt: str) -> bytes:
    """The bytes of an ECSV ('ecsv') or VOTable ('votable') target file."""
    return table_bytes(targets_table(targets), fmt)
