"""The app's two looks: a light theme for daytime planning and a red night-vision theme.

The night theme keeps dark-adapted eyes dark: a near-black background and red text only, with
no blue or white anywhere (red light barely affects the rods' dark adaptation: common
practice at observatories). Every colour the shell and the panels use comes from here:
`apply_theme` sets the Qt palette and style sheet, `colours` gives the named colours for
markers, and `chart_style` the few colours matplotlib charts need (charts/chart_style.py
derives the rest). Icons and check indicators, which the palette does not reach, are redrawn
by the application's style (gui/night_style.py). The chosen theme is remembered in QSettings
under "view/theme".
"""
from __future__ import annotations

from PySide6.QtGui import QColor, QPalette
from PySide6.QtWidgets import QApplication

from .night_style import ThemedStyle, red_icon

THEMES = ("light", "night")
SETTINGS_KEY = "view/theme"
_STYLE: ThemedStyle | None = None  # the application's style, kept alive from Python

# Named colours per theme. Night colours keep green and blue at or below 0x40.
_COLOURS = {
    "light": {
        "window": "#eef0ee", "base": "#ffffff", "alternate": "#f5f6f4", "text": "#1d2124",
        "muted": "#5d6468", "accent": "#2b6a7c", "accent_text": "#ffffff",
        "selection": "#2b6a7c", "selection_text": "#ffffff",
        "border": "#c5cac7",
        "caution_bg": "#fff2cf", "caution_text": "#4a3200", "caution_edge": "#c98a00",
        "note_bg": "#e3eef1", "note_text": "#173c46",
        "danger": "#b3261e", "warning": "#9a5b00", "ok": "#2d6a36",
    },
    "night": {
        "window": "#0c0000", "base": "#120101", "alternate": "#180302", "text": "#e0311f",
        "muted": "#9a2014", "accent": "#ff3b24", "accent_text": "#0c0000",
        # A dim selection: a bright red bar would undo the eyes' dark adaptation.
        "selection": "#4a0804", "selection_text": "#ff3b24",
        "border": "#3a0905",
        "caution_bg": "#240402", "caution_text": "#ff3a22", "caution_edge": "#b01e10",
        "note_bg": "#1c0302", "note_text": "#e0311f",
        "danger": "#ff3a22", "warning": "#d0301c", "ok": "#a02616",
    },
}


def colours(theme: str) -> dict:
    """The named colours of a theme (hex strings)."""
    return dict(_COLOURS[theme if theme in _COLOURS else "light"])


def chart_style(theme: str) -> dict:
    """Background, foreground and accent for matplotlib charts in this theme."""
    c = colours(theme)
    return {"background": c["base"], "foreground": c["text"], "accent": c["accent"]}


def _palette(c: dict) -> QPalette:
    p = QPalette()
    role = QPalette.ColorRole
    pairs = {
        role.Window: c["window"], role.WindowText: c["text"], role.Base: c["base"],
        role.AlternateBase: c["alternate"], role.Text: c["text"], role.Button: c["window"],
        role.ButtonText: c["text"], role.ToolTipBase: c["base"], role.ToolTipText: c["text"],
        role.Highlight: c["selection"], role.HighlightedText: c["selection_text"],
        role.PlaceholderText: c["muted"], role.Link: c["accent"], role.BrightText: c["danger"],
        role.Light: c["alternate"], role.Midlight: c["border"], role.Mid: c["border"],
        role.Dark: c["border"], role.Shadow: c["window"],
    }
    for r, colour in pairs.items():
        p.setColor(r, QColor(colour))
    disabled = QPalette.ColorGroup.Disabled
    for r in (role.WindowText, role.Text, role.ButtonText):
        p.setColor(disabled, r, QColor(c["muted"]))
    return p


def _style_sheet(c: dict) -> str:
    """Widget-level styling by object name: the caution strip, notes and the status line."""
    return f"""
QFrame#cautionStrip {{ background: {c['caution_bg']}; border-bottom: 2px solid
    {c['caution_edge']}; }}
QFrame#cautionStrip QLabel {{ color: {c['caution_text']}; }}
QLabel#cautionMark {{ color: {c['caution_bg']}; background: {c['caution_edge']};
    border-radius: 3px; padding: 1px 6px; font-weight: bold; }}
QFrame#siteNote {{ background: {c['note_bg']}; border: 1px solid {c['border']}; }}
QFrame#siteNote QLabel {{ color: {c['note_text']}; }}
QFrame#nightBar {{ border-bottom: 1px solid {c['border']}; }}
QLabel[role="fieldLabel"] {{ color: {c['muted']}; }}
QLabel[role="status"] {{ padding: 0 8px; }}
QLabel[role="status"][stale="true"] {{ color: {c['caution_text']}; background: {c['caution_bg']};
    border: 1px solid {c['caution_edge']}; font-weight: bold; }}
QTableView {{ gridline-color: {c['border']}; selection-background-color: {c['selection']};
    selection-color: {c['selection_text']}; }}
QHeaderView::section {{ background: {c['window']}; color: {c['text']}; padding: 3px 6px;
    border: none; border-right: 1px solid {c['border']};
    border-bottom: 1px solid {c['border']}; }}
QTabBar::tab {{ padding: 5px 14px; }}
QTabBar::tab:selected {{ color: {c['accent']}; font-weight: bold; }}
QToolTip {{ color: {c['text']}; background: {c['base']}; border: 1px solid {c['border']}; }}
QDockWidget::title {{ padding: 4px 6px; background: {c['window']}; }}
"""


def apply_theme(app: QApplication, theme: str) -> str:
    """Switch the whole application to `theme` ('light' or 'night'); returns the name used.
    Restyling every widget is costly, so applying the theme already in force does nothing."""
    theme = theme if theme in THEMES else "light"
    if app.property("epochpointTheme") == theme:
        return theme
    global _STYLE
    if not app.property("epochpointFusion"):
        # Fusion is the one built-in style that follows the palette everywhere; the proxy
        # adds what the palette cannot reach (gui/night_style.py).
        _STYLE = ThemedStyle()
        app.setStyle(_STYLE)
        app.setProperty("epochpointFusion", True)
    c = colours(theme)
    if _STYLE is not None:
        _STYLE.night = c if theme == "night" else None
    _theme_window_icon(app, c if theme == "night" else None)
    app.setProperty("epochpointTheme", theme)  # set first: panels read it on the change
    app.setPalette(_palette(c))
    app.setStyleSheet(_style_sheet(c))
    return theme


def _theme_window_icon(app: QApplication, night: dict | None) -> None:
    """The app's own icon (also the About box's picture) in red at night, as made otherwise."""
    if app.property("epochpointIcon") is None:
        app.setProperty("epochpointIcon", app.windowIcon())
    icon = app.property("epochpointIcon")
    app.setWindowIcon(red_icon(icon, QColor(night["text"])) if night else icon)


def current_theme(app: QApplication | None = None) -> str:
    app = app or QApplication.instance()
    theme = app.property("epochpointTheme") if app is not None else None
    return theme if theme in THEMES else "light"


def saved_theme(settings) -> str:
    value = settings.value(SETTINGS_KEY, "light")
    return value if value in THEMES else "light"


def save_theme(settings, theme: str) -> None:
    settings.setValue(SETTINGS_KEY, theme)
