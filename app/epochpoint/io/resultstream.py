"""Result tables written chunk by chunk: memory bounded by one chunk, whole columns formatted
at once.

A writer per format takes the column names, meta and units, then `write_chunk(columns)` for
each chunk of rows (an ordered mapping name -> array, the same names every time), then
`close()`. The text equals, byte for byte, that of the whole table written at once
(io.results documents the formats):

- csv and json: each column of a chunk becomes its cell texts in one pass (floats spelled as
  Python's shortest round-trip repr, as `json` writes them, by pyarrow: columntext.py), and
  the rows are joined from those columns in pyarrow; only cells that are not plain numbers,
  booleans or plain text take the per-cell path.
- ecsv: the YAML header once (astropy's), then each chunk's data lines, formatted as for csv
  and spelled as astropy spells them (astropy writes a chunk whose text cells need quoting).
- votable: TABLEDATA; each chunk is written by astropy and its rows are copied between the
  header of the first chunk and the closing tags (text columns are variable-length, so the
  header needs nothing from later chunks).

`stream_result` writes a sequence of chunks to a file (atomically: temporary file, then
rename) or to an open text stream.
"""
from __future__ import annotations

import csv
import io
import json
import os
from concurrent.futures import ThreadPoolExecutor
from json.encoder import encode_basestring_ascii

import numpy as np

from .atomic import atomic_output
from .columntext import SMALL_COLUMN, float_texts, joined_text, text_array
from .errors import InputError

STREAMED_FORMATS = ("csv", "json", "ecsv")
# Threads formatting the columns of one chunk (pyarrow releases the GIL while it formats).
FORMAT_THREADS = max(1, min(4, os.cpu_count() or 1))
_format_pool: list = []
# Characters that make the csv module quote a cell (delimiter, quote, line ends).
_CSV_SPECIAL = (",", '"', "\n", "\r")


def python_value(v):
    """A plain JSON-able Python value: None for no value, float/int/bool/str otherwise."""
    if v is None:
        return None
    if isinstance(v, (bool, np.bool_)):
        return bool(v)
    if isinstance(v, (int, np.integer)):
        return int(v)
    if isinstance(v, (float, np.floating)):
        return float(v) if np.isfinite(v) else None
    if isinstance(v, (list, tuple, np.ndarray)):  # e.g. a list of windows per target
        return [python_value(x) for x in v]
    if isinstance(v, dict):
        return {str(k): python_value(x) for k, x in v.items()}
    return str(v)


def _one_line(value) -> str:
    return " ".join(str(value).split())


def _float_cells(values: np.ndarray, missing: str) -> list:
    """Shortest round-trip text of each float (Python's repr), `missing` where not finite."""
    texts = float_texts(values, missing)
    return texts if isinstance(texts, list) else texts.to_pylist()


def _bool_texts(values: np.ndarray, true: str, false: str):
    if values.size < SMALL_COLUMN:
        return [true if v else false for v in values.tolist()]
    import pyarrow as pa
    import pyarrow.compute as pc

    return pc.if_else(pa.array(values.astype(bool, copy=False)), true, false)


def _int_texts(values: np.ndarray):
    if values.size < SMALL_COLUMN:
        return [str(v) for v in values.tolist()]
    import pyarrow as pa
    import pyarrow.compute as pc

    return pc.cast(pa.array(values), pa.string())


def _columns_text(format_column, columns, names) -> list:
    """format_column applied to each named column of a chunk, the columns side by side in
    threads (the chunk is still written whole before the next one is taken)."""
    if not _format_pool:
        _format_pool.append(ThreadPoolExecutor(FORMAT_THREADS, thread_name_prefix="format"))
    return list(_format_pool[0].map(format_column, [columns[name] for name in names]))


def _is_plain_text(items: list) -> bool:
    return all(isinstance(v, str) for v in items)


# -- csv --------------------------------------------------------------------------------------

def _csv_cell(v) -> str:
    v = python_value(v)
    if v is None:
        return ""
    if isinstance(v, bool):
        return "true" if v else "false"
    return repr(v) if isinstance(v, float) else str(v)


def _csv_quoted(text: str) -> str:
    """One cell as the csv module writes it inside a row (quoted when it must be)."""
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerow([text, ""])
    return out.getvalue()[:-2]  # drop the empty second cell's comma and the line end


