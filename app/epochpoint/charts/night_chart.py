"""The night chart: observed altitude against time for the night's targets.

Twilight shading (each darker band is a deeper level of darkness), the Moon's altitude, the
altitude limit, one line per target (the top N by priority for long lists) and the scheduled
blocks drawn thick. The same function draws into a file for the command line and into the
desktop app's canvas: it only needs a matplotlib Figure.
"""
from __future__ import annotations

import datetime as dt
import io

import matplotlib.dates as mdates
import numpy as np
from matplotlib.figure import Figure

from .chart_style import apply_axes_style, line_cycle, resolve_style
from .plan_clock import site_zone

# The four darkness spans, lightest (Sun below the horizon) to darkest; colours in the style.
DARKNESS_SPANS = ("sun", "civil", "nautical", "astronomical")
MARGIN_S = 1800.0


def _dates(plan, seconds) -> np.ndarray:
    """matplotlib date numbers for seconds after the plan's reference instant."""
    start = plan.t_ref.to_datetime(timezone=dt.timezone.utc)
    return mdates.date2num([start + dt.timedelta(seconds=float(s)) for s in np.atleast_1d(seconds)])


def seconds_at(plan, date_number: float) -> float:
    """Seconds after the plan's reference instant for a matplotlib date number (chart x)."""
    start = mdates.date2num(plan.t_ref.to_datetime(timezone=dt.timezone.utc))
    return (float(date_number) - start) * 86400.0


def darkness_spans_s(plan) -> list:
    """(level, start_s, end_s) of each darkness span the night reaches, lightest first."""
    out = []
    for level in DARKNESS_SPANS:
        span = plan.night.spans.get(level)
        if span is not None:
            out.append((level, float((span[0] - plan.t_ref).to_value("s")),
                        float((span[1] - plan.t_ref).to_value("s"))))
    return out


def chart_targets(plan, top_n: int) -> np.ndarray:
    """Indices of the targets to draw: observable ones by priority, then by window length."""
    w = plan.windows
    lengths = np.array([sum(e - s for s, e in win) for win in w.windows])
    order = np.lexsort((-lengths, plan.priority))
    return np.array([i for i in order if lengths[i] > 0][:top_n], dtype=int)


def time_span(plan) -> tuple[float, float]:
    """Seconds (from t_ref) the chart covers: sunset to sunrise with half an hour either side."""
    sun = plan.night.spans.get("sun")
    if sun is None:
        return float(plan.sky.t[0]), float(plan.sky.t[-1])
    start = float((sun[0] - plan.t_ref).to_value("s")) - MARGIN_S
    end = float((sun[1] - plan.t_ref).to_value("s")) + MARGIN_S
    return max(start, plan.sky.t[0]), min(end, plan.sky.t[-1])


def draw_night_chart(figure: Figure, plan, top_n: int = 12, selected: int | None = None,
                     style: dict | None = None):
    """Draw the chart for `plan` into `figure` (cleared first); returns the axes and the
    indices of the targets drawn, in legend order.

    style: colours to change (see chart_style.resolve_style); None keeps the default look.
    With a dark style the targets are named at their highest point instead of in a legend.
    """
    look = resolve_style(style)
    figure.clear()
    ax = figure.add_subplot(1, 1, 1)
    if style is not None:
        apply_axes_style(figure, ax, look)
    cycle = line_cycle(look)
    zone = site_zone(plan.site.timezone)
    start, end = time_span(plan)
    t = np.linspace(start, end, 400)
    x = _dates(plan, t)

    # Darkness: deeper levels drawn over lighter ones.
    for level, a, b in darkness_spans_s(plan):
        colour = look["shades"][DARKNESS_SPANS.index(level)]
        ax.axvspan(*_dates(plan, [a, b]), color=colour, zorder=0, lw=0)

    # The altitude limit every window respects.
    limit = plan.constraints.altitude_limit(plan.site)
    ax.axhline(limit, color=look["limit"], lw=1.0, ls="--", zorder=2)
    ax.text(x[0], limit + 1.0, f" limit {limit:g}°", color=look["limit"], fontsize=8,
            va="bottom")

    # The Moon.
    moon_alt = plan.sky.interp("moon_alt", t)
    lit = int(round(100 * plan.moon.get("illumination", 0.0) or 0.0))
    ax.plot(x, moon_alt, color=look["moon"], lw=1.2, ls=(0, (4, 3)), zorder=3,
            label=f"Moon ({lit}% lit)")

    # The targets, with their scheduled blocks drawn thick.
    drawn = chart_targets(plan, top_n)
    if selected is not None and selected not in drawn:
        drawn = np.append(drawn, selected)
    scheduled = {int(i): (s, e) for i, s, e in zip(plan.schedule.index, plan.schedule.start_s,
                                                    plan.schedule.end_s)}
    for k, i in enumerate(drawn):
        colour, dash = cycle[k % len(cycle)]
        alt, _ = plan.windows.observed_altaz(np.full(t.shape, i), t)
        width = 2.4 if i == selected else 1.2
        ax.plot(x, alt, lw=width, color=colour, ls=dash, zorder=4,
                label=str(plan.windows.names[i]))
        if i in scheduled:
            s, e = scheduled[i]
            tb = np.linspace(s, e, 20)
            alt_b, _ = plan.windows.observed_altaz(np.full(tb.shape, i), tb)
            ax.plot(_dates(plan, tb), alt_b, lw=7.0, color=colour, alpha=0.6,
                    solid_capstyle="round", zorder=5)
        if not look["legend"] and np.nanmax(alt) > 0.0:
            peak = int(np.nanargmax(alt))
            near_top = alt[peak] > 84.0
            ha = "left" if peak < 20 or near_top else "right" if peak > len(t) - 20 else "center"
            ax.annotate(str(plan.windows.names[i]), (x[peak], alt[peak]),
                        xytext=(4 if near_top else 0, -4 if near_top else 3),
                        textcoords="offset points", ha=ha, va="top" if near_top else "bottom",
                        color=colour,
                        fontsize=8, fontweight="bold" if i == selected else "normal",
                        zorder=6, annotation_clip=True)

    ax.set_ylim(0.0, 90.0)
    ax.set_xlim(x[0], x[-1])
    ax.set_ylabel("observed altitude (°)")
    ax.xaxis.set_major_formatter(mdates.DateFormatter("%H:%M", tz=zone))
    ax.xaxis.set_major_locator(mdates.HourLocator(tz=zone))
    ax.set_xlabel(f"local time ({getattr(zone, 'key', 'UTC')})")
    ax.grid(True, color=look["grid"], lw=0.6, alpha=0.6)
    title = (f"{plan.site.name or 'Site'}: night of {plan.night.date.isoformat()} "
             f"({plan.constraints.darkness} darkness shaded darkest)")
    ax.set_title(title, fontsize=10, color=look["foreground"])
    if look["legend"]:
        ax.legend(loc="upper right", fontsize=7, ncol=2, framealpha=0.85)
    figure.tight_layout()
    return ax, drawn


def save_night_chart(plan, path: str, top_n: int = 12, size=(11.0, 6.0), dpi: int = 110):
    """Write the chart as a PNG file, atomically."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    from ..io import atomic_write_bytes

    figure = Figure(figsize=size, dpi=dpi)
    FigureCanvasAgg(figure)
    draw_night_chart(figure, plan, top_n=top_n)
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png")
    atomic_write_bytes(path, buffer.getvalue())
