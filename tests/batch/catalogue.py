"""Invented catalogues for the batch tests, written as Parquet (seeded, so a failure replays).

Stars are spread over the whole sky with proper motions, parallaxes and radial velocities of
realistic size; about 1% of the Gaia-style rows have null motion and parallax (a two-parameter
solution), and about 5% a negative parallax, as in the Gaia archive (from memory).
"""
from __future__ import annotations

import json

import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq

from epochpoint.core.targets import Targets

WHEN = "2027-01-20T23:10:00Z"
SITE_SPEC = "-24.6,-70.4,2635"
SEED = 20270120


def gaia_columns(n: int, seed: int = SEED, errors: bool = False) -> dict:
    """Columns with the Gaia archive's names (numpy arrays; NaN where the archive has null)."""
    rng = np.random.default_rng(seed)
    parallax = 10.0 ** rng.uniform(-1.0, 1.5, n) * np.where(rng.random(n) < 0.05, -0.1, 1.0)
    cols = {"source_id": rng.choice(2**62, n, replace=False).astype(np.int64),
            "ra": rng.uniform(0.0, 360.0, n),
            "dec": np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n))),
            "pmra": rng.normal(0.0, 30.0, n), "pmdec": rng.normal(0.0, 30.0, n),
            "parallax": parallax, "radial_velocity": rng.normal(0.0, 40.0, n),
            "ref_epoch": np.full(n, 2016.0)}
    two_parameter = rng.random(n) < 0.01
    for name in ("pmra", "pmdec", "parallax"):
        cols[name][two_parameter] = np.nan
    if errors:
        for name in ("ra_error", "dec_error", "parallax_error", "pmra_error", "pmdec_error"):
            cols[name] = rng.uniform(0.01, 0.5, n)
        cols["ra_dec_corr"] = rng.uniform(-0.5, 0.5, n)
    return cols


def arrow_table(cols: dict) -> pa.Table:
    """NaN becomes null, as in the Gaia archive's files."""
    return pa.table({k: pa.array(v, from_pandas=True) for k, v in cols.items()})


def write_files(cols: dict, folder, sizes: list, row_group_size: int) -> list:
    """Split the rows into files of the given sizes (in order); returns their paths."""
    folder.mkdir(parents=True, exist_ok=True)
    table, paths, start = arrow_table(cols), [], 0
    for i, size in enumerate(sizes):
        path = folder / f"extract-{i:02d}.parquet"
        pq.write_table(table.slice(start, size), path, row_group_size=row_group_size)
        paths.append(path)
        start += size
    return paths


def expected_targets(cols: dict, rows=slice(None)) -> Targets:
    """The same stars built directly with the core's Targets, following the target-file
    rules by hand: null motion or parallax is zero, a parallax below zero means an unknown
    distance (parallax 0; io/targetchecks.py)."""
    def zero_nan(name):
        return np.nan_to_num(cols[name][rows], nan=0.0)

    errors = {ours: cols[gaia][rows] for gaia, ours in
              (("ra_error", "ra_error"), ("dec_error", "dec_error"),
               ("parallax_error", "parallax_error"), ("pmra_error", "pm_ra_cosdec_error"),
               ("pmdec_error", "pm_dec_error"), ("ra_dec_corr", "ra_dec_corr")) if gaia in cols}
    return Targets.from_columns(ra=cols["ra"][rows], dec=cols["dec"][rows],
                                pm_ra_cosdec=zero_nan("pmra"), pm_dec=zero_nan("pmdec"),
                                parallax=np.maximum(zero_nan("parallax"), 0.0),
                                radial_velocity=zero_nan("radial_velocity"),
                                epoch=cols["ref_epoch"][rows], errors=errors)


def assert_same_columns(got, expected, names, where=""):
    """Every named column equal bit for bit (NaN where NaN)."""
    for name in names:
        a, b = np.asarray(got[name]), np.asarray(expected[name])
        if a.dtype.kind == "f":
            same = (a.view(np.int64) == b.view(np.int64)) | (np.isnan(a) & np.isnan(b))
        else:
            same = a == b
        assert same.all(), (f"{where}column {name}: {np.count_nonzero(~same)} rows differ, "
                            f"first at row {np.flatnonzero(~same)[0]}")


def engine_of(table) -> str:
    """The engine the batch computed with, from the dataset's metadata (core/kernels.py)."""
    return json.loads(table.schema.metadata[b"epochpoint"])["engine"]
