"""A read-only mapping of result columns (name -> numpy array) with its metadata."""
from __future__ import annotations

from collections.abc import Mapping


class ColumnTable(Mapping):
    """Result columns in a fixed order, plus `meta` (scalars) and `units` (name -> unit)."""

    def __init__(self, columns: dict, meta: dict | None = None, units: dict | None = None):
        self._columns = columns
        self.meta = dict(meta or {})
        self.units = {k: v for k, v in (units or {}).items() if k in columns}

    def __getitem__(self, key):
        return self._columns[key]

    def __iter__(self):
        return iter(self._columns)

    def __len__(self):
        return len(self._columns)

    @property
    def nrows(self) -> int:
        """Number of rows (targets)."""
        return len(next(iter(self._columns.values()))) if self._columns else 0

    def select(self, rows) -> "ColumnTable":
        """The same columns restricted to some rows (index array or boolean mask)."""
        return ColumnTable({k: v[rows] for k, v in self._columns.items()}, self.meta,
                           self.units)
