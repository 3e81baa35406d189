"""From the cells of a target file to validated `Targets`, one bad row at a time.

The file readers (CSV, ECSV/VOTable) hand over a `RawTable`: per known column either text
cells or numbers already in our units, with a mask of empty/masked cells. This module applies
one rule per column (how to parse text, what an empty cell means, which values are out of
range), collects the first problem of every row, then either raises it as an `InputError` or,
with skip_bad_rows, reports each bad row and leaves it out. FK5/FK4 rows are converted to ICRS
last, on the good rows only.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from epochpoint.core.targets import CORRELATION_COLUMNS, ERROR_COLUMNS, TargetError, Targets

from .angles import parse_ra, parse_dec
from .epochs import EPOCH_MAX_YEAR, EPOCH_MIN_YEAR, parse_epoch
from .errors import InputError, SkippedRowWarning, quote
from .frames import convert_to_icrs, parse_equinox, parse_frame
from .eventfields import EVENT_PARSERS
from .planningfields import PARSERS
from .timeconstraintfields import check_time_cells
from .targetchecks import DEFAULT_EPOCH_JYEAR, fill_epochs, warn_about_rows
from .targetcolumns import ASTROMETRY_COLUMNS, UNCERTAINTY_COLUMNS


@dataclass
class RawColumn:
    """One known column as read: `values` are text cells (object array of str) or numbers
    already in our units; `missing` marks empty or masked cells."""

    label: str  # the column's name as written in the file
    values: np.ndarray
    missing: np.ndarray
    # For numbers read from text (csvcolumns.py): row index -> the cell's text, for messages.
    cell_text: Callable[[int], str] | None = None


@dataclass
class RawTable:
    """A target file's rows before validation (see module docstring)."""

    path: str
    row_numbers: np.ndarray  # per row: line in the file, or data row number
    row_word: str  # "line" or "row", how row_numbers are named in messages
    columns: dict  # canonical name -> RawColumn
    extra: dict = field(default_factory=dict)  # label -> array, carried along untouched
    # Problems the reader found (e.g. a wrong cell count): row index -> (label, message).
    row_problems: dict = field(default_factory=dict)
    # The file's one epoch for all rows, as (text, line or None), when it states one
    # (targetchecks.py says how each format states it).
    catalogue_epoch: tuple | None = None

    def __len__(self) -> int:
        return len(self.row_numbers)


def parse_number(text: str) -> float:
    """A float from a cell, ValueError with a short message otherwise."""
    try:
        return float(text)
    except ValueError:
        raise ValueError(f"{quote(text)} is not a number") from None


@dataclass(frozen=True)
class ColumnRule:
    """How one column is read: text parser, value of an empty cell (None: required), whether
    NaN also means "unknown", and a range check with its message."""

    parse: Callable[[str], float] = parse_number
    if_missing: float | None = 0.0
    nan_means_missing: bool = False
    out_of_range: Callable[[np.ndarray], np.ndarray] | None = None
    range_message: str = ""


RULES = {
    "ra": ColumnRule(parse_ra, None, False, lambda v: (v < 0.0) | (v >= 360.0),
                     "is outside [0, 360) degrees"),
    "dec": ColumnRule(parse_dec, None, False, lambda v: np.abs(v) > 90.0,
                      "is outside [-90, +90] degrees"),
    "epoch": ColumnRule(parse_epoch, DEFAULT_EPOCH_JYEAR, False,
                        lambda v: (v < EPOCH_MIN_YEAR) | (v > EPOCH_MAX_YEAR),
                        f"is outside the years {EPOCH_MIN_YEAR:.0f} to {EPOCH_MAX_YEAR:.0f}"),
    "pm_ra_cosdec": ColumnRule(),
    "pm_dec": ColumnRule(),
    # Zero or negative: distance unknown (targetchecks.warn_about_rows).
    "parallax": ColumnRule(),
    "radial_velocity": ColumnRule(),
    **{col: ColumnRule(parse_number, np.nan, True, lambda v: v < 0.0,
                       "is negative (an error must be 0 or more)") for col in ERROR_COLUMNS},
    **{col: ColumnRule(parse_number, np.nan, True, lambda v: np.abs(v) > 1.0,
                       "is outside [-1, 1]") for col in CORRELATION_COLUMNS},
}


