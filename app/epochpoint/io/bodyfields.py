"""Solar-system rows of a target file: a `body` cell or osculating elements instead of RA/Dec.

A row is a body when its `body` cell names one (sun, moon, mercury .. neptune, pluto; any
case) or when any element cell is filled (`semimajor_axis` or `perihelion_distance`,
`eccentricity`, `inclination`, `ascending_node`, `argument_of_perihelion`, `mean_anomaly` with
`orbit_epoch`, or `perihelion_time`; optional `abs_magnitude`, `slope`, `comet_m1`,
`comet_k1`). Its cells are checked here, when the file is read, by the same rules the engine
uses (core/bodies/rows.py), so a typo is a one-line error naming file, line, target and
column. Its RA/Dec may be empty: they become placeholders (0, 0) that the engine replaces with
the body's place at each instant. A file with such columns may leave out ra and dec; a row
that is neither a body nor placed stays an error ("no ra given").
"""
from __future__ import annotations

from dataclasses import replace

import numpy as np

from .targetrows import RawColumn, RawTable

# The columns that make a row a body (core/bodies/rows.py holds the full vocabulary).
BODY_MARKERS = ("body", "semimajor_axis", "perihelion_distance", "eccentricity",
                "inclination", "ascending_node", "argument_of_perihelion", "mean_anomaly",
                "orbit_epoch", "perihelion_time")


def body_labels(labels) -> dict:
    """{canonical body column: label as written} for the labels that are body columns."""
    from epochpoint.core.bodies.rows import BODY_COLUMNS

    found = {}
    for label in labels:
        key = str(label).strip().lower()
        if key in BODY_COLUMNS:
            found[key] = label
    return found


def has_body_columns(labels) -> bool:
    """Whether a header names a body or element column (then ra and dec may be absent)."""
    return any(str(label).strip().lower() in BODY_MARKERS for label in labels)


def fill_body_rows(raw: RawTable, note, message_names) -> RawTable:
    """Check every body row's cells (problems to note(row, label, message)) and give body rows
    without coordinates placeholder ra/dec; rows neither placed nor bodies are noted "no ra
    given". The same table when the file has no body columns."""
    labels = body_labels(raw.extra)
    if not any(key in BODY_MARKERS for key in labels):
        return raw
    from epochpoint.core.bodies.rows import BodyRowError, body_rows, source_of_row

    n = len(raw)
    extra = {key: np.asarray(raw.extra[label], dtype=object) for key, label in labels.items()}
    is_body = body_rows(extra, n)
    for i in np.flatnonzero(is_body).tolist():
        try:
            source_of_row(extra, i, message_names[i] or f"T{i + 1}")
        except BodyRowError as err:
            note(i, labels.get(err.column, err.column), str(err).split(": ", 1)[-1])
    columns = dict(raw.columns)
    for name in ("ra", "dec"):
        column = columns.get(name)
        missing = np.ones(n, dtype=bool) if column is None else np.asarray(column.missing, bool)
        for i in np.flatnonzero(missing & ~is_body).tolist():
            note(i, name if column is None else column.label,
                 f"no {name} given (and no body or orbital elements)")
        placeholders = np.flatnonzero(missing & is_body).tolist()
        if column is None or placeholders:
            columns[name] = filled_column(column, name, n, placeholders, [0.0] * len(placeholders))
    return replace(raw, columns=columns)


def filled_column(column: RawColumn | None, name: str, n: int, rows: list, values) -> RawColumn:
    """A copy of the column (or a new, all-empty one) with `values` in `rows`."""
    if column is None:
        column = RawColumn(name, np.full(n, np.nan), np.ones(n, dtype=bool))
    missing = np.array(column.missing, dtype=bool)
    missing[rows] = False
    if column.values.dtype.kind in "biuf":
        cells = np.array(column.values, dtype=float)
        cells[rows] = values
        return RawColumn(column.label, cells, missing, column.cell_text)
    cells = np.array(column.values, dtype=object)
    cells[rows] = [repr(float(v)) for v in values]  # shortest round-trip text: exact
    return RawColumn(column.label, cells, missing, column.cell_text)
