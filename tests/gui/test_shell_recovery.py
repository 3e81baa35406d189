"""Nothing lost when files go wrong: an unreadable plan with a recovery file offers the
recovery, a recovery file that cannot be read is kept for salvage, a failing autosave is told
to the user (status line always, a dialog once), and a plan nested absurdly deep is a one-line
error rather than a traceback."""
import os
import shutil

import pytest
from PySide6.QtWidgets import QMessageBox

from epochpoint.gui.recovery import recovery_path
from epochpoint.io.errors import InputError
from epochpoint.io.planfile import read_plan_file, write_plan_file

from shell_support import DEMO_PLAN, make_window, settings  # noqa: F401 (fixtures)


@pytest.fixture
def dialogs(monkeypatch):
    """Message boxes answered without a screen: questions say Yes; warnings are counted."""
    shown = {"warning": [], "question": []}

    def warning(_parent, title, text, *args, **kwargs):
        shown["warning"].append((title, text))
        return QMessageBox.StandardButton.Ok

    def question(_parent, title, text, *args, **kwargs):
        shown["question"].append((title, text))
        return QMessageBox.StandardButton.Yes

    monkeypatch.setattr(QMessageBox, "warning", staticmethod(warning))
    monkeypatch.setattr(QMessageBox, "question", staticmethod(question))
    return shown


def _plan_copy(tmp_path, name="night.json"):
    path = str(tmp_path / name)
    shutil.copyfile(DEMO_PLAN, path)
    return path


def test_unreadable_plan_with_a_recovery_file_offers_the_recovery(dialogs, make_window,
                                                                   tmp_path):
    window = make_window(interactive=True)
    path = _plan_copy(tmp_path)
    recovery = recovery_path(window.autosaver.folder, path)
    os.makedirs(os.path.dirname(recovery), exist_ok=True)
    write_plan_file(recovery, read_plan_file(DEMO_PLAN))
    with open(path, "w", encoding="utf-8") as out:
        out.write('{"format": "epochpoint-plan", "version": 1, "site": ')  # cut off mid-save

    assert window.open_path(path)
    assert dialogs["question"], "the recovery was not offered"
    assert window.document.row_count() == len(read_plan_file(DEMO_PLAN).targets)
    assert window.document.path == path and window.document.dirty  # restored, not yet saved
    # The question says why the file itself was not used.
    assert any(path in text and "not valid JSON" in text for _, text in dialogs["question"])


def test_recovery_file_that_fails_to_load_is_kept_for_salvage(dialogs, make_window, tmp_path):
    window = make_window(interactive=True)
    path = _plan_copy(tmp_path)
    recovery = recovery_path(window.autosaver.folder, path)
    os.makedirs(os.path.dirname(recovery), exist_ok=True)
    damaged = b'{"format": "epochpoint-plan", "version": 1, "targets": [{"name": "half'
    with open(recovery, "wb") as out:
        out.write(damaged)
    os.utime(path, (1, 1))  # the recovery file is the newer one

    assert window.open_path(path)
    assert window.document.path == path and not window.document.dirty  # the file as saved
    window.shutdown()  # an orderly exit removes recovery files it wrote, not this one
    folder = window.autosaver.folder
    kept = [name for name in os.listdir(folder)
            if open(os.path.join(folder, name), "rb").read() == damaged]
    assert kept, "the unreadable recovery file was deleted"
    salvage = os.path.join(folder, kept[0])
    assert any(salvage in text for _, text in dialogs["warning"])  # the user is told where


def test_failing_autosave_is_shown_in_the_status_line_and_once_in_a_dialog(dialogs, make_window,
                                                                          tmp_path):
    window = make_window(DEMO_PLAN, interactive=True)
    blocked = tmp_path / "not-a-folder"
    blocked.write_text("a file where the recovery folder should be")
    window.autosaver.folder = str(blocked)
    window.document.edit_cell(0, "notes", "unsaved change")

    for _ in range(3):
        assert window.autosaver.save_now() is None
    assert "autosave failed" in window.autosave_note.text().lower()
    assert str(blocked) in window.autosave_note.text()
    assert not window.autosave_note.isHidden()
    autosave_dialogs = [t for t, _ in dialogs["warning"] if "autosave" in t.lower()]
    assert len(autosave_dialogs) == 1


def test_autosave_failure_from_a_full_disk_is_shown_and_cleared_when_it_works(
        dialogs, make_window, tmp_path, monkeypatch):
    import epochpoint.gui.recovery as recovery_module

    window = make_window(DEMO_PLAN, interactive=True)
    window.document.edit_cell(0, "notes", "unsaved change")

    def full_disk(path, _doc):
        raise OSError(28, "No space left on device", path)

    with monkeypatch.context() as patch:
        patch.setattr(recovery_module, "write_plan_file", full_disk)
        assert window.autosaver.save_now() is None
        assert "No space left on device" in window.autosave_note.text()
    assert window.autosaver.save_now() is not None
    assert window.autosave_note.isHidden()


def test_plan_nested_absurdly_deep_is_a_one_line_error(make_window, tmp_path):
    path = tmp_path / "deep.json"
    path.write_text("[" * 100_000 + "]" * 100_000)
    with pytest.raises(InputError) as caught:
        read_plan_file(str(path))
    message = str(caught.value)
    assert str(path) in message and "\n" not in message and "nested" in message

    window = make_window()
    assert not window.open_path(str(path))
    assert str(path) in window.statusBar().currentMessage()