def parse_column(column: RawColumn, rule: ColumnRule) -> tuple[np.ndarray, dict]:
    """(float values, {row index: message}) for one column under its rule."""
    n = len(column.missing)
    values = np.full(n, np.nan)
    problems: dict[int, str] = {}
    present = ~column.missing
    if column.values.dtype.kind in "biuf":
        values[present] = column.values[present].astype(float)
        shown = lambda i: quote(repr(float(values[i])) if column.cell_text is None  # noqa: E731
                                else column.cell_text(i))
    else:
        texts = column.values
        rows = np.flatnonzero(present)
        try:  # fast path: a column of plain numbers
            values[rows] = texts[rows].astype(float)
        except (ValueError, TypeError):
            for i in rows:
                try:
                    values[i] = rule.parse(texts[i])
                except ValueError as err:
                    problems[int(i)] = str(err)
        shown = lambda i: quote(texts[i])  # noqa: E731
    missing = column.missing.copy()
    if rule.nan_means_missing:
        missing |= present & np.isnan(values) & ~_mask(problems, n)
        present = ~missing
    checks = [(~np.isfinite(values), "is not a finite number")]
    if rule.out_of_range is not None:
        with np.errstate(invalid="ignore"):
            checks.append((np.isfinite(values) & rule.out_of_range(values), rule.range_message))
    for bad, message in checks:
        for i in np.flatnonzero(bad & present & ~_mask(problems, n)):
            problems[int(i)] = f"{shown(i)} {message}"
    if rule.if_missing is None:
        for i in np.flatnonzero(missing):
            problems[int(i)] = "no value given (the column needs one on every row)"
    else:
        values[missing] = rule.if_missing
    return values, problems


def _mask(rows: dict, n: int) -> np.ndarray:
    mask = np.zeros(n, dtype=bool)
    mask[list(rows)] = True
    return mask


def _text_cells(column: RawColumn) -> list[str]:
    """The cells of a column as stripped text ('' where missing)."""
    if column.values.dtype == object:  # text cells, the usual case: one pass
        cells = column.values.tolist()
        if all(type(cell) is str for cell in cells):
            out = [cell.strip() for cell in cells]
            for i in np.flatnonzero(column.missing).tolist():
                out[i] = ""
            return out
    out = []
    for value, missing in zip(column.values, column.missing):
        out.append("" if missing else (repr(float(value)) if isinstance(value, (float, np.floating))
                                       else str(value)).strip())
    return out


def _fallback_names(n: int) -> np.ndarray:
    """T1, T2, ... by data row, so a name stays the same when other rows are skipped."""
    return np.array([f"T{i + 1}" for i in range(n)], dtype=object)


def _names(raw: RawTable) -> tuple[np.ndarray | None, list]:
    """Target names (None when the file has no name column) and names for messages."""
    column = raw.columns.get("name")
    if column is None:
        return None, [None] * len(raw)
    given = _text_cells(column)
    names = np.array(given, dtype=object)
    unnamed = np.flatnonzero(names == "")
    if unnamed.size:  # T1, T2, ... by data row where the cell is empty
        names[unnamed] = _fallback_names(len(raw))[unnamed]
    return names, [g or None for g in given]


def _frames(raw: RawTable, note) -> tuple[np.ndarray, np.ndarray]:
    """Per-row frame and canonical equinox strings; problems go to note(row, label, message).

    Each distinct (frame, equinox) text is parsed once: a file repeats a handful of them.
    """
    n = len(raw)
    frames, equinoxes = np.full(n, "icrs", dtype=object), np.full(n, "", dtype=object)
    frame_col, equinox_col = raw.columns.get("frame"), raw.columns.get("equinox")
    if frame_col is None:
        return frames, equinoxes  # without a frame column every row is ICRS
    equinox_text = _text_cells(equinox_col) if equinox_col else [""] * n
    parsed: dict = {}
    for i, key in enumerate(zip(_text_cells(frame_col), equinox_text)):
        if key not in parsed:
            parsed[key] = _parse_frame_pair(*key, frame_col.label,
                                            equinox_col.label if equinox_col else "equinox")
        frames[i], equinoxes[i], problem = parsed[key]
        if problem is not None:
            note(i, *problem)
    return frames, equinoxes


def _parse_frame_pair(frame_text: str, equinox_text: str, frame_label: str, equinox_label: str):
    """(frame, equinox, problem): problem is None or (column label, message)."""
    try:
        frame = parse_frame(frame_text)
    except ValueError as err:
        return "icrs", "", (frame_label, str(err))
    try:
        return frame, parse_equinox(equinox_text, frame), None
    except ValueError as err:
        return "icrs", "", (equinox_label, str(err))


