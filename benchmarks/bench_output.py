"""Benchmark: a large target file read, carried to the observed place and written, against
astropy.table reading and writing the same file and table in the same process.

An invented file of N targets (default 300,000; name, astrometry and errors) is read by
`read_targets` (the column reader, io/csvcolumns.py) and by astropy's `Table.read` (its fast
C reader); the positions are computed chunk by chunk; the result is written as CSV and JSON
by the chunk writer (io/resultstream.py) and as CSV by astropy's `Table.write`. Prints rows/s
for each step and each ratio (Epochpoint rows/s / astropy rows/s; above 1 means faster).
Run: .venv/bin/python benchmarks/bench_output.py [N]
"""
from __future__ import annotations

import os
import sys
import tempfile
import time
import warnings

import numpy as np
from astropy.table import Table

from epochpoint.core.positions import position_chunks
from epochpoint.core.site import Site
from epochpoint.io import read_targets
from epochpoint.io.resultstream import stream_result

WHEN = "2027-01-20T03:00:00Z"
SITE = Site(latitude=-30.0, longitude=-70.0, height=2000.0, name="Invented ridge")


def invented_table(n: int, seed: int = 2016) -> Table:
    """N invented targets with every astrometric column and four error columns."""
    rng = np.random.default_rng(seed)
    return Table({
        "name": [f"S{i}" for i in range(n)],
        "ra": rng.uniform(0.0, 360.0, n),
        "dec": np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n))),
        "epoch": np.full(n, 2016.0),
        "pm_ra_cosdec": rng.normal(0.0, 30.0, n), "pm_dec": rng.normal(0.0, 30.0, n),
        "parallax": 10.0 ** rng.uniform(-1.0, 2.0, n),
        "radial_velocity": rng.normal(0.0, 40.0, n),
        **{f"{c}_error": rng.uniform(0.01, 1.0, n)
           for c in ("ra", "dec", "pm_ra_cosdec", "pm_dec")},
    })


def _timed(step):
    start = time.perf_counter()
    result = step()
    return time.perf_counter() - start, result


def _line(label: str, n: int, ours: float, theirs: float | None = None) -> None:
    text = f"{label:<28} {n / ours:>12,.0f} rows/s"
    if theirs is not None:
        text += f"   astropy {n / theirs:>12,.0f} rows/s   ratio {theirs / ours:6.1f}x"
    print(text)


def main(n: int = 300_000) -> None:
    with tempfile.TemporaryDirectory() as folder, warnings.catch_warnings():
        warnings.simplefilter("ignore")
        source = os.path.join(folder, "targets.csv")
        invented_table(n).write(source, format="ascii.csv")
        t_read, targets = _timed(lambda: read_targets(source))
        t_astropy_read, _ = _timed(lambda: Table.read(source, format="ascii.csv"))
        chunks = position_chunks(targets, SITE, WHEN)
        t_engine, parts = _timed(lambda: list(chunks))
        result = Table({name: np.concatenate([p[name] for p in parts]) for name in chunks.names})
        written = {}
        for fmt in ("csv", "json"):
            path = os.path.join(folder, f"out.{fmt}")
            written[fmt], _ = _timed(lambda: stream_result(parts, chunks.names, chunks.meta,
                                                           path, fmt, chunks.units))
        t_astropy_write, _ = _timed(lambda: result.write(os.path.join(folder, "astropy.csv"),
                                                         format="ascii.csv"))
    print(f"{n:,} invented targets, {len(chunks.names) - 1} result columns")
    _line("read (CSV)", n, t_read, t_astropy_read)
    _line("engine (observed place)", n, t_engine)
    _line("write CSV", n, written["csv"], t_astropy_write)
    _line("write JSON", n, written["json"], t_astropy_write)


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 300_000)
