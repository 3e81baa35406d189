"""Pointing samples on file: one centred star per CSV row.

Columns (case-insensitive header, any order, other columns ignored): `time` (ISO 8601 UTC with
Z), `name`, and in degrees the star's computed observed place and the mount's axis readings,
`ha_target`, `dec_target`, `ha_mount`, `dec_mount` for an equatorial or German mount, or
`alt_target`, `az_target`, `alt_mount`, `az_mount` for an alt-az mount (an equatorial file may
carry these too). `pier_side`: the side of the pier a German equatorial mount was on, `east`
or `west` in any case (core.pointing_model.pier_sides), empty for other mounts; a German
mount's samples need it in every row. Every bad cell is a one-line InputError naming file,
line and column. Saves are atomic: a whole file is written, or one sample added to the end of
one with everything else in it kept.
"""
from __future__ import annotations

import csv
import io
import os

import numpy as np

from ..core.pointing_model.pier_sides import PIER_SIDES
from .atomic import atomic_write_text
from .errors import InputError, quote

COLUMNS = {"equatorial": ("ha_target", "dec_target", "ha_mount", "dec_mount"),
           "german": ("ha_target", "dec_target", "ha_mount", "dec_mount"),
           "altaz": ("alt_target", "az_target", "alt_mount", "az_mount")}
SAMPLE_HEADER = ("time", "name") + COLUMNS["equatorial"]
PIER_SIDE = "pier_side"
# Written when a sample has them, after SAMPLE_HEADER.
OPTIONAL_COLUMNS = (PIER_SIDE,) + COLUMNS["altaz"]


def _records(path) -> tuple[str, list]:
    """The file's text and its CSV records [(line, cells)] that are neither blank nor
    comments (# in the first cell)."""
    try:
        with open(path, encoding="utf-8-sig", newline="") as handle:
            text = handle.read()
    except UnicodeDecodeError:
        raise InputError(path, "is not UTF-8 text") from None
    rows = [(n, r) for n, r in enumerate(csv.reader(io.StringIO(text)), start=1)
            if _is_record(r)]
    return text, rows


def _is_record(cells) -> bool:
    return bool(cells) and any(c.strip() for c in cells) and \
        not cells[0].lstrip().startswith("#")


def read_table(path, needed) -> tuple[dict, np.ndarray]:
    """({column: float array or list of str}, line numbers) for the needed numeric columns
    plus `time` and `name` when present, and `pier_side` when present (an object array of
    "east", "west" or "" for none)."""
    _, rows = _records(path)
    if not rows:
        raise InputError(path, "is empty (no header row)")
    header_line, header = rows[0]
    labels = [h.strip().lower() for h in header]
    missing = [c for c in needed if c not in labels]
    if missing:
        raise InputError(path, f"has no {missing[0]} column (columns: {', '.join(labels)[:60]})",
                         line=header_line)
    data = rows[1:]
    if not data:
        raise InputError(path, "has a header but no rows")
    out = {}
    for name in ("time", "name"):
        if name in labels:
            j = labels.index(name)
            out[name] = [r[j].strip() if j < len(r) else "" for _, r in data]
    if PIER_SIDE in labels:
        out[PIER_SIDE] = _pier_sides(path, data, labels.index(PIER_SIDE),
                                     header[labels.index(PIER_SIDE)].strip())
    for name in needed:
        j = labels.index(name)
        values = np.empty(len(data))
        for k, (line, r) in enumerate(data):
            cell = r[j].strip() if j < len(r) else ""
            try:
                values[k] = float(cell)
            except ValueError:
                raise InputError(path, f"{quote(cell)} is not a number of degrees" if cell
                                 else "no value given", line=line, column=header[j].strip()) \
                    from None
            if not np.isfinite(values[k]) or abs(values[k]) > 360.0:
                raise InputError(path, f"{quote(cell)} is not an angle in degrees", line=line,
                                 column=header[j].strip())
        out[name] = values
    return out, np.array([line for line, _ in data])


def _pier_sides(path, data, j: int, label: str) -> np.ndarray:
    """The pier_side cells: "east", "west" or "" (none given)."""
    sides = np.empty(len(data), dtype=object)
    for k, (line, r) in enumerate(data):
        cell = r[j].strip() if j < len(r) else ""
        if cell and cell.lower() not in PIER_SIDES:
            raise InputError(path, f"{quote(cell)} is not a pier side (east or west)", line=line,
                             column=label)
        sides[k] = cell.lower()
    return sides


