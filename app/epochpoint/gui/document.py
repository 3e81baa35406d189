"""The open document: the target list as editable columns, the site, the night's settings and
the drift tolerance, with its file path, its dirty flag and its undo stack.

Columns are numpy arrays treated as immutable: every change builds new arrays, so an undo
command keeps the state before and after by reference, for free, and restores it exactly.
The user-facing methods (edit_cell, add_target, remove_targets, import_targets, replace_site,
change_night, change_tolerance) push QUndoCommands (commands.py); the commands call the
`apply_*` methods, which change the state and emit the signals.
"""
from __future__ import annotations

import datetime as dt
import os

import numpy as np
from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoStack

from epochpoint.core.bodies.rows import BODY_COLUMNS, blank as _blank
from epochpoint.core.site import Site
from epochpoint.core.targets import TargetError, Targets
from epochpoint.io.eventfields import EVENT_FIELDS
from epochpoint.io.planfile import NightSettings, PlanDocument, check_night
from epochpoint.io.planningfields import planning_columns
from epochpoint.io.timeconstraintfields import TIME_FIELDS

from . import commands

ASTROMETRY_KEYS = ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax",
                   "radial_velocity")
PLANNING_KEYS = ("priority", "exposure", "repeats", "notes")
# A solar-system row's cells (core/bodies/rows.py): a body name or orbital elements, kept as
# given (None when blank), present when the list has them; ra/dec are then placeholders.
BODY_KEYS = BODY_COLUMNS
COLUMN_KEYS = ("name",) + ASTROMETRY_KEYS + PLANNING_KEYS
# Event ephemerides and time constraints, kept as the list's text (checked when it was read;
# parsed for each plan by io.eventfields and io.timeconstraintfields, as the command line does).
TIMING_KEYS = EVENT_FIELDS + TIME_FIELDS
# The values a new target starts with (degrees, Julian year, mas/yr, mas, km/s, s).
NEW_TARGET = {"ra": 0.0, "dec": 0.0, "epoch": 2000.0, "pm_ra_cosdec": 0.0, "pm_dec": 0.0,
              "parallax": 0.0, "radial_velocity": 0.0, "priority": 3, "exposure": 300.0,
              "repeats": 1, "notes": ""}
UNDO_LIMIT = 200
# The placeholder site used when a target list is opened without one.
PLACEHOLDER_SITE_NAME = "Site not set (0, 0)"


def placeholder_site() -> Site:
    """A plain site at latitude 0, longitude 0, sea level, flagged by its name."""
    return Site(latitude=0.0, longitude=0.0, height=0.0, name=PLACEHOLDER_SITE_NAME)


def today_iso() -> str:
    return dt.datetime.now(dt.timezone.utc).date().isoformat()


def empty_plan() -> PlanDocument:
    """A new plan: no targets, the placeholder site, tonight (UTC date)."""
    return PlanDocument(site=placeholder_site(), night=NightSettings(date=today_iso()),
                        targets=Targets.from_columns(ra=np.empty(0), dec=np.empty(0)))


class RowState:
    """The target columns and the error columns at one moment (arrays shared, never changed)."""

    __slots__ = ("columns", "errors")

    def __init__(self, columns: dict, errors: dict):
        self.columns, self.errors = columns, errors

    def __len__(self) -> int:
        return len(self.columns["name"])


def rows_from_targets(targets: Targets, path=None) -> RowState:
    """The document's columns for a Targets (planning fields typed; InputError if bad)."""
    columns = {"name": np.asarray(targets.names(), dtype=object)}
    for key in ASTROMETRY_KEYS:
        columns[key] = np.asarray(getattr(targets, key), dtype=float)
    columns.update(planning_columns(targets, path))
    columns.update(timing_columns(targets))
    columns.update(body_columns(targets))
    return RowState(columns, {k: np.asarray(v, dtype=float) for k, v in targets.errors.items()})


def timing_columns(targets: Targets) -> dict:
    """{field: object array of the cells' text (None when blank)} for the event and time
    constraint columns the list has (labels matched without case or surrounding spaces)."""
    out = {}
    for label, values in targets.extra.items():
        key = str(label).strip().lower()
        if key in TIMING_KEYS:
            out[key] = np.array([None if v is None else str(v) for v in values], dtype=object)
    return out


def body_columns(targets: Targets) -> dict:
    """{body column: object array of its cells as given (None when blank)} for the body and
    element columns the list has (core/bodies/rows.py reads them for every plan)."""
    out = {}
    for label, values in targets.extra.items():
        key = str(label).strip().lower()
        if key in BODY_KEYS:
            out[key] = np.array([None if _blank(v) else v for v in values], dtype=object)
    return out


