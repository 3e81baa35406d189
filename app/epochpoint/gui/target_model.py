"""The target table: a QAbstractTableModel over the document's columns, with a sort/filter proxy.

Fast for long lists: data() only indexes into per-column lists of display strings, each built
once (for the whole column, lazily, when first shown) and rebuilt only for what changed. There
are no per-row widgets. Sorting is done here with numpy (one argsort, whatever the length),
not by the proxy comparing rows pair by pair in Python; the proxy only filters. The values
sorted on are the ones SORT_ROLE gives (gui.sorting), unknown ones last in both directions.

Right ascension shows as sexagesimal hours and accepts degrees or hh:mm:ss; declination shows
as +dd:mm:ss and accepts degrees too. An edit is parsed and checked with the same rules as a
file (io.angles, io.epochs, io.planningfields, core Targets); a bad value is refused, the old
value kept, and `edit_rejected` carries the reason for the status bar.

After a recompute, read-only columns show, at the window's shown instant (gui.instant; the
headers and tooltips name it), the observed altitude, whether pointing is allowed (the site's
interlocks, Sun first) and the drift (the offset of the true position from the catalogue
position); and whether the target is observable on the chosen night (or why not). A refused
target is marked three ways: an icon of a distinct shape, a short word, and the theme's
warning colour.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from PySide6.QtCore import (QAbstractTableModel, QModelIndex, QPointF,
                            QSortFilterProxyModel, Qt, Signal)
from PySide6.QtGui import QBrush, QColor, QIcon, QPainter, QPainterPath, QPen, QPixmap

from epochpoint.io.angles import format_dec_dms, format_ra_hms, parse_dec, parse_ra
from epochpoint.io.epochs import parse_epoch
from epochpoint.io.planningfields import PARSERS

from .number_text import fixed
from .sorting import SORT_ROLE, sort_value
from .themes import colours

FILTER_ROLE = Qt.ItemDataRole.UserRole + 1
DOC_ROW_ROLE = Qt.ItemDataRole.UserRole + 2


@dataclass(frozen=True)
class ColumnSpec:
    key: str
    header: str
    tip: str
    width: int
    computed: bool = False
    numeric: bool = True


COLUMNS = (
    ColumnSpec("name", "Name", "Target name", 120, numeric=False),
    ColumnSpec("kind", "Kind", "What the target is: star, Sun, Moon, planet, dwarf planet, "
               "asteroid or comet", 64, numeric=False),
    ColumnSpec("ra", "RA (catalogue)", "Right ascension as catalogued (ICRS, at the "
               "catalogue epoch), h:m:s; type decimal ° or hh:mm:ss", 104),
    ColumnSpec("dec", "Dec (catalogue)", "Declination as catalogued (ICRS, at the catalogue "
               "epoch), °:′:″; type decimal ° or +dd:mm:ss", 112),
    ColumnSpec("alt_now", "Alt", "Observed altitude at the shown instant, ° (refraction "
               "included)", 112, computed=True),
    ColumnSpec("pointing", "Pointing", "May the telescope point there at the shown instant? "
               "(the site's interlocks: Sun avoidance, altitude, horizon mask, mount limits)",
               76, computed=True, numeric=False),
    ColumnSpec("tonight", "Night", "Observable on the chosen night within the night settings, "
               "or why not", 150, computed=True, numeric=False),
    ColumnSpec("drift", "Drift ″", "Drift: the offset of the true position at the shown "
               "instant from the catalogue position, ″", 70, computed=True),
    ColumnSpec("priority", "Pri", "Priority, 1 (highest) to 5 (lowest)", 38),
    ColumnSpec("exposure", "Exp s", "Exposure, s", 56),
    ColumnSpec("repeats", "Rep", "Exposures per block", 40),
    ColumnSpec("epoch", "Epoch", "Catalogue epoch (Julian year; type J2016.0 or B1950.0)", 64),
    ColumnSpec("pm_ra_cosdec", "pmRA*", "Proper motion in RA × cos Dec, mas/yr", 78),
    ColumnSpec("pm_dec", "pmDec", "Proper motion in Dec, mas/yr", 78),
    ColumnSpec("parallax", "Plx", "Parallax, mas", 64),
    ColumnSpec("radial_velocity", "RV", "Radial velocity, km/s (positive receding)", 60),
    ColumnSpec("notes", "Notes", "Free text", 240, numeric=False),
)
COLUMN_INDEX = {spec.key: i for i, spec in enumerate(COLUMNS)}
# A body's place comes from the engine at each instant: its RA/Dec cells show the place of
# date (read-only) and the catalogue columns do not apply to it.
PLACE_KEYS = ("ra", "dec")
CATALOGUE_KEYS = ("epoch", "pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity")
READ_ONLY_KEYS = ("kind",)
BODY_PLACE_TIP = ("Place of date (topocentric apparent, true equator and equinox of date) at "
                  "the shown instant, computed for this body")

# Short words for the interlock reasons of core.limits.Interlocks.violations, in its order.
POINTING_WORDS = (("Sun", "SUN"), ("minimum altitude", "too low"), ("horizon mask", "masked"),
                  ("hour-angle", "HA limit"), ("declination", "Dec limit"))


def pointing_word(reason: str) -> str:
    if not reason:
        return "ok"
    for fragment, word in POINTING_WORDS:
        if fragment in reason:
            return word
    return "refused"


def _fixed(decimals: int):
    return lambda values: [f"{v:.{decimals}f}" for v in values]


def _epoch_text(values):
    return [f"{v:.2f}" for v in values]


# Display formatters: a whole column (numpy array) in, a list of strings out.
DISPLAY = {
    "name": lambda values: [str(v) for v in values],
    "kind": lambda values: [str(v) for v in values],
    "ra": lambda values: list(format_ra_hms(values, 2)),
    "dec": lambda values: list(format_dec_dms(values, 1)),
    "epoch": _epoch_text,
    "pm_ra_cosdec": _fixed(3), "pm_dec": _fixed(3), "parallax": _fixed(3),
    "radial_velocity": _fixed(2),
    "priority": lambda values: [str(int(v)) for v in values],
    "exposure": lambda values: [f"{v:g}" for v in values],
    "repeats": lambda values: [str(int(v)) for v in values],
    "notes": lambda values: [str(v) for v in values],
}


def _number(text) -> float:
    try:
        value = float(str(text).strip())
    except ValueError:
        raise ValueError(f"{str(text).strip()!r} is not a number") from None
    if not np.isfinite(value):
        raise ValueError(f"{str(text).strip()!r} is not a finite number")
    return value


PARSE = {
    "name": lambda text: " ".join(str(text).split()),
    "ra": parse_ra, "dec": parse_dec, "epoch": parse_epoch,
    "pm_ra_cosdec": _number, "pm_dec": _number, "parallax": _number,
    "radial_velocity": _number,
    **PARSERS,
}


def parse_cell(key: str, text):
    """The value typed into a cell of column `key`, or ValueError with the reason."""
    if key not in PARSE:
        raise ValueError("this column is computed and cannot be edited")
    if str(text).strip() == "" and key not in ("notes",):
        raise ValueError("a value is needed")
    return PARSE[key](text)


def _edit_text(key: str, value) -> str:
    """What the editor starts with: the shown text for angles, full precision for numbers."""
    if key == "ra":
        return format_ra_hms(value, 3)
    if key == "dec":
        return format_dec_dms(value, 2)
    if isinstance(value, (float, np.floating)):
        return f"{value:.12g}"
    return str(value)


def _marker_icon(kind: str, colour: str) -> QIcon:
    """A small icon whose shape tells the kind: a rayed disc for the Sun, a down-pointing
    triangle for any other refusal."""
    size = 14
    pixmap = QPixmap(size, size)
    pixmap.fill(Qt.GlobalColor.transparent)
    painter = QPainter(pixmap)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing)
    pen = QPen(QColor(colour), 1.6)
    painter.setPen(pen)
    if kind == "sun":
        painter.setBrush(QBrush(QColor(colour)))
        painter.drawEllipse(QPointF(7, 7), 3.0, 3.0)
        for k in range(8):
            angle = k * np.pi / 4
            c, s = np.cos(angle), np.sin(angle)
            painter.drawLine(QPointF(7 + 4.6 * c, 7 + 4.6 * s), QPointF(7 + 6.4 * c, 7 + 6.4 * s))
    else:
        path = QPainterPath()
        path.moveTo(1.5, 2.5)
        path.lineTo(12.5, 2.5)
        path.lineTo(7.0, 12.5)
        path.closeSubpath()
        painter.setBrush(Qt.BrushStyle.NoBrush)
        painter.drawPath(path)
        painter.drawLine(QPointF(7, 4.8), QPointF(7, 8.2))
        painter.drawPoint(QPointF(7, 10.0))
    painter.end()
    return QIcon(pixmap)


@dataclass
class Computed:
    """Results of a recompute, one value per document row."""

    alt_now: np.ndarray          # degrees
    refused_now: np.ndarray      # '' when pointing is allowed, else the reason
    tonight: np.ndarray | None   # '' when observable tonight, else the reason; None: unknown
    drift: np.ndarray            # arcsec
    ra_date: np.ndarray | None = None   # body rows' place of date (deg), NaN for stars
    dec_date: np.ndarray | None = None


class TargetTableModel(QAbstractTableModel):
    """The document's targets as a table (see module docstring).

    Model rows are in display order: `doc_row(row)` is the document's row shown at model row
    `row` and `model_row(doc_row)` the inverse; both are identity until the table is sorted.
    """

    edit_rejected = Signal(int, str, str)   # document row, column key, reason

    def __init__(self, document, parent=None):
        super().__init__(parent)
        self.document = document
        self.computed: Computed | None = None
        self.instant_label = ""  # '01:40 -03': the shown instant of the computed columns
        self.instant_iso = ""
        self._display: dict[str, list] = {}
        self._filter_text: list | None = None
        self.column_builds = 0  # how many whole-column display lists were built (tests)
        self._icons: dict = {}
        self._brushes: dict = {}
        self._sort_column, self._sort_order = -1, Qt.SortOrder.AscendingOrder
        self._sort_held = False  # a re-sort waiting for an open cell editor (set_computed)
        self._order = np.arange(document.row_count())
        self._position = self._order.copy()
        self.set_theme("light")
        document.rows_reset.connect(self._on_rows_reset)
        document.cell_changed.connect(self._on_cell_changed)

    def doc_row(self, row: int) -> int:
        return int(self._order[row])

    def model_row(self, doc_row: int) -> int:
        return int(self._position[doc_row])

    # ------------------------------------------------------------------ Qt model API
    def rowCount(self, parent=QModelIndex()):
        return 0 if parent.isValid() else self.document.row_count()

    def columnCount(self, parent=QModelIndex()):
        return 0 if parent.isValid() else len(COLUMNS)

    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):
        if orientation != Qt.Orientation.Horizontal or not 0 <= section < len(COLUMNS):
            return None
        spec = COLUMNS[section]
        if role == Qt.ItemDataRole.DisplayRole:
            if spec.key == "alt_now" and self.instant_label:
                return f"Alt at {self.instant_label}"
            return spec.header
        if role == Qt.ItemDataRole.ToolTipRole:
            if spec.computed:
                return spec.tip + self._instant_note()
            return spec.tip + ". Press F2 or Enter to edit."
        return None

    def set_instant_label(self, label: str, iso: str) -> None:
        """Name the shown instant of the computed columns ('01:40 -03' and its ISO text)."""
        if (label, iso) != (self.instant_label, self.instant_iso):
            self.instant_label, self.instant_iso = label, iso
            self.headerDataChanged.emit(Qt.Orientation.Horizontal, 0, len(COLUMNS) - 1)

    def _instant_note(self) -> str:
        return f" (shown instant: {self.instant_label}, {self.instant_iso})" \
            if self.instant_label else ""

    def flags(self, index):
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        if not index.isValid():
            return base
        key = COLUMNS[index.column()].key
        if COLUMNS[index.column()].computed or key in READ_ONLY_KEYS:
            return base
        if key in PLACE_KEYS + CATALOGUE_KEYS and self.document.is_body(self.doc_row(index.row())):
            return base
        return base | Qt.ItemFlag.ItemIsEditable

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        row, spec = self._order[index.row()], COLUMNS[index.column()]
        key = spec.key
        if key in PLACE_KEYS + CATALOGUE_KEYS and self.document.is_body(row):
            return self._body_cell(key, row, role)
        if role == Qt.ItemDataRole.DisplayRole:
            return self._display_list(key)[row]
        if role == Qt.ItemDataRole.EditRole:
            return None if spec.computed or key in READ_ONLY_KEYS else \
                _edit_text(key, self.document.value(row, key))
        if role == Qt.ItemDataRole.TextAlignmentRole:
            if spec.numeric:
                return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            return int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.DecorationRole and key in ("name", "pointing"):
            return self._icons.get(self._refusal_kind(row))
        if role == Qt.ItemDataRole.ForegroundRole and spec.computed:
            return self._foreground(key, row)
        if role == Qt.ItemDataRole.ToolTipRole:
            return self._tooltip(key, row)
        if role == FILTER_ROLE:
            return self._filter_list()[row]
        if role == SORT_ROLE:
            return sort_value(self._sort_keys_cell(key, row))
        if role == DOC_ROW_ROLE:
            return int(row)
        return None

    def _body_cell(self, key: str, row: int, role):
        """A body's RA/Dec (its place of date at the shown instant) and catalogue cells."""
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == SORT_ROLE:
            return sort_value(self._sort_keys_cell(key, row))
        if role == DOC_ROW_ROLE:
            return int(row)
        if role == FILTER_ROLE:
            return self._filter_list()[row]
        place = self._place_of_date(key, row)
        if role == Qt.ItemDataRole.DisplayRole:
            if key not in PLACE_KEYS:
                return ""
            if place is None:
                return "moves"
            return format_ra_hms(place, 2) if key == "ra" else format_dec_dms(place, 1)
        if role == Qt.ItemDataRole.ToolTipRole:
            if key not in PLACE_KEYS:
                return "Not used for a solar-system body"
            if place is None:
                return "A solar-system body: its place is computed at each instant"
            return f"{BODY_PLACE_TIP}{self._instant_note()}: {place:.6f}°"
        if role == Qt.ItemDataRole.ForegroundRole:
            return self._brushes["muted"]
        return None

    def _place_of_date(self, key: str, row: int):
        """A body's computed RA or Dec of date (deg), or None before a recompute."""
        c = self.computed
        values = None if c is None else (c.ra_date if key == "ra" else c.dec_date)
        if values is None or not np.isfinite(values[row]):
            return None
        return float(values[row])

    def setData(self, index, value, role=Qt.ItemDataRole.EditRole):
        if role != Qt.ItemDataRole.EditRole or not index.isValid():
            return False
        row, spec = self.doc_row(index.row()), COLUMNS[index.column()]
        try:
            parsed = parse_cell(spec.key, value)
            self.document.check_cell(row, spec.key, parsed)
        except ValueError as err:
            name = self.document.value(row, "name")
            self.edit_rejected.emit(row, spec.key, f"{spec.header} of {name}: {err}")
            return False
        if not _same(parsed, self.document.value(row, spec.key)):
            self.document.edit_cell(row, spec.key, parsed)
        return True

    # ------------------------------------------------------------------ sorting
    def sort(self, column, order=Qt.SortOrder.AscendingOrder):
        """Sort the rows by a column (numpy argsort; not-yet-computed values last)."""
        self._sort_column, self._sort_order = column, order
        self._apply_sort()

    def _sort_keys(self, key: str) -> np.ndarray:
        if key in ("alt_now", "drift"):
            n = self.document.row_count()
            return np.full(n, np.nan) if self.computed is None else \
                np.asarray(getattr(self.computed, key), dtype=float)
        if key in ("pointing", "tonight", "name", "notes", "kind"):
            return np.array([s.lower() for s in self._display_list(key)], dtype=str)
        values = np.array(self.document.column(key), dtype=float)
        if key in PLACE_KEYS + CATALOGUE_KEYS:  # bodies: their place of date, else unknown
            for row in np.flatnonzero(self.document.kinds() != "star").tolist():
                values[row] = self._sort_keys_cell(key, row)
        return values

    def _sort_keys_cell(self, key: str, row: int):
        """One cell's entry of _sort_keys (the value SORT_ROLE gives, for any other view)."""
        if key in ("alt_now", "drift"):
            return None if self.computed is None else float(getattr(self.computed, key)[row])
        if key in ("pointing", "tonight", "name", "notes", "kind"):
            return self._display_list(key)[row].lower()
        if key in PLACE_KEYS + CATALOGUE_KEYS and self.document.is_body(row):
            place = self._place_of_date(key, row) if key in PLACE_KEYS else None
            return np.nan if place is None else place
        return float(self.document.value(row, key))

    def _apply_sort(self) -> None:
        self._sort_held = False
        n = self.document.row_count()
        if not 0 <= self._sort_column < len(COLUMNS) or n == 0:
            new_order = np.arange(n)
        else:
            keys = self._sort_keys(COLUMNS[self._sort_column].key)
            missing = np.isnan(keys) if keys.dtype.kind == "f" else np.zeros(n, dtype=bool)
            present = np.flatnonzero(~missing)
            ranked = present[np.argsort(keys[present], kind="stable")]
            if self._sort_order == Qt.SortOrder.DescendingOrder:
                ranked = ranked[::-1]
            new_order = np.concatenate([ranked, np.flatnonzero(missing)])
        if np.array_equal(new_order, self._order):
            return
        self.layoutAboutToBeChanged.emit()
        new_position = np.empty(n, dtype=int)
        new_position[new_order] = np.arange(n)
        old = self.persistentIndexList()
        moved = [self.index(int(new_position[self._order[i.row()]]), i.column()) for i in old]
        self._order, self._position = new_order, new_position
        self.changePersistentIndexList(old, moved)
        self.layoutChanged.emit()

    # ------------------------------------------------------------------ computed columns
    def set_computed(self, computed: Computed | None, keep=None) -> None:
        """Show a recompute's results (ignored unless they have one value per row).

        `keep` is the (model row, column) of a cell whose editor is open, or None. The view
        resets an open editor to the model's value on any dataChanged that covers its cell,
        so that cell is left out; and a re-sort, which would move the row being typed in,
        waits for release_editor()."""
        if computed is not None and len(computed.alt_now) != self.document.row_count():
            computed = None
        self.computed = computed
        for key in ("alt_now", "pointing", "tonight", "drift"):
            self._display.pop(key, None)
        if not self.rowCount():
            return
        # What a result changes: the computed columns, and the name's marker and tooltip.
        computed_columns = [i for i, spec in enumerate(COLUMNS) if spec.computed]
        self._changed_around(min(computed_columns), max(computed_columns), keep)
        self._changed_around(COLUMN_INDEX["name"], COLUMN_INDEX["name"], keep)
        if (self.document.kinds() != "star").any():  # bodies' places of date
            self._changed_around(COLUMN_INDEX["ra"], COLUMN_INDEX["dec"], keep)
        if 0 <= self._sort_column < len(COLUMNS) and COLUMNS[self._sort_column].computed:
            if keep is None:
                self._apply_sort()
            else:
                self._sort_held = True

    def release_editor(self) -> None:
        """The cell editor closed: apply a re-sort that waited for it (set_computed)."""
        if self._sort_held:
            self._sort_held = False
            self._apply_sort()

    def _changed_around(self, first: int, last: int, keep) -> None:
        """dataChanged for every row of columns first..last except the cell `keep`."""
        n = self.rowCount()
        if keep is None or not first <= keep[1] <= last:
            self.dataChanged.emit(self.index(0, first), self.index(n - 1, last))
            return
        row, column = keep
        for r0, c0, r1, c1 in ((0, first, row - 1, last), (row, first, row, column - 1),
                               (row, column + 1, row, last), (row + 1, first, n - 1, last)):
            if r0 <= r1 and c0 <= c1:
                self.dataChanged.emit(self.index(r0, c0), self.index(r1, c1))

    def refusal(self, doc_row: int) -> str:
        """Why pointing at the target is refused now ('' if allowed or not yet computed)."""
        if self.computed is None:
            return ""
        return str(self.computed.refused_now[doc_row])

    def _refusal_kind(self, row: int) -> str | None:
        reason = self.refusal(row)
        if not reason:
            return None
        return "sun" if "Sun" in reason else "limit"

    def _computed_display(self, key: str) -> list:
        n, c = self.document.row_count(), self.computed
        if c is None:
            return [""] * n
        if key == "alt_now":
            return [fixed(v, 1, signed=True) if np.isfinite(v) else "" for v in c.alt_now]
        if key == "pointing":
            return [pointing_word(r) for r in c.refused_now]
        if key == "tonight":
            if c.tonight is None:
                return ["…"] * n
            return ["yes" if not r else f"no: {r}" for r in c.tonight]
        return [f"{v:.2f}" if v < 100 else f"{v:.0f}" for v in c.drift]

    def _foreground(self, key: str, row: int):
        if self.computed is None:
            return None
        if key == "tonight":
            known = self.computed.tonight is not None
            return self._brushes["muted"] if known and self.computed.tonight[row] else None
        if key == "drift":
            return None
        kind = self._refusal_kind(row)
        if kind is None:
            return None
        return self._brushes["danger" if kind == "sun" else "warning"]

    def _tooltip(self, key: str, row: int):
        reason = self.refusal(row)
        at = f" at {self.instant_label}" if self.instant_label else ""
        if key in ("name", "pointing", "alt_now") and reason:
            return f"Pointing refused{at}: {reason}"
        if key == "pointing" and self.computed is not None:
            return f"Pointing allowed{at} by the site's interlocks"
        if key == "tonight" and self.computed is not None and self.computed.tonight is not None:
            why = self.computed.tonight[row]
            return f"Not observable on the chosen night: {why}" if why \
                else "Observable on the chosen night"
        if key == "ra":
            return f"{self.document.value(row, 'ra'):.6f}°"
        spec = COLUMNS[COLUMN_INDEX[key]]
        return spec.tip + (self._instant_note() if spec.computed else "")

    # ------------------------------------------------------------------ caches
    def _display_list(self, key: str) -> list:
        strings = self._display.get(key)
        if strings is None:
            self.column_builds += 1
            if COLUMNS[COLUMN_INDEX[key]].computed:
                strings = self._computed_display(key)
            elif key == "kind":
                strings = DISPLAY[key](self.document.kinds())
            else:
                strings = DISPLAY[key](self.document.column(key))
            self._display[key] = strings
        return strings

    def _filter_list(self) -> list:
        if self._filter_text is None:
            names, notes = self.document.column("name"), self.document.column("notes")
            self._filter_text = [f"{a} {b}".lower() for a, b in zip(names, notes)]
        return self._filter_text

    def _on_rows_reset(self) -> None:
        self.beginResetModel()
        self._display.clear()
        self._filter_text = None
        self.computed = None
        self._order = np.arange(self.document.row_count())
        self._position = self._order.copy()
        self.endResetModel()
        self._apply_sort()

    def _on_cell_changed(self, doc_row: int, key: str) -> None:
        strings = self._display.get(key)
        if strings is not None:
            strings[doc_row] = DISPLAY[key](self.document.column(key)[doc_row:doc_row + 1])[0]
        if key in ("name", "notes"):
            self._filter_text = None
        row, column = self.model_row(doc_row), COLUMN_INDEX[key]
        self.dataChanged.emit(self.index(row, column), self.index(row, column))

    def set_theme(self, theme: str) -> None:
        """Marker icons and colours for the theme."""
        c = colours(theme)
        self._icons = {"sun": _marker_icon("sun", c["danger"]),
                       "limit": _marker_icon("limit", c["warning"])}
        self._brushes = {name: QBrush(QColor(c[name])) for name in ("danger", "warning", "muted")}
        if self.rowCount():
            self.dataChanged.emit(self.index(0, 0),
                                  self.index(self.rowCount() - 1, len(COLUMNS) - 1))


def _same(a, b) -> bool:
    if isinstance(a, (float, np.floating)) and isinstance(b, (float, np.floating)):
        return float(a) == float(b)
    return a == b


class TargetFilterProxy(QSortFilterProxyModel):
    """Filters on name and notes (case-blind); sorting is passed to the source model."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setFilterRole(FILTER_ROLE)
        self.setFilterKeyColumn(COLUMN_INDEX["name"])
        self.setFilterCaseSensitivity(Qt.CaseSensitivity.CaseInsensitive)

    def sort(self, column, order=Qt.SortOrder.AscendingOrder):
        self.sourceModel().sort(column, order)

    def doc_row(self, proxy_index) -> int:
        return int(proxy_index.data(DOC_ROW_ROLE))

    def index_of(self, doc_row: int, column: int = 0):
        source = self.sourceModel()
        return self.mapFromSource(source.index(source.model_row(doc_row), column))