def _check_planning_fields(raw: RawTable, note) -> None:
    """Priority, exposure and repeats cells are checked on reading (planningfields.py), so a
    typo is reported with its file line; the values themselves stay in the extras."""
    for label, cells in raw.extra.items():
        name = str(label).strip().lower()
        parse = PARSERS.get(name) or EVENT_PARSERS.get(name)
        if parse is None or name in ("notes", "event_kind"):
            continue
        for i, cell in enumerate(cells):
            try:
                parse(cell)
            except ValueError as err:
                note(i, label, str(err))


def warn_skipped(error: InputError) -> None:
    """The default report of a skipped row: a warning with the error's one-line text."""
    warnings.warn(str(error), SkippedRowWarning, stacklevel=4)


def build_targets(raw: RawTable, skip_bad_rows: bool = False, on_skip=None) -> Targets:
    """Validated ICRS `Targets` from a RawTable (see module docstring)."""
    from .bodyfields import fill_body_rows
    from .hipnames import fill_hipparcos_rows  # rows named 'HIP n' without coordinates

    raw = fill_hipparcos_rows(raw)
    names, message_names = _names(raw)
    problems: dict[int, InputError] = {}

    def note(i: int, label, message: str) -> None:
        if i not in problems:  # the first problem of a row is the one reported
            problems[i] = InputError(raw.path, message, line=int(raw.row_numbers[i]),
                                     column=label, target=message_names[i],
                                     row_word=raw.row_word)

    for i, (label, message) in raw.row_problems.items():
        note(i, label, message)
    # Solar-system rows (a body or elements): cells checked, RA/Dec placeholders given.
    raw = fill_body_rows(raw, note, message_names)
    values = {}
    for canonical in ASTROMETRY_COLUMNS + UNCERTAINTY_COLUMNS:
        column = raw.columns.get(canonical)
        if column is None:
            continue
        values[canonical], column_problems = parse_column(column, RULES[canonical])
        for i, message in column_problems.items():
            note(i, column.label, message)
    # A moving row needs an epoch: its cell, or the one the file states for all rows.
    fill_epochs(raw, values, note)
    frames, equinoxes = _frames(raw, note)
    _check_planning_fields(raw, note)
    check_time_cells(raw.extra, note)  # not_before/not_after and phase windows

    keep = np.ones(len(raw), dtype=bool)
    for i in sorted(problems):
        if not skip_bad_rows:
            raise problems[i]
        (on_skip or warn_skipped)(problems[i])
        keep[i] = False
    if not keep.any():
        raise InputError(raw.path, f"no usable targets: all {len(raw)} rows have errors")
    warn_about_rows(raw, values, message_names, keep)
    return _assemble(raw, names, values, frames, equinoxes, keep)


def _motion_given(raw: RawTable) -> np.ndarray:
    """Per row: True where a proper-motion cell is filled (an FK4 row without one is read as
    at rest in FK5, see frames.py)."""
    given = np.zeros(len(raw), dtype=bool)
    for canonical in ("pm_ra_cosdec", "pm_dec"):
        if canonical in raw.columns:
            given |= ~np.asarray(raw.columns[canonical].missing, dtype=bool)
    return given


def _assemble(raw, names, values, frames, equinoxes, keep) -> Targets:
    """Targets from the good rows, with FK5/FK4 rows converted to ICRS."""
    n_kept = int(keep.sum())
    all_kept = n_kept == len(keep)
    if all_kept:  # no row left out: the columns as they are (no copy)
        keep = slice(None)
    astrometry = {c: (values[c][keep] if c in values else
                      np.full(n_kept, RULES[c].if_missing, dtype=float))
                  for c in ASTROMETRY_COLUMNS}
    if "frame" in raw.columns:  # without a frame column every row is ICRS already
        astrometry = convert_to_icrs(frames[keep], equinoxes[keep], astrometry,
                                     _motion_given(raw)[keep])
    errors = {c: values[c][keep] for c in UNCERTAINTY_COLUMNS if c in values}
    extra = {label: np.asarray(column)[keep] for label, column in raw.extra.items()}
    if names is None and not all_kept:
        names = _fallback_names(len(raw))
    try:
        return Targets.from_columns(name=None if names is None else names[keep], errors=errors,
                                    extra=extra, **astrometry)
    except TargetError as err:  # a guard: the rules above should have caught it
        line = None if err.index is None else int(raw.row_numbers[keep][err.index])
        label = raw.columns[err.column].label if err.column in raw.columns else err.column
        raise InputError(raw.path, str(err).split(": ", 1)[-1], line=line, column=label,
                         row_word=raw.row_word) from None
