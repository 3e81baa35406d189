"""Pointing samples on file: one centred star per CSV row.

Columns (case-insensitive header, any order, other columns ignored): `time` (ISO 8601 UTC with
Z), `name`, and in degrees the star's computed observed place and the mount's axis readings,
`ha_target`, `dec_target`, `ha_mount`, `dec_mount` for an equatorial mount, or `alt_target`,
`az_target`, `alt_mount`, `az_mount` for an alt-az mount. Every bad cell is a one-line
InputError naming file, line and column. Writing appends nothing: a whole file is saved
atomically.
"""
from __future__ import annotations

import csv
import io

import numpy as np

from .atomic import atomic_write_text
from .errors import InputError, quote

COLUMNS = {"equatorial": ("ha_target", "dec_target", "ha_mount", "dec_mount"),
           "altaz": ("alt_target", "az_target", "alt_mount", "az_mount")}
SAMPLE_HEADER = ("time", "name") + COLUMNS["equatorial"]


def read_table(path, needed) -> tuple[dict, np.ndarray]:
    """({column: float array or list of str}, line numbers) for the needed numeric columns
    plus `time` and `name` when present."""
    try:
        with open(path, encoding="utf-8-sig", newline="") as handle:
            text = handle.read()
    except UnicodeDecodeError:
        raise InputError(path, "is not UTF-8 text") from None
    rows = [(n, r) for n, r in enumerate(csv.reader(io.StringIO(text)), start=1)
            if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#")]
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


def read_samples(path, mount_type: str = "equatorial") -> dict:
    """The samples of a file (see module docstring): columns by name, plus `line`."""
    columns, lines = read_table(path, COLUMNS[mount_type])
    for name, lo, hi in (("dec_target", -90, 90), ("dec_mount", -90, 90),
                         ("alt_target", -90, 90), ("alt_mount", -90, 90)):
        if name in columns:
            bad = np.flatnonzero((columns[name] < lo) | (columns[name] > hi))
            if bad.size:
                raise InputError(path, f"{columns[name][bad[0]]!r} is outside [-90, 90] degrees",
                                 line=int(lines[bad[0]]), column=name)
    columns["line"] = lines
    if "name" not in columns:
        columns["name"] = [f"line {n}" for n in lines]
    return columns


def write_samples(path, rows) -> None:
    """Save samples (dicts with the SAMPLE_HEADER keys) as a CSV file, atomically."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(SAMPLE_HEADER)
    for row in rows:
        writer.writerow([row["time"], row["name"]] +
                        [repr(float(row[c])) for c in SAMPLE_HEADER[2:]])
    atomic_write_text(path, buffer.getvalue())


def append_sample(path, sample: dict) -> None:
    """Add one sample (dict with the SAMPLE_HEADER keys) to the end of a samples file, kept
    whole otherwise (its other columns and comments); a new file gets SAMPLE_HEADER. A file
    that is not a valid samples file is refused (InputError) and left untouched. Atomic."""
    import os

    if not os.path.exists(path):
        write_samples(path, [sample])
        return
    read_samples(path)  # a bad file stops here, unchanged
    with open(path, encoding="utf-8-sig", newline="") as handle:
        text = handle.read()
    header = next(r for r in csv.reader(io.StringIO(text))
                  if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#"))
    cells = {"time": sample["time"], "name": sample["name"],
             **{c: repr(float(sample[c])) for c in SAMPLE_HEADER[2:]}}
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerow(
        [cells.get(label.strip().lower(), "") for label in header])
    if text and not text.endswith(("\n", "\r")):
        text += "\n"
    atomic_write_text(path, text + buffer.getvalue())
