"""Catalogue-scale batches on Dask: an adapter like cli/ and gui/.

It cuts a Parquet catalogue into partitions (dask.dataframe over pyarrow), hands each
partition to the same core function as a `Targets` (core.positions.positions,
core.drift.drift) and writes what comes back as a Parquet dataset. The core never imports
Dask; a partition's answer equals the single-process answer bit for bit. Local threads by
default, or an existing dask.distributed cluster given its scheduler's address::

    from epochpoint.batch import batch_positions
    summary = batch_positions("gaia_extract/", "2027-01-20T23:10:00Z", "positions_out",
                              site=site, scheduler="tcp://10.0.0.5:8786")
    print(summary.line())

Modules: source.py (input files, columns, pieces), partition.py (one partition through the
core), dataset.py (the output folder), run.py (the Dask graph, progress), api.py (the calls).
"""
from .api import batch_drift, batch_positions
from .partition import PROBLEM_COLUMN, BatchError
from .run import DEFAULT_PARTITION_ROWS, BatchSummary

__all__ = ["batch_positions", "batch_drift", "BatchSummary", "BatchError", "PROBLEM_COLUMN",
           "DEFAULT_PARTITION_ROWS"]
