"""The two batch computations as a script or the command line asks for them: positions and
drift of a Parquet catalogue, written to a Parquet dataset (run.py says how they run)."""
from __future__ import annotations

from ..core.context import make_context
from ..core.drift import MAX_TOLERANCE_ARCSEC
from ..core.kernels import use_kernel
from ..core.ranges import checked
from ..core.site import Site
from .dataset import check_output
from .partition import DriftJob, PositionsJob
from .run import DEFAULT_PARTITION_ROWS, BatchSummary, plan_task, run_batch
from .source import open_catalogue


def _checked_rows(partition_rows) -> int:
    rows = int(checked(partition_rows, "partition rows", 1, 1e9))
    return rows


def batch_positions(source: str, when, output, *, site: Site | None = None,
                    ledger: bool = False, columns=None, scheduler: str | None = None,
                    partition_rows: int = DEFAULT_PARTITION_ROWS, threads: int | None = None,
                    progress: bool | None = None) -> BatchSummary:
    """`positions` of every row of a Parquet catalogue (file, folder or glob) at `when`,
    written to the Parquet dataset `output`: the id column, the result columns (all, or
    `columns`, which may also name input columns to carry along) and `problem`.

    The instant ('now' included) and its context are fixed once, here, for every partition.
    """
    catalogue = open_catalogue(source, _checked_rows(partition_rows))
    check_output(output)
    # The engine a single call on the whole catalogue would use, for every partition.
    engine = "kernel" if use_kernel(catalogue.rows, ledger=ledger) else "numpy"
    job = PositionsJob(make_context(when, site), ledger=ledger, engine=engine)
    return run_batch(plan_task(job, catalogue, columns), output, scheduler=scheduler,
                     threads=threads, progress=progress)


def batch_drift(source: str, when, tolerance_arcsec: float, output, *, every_row: bool = False,
                columns=None, scheduler: str | None = None,
                partition_rows: int = DEFAULT_PARTITION_ROWS, threads: int | None = None,
                progress: bool | None = None) -> BatchSummary:
    """`drift` of every row of a Parquet catalogue against a tolerance at `when`, written to
    the Parquet dataset `output`: rows over the tolerance and rows with a problem (every row
    with every_row=True)."""
    tolerance = checked(tolerance_arcsec, "tolerance", 0.0, MAX_TOLERANCE_ARCSEC, lo_open=True,
                        hi_open=True, unit="arcsec")
    catalogue = open_catalogue(source, _checked_rows(partition_rows))
    check_output(output)
    job = DriftJob(make_context(when), tolerance, every_row=every_row)
    return run_batch(plan_task(job, catalogue, columns), output, scheduler=scheduler,
                     threads=threads, progress=progress)
