"""Site edits are never dropped in silence: a save while the Site & limits form holds edits it
could not apply (another field is wrong) is refused with the field named, a typed value not
yet confirmed is applied before saving, and quitting with unapplied edits asks first."""
import shutil

import pytest
from PySide6.QtWidgets import QMessageBox

from epochpoint.io.planfile import read_plan_file

from shell_support import DEMO_PLAN, make_window, settings  # noqa: F401 (fixtures)

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def _copy(tmp_path) -> str:
    path = str(tmp_path / "night.json")
    shutil.copyfile(DEMO_PLAN, path)
    return path


def _type(window, key: str, text: str, finish: bool = True) -> None:
    field = window.site_editor.fields[key]
    field.setText(text)
    if finish:
        field.editingFinished.emit()  # Enter or leaving the field


def test_save_with_an_invalid_site_field_is_refused_and_names_it(make_window, tmp_path):
    path = _copy(tmp_path)
    window = make_window(path)
    assert window.document.site.interlocks.mount.ha_east != 4.5
    _type(window, "dec_min", "abc")     # wrong: not a number
    _type(window, "ha_east", "4.5")     # right, but held back by the wrong field
    before = open(path, encoding="utf-8").read()

    assert not window.save()
    message = window.statusBar().currentMessage()
    assert "Declination min" in message and "not a number" in message, message
    assert "Saved" not in message
    assert open(path, encoding="utf-8").read() == before  # nothing written
    assert window.tabs.currentWidget() is window.site_editor  # shown where to fix it

    _type(window, "dec_min", "-80")
    assert window.save()
    assert read_plan_file(path).site.interlocks.mount.ha_east == 4.5


def test_a_typed_but_unconfirmed_value_is_applied_before_saving(make_window, tmp_path):
    path = _copy(tmp_path)
    window = make_window(path)
    _type(window, "ha_east", "4.5", finish=False)  # Ctrl+S with the cursor still there
    assert window.save()
    assert read_plan_file(path).site.interlocks.mount.ha_east == 4.5


@pytest.mark.parametrize("answer, closes", [(QMessageBox.StandardButton.Cancel, False),
                                            (QMessageBox.StandardButton.Discard, True)])
def test_quitting_with_unapplied_site_edits_asks(make_window, qtbot, monkeypatch, tmp_path,
                                                 answer, closes):
    asked = []

    def question(_parent, title, text, *args, **kwargs):
        asked.append(text)
        return answer

    monkeypatch.setattr(QMessageBox, "question", staticmethod(question))
    window = make_window(_copy(tmp_path), interactive=True)
    _type(window, "dec_min", "abc")
    assert not window.document.dirty  # nothing applied, so nothing else would ask
    window.close()
    assert asked and "Declination min" in asked[0]
    assert window.isVisible() != closes
    if not closes:
        assert window.site_editor.fields["dec_min"].text() == "abc"  # kept to be fixed
        window.interactive = False  # no question left open when the fixture closes it
