"""Charts drawn with matplotlib, shared by the command line (PNG files) and the desktop app."""
from .ellipse_chart import draw_error_ellipse
from .horizon_chart import draw_horizon_profile
from .night_chart import draw_night_chart, save_night_chart
from .sky_chart import draw_sky_chart

__all__ = ["draw_night_chart", "save_night_chart", "draw_sky_chart", "draw_error_ellipse",
           "draw_horizon_profile"]
