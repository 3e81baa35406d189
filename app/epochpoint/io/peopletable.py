"""Result tables for people: aligned plain-text columns under a header line.

Generic on purpose: the caller decides how each column reads (sexagesimal angles, fixed
decimals, yes/no) by passing per-column formatters; everything else gets a plain default.
"""
from __future__ import annotations

import numpy as np

# Significant digits of the default float format (e.g. airmass 1.23457, ra 187.5).
DEFAULT_FLOAT_DIGITS = 6


def default_cells(values) -> list[str]:
    """Text for one column: floats to 6 significant digits, NaN/None as '', bools as yes/no."""
    out = []
    for v in np.asarray(values, dtype=object).ravel():
        if v is None or (isinstance(v, (float, np.floating)) and not np.isfinite(v)):
            out.append("")
        elif isinstance(v, (bool, np.bool_)):
            out.append("yes" if v else "no")
        elif isinstance(v, (float, np.floating)):
            out.append(f"{float(v):.{DEFAULT_FLOAT_DIGITS}g}")
        else:
            out.append(str(v))
    return out


def format_people_table(columns, formatters=None, meta=None, units=None) -> str:
    """An aligned text table: `key: value` lines for meta, a blank line, header, rule, rows.

    columns: ordered mapping name -> array (one value per row). formatters: optional mapping
    name -> callable(array) -> sequence of str. units: optional mapping name -> unit, shown in
    the header as 'alt [deg]'. Numeric columns are right-aligned, text left-aligned.
    """
    formatters, units = formatters or {}, units or {}
    lines = [f"{key}: {' '.join(str(value).split())}" for key, value in (meta or {}).items()]
    if lines:
        lines.append("")
    cells, right_aligned = [], []
    for name, values in columns.items():
        heading = f"{name} [{units[name]}]" if units.get(name) else str(name)
        texts = formatters[name](values) if name in formatters else default_cells(values)
        cells.append([heading] + [str(t) for t in texts])
        right_aligned.append(np.asarray(values).dtype.kind in "biuf")
    widths = [max(len(text) for text in column) for column in cells]
    n_rows = len(cells[0]) if cells else 0
    for row in range(n_rows):
        parts = [(col[row].rjust(w) if right else col[row].ljust(w))
                 for col, w, right in zip(cells, widths, right_aligned)]
        lines.append("  ".join(parts).rstrip())
        if row == 0:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines) + "\n"
