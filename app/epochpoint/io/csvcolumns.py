"""CSV target files read a column at a time (pyarrow), for files of millions of rows.

The row reader in csvtargets.py (the csv module, one Python list per line) is the reference:
this reader gives the same cells, or declines (returns None) so the row reader decides. It
takes a file only when every line is one record the csv module would read the same way:

1. The bytes are UTF-8 without NUL; line ends are normalised as the row reader does
   (CR LF and lone CR become LF).
2. Lines are classified with numpy: blank and `#` comment lines are dropped (a line starting
   with a space or a non-ASCII byte is classified by Python's own `str.strip`), keeping each
   record's file line number.
3. A line with a quote must be fields of plain text or whole `"..."` fields (`""` inside), with
   no line end inside quotes; no line may exceed the csv module's field size limit.
4. pyarrow parses the records as text columns in blocks; cells are stripped of exactly the
   characters `str.strip` removes (Python's own whitespace list).
5. A numeric column is converted whole by pyarrow; cells pyarrow refuses, or reads as NaN or
   infinity, go through Python's float() one by one. A column with any cell float() refuses
   (sexagesimal angles, 'J2016.0', typos) is handed over as text, as the row reader would,
   so its per-cell parser and error messages apply unchanged.

pyarrow's conversion from text to double is correctly rounded, as float() is, so both give
the same number bit for bit. Memory: the file's bytes, one block of text cells and the
output columns; no Python object per numeric cell.
"""
from __future__ import annotations

import codecs
import csv
import functools
import re

import numpy as np

# Bytes scanned per numpy pass (small temporaries, reused rather than mapped anew).
SCAN_BYTES = 1 << 20
# Bytes of records pyarrow parses per block (a few blocks are in memory at once).
BLOCK_BYTES = 1 << 22
_UTF8_BOM = b"\xef\xbb\xbf"
# Per first byte of a line: True where Python must classify the line (whitespace, non-ASCII).
_UNSURE_FIRST_BYTE = np.array([b >= 0x80 or chr(b).isspace() for b in range(256)])
_FIELD = rb'(?:[^",]*|"(?:[^"]|"")*")'
_PLAIN_QUOTED_LINE = re.compile(_FIELD + rb"(?:," + _FIELD + rb")*")


@functools.lru_cache(maxsize=1)
def python_whitespace() -> str:
    """Every character str.strip() removes, from Python itself (found once, about 0.1 s)."""
    return "".join(chr(c) for c in range(0x110000) if chr(c).isspace())


def _is_utf8(data: bytes) -> bool:
    if data.isascii():
        return True
    decoder = codecs.getincrementaldecoder("utf-8")()
    try:
        for start in range(0, len(data), SCAN_BYTES):
            decoder.decode(data[start:start + SCAN_BYTES])
        decoder.decode(b"", final=True)
    except UnicodeDecodeError:
        return False
    return True


def _positions(buf: np.ndarray, byte: int, start: int = 0) -> np.ndarray:
    """Indices of every `byte` in buf[start:], in pieces of SCAN_BYTES."""
    found = [np.flatnonzero(buf[i:i + SCAN_BYTES] == byte) + i
             for i in range(start, len(buf), SCAN_BYTES)]
    return np.concatenate(found) if found else np.empty(0, dtype=np.int64)


