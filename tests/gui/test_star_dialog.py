"""Adding a star by Hipparcos number in the app: `HIP 87937` becomes a target row with the
catalogue's astrometry; an unknown number or a name that is not `HIP n` is one line under the
field, the text kept; the Edit menu's action adds the row (undoably) and the window shows the
pointing-model tab.

Reference: Barnard's star, HIP 87937, in the Hipparcos new reduction (van Leeuwen 2007,
catalogue I/311, file hip2.dat): position at epoch 1991.25 RA 269.454 deg, Dec +4.668 deg,
parallax 548.31 +- 1.51 mas, proper motion in Dec about +10327 mas/yr (from memory).
HIP numbers run to 120416 (the catalogue's description), so 999999 is none.
"""
from __future__ import annotations

import pytest
from PySide6.QtWidgets import QDialog

from epochpoint.gui import star_dialog
from epochpoint.gui.star_dialog import AddStarDialog
from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.fixture
def dialog(qtbot):
    widget = AddStarDialog()
    qtbot.addWidget(widget)
    return widget


def test_hip_number_gives_the_catalogue_star(dialog):
    dialog.name_edit.setText("HIP 87937")
    assert dialog.try_accept()
    star = dialog.targets
    assert list(star.names()) == ["HIP 87937"]
    assert star.ra[0] == pytest.approx(269.454, abs=0.002)
    assert star.dec[0] == pytest.approx(4.668, abs=0.002)
    assert star.parallax[0] == pytest.approx(548.31, abs=0.01)
    assert star.pm_dec[0] == pytest.approx(10327.0, abs=5.0)
    assert float(star.epoch[0]) == pytest.approx(1991.25)


@pytest.mark.parametrize("text, words", [("HIP 999999", "not in the Hipparcos"),
                                         ("Barnard's star", "HIP n")])
def test_a_bad_name_is_one_line_and_kept(dialog, text, words):
    dialog.name_edit.setText(text)
    assert not dialog.try_accept()
    assert dialog.result() != QDialog.DialogCode.Accepted
    assert words in dialog.error.text() and "\n" not in dialog.error.text()
    assert dialog.name_edit.text() == text and dialog.targets is None


def test_the_menu_action_adds_the_star_and_the_window_has_the_pointing_tab(
        make_window, qtbot, monkeypatch):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    rows = window.document.row_count()

    def typed(self):
        self.name_edit.setText("hip 87937")
        return QDialog.DialogCode.Accepted if self.try_accept() else QDialog.DialogCode.Rejected

    monkeypatch.setattr(star_dialog.AddStarDialog, "exec", typed)
    window.actions_by_name["add_star"].trigger()
    assert window.document.row_count() == rows + 1
    assert window.document.value(rows, "name") == "HIP 87937"
    assert window.document.value(rows, "parallax") == pytest.approx(548.31, abs=0.01)
    window.document.undo_stack.undo()
    assert window.document.row_count() == rows
    titles = [window.tabs.tabText(i) for i in range(window.tabs.count())]
    assert "&Pointing model" in titles
    assert window.pointing_panel.latitude == pytest.approx(window.document.site.latitude)
