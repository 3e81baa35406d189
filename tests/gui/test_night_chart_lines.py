"""The night chart with many targets: a style of its own for each line, and no legend or name
label over the night.

40 invented targets (seeded) at the invented Loma Candil site on the demo night. Checked, in
the light look (the command line's PNG) and in the night theme's look: the 40 target lines
carry 40 different (colour, dash pattern) pairs; no legend or label box reaches into the plot
area between the darkness edges (the plan's darkness level); the palette is our own, not
matplotlib's default colour cycle nor its tab10/tab20 maps (matplotlib's documented colour
cycles).
"""
from __future__ import annotations

import datetime as dt
import warnings

import matplotlib
import matplotlib.dates as mdates
import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.colors import to_hex
from matplotlib.figure import Figure

import epochpoint as ep
from epochpoint.charts.chart_style import LINE_COLOURS
from epochpoint.charts.night_chart import draw_night_chart
from epochpoint.core.plan import plan
from epochpoint.gui import themes
from panels_demo import DEMO_NIGHT, demo_inputs

SEED = 14
LINES = 40


@pytest.fixture(scope="module")
def crowded_plan():
    _, site = demo_inputs()
    rng = np.random.default_rng(SEED)
    n = 60  # more than drawn: the chart draws the observable ones
    targets = ep.Targets.from_columns(
        ra=rng.uniform(0.0, 240.0, n), dec=rng.uniform(-75.0, 5.0, n), epoch=2016.0,
        name=[f"Invented {k:02d}" for k in range(n)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the demo night is beyond the shipped IERS table
        return plan(targets, site, DEMO_NIGHT)


@pytest.fixture(params=["light", "night"])
def drawn_chart(request, crowded_plan):
    style = None if request.param == "light" else themes.chart_style("night")
    figure = Figure(figsize=(11.0, 6.0), dpi=110)
    FigureCanvasAgg(figure)
    ax, drawn = draw_night_chart(figure, crowded_plan, top_n=LINES, style=style)
    figure.canvas.draw()
    return figure, ax, drawn


def test_every_line_has_a_style_of_its_own(drawn_chart, crowded_plan):
    _, ax, drawn = drawn_chart
    assert len(drawn) == LINES
    names = {str(crowded_plan.windows.names[i]) for i in drawn}
    lines = [line for line in ax.lines if line.get_label() in names]
    assert len(lines) == LINES
    styles = {(to_hex(line.get_color()), line.get_linestyle(),
               tuple(line._unscaled_dash_pattern[1] or ())) for line in lines}
    assert len(styles) == LINES


def test_no_legend_or_label_over_the_darkness(drawn_chart, crowded_plan):
    figure, ax, _ = drawn_chart
    renderer = figure.canvas.get_renderer()
    dark = crowded_plan.night.spans[crowded_plan.constraints.darkness]
    edges = [float((t - crowded_plan.t_ref).to_value("s")) for t in dark]
    start = crowded_plan.t_ref.to_datetime(timezone=dt.timezone.utc)
    x_edges = [mdates.date2num(start + dt.timedelta(seconds=s)) for s in edges]
    left, right = (ax.transData.transform((x, 0.0))[0] for x in x_edges)
    plot = ax.get_window_extent(renderer)
    boxes = [("legend", ax.get_legend().get_window_extent(renderer))]
    boxes += [(text.get_text(), text.get_window_extent(renderer)) for text in ax.texts]
    assert len(boxes) > 10  # lines are named at their ends, not only in the legend
    for what, box in boxes:
        over = (box.x1 > left and box.x0 < right and box.y1 > plot.y0 and box.y0 < plot.y1)
        assert not over, f"{what!r} covers the darkness ({box} vs x {left:.0f}..{right:.0f})"


def test_palette_is_our_own():
    default_cycle = {to_hex(c) for c in
                     matplotlib.rcParamsDefault["axes.prop_cycle"].by_key()["color"]}
    maps = {to_hex(matplotlib.colormaps[m](k)) for m, n in (("tab10", 10), ("tab20", 20))
            for k in range(n)}
    ours = {to_hex(c) for c in LINE_COLOURS}
    assert len(ours) == len(LINE_COLOURS) >= 12
    assert not ours & (default_cycle | maps)
