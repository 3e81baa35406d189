"""Sorting a table by value: one sort role and one proxy for every table of the app.

A model answers SORT_ROLE with the value a cell stands for, as a plain Python float, int or
str (never a numpy scalar: a numpy comparison returns numpy.bool, which Qt cannot take as the
answer of lessThan). None, NaN and "" mean "not known yet" and sort last in both directions.
"""
from __future__ import annotations

import math

from PySide6.QtCore import QSortFilterProxyModel, Qt

SORT_ROLE = Qt.ItemDataRole.UserRole + 20


def sort_value(value):
    """A value as a plain Python float, int or str for SORT_ROLE (None when unknown)."""
    if value is None:
        return None
    if isinstance(value, str):
        return value.lower() or None
    if hasattr(value, "item"):  # a numpy scalar
        value = value.item()
    if isinstance(value, bool):
        return int(value)
    if isinstance(value, (int, float)):
        return None if isinstance(value, float) and math.isnan(value) else value
    return str(value).lower()


def _unknown(value) -> bool:
    return value is None or value == "" or (isinstance(value, float) and math.isnan(value))


def value_less_than(a, b, order) -> bool:
    """Qt's lessThan for two SORT_ROLE values: unknown values last whatever the order (Qt
    sorts descending by asking lessThan(right, left)); numbers before words."""
    if _unknown(a) or _unknown(b):
        if _unknown(a) and _unknown(b):
            return False
        return _unknown(a) == (order == Qt.SortOrder.DescendingOrder)
    a_text, b_text = isinstance(a, str), isinstance(b, str)
    if a_text != b_text:
        return b_text
    return bool(a < b)


class ValueSortProxy(QSortFilterProxyModel):
    """Sorts the source model's rows by SORT_ROLE (see the module docstring)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setSortRole(SORT_ROLE)

    def lessThan(self, left, right):  # noqa: N802 (Qt name)
        return value_less_than(left.data(SORT_ROLE), right.data(SORT_ROLE), self.sortOrder())