def read_samples(path, mount_type: str = "equatorial") -> dict:
    """The samples of a file (see module docstring): columns by name, plus `line` and
    `pier_side` ("" where none is given; a German mount's file must give every one)."""
    columns, lines = read_table(path, COLUMNS[mount_type])
    for name, lo, hi in (("dec_target", -90, 90), ("dec_mount", -90, 90),
                         ("alt_target", -90, 90), ("alt_mount", -90, 90)):
        if name in columns:
            bad = np.flatnonzero((columns[name] < lo) | (columns[name] > hi))
            if bad.size:
                raise InputError(path, f"{columns[name][bad[0]]!r} is outside [-90, 90] degrees",
                                 line=int(lines[bad[0]]), column=name)
    if mount_type == "german":
        if PIER_SIDE not in columns:
            raise InputError(path, "has no pier_side column (a German mount's samples need "
                                   "the pier side, east or west, of each star)",
                             line=_records(path)[1][0][0])
        empty = np.flatnonzero(columns[PIER_SIDE] == "")
        if empty.size:
            raise InputError(path, "no pier side given (east or west; a German mount's "
                                   "samples need it)", line=int(lines[empty[0]]),
                             column=PIER_SIDE)
    columns.setdefault(PIER_SIDE, np.full(len(lines), "", dtype=object))
    columns["line"] = lines
    if "name" not in columns:
        columns["name"] = [f"line {n}" for n in lines]
    return columns


def _cells(sample: dict) -> dict:
    """A sample's cells as text by column: the header's, then the optional ones it has
    (ValueError for a pier side that is neither east nor west)."""
    cells = {"time": sample["time"], "name": sample["name"],
             **{c: repr(float(sample[c])) for c in SAMPLE_HEADER[2:]}}
    side = sample.get(PIER_SIDE)
    if side is not None and str(side).strip():
        if str(side).strip().lower() not in PIER_SIDES:
            raise ValueError(f"{side!r} is not a pier side (east or west)")
        cells[PIER_SIDE] = str(side).strip().lower()
    for c in COLUMNS["altaz"]:
        value = sample.get(c)
        if value is not None and np.isfinite(float(value)):
            cells[c] = repr(float(value))
    return cells


def _csv_line(cells) -> str:
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerow(cells)
    return buffer.getvalue()


def write_samples(path, rows) -> None:
    """Save samples (dicts with the SAMPLE_HEADER keys, and optionally `pier_side` and the
    alt/az columns) as a CSV file, atomically; an optional column is written when a sample
    has it."""
    cells = [_cells(row) for row in rows]
    header = list(SAMPLE_HEADER) + [c for c in OPTIONAL_COLUMNS if any(c in r for r in cells)]
    text = _csv_line(header) + "".join(_csv_line([r.get(c, "") for c in header])
                                       for r in cells)
    atomic_write_text(path, text)


def append_sample(path, sample: dict) -> None:
    """Add one sample (dict with the SAMPLE_HEADER keys; optionally `pier_side`, "east" or
    "west", and alt_target, az_target, alt_mount, az_mount) to the end of a samples file,
    kept whole otherwise (its other columns and comments); an optional column the file lacks
    is added to its header, empty in the rows before. A new file gets SAMPLE_HEADER and the
    sample's optional columns. A file that is not a valid samples file is refused
    (InputError) and left untouched. Atomic."""
    cells = _cells(sample)
    if not os.path.exists(path):
        write_samples(path, [sample])
        return
    read_samples(path)  # a bad file stops here, unchanged
    text, _ = _records(path)
    lines = io.StringIO(text).readlines()
    reader = csv.reader(io.StringIO(text))
    out, start, header = [], 0, None
    added = []
    for record in reader:
        # Each record's own lines, kept as they are unless it is the header or a row.
        original, start = "".join(lines[start:reader.line_num]), reader.line_num
        if not _is_record(record):
            out.append(original)
        elif header is None:
            labels = [h.strip().lower() for h in record]
            added = [c for c in OPTIONAL_COLUMNS if c in cells and c not in labels]
            header = record + added
            out.append(_csv_line(header) if added else original)
        elif added:
            width = len(header) - len(added)
            padded = (record + [""] * width)[:width] + [""] * len(added) + record[width:]
            out.append(_csv_line(padded))
        else:
            out.append(original)
    text = "".join(out)
    if text and not text.endswith(("\n", "\r")):
        text += "\n"
    row = [cells.get(label.strip().lower(), "") for label in header]
    atomic_write_text(path, text + _csv_line(row))
