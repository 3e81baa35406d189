"""Target lists as CSV: what people type in a spreadsheet or an editor, and what we write back.

Reading: UTF-8 (a byte-order mark is allowed), a header row of case-insensitive column names,
`#` comment lines and blank lines skipped anywhere, spaces around cells ignored. One comment
line before the header may state the epoch of every row without one: `# catalogue_epoch: 2016.0`
(targetchecks.py). Values are in
our units (degrees, mas, mas/yr, km/s; ra/dec may be sexagesimal). Line numbers in messages are
the file's own, header = line 1 (counting comment lines too). Files of COLUMN_READER_LINES
lines or more are read a column at a time (csvcolumns.py, for millions of rows) when that
reader is sure to read them as the row reader here would; shorter files, and every file it
declines, row by row (for a few hundred rows that is faster than loading pyarrow).

Writing: one comment line stating frame and units, a header, then shortest round-trip float text
(`repr`), so a file written and read again gives the same numbers bit for bit. Unknown errors and
NaN extras become empty cells.
"""
from __future__ import annotations

import csv
import io
import re
from functools import partial

import numpy as np

from .bodyfields import has_body_columns
from .csvcolumns import CsvLines
from .errors import InputError
from .filebytes import decode_utf8
from .targetchecks import CATALOGUE_EPOCH_KEY
from .targetcolumns import ASTROMETRY_COLUMNS, UNCERTAINTY_COLUMNS, match_columns
from .targetrows import RawColumn, RawTable

# From this many lines on, the column reader pays for loading pyarrow (~0.1 s): the row reader
# takes about 4 us a row, the column reader about 1.5 us.
COLUMN_READER_LINES = 2000
CSV_HEADER_COMMENT = ("# ICRS; ra, dec deg; epoch Julian year (TDB); pm_ra_cosdec, pm_dec mas/yr; "
                      "parallax mas; radial_velocity km/s; errors mas, mas/yr, km/s")


def _content_lines(text: str, line_numbers: list):
    """Yield the lines that hold data, appending each one's 1-based file line number."""
    lines = text.replace("\r\n", "\n").replace("\r", "\n").split("\n")
    for number, line in enumerate(lines, start=1):
        stripped = line.strip()
        if stripped and not stripped.startswith("#"):
            line_numbers.append(number)
            yield line + "\n"


_EPOCH_STATEMENT = re.compile(rf"#\s*{CATALOGUE_EPOCH_KEY}\s*[:=]\s*(.*?)\s*$", re.IGNORECASE)


def _stated_epoch(path: str, text: str) -> tuple[str, int] | None:
    """(epoch text, line) of a `# catalogue_epoch: ...` comment before the header, if any."""
    found = None
    for number, line in enumerate(text.splitlines(), start=1):
        stripped = line.strip()
        if stripped and not stripped.startswith("#"):
            break
        match = _EPOCH_STATEMENT.fullmatch(stripped)
        if match is not None:
            if found is not None:
                raise InputError(path, f"states {CATALOGUE_EPOCH_KEY} twice (lines {found[1]} "
                                       f"and {number})", line=number)
            found = (match.group(1), number)
    return found


def _rows(path: str, text: str):
    """(first file line, stripped cells) for every CSV record; csv errors become InputError."""
    line_numbers: list[int] = []
    reader = csv.reader(_content_lines(text, line_numbers))
    while True:
        consumed = len(line_numbers)
        try:
            cells = next(reader)
        except StopIteration:
            return
        except csv.Error as err:
            line = line_numbers[-1] if line_numbers else None
            raise InputError(path, f"is not valid CSV ({err})", line=line) from None
        yield line_numbers[consumed], [c.strip() for c in cells]


def read_csv_targets(path: str, data: bytes) -> RawTable:
    """The rows of a CSV target file, ready for build_targets: read a column at a time
    (csvcolumns.py) when that reader is sure of the file, else row by row."""
    lines = CsvLines.scan(data) if data.count(b"\n") >= COLUMN_READER_LINES else None
    raw = None if lines is None else _read_by_columns(path, lines)
    return raw if raw is not None else _read_by_rows(path, data)


def _known_columns(path: str, header_line: int, labels: list, has_rows: bool):
    """match_columns for the header, with the header's errors; ra and dec are required unless
    the file has body or element columns (bodyfields.py)."""
    try:
        known, extra = match_columns(labels)
    except ValueError as err:
        raise InputError(path, str(err), line=header_line) from None
    for needed in ("ra", "dec"):
        if needed not in known and not has_body_columns(labels):
            raise InputError(path, f"has no {needed} column (columns: {', '.join(labels)[:60]})",
                             line=header_line)
    if not has_rows:
        raise InputError(path, "has a header but no targets")
    return known, extra


