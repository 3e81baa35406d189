"""Whole columns of numbers as text, and rows joined from them, in pyarrow's compiled code.

`float_texts` spells every float exactly as Python's `repr` does (and so as `json.dumps`
does): the shortest text that reads back as the same double, fixed notation with at least
one digit after the point for 1e-4 <= |x| < 1e16, exponent notation (at least two exponent
digits) otherwise. pyarrow's conversion gives the same shortest digits (the shortest
round-trip digits closest to the value are unique: Steele & White 1990, Gay 1990) but its
own notation: integral values without ".0", and an exponent from 1e10 or so. So the text is
taken from pyarrow where both notations are plain fixed decimals, a ".0" is appended to
integral values, and the few remaining cells (tiny, huge, near a notation boundary) are
spelled by `repr` itself. Cost: about 0.1-0.2 us per number, against about 0.4-0.6 us for
`repr` called from Python.

`joined_text` joins the cells of each row and the rows themselves into one string.

Columns shorter than SMALL_COLUMN cells are spelled and joined by Python itself, as lists of
str: for a few hundred rows that is quicker than loading pyarrow (0.1-0.3 s), which is then
never imported.
"""
from __future__ import annotations

import math

import numpy as np

# Below this many cells a column is spelled by Python (about 0.5 us a cell, no pyarrow).
SMALL_COLUMN = 2048
# Where pyarrow's text is certainly the plain fixed notation Python's repr also uses (repr
# switches at 1e-4 and 1e16; the margins keep clear of both, and of pyarrow's own switch).
FIXED_MIN, FIXED_MAX = 2e-4, 1e9


def float_texts(values, missing: str):
    """Python's repr of each float as a pyarrow string array (a list of str for a small
    column); `missing` where not finite."""
    x = np.ascontiguousarray(values, dtype=np.float64)
    if x.size < SMALL_COLUMN:
        return [float.__repr__(v) if math.isfinite(v) else missing for v in x.tolist()]
    import pyarrow as pa
    import pyarrow.compute as pc

    text = pc.cast(pa.array(x), pa.string())
    finite = np.isfinite(x)
    size = np.abs(np.where(finite, x, 0.0))
    plain = (size == 0.0) | ((size >= FIXED_MIN) & (size < FIXED_MAX))
    integral = plain & (x == np.trunc(np.where(finite, x, 0.0)))
    if integral.any():  # repr writes 3.0 where pyarrow writes 3
        text = pc.if_else(pa.array(integral), pc.binary_join_element_wise(text, ".0", ""), text)
    other = finite & ~plain
    if other.any():
        spelled = [float.__repr__(v) for v in x[other].tolist()]
        text = pc.replace_with_mask(text, pa.array(other), pa.array(spelled, pa.string()))
    if not finite.all():
        text = pc.if_else(pa.array(finite), text, pa.scalar(missing))
    return text


def text_array(cells: list):
    """A list of str as a pyarrow string array (the list itself if UTF-8 cannot hold it,
    e.g. a lone surrogate; the list itself for a small column)."""
    if len(cells) < SMALL_COLUMN:
        return cells
    import pyarrow as pa

    try:
        return pa.array(cells, pa.string())
    except (UnicodeEncodeError, pa.ArrowException):
        return cells


def joined_text(pieces: list, row_separator: str) -> str:
    """Each row's pieces (columns as pyarrow string arrays or lists of str, or one str for
    every row) concatenated, rows joined by row_separator."""
    if any(isinstance(p, list) for p in pieces):  # small, or text pyarrow cannot hold: Python
        columns = [p if isinstance(p, (list, str)) else p.to_pylist() for p in pieces]
        n = len(next(c for c in columns if isinstance(c, list)))
        columns = [c if isinstance(c, list) else [c] * n for c in columns]
        return row_separator.join(map("".join, zip(*columns)))
    import pyarrow as pa
    import pyarrow.compute as pc

    rows = pc.binary_join_element_wise(*pieces, "")
    one_list = pa.ListArray.from_arrays(pa.array([0, len(rows)], pa.int32()), rows)
    return pc.binary_join(one_list, row_separator)[0].as_py()
