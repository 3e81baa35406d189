"""Results written chunk by chunk: the same bytes as the whole table written at once, and no
more than one chunk held by the writer.

References: the standard library's csv and json writers (one row at a time, as a script would
write them) and astropy's ECSV and VOTable writers on the whole table.
"""
import csv
import importlib
import io
import json

import numpy as np
import pytest

from epochpoint.core.positions import position_chunks, positions
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.io.astropytables import table_bytes
from epochpoint.io.results import result_table
from epochpoint.io.resultstream import write_chunks

WHEN = "2027-01-20T23:10:00Z"
N_TARGETS = 3000
SMALL_CHUNK = 97  # not a divisor of N_TARGETS: the last chunk is short
positions_module = importlib.import_module("epochpoint.core.positions")


@pytest.fixture(scope="module")
def invented():
    """Invented targets (seeded) with every kind of cell: errors known for some rows only."""
    rng = np.random.default_rng(20270120)
    n = N_TARGETS
    errors = {k: np.where(rng.random(n) < 0.7, rng.uniform(0.01, 2.0, n), np.nan)
              for k in ("ra_error", "dec_error", "pm_ra_cosdec_error", "pm_dec_error")}
    targets = Targets.from_columns(
        ra=rng.uniform(0, 360, n), dec=np.degrees(np.arcsin(rng.uniform(-1, 1, n))),
        pm_ra_cosdec=rng.normal(0, 50, n), pm_dec=rng.normal(0, 50, n),
        parallax=rng.uniform(0, 100, n), radial_velocity=rng.normal(0, 40, n),
        epoch=2016.0, name=[f"S{i}" if i % 5 else f"S {i}, \"q\"" for i in range(n)],
        errors=errors)
    site = Site(latitude=-28.47, longitude=-67.29, height=2870.0, name="Invented ridge")
    return targets, site


def _reference_csv(columns, meta) -> str:
    out = io.StringIO()
    for key, value in meta.items():
        out.write(f"# {key}: {' '.join(str(value).split())}\n")
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(list(columns))
    def cell(v):  # the documented spelling: empty for no value, true/false, repr of floats
        if isinstance(v, (bool, np.bool_)):
            return "true" if v else "false"
        if isinstance(v, float):
            return repr(v) if np.isfinite(v) else ""
        return str(v)

    cells = [[cell(v) for v in np.asarray(values).tolist()] for values in columns.values()]
    writer.writerows(zip(*cells))
    return out.getvalue()


def _reference_json(columns) -> str:
    rows = [json.dumps({k: (None if isinstance(v, float) and not np.isfinite(v) else v)
                        for k, v in zip(columns, row)})
            for row in zip(*(np.asarray(c).tolist() for c in columns.values()))]
    return "[\n" + ",\n".join(rows) + "\n]\n"


@pytest.mark.parametrize("fmt", ["csv", "json", "ecsv", "votable"])
def test_chunked_output_equals_the_whole_table(invented, fmt):
    targets, site = invented
    whole = positions(targets, site, WHEN)
    columns = dict(whole)
    if fmt == "csv":
        expected = _reference_csv(columns, whole.meta)
    elif fmt == "json":
        expected = _reference_json(columns)
    else:
        expected = table_bytes(result_table(columns, whole.meta, whole.units), fmt).decode()
    chunks = position_chunks(targets, site, WHEN, chunk_size=SMALL_CHUNK)
    assert chunks.names == list(whole)
    out = io.StringIO()
    write_chunks(out, chunks, chunks.names, chunks.meta, fmt, chunks.units)
    assert out.getvalue() == expected


class _CountingOutput(io.StringIO):
    """An output that notes, at every write, how many chunks had been handed out."""

    def __init__(self, drawn):
        super().__init__()
        self.drawn, self.seen = drawn, []

    def write(self, text):
        self.seen.append(self.drawn[0])
        return super().write(text)


@pytest.mark.parametrize("fmt", ["csv", "json", "ecsv", "votable"])
def test_the_writer_holds_one_chunk_at_a_time(invented, fmt):
    targets, site = invented
    chunks = position_chunks(targets, site, WHEN, chunk_size=SMALL_CHUNK)
    drawn = [0]

    def counted():
        for part in chunks:
            drawn[0] += 1
            yield part

    out = _CountingOutput(drawn)
    write_chunks(out, counted(), chunks.names, chunks.meta, fmt, chunks.units)
    n_chunks = -(-N_TARGETS // SMALL_CHUNK)
    assert drawn[0] == n_chunks
    # Each chunk's rows are written before the next chunk is drawn.
    assert out.seen == sorted(out.seen)
    assert sorted(set(out.seen) - {0}) == list(range(1, n_chunks + 1))


def test_position_chunks_are_computed_a_few_ahead_of_the_reader(invented, monkeypatch):
    targets, site = invented
    chunks = position_chunks(targets, site, WHEN, chunk_size=SMALL_CHUNK)
    computed = []
    real_chunk = chunks.chunk
    monkeypatch.setattr(chunks, "chunk", lambda rows: computed.append(rows) or real_chunk(rows))
    stream = iter(chunks)
    next(stream)
    assert len(computed) <= positions_module.WORKERS + 1 < len(chunks.spans())
    stream.close()
