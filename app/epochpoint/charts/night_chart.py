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

from .chart_style import apply_axes_style, legend_style, line_cycle, resolve_style
from .plan_clock import site_zone

# The four darkness spans, lightest (Sun below the horizon) to darkest; colours in the style.
DARKNESS_SPANS = ("sun", "civil", "nautical", "astronomical")
MARGIN_S = 1800.0
LEGEND_FONT_PT = 7.0
END_LABEL_FONT_PT = 7.5


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


def body_word(plan, i: int) -> str:
    """' (Moon)', ' (planet)', ' (minor body)' for a body row of the plan (its line follows
    the body's track, core/body_track.py), '' for a star."""
    track = plan.windows.geometry.track
    if track is None or track.slot[i] < 0:
        return ""
    name = track.names[track.slot[i]]
    word = {"moon": "Moon", "sun": "Sun", "pluto": "dwarf planet", "": "minor body"}
    return f" ({word.get(name, 'planet')})"


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
    Every line has a style of its own (chart_style.line_cycle); the legend sits beside the
    plot and lines are also named at their ends, in the twilight, never over the darkness.
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
    ax.axhline(limit, color=look["limit"], lw=1.0, ls="--", zorder=2,
               label=f"altitude limit {limit:g}°")

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
    ends = []  # (name, colour, altitude at the chart's start and end, selected)
    for k, i in enumerate(drawn):
        colour, dash = cycle[k % len(cycle)]
        alt, _ = plan.windows.observed_altaz(np.full(t.shape, i), t)
        width = 2.4 if i == selected else 1.2
        ax.plot(x, alt, lw=width, color=colour, ls=dash, zorder=4,
                label=str(plan.windows.names[i]) + body_word(plan, i), gid=f"target_{i}")
        if i in scheduled:
            s, e = scheduled[i]
            tb = np.linspace(s, e, 20)
            alt_b, _ = plan.windows.observed_altaz(np.full(tb.shape, i), tb)
            ax.plot(_dates(plan, tb), alt_b, lw=7.0, color=colour, alpha=0.6,
                    solid_capstyle="round", zorder=5)
        ends.append((str(plan.windows.names[i]), colour, alt[0], alt[-1], i == selected))

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
    # The legend beside the plot, never over the night; columns enough to fit its height.
    entries = len(drawn) + 2
    rows = max(4, int(figure.get_figheight() * 72.0 * 0.8 / (LEGEND_FONT_PT * 1.7)))
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0,
              fontsize=LEGEND_FONT_PT, ncol=-(-entries // rows), **legend_style(look))
    figure.tight_layout()
    _label_line_ends(ax, ends, x, dark_edges(plan))
    return ax, drawn


def dark_edges(plan) -> tuple[float, float] | None:
    """Chart x (date numbers) where the night's darkness (the level the plan asks for, else
    the deepest reached) begins and ends; None when the Sun never sets."""
    spans = {level: (a, b) for level, a, b in darkness_spans_s(plan)}
    if not spans:
        return None
    level = plan.constraints.darkness if plan.constraints.darkness in spans else \
        [lv for lv in DARKNESS_SPANS if lv in spans][-1]
    return tuple(_dates(plan, spans[level]))


def _label_line_ends(ax, ends, x, edges) -> None:
    """Name each line at its ends, in the twilight on either side of the darkness: at the
    chart's left edge for lines already up, at the right edge for lines still up. Labels are
    spread so they never overlap; one that would reach into the darkness is left out (the
    legend names every line)."""
    figure = ax.figure
    get = getattr(figure.canvas, "get_renderer", None)
    renderer = get() if get is not None else figure._get_renderer()
    height_px = ax.get_window_extent(renderer).height
    left, right = ((ax.transData.transform((e, 0.0))[0] for e in edges) if edges
                   else (np.inf, -np.inf))
    step_deg = 90.0 * (END_LABEL_FONT_PT * figure.dpi / 72.0 * 1.15) / max(height_px, 1.0)
    for side, column, x_at, ha in (("start", 2, x[0], "left"), ("end", 3, x[-1], "right")):
        up = [e for e in ends if 0.0 < e[column] <= 90.0]
        up.sort(key=lambda e: e[column])
        for (name, colour, *_, chosen), y in zip(up, _spread([e[column] for e in up], step_deg)):
            if y < 0.0:
                continue  # more names than the edge has room for
            label = ax.text(x_at, y, f" {name} ", color=colour, ha=ha, va="center",
                            fontsize=END_LABEL_FONT_PT, zorder=6,
                            fontweight="bold" if chosen else "normal")
            box = label.get_window_extent(renderer)
            if box.x1 > left and box.x0 < right:
                label.remove()


def _spread(values, step: float) -> list:
    """Sorted values moved apart to at least `step` from each other, kept inside 0..90."""
    out = []
    for v in values:
        out.append(max(v, out[-1] + step) if out else max(v, step / 2.0))
    top = 90.0 - step / 2.0
    for k in range(len(out) - 1, -1, -1):  # push back down from the top
        out[k] = min(out[k], top if k == len(out) - 1 else out[k + 1] - step)
    return out


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
