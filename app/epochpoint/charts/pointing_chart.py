"""A pointing model's samples and residuals: four views in one figure.

    on the mount's axes   each sample's residual as an arrow, before the model (faint) and
                          after it (accent); rejected samples crossed out
    sky coverage          where the samples lie on the site's sky (polar map, zenith at the
                          centre, east on the left as in the sky dome)
    against hour angle    both residual components, before (hollow) and after (filled)
    against declination   the same

Residual components are "mount reading minus sky", in arcsec on the sky (the first axis times
the cosine of the second), as core.pointing_model.fit returns them. A pattern left in the
after-residuals against hour angle or declination points at a term the model lacks. Samples
with a pier side (a German mount's) are framed by it in every view: a square round each
east-side mark, a diamond round each west-side one (in the residual plots, round the
after-marks), so a pattern that differs between the sides shows. Used by the app's pointing
tab; the same function can draw a PNG from the command line.
"""
from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from .chart_style import apply_axes_style, mix, resolve_style

# Axis names of the residual components and the plot's axes, per mount type.
AXIS_NAMES = {"equatorial": ("hour angle", "declination"),
              "german": ("hour angle", "declination"), "altaz": ("azimuth", "altitude")}
# The frame round a sample's mark on each pier side (our own choice: shape, not colour, so
# the theme's few colours keep their meaning).
SIDE_FRAMES = {"east": "s", "west": "D"}
# The longest before-arrow spans this many degrees of the axes plot.
ARROW_SPAN_DEG = 15.0


def _arrow_scale(before_first, before_second) -> float:
    """Degrees of plot per arcsec of residual."""
    longest = float(np.nanmax(np.hypot(before_first, before_second), initial=0.0))
    return ARROW_SPAN_DEG / longest if longest > 0 else 1.0


def _residual_arrows(ax, first_deg, second_deg, before, after, kept, names, look) -> None:
    """Arrows from each sample's place on the axes: before faint, after in the accent."""
    scale = _arrow_scale(*before)
    for (r1, r2), colour, gid, width in ((before, mix(look["background"], look["foreground"],
                                                      0.4), "arrows_before", 0.004),
                                         (after, look["accent"], "arrows_after", 0.006)):
        arrows = ax.quiver(first_deg[kept], second_deg[kept], r1[kept] * scale,
                           r2[kept] * scale, angles="xy", scale_units="xy", scale=1.0,
                           color=colour, width=width)
        arrows.set_gid(gid)
    gone = ax.scatter(first_deg[~kept], second_deg[~kept], marker="x", s=40,
                      color=look["foreground"], label="rejected")
    gone.set_gid("rejected_on_axes")
    key_arcsec = float(np.round(ARROW_SPAN_DEG / scale / 2.0, 1)) if scale != 1.0 else 1.0
    ax.text(0.02, 0.02, f"arrow of {ARROW_SPAN_DEG / 2:g}° = {key_arcsec:g}″", fontsize=7,
            transform=ax.transAxes, color=look["muted"])
    ax.set_xlabel(f"{names[0]} (°)", fontsize=8)
    ax.set_ylabel(f"{names[1]} (°)", fontsize=8)
    ax.set_title("Residuals on the axes: before (faint), after", fontsize=9)


def _side_frames(ax, x, y, sides, look, gid: str, label: bool = False,
                 size: float = 70.0) -> None:
    """A hollow frame round each sample's mark by its pier side (SIDE_FRAMES); gid
    formatted with the side ("east"/"west"); nothing without sides."""
    if sides is None:
        return
    edge = mix(look["background"], look["foreground"], 0.75)
    for side, marker in SIDE_FRAMES.items():
        on = sides == side
        frames = ax.scatter(x[on], y[on], s=size, marker=marker, facecolors="none",
                            edgecolors=edge, linewidths=0.8,
                            label=f"{side} pier side" if label else None)
        frames.set_gid(gid.format(side))


def _coverage(ax, alt_deg, az_deg, kept, look) -> None:
    """The samples on the site's sky: zenith at the centre, horizon at the rim."""
    ax.set_facecolor(look["background"])
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(1)  # azimuth counter-clockwise: east on the left
    ax.set_rlim(0.0, 90.0)
    ax.set_rticks([30.0, 60.0])
    ax.set_yticklabels([])
    ax.set_thetagrids([0, 90, 180, 270], labels=["N", "E", "S", "W"], fontsize=8,
                      color=look["foreground"])
    ax.grid(color=look["rings"], lw=0.6)
    ax.spines["polar"].set_color(mix(look["background"], look["foreground"], 0.6))
    theta, zd = np.radians(az_deg), 90.0 - np.asarray(alt_deg)
    used = ax.scatter(theta[kept], zd[kept], s=22, color=look["accent"], label="kept")
    used.set_gid("coverage_kept")
    gone = ax.scatter(theta[~kept], zd[~kept], s=40, marker="x", color=look["foreground"],
                      label="rejected")
    gone.set_gid("coverage_rejected")
    ax.set_title("Sky coverage", fontsize=9, color=look["foreground"])


