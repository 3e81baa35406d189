"""The solar option in the app: a check box in the Site & limits tab, off by default (the Sun
row refused by the interlocks). Switching it on asks first, every time, in a dialog stating
the caution (core.limits.SOLAR_CAUTION); Cancel leaves it off, the explicit yes turns it on,
shows the caution in the caution strip and lets the Sun be planned; it is saved with the site
([safety] solar_filter_fitted, read back by Python's own TOML reader, tomllib) and a reloaded
site keeps it. The mount tab's confirmation for the Sun states the caution too.

Sites, nights and targets are invented. The rule checked is the safety practice of the trade
(common practice): the Sun as a target only with a declared full-aperture solar filter, and
the caution shown each time.
"""
from __future__ import annotations

import tomllib

import numpy as np
import pytest
from PySide6.QtWidgets import QDialog

from epochpoint.core.limits import SOLAR_CAUTION, SUN_REFUSED, Interlocks
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.gui.panels import SiteEditor
from epochpoint.gui.panels.solar_option import SolarOptionDialog
from epochpoint.io.planfile import NightSettings, PlanDocument
from epochpoint.io.sitefile import read_site_file
from panels_demo import demo_inputs, demo_site_editor
from shell_support import make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SITE = Site(latitude=34.2, longitude=-108.6, height=2100.0, pressure=0.0,
            name="Test mesa (invented)", timezone="America/Denver")
NIGHT = NightSettings(date="2027-03-18")


class Answers:
    """SolarOptionDialog.exec replaced: records each question's text, answers in turn."""

    def __init__(self, monkeypatch, *answers):
        self.asked: list[str] = []
        self.answers = list(answers)

        def exec_(dialog):
            self.asked.append(dialog.text())
            return self.answers.pop(0)

        monkeypatch.setattr(SolarOptionDialog, "exec", exec_)


YES, NO = QDialog.DialogCode.Accepted, QDialog.DialogCode.Rejected


@pytest.fixture
def editor(qtbot):
    widget = demo_site_editor(qtbot)
    yield widget
    widget.close()


def test_off_by_default_and_cancel_keeps_it_off(editor, qtbot, monkeypatch):
    option = editor.solar_option
    assert editor.site.interlocks.solar_filter_fitted is False
    assert not option.is_on() and not option.note.isVisibleTo(editor)
    assert "full-aperture solar filter" in option.check.text()
    assert "every finder" in option.check.text()
    answers = Answers(monkeypatch, NO)
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        option.check.click()
    assert len(answers.asked) == 1 and SOLAR_CAUTION in answers.asked[0]
    assert not option.is_on() and not option.note.isVisibleTo(editor)
    assert editor.site.interlocks.solar_filter_fitted is False


def test_switching_on_asks_every_time_and_off_asks_nothing(editor, qtbot, monkeypatch):
    option = editor.solar_option
    answers = Answers(monkeypatch, YES, YES)
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as on:
        option.check.click()
    assert on.args[0].interlocks.solar_filter_fitted is True
    assert option.is_on() and option.note.isVisibleTo(editor)
    assert option.note.text() == SOLAR_CAUTION
    # The rest of the site is unchanged.
    before = demo_inputs()[1]
    assert on.args[0].interlocks.horizon == before.interlocks.horizon
    assert on.args[0].interlocks.sun_avoidance == before.interlocks.sun_avoidance
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as off:
        option.check.click()
    assert off.args[0].interlocks.solar_filter_fitted is False and len(answers.asked) == 1
    assert not option.note.isVisibleTo(editor)
    with qtbot.waitSignal(editor.site_edited, timeout=1000):
        option.check.click()
    assert len(answers.asked) == 2 and all(SOLAR_CAUTION in a for a in answers.asked)


def test_another_field_edit_keeps_the_option(editor, qtbot, monkeypatch):
    """An edit elsewhere in the form keeps the option as it is (the form builds the whole
    site, the option included)."""
    Answers(monkeypatch, YES)
    with qtbot.waitSignal(editor.site_edited, timeout=1000):
        editor.solar_option.check.click()
    field = editor.fields["temperature"]
    field.setText("-4")
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as edited:
        field.editingFinished.emit()
    assert edited.args[0].temperature == -4.0
    assert edited.args[0].interlocks.solar_filter_fitted is True


