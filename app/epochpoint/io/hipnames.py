"""Targets given by Hipparcos number: a row named 'HIP 87937' without coordinates.

Before a target file's rows are validated (targetrows.build_targets), every row whose name cell
reads `HIP n` and whose ra and dec cells are both empty
takes the star's astrometry from the on-board Hipparcos new reduction (van Leeuwen 2007, see
io/catalogues/hipparcos.py): ra, dec, epoch 1991.25, proper motions and parallax, overriding
those cells of the row, and its errors where the file has error columns. A number not in the
catalogue is the row's one-line error (or the row is
skipped with skip_bad_rows). The catalogue is read only when such a row exists.
"""
from __future__ import annotations

from dataclasses import replace

import numpy as np

from .bodyfields import filled_column as _filled
from .targetrows import RawTable

FILLED_COLUMNS = ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax")
ERROR_COLUMNS = ("ra_error", "dec_error", "parallax_error", "pm_ra_cosdec_error",
                 "pm_dec_error")


def _unplaced_rows(raw: RawTable) -> np.ndarray:
    """Rows with neither ra nor dec given."""
    empty = np.ones(len(raw), dtype=bool)
    for name in ("ra", "dec"):
        column = raw.columns.get(name)
        if column is not None:
            empty &= np.asarray(column.missing, dtype=bool)
    return empty


def fill_hipparcos_rows(raw: RawTable) -> RawTable:
    """The RawTable with rows named 'HIP n' and no coordinates filled from the catalogue
    (see module docstring); the same table when there are none."""
    names = raw.columns.get("name")
    if names is None or len(raw) == 0:
        return raw
    unplaced = _unplaced_rows(raw)
    if not unplaced.any():
        return raw
    from .catalogues.hipparcos import HipparcosError, hipparcos_number, hipparcos_stars

    rows, numbers = [], []
    for i in np.flatnonzero(unplaced):
        number = None if names.missing[i] else hipparcos_number(names.values[i])
        if number is not None:
            rows.append(int(i))
            numbers.append(number)
    # An unknown number is that row's problem (reported, or skipped with skip_bad_rows).
    problems = dict(raw.row_problems)
    for i, number in list(zip(rows, numbers)):
        try:
            hipparcos_stars([number])
        except HipparcosError as err:
            problems.setdefault(i, (names.label, str(err)))
            numbers.pop(rows.index(i))
            rows.remove(i)
    if not rows:
        return replace(raw, row_problems=problems)
    stars = hipparcos_stars(numbers)
    found = {"ra": stars.ra, "dec": stars.dec, "epoch": stars.epoch,
             "pm_ra_cosdec": stars.pm_ra_cosdec, "pm_dec": stars.pm_dec,
             "parallax": stars.parallax, **stars.errors}
    columns = dict(raw.columns)
    for name in FILLED_COLUMNS + tuple(c for c in ERROR_COLUMNS if c in raw.columns):
        columns[name] = _filled(raw.columns.get(name), name, len(raw), rows, found[name])
    return replace(raw, columns=columns, row_problems=problems)
