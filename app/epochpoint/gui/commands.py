"""Undoable changes to the document (QUndoCommand): a cell edit, a change of rows (add,
remove, import), the site replaced, the night's settings and the drift tolerance changed.

Each command holds the state before and after (values, or the document's immutable column
arrays), so undo and redo restore exactly. Successive changes of the same night setting or of
the tolerance merge into one step, as a spin box sends one change per click.
"""
from __future__ import annotations

from PySide6.QtGui import QUndoCommand

# Command ids for merging (QUndoCommand.id); -1 means never merge.
NIGHT_ID, TOLERANCE_ID = 1, 2


class EditCell(QUndoCommand):
    """One value of one target."""

    def __init__(self, doc, row: int, key: str, old, new):
        name = doc.value(row, "name")
        super().__init__(f"Edit {key.replace('_', ' ')} of {name}")
        self.doc, self.row, self.key, self.old, self.new = doc, row, key, old, new

    def redo(self):
        self.doc.apply_cell(self.row, self.key, self.new)

    def undo(self):
        self.doc.apply_cell(self.row, self.key, self.old)


class ReplaceRows(QUndoCommand):
    """Targets added, removed or imported: the whole row state before and after."""

    def __init__(self, doc, before, after, text: str):
        super().__init__(text)
        self.doc, self.before, self.after = doc, before, after

    def redo(self):
        self.doc.apply_rows(self.after)

    def undo(self):
        self.doc.apply_rows(self.before)


class ReplaceSite(QUndoCommand):
    def __init__(self, doc, old, new):
        super().__init__(f"Change site{': ' + new.name if new.name else ''}")
        self.doc, self.old, self.new = doc, old, new

    def redo(self):
        self.doc.apply_site(self.new)

    def undo(self):
        self.doc.apply_site(self.old)


class ChangeNight(QUndoCommand):
    """The night's settings; `what` names the setting so repeated changes of it merge."""

    def __init__(self, doc, old, new, what: str = ""):
        super().__init__(f"Change {what or 'night settings'}")
        self.doc, self.old, self.new, self.what = doc, old, new, what

    def id(self):
        return NIGHT_ID

    def mergeWith(self, other):
        if not (isinstance(other, ChangeNight) and other.what and other.what == self.what):
            return False
        self.new = other.new
        return True

    def redo(self):
        self.doc.apply_night(self.new)

    def undo(self):
        self.doc.apply_night(self.old)


class ChangeTolerance(QUndoCommand):
    def __init__(self, doc, old: float, new: float):
        super().__init__("Change drift tolerance")
        self.doc, self.old, self.new = doc, old, new

    def id(self):
        return TOLERANCE_ID

    def mergeWith(self, other):
        if not isinstance(other, ChangeTolerance):
            return False
        self.new = other.new
        return True

    def redo(self):
        self.doc.apply_tolerance(self.new)

    def undo(self):
        self.doc.apply_tolerance(self.old)
