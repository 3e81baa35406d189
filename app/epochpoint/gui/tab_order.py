"""Tab in screen order: top to bottom, and left to right within a row, in every panel.

Widgets reach the focus chain in the order they were made, which is rarely the order they are
shown in. `ScreenTabOrder` watches panels and, whenever one is shown, resized or laid out
again, chains its focus stops (setTabOrder) in the order a reader meets them:

- a focus stop is a shown descendant that takes focus by Tab, one per control: the line edit
  inside a spin box or a combo box, or an item view's cell editor, is part of that control;
- stops are taken in rows: a stop joins the row of the topmost stop not yet placed when the
  middle of its first line (its top, at most LINE_PX tall) lies within that stop's first
  line, so a button beside a slightly taller field is on the same row; rows run top to
  bottom, stops in a row left to right;
- a table gives Tab to the next stop (arrows move inside it, typing or F2 edits a cell), as
  the target list does, instead of holding it for each of its cells.
"""
from __future__ import annotations

from PySide6.QtCore import QEvent, QObject, QPoint, Qt, QTimer
from PySide6.QtWidgets import (QAbstractItemView, QScrollArea, QSplitter, QStackedWidget,
                               QTabWidget, QWidget)

LINE_PX = 32  # the first line of a tall stop (a table, a chart, a scroll area)
CONTAINERS = (QScrollArea, QTabWidget, QStackedWidget, QSplitter)  # focusable, yet hold stops
RECHAIN_EVENTS = (QEvent.Type.Show, QEvent.Type.Resize, QEvent.Type.LayoutRequest)


def focus_stops(root: QWidget) -> list[QWidget]:
    """The shown descendants of `root` that Tab stops at (module docstring), any order."""
    stops = []
    for widget in root.findChildren(QWidget):
        if widget.isWindow() or not widget.isVisibleTo(root):
            continue
        if not widget.focusPolicy() & Qt.FocusPolicy.TabFocus:
            continue
        if not _part_of_a_control(widget, root):
            stops.append(widget)
    return stops


def _part_of_a_control(widget: QWidget, root: QWidget) -> bool:
    """Whether a focusable ancestor below `root` owns the widget (a spin box's line edit)."""
    parent = widget.parentWidget()
    while parent is not None and parent is not root:
        if parent.focusProxy() is widget:
            return True
        if parent.focusPolicy() & Qt.FocusPolicy.TabFocus and not isinstance(parent,
                                                                             CONTAINERS):
            return True
        parent = parent.parentWidget()
    return False


def screen_order(root: QWidget, stops: list[QWidget]) -> list[QWidget]:
    """`stops` in reading order on screen: rows top to bottom, left to right in a row."""
    def first_line(widget):
        top = widget.mapTo(root, QPoint(0, 0))
        return top.x(), top.y(), top.y() + min(widget.height(), LINE_PX)

    lines = {id(w): first_line(w) for w in stops}
    left = sorted(stops, key=lambda w: (lines[id(w)][1], lines[id(w)][0]))
    ordered = []
    while left:
        # The topmost stop left anchors a row; those whose first line's middle is in its
        # first line share the row.
        _, anchor_top, anchor_bottom = lines[id(left[0])]
        row = [w for w in left
               if anchor_top <= (lines[id(w)][1] + lines[id(w)][2]) / 2 <= anchor_bottom]
        row_ids = {id(w) for w in row}
        ordered += sorted(row, key=lambda w: lines[id(w)][0])
        left = [w for w in left if id(w) not in row_ids]
    return ordered


def chain_in_screen_order(root: QWidget) -> list[QWidget]:
    """Chain the focus stops of `root` in screen order; returns them in that order."""
    ordered = screen_order(root, focus_stops(root))
    for view in ordered:
        if isinstance(view, QAbstractItemView):
            view.setTabKeyNavigation(False)
    for first, second in zip(ordered, ordered[1:]):
        QWidget.setTabOrder(first, second)
    return ordered


class ScreenTabOrder(QObject):
    """Keeps the watched panels' Tab order in screen order (module docstring)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self._panels: list[QWidget] = []
        self._pending: set[int] = set()

    def watch(self, panel: QWidget) -> None:
        if panel is None or any(p is panel for p in self._panels):
            return
        self._panels.append(panel)
        panel.installEventFilter(self)
        if panel.isVisible():
            self._schedule(panel)

    def eventFilter(self, watched, event):  # noqa: N802 (Qt name)
        if event.type() in RECHAIN_EVENTS and watched.isVisible():
            self._schedule(watched)
        return False

    def _schedule(self, panel: QWidget) -> None:
        """Re-chain once the layout has settled (many events come at once: one re-chain)."""
        if id(panel) in self._pending:
            return
        self._pending.add(id(panel))

        def rechain():
            self._pending.discard(id(panel))
            if panel.isVisible():
                chain_in_screen_order(panel)

        QTimer.singleShot(0, panel, rechain)
