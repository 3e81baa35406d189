"""The night theme keeps every pixel dark red or black and every control visible.

Each dialog the app shows is rendered in the night theme with QWidget.grab() and no pixel may
be brighter in green or blue than MAX_GREEN_BLUE: message boxes of every kind and the About
box, Qt's own (non-native) file dialog on a folder with subfolders and files, the export
dialog, the mount's confirmation, the list of refused rows, and the main window on the demo
plan. An unchecked check box or radio button must stand out from its background by a contrast
ratio of at least 3:1 (WCAG 2.1 success criterion 1.4.11, non-text contrast, with the relative
luminance and contrast ratio defined in WCAG 2.1).
"""
from __future__ import annotations

import numpy as np
import pytest
from PySide6.QtCore import QTimer
from PySide6.QtGui import QImage
from PySide6.QtWidgets import (QApplication, QCheckBox, QFileDialog, QListView, QMessageBox,
                               QRadioButton, QStyle, QStyleOptionButton, QVBoxLayout, QWidget)

from epochpoint.gui import themes
from epochpoint.gui.app import make_application
from epochpoint.gui.export_dialog import ExportDialog
from epochpoint.gui.panels.mount_text import ConfirmMotionDialog
from epochpoint.gui.refused_rows import RefusedRowsDialog
from epochpoint.io.errors import InputError
from panels_demo import demo_inputs
from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# gui/themes.py promises night colours with green and blue at or below 0x40; antialiasing
# only mixes those colours, so no rendered pixel may exceed it.
MAX_GREEN_BLUE = 0x40
WCAG_NON_TEXT_CONTRAST = 3.0


@pytest.fixture
def night(qtbot):
    app = make_application()
    themes.apply_theme(app, "night")
    yield app
    themes.apply_theme(app, "light")


def rgb(widget) -> np.ndarray:
    """The widget as rendered: an (height, width, 3) array of 0..255 values."""
    image = widget.grab().toImage().convertToFormat(QImage.Format.Format_RGB888)
    rows = np.array(image.constBits(), dtype=np.uint8).reshape(image.height(),
                                                               image.bytesPerLine())
    return rows[:, :image.width() * 3].reshape(image.height(), image.width(), 3)


def assert_night(widget, what: str) -> None:
    pixels = rgb(widget)
    green_blue = pixels[..., 1:].max(axis=-1)
    bright = np.argwhere(green_blue > MAX_GREEN_BLUE)
    assert bright.size == 0, (f"{what}: {len(bright)} pixels too bright in green or blue, "
                              f"first at (y, x) {tuple(bright[0])}: {pixels[tuple(bright[0])]}")


def shown(qtbot, widget):
    qtbot.addWidget(widget)
    widget.show()
    qtbot.waitExposed(widget)
    qtbot.wait(30)
    return widget


def grab_modal(qtbot, open_modal, what: str) -> None:
    """Open a modal box with `open_modal()` (it blocks), check it, then close it."""
    checked = []

    def check():
        box = QApplication.activeModalWidget()
        if box is None:
            QTimer.singleShot(20, check)
            return
        try:
            assert_night(box, what)
            checked.append(True)
        finally:
            box.close()

    QTimer.singleShot(50, check)
    open_modal()
    assert checked == [True], f"{what}: not checked"


@pytest.mark.parametrize("kind", ["information", "warning", "critical", "question"])
def test_message_boxes_are_red(night, qtbot, kind):
    box = getattr(QMessageBox, kind)
    grab_modal(qtbot, lambda: box(None, "Epochpoint", "The plan has unsaved changes."),
               f"{kind} box")


def test_about_box_is_red(night, qtbot):
    grab_modal(qtbot, lambda: QMessageBox.about(None, "About Epochpoint", "Epochpoint"),
               "about box")


@pytest.mark.parametrize("mode", ["open", "save"])
def test_file_dialog_is_red(night, qtbot, tmp_path, mode):
    for folder in ("nights", "sites"):
        (tmp_path / folder).mkdir()
    for name in ("plan.json", "targets.csv", "notes.txt"):
        (tmp_path / name).write_text("x", encoding="utf-8")
    dialog = QFileDialog(None, "Open plan", str(tmp_path), "All files (*)")
    dialog.setOption(QFileDialog.Option.DontUseNativeDialog)
    dialog.setAcceptMode(QFileDialog.AcceptMode.AcceptOpen if mode == "open"
                         else QFileDialog.AcceptMode.AcceptSave)
    dialog.resize(760, 460)
    shown(qtbot, dialog)
    view = dialog.findChild(QListView, "listView")
    qtbot.waitUntil(lambda: view.model().rowCount(view.rootIndex()) == 5, timeout=5000)
    qtbot.wait(50)
    assert_night(dialog, f"{mode} file dialog")


def test_export_dialog_is_red(night, qtbot, tmp_path):
    targets, site = demo_inputs()
    dialog = shown(qtbot, ExportDialog(targets, site, path=str(tmp_path / "positions.csv")))
    assert_night(dialog, "export dialog")


def test_confirmation_and_refused_rows_are_red(night, qtbot):
    confirm = shown(qtbot, ConfirmMotionDialog("Slew to Wick? RA 02:34:51.22 Dec "
                                               "-41:16:37.8", sync=False))
    assert_night(confirm, "motion confirmation")
    refused = [InputError("orchard.csv", "95.0 is beyond ±90°", line=3, column="dec",
                          target="Birch")]
    rows = shown(qtbot, RefusedRowsDialog("orchard.csv", refused, 3))
    assert_night(rows, "refused rows")


def test_main_window_on_the_demo_plan_is_red(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    window.set_theme("night", remember=False)
    for tab in range(window.tabs.count()):
        window.tabs.setCurrentIndex(tab)
        qtbot.wait(100)
        assert_night(window, f"main window, tab {window.tabs.tabText(tab)}")


def _relative_luminance(colour) -> float:
    """WCAG 2.1 relative luminance of an sRGB colour (0..255 channels)."""
    c = np.asarray(colour, dtype=float) / 255.0
    linear = np.where(c <= 0.03928, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    return float(0.2126 * linear[0] + 0.7152 * linear[1] + 0.0722 * linear[2])


def _contrast(a, b) -> float:
    la, lb = sorted((_relative_luminance(a), _relative_luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


@pytest.mark.parametrize("kind", [QCheckBox, QRadioButton])
def test_unchecked_indicator_stands_out(night, qtbot, kind):
    holder = QWidget()
    layout = QVBoxLayout(holder)
    button = kind("scaled by illuminated fraction")
    layout.addWidget(button)
    shown(qtbot, holder)
    holder.setFocus()  # no focus frame on the button
    option = QStyleOptionButton()
    button.initStyleOption(option)
    element = (QStyle.SubElement.SE_CheckBoxIndicator if kind is QCheckBox
               else QStyle.SubElement.SE_RadioButtonIndicator)
    rect = button.style().subElementRect(element, option, button)
    pixels = rgb(button)
    indicator = pixels[rect.top():rect.bottom() + 1, rect.left():rect.right() + 1]
    background = pixels[rect.center().y(), rect.center().x()]  # the unchecked inside
    outline = indicator.reshape(-1, 3)[np.argmax(
        [_relative_luminance(p) for p in indicator.reshape(-1, 3)])]
    assert _contrast(outline, background) >= WCAG_NON_TEXT_CONTRAST, (outline, background)
    window_colour = pixels[1, -2]
    assert _contrast(outline, window_colour) >= WCAG_NON_TEXT_CONTRAST