class CsvLines:
    """A CSV file's records located line by line (see module docstring), read on demand."""

    def __init__(self, data: bytes, starts, ends, header: int, records: np.ndarray):
        self.data = data
        self.header_line = header + 1
        header_text = data[starts[header]:ends[header]].decode("utf-8")
        self.labels = [c.strip() for c in next(csv.reader([header_text]))]
        # Everything up to the header: where a file states its catalogue epoch.
        self.head_text = data[:ends[header]].decode("utf-8")
        # Per record: its file line number and its bytes; runs of consecutive lines.
        self.row_numbers = records + 1
        self.starts, self.ends = starts[records], ends[records]
        breaks = np.flatnonzero(np.diff(records) != 1) + 1
        self.runs = list(zip(np.concatenate(([0], breaks)).tolist(),
                             np.concatenate((breaks - 1, [records.size - 1])).tolist()))

    @classmethod
    def scan(cls, data: bytes) -> CsvLines | None:
        """The layout of `data`, or None when only the row reader can be sure of it."""
        if data.startswith(_UTF8_BOM):
            data = data[len(_UTF8_BOM):]
        if b"\r" in data:
            data = data.replace(b"\r\n", b"\n").replace(b"\r", b"\n")
        if b"\x00" in data or not _is_utf8(data):
            return None
        buf = np.frombuffer(data, dtype=np.uint8)
        newlines = _positions(buf, ord("\n"))
        starts = np.concatenate(([0], newlines + 1))
        ends = np.concatenate((newlines, [len(buf)]))
        content = cls._content(data, buf, starts, ends)
        if content.size == 0 or b'"' in data[starts[content[0]]:ends[content[0]]]:
            return None
        header, records = int(content[0]), content[1:]
        if records.size and int((ends[records] - starts[records]).max()) >= csv.field_size_limit():
            return None
        first_quote = data.find(b'"', int(ends[header]))
        quotes = _positions(buf, ord('"'), first_quote) if first_quote >= 0 else []
        quoted = np.unique(np.searchsorted(starts, quotes, side="right") - 1)
        for line in quoted[np.isin(quoted, records)].tolist():
            if _PLAIN_QUOTED_LINE.fullmatch(data, int(starts[line]), int(ends[line])) is None:
                return None
        return cls(data, starts, ends, header, records)

    @staticmethod
    def _content(data, buf, starts, ends) -> np.ndarray:
        """Indices of the lines that are neither blank nor `#` comments (after str.strip)."""
        length = ends - starts
        first = buf[np.minimum(starts, max(len(buf) - 1, 0))] if len(buf) else \
            np.zeros(len(starts), dtype=np.uint8)
        keep = (length > 0) & (first != ord("#"))
        for i in np.flatnonzero((length > 0) & _UNSURE_FIRST_BYTE[first]).tolist():
            stripped = data[starts[i]:ends[i]].decode("utf-8").strip()
            keep[i] = bool(stripped) and not stripped.startswith("#")
        return np.flatnonzero(keep)

    def cell_text(self, column: int, row: int) -> str:
        """The stripped text of one cell, as the row reader reads it (for messages)."""
        line = self.data[self.starts[row]:self.ends[row]].decode("utf-8")
        return next(csv.reader([line]))[column].strip()

    def _batches(self, columns: list[int]):
        """pyarrow record batches of the given columns, every cell as text."""
        # pyarrow is imported here, by the files large enough to need it (about 0.1 s).
        import pyarrow as pa
        import pyarrow.compute as pc
        import pyarrow.csv as pacsv

        view = memoryview(self.data)
        pieces = [view[self.starts[first]:self.ends[last]] for first, last in self.runs]
        body = pieces[0] if len(pieces) == 1 else b"\n".join(pieces)
        names = [f"c{j}" for j in range(len(self.labels))]
        reader = pacsv.open_csv(
            pa.BufferReader(pa.py_buffer(body)),
            read_options=pacsv.ReadOptions(column_names=names, block_size=BLOCK_BYTES),
            parse_options=pacsv.ParseOptions(quote_char='"', double_quote=True,
                                             escape_char=False, newlines_in_values=False,
                                             ignore_empty_lines=False),
            convert_options=pacsv.ConvertOptions(
                column_types={name: pa.string() for name in names},
                include_columns=[names[j] for j in columns], strings_can_be_null=False,
                quoted_strings_can_be_null=False))
        for batch in reader:
            yield [pc.utf8_trim(batch.column(k), python_whitespace()) for k in range(len(columns))]

    def read(self, numbers: list[int], texts: list[int]) -> tuple[dict, dict] | None:
        """({column: (float values, missing) or None}, {column: object array of text}).

        None for a number column means a cell float() refuses: read it as text instead. The
        whole result is None when pyarrow cannot parse the records (e.g. a wrong cell count).
        """
        import pyarrow as pa

        columns = list(numbers) + list(texts)
        parts = {j: [] for j in columns}
        rows = 0
        try:
            for batch in self._batches(columns) if self.row_numbers.size else ():
                rows += len(batch[0]) if batch else 0
                for j, cells in zip(columns, batch):
                    if j in texts:
                        parts[j].append(cells.to_numpy(zero_copy_only=False))
                    elif parts[j] is not None:
                        parts[j] = _append_numbers(parts[j], cells)
        except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
            return None
        finally:
            pa.default_memory_pool().release_unused()  # the blocks' memory, back to the system
        if rows != self.row_numbers.size and columns:
            return None
        joined = {j: (None if parts[j] is None else _joined(parts[j], j in texts))
                  for j in columns}
        return ({j: joined[j] for j in numbers}, {j: joined[j] for j in texts})


def _joined(parts: list, text: bool):
    if text:
        return np.concatenate(parts) if parts else np.empty(0, dtype=object)
    if not parts:
        return np.empty(0), np.empty(0, dtype=bool)
    return np.concatenate([v for v, _ in parts]), np.concatenate([m for _, m in parts])


def _append_numbers(parts: list, cells) -> list | None:
    """parts + [(values, missing)] for one block of a number column; None if a cell is not a
    number float() reads."""
    import pyarrow as pa
    import pyarrow.compute as pc

    missing = pc.equal(cells, "").to_numpy(zero_copy_only=False)
    filled = pc.if_else(pa.array(missing), "0", cells) if missing.any() else cells
    try:
        values = pc.cast(filled, pa.float64()).to_numpy(zero_copy_only=False)
        odd = np.flatnonzero(~np.isfinite(values))  # NaN, inf, and what pyarrow alone reads so
    except pa.ArrowInvalid:
        values, odd = np.full(len(cells), np.nan), np.arange(len(cells))
    if odd.size:
        values = values.copy() if not values.flags.writeable else values
        try:
            values[odd] = [float(t) for t in pc.take(filled, pa.array(odd)).to_pylist()]
        except ValueError:
            return None
    parts.append((values, missing))
    return parts
