"""Panels follow the app's theme: chart colours and named colours from gui.themes.

apply_theme changes the application palette; every panel watches for that and asks the
themes module for the colours of the theme now in force (after the change has settled).
"""
from __future__ import annotations

from PySide6.QtCore import QEvent, QObject, QTimer

from .. import themes

_PALETTE_EVENTS = (QEvent.Type.PaletteChange, QEvent.Type.ApplicationPaletteChange)


def theme_name() -> str:
    return themes.current_theme()


def theme_chart_style() -> dict:
    """The chart style dict of the theme in force (charts.chart_style derives the rest)."""
    return themes.chart_style(theme_name())


def theme_colour(name: str) -> str:
    """A named colour of the theme in force ('danger', 'warning', 'ok', 'muted', ...)."""
    return themes.colours(theme_name())[name]


class _ThemeWatcher(QObject):
    def __init__(self, widget, callback):
        super().__init__(widget)
        self.callback = callback
        self.theme = None
        widget.installEventFilter(self)

    def eventFilter(self, obj, event):  # noqa: N802 (Qt name)
        if event.type() in _PALETTE_EVENTS:
            QTimer.singleShot(0, self._check)
        return False

    def _check(self):
        name = theme_name()
        if name != self.theme:
            self.theme = name
            self.callback()


def watch_theme(widget, callback) -> None:
    """Call callback() once now and again whenever the app switches theme."""
    watcher = _ThemeWatcher(widget, callback)
    watcher.theme = theme_name()
    callback()
