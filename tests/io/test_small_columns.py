"""Short results are written by Python alone (no pyarrow), byte for byte as the pyarrow path
writes them.

Reference: the pyarrow path of io/columntext.py and io/resultstream.py (whose spelling
tests/io/test_columntext.py checks against CPython's repr and the csv/json modules), forced
here by setting the small-column limit to zero. Columns are drawn from a seeded generator:
floats of every magnitude, NaN and infinities, booleans, integers, text that needs CSV quoting
or JSON escaping.
"""
import io

import numpy as np
import pytest

from epochpoint.io import columntext, resultstream
from epochpoint.io.resultstream import write_chunks

SEED = 20270120


def _chunk(rng: np.random.Generator, n: int) -> dict:
    floats = rng.uniform(-1, 1, n) * 10.0 ** rng.uniform(-12, 20, n)
    floats[rng.random(n) < 0.1] = np.nan
    floats[rng.random(n) < 0.05] = np.inf
    floats[::7] = np.round(floats[::7])  # integral values: repr writes "3.0"
    words = np.array(["Vega", "M 31, Andromeda", 'say "hi"', "\u00c9ta Car", "", "a\nb",
                      "tab\there"], dtype=object)
    return {"name": words[rng.integers(0, len(words), n)], "x": floats,
            "whole": rng.integers(-10**6, 10**6, n), "flag": rng.random(n) < 0.5,
            "y": np.round(rng.normal(0, 100, n), int(rng.integers(0, 4)))}


@pytest.mark.parametrize("fmt", ["csv", "json"])
@pytest.mark.parametrize("n", [0, 1, 30, 500])
def test_python_path_writes_the_same_bytes(monkeypatch, fmt, n):
    rng = np.random.default_rng(SEED + n)
    chunks = [_chunk(rng, n), _chunk(rng, max(n // 3, 1))]
    names = list(chunks[0])
    small = io.StringIO()
    write_chunks(small, chunks, names, {"time": "2027-01-20T23:10:00Z"}, fmt)
    monkeypatch.setattr(columntext, "SMALL_COLUMN", 0)
    monkeypatch.setattr(resultstream, "SMALL_COLUMN", 0)
    arrow = io.StringIO()
    write_chunks(arrow, chunks, names, {"time": "2027-01-20T23:10:00Z"}, fmt)
    assert small.getvalue() == arrow.getvalue()


def test_a_single_column_of_empty_cells_is_quoted_alike(monkeypatch):
    chunk = {"name": np.array(["", "a", ""], dtype=object)}
    small = io.StringIO()
    write_chunks(small, [chunk], ["name"], {}, "csv")
    monkeypatch.setattr(columntext, "SMALL_COLUMN", 0)
    monkeypatch.setattr(resultstream, "SMALL_COLUMN", 0)
    arrow = io.StringIO()
    write_chunks(arrow, [chunk], ["name"], {}, "csv")
    assert small.getvalue() == arrow.getvalue() == 'name\n""\na\n""\n'