class Document(QObject):
    """The plan being edited (see module docstring). Signals fire after each change."""

    changed = Signal()               # anything that affects the computed results or the file
    cell_changed = Signal(int, str)  # row, column key
    rows_reset = Signal()            # rows added, removed or replaced
    site_changed = Signal(object)
    night_changed = Signal(object)
    tolerance_changed = Signal(float)
    path_changed = Signal(str)
    dirty_changed = Signal(bool)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.undo_stack = QUndoStack(self)
        self.undo_stack.setUndoLimit(UNDO_LIMIT)
        self.undo_stack.cleanChanged.connect(self._on_clean_changed)
        start = empty_plan()
        self.rows = rows_from_targets(start.targets)
        self.site, self.night = start.site, start.night
        self.tolerance = start.drift_tolerance_arcsec
        self.schedule: list = []
        # True while the schedule is the one read from the file: nothing changed since, so
        # the window shows it instead of searching again (gui.main_window).
        self.schedule_from_file = False
        self.description = ""
        self.path: str | None = None
        self.generation = 0  # counts changes, so results can tell which state they belong to
        self._forced_dirty = False
        self._targets_cache: Targets | None = None

    # ------------------------------------------------------------------ reading
    @property
    def dirty(self) -> bool:
        return self._forced_dirty or not self.undo_stack.isClean()

    @property
    def has_placeholder_site(self) -> bool:
        return self.site.name == PLACEHOLDER_SITE_NAME

    def row_count(self) -> int:
        return len(self.rows)

    def column(self, key: str) -> np.ndarray:
        return self.rows.columns[key]

    def value(self, row: int, key: str):
        return self.rows.columns[key][row]

    def targets(self) -> Targets:
        """The current targets (planning fields as extra columns), built once per change."""
        if self._targets_cache is None:
            c = self.rows.columns
            self._targets_cache = Targets.from_columns(
                name=c["name"], errors=self.rows.errors,
                extra={k: c[k] for k in PLANNING_KEYS + TIMING_KEYS + BODY_KEYS if k in c},
                **{k: c[k] for k in ASTROMETRY_KEYS})
        return self._targets_cache

    def kinds(self) -> np.ndarray:
        """Each row's kind in words (core.bodies via gui.body_kinds), built once per rows."""
        if getattr(self, "_kinds_for", None) is not self.rows:
            from .body_kinds import row_kinds
            self._kinds_for, self._kinds = self.rows, row_kinds(self.rows.columns)
        return self._kinds

    def is_body(self, row: int) -> bool:
        return self.kinds()[row] != "star"

    def to_plan_document(self) -> PlanDocument:
        return PlanDocument(site=self.site, night=self.night, targets=self.targets(),
                            drift_tolerance_arcsec=self.tolerance, schedule=list(self.schedule),
                            description=self.description)

    def check_cell(self, row: int, key: str, value) -> None:
        """Raise ValueError if `value` may not go into (row, key): the core's own checks of a
        target (Targets.validate) on the row with the new value."""
        if key == "name":
            if not str(value).strip():
                raise ValueError("a target needs a name")
            return
        if key not in ASTROMETRY_KEYS:
            return  # planning fields are checked when parsed (io.planningfields)
        values = {k: self.rows.columns[k][row] for k in ASTROMETRY_KEYS}
        values[key] = value
        try:
            Targets.from_columns(**values)
        except TargetError as err:
            raise ValueError(str(err).split(": ", 1)[-1]) from None

    # ------------------------------------------------------------------ undoable edits
    def edit_cell(self, row: int, key: str, value) -> None:
        old = self.rows.columns[key][row]
        self.undo_stack.push(commands.EditCell(self, row, key, old, value))

    def add_target(self, name: str | None = None) -> int:
        """Append one target with the NEW_TARGET values; returns its row."""
        n = self.row_count()
        taken = set(self.rows.columns["name"])
        k = n + 1
        while name is None or name in taken:
            name, k = f"New target {k}", k + 1
        added = RowState({"name": np.array([name], dtype=object),
                          **{key: np.array([v], dtype=self.rows.columns[key].dtype)
                             for key, v in NEW_TARGET.items()}},
                         {key: np.array([np.nan]) for key in self.rows.errors})
        self.undo_stack.push(commands.ReplaceRows(self, self.rows, _concat(self.rows, added),
                                                  f"Add target {name}"))
        return n

    def remove_targets(self, rows) -> None:
        rows = sorted(set(int(r) for r in rows))
        if not rows:
            return
        keep = np.ones(self.row_count(), dtype=bool)
        keep[rows] = False
        after = RowState({k: v[keep] for k, v in self.rows.columns.items()},
                         {k: v[keep] for k, v in self.rows.errors.items()})
        text = (f"Remove {self.rows.columns['name'][rows[0]]}" if len(rows) == 1
                else f"Remove {len(rows)} targets")
        self.undo_stack.push(commands.ReplaceRows(self, self.rows, after, text))

    def import_targets(self, targets: Targets, label: str = "") -> None:
        """Append the targets of a list (InputError if their planning fields are bad)."""
        added = rows_from_targets(targets, label or None)
        text = f"Import {len(added)} targets" + (f" from {os.path.basename(label)}"
                                                  if label else "")
        self.undo_stack.push(commands.ReplaceRows(self, self.rows, _concat(self.rows, added),
                                                  text))

    def replace_site(self, site: Site) -> None:
        if site != self.site:
            self.undo_stack.push(commands.ReplaceSite(self, self.site, site))

    def change_night(self, night: NightSettings, what: str = "") -> None:
        check_night(night)
        if night != self.night:
            self.undo_stack.push(commands.ChangeNight(self, self.night, night, what))

    def change_tolerance(self, arcsec: float) -> None:
        arcsec = float(arcsec)
        if not (np.isfinite(arcsec) and arcsec > 0.0):
            raise ValueError("the drift tolerance must be a positive number of ″")
        if arcsec != self.tolerance:
            self.undo_stack.push(commands.ChangeTolerance(self, self.tolerance, arcsec))

    # ------------------------------------------------------------------ applied by commands
    def apply_cell(self, row: int, key: str, value) -> None:
        column = self.rows.columns[key].copy()
        column[row] = value
        self.rows = RowState({**self.rows.columns, key: column}, self.rows.errors)
        self._touched()
        self.cell_changed.emit(row, key)
        self.changed.emit()

    def apply_rows(self, state: RowState) -> None:
        self.rows = state
        self._touched()
        self.rows_reset.emit()
        self.changed.emit()

    def apply_site(self, site: Site) -> None:
        self.site = site
        self._touched()
        self.site_changed.emit(site)
        self.changed.emit()

    def apply_night(self, night: NightSettings) -> None:
        self.night = night
        self._touched()
        self.night_changed.emit(night)
        self.changed.emit()

    def apply_tolerance(self, arcsec: float) -> None:
        self.tolerance = arcsec
        self.tolerance_changed.emit(arcsec)

    def _on_clean_changed(self, _clean: bool) -> None:
        self.dirty_changed.emit(self.dirty)

    def _touched(self) -> None:
        self.generation += 1
        self._targets_cache = None
        self.schedule_from_file = False

    # ------------------------------------------------------------------ whole documents
    def load(self, doc: PlanDocument, path: str | None, dirty: bool = False) -> None:
        """Replace everything with `doc` (from `path`); the undo history starts afresh."""
        self.undo_stack.clear()
        self.rows = rows_from_targets(doc.targets, path)
        self.site, self.night = doc.site, doc.night
        self.tolerance, self.schedule = doc.drift_tolerance_arcsec, list(doc.schedule)
        self.description = doc.description
        self.path = path
        self._forced_dirty = dirty
        self._touched()
        self.schedule_from_file = bool(self.schedule)
        self.rows_reset.emit()
        self.site_changed.emit(self.site)
        self.night_changed.emit(self.night)
        self.tolerance_changed.emit(self.tolerance)
        self.path_changed.emit(path or "")
        self.dirty_changed.emit(self.dirty)
        self.changed.emit()

    def mark_saved(self, path: str) -> None:
        self.path = path
        self._forced_dirty = False
        self.undo_stack.setClean()
        self.path_changed.emit(path)
        self.dirty_changed.emit(self.dirty)


def _concat(first: RowState, second: RowState) -> RowState:
    """Rows of `first` followed by `second`; error columns missing on one side become NaN,
    timing columns missing on one side blank."""
    def column(state: RowState, key: str) -> np.ndarray:
        return state.columns.get(key, np.full(len(state), None, dtype=object))

    keys = list(first.columns) + [k for k in second.columns if k not in first.columns]
    columns = {k: np.concatenate([column(first, k), column(second, k).astype(
        column(first, k).dtype)]) for k in keys}
    errors = {}
    for key in list(first.errors) + [k for k in second.errors if k not in first.errors]:
        a = first.errors.get(key, np.full(len(first), np.nan))
        b = second.errors.get(key, np.full(len(second), np.nan))
        errors[key] = np.concatenate([a, b])
    return RowState(columns, errors)
