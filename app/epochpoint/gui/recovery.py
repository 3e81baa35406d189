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

Beside each recovery file a one-line `.source` file names the document it keeps (empty for an
untitled one), so that at start-up every recovery file can be offered with its document's name
and the time it was written (`recovery_files`).

Recent files live in QSettings under "files/recent" (the caller's QSettings, so tests can use
a temporary one), newest first, at most RECENT_MAX.
"""
from __future__ import annotations

import contextlib
import datetime as dt
import hashlib
import os
from dataclasses import dataclass

from PySide6.QtCore import QObject, QStandardPaths, QTimer, Signal

from epochpoint.io.atomic import atomic_write_text
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


RECOVERY_SUFFIX = ".recovery.json"
SOURCE_SUFFIX = ".source"


@dataclass(frozen=True)
class RecoveryFile:
    """A recovery file found in the folder: where it is, the document it keeps (None:
    untitled or not known) and when it was written (ISO 8601 UTC)."""

    path: str
    document_path: str | None
    written: str

    @property
    def document_name(self) -> str:
        if self.document_path:
            return os.path.basename(self.document_path)
        stem = os.path.basename(self.path)[:-len(RECOVERY_SUFFIX)]
        return "untitled plan" if stem == "untitled" else stem.rsplit("-", 1)[0]


def recovery_files(folder: str) -> list[RecoveryFile]:
    """Every recovery file in `folder`, the most recently written first."""
    try:
        names = [n for n in os.listdir(folder) if n.endswith(RECOVERY_SUFFIX)]
    except OSError:
        return []
    found = []
    for name in names:
        path = os.path.join(folder, name)
        try:
            stamp = os.path.getmtime(path)
        except OSError:
            continue
        source = None
        with contextlib.suppress(OSError, UnicodeDecodeError):
            with open(path + SOURCE_SUFFIX, encoding="utf-8") as text:
                source = text.read().strip() or None
        written = dt.datetime.fromtimestamp(stamp, dt.timezone.utc)
        found.append((stamp, RecoveryFile(path, source,
                                          written.strftime("%Y-%m-%dT%H:%M:%SZ"))))
    return [f for _, f in sorted(found, key=lambda pair: -pair[0])]


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
    with contextlib.suppress(OSError):
        os.replace(path + SOURCE_SUFFIX, target + SOURCE_SUFFIX)
    return target


def remove_recovery(path: str) -> None:
    """Remove a recovery file and the note of its document."""
    for name in (path, path + SOURCE_SUFFIX):
        with contextlib.suppress(OSError):
            os.remove(name)


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
            atomic_write_text(path + SOURCE_SUFFIX, os.path.abspath(self.document.path)
                              if self.document.path else "")
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
            remove_recovery(path)
        self._written = None

    def _on_path_changed(self, _path: str) -> None:
        # Saved under another name, or another document opened: the file written for the
        # previous path is no longer needed. A recovery file of the new path is left alone.
        if self._written and self._written != self.current_path():
            remove_recovery(self._written)
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