def test_saved_and_reloaded_site_keeps_the_option(editor, qtbot, monkeypatch, tmp_path):
    Answers(monkeypatch, YES)
    with qtbot.waitSignal(editor.site_edited, timeout=1000):
        editor.solar_option.check.click()
    path = tmp_path / "filtered.toml"
    assert editor.save_site_file(str(path))
    with open(path, "rb") as f:
        assert tomllib.load(f)["safety"]["solar_filter_fitted"] is True
    site, _ = read_site_file(str(path))
    assert site.interlocks.solar_filter_fitted is True
    # Another form, loading the file: on, with the caution in the status line.
    other = SiteEditor()
    qtbot.addWidget(other)
    other.set_site(demo_inputs()[1])
    assert not other.solar_option.is_on()
    with qtbot.waitSignal(other.site_edited, timeout=1000) as loaded:
        assert other.load_site_file(str(path))
    assert loaded.args[0].interlocks.solar_filter_fitted is True
    assert other.solar_option.is_on() and SOLAR_CAUTION in other.status.text()
    # Switched off and saved: the key is gone (off is the default) and reads back off.
    with qtbot.waitSignal(editor.site_edited, timeout=1000):
        editor.solar_option.check.click()
    assert editor.save_site_file(str(path))
    with open(path, "rb") as f:
        assert "solar_filter_fitted" not in tomllib.load(f).get("safety", {})
    assert read_site_file(str(path))[0].interlocks.solar_filter_fitted is False


def _sun_and_star() -> PlanDocument:
    targets = Targets.from_columns(ra=np.array([0.0, 101.287]), dec=np.array([0.0, -16.716]),
                                   name=["Sun", "Star"],
                                   extra={"body": np.array(["sun", None], dtype=object),
                                          "priority": np.array(["2", "2"], dtype=object)})
    return PlanDocument(site=SITE, night=NIGHT, targets=targets)


def test_the_window_refuses_the_sun_until_the_option_is_confirmed(make_window, qtbot,
                                                                   monkeypatch):
    window = make_window()
    window.document.load(_sun_and_star(), None)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.now is not None, timeout=30000)
    assert window.plan.windows.reason[0] == SUN_REFUSED and window.now.refused[0] == SUN_REFUSED
    assert SUN_REFUSED in window.caution.solar.text()
    answers = Answers(monkeypatch, NO, YES)
    check = window.site_editor.solar_option.check
    check.click()  # cancelled: still off, still refused
    assert window.document.site.interlocks.solar_filter_fitted is False
    assert SUN_REFUSED in window.caution.solar.text()
    check.click()  # confirmed
    assert len(answers.asked) == 2
    assert window.document.site.interlocks.solar_filter_fitted is True
    assert window.caution.solar.isVisibleTo(window)
    assert window.caution.solar.text() == SOLAR_CAUTION
    wait_for_plan(qtbot, window, lambda plan: plan.windows.reason[0] != SUN_REFUSED)
    qtbot.waitUntil(lambda: not window.computing(), timeout=30000)
    assert window.now.refused[0] != SUN_REFUSED
    # Undo puts the option back off, and the Sun is refused again.
    window.document.undo_stack.undo()
    assert window.document.site.interlocks.solar_filter_fitted is False
    assert not window.site_editor.solar_option.is_on()
    assert SUN_REFUSED in window.caution.solar.text()


def test_the_mount_confirmation_for_the_sun_states_the_solar_caution():
    """The slew (and sync) confirmation of the Sun, which the interlocks allow only with the
    option on, carries SOLAR_CAUTION; the Moon's does not. At 16:40 UTC on 2027-05-01 the
    Sun is about 44 deg up at the invented site (local apparent noon near 16:45 UTC)."""
    from epochpoint.gui.panels.mount_text import confirmation_text
    from epochpoint.mount import pointing_for

    site = Site(latitude=-30.5, longitude=-70.7, height=2200.0, pressure=0.0,
                interlocks=Interlocks(solar_filter_fitted=True), timezone="UTC")
    targets = Targets.from_columns(ra=[0.0, 0.0], dec=[0.0, 0.0], name=["Sun", "Moon"],
                                   extra={"body": np.array(["sun", "moon"], dtype=object)})
    when = "2027-05-01T16:40:00Z"
    sun = pointing_for(targets, site, "Sun", when)
    assert sun.allowed and sun.is_sun
    for sync in (False, True):
        assert SOLAR_CAUTION in confirmation_text(sun, sync, "Scope", None, 30.0)
    moon = pointing_for(targets, site, "Moon", when)
    assert SOLAR_CAUTION not in confirmation_text(moon, False, "Scope", None, 30.0)
