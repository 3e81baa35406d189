"""Starting the desktop app: the QApplication, the main window, and the screenshot mode.

    run_gui(path=None, screenshot=None, site_spec=None, night=None) -> exit status

With `screenshot` the app opens `path`, waits for every computation, renders the whole main
window (at least SCREENSHOT_SIZE) to a PNG and returns 0, using throw-away settings and
recovery folders so the user's own are never touched; bad input raises InputError (the
command line prints it as one line and exits 2). It works without a screen
(QT_QPA_PLATFORM=offscreen).
"""
from __future__ import annotations

import os
import sys
import tempfile
import time
import warnings

from PySide6.QtCore import QSettings, QSize, QtMsgType, qInstallMessageHandler
from PySide6.QtGui import QIcon
from PySide6.QtWidgets import QApplication

from epochpoint import __version__
from epochpoint.core.timescale import StaleEarthOrientation

SCREENSHOT_SIZE = QSize(1440, 900)
SCREENSHOT_TIMEOUT_S = 120.0
# After the workers finish, panels may still draw on the next turns of the event loop.
SETTLE_S = 0.4
ICON_PATH = os.path.join(os.path.dirname(os.path.dirname(__file__)), "data", "epochpoint.svg")


# Qt notes that say nothing to the user (the offscreen platform's missing window features).
_QUIET_QT_MESSAGES = ("propagateSizeHints",)


def _qt_message(kind, context, message) -> None:
    if any(text in message for text in _QUIET_QT_MESSAGES):
        return
    if kind in (QtMsgType.QtWarningMsg, QtMsgType.QtCriticalMsg, QtMsgType.QtFatalMsg):
        print(f"epochpoint: Qt: {message}", file=sys.stderr)


def make_application(argv=None) -> QApplication:
    """The QApplication (created once), named for QSettings and QStandardPaths."""
    app = QApplication.instance()
    if app is None:
        qInstallMessageHandler(_qt_message)
        app = QApplication(list(argv) if argv is not None else [sys.argv[0]])
    app.setOrganizationName("Epochpoint")
    app.setApplicationName("Epochpoint")
    app.setApplicationVersion(__version__)
    app.setDesktopFileName("epochpoint")
    if os.path.exists(ICON_PATH):
        app.setWindowIcon(QIcon(ICON_PATH))
    # Staleness of the Earth-orientation table is shown in the status line, not printed.
    warnings.filterwarnings("ignore", category=StaleEarthOrientation)
    warnings.filterwarnings("ignore", module="erfa")
    warnings.filterwarnings("ignore", module="astropy")
    return app


def _has_screen() -> bool:
    if os.environ.get("QT_QPA_PLATFORM") or not sys.platform.startswith("linux"):
        return True
    return bool(os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY"))


def wait_until_idle(app: QApplication, window, timeout_s: float = SCREENSHOT_TIMEOUT_S) -> bool:
    """Run the event loop until no recompute is pending or running; False on timeout."""
    deadline = time.monotonic() + timeout_s
    while time.monotonic() < deadline:
        app.processEvents()
        if not window.computing():
            settle_end = time.monotonic() + SETTLE_S
            while time.monotonic() < settle_end:
                app.processEvents()
                time.sleep(0.01)
            if not window.computing():
                return True
        time.sleep(0.01)
    return False


def run_gui(path=None, screenshot=None, site_spec: str | None = None,
            night: str | None = None) -> int:
    """Open the app (see module docstring); returns the process exit status."""
    if screenshot is None and not _has_screen():
        print("epochpoint: error: no display to open the app on (set DISPLAY, or use "
              "--screenshot with QT_QPA_PLATFORM=offscreen)", file=sys.stderr)
        return 2
    from .loading import load_path
    from .main_window import MainWindow

    app = make_application()
    if screenshot is not None:
        return _screenshot(app, path, screenshot, site_spec, night, load_path, MainWindow)
    window = MainWindow(QSettings(), interactive=True)
    window.show()
    start_session(window, path, site_spec, night)
    window.recompute_timer.start()
    return app.exec()


def start_session(window, path=None, site_spec: str | None = None,
                  night: str | None = None) -> None:
    """Open what the command line names, then offer every recovery file an earlier session
    left (gui.recovery_offer); the opened file's own was offered when it opened."""
    from .loading import is_plan_file
    from .recovery import recovery_path
    from .recovery_offer import offer_recoveries

    offered = None
    if path:
        path = os.fspath(path)
        window.open_path(path, site_spec, night)
        offered = recovery_path(window.autosaver.folder, path if is_plan_file(path) else None)
    elif site_spec or night:
        _start_with(window, site_spec, night)
    offer_recoveries(window, skip=offered)


def _start_with(window, site_spec, night) -> None:
    """A new document with the given site and night (from the command line)."""
    from dataclasses import replace

    from epochpoint.io import read_site
    from epochpoint.io.errors import InputError
    from epochpoint.io.planfile import check_night

    doc = window.document.to_plan_document()
    try:
        if site_spec:
            doc.site = read_site(site_spec)
        if night:
            doc.night = check_night(replace(doc.night, date=night))
    except (InputError, ValueError, OSError) as err:
        window.show_error("Cannot use the command-line settings", str(err))
        return
    window.document.load(doc, None)


def _screenshot(app, path, png_path, site_spec, night, load_path, window_class) -> int:
    folder = os.path.dirname(os.path.abspath(png_path))
    if not os.path.isdir(folder):
        raise OSError(f"{png_path}: no such folder")
    doc, kept = load_path(path, site_spec, night) if path else (None, None)
    with tempfile.TemporaryDirectory(prefix="epochpoint-shot-") as scratch:
        settings = QSettings(os.path.join(scratch, "settings.ini"), QSettings.Format.IniFormat)
        window = window_class(settings, recovery_folder=os.path.join(scratch, "recovery"),
                              interactive=False)
        window.resize(SCREENSHOT_SIZE)
        window.show()
        if doc is not None:
            window.document.load(doc, kept)
        window.recompute()
        finished = wait_until_idle(app, window)
        image = window.grab()
        window.shutdown()
        window.close()
        window.deleteLater()
        app.processEvents()
    if not finished:
        raise OSError(f"{png_path}: the computations did not finish within "
                      f"{SCREENSHOT_TIMEOUT_S:.0f} s")
    if not image.save(os.fspath(png_path), "PNG"):
        raise OSError(f"{png_path}: could not write the PNG")
    return 0
