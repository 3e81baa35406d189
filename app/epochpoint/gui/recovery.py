"""Crash recovery and recent files.

Every AUTOSAVE_MS the dirty document is written (as a plan file, atomically) to a recovery
file in the user's data folder (QStandardPaths.AppDataLocation/recovery, or a folder given
by the caller, as tests do). One recovery file per document path (its name carries a hash of
the path; "untitled" for a new document). A clean save or a clean exit removes it. On opening
a document, a recovery file newer than the document's own file is offered for restoring; when
the document's own file cannot be read, its recovery file is offered whatever its age. A
recovery file that cannot be read is renamed for salvage (`salvage_recovery`), never deleted.
An autosave that fails emits `failed` (the window tells the user); the next one that works
emits `saved`.

Recent files live in QSettings under "files/recent" (the caller's QSettings, so tests can use
a temporary one), newest first, at most RECENT_MAX.
"""
from __future__ import annotations

import contextlib
import datetime as dt
import hashlib
import os

from PySide6.QtCore import QObject, QStandardPaths, QTimer, Signal

from epochpoint.io.errors import InputError
from epochpoint.io.planfile import write_plan_file

AUTOSAVE_MS = 60_000
RECENT_KEY = "files/recent"
RECENT_MAX = 8


def default_recovery_folder() -> str:
    base = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.AppDataLocation)
    return os.path.join(base or os.path.expanduser("~/.epochpoint"), "recovery")


def recovery_path(folder: str, document_path: str | None) -> str:
    """The recovery file for a document path (None: an untitled document)."""
    if document_path:
        full = os.path.abspath(document_path)
        digest = hashlib.sha1(full.encode("utf-8")).hexdigest()[:12]
        stem = os.path.splitext(os.path.basename(full))[0]
        name = f"{stem}-{digest}.recovery.json"
    else:
        name = "untitled.recovery.json"
    return os.path.join(folder, name)


def newer_recovery(folder: str, document_path: str | None) -> str | None:
    """The recovery file for a document if it exists and is newer than the document's file."""
    candidate = recovery_path(folder, document_path)
    if not os.path.exists(candidate):
        return None
    if document_path and os.path.exists(document_path):
        if os.path.getmtime(candidate) <= os.path.getmtime(document_path):
            return None
    return candidate


def salvage_recovery(path: str) -> str:
    """Rename an unreadable recovery file out of the autosaver's way (it would be overwritten
    or removed) and return where it now is; the original path if it cannot be renamed."""
    stamp = dt.datetime.now(dt.timezone.utc).strftime("%Y%m%dT%H%M%SZ")
    base = path[:-len(".recovery.json")] if path.endswith(".recovery.json") else path
    target = f"{base}.unreadable-{stamp}.json"
    try:
        os.replace(path, target)
    except OSError:
        return path
    return target


class Autosaver(QObject):
    """Writes the document's recovery file while it is dirty; see the module docstring."""

    failed = Signal(object)  # the exception of an autosave that did not work
    saved = Signal(str)      # the recovery file of an autosave that worked

    def __init__(self, document, folder: str | None = None, interval_ms: int = AUTOSAVE_MS,
                 parent=None):
        super().__init__(parent)
        self.document = document
        self.folder = folder or default_recovery_folder()
        self.last_error = ""
        self._written: str | None = None
        self.timer = QTimer(self)
        self.timer.setInterval(interval_ms)
        self.timer.timeout.connect(self.save_now)
        self.timer.start()
        document.dirty_changed.connect(self._on_dirty_changed)
        document.path_changed.connect(self._on_path_changed)

    def current_path(self) -> str:
        return recovery_path(self.folder, self.document.path)

    def save_now(self) -> str | None:
        """Write the recovery file if the document is dirty; returns its path or None."""
        if not self.document.dirty:
            return None
        path = self.current_path()
        try:
            os.makedirs(self.folder, exist_ok=True)
            write_plan_file(path, self.document.to_plan_document())
        except (OSError, InputError, ValueError) as err:
            self.last_error = f"autosave failed: {err}"
            self.failed.emit(err)
            return None
        self.last_error = ""
        self._written = path
        self.saved.emit(path)
        return path

    def clear(self) -> None:
        """Remove the recovery file written for this document (after a clean save or exit)."""
        for path in {self._written, self.current_path()} - {None}:
            with contextlib.suppress(OSError):
                os.remove(path)
        self._written = None

    def _on_path_changed(self, _path: str) -> None:
        # Saved under another name, or another document opened: the file written for the
        # previous path is no longer needed. A recovery file of the new path is left alone.
        if self._written and self._written != self.current_path():
            with contextlib.suppress(OSError):
                os.remove(self._written)
            self._written = None

    def _on_dirty_changed(self, dirty: bool) -> None:
        if not dirty:
            self.clear()


def recent_files(settings) -> list[str]:
    value = settings.value(RECENT_KEY, [])
    if isinstance(value, str):
        value = [value] if value else []
    return [str(p) for p in (value or [])]


def add_recent_file(settings, path: str) -> list[str]:
    path = os.path.abspath(path)
    files = [path] + [p for p in recent_files(settings) if p != path]
    files = files[:RECENT_MAX]
    settings.setValue(RECENT_KEY, files)
    return files


def remove_recent_file(settings, path: str) -> list[str]:
    files = [p for p in recent_files(settings) if p != path]
    settings.setValue(RECENT_KEY, files)
    return files
