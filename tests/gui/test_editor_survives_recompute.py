"""What the user types is never overwritten: a recompute that finishes while a cell editor is
open leaves the editor's text alone (the other cells still get their new values), and the
typed value is committed when the editor closes."""
import numpy as np
import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QLineEdit

from epochpoint.gui.target_model import COLUMN_INDEX

from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def _open_editor(qtbot, window, doc_row: int, key: str) -> QLineEdit:
    window.activateWindow()
    index = window.proxy.index_of(doc_row, COLUMN_INDEX[key])
    window.table.setCurrentIndex(index)
    window.table.setFocus()
    window.table.edit(index)
    editors = [w for w in window.table.viewport().findChildren(QLineEdit) if w.isVisible()]
    assert len(editors) == 1, "no cell editor opened"
    return editors[0]


def _finish_a_recompute(qtbot, window) -> None:
    """Start a recompute and wait until both of its results (plan, positions) arrived."""
    before_plan, before_now = window.plan, window.now
    window.recompute()
    qtbot.waitUntil(lambda: not window.computing() and window.plan is not before_plan
                    and window.now is not before_now, timeout=30000)
    qtbot.wait(50)


@pytest.mark.parametrize("key, typed, stored", [
    ("name", "Wick test 2", "Wick test 2"),
    ("ra", "11:00:00", 165.0),  # 11 h = 165 deg
])
def test_typing_survives_a_finishing_recompute(make_window, qtbot, key, typed, stored):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.model.computed is not None, timeout=30000)
    editor = _open_editor(qtbot, window, 0, key)
    editor.selectAll()
    qtbot.keyClicks(editor, typed)
    assert editor.text() == typed
    old_alt = window.model.computed.alt_now.copy()

    _finish_a_recompute(qtbot, window)
    assert editor.text() == typed, "the recompute overwrote the open editor"
    # Results around the editor were applied: the computed columns show the new values.
    assert window.model.computed.alt_now is not old_alt
    alt_cell = window.proxy.index_of(1, COLUMN_INDEX["alt_now"]).data()
    assert alt_cell == f"{window.model.computed.alt_now[1]:+.1f}"

    qtbot.keyClick(editor, Qt.Key.Key_Return)
    qtbot.waitUntil(lambda: window.table.state() != window.table.State.EditingState)
    value = window.document.value(0, key)
    assert (np.isclose(value, stored) if isinstance(stored, float) else value == stored)


def test_a_sort_by_a_computed_column_waits_for_the_editor(make_window, qtbot):
    """Sorted by altitude, a recompute would move the row being typed in; the new order is
    applied once the editor closes."""
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.model.computed is not None, timeout=30000)
    window.table.sortByColumn(COLUMN_INDEX["alt_now"], Qt.SortOrder.DescendingOrder)
    editor = _open_editor(qtbot, window, 3, "notes")
    row_before = window.table.currentIndex().row()
    editor.end(False)
    qtbot.keyClicks(editor, " and more")
    # Another shown instant: new altitudes, so a new altitude order, arrive meanwhile.
    order_before = [window.proxy.doc_row(window.proxy.index(r, 0))
                    for r in range(window.proxy.rowCount())]
    before_now = window.now
    window.set_shown_instant("2027-01-20T08:30:00Z")
    qtbot.waitUntil(lambda: not window.computing() and window.now is not before_now,
                    timeout=30000)
    qtbot.wait(50)
    assert [window.proxy.doc_row(window.proxy.index(r, 0))
            for r in range(window.proxy.rowCount())] == order_before
    assert window.table.currentIndex().row() == row_before
    assert editor.text() == "wide pair; centre on the brighter star and more"
    qtbot.keyClick(editor, Qt.Key.Key_Return)  # committed on the next turn of the loop
    qtbot.waitUntil(lambda: window.table.state() != window.table.State.EditingState)
    assert window.document.value(3, "notes") == "wide pair; centre on the brighter star and more"
    # Once closed, the table is in altitude order again.
    qtbot.waitUntil(lambda: not window.computing(), timeout=30000)
    qtbot.wait(50)
    order_after = [window.proxy.doc_row(window.proxy.index(r, 0))
                   for r in range(window.proxy.rowCount())]
    alts = [window.model.computed.alt_now[row] for row in order_after]
    assert alts == sorted(alts, reverse=True) and order_after != order_before
