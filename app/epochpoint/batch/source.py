"""The catalogue a batch reads: Parquet files found from a file, a folder or a glob, their
columns matched to ours, and their rows cut into pieces of at most a partition's size.

Only the files' footers are read here (on the client); the rows themselves are read by
`read_piece`, inside whichever thread or worker computes that piece. Column names follow the
target files' vocabulary (io/targetcolumns.py): our names, or the Gaia archive's (`source_id`,
`ra`, `dec`, `pmra`, `pmdec`, `parallax`, `radial_velocity`, `ref_epoch`, `ra_error`,
`ra_dec_corr`, ...), in the units the Gaia archive uses. A file may state one epoch for all
its rows with the key-value metadata `catalogue_epoch`, as a target file may.
"""
from __future__ import annotations

import glob
import os
from dataclasses import dataclass

import pyarrow as pa
import pyarrow.parquet as pq

from ..io.errors import InputError
from ..io.targetcolumns import NAME_SOURCES, match_columns
from ..io.targetchecks import CATALOGUE_EPOCH_KEY

# Rows read from a file at a time while a piece is cut out of a larger row group.
READ_BATCH_ROWS = 65536


@dataclass(frozen=True)
class Piece:
    """Rows [start, stop) of one Parquet file (0-based, in file order): one partition."""

    path: str
    start: int
    stop: int
    catalogue_epoch: str | None  # the file's stated epoch for all rows, if any


@dataclass(frozen=True)
class Catalogue:
    """The input files, how their columns map to ours, and the pieces to compute."""

    files: tuple
    id_column: str  # the input's id column, kept in the output
    known: dict  # our name -> the column's label in the files (id column excluded)
    labels: tuple  # every column label of the first file
    pieces: tuple

    @property
    def rows(self) -> int:
        return sum(p.stop - p.start for p in self.pieces)


def find_files(spec: str) -> list:
    """Absolute paths of the Parquet files named by a file, a folder (its *.parquet files,
    sorted, subfolders included) or a glob pattern."""
    if os.path.isdir(spec):
        found = glob.glob(os.path.join(spec, "**", "*.parquet"), recursive=True)
    elif glob.has_magic(spec):
        found = [p for p in glob.glob(spec, recursive=True) if os.path.isfile(p)]
    elif os.path.exists(spec):
        found = [spec]
    else:
        raise InputError(spec, "does not exist")
    if not found:
        raise InputError(spec, "holds no Parquet files (*.parquet)")
    return sorted(os.path.abspath(p) for p in found)


def _open(path: str) -> pq.ParquetFile:
    try:
        return pq.ParquetFile(path)
    except (pa.ArrowException, OSError) as err:
        raise InputError(path, f"is not a readable Parquet file ({' '.join(str(err).split())})"
                         ) from None


def _stated_epoch(schema: pa.Schema) -> str | None:
    for key, value in (schema.metadata or {}).items():
        if key.decode("utf-8", "replace").strip().lower() == CATALOGUE_EPOCH_KEY:
            return value.decode("utf-8", "replace")
    return None


def _match(path: str, labels: list) -> tuple[str, dict]:
    """(id column label, {our name: label}) for one file's columns."""
    try:
        known, _ = match_columns(labels)
    except ValueError as err:
        raise InputError(path, str(err)) from None
    for needed in ("ra", "dec"):
        if needed not in known:
            raise InputError(path, f"has no {needed} column (columns: {', '.join(labels)[:60]})")
    if "name" not in known:
        raise InputError(path, f"has no id column ({', '.join(NAME_SOURCES)}); the output "
                               "keeps it to tell the rows apart")
    id_label = labels[known.pop("name")]
    return id_label, {ours: labels[i] for ours, i in known.items()}


def _spans(row_groups: list, limit: int) -> list:
    """(start, stop) row spans of at most `limit` rows, cut at row-group boundaries where the
    groups allow (a group larger than the limit is cut into equal slices)."""
    spans, start, stop = [], 0, 0
    for n in row_groups:
        if stop > start and stop - start + n > limit:
            spans.append((start, stop))
            start = stop
        if n > limit:
            slices = -(-n // limit)
            cuts = [stop + n * k // slices for k in range(slices + 1)]
            spans += list(zip(cuts[:-1], cuts[1:]))
            start = stop = stop + n
        else:
            stop += n
    if stop > start:
        spans.append((start, stop))
    return spans


def open_catalogue(spec: str, partition_rows: int) -> Catalogue:
    """The Catalogue of INPUT `spec`; every file must have the first file's known columns."""
    files = find_files(spec)
    first = None
    pieces = []
    for path in files:
        parquet = _open(path)
        labels = list(parquet.schema_arrow.names)
        matched = _match(path, labels)
        if first is None:
            first = (matched, labels)
        elif matched != first[0]:
            raise InputError(path, f"has other columns than {files[0]} "
                                   f"(id {matched[0]!r}, {sorted(matched[1].values())})")
        meta = parquet.metadata
        groups = [meta.row_group(i).num_rows for i in range(meta.num_row_groups)]
        epoch = _stated_epoch(parquet.schema_arrow)
        pieces += [Piece(path, a, b, epoch) for a, b in _spans(groups, partition_rows)]
    (id_label, known), labels = first
    if not pieces:
        raise InputError(spec, "has no rows")
    return Catalogue(tuple(files), id_label, known, tuple(labels), tuple(pieces))


def read_piece(piece: Piece, columns: list) -> pa.Table:
    """The rows of one piece, only the given columns, read a row group slice at a time."""
    parquet = pq.ParquetFile(piece.path)
    meta = parquet.metadata
    # The row groups that overlap the piece, and the row where the first of them begins.
    groups, first_row, row = [], None, 0
    for i in range(meta.num_row_groups):
        n = meta.row_group(i).num_rows
        if row < piece.stop and row + n > piece.start:
            groups.append(i)
            first_row = row if first_row is None else first_row
        row += n
    parts, row = [], first_row or 0
    for batch in parquet.iter_batches(batch_size=READ_BATCH_ROWS, row_groups=groups,
                                      columns=columns, use_threads=False):
        lo, hi = max(piece.start, row), min(piece.stop, row + batch.num_rows)
        if hi > lo:
            parts.append(batch.slice(lo - row, hi - lo))
        row += batch.num_rows
        if row >= piece.stop:
            break
    schema = parquet.schema_arrow
    schema = pa.schema([schema.field(c) for c in columns])
    return pa.Table.from_batches(parts, schema=schema)