def _read_by_columns(path: str, lines: CsvLines) -> RawTable | None:
    """The RawTable of a file CsvLines is sure of, None where the row reader must decide."""
    labels, n = lines.labels, len(lines.row_numbers)
    named = [j for j, label in enumerate(labels) if label]
    if len(named) < len(labels):  # trailing-comma columns: allowed only when empty
        cells = lines.read([], [j for j in range(len(labels)) if not labels[j]])
        if cells is None or any((column != "").any() for column in cells[1].values()):
            return None
    known, extra = _known_columns(path, lines.header_line, [labels[j] for j in named], n > 0)
    known = {name: named[k] for name, k in known.items()}
    extra = [named[k] for k in extra]
    numeric = [j for name, j in known.items() if name in ASTROMETRY_COLUMNS + UNCERTAINTY_COLUMNS]
    read = lines.read(numeric, [j for j in known.values() if j not in numeric] + extra)
    if read is None:
        return None
    numbers, texts = read
    as_text = [j for j, column in numbers.items() if column is None]
    if as_text:  # a cell float() refuses: that column is read as text, as the row reader does
        read = lines.read([], as_text)
        if read is None:
            return None
        texts.update(read[1])
    columns = {}
    for canonical, j in known.items():
        if j in texts:
            columns[canonical] = RawColumn(labels[j], texts[j], texts[j] == "")
        else:
            values, missing = numbers[j]
            columns[canonical] = RawColumn(labels[j], values, missing,
                                           cell_text=partial(lines.cell_text, j))
    return RawTable(path=path, row_numbers=lines.row_numbers, row_word="line", columns=columns,
                    extra={labels[j]: texts[j] for j in extra},
                    catalogue_epoch=_stated_epoch(path, lines.head_text))


def _read_by_rows(path: str, data: bytes) -> RawTable:
    """The row reader: the csv module over every data line."""
    text = decode_utf8(path, data)
    records = _rows(path, text)
    first = next(records, None)
    if first is None:
        raise InputError(path, "is empty (no header row)")
    header_line, labels = first
    rows = list(records)
    labels = _drop_unnamed_columns(path, header_line, labels, rows)
    known, extra = _known_columns(path, header_line, labels, bool(rows))

    width = len(labels)
    row_problems = {}
    for i, (_, cells) in enumerate(rows):
        if len(cells) != width:
            row_problems[i] = (None, f"has {len(cells)} cells, the header has {width} columns")
    grid = np.array([cells[:width] + [""] * (width - len(cells)) for _, cells in rows],
                    dtype=object).reshape(len(rows), width)
    columns = {}
    for canonical, index in known.items():
        cells = grid[:, index]
        columns[canonical] = RawColumn(labels[index], cells, cells == "")
    return RawTable(path=path, row_numbers=np.array([line for line, _ in rows]), row_word="line",
                    columns=columns, extra={labels[i]: grid[:, i] for i in extra},
                    row_problems=row_problems, catalogue_epoch=_stated_epoch(path, text))


def _drop_unnamed_columns(path, header_line, labels, rows):
    """Drop trailing-comma columns: an unnamed column is allowed only if all its cells are empty."""
    unnamed = [i for i, label in enumerate(labels) if not label]
    for i in unnamed:
        for line, cells in rows:
            if i < len(cells) and cells[i]:
                raise InputError(path, f"column {i + 1} has values but no name in the header",
                                 line=line)
    if not unnamed:
        return labels
    for _, cells in rows:
        cells[:] = [c for j, c in enumerate(cells) if j not in unnamed]
    return [label for label in labels if label]


def _float_text(values: np.ndarray) -> list[str]:
    """Shortest round-trip text of floats; NaN becomes an empty cell."""
    return ["" if v != v else repr(float(v)) for v in values]


def _cell_text(values: np.ndarray) -> list[str]:
    """Extra columns: floats as _float_text, everything else as str, None as empty."""
    if np.asarray(values).dtype.kind == "f":
        return _float_text(values)
    return ["" if v is None else str(v) for v in values]


def format_csv_targets(targets) -> str:
    """The CSV text of a target list (see module docstring)."""
    columns = {"name": [str(x) for x in targets.names()]}
    for col in ASTROMETRY_COLUMNS:
        columns[col] = _float_text(getattr(targets, col))
    for col in UNCERTAINTY_COLUMNS:
        if col in targets.errors:
            columns[col] = _float_text(targets.errors[col])
    for label, values in targets.extra.items():
        columns[str(label)] = _cell_text(values)
    out = io.StringIO()
    out.write(CSV_HEADER_COMMENT + "\n")
    plain = csv.writer(out, lineterminator="\n")
    quoted = csv.writer(out, lineterminator="\n", quoting=csv.QUOTE_ALL)
    plain.writerow(columns)
    for row in zip(*columns.values()):
        # A first cell starting with '#' would read back as a comment line: quote that row.
        (quoted if row[0].lstrip().startswith("#") else plain).writerow(row)
    return out.getvalue()