def _csv_column(values):
    """The CSV cell texts of one column chunk (a pyarrow string array, or a list of str)."""
    values = np.asarray(values)
    if values.dtype.kind == "f":
        return float_texts(values, "")
    if values.dtype.kind == "b":
        return _bool_texts(values, "true", "false")
    if values.dtype.kind in "iu":
        return _int_texts(values)
    items = values.tolist()
    cells = items if values.dtype.kind == "U" or _is_plain_text(items) else \
        [_csv_cell(v) for v in items]
    # Quote only where the csv module would (one scan of the chunk's joined text first).
    joined = "\x00".join(cells)
    if any(c in joined for c in _CSV_SPECIAL):
        cells = [_csv_quoted(c) if any(s in c for s in _CSV_SPECIAL) else c for c in cells]
    return text_array(cells)


def _quoted_if_empty(cells):
    """'""' for each empty cell of a pyarrow string array."""
    import pyarrow.compute as pc

    return pc.if_else(pc.equal(cells, ""), '""', cells)


class CsvResultWriter:
    """`# key: value` meta lines, a header row, then the rows of each chunk."""

    def __init__(self, out, names, meta=None, units=None):
        self.out, self.names = out, list(names)
        for key, value in (meta or {}).items():
            out.write(f"# {key}: {_one_line(value)}\n")
        header = io.StringIO()
        csv.writer(header, lineterminator="\n").writerow(self.names)
        out.write(header.getvalue())

    def write_chunk(self, columns) -> None:
        cells = _columns_text(_csv_column, columns, self.names)
        if not cells or not len(cells[0]):
            return
        if len(cells) == 1:  # the csv module quotes a row's only cell when it is empty
            only = cells[0]
            cells = [['""' if c == "" else c for c in only] if isinstance(only, list)
                     else _quoted_if_empty(only)]
        pieces = [cells[0]]
        for column in cells[1:]:
            pieces += [",", column]
        self.out.write(joined_text(pieces + ["\n"], ""))

    def close(self) -> None:
        pass


# -- json -------------------------------------------------------------------------------------

def _json_column(values):
    """The JSON value texts of one column chunk (json.dumps' own spelling), as a pyarrow
    string array."""
    values = np.asarray(values)
    if values.dtype.kind == "f":
        return float_texts(values, "null")
    if values.dtype.kind == "b":
        return _bool_texts(values, "true", "false")
    if values.dtype.kind in "iu":
        return _int_texts(values)
    items = values.tolist()
    if values.dtype.kind == "U" or _is_plain_text(items):
        return text_array(list(map(encode_basestring_ascii, items)))
    return text_array([json.dumps(python_value(v), allow_nan=False) for v in items])


class JsonResultWriter:
    """A JSON list with one object per row, one row per line (meta is not included)."""

    def __init__(self, out, names, meta=None, units=None):
        self.out, self.names = out, list(names)
        self.keys = [json.dumps(str(name)) + ": " for name in self.names]
        self.rows_written = False

    def write_chunk(self, columns) -> None:
        cells = _columns_text(_json_column, columns, self.names)
        if not cells or not len(cells[0]):
            return
        pieces = []
        for i, (key, column) in enumerate(zip(self.keys, cells)):
            pieces += [("{" if i == 0 else ", ") + key, column]
        rows = joined_text(pieces + ["}"], ",\n")
        self.out.write((",\n" if self.rows_written else "[\n") + rows)
        self.rows_written = True

    def close(self) -> None:
        self.out.write("\n]\n" if self.rows_written else "[]\n")


# -- ecsv and votable (astropy) ---------------------------------------------------------------

def _ecsv_column(values):
    """ECSV data cells of one column chunk as astropy writes them (space-separated, no value
    as ""), or None when a cell needs astropy's own quoting (text with spaces, quotes, line
    ends, tabs, a leading '#', empty text) or the column is of another type."""
    values = np.asarray(values)
    if values.dtype.kind == "f":
        return _float_cells(values, '""')
    if values.dtype.kind == "b":
        return ["True" if v else "False" for v in values.tolist()]
    if values.dtype.kind in "iu":
        return list(map(str, values.tolist()))
    if values.dtype.kind not in "OU":
        return None
    items = values.tolist()
    if not (values.dtype.kind == "U" or _is_plain_text(items)):
        return None
    joined = "\x00".join(items)
    if any(c in joined for c in (" ", '"', "\n", "\r", "\t", "\x00\x00", "\x00#")) or \
            not all(items) or joined.startswith("#"):
        return None
    return items


