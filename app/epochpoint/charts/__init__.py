"""Charts drawn with matplotlib, shared by the command line (PNG files) and the desktop app."""
from .night_chart import draw_night_chart, save_night_chart

__all__ = ["draw_night_chart", "save_night_chart"]
