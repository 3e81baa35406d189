"""The main window end to end: open, edit, recompute through the workers, save, reopen,
undo/redo, the night theme, autosave and bad files."""
import os
from dataclasses import replace

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtGui import QColor, QPalette
from PySide6.QtWidgets import QAbstractItemView, QApplication, QLineEdit

from epochpoint.core.site import Site
from epochpoint.gui import themes
from epochpoint.gui.recovery import newer_recovery, recent_files
from epochpoint.gui.target_model import COLUMN_INDEX
from epochpoint.io.planfile import read_plan_file
from shell_support import DEMO_PLAN, DEMO_SITE, DEMO_TARGETS, make_window, settings, \
    wait_for_plan  # noqa: F401 (fixtures)


def _table_index(window, doc_row, key):
    return window.proxy.index_of(doc_row, COLUMN_INDEX[key])


def test_demo_plan_opens_and_computes_in_the_workers(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    assert window.document.row_count() == 30 and not window.document.dirty
    assert window.tonight.plan is window.plan and window.skydome.plan is window.plan
    assert window.plan.night.date.isoformat() == "2027-01-19"
    # The read-only columns are filled: every row has an altitude now and a verdict tonight.
    qtbot.waitUntil(lambda: window.model.computed is not None
                    and window.model.computed.tonight is not None, timeout=30000)
    assert np.isfinite(window.model.computed.alt_now).all()
    assert window.site_note.isHidden()  # a real site: no placeholder note
    assert "35" in window.caution.radius.text()  # the demo site's Sun-avoidance radius
    # The first target is selected, so the correction ledger shows it.
    qtbot.waitUntil(lambda: window.ledger.row is not None, timeout=30000)
    assert window.ledger.row["name"] == "Wick" and "refused" in window.ledger.row


def test_bad_cell_value_is_rejected_in_the_window(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    index = _table_index(window, 0, "dec")
    assert not window.proxy.setData(index, "123")
    assert window.document.value(0, "dec") == read_plan_file(DEMO_PLAN).targets.dec[0]
    assert "Dec (catalogue) of Wick" in window.statusBar().currentMessage()
    assert not window.document.dirty


def test_site_change_recomputes_the_chart_and_undo_brings_it_back(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    demo_site = window.document.site
    other = replace(demo_site, latitude=40.5, longitude=-3.7, name="Somewhere north",
                    timezone="Europe/Madrid")
    window.site_editor.site_edited.emit(other)  # as the Site & limits tab does after an edit
    assert window.document.site == other and window.document.dirty
    wait_for_plan(qtbot, window, lambda plan: plan.site == other)
    assert window.tonight.plan.site == other
    window.document.undo_stack.undo()
    wait_for_plan(qtbot, window, lambda plan: plan.site == demo_site)
    assert not window.document.dirty
    window.document.undo_stack.redo()
    wait_for_plan(qtbot, window, lambda plan: plan.site == other)


def test_a_newer_request_supersedes_the_running_one(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    first = []
    window.recompute()
    first_task = window._plan_task
    first_task.done.connect(first.append)
    window.document.edit_cell(0, "priority", 5)
    window.recompute()
    assert first_task.cancelled
    wait_for_plan(qtbot, window, lambda plan: plan.priority[0] == 5)
    assert first == []  # the superseded result was never delivered


def test_save_reopen_compare(make_window, qtbot, tmp_path, settings):
    window = make_window(DEMO_PLAN)
    window.document.edit_cell(4, "notes", "checked in the test")
    window.document.add_target("Newcomer")
    path = str(tmp_path / "saved.json")
    assert window.save_to(path)
    assert not window.document.dirty and window.document.path == path
    assert recent_files(settings)[0] == os.path.abspath(path)
    other = make_window(path)
    a, b = window.document, other.document
    assert b.row_count() == a.row_count() == 31
    for key, column in a.rows.columns.items():
        assert list(column) == list(b.rows.columns[key]), key
    assert a.site == b.site and a.night == b.night and a.tolerance == b.tolerance


def test_undo_redo_of_edits_through_the_table(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    original = window.document.value(1, "ra")
    assert window.proxy.setData(_table_index(window, 1, "ra"), "10:00:00")
    assert window.document.value(1, "ra") == 150.0
    window.actions_by_name["undo"].trigger()
    assert window.document.value(1, "ra") == original and not window.document.dirty
    window.actions_by_name["redo"].trigger()
    assert window.document.value(1, "ra") == 150.0
    window.table.selectRow(_table_index(window, 2, "name").row())
    count = window.document.row_count()
    window.actions_by_name["remove"].trigger()
    assert window.document.row_count() == count - 1
    window.actions_by_name["undo"].trigger()
    assert window.document.row_count() == count and window.document.value(2, "name") == "Sconce"


def test_keyboard_edit_with_f2_and_enter(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    window.activateWindow()
    qtbot.waitUntil(window.isActiveWindow, timeout=5000)
    window.table.setFocus()
    index = _table_index(window, 0, "priority")
    window.table.setCurrentIndex(index)
    qtbot.keyClick(window.table, Qt.Key.Key_F2)
    editors = window.table.viewport().findChildren(QLineEdit)
    assert len(editors) == 1  # F2 opened an editor on the current cell
    editor = editors[0]
    editor.selectAll()
    qtbot.keyClicks(editor, "4")
    qtbot.keyClick(editor, Qt.Key.Key_Return)  # the delegate commits on the next event turn
    qtbot.waitUntil(lambda: window.document.value(0, "priority") == 4, timeout=5000)
    assert window.table.state() == QAbstractItemView.State.NoState


def test_every_action_has_a_shortcut(make_window):
    window = make_window()
    missing = [name for name, action in window.actions_by_name.items()
               if action.shortcut().isEmpty()]
    assert missing == []
    assert window.actions_by_name["night"].shortcut().toString() == "Ctrl+Shift+N"


def test_night_theme_switches_is_red_only_and_is_remembered(make_window, settings):
    window = make_window(DEMO_PLAN)
    app = QApplication.instance()
    window.actions_by_name["night"].trigger()
    assert themes.current_theme() == "night" and settings.value("view/theme") == "night"
    window_colour = app.palette().color(QPalette.ColorRole.Window)
    text_colour = app.palette().color(QPalette.ColorRole.Text)
    assert window_colour.lightness() < 30 and text_colour.red() > 150
    # No blue or white anywhere in the night theme (common practice for dark adaptation):
    # every colour has little green and blue.
    for name, value in themes.colours("night").items():
        c = QColor(value)
        assert c.green() <= 0x40 and c.blue() <= 0x40, name
    style = themes.chart_style("night")
    assert all(QColor(v).blue() <= 0x40 for v in style.values())
    window.actions_by_name["night"].trigger()
    assert themes.current_theme() == "light" and settings.value("view/theme") == "light"


def test_bad_file_keeps_the_document(make_window, tmp_path):
    window = make_window(DEMO_PLAN)
    bad = tmp_path / "broken.csv"
    bad.write_text("name,ra,dec\nOne,12:00:00,+95:00:00\n", encoding="utf-8")
    before = window.document.rows
    assert not window.open_path(str(bad))
    assert window.document.rows is before and window.document.path == DEMO_PLAN
    message = window.statusBar().currentMessage()
    assert "broken.csv" in message and "\n" not in message
    assert not window.import_path(str(bad)) and window.document.rows is before


def test_target_list_opens_with_a_placeholder_site_and_a_visible_note(make_window, qtbot):
    window = make_window(DEMO_TARGETS)
    assert window.document.has_placeholder_site and window.site_note.isVisible()
    assert window.document.path is None and window.document.dirty
    window.document.replace_site(Site(latitude=-28.5, longitude=-67.3, name="Real enough"))
    assert window.site_note.isHidden()


def test_site_option_is_used_for_a_target_list(make_window, qtbot):
    window = make_window()
    assert window.open_path(DEMO_TARGETS, site_spec=DEMO_SITE, night="2027-01-19")
    assert window.document.site.name == "Loma Candil Observatory"
    assert window.document.night.date == "2027-01-19"


def test_autosave_writes_recovery_and_a_clean_save_removes_it(make_window, tmp_path):
    window = make_window(DEMO_PLAN)
    saved = str(tmp_path / "mine.json")
    assert window.save_to(saved)
    window.document.edit_cell(0, "notes", "unsaved change")
    recovery = window.autosaver.save_now()
    assert recovery and os.path.exists(recovery)
    os.utime(saved, (1, 1))  # the document file is older than the recovery file
    assert newer_recovery(window.autosaver.folder, saved) == recovery
    assert read_plan_file(recovery).targets.extra["notes"][0] == "unsaved change"
    assert window.save_to(saved)
    assert not os.path.exists(recovery)
    assert window.autosaver.save_now() is None  # clean: nothing to keep


def test_progress_bar_and_cancel_show_while_a_task_runs(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    window.recompute()
    assert window.cancel_button.isVisibleTo(window)
    qtbot.waitUntil(lambda: not window.computing(), timeout=30000)
    assert not window.cancel_button.isVisibleTo(window)


def test_panel_click_selects_the_row_even_when_filtered_out(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    window.filter_box.setText("wick")
    assert window.proxy.rowCount() == 1 and window.count_label.text() == "1 of 30 shown"
    window.tonight.target_clicked.emit(5)  # Cinder, hidden by the filter
    assert window.filter_box.text() == "" and window.selected == 5
    assert window.proxy.doc_row(window.table.currentIndex()) == 5
    assert window.tonight.selected == 5 and window.skydome.selected == 5


def test_interactive_open_of_a_bad_file_shows_a_message_box_and_keeps_the_plan(
        make_window, tmp_path, monkeypatch):
    shown = []
    monkeypatch.setattr("epochpoint.gui.main_window.QMessageBox.warning",
                        lambda parent, title, text: shown.append((title, text)))
    window = make_window(DEMO_PLAN, interactive=True)
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", encoding="utf-8")
    before = window.document.rows
    assert not window.open_path(str(bad))
    assert len(shown) == 1 and shown[0][0] == "Cannot open"
    assert "bad.json, line 1" in shown[0][1] and "\n" not in shown[0][1]
    assert window.document.rows is before and window.document.path == DEMO_PLAN
