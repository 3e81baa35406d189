"""A guard against a reference-count bug of the Qt bindings on Python 3.11.

PySide6 6.12.0 on Python 3.11 releases one reference to None that it never took on every call
of a Qt method that returns nothing (setText, processEvents, ...): None's count falls by one
per call, and once it reaches zero the interpreter aborts with "deallocating None". The status
line alone makes a few such calls a second, so a session would die within the hour. Python
3.12 made None immortal (PEP 683), which hides the bug there.

`guard()` measures the leak once; only if it is present does it add 2**40 references to
None's count, which no session can use up (PEP 683 gives immortal objects such a count too).
It writes the count directly: in a release build of CPython the count is the first field of
every object (Include/object.h, PyObject.ob_refcnt). Debug builds (another layout) and Python
3.12 and later are left alone.
"""
from __future__ import annotations

import ctypes
import sys

_PROBE_CALLS = 64
_EXTRA_REFERENCES = 1 << 40
_guarded = False


def leaks_none() -> bool:
    """True when a void Qt call lowers None's reference count (the bug above)."""
    from PySide6.QtCore import QObject

    probe = QObject()
    before = sys.getrefcount(None)
    for _ in range(_PROBE_CALLS):
        probe.setObjectName("probe")
    return sys.getrefcount(None) < before - _PROBE_CALLS // 2


def guard() -> bool:
    """Make None effectively immortal if the bindings leak it; True if the guard was needed."""
    global _guarded
    if _guarded or sys.version_info >= (3, 12) or hasattr(sys, "gettotalrefcount"):
        return _guarded
    if leaks_none():
        ctypes.c_ssize_t.from_address(id(None)).value += _EXTRA_REFERENCES
        _guarded = True
    return _guarded
