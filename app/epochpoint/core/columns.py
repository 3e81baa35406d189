"""A read-only mapping of result columns (name -> numpy array) with its metadata."""
from __future__ import annotations

from collections.abc import Mapping


class ColumnTable(Mapping):
    """Result columns in a fixed order, plus `meta` (scalars) and `units` (name -> unit).

    A column may be given as a zero-argument callable: it is made on first access (target
    names T1..Tn for a million stars cost more than their positions)."""

    def __init__(self, columns: dict, meta: dict | None = None, units: dict | None = None):
        self._columns = columns
        self.meta = dict(meta or {})
        self.units = {k: v for k, v in (units or {}).items() if k in columns}

    def __getitem__(self, key):
        value = self._columns[key]
        if callable(value):
            value = self._columns[key] = value()
        return value

    def __iter__(self):
        return iter(self._columns)

    def __len__(self):
        return len(self._columns)

    @property
    def nrows(self) -> int:
        """Number of rows (targets)."""
        return len(self[next(iter(self._columns))]) if self._columns else 0

    def select(self, rows) -> "ColumnTable":
        """The same columns restricted to some rows (index array or boolean mask)."""
        return ColumnTable({k: self[k][rows] for k in self._columns}, self.meta, self.units)
