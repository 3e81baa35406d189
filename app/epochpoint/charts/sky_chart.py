"""The sky dome: the site's whole sky at one instant of a plan, on a polar map.

The zenith is at the centre and the horizon at the edge; the radius is the zenith distance
(90 deg - observed altitude), so altitude rings are concentric circles. North is up and east
is to the LEFT, as the sky appears to someone looking up (a map of the ground, seen from
above, has east on the right). Targets are placed by their observed (refracted) altitude and
azimuth from the plan; the Moon and the Sun by their unrefracted altitude (sunmoon.py), which
differs by at most half a degree near the horizon. The horizon mask is the filled region at
the edge; the Sun-avoidance circle is drawn while the Sun is above -18 deg.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D

from .chart_style import apply_axes_style, mix, resolve_style
from .night_chart import chart_targets
from .plan_clock import clock_text

# How many target names the map writes (highest priority first).
MAX_NAMED = 40

ALTITUDE_RINGS_DEG = (0.0, 30.0, 60.0)
SUN_CIRCLE_BELOW_DEG = -18.0  # astronomical twilight: the avoidance circle matters above this
COMPASS = ((0, "N"), (45, "NE"), (90, "E"), (135, "SE"), (180, "S"), (225, "SW"),
           (270, "W"), (315, "NW"))


@dataclass(frozen=True)
class SkyMarks:
    """Targets drawn on the dome: plan indices, observed altitude and azimuth (deg)."""

    indices: np.ndarray
    alt: np.ndarray
    az: np.ndarray
    observable: np.ndarray


def observable_at(plan, t_seconds: float) -> np.ndarray:
    """True for each target whose windows (every constraint met) contain the instant."""
    return np.array([any(s <= t_seconds <= e for s, e in w) for w in plan.windows.windows],
                    dtype=bool)


def target_altaz(plan, t_seconds: float) -> tuple[np.ndarray, np.ndarray]:
    """Observed altitude and azimuth (deg) of every target of the plan at an instant."""
    n = len(plan.windows.names)
    return plan.windows.observed_altaz(np.arange(n), np.full(n, float(t_seconds)))


def body_paths(plan, samples: int = 241) -> dict:
    """{target index: (observed altitude, azimuth) in deg} of each body row of the plan along
    the chart's night (night_chart.time_span), from the plan's body track (core/body_track.py,
    via the windows' observed_altaz): the moving path a body follows across the dome."""
    from .night_chart import time_span

    track = plan.windows.geometry.track
    if track is None:
        return {}
    t = np.linspace(*time_span(plan), samples)
    out = {}
    for i in track.rows.tolist():
        alt, az = plan.windows.observed_altaz(np.full(t.shape, i), t)
        out[int(i)] = (alt, az)
    return out


def small_circle(alt0_deg: float, az0_deg: float, radius_deg: float, points: int = 181):
    """Altitudes and azimuths (deg) of the circle of angular radius `radius_deg` about a point.

    Destination-point relation of spherical trigonometry (Smart, Textbook on Spherical
    Astronomy, ch. 1): sin h = sin h0 cos r + cos h0 sin r cos b, for bearings b.
    """
    h0, r = np.radians(alt0_deg), np.radians(radius_deg)
    bearing = np.linspace(0.0, 2.0 * np.pi, points)
    sin_h = np.sin(h0) * np.cos(r) + np.cos(h0) * np.sin(r) * np.cos(bearing)
    h = np.arcsin(np.clip(sin_h, -1.0, 1.0))
    d_az = np.arctan2(np.sin(bearing) * np.sin(r) * np.cos(h0), np.cos(r) - np.sin(h0) * sin_h)
    return np.degrees(h), np.mod(az0_deg + np.degrees(d_az), 360.0)


def _zd(alt_deg):
    """Radius on the map: zenith distance (deg)."""
    return 90.0 - np.asarray(alt_deg, dtype=float)


def draw_sky_chart(figure: Figure, plan, t_seconds: float, selected: int | None = None,
                   style: dict | None = None):
    """Draw the sky at `t_seconds` (from plan.t_ref) into `figure` (cleared first).

    Returns the polar axes and the SkyMarks of the targets above the horizon. Map angle is
    azimuth (radians, zero at the top, counter-clockwise, so east is left); radius is
    zenith distance in degrees.
    """
    from ..core.sunmoon import moon_track

    look = resolve_style(style)
    figure.clear()
    ax = figure.add_axes((0.05, 0.08, 0.9, 0.82), projection="polar")
    apply_axes_style(figure, ax, look)
    fg, bg = look["foreground"], look["background"]
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(1)  # azimuth grows counter-clockwise: east on the left
    ax.set_rlim(0.0, 90.0)
    ax.set_rgrids([_zd(a) for a in ALTITUDE_RINGS_DEG[::-1]],
                  labels=[f"{a:g}°" for a in ALTITUDE_RINGS_DEG[::-1]],
                  angle=202.5, color=look["muted"], fontsize=7)
    ax.set_thetagrids([a for a, _ in COMPASS], labels=[c for _, c in COMPASS], fontsize=9,
                      color=fg)
    ax.grid(True, color=look["rings"], lw=0.6)
    ax.spines["polar"].set_color(mix(bg, fg, 0.6))

    site, interlocks = plan.site, plan.site.interlocks
    az_grid = np.arange(0.0, 361.0, 1.0)
    theta = np.radians(az_grid)
    # The horizon mask (or nothing) and the altitude limit of the plan.
    if interlocks.horizon is not None:
        mask_alt = np.clip(interlocks.horizon.min_altitude(az_grid), 0.0, 90.0)
        ax.fill_between(theta, _zd(mask_alt), 90.0, color=look["mask"], alpha=0.55, lw=0,
                        zorder=1)
    limit = plan.constraints.altitude_limit(site)
    ax.plot(theta, np.full(theta.shape, _zd(limit)), color=look["limit"], lw=1.0, ls="--",
            zorder=2)

    # The Sun, its avoidance circle, and the Moon with its illuminated fraction.
    bodies = moon_track(site, plan.sky.time_at(float(t_seconds)))
    sun_alt, sun_az = float(bodies.sun_alt_deg), float(bodies.sun_az_deg)
    handles = []
    if sun_alt > SUN_CIRCLE_BELOW_DEG and interlocks.sun_avoidance > 0.0:
        c_alt, c_az = small_circle(sun_alt, sun_az, interlocks.sun_avoidance)
        ax.plot(np.radians(c_az), _zd(c_alt), color=look["sun"], lw=1.6, zorder=3,
                gid="sun_avoidance")
        if sun_alt > 0.0:
            ax.plot(np.radians(sun_az), _zd(sun_alt), marker="*", ms=14, color=look["sun"],
                    zorder=7, ls="none", gid="sun")
        handles.append(Line2D([], [], color=look["sun"], lw=1.6,
                              label=f"Sun avoidance {interlocks.sun_avoidance:g}°"))
    moon_alt, moon_az = float(bodies.alt_deg), float(bodies.az_deg)
    lit = float(bodies.illumination)
    if moon_alt > 0.0:
        ax.plot(np.radians(moon_az), _zd(moon_alt), marker="o", ms=13,
                mfc=mix(bg, look["moon"], lit), mec=look["moon"], mew=1.5, ls="none", zorder=7,
                gid="moon")
        ax.annotate(f"Moon {lit:.0%}", (np.radians(moon_az), _zd(moon_alt)), xytext=(0, -12),
                    textcoords="offset points", ha="center", va="top", color=look["moon"],
                    fontsize=8, zorder=8)
    handles.append(Line2D([], [], marker="o", ms=9, mfc=mix(bg, look["moon"], lit),
                          mec=look["moon"], ls="none",
                          label=f"Moon {lit:.0%} lit" + ("" if moon_alt > 0 else " (down)")))

    # Solar-system bodies: their paths across the sky through the night (the plan's tracks).
    for i, (path_alt, path_az) in body_paths(plan).items():
        shown = np.where(path_alt > 0.0, _zd(path_alt), np.nan)
        ax.plot(np.radians(path_az), shown, color=look["muted"], lw=1.0, ls=(0, (1, 2)),
                zorder=4, gid=f"body_path_{i}")
    # The targets above the horizon: observable now (every constraint met) or not.
    alt, az = target_altaz(plan, t_seconds)
    ok = observable_at(plan, t_seconds)
    up = np.flatnonzero(alt > 0.0)
    names = plan.windows.names
    # Names for the highest-priority targets only (and the selected one): a long list would
    # bury the map under text and cost seconds to draw.
    named = set(chart_targets(plan, MAX_NAMED).tolist())
    if selected is not None:
        named.add(int(selected))
    for flag, marker, colour, size in ((False, "x", look["unobservable"], 6),
                                       (True, "o", look["observable"], 7)):
        pick = up[ok[up] == flag]
        ax.plot(np.radians(az[pick]), _zd(alt[pick]), ls="none", marker=marker, ms=size,
                color=colour, mew=1.6, zorder=5,
                gid="targets_observable" if flag else "targets_not_observable")
        for i in (i for i in pick if i in named):
            ax.annotate(str(names[i]), (np.radians(az[i]), _zd(alt[i])),
                        xytext=(9, 4) if i == selected else (5, 3),
                        textcoords="offset points", fontsize=7, zorder=6,
                        color=fg if flag else look["muted"],
                        fontweight="bold" if i == selected else "normal")
    handles[:0] = [Line2D([], [], marker="o", ms=7, color=look["observable"], ls="none",
                          label="observable now"),
                   Line2D([], [], marker="x", ms=6, mew=1.6, color=look["unobservable"],
                          ls="none", label="not observable now")]
    if selected is not None and selected in up:
        ax.plot(np.radians(az[selected]), _zd(alt[selected]), ls="none", marker="o", ms=17,
                mfc="none", mec=look["accent"], mew=2.0, zorder=8, gid="selected")

    figure.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.005, 0.995),
                  fontsize=7.5, frameon=False, labelcolor=fg, handletextpad=0.3)
    figure.text(0.5, 0.995, f"{site.name or 'Site'}: sky at {clock_text(plan, t_seconds)}",
                ha="center", va="top", fontsize=10, color=fg)
    figure.text(0.5, 0.015, "As seen looking up: north at top, east at LEFT. "
                f"Rings: altitude {', '.join(f'{a:g}°' for a in ALTITUDE_RINGS_DEG)}; "
                f"dashed: altitude limit {limit:g}°; filled edge: horizon mask.",
                ha="center", va="bottom", fontsize=8, color=fg)
    return ax, SkyMarks(indices=up, alt=alt[up], az=az[up], observable=ok[up])
