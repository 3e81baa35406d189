"""Atomic file saves: a reader sees the old file or the new one, never a half-written file.

The data go to a temporary file in the destination's own folder (so the final rename stays on
one file system), are flushed and fsync'ed, then `os.replace` swaps the file in (atomic on POSIX
and Windows). On any failure the temporary file is removed and the old file is left untouched.
"""
from __future__ import annotations

import contextlib
import os
import tempfile

# The process umask, read once at import (reading it means setting it, which is not thread-safe).
_UMASK = os.umask(0)
os.umask(_UMASK)


def atomic_write_bytes(path, data: bytes) -> None:
    """Replace the file at `path` with `data` atomically (see module docstring)."""
    path = os.path.abspath(os.fspath(path))
    folder, base = os.path.split(path)
    try:
        mode = os.stat(path).st_mode & 0o7777  # keep an existing file's permissions
    except FileNotFoundError:
        mode = 0o666 & ~_UMASK  # what open() would have given a new file
    fd, tmp_path = tempfile.mkstemp(prefix=f".{base}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp_path, mode)
        os.replace(tmp_path, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp_path)
        raise
    _fsync_folder(folder)


def atomic_write_text(path, text: str, encoding: str = "utf-8") -> None:
    """Replace the file at `path` with `text` atomically; newlines are written as given."""
    atomic_write_bytes(path, text.encode(encoding))


def _fsync_folder(folder: str) -> None:
    """Make the rename itself durable (POSIX; a no-op where folders cannot be opened)."""
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)
