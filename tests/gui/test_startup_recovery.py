"""After a crash, start-up offers every recovery file the earlier session left, each named by
its document and the time it was written, not only when the same file is opened again."""
import datetime as dt
import os
import shutil

import pytest
from PySide6.QtWidgets import QDialog

from epochpoint.gui.app import start_session
from epochpoint.gui.document import Document
from epochpoint.gui.recovery import Autosaver
from epochpoint.gui.recovery_offer import RecoveryDialog
from epochpoint.io.planfile import read_plan_file

from shell_support import DEMO_PLAN, make_window, settings  # noqa: F401 (fixtures)

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def _crashed_session(folder: str, path: str | None, note: str) -> str:
    """What a session that crashed leaves: the recovery file of an edited document."""
    doc = Document()
    doc.load(read_plan_file(DEMO_PLAN), path)
    doc.edit_cell(0, "notes", note)
    saver = Autosaver(doc, folder)
    saver.timer.stop()
    written = saver.save_now()
    assert written and os.path.exists(written)
    return written


def _utc(path: str) -> str:
    """The file's modification time as the test expects it shown (UTC, to the second)."""
    stamp = dt.datetime.fromtimestamp(os.path.getmtime(path), dt.timezone.utc)
    return stamp.strftime("%Y-%m-%dT%H:%M:%SZ")


@pytest.fixture
def dialog_choice(monkeypatch):
    """The recovery dialog answered without a screen: records what it lists, picks a row."""
    seen = {"texts": [], "pick": None}

    def exec_(self):
        seen["texts"] = [self.list.item(r).text() for r in range(self.list.count())]
        if seen["pick"] is None:
            return QDialog.DialogCode.Rejected
        rows = [r for r, text in enumerate(seen["texts"]) if seen["pick"] in text]
        self.list.setCurrentRow(rows[0])
        return QDialog.DialogCode.Accepted

    monkeypatch.setattr(RecoveryDialog, "exec", exec_)
    return seen


def test_start_up_offers_every_recovery_file_with_name_and_time(make_window, dialog_choice,
                                                                tmp_path, request):
    plan_path = str(tmp_path / "clear night.json")
    shutil.copyfile(DEMO_PLAN, plan_path)
    window = make_window(interactive=True)
    request.addfinalizer(lambda: setattr(window, "interactive", False))  # no box at close
    folder = window.autosaver.folder
    kept_plan = _crashed_session(folder, plan_path, "typed before the crash")
    kept_untitled = _crashed_session(folder, None, "never saved")

    written = {kept_plan: _utc(kept_plan), kept_untitled: _utc(kept_untitled)}
    dialog_choice["pick"] = "clear night.json"
    start_session(window)  # started without a file, as after a crash
    texts = dialog_choice["texts"]
    assert len(texts) == 2, texts
    assert any("clear night.json" in t and written[kept_plan] in t for t in texts), texts
    assert any("untitled" in t and written[kept_untitled] in t for t in texts), texts
    # The chosen one is restored as that document, with its edit, not yet saved.
    assert window.document.path == plan_path and window.document.dirty
    assert window.document.value(0, "notes") == "typed before the crash"
    assert os.path.exists(kept_untitled)  # the other is left for later


def test_not_now_keeps_every_recovery_file(make_window, dialog_choice, tmp_path, request):
    window = make_window(interactive=True)
    request.addfinalizer(lambda: setattr(window, "interactive", False))  # no box at close
    kept = _crashed_session(window.autosaver.folder, None, "never saved")
    start_session(window)
    assert dialog_choice["texts"] and os.path.exists(kept)
    assert window.document.row_count() == 0  # nothing restored


def test_a_file_opened_at_start_is_not_offered_twice(make_window, dialog_choice, tmp_path,
                                                     monkeypatch, request):
    from PySide6.QtWidgets import QMessageBox

    monkeypatch.setattr(QMessageBox, "question",
                        staticmethod(lambda *a, **k: QMessageBox.StandardButton.No))
    plan_path = str(tmp_path / "opened.json")
    shutil.copyfile(DEMO_PLAN, plan_path)
    window = make_window(interactive=True)
    request.addfinalizer(lambda: setattr(window, "interactive", False))  # no box at close
    folder = window.autosaver.folder
    _crashed_session(folder, plan_path, "typed before the crash")
    os.utime(plan_path, (1, 1))  # the recovery file is newer than the plan
    other = _crashed_session(folder, None, "never saved")
    start_session(window, plan_path)
    assert window.document.path == plan_path
    assert len(dialog_choice["texts"]) == 1 and _utc(other) in dialog_choice["texts"][0]
