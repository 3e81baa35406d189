"""Running a batch with Dask: the catalogue's pieces become the partitions of a
dask.dataframe (each read with pyarrow and answered by the core where it is computed), each
partition is written as one part file, and only a small frame of counts comes back.

Local threads in this process by default; with a scheduler address the same graph runs on an
existing dask.distributed cluster, and the engine runs inside its workers. Memory is bounded
by the partition size: a thread (or worker thread) holds one partition's input and answer.
"""
from __future__ import annotations

import os
import sys
import time
from dataclasses import dataclass

import dask
import dask.dataframe as dd
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
from dask.callbacks import Callback

from .dataset import OutputFolder, output_schema, write_part
from .partition import PROBLEM_COLUMN, PartitionTask, describe_results
from .source import Catalogue

DEFAULT_PARTITION_ROWS = 1_000_000
# How long to wait for the scheduler to answer before giving up.
CONNECT_TIMEOUT_S = 10
_COUNTS = pd.DataFrame({"rows": pd.Series([], dtype="int64"),
                        "problems": pd.Series([], dtype="int64"),
                        "first_problem": pd.Series([], dtype=object)})


@dataclass
class BatchSummary:
    """What a finished batch did: rows read and written, flagged rows, partitions, time."""

    rows: int
    rows_written: int
    problems: int
    first_problem: str
    partitions: int
    seconds: float
    output: str

    def line(self) -> str:
        rate = self.rows / self.seconds if self.seconds > 0 else float("inf")
        text = (f"{self.rows} rows in {self.partitions} partition(s) to {self.output} "
                f"({self.rows_written} written) in {self.seconds:.1f} s ({rate:,.0f} rows/s); ")
        if not self.problems:
            return text + "no row with a problem"
        return (text + f"{self.problems} row(s) with a problem, flagged in column "
                       f"{PROBLEM_COLUMN} (first: {self.first_problem})")


def check_columns(wanted, results: list, catalogue: Catalogue) -> tuple[tuple, tuple]:
    """(result columns, carried input columns) for --columns (None: every result column)."""
    if not wanted:
        return tuple(results), ()
    unknown = [c for c in wanted if c not in results and c not in catalogue.labels]
    if unknown:
        raise ValueError(f"--columns: {unknown[0]!r} is neither a result column "
                         f"({', '.join(results)}) nor an input column")
    carried = tuple(c for c in wanted if c not in results and c != catalogue.id_column)
    return tuple(c for c in wanted if c in results), carried


def plan_task(job, catalogue: Catalogue, columns=None) -> PartitionTask:
    """The task every partition runs, with the output schema, its units and meta."""
    fields, units, meta = describe_results(job, catalogue)
    results, carried = check_columns(columns, [name for name, _ in fields], catalogue)
    types = dict(fields)
    given = pq.read_schema(catalogue.files[0])
    schema = output_schema([(c, given.field(c).type) for c in (catalogue.id_column, *carried)]
                           + [(c, types[c]) for c in results] + [(PROBLEM_COLUMN, pa.string())],
                           meta, units)
    return PartitionTask(job, catalogue, results, carried, schema)


class _PartitionTicks(Callback):
    """Advances a progress bar as each partition's part file is written (local threads)."""

    def __init__(self, keys, bar):
        super().__init__()
        self.keys, self.bar = set(keys), bar

    def _posttask(self, key, result, dsk, state, worker_id):
        if key in self.keys:
            self.bar.update(1)


def _progress_bar(total: int, show: bool | None):
    from tqdm import tqdm

    show = sys.stderr.isatty() if show is None else show
    return tqdm(total=total, unit="partition", file=sys.stderr, disable=not show,
                desc="epochpoint batch")


def _run_local(parts, bar, threads: int | None) -> list:
    with _PartitionTicks([p.key for p in parts], bar):
        return list(dask.compute(*parts, scheduler="threads", num_workers=threads))


def _run_on_cluster(parts, bar, address: str) -> list:
    from distributed import Client, as_completed

    try:
        client = Client(address, timeout=CONNECT_TIMEOUT_S)
    except (OSError, TimeoutError) as err:
        raise OSError(f"cannot reach the Dask scheduler at {address} ({err})") from None
    with client:
        futures = client.compute(parts)
        try:
            for future in as_completed(futures):
                future.result()  # a failed partition stops the batch here, with its cause
                bar.update(1)
            return client.gather(futures)
        finally:
            client.cancel(futures)


def run_batch(task: PartitionTask, output, *, scheduler: str | None = None,
              threads: int | None = None, progress: bool | None = None) -> BatchSummary:
    """Compute every partition and write the output dataset (see module docstring).

    `progress` None shows a bar when stderr is a terminal. Returns the summary; a partition
    that fails stops the batch (BatchError naming it) and leaves OUTPUT as it was.
    """
    start = time.perf_counter()
    pieces = task.catalogue.pieces
    meta = task.schema.empty_table().to_pandas(types_mapper=pd.ArrowDtype)
    answers = dd.from_map(task, pieces, meta=meta, enforce_metadata=False,
                          label="epochpoint-partition")
    with OutputFolder(output) as folder:
        written = answers.map_partitions(write_part, folder.partial, task.schema,
                                         task.catalogue.id_column, partition_info=True,
                                         meta=_COUNTS, enforce_metadata=False,
                                         align_dataframes=False)
        parts = written.to_delayed()
        with _progress_bar(len(parts), progress) as bar:
            counts = (_run_on_cluster(parts, bar, scheduler) if scheduler
                      else _run_local(parts, bar, threads))
        folder.commit()
    counts = pd.concat(counts, ignore_index=True)
    flagged = counts[counts["problems"] > 0]
    return BatchSummary(rows=task.catalogue.rows, rows_written=int(counts["rows"].sum()),
                        problems=int(counts["problems"].sum()),
                        first_problem=str(flagged["first_problem"].iloc[0]) if len(flagged)
                        else "", partitions=len(parts),
                        seconds=time.perf_counter() - start, output=os.fspath(output))
