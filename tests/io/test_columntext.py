"""Floats written a column at a time: Python's own spelling, and nothing lost.

References: CPython's repr of a float (the shortest text that reads back as the same
double; fixed notation for 1e-4 <= |x| < 1e16: Python language reference, "Floating point
arithmetic" and float.__repr__), float() to read text back, and the standard library's csv
and json modules to read the files written.
"""
import csv
import io
import json

import numpy as np
import pytest

from epochpoint.core.positions import position_chunks
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.io import columntext, resultstream
from epochpoint.io.columntext import float_texts
from epochpoint.io.resultstream import write_chunks

SEED = 20270120


def _awkward_floats(n: int) -> np.ndarray:
    """Seeded floats over every magnitude and spelling boundary, plus random bit patterns."""
    rng = np.random.default_rng(SEED)
    return np.concatenate([
        rng.uniform(-1, 1, n) * 10.0 ** rng.uniform(-320, 308, n),
        rng.uniform(-1, 1, n) * 10.0 ** rng.uniform(-6, 18, n),
        np.round(rng.uniform(-1e12, 1e12, n), int(rng.integers(0, 6))),
        10.0 ** rng.integers(-8, 20, n) * rng.choice([-1.0, 1.0], n),
        np.frombuffer(rng.bytes(8 * n), dtype=np.float64),
        [0.0, -0.0, np.nan, -np.nan, np.inf, -np.inf, 1e-4, 2e-4, 1e9, 1e15, 1e16,
         9999999999999998.0, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308,
         999999999.5, 0.1 + 0.2],
    ])


@pytest.mark.parametrize("missing", ["", "null"])
def test_float_texts_spell_as_python_repr(missing):
    x = _awkward_floats(20000)
    expected = [repr(v) if np.isfinite(v) else missing for v in x.tolist()]
    assert float_texts(x, missing).to_pylist() == expected


def test_written_positions_read_back_bit_for_bit():
    """CSV and JSON of computed positions read back (csv/json modules, float()) give the
    computed doubles exactly; no value is NaN in JSON (null instead)."""
    rng = np.random.default_rng(SEED)
    n = 2000
    targets = Targets.from_columns(
        ra=rng.uniform(0, 360, n), dec=np.degrees(np.arcsin(rng.uniform(-1, 1, n))),
        pm_ra_cosdec=rng.normal(0, 50, n), pm_dec=rng.normal(0, 50, n),
        parallax=rng.uniform(0, 100, n), radial_velocity=rng.normal(0, 40, n), epoch=2016.0)
    site = Site(latitude=-28.47, longitude=-67.29, height=2870.0, name="Invented ridge")
    chunks = position_chunks(targets, site, "2027-01-20T23:10:00Z", chunk_size=333)
    computed = {name: np.concatenate([part[name] for part in chunks]) for name in chunks.names}
    for fmt in ("csv", "json"):
        out = io.StringIO()
        write_chunks(out, chunks, chunks.names, {}, fmt)
        if fmt == "csv":
            rows = list(csv.DictReader(io.StringIO(out.getvalue())))
            read = {k: [float(r[k]) if r[k] else np.nan for r in rows] for k in chunks.names[1:]}
        else:
            rows = json.loads(out.getvalue())
            read = {k: [np.nan if r[k] is None else r[k] for r in rows]
                    for k in chunks.names[1:]}
        for name, values in read.items():
            back = np.array(values, dtype=float)
            assert np.array_equal(back.view(np.uint64)[np.isfinite(back)],
                                  computed[name].view(np.uint64)[np.isfinite(back)]), name
            assert np.array_equal(np.isfinite(back), np.isfinite(computed[name])), name


class _CountedFloat(float):
    """A float type whose __repr__ counts its calls (stands in for `float` in the modules)."""

    calls = 0

    def __repr__(self):
        _CountedFloat.calls += 1
        return float.__repr__(self)


@pytest.mark.parametrize("fmt", ["csv", "json"])
def test_ordinary_floats_are_not_spelled_one_by_one_in_python(monkeypatch, fmt):
    monkeypatch.setattr(resultstream, "float", _CountedFloat, raising=False)
    monkeypatch.setattr(columntext, "float", _CountedFloat, raising=False)
    _CountedFloat.calls = 0
    x = np.random.default_rng(SEED).normal(0, 100, 5000)
    out = io.StringIO()
    write_chunks(out, [{"name": np.array(["a"] * x.size, dtype=object), "x": x}],
                 ["name", "x"], {}, fmt)
    assert _CountedFloat.calls == 0
    assert repr(float(x[0])) in out.getvalue()
