"""Atomic file saves: a reader sees the old file or the new one, never a half-written file.

The data go to a temporary file in the destination's own folder (so the final rename stays on
one file system), are flushed and fsync'ed, then `os.replace` swaps the file in (atomic on POSIX
and Windows). On any failure the temporary file is removed and the old file is left untouched.

A destination that is a symbolic link is written through: the temporary file goes in the
folder of the link's final target and replaces the target, so the link stays a link. A FIFO,
a device (even /dev/null) or a socket is refused: a rename cannot replace them atomically,
and writing into them is not a save (leave the output path out to write to standard output).
Every live temporary file is listed in a module-level set, so a termination handler
(`install_termination_cleanup`) can remove them before the process ends. Errors name the
user's path, never the hidden temporary name.
"""
from __future__ import annotations

import contextlib
import os
import signal
import stat
import sys
import tempfile
import threading

from .errors import InputError

# The process umask, read once at import (reading it means setting it, which is not thread-safe).
_UMASK = os.umask(0)
os.umask(_UMASK)
# Temporary files being written now (absolute paths); removed on failure or termination.
_LIVE_TEMPORARIES: set = set()
_LIVE_LOCK = threading.Lock()
EXIT_TERMINATED = 128 + signal.SIGTERM  # 143, the shell's status for a SIGTERM'd process

_NOT_A_FILE = {stat.S_ISFIFO: "a FIFO (named pipe)", stat.S_ISCHR: "a character device",
               stat.S_ISBLK: "a block device", stat.S_ISSOCK: "a socket",
               stat.S_ISDIR: "a folder"}


def destination_file(path) -> str:
    """The regular file a save to `path` replaces: the final target of a symbolic link.

    Raises InputError (naming `path` as given) for a FIFO, device, socket or folder."""
    shown = os.fspath(path)
    real = os.path.realpath(os.path.abspath(shown))  # follows links, dangling ones too
    try:
        mode = os.stat(real).st_mode
    except FileNotFoundError:
        return real
    except OSError as err:
        raise OSError(err.errno, err.strerror, shown) from None
    for is_kind, kind in _NOT_A_FILE.items():
        if is_kind(mode):
            raise InputError(shown, f"is {kind}, not a regular file; saves replace a file "
                                    "atomically (leave the output path out to write to "
                                    "standard output)")
    return real


@contextlib.contextmanager
def atomic_output(path, binary: bool = False, encoding: str = "utf-8"):
    """A file object whose content replaces `path` atomically when the block ends normally.

    Text mode writes newlines as given. On an exception (or termination) the temporary file
    is removed and the old file is left as it was. OSErrors name `path`, not the temporary."""
    shown = os.fspath(path)
    real = destination_file(path)
    folder, base = os.path.split(real)
    try:
        mode = os.stat(real).st_mode & 0o7777  # keep an existing file's permissions
    except FileNotFoundError:
        mode = 0o666 & ~_UMASK  # what open() would have given a new file
    try:
        fd, tmp_path = tempfile.mkstemp(prefix=f".{base}.", suffix=".tmp", dir=folder)
    except OSError as err:
        raise OSError(err.errno, err.strerror, shown) from None
    with _LIVE_LOCK:
        _LIVE_TEMPORARIES.add(tmp_path)
    try:
        with (os.fdopen(fd, "wb") if binary else
              open(fd, "w", encoding=encoding, newline="")) as f:
            yield f
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp_path, mode)
        os.replace(tmp_path, real)
    except OSError as err:
        _remove(tmp_path)
        if err.filename not in (None, tmp_path, real):
            raise  # about another file (e.g. an input read while writing)
        raise OSError(err.errno, err.strerror, shown) from None
    except BaseException:
        _remove(tmp_path)
        raise
    with _LIVE_LOCK:
        _LIVE_TEMPORARIES.discard(tmp_path)
    _fsync_folder(folder)


def atomic_write_bytes(path, data: bytes) -> None:
    """Replace the file at `path` with `data` atomically (see module docstring)."""
    with atomic_output(path, binary=True) as f:
        f.write(data)


def atomic_write_text(path, text: str, encoding: str = "utf-8") -> None:
    """Replace the file at `path` with `text` atomically; newlines are written as given."""
    atomic_write_bytes(path, text.encode(encoding))


def remove_live_temporaries() -> None:
    """Remove every temporary file a save in progress is writing (the saves then fail)."""
    with _LIVE_LOCK:
        live = list(_LIVE_TEMPORARIES)
    for tmp_path in live:
        _remove(tmp_path)


@contextlib.contextmanager
def termination_cleanup():
    """While the block runs, SIGTERM removes live temporary files and exits with status 143.

    Only the main thread may install signal handlers; elsewhere this does nothing."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def on_terminate(signum, frame):
        remove_live_temporaries()
        print("epochpoint: terminated; unfinished output removed", file=sys.stderr, flush=True)
        # End at once: worker threads still computing chunks must not hold the process open.
        os._exit(EXIT_TERMINATED)

    previous = signal.signal(signal.SIGTERM, on_terminate)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


def _remove(tmp_path: str) -> None:
    with contextlib.suppress(OSError):
        os.unlink(tmp_path)
    with _LIVE_LOCK:
        _LIVE_TEMPORARIES.discard(tmp_path)


def _fsync_folder(folder: str) -> None:
    """Make the rename itself durable (POSIX; a no-op where folders cannot be opened)."""
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)
