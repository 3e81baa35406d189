"""Plain-text tables for people: aligned columns, sexagesimal angles, blanks for no value."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class PeopleColumn:
    """A column heading, the result column it shows, and how: 'ra', 'dec', 'hours', str or a
    format string such as '{:6.2f}'."""

    heading: str
    column: str
    style: object


def _cells(values, style) -> list[str]:
    from ..io import format_dec_dms, format_hours, format_ra_hms

    if style == "ra":
        return list(format_ra_hms(np.asarray(values, dtype=float), 2))
    if style == "dec":
        return list(format_dec_dms(np.asarray(values, dtype=float), 1))
    if style == "hours":
        return list(format_hours(np.asarray(values, dtype=float), 1))
    if style is str:
        return ["" if v is None else str(v) for v in values]
    out = []
    for v in values:
        if v is None or (isinstance(v, float) and not np.isfinite(v)):
            out.append("")
        elif isinstance(v, (bool, np.bool_)):
            out.append("yes" if v else "no")
        else:
            out.append(style.format(v))
    return out


def people_table(table, columns: list[PeopleColumn], header_lines: list[str]) -> str:
    """Header lines, then one aligned row per target (text left-aligned, numbers right)."""
    cells = [[c.heading] + _cells(table[c.column], c.style) for c in columns]
    widths = [max(len(x) for x in col) for col in cells]
    lines = list(header_lines) + [""]
    for row in range(len(cells[0])):
        parts = []
        for col, (c, width) in enumerate(zip(columns, widths)):
            text = cells[col][row]
            parts.append(text.ljust(width) if c.style is str else text.rjust(width))
        lines.append("  ".join(parts).rstrip())
        if row == 0:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines) + "\n"
