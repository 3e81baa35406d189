"""Epochpoint's desktop app (PySide6).

The shell: app.py (QApplication set-up, run_gui), main_window.py (menus, layout, recompute),
document.py + commands.py (the open plan and its undo stack), target_model.py (the target
table), workers.py (background tasks), themes.py, status.py, caution.py and recovery.py.
The tabs and the ledger dock live in panels/. The app never computes astronomy itself: it
calls epochpoint.core in worker threads (recompute.py) and shows the results.
"""

from .none_refcount import guard as _guard_none

_guard_none()  # see none_refcount.py: PySide6 6.12 on Python 3.11 leaks references to None
