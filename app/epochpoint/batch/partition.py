"""One partition of a batch: its rows read, turned into Targets, handed to the core function,
and the answer laid out as output columns.

The rows go through the same reading rules as a target file (io/targetrows.py): a null cell
means "not given" (zero motion, unknown error), a parallax of zero or less means an unknown
distance, a moving row needs its epoch. A row those rules refuse (NaN or infinite values, an
angle out of range, a moving row without an epoch) is not computed: its result columns are
null and the `problem` column says why ("" on every good row). The good rows are computed
together as one Targets by the core's own `positions` or `drift`, so each answer equals the
single-process answer bit for bit.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from ..core.context import AstrometryContext
from ..core.drift import drift
from ..core.positions import positions
from ..core.targets import Targets
from ..core.timescale import StaleEarthOrientation
from ..io.errors import InputError, TargetValueWarning
from ..io.targetrows import RawColumn, RawTable, build_targets
from .source import Catalogue, Piece, read_piece

PROBLEM_COLUMN = "problem"
_ARROW_TYPES = {"f": pa.float64(), "b": pa.bool_(), "O": pa.string()}


class BatchError(ValueError):
    """A partition that could not be computed: names its file and rows, and the cause."""


@dataclass(frozen=True)
class PositionsJob:
    """`positions` at one instant: the context is built once, on the client, and so is the
    engine (core/kernels.py), so that every partition, whatever its size, is computed as the
    whole catalogue would be in one call."""

    context: AstrometryContext
    ledger: bool = False
    engine: str = "numpy"

    def answer(self, targets: Targets):
        return positions(targets, None, self.context.time, ledger=self.ledger,
                         context=self.context, engine=self.engine)

    def keep_rows(self, columns: dict) -> None:
        return None  # every row is written


@dataclass(frozen=True)
class DriftJob:
    """`drift` against a tolerance at one instant (resolved once, on the client)."""

    context: AstrometryContext
    tolerance_arcsec: float
    every_row: bool = False

    def answer(self, targets: Targets):
        return drift(targets, self.context.time, self.tolerance_arcsec)

    def keep_rows(self, columns: dict):
        """Rows over the tolerance, and rows with a problem (unless every row is wanted)."""
        if self.every_row:
            return None
        over = columns["over_tolerance"].fill_null(False)
        return pc.or_(over, pc.not_equal(columns[PROBLEM_COLUMN], ""))


def describe_results(job, catalogue: Catalogue) -> tuple[list, dict, dict]:
    """([(name, arrow type)], units, meta) of the job's result columns, found by asking the
    core about one invented star (with error columns when the catalogue has them)."""
    errors = {ours: [0.1] for ours in catalogue.known if ours.endswith(("_error", "_corr"))}
    star = Targets.from_columns(ra=[10.0], dec=[20.0], pm_ra_cosdec=1.0, pm_dec=1.0,
                                parallax=1.0, epoch=2016.0, errors=errors)
    table = job.answer(star)
    fields = [(name, _ARROW_TYPES[np.asarray(table[name]).dtype.kind])
              for name in table if name != "name"]
    meta = {k: v for k, v in table.meta.items() if k != "targets_distance_unknown"}
    if hasattr(job, "engine"):
        meta["engine"] = job.engine
    return fields, dict(table.units), meta


@dataclass(frozen=True)
class PartitionTask:
    """What each partition runs: read the piece, compute, lay out the output columns."""

    job: object  # PositionsJob or DriftJob
    catalogue: Catalogue
    results: tuple  # the result columns written, in order
    carried: tuple  # input columns written unchanged beside the id
    schema: pa.Schema  # of the output

    def __call__(self, piece: Piece):
        # Rows are checked one by one here and flagged; the client already warned about
        # the instant's Earth-orientation data.
        warnings.filterwarnings("ignore", category=TargetValueWarning)
        warnings.filterwarnings("ignore", category=StaleEarthOrientation)
        # Far crossings make ERFA doubt its leap seconds (as the command line, quietly).
        warnings.filterwarnings("ignore", module="erfa")
        try:
            return self.compute(piece).to_pandas(types_mapper=_arrow_dtype)
        except BatchError:
            raise
        except Exception as err:  # any failure names the partition it happened in
            raise BatchError(f"{piece.path}, rows {piece.start + 1}-{piece.stop}: "
                             f"{type(err).__name__}: {' '.join(str(err).split())}") from None

    def compute(self, piece: Piece) -> pa.Table:
        cat = self.catalogue
        wanted = list(dict.fromkeys([cat.id_column, *self.carried, *cat.known.values()]))
        rows = read_piece(piece, wanted)
        n = rows.num_rows
        targets, kept, problems = _targets(rows, piece, cat)
        out = {cat.id_column: rows[cat.id_column]}
        out.update({label: rows[label] for label in self.carried})
        answer = self.job.answer(targets) if targets is not None else None
        bad = None if kept is None else np.ones(n, dtype=bool)
        if bad is not None:
            bad[kept] = False
        for name in self.results:
            out[name] = _result_column(None if answer is None else answer[name], kept, bad, n,
                                       self.schema.field(name).type)
        problem_text = np.full(n, "", dtype=object)
        for i, text in problems.items():
            problem_text[i] = text
        out[PROBLEM_COLUMN] = pa.array(problem_text, type=pa.string())
        keep = self.job.keep_rows(out)
        table = pa.table(out).cast(self.schema)
        return table if keep is None else table.filter(keep)


def _arrow_dtype(arrow_type):
    import pandas as pd

    return pd.ArrowDtype(arrow_type)


def _raw_column(label: str, column: pa.ChunkedArray) -> RawColumn:
    """A file column as the target-row rules take it: numbers (nulls as NaN) or text cells."""
    missing = column.is_null().to_numpy(zero_copy_only=False)
    kind = column.type
    if pa.types.is_integer(kind) or pa.types.is_floating(kind) or pa.types.is_decimal(kind):
        values = column.cast(pa.float64()).to_numpy(zero_copy_only=False)
    elif pa.types.is_string(kind) or pa.types.is_large_string(kind):
        values = np.asarray(column.fill_null("").to_numpy(zero_copy_only=False), dtype=object)
    else:
        raise InputError(None, f"holds {kind} values, not numbers or text", column=label)
    return RawColumn(label, values, missing)


def _targets(rows: pa.Table, piece: Piece, cat: Catalogue):
    """(Targets of the good rows or None, their indices or None when all are good,
    {row index: problem text})."""
    n = rows.num_rows
    raw = RawTable(path=piece.path, row_numbers=np.arange(piece.start + 1, piece.stop + 1),
                   row_word="row",
                   columns={ours: _raw_column(label, rows[label])
                            for ours, label in cat.known.items()},
                   catalogue_epoch=None if piece.catalogue_epoch is None
                   else (piece.catalogue_epoch, None))
    refused: list = []
    try:
        targets = build_targets(raw, skip_bad_rows=True, on_skip=refused.append)
    except InputError:
        if len(refused) != n:
            raise
        targets = None  # every row of the partition was refused
    problems = {err.line - piece.start - 1: (f"column {err.column}: {err.message}"
                                             if err.column else err.message)
                for err in refused}
    if not problems:
        return targets, None, problems
    kept = np.ones(n, dtype=bool)
    kept[list(problems)] = False
    return targets, np.flatnonzero(kept), problems


def _result_column(values, kept, bad, n: int, kind: pa.DataType) -> pa.Array:
    """One result column over all rows of the partition: null where the row was refused."""
    if values is None:
        return pa.nulls(n, type=kind)
    values = np.asarray(values)
    if kept is None:
        return pa.array(values, type=kind, from_pandas=kind == pa.string())
    full = np.empty(n, dtype=values.dtype)
    if values.dtype == object:
        full[:] = None
    full[kept] = values
    return pa.array(full, type=kind, mask=bad)
