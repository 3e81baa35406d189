"""The horizon profile of a site: the mask's lowest altitude against azimuth.

Drawn as the blocked region below the mask (straight lines between the points, wrapping
through north, as core.limits.HorizonMask interpolates) with the mount's minimum altitude.
"""
from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from .chart_style import apply_axes_style, resolve_style


def draw_horizon_profile(figure: Figure, mask, min_altitude_deg: float | None = None,
                         style: dict | None = None):
    """Draw the mask (a HorizonMask or None) into `figure` (cleared first); returns the axes."""
    look = resolve_style(style)
    figure.clear()
    ax = figure.add_subplot(1, 1, 1)
    apply_axes_style(figure, ax, look)
    az = np.arange(0.0, 360.5, 0.5)
    top = 30.0
    if mask is not None:
        alt = mask.min_altitude(az)
        ax.fill_between(az, -5.0, alt, color=look["mask"], alpha=0.7, lw=0)
        ax.plot(mask.azimuth, mask.altitude, ls="none", marker="o", ms=4,
                color=look["foreground"])
        top = max(top, float(np.max(alt)) + 5.0)
    else:
        ax.text(180.0, 0.5 * top, "no horizon mask", ha="center", va="center",
                color=look["muted"], fontsize=9)
    if min_altitude_deg is not None:
        ax.axhline(min_altitude_deg, color=look["limit"], lw=1.0, ls="--")
        ax.text(2.0, min_altitude_deg + 0.5, f"mount minimum {min_altitude_deg:g}°",
                color=look["limit"], fontsize=7, va="bottom")
        top = max(top, min_altitude_deg + 5.0)
    ax.set_xlim(0.0, 360.0)
    ax.set_ylim(-5.0, min(90.0, top))
    ax.set_xticks(range(0, 361, 45), ["N", "NE", "E", "SE", "S", "SW", "W", "NW", "N"])
    ax.set_ylabel("altitude (°)", fontsize=8)
    ax.tick_params(labelsize=7)
    ax.grid(True, color=look["rings"], lw=0.5)
    figure.tight_layout()
    return ax
