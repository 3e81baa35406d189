"""Tab follows the screen order in every panel: walking focus with the Tab key through each
tab of the window (and the correction ledger), the focused widgets come top to bottom, and
left to right within a row, by their geometry; every enabled control is reached.

A row here is a widget's first line (its top, at most 32 px of it): the next widget is on the
same row when the middle of its first line is within that line, else it must be lower. This
reading order is common practice for forms (the order a reader's eye takes)."""
import pytest
from PySide6.QtCore import QPoint, Qt
from PySide6.QtWidgets import (QAbstractItemView, QAbstractSpinBox, QApplication, QComboBox,
                               QWidget)

from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

LINE = 32


def _line(panel, widget):
    top_left = widget.mapTo(panel, QPoint(0, 0))
    return top_left.x(), top_left.y(), top_left.y() + min(widget.height(), LINE)


def _controls(panel):
    """Enabled, shown widgets taking Tab focus, not the inner parts of a spin box, combo box
    or item view."""
    found = []
    for w in panel.findChildren(QWidget):
        if not (w.isVisible() and w.isEnabled() and w.focusPolicy() & Qt.FocusPolicy.TabFocus):
            continue
        parent = w.parentWidget()
        inner = False
        while parent is not None and parent is not panel:
            inner |= isinstance(parent, (QAbstractSpinBox, QComboBox, QAbstractItemView))
            parent = parent.parentWidget()
        if not inner:
            found.append(w)
    return found


def _walk(qtbot, panel, first, presses=400):
    """The widgets Tab visits from `first` until focus leaves the panel or comes back (a date
    field keeps Tab for its own year, month and day)."""
    first.setFocus(Qt.FocusReason.TabFocusReason)
    seen = []
    widget = QApplication.focusWidget()
    for _ in range(presses):
        if widget is None or not panel.isAncestorOf(widget):
            break
        if not seen or widget is not seen[-1]:
            if widget in seen:
                break
            seen.append(widget)
        qtbot.keyClick(widget, Qt.Key.Key_Tab)
        widget = QApplication.focusWidget()
    return seen


def test_tables_let_tab_go_on(make_window, qtbot):
    """A panel's table gives Tab to the next control (arrows move in it), as the target list
    does: a 30-row drift table would otherwise hold Tab for every one of its cells."""
    window = make_window(DEMO_PLAN)
    window.activateWindow()
    qtbot.waitActive(window)
    window.tabs.setCurrentWidget(window.drift)
    qtbot.wait(50)
    views = [v for v in window.drift.findChildren(QAbstractItemView) if v.isVisible()]
    assert views and not any(v.tabKeyNavigation() for v in views)


def _check_panel(qtbot, name, panel):
    controls = _controls(panel)
    if not controls:
        return
    # Where each control is before the walk (focus scrolls a scroll area's content).
    lines = {id(w): _line(panel, w) for w in controls}
    # Start at the leftmost control of the top row.
    top = min(controls, key=lambda w: lines[id(w)][1])
    _, row_top, row_bottom = lines[id(top)]
    first = min((w for w in controls
                 if row_top <= (lines[id(w)][1] + lines[id(w)][2]) / 2 <= row_bottom),
                key=lambda w: lines[id(w)][0])
    seen = _walk(qtbot, panel, first)
    for a, b in zip(seen, seen[1:]):
        ax, atop, abottom = lines[id(a)]
        bx, btop, bbottom = lines[id(b)]
        middle = (btop + bbottom) / 2
        same_row = atop <= middle <= abottom
        assert (same_row and bx > ax) or middle > abottom, \
            f"{name}: Tab goes from {type(a).__name__} at ({ax}, {atop}) " \
            f"back to {type(b).__name__} at ({bx}, {btop})"
    missed = [f"{type(w).__name__} at {lines[id(w)][:2]}" for w in controls if w not in seen]
    assert not missed, f"{name}: Tab never reaches {missed}"


def test_tab_walks_every_panel_in_screen_order(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    window.activateWindow()
    qtbot.waitActive(window)
    wait_for_plan(qtbot, window)
    for i in range(window.tabs.count()):
        window.tabs.setCurrentIndex(i)
        qtbot.wait(50)
        _check_panel(qtbot, window.tabs.tabText(i), window.tabs.widget(i))
    qtbot.wait(50)
    _check_panel(qtbot, "ledger", window.ledger)
