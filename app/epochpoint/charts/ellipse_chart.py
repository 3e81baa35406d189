"""A position's 1-sigma error ellipse on the sky, in milliarcseconds, east to the left.

The ellipse is given by its semi-major and semi-minor axes and the position angle of the
major axis, east of north (as core.uncertainty.error_ellipse_at returns them). The plot is
the tangent plane at the star as seen on the sky: north up, east LEFT.
"""
from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from .chart_style import apply_axes_style, resolve_style


def ellipse_outline(major: float, minor: float, pa_deg: float, points: int = 181):
    """East and north offsets (same unit as the axes) around the ellipse."""
    pa = np.radians(pa_deg)
    u = np.linspace(0.0, 2.0 * np.pi, points)
    # Unit vectors (east, north) along the major axis (PA from north through east) and minor.
    along = np.array([np.sin(pa), np.cos(pa)])
    across = np.array([np.cos(pa), -np.sin(pa)])
    offsets = (major * np.cos(u))[:, None] * along + (minor * np.sin(u))[:, None] * across
    return offsets[:, 0], offsets[:, 1]


def draw_error_ellipse(figure: Figure, major_mas: float, minor_mas: float, pa_deg: float,
                       title: str = "", style: dict | None = None):
    """Draw the ellipse into `figure` (cleared first); returns the axes.

    Non-finite values draw an empty frame saying the errors are unknown.
    """
    look = resolve_style(style)
    figure.clear()
    ax = figure.add_subplot(1, 1, 1)
    apply_axes_style(figure, ax, look)
    ax.set_title(title, fontsize=9)
    if not all(np.isfinite(v) for v in (major_mas, minor_mas, pa_deg)):
        ax.text(0.5, 0.5, "position errors unknown", transform=ax.transAxes, ha="center",
                va="center", color=look["muted"], fontsize=9)
        ax.set_xticks([])
        ax.set_yticks([])
        return ax
    east, north = ellipse_outline(major_mas, minor_mas, pa_deg)
    ax.fill(east, north, color=look["accent"], alpha=0.18, lw=0)
    ax.plot(east, north, color=look["accent"], lw=1.6)
    # The major axis, to show the position angle.
    pa = np.radians(pa_deg)
    ax.plot([-major_mas * np.sin(pa), major_mas * np.sin(pa)],
            [-major_mas * np.cos(pa), major_mas * np.cos(pa)], color=look["accent"], lw=0.8,
            ls=":")
    ax.axhline(0.0, color=look["rings"], lw=0.6, zorder=0)
    ax.axvline(0.0, color=look["rings"], lw=0.6, zorder=0)
    reach = 1.25 * major_mas if major_mas > 0 else 1.0
    ax.set_xlim(reach, -reach)  # east to the left
    ax.set_ylim(-reach, reach)
    ax.set_aspect("equal")
    ax.set_xlabel("← east   offset (mas)", fontsize=8)
    ax.set_ylabel("north ↑   offset (mas)", fontsize=8)
    ax.tick_params(labelsize=7)
    figure.tight_layout()
    return ax