class EcsvResultWriter:
    """The ECSV header from the first chunk's column types, then each chunk's data lines."""

    def __init__(self, out, names, meta=None, units=None):
        self.out, self.names, self.meta, self.units = out, list(names), meta, units
        self.header_lines = None

    def _text(self, columns, meta) -> str:
        from .astropytables import table_bytes
        from .results import result_table

        return table_bytes(result_table(columns, meta, self.units), "ecsv").decode("utf-8")

    def write_chunk(self, columns) -> None:
        columns = {name: columns[name] for name in self.names}
        if self.header_lines is None:
            # The header (with the column-name line) is what a table with no rows writes.
            empty = {name: np.asarray(values)[:0] for name, values in columns.items()}
            self.out.write(self._text(empty, self.meta))
            self.header_lines = self._text(empty, {}).count("\n")
        if not len(next(iter(columns.values()), ())):
            return
        cells = [_ecsv_column(values) for values in columns.values()]
        if any(c is None for c in cells):  # unusual cells: astropy writes the chunk
            self.out.write(self._text(columns, {}).split("\n", self.header_lines)[-1])
        else:
            self.out.write("\n".join(map(" ".join, zip(*cells))) + "\n")

    def close(self) -> None:
        if self.header_lines is None:
            self.write_chunk({name: np.empty(0) for name in self.names})


class VotableResultWriter:
    """TABLEDATA rows of each chunk as astropy writes them, between one header and one tail."""

    ROWS_START, ROWS_END = "<TABLEDATA>\n", "    </TABLEDATA>\n"

    def __init__(self, out, names, meta=None, units=None):
        self.out, self.names, self.meta, self.units = out, list(names), meta, units
        self.tail = None

    def _document(self, columns) -> tuple[str, str, str]:
        """(header, rows, tail) of one chunk written as a whole VOTable by astropy."""
        from .astropytables import table_bytes
        from .results import result_table

        text = table_bytes(result_table({n: columns[n] for n in self.names}, self.meta,
                                        self.units), "votable").decode("utf-8")
        start = text.index(self.ROWS_START) + len(self.ROWS_START)
        end = text.index(self.ROWS_END, start)
        return text[:start], text[start:end], text[end:]

    def write_chunk(self, columns) -> None:
        header, rows, tail = self._document(columns)
        if self.tail is None:
            self.out.write(header)
            self.tail = tail
        self.out.write(rows)

    def close(self) -> None:
        if self.tail is None:
            self.write_chunk({name: np.empty(0) for name in self.names})
        self.out.write(self.tail)


WRITERS = {"csv": CsvResultWriter, "json": JsonResultWriter, "ecsv": EcsvResultWriter,
           "votable": VotableResultWriter}


def result_writer(format: str, out, names, meta=None, units=None):
    """A chunk writer for `format` (csv, json, ecsv, votable) writing to the text stream."""
    try:
        return WRITERS[format](out, names, meta, units)
    except KeyError:
        raise InputError(None, f"unknown result format {format!r} "
                               f"(use {', '.join(WRITERS)})") from None


def write_chunks(out, chunks, names, meta=None, format="csv", units=None) -> None:
    """Write every chunk (mappings name -> array) to the open text stream `out`."""
    writer = result_writer(format, out, names, meta, units)
    for columns in chunks:
        writer.write_chunk(columns)
    writer.close()


def stream_result(chunks, names, meta=None, path=None, format="csv", units=None,
                  out=None) -> None:
    """Write a result given as chunks to `path` atomically, or to the text stream `out`.

    chunks: iterable of mappings name -> array (rows in order); names: the columns, in order.
    The chunks are read one at a time, so memory holds one chunk."""
    if path is None:
        write_chunks(out, chunks, names, meta, format, units)
        return
    result_writer(format, io.StringIO(), names)  # an unknown format fails before any file
    try:
        with atomic_output(path) as f:
            write_chunks(f, chunks, names, meta, format, units)
    except OSError as err:
        raise InputError(os.fspath(path), f"cannot be written ({err.strerror or err})") \
            from None
