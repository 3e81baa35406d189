"""The drift table: one row per target, columns from the drift result, raw numbers to sort.

Over-tolerance rows carry a sign and a word ("▲ over") and bold type, so the flag never
depends on colour alone.
"""
from __future__ import annotations

import numpy as np
from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt
from PySide6.QtGui import QFont

from ...io.angles import format_dec_dms, format_ra_hms
from ..sorting import SORT_ROLE, ValueSortProxy, sort_value

OVER_MARK = "▲ over"
# A crossing further from the date shown than this is shown as "never within" it.
NEVER_WITHIN_YEARS = 1000

# Column key, header, tooltip.
COLUMNS = (
    ("flag", "", "▲ over: drift beyond the tolerance"),
    ("name", "Target", ""),
    ("drift", "Drift (″)", "Offset of the true position at the date from the catalogue "
                          "position"),
    ("drift_rate", "Rate (″/yr)", "How fast the drift grows"),
    ("crossing", "Crossing (±1σ)", "When the drift equals the tolerance (1σ uncertainty; "
                                   "? where the catalogue gives no proper-motion errors)"),
    ("epoch", "Epoch", "Catalogue epoch (Julian year)"),
    ("catalogue", "RA, Dec (catalogue)", "Catalogue position (ICRS) at the catalogue epoch"),
    ("propagated", "RA, Dec (ICRS) at the date", "True position at the date: propagated, "
                                                 "barycentric, ICRS (not apparent)"),
)
KEYS = [c[0] for c in COLUMNS]


class DriftModel(QAbstractTableModel):
    """The drift result as a table; SORT_ROLE gives plain Python numbers and words."""

    SORT_ROLE = SORT_ROLE

    def __init__(self, parent=None):
        super().__init__(parent)
        self.targets = None
        self.result = None

    def set_data(self, targets, result) -> None:
        self.beginResetModel()
        self.targets, self.result = targets, result
        self.endResetModel()

    def rowCount(self, parent=QModelIndex()):  # noqa: N802
        return 0 if parent.isValid() or self.targets is None else len(self.targets)

    def columnCount(self, parent=QModelIndex()):  # noqa: N802
        return 0 if parent.isValid() else len(COLUMNS)

    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):  # noqa: N802
        if orientation != Qt.Orientation.Horizontal:
            return None
        if role == Qt.ItemDataRole.DisplayRole:
            return COLUMNS[section][1]
        if role == Qt.ItemDataRole.ToolTipRole:
            return COLUMNS[section][2] or None
        return None

    def over(self, row: int) -> bool:
        return self.result is not None and bool(self.result["drift"]["over_tolerance"][row])

    def value(self, row: int, key: str):
        t, r = self.targets, self.result
        if key == "name":
            return str(t.names()[row])
        if key == "epoch":
            return float(t.epoch[row])
        if key == "catalogue":
            return (float(t.ra[row]), float(t.dec[row]))
        if r is None:
            return None
        if key == "propagated":
            return (float(r["ra_propagated"][row]), float(r["dec_propagated"][row]))
        if key == "flag":
            return self.over(row)
        return r["drift"][key][row]

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if not index.isValid():
            return None
        row, key = index.row(), KEYS[index.column()]
        value = self.value(row, key)
        if role == Qt.ItemDataRole.DisplayRole:
            return self._text(row, key, value)
        if role == SORT_ROLE:
            if isinstance(value, tuple):
                return value[0]  # positions sort by right ascension
            return sort_value(value)  # crossings: ISO dates sort as text; none: last
        if role == Qt.ItemDataRole.FontRole and self.over(row):
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.ItemDataRole.TextAlignmentRole and key not in ("name", "flag", "crossing"):
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.AccessibleTextRole and key == "flag":
            return "over the tolerance" if value else "within the tolerance"
        return None

    def _text(self, row: int, key: str, value) -> str:
        if key == "crossing" and self.result is not None:
            return self._crossing_text(row, value)
        if value is None:
            return "…"
        if key == "flag":
            return OVER_MARK if value else ""
        if key in ("catalogue", "propagated"):
            return f"{format_ra_hms(value[0], 2)}  {format_dec_dms(value[1], 1)}"
        if key == "epoch":
            return f"{value:.2f}"
        if key == "drift":
            return f"{value:.3f}"
        if key == "drift_rate":
            return f"{value:.4f}"
        return str(value)

    def _crossing_text(self, row: int, value) -> str:
        d = self.result["drift"]
        never = f"never within {NEVER_WITHIN_YEARS} yr"
        if not value:
            # drift() gives no date for a target that does not move or only beyond 10000 years.
            return "never (no motion)" if d["drift_rate"][row] == 0 else never
        if abs(_year(value) - _year(self.result.get("time") or value)) > NEVER_WITHIN_YEARS:
            return never  # a date that far off says only that it will not matter
        sigma = d["crossing_sigma_days"][row]
        if not np.isfinite(sigma) or sigma <= 0.0:
            # No errors for this motion (a zero error is an unknown one, not a perfect one).
            return value[:10] + " ± ?"
        if sigma < 0.05:
            return value[:10] + " ± <0.1 d"
        return value[:10] + (f" ± {sigma:.1f} d" if sigma < 10 else f" ± {sigma:.0f} d")


def _year(iso: str) -> int:
    """The year of an ISO 8601 date (a leading sign allowed)."""
    return int(iso[:iso.index("-", 1)])


class DriftSortProxy(ValueSortProxy):
    """The drift table sorted by value (gui.sorting)."""
