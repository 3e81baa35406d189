"""The main window's menus and toolbar, in our own wording. Every action has a shortcut and
is also added to the window itself, so the shortcuts work wherever the focus is."""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction, QKeySequence

from .body_dialogs import add_body_dialog, elements_dialog
from .caution import show_safety_dialog
from .star_dialog import add_star_dialog


def _action(window, menu, text: str, shortcut, slot, tip: str = "",
            checkable: bool = False) -> QAction:
    action = QAction(text, window)
    if shortcut is not None:
        shortcuts = shortcut if isinstance(shortcut, list) else [shortcut]
        action.setShortcuts([QKeySequence(s) for s in shortcuts])
    action.setStatusTip(tip)
    action.setToolTip(f"{text.replace('&', '').rstrip('…')}"
                      f" ({action.shortcut().toString(QKeySequence.SequenceFormat.NativeText)})")
    action.setCheckable(checkable)
    action.triggered.connect(slot)
    menu.addAction(action)
    window.addAction(action)  # shortcuts work while the menu bar is hidden too
    return action


def build_menus(window) -> dict:
    """Menus and toolbar of `window`; returns the actions by name."""
    w, keys, a = window, QKeySequence.StandardKey, {}
    bar = w.menuBar()

    menu = bar.addMenu("&File")
    a["new"] = _action(w, menu, "&New", keys.New, w.new_document, "Start an empty plan")
    a["open"] = _action(w, menu, "&Open plan…", keys.Open, w.open_dialog,
                        "Open a plan file or a target list")
    a["import"] = _action(w, menu, "&Import targets…", "Ctrl+I", w.import_dialog,
                          "Append the targets of a CSV, ECSV or VOTable list")
    menu.addSeparator()
    a["save"] = _action(w, menu, "&Save", keys.Save, w.save, "Save the plan")
    a["save_as"] = _action(w, menu, "Save &as…", "Ctrl+Shift+S", w.save_as,
                           "Save the plan under a new name")
    a["export"] = _action(w, menu, "E&xport positions…", "Ctrl+E", w.export_positions_dialog,
                          "Write every target's coordinates at one instant for a controller")
    menu.addSeparator()
    w.recent_menu = menu.addMenu("&Recent files")
    menu.addSeparator()
    a["quit"] = _action(w, menu, "&Quit", "Ctrl+Q", w.close, "Leave Epochpoint")

    menu = bar.addMenu("&Edit")
    a["undo"] = w.document.undo_stack.createUndoAction(w, "&Undo")
    a["undo"].setShortcut(keys.Undo)
    a["redo"] = w.document.undo_stack.createRedoAction(w, "&Redo")
    a["redo"].setShortcuts([QKeySequence("Ctrl+Shift+Z"), QKeySequence("Ctrl+Y")])
    for action in (a["undo"], a["redo"]):
        menu.addAction(action)
        w.addAction(action)
    menu.addSeparator()
    a["add"] = _action(w, menu, "&Add target", "Ctrl+T", w.add_target,
                       "Append a new target and edit its name")
    a["add_body"] = _action(w, menu, "Add the Moon or a &planet…", "Ctrl+Shift+T",
                            lambda: add_body_dialog(w), "Append the Sun, the Moon or a "
                            "planet; its place is computed at every instant")
    a["add_elements"] = _action(w, menu, "Add minor bodies from &elements…", "Ctrl+Shift+E",
                                lambda: elements_dialog(w), "Paste or read orbital elements "
                                "(MPC one-line formats) of asteroids and comets")
    a["add_star"] = _action(w, menu, "Add a star by &Hipparcos number…", "Ctrl+Shift+H",
                            lambda: add_star_dialog(w), "Append a star of the Hipparcos "
                            "catalogue, written HIP n")
    a["remove"] = _action(w, menu, "Re&move targets", "Ctrl+Del", w.remove_selected,
                          "Remove the selected targets (Delete in the list)")
    menu.addSeparator()
    a["filter"] = _action(w, menu, "&Find in list", keys.Find, w.focus_filter,
                          "Type to filter the target list")
    a["recompute"] = _action(w, menu, "Re&compute now", "F5", w.replan,
                             "Plan the night again and compute positions now")

    menu = bar.addMenu("&View")
    a["night"] = _action(w, menu, "&Night-vision theme", "Ctrl+Shift+N", w.toggle_night_theme,
                         "Red on black, for dark-adapted eyes", checkable=True)
    a["present"] = _action(w, menu, "Back to the &present instant", "Ctrl+Shift+P",
                           w.show_present, "Show tonight at the present instant (the target "
                           "list, verdicts and ledger follow it)")
    menu.addSeparator()
    a["list"] = _action(w, menu, "Target &list", "Ctrl+0", lambda: w.table.setFocus(),
                        "Move the focus to the target list")
    for i, name in enumerate(("Tonight", "Sky dome", "Drift", "Site & limits", "Mount")):
        a[f"tab{i}"] = _action(w, menu, f"&{i + 1} {name.replace('&', '&&')}", f"Ctrl+{i + 1}",
                               lambda _=False, i=i: w.show_tab(i), f"Show {name}")
    a["nights"] = _action(w, menu, "The coming ni&ghts", "Ctrl+Shift+C",
                          lambda: w.show_tab(w.tabs.indexOf(w.calendar)),
                          "Show the calendar of the coming nights and their timed events")
    a["ledger"] = w.ledger_dock.toggleViewAction()
    a["ledger"].setText("Correction &ledger")
    a["ledger"].setShortcut(QKeySequence("Ctrl+Shift+L"))
    menu.addAction(a["ledger"])
    w.addAction(a["ledger"])

    menu = bar.addMenu("&Mount")
    a["abort"] = w.mount_panel.abort_action  # Ctrl+Shift+A, wherever the focus is
    menu.addAction(a["abort"])
    w.addAction(a["abort"])

    menu = bar.addMenu("&Help")
    a["safety"] = _action(w, menu, "&Safety cautions", "F1", lambda: show_safety_dialog(w),
                          "Read before observing")
    a["about"] = _action(w, menu, "&About Epochpoint", "Shift+F1", w.show_about)

    toolbar = w.addToolBar("Main")
    toolbar.setObjectName("mainToolbar")
    toolbar.setMovable(False)
    toolbar.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextOnly)  # theme-proof: no icons
    for key in ("new", "open", "save", None, "import", "add", "remove", None, "undo",
                "redo", None, "recompute", "night"):
        if key is None:
            toolbar.addSeparator()
        else:
            toolbar.addAction(a[key])
    return a
