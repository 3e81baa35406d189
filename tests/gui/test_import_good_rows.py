"""File > Import of a target list with bad rows: the refused rows are listed (line, target,
column, reason) and the good rows are imported only when the user chooses so; nothing
otherwise. The refused rows are the ones the command line's --skip-bad-rows leaves out.

The list is invented: three good rows and two bad cells (a declination beyond 90 deg and a
right ascension that is not an angle); the line numbers count the header as line 1 (the
file's own layout, counted by hand).
"""
from __future__ import annotations

import pytest
from PySide6.QtWidgets import QDialog

from epochpoint.gui.refused_rows import RefusedRowsDialog
from shell_support import make_window, settings  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

LIST = """name,ra,dec,epoch,pm_ra_cosdec,pm_dec
Alder,10.5,-20.0,2016.0,1.0,2.0
Birch,11.5,95.0,2016.0,1.0,2.0
Cedar,12.5,-22.0,2016.0,1.0,2.0
Damson,nine,-23.0,2016.0,1.0,2.0
Elm,14.5,-24.0,2016.0,1.0,2.0
"""


@pytest.fixture
def bad_list(tmp_path):
    path = tmp_path / "orchard.csv"
    path.write_text(LIST, encoding="utf-8")
    return str(path)


def _answer(monkeypatch, code):
    """Answer the refused-rows dialog with `code`, keeping what it listed."""
    seen = []

    def exec_(dialog):
        seen.append(dialog.rows())
        return code

    monkeypatch.setattr(RefusedRowsDialog, "exec", exec_)
    return seen


def _window(make_window):
    """An interactive window (so the dialog is offered) that closes without asking."""
    window = make_window(interactive=True)
    window.maybe_save = lambda: True
    return window


def _names(window):
    return [str(n) for n in window.document.targets().names()]


def test_good_rows_imported_on_request_with_refused_rows_listed(make_window, bad_list,
                                                                monkeypatch):
    seen = _answer(monkeypatch, QDialog.DialogCode.Accepted)
    window = _window(make_window)
    before = window.document.row_count()
    assert window.import_path(bad_list)
    (rows,) = seen
    assert [r[:3] for r in rows] == [("line 3", "Birch", "dec"), ("line 5", "Damson", "ra")]
    assert all(r[3] for r in rows)  # each with its reason
    assert _names(window)[before:] == ["Alder", "Cedar", "Elm"]
    assert "2 unreadable row(s) left out" in window.statusBar().currentMessage()


def test_nothing_imported_when_declined(make_window, bad_list, monkeypatch):
    seen = _answer(monkeypatch, QDialog.DialogCode.Rejected)
    window = _window(make_window)
    before = _names(window)
    assert not window.import_path(bad_list)
    assert len(seen) == 1
    assert _names(window) == before
    assert "Nothing imported" in window.statusBar().currentMessage()


def test_file_open_offers_the_good_rows_too(make_window, bad_list, monkeypatch):
    """File > Open of the same list: the same listed choice, and the good rows become the
    (untitled) plan when the user takes them."""
    seen = _answer(monkeypatch, QDialog.DialogCode.Accepted)
    monkeypatch.setattr("epochpoint.gui.main_window.QMessageBox.warning",
                        lambda *a: pytest.fail(f"error box shown: {a}"))
    window = _window(make_window)
    assert window.open_path(bad_list)
    (rows,) = seen
    assert [r[:3] for r in rows] == [("line 3", "Birch", "dec"), ("line 5", "Damson", "ra")]
    assert _names(window) == ["Alder", "Cedar", "Elm"]
    assert window.document.path is None and window.document.dirty
    assert "2 unreadable row(s) left out" in window.statusBar().currentMessage()


def test_file_open_declined_keeps_the_open_plan(make_window, bad_list, monkeypatch):
    seen = _answer(monkeypatch, QDialog.DialogCode.Rejected)
    boxes = []
    monkeypatch.setattr("epochpoint.gui.main_window.QMessageBox.warning",
                        lambda *a: boxes.append(a))
    window = _window(make_window)
    before = _names(window)
    assert not window.open_path(bad_list)
    assert len(seen) == 1 and _names(window) == before and not boxes
    assert "Nothing opened" in window.statusBar().currentMessage()
