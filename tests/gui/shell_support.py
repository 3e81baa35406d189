"""Fixtures shared by the shell's GUI tests (tests/gui/test_shell_*.py).

Every window uses a temporary QSettings file and recovery folder, is non-interactive (no
modal message boxes) and is shut down at the end: timers stopped, workers cancelled and joined.
"""
import os

import pytest
from PySide6.QtCore import QEvent, QSettings
from PySide6.QtWidgets import QApplication

from epochpoint.gui import themes, workers

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
DEMO_PLAN = os.path.join(ROOT, "sample_targets", "loma_candil_plan.json")
DEMO_TARGETS = os.path.join(ROOT, "sample_targets", "loma_candil_targets.csv")
DEMO_SITE = os.path.join(ROOT, "sample_targets", "loma_candil.toml")
WAIT_MS = 30000


@pytest.fixture
def settings(tmp_path):
    return QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)


@pytest.fixture
def make_window(qtbot, settings, tmp_path):
    """make_window(path=None, interactive=False) -> a shown MainWindow, optionally with a file
    opened (an interactive window shows message boxes: patch them in the test)."""
    from epochpoint.gui.app import make_application
    from epochpoint.gui.main_window import MainWindow

    make_application()
    made = []

    def make(path=None, interactive=False):
        window = MainWindow(settings, recovery_folder=str(tmp_path / "recovery"),
                            interactive=interactive)
        made.append(window)
        window.resize(1300, 820)
        window.show()
        if path is not None:
            assert window.open_path(path)
        return window

    yield make
    for window in made:
        window.shutdown()
        window.close()
        window.deleteLater()
    assert workers.wait_for_workers(WAIT_MS)
    QApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    QApplication.processEvents()
    themes.apply_theme(QApplication.instance(), "light")


def wait_for_plan(qtbot, window, check=lambda plan: True):
    """Wait until the recompute has finished and delivered a plan passing `check`."""
    qtbot.waitUntil(lambda: not window.computing() and window.plan is not None
                    and check(window.plan), timeout=WAIT_MS)
