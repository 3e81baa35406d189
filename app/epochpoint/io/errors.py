"""The one error type for bad file content: a single line naming file, line, column and target.

Everything that reads or writes a user's file raises `InputError` (a ValueError) for problems the
user can fix, so a command line or a dialog needs one `except` clause and prints `str(error)`.
"""
from __future__ import annotations

import os

# Longest piece of user text quoted in a message; longer text is cut with "...".
QUOTE_MAX_CHARS = 40


def quote(text) -> str:
    """A short, single-line, quoted rendering of a user value for an error message."""
    text = str(text)
    if len(text) > QUOTE_MAX_CHARS:
        text = text[: QUOTE_MAX_CHARS - 3] + "..."
    return repr(text)  # repr escapes newlines and control characters


def _one_line(text) -> str:
    return " ".join(str(text).split())


class InputError(ValueError):
    """A problem with a user's file or value, rendered as one line.

    Attributes: path (str or None), line (1-based: the line in a text file with the header as
    line 1, or the data row of an ECSV/VOTable table; None for whole-file problems), column (the
    column's name as written in the file, or None), target (the target's name when known),
    message (what is wrong), row_word ("line" or "row", how `line` is named in the text).

    >>> str(InputError("targets.csv", "'x' is not an angle", line=3, column="ra", target="Vega"))
    "targets.csv, line 3 (Vega), column ra: 'x' is not an angle"
    """

    def __init__(self, path, message: str, line: int | None = None, column: str | None = None,
                 target: str | None = None, row_word: str = "line"):
        self.path = None if path is None else os.fspath(path)
        self.line, self.column, self.target = line, column, target
        self.message, self.row_word = _one_line(message), row_word
        super().__init__(self._render())

    def __reduce__(self):  # picklable, e.g. across worker processes
        return (type(self), (self.path, self.message, self.line, self.column, self.target,
                             self.row_word))

    def _render(self) -> str:
        where = [] if self.path is None else [_one_line(self.path)]
        if self.line is not None:
            row = f"{self.row_word} {self.line}"
            if self.target:
                row += f" ({_one_line(self.target)[:QUOTE_MAX_CHARS]})"
            where.append(row)
        if self.column is not None:
            where.append(f"column {_one_line(self.column)}")
        return f"{', '.join(where)}: {self.message}" if where else self.message


class SkippedRowWarning(UserWarning):
    """A bad row left out of a target list read with skip_bad_rows=True."""


class TargetValueWarning(UserWarning):
    """Target rows that were read but need a word: a parallax of zero or less (distance taken
    as unknown) or a motion beyond any known star's. One warning per kind per file."""