def _against(ax, x_deg, before, after, kept, axis_names, x_name, look) -> None:
    """Both residual components against one coordinate, before (hollow) and after (filled)."""
    faint = mix(look["background"], look["foreground"], 0.45)
    for k, (marker, axis) in enumerate(zip(("o", "^"), axis_names)):
        hollow = ax.scatter(x_deg, before[k], s=18, marker=marker, facecolors="none",
                            edgecolors=faint, label=f"{axis}, before")
        hollow.set_gid(f"before_{k}")
        filled = ax.scatter(x_deg[kept], after[k][kept], s=18, marker=marker,
                            color=look["accent"], label=f"{axis}, after")
        filled.set_gid(f"after_{k}")
    ax.axhline(0.0, color=look["rings"], lw=0.8, zorder=0)
    ax.set_xlabel(f"{x_name} (°)", fontsize=8)
    ax.set_ylabel("mount − sky (″)", fontsize=8)


def draw_pointing_charts(figure: Figure, mount_type: str, first_deg, second_deg, ha_deg,
                         dec_deg, alt_deg, az_deg, before_arcsec, after_arcsec, kept,
                         style: dict | None = None, pier_side=None) -> dict:
    """Draw the four views (module docstring) into `figure`, cleared first.

    first_deg, second_deg: the samples' sky places on the mount's own axes ((ha, dec) or
    (az, alt)); ha/dec and alt/az: the same places in both systems; before/after: the
    residual components (arcsec) per sample; kept: bool per sample; pier_side: "east"/"west"
    per sample ("" or anything else unframed), or None. Returns the axes by name.
    """
    look = resolve_style(style)
    figure.clear()
    figure.set_facecolor(look["background"])
    names = AXIS_NAMES[mount_type]
    first, second, ha, dec, alt, az = (np.asarray(v, dtype=float) for v in
                                       (first_deg, second_deg, ha_deg, dec_deg, alt_deg, az_deg))
    before = tuple(np.asarray(v, dtype=float) for v in before_arcsec)
    after = tuple(np.asarray(v, dtype=float) for v in after_arcsec)
    kept = np.asarray(kept, dtype=bool)
    sides = None if pier_side is None else np.asarray(
        [str(v).strip().lower() for v in np.ravel(pier_side)], dtype=object)
    axes = {"on_axes": figure.add_subplot(2, 2, 1),
            "coverage": figure.add_subplot(2, 2, 2, projection="polar"),
            "against_ha": figure.add_subplot(2, 2, 3),
            "against_dec": figure.add_subplot(2, 2, 4)}
    for name, ax in axes.items():
        if name != "coverage":
            apply_axes_style(figure, ax, look)
        ax.tick_params(labelsize=7)
    _residual_arrows(axes["on_axes"], first, second, before, after, kept, names, look)
    _coverage(axes["coverage"], alt, az, kept, look)
    _against(axes["against_ha"], ha, before, after, kept, names, "hour angle", look)
    _against(axes["against_dec"], dec, before, after, kept, names, "declination", look)
    # The pier sides: round the marks of every sample, and round the after-residuals.
    _side_frames(axes["on_axes"], first, second, sides, look, "on_axes_side_{}")
    _side_frames(axes["coverage"], np.radians(az), 90.0 - alt, sides, look,
                 "coverage_side_{}")
    for name, x in (("against_ha", ha), ("against_dec", dec)):
        for k in (0, 1):
            _side_frames(axes[name], x[kept], after[k][kept],
                         None if sides is None else sides[kept], look,
                         f"{name}_side_{{}}_{k}", label=name == "against_dec" and k == 0,
                         size=45.0)
    axes["against_ha"].set_title("Against hour angle", fontsize=9)
    axes["against_dec"].set_title("Against declination", fontsize=9)
    legend = axes["against_dec"].legend(fontsize=6, loc="best", facecolor=look["background"],
                                        edgecolor=look["rings"], labelcolor=look["foreground"])
    legend.set_gid("legend")
    figure.tight_layout()
    return axes
