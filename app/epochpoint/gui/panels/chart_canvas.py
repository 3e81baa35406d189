"""A matplotlib canvas for the panels, with picking of the point nearest the mouse.

Charts are drawn by epochpoint.charts (the same functions the command line uses); the canvas
only hosts the figure and turns mouse positions into "which drawn thing is under the cursor".
"""
from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from matplotlib.figure import Figure
from PySide6.QtWidgets import QSizePolicy

PICK_RADIUS_PX = 12.0


class ChartCanvas(FigureCanvasQTAgg):
    """A figure in a widget; `style` is the chart style dict of the current theme (or None)."""

    def __init__(self, parent=None, size_in=(6.0, 4.0), min_height_px: int = 160):
        super().__init__(Figure(figsize=size_in, dpi=100))
        self.setParent(parent)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Expanding)
        self.setMinimumHeight(min_height_px)
        self.style = None

    def draw_blank(self) -> None:
        """An empty figure in the current theme's background, shown until there is a chart."""
        from ...charts.chart_style import resolve_style

        self.figure.clear()
        self.figure.set_facecolor(resolve_style(self.style)["background"])
        self.draw_idle()

    def display_xy(self, ax, x, y) -> np.ndarray:
        """(n, 2) display pixels of data points (x, y) of `ax`."""
        return ax.transData.transform(np.column_stack((np.ravel(x), np.ravel(y))))

    def widget_pos(self, ax, x, y):
        """Widget (Qt, logical pixels, origin top-left) position of one data point of `ax`."""
        from PySide6.QtCore import QPoint

        px, py = self.display_xy(ax, [x], [y])[0]
        ratio = self.device_pixel_ratio or 1.0
        return QPoint(int(round(px / ratio)), int(round(self.height() - py / ratio)))


def nearest_point(points_px: np.ndarray, x_px: float, y_px: float,
                  radius_px: float = PICK_RADIUS_PX) -> int | None:
    """Index of the point nearest (x_px, y_px) within radius_px, or None."""
    if len(points_px) == 0:
        return None
    d = np.hypot(points_px[:, 0] - x_px, points_px[:, 1] - y_px)
    d = np.where(np.isfinite(d), d, np.inf)
    k = int(np.argmin(d))
    return k if d[k] <= radius_px else None
