"""Every sortable table of the window sorts by value, in both directions, with values not yet
known last, and without a word on stderr (a comparison that returned a numpy bool used to
flood stderr with TypeErrors and crash the Qt bindings).

The expected order is built in the test with Python's sorted() on the numbers and words the
table is made from (the document's columns, the drift result), not with the table's sort.
"""
import math

import numpy as np
import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QTableView

from epochpoint.gui.panels.drift_model import KEYS as DRIFT_KEYS
from epochpoint.gui.sorting import SORT_ROLE
from epochpoint.gui.target_model import COLUMNS, DOC_ROW_ROLE

from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def _missing(value) -> bool:
    return value is None or (isinstance(value, float) and math.isnan(value)) or value == ""


def _check_order(values: list, descending: bool, what: str) -> None:
    """`values` in shown order: the known ones sorted by value, the unknown ones last."""
    known = [v for v in values if not _missing(v)]
    assert all(_missing(v) for v in values[len(known):]), f"{what}: unknown values not last"
    assert known == sorted(known, reverse=descending), f"{what}: not in value order"


def _target_value(window, doc_row: int, key: str):
    """The value a target-table cell shows, from the document and the computed results."""
    computed = window.model.computed
    if key in ("alt_now", "drift"):
        return float(getattr(computed, key)[doc_row])
    if key in ("pointing", "tonight", "kind"):
        return window.model.data(window.model.index(window.model.model_row(doc_row),
                                                    [c.key for c in COLUMNS].index(key))).lower()
    value = window.document.value(doc_row, key)
    return str(value).lower() if key in ("name", "notes") else float(value)


def _drift_value(panel, row: int, key: str):
    """The value a drift-table cell stands for, from the targets and the drift result."""
    t, d = panel.targets, panel.result["drift"]
    if key == "name":
        return str(t.names()[row]).lower()
    if key == "epoch":
        return float(t.epoch[row])
    if key == "catalogue":
        return float(t.ra[row])
    if key == "propagated":
        return float(panel.result["ra_propagated"][row])
    if key == "flag":
        return int(bool(d["over_tolerance"][row]))
    if key == "crossing":
        return str(d["crossing"][row] or "")
    return float(d[key][row])


def test_every_column_of_every_table_sorts_by_value(make_window, qtbot, capfd):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.model.computed is not None
                    and window.model.computed.tonight is not None
                    and window.drift.result is not None, timeout=30000)
    # Some drifts at +30 years have over-tolerance flags and crossings to order.
    window.drift.set_tolerance(5.0)
    qtbot.waitUntil(lambda: window.drift.result is not None
                    and window.drift.result["tolerance"] == 5.0, timeout=30000)
    capfd.readouterr()

    tables = [t for t in window.findChildren(QTableView) if t.isSortingEnabled()]
    assert window.table in tables and window.drift.table in tables
    checked = 0
    for table in tables:
        model = table.model()
        for column in range(model.columnCount()):
            for order in (Qt.SortOrder.AscendingOrder, Qt.SortOrder.DescendingOrder):
                table.sortByColumn(column, order)
                qtbot.wait(1)
                descending = order == Qt.SortOrder.DescendingOrder
                if table is window.table:
                    key = COLUMNS[column].key
                    rows = [model.index(r, 0).data(DOC_ROW_ROLE)
                            for r in range(model.rowCount())]
                    values = [_target_value(window, row, key) for row in rows]
                else:
                    assert table is window.drift.table, "a sortable table this test misses"
                    key = DRIFT_KEYS[column]
                    rows = [window.drift.proxy.mapToSource(model.index(r, 0)).row()
                            for r in range(model.rowCount())]
                    values = [_drift_value(window.drift, row, key) for row in rows]
                assert sorted(rows) == list(range(window.document.row_count()))
                # The sort role gives plain Python values (a numpy bool broke the bindings).
                kinds = {type(model.index(r, column).data(SORT_ROLE))
                         for r in range(model.rowCount())}
                assert kinds <= {int, float, str, type(None)}, (key, kinds)
                _check_order(values, descending, f"{table.objectName() or 'drift'} {key}")
                checked += 1
    assert checked >= 2 * (len(COLUMNS) + len(DRIFT_KEYS))
    # Editing and undoing while sorted (the crash came on the next change) stays quiet.
    window.table.sortByColumn([c.key for c in COLUMNS].index("drift"),
                              Qt.SortOrder.DescendingOrder)
    window.drift.table.sortByColumn(DRIFT_KEYS.index("drift"), Qt.SortOrder.DescendingOrder)
    window.document.add_target("Sorted newcomer")
    window.document.undo_stack.undo()
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.drift.result is not None, timeout=30000)
    err = capfd.readouterr().err
    assert err == "", f"written to stderr while sorting: {err[:500]}"


def test_missing_values_sort_last_both_ways(qtbot):
    """Values not yet computed (None, NaN) stay at the bottom whichever way the table sorts."""
    from epochpoint.gui.panels.drift_model import DriftSortProxy
    from PySide6.QtGui import QStandardItem, QStandardItemModel

    source = QStandardItemModel()
    for value in (2.5, None, np.float64(-1.0), float("nan"), 7.0):
        item = QStandardItem("x")
        item.setData(value, SORT_ROLE)
        source.appendRow(item)
    proxy = DriftSortProxy()
    proxy.setSourceModel(source)
    for order, expected in ((Qt.SortOrder.AscendingOrder, [-1.0, 2.5, 7.0]),
                            (Qt.SortOrder.DescendingOrder, [7.0, 2.5, -1.0])):
        proxy.sort(0, order)
        shown = [proxy.index(r, 0).data(SORT_ROLE) for r in range(proxy.rowCount())]
        assert shown[:3] == expected
        assert all(_missing(v) for v in shown[3:])
