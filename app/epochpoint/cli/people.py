"""Plain-text tables for people: which result columns to show, under which heading, and how
(sexagesimal angles, fixed decimals). The layout itself is io.format_people_table."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..io import format_dec_dms, format_hours, format_people_table, format_ra_hms
from ..io.peopletable import default_cells

LOWER_BOUND_MARK = ">="  # ASCII, like every heading and cell of these tables
LOWER_BOUND_NOTE = (f'"{LOWER_BOUND_MARK}": proper-motion errors unknown, the error ellipse is at '
                    "least this large.")


@dataclass(frozen=True)
class PeopleColumn:
    """A column heading, the result column it shows, and how: 'ra', 'dec', 'hours', 'date',
    str, a format string such as '{:6.2f}', or a callable(values) -> cells."""

    heading: str
    column: str
    style: object


def _formatter(style):
    if style == "ra":
        return lambda v: format_ra_hms(np.asarray(v, dtype=float), 2)
    if style == "dec":
        return lambda v: format_dec_dms(np.asarray(v, dtype=float), 1)
    if style == "hours":
        return lambda v: format_hours(np.asarray(v, dtype=float), 1)
    if style == "date":
        return lambda v: ["" if x is None else str(x)[:16].replace("T", " ") for x in v]
    if style is str:
        return default_cells
    if callable(style):
        return style

    def numbers(values):
        cells = default_cells(values)
        return [c if c in ("", "yes", "no") else style.format(v) for c, v in zip(cells, values)]
    return numbers


def lower_bound_cells(style, lower_bound):
    """Cells in `style`, shown as '>= value' where lower_bound is True: a value that leaves
    out an unknown contribution (an error ellipse without proper-motion errors)."""
    plain = _formatter(style)

    def cells(values):
        flags = np.asarray(lower_bound, dtype=bool)
        return [f"{LOWER_BOUND_MARK} {t.strip()}" if flag and t else t
                for t, flag in zip(plain(values), flags)]
    return cells


def people_table(table, columns: list[PeopleColumn], header_lines: list[str]) -> str:
    """Header lines, a blank line, then one aligned row per target."""
    shown = {c.heading: table[c.column] for c in columns}
    formatters = {c.heading: _formatter(c.style) for c in columns}
    return "\n".join(header_lines) + "\n\n" + format_people_table(shown, formatters)
