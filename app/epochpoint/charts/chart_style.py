"""Chart colours: the default light look, and a full palette for any theme's few colours.

A style is a plain dict. Callers pass only what they want to change (a desktop theme passes
background, foreground and accent); `resolve_style` fills in the rest. On a dark background
everything is derived from the foreground colour alone, so a red-on-black night theme gives
red-on-black charts that keep dark-adapted eyes dark: twilight bands are faint tints of the
foreground, lines differ by brightness and dash pattern instead of hue. Either way there are
60 distinct (colour, dash) styles for target lines, so a long list never repeats one.
"""
from __future__ import annotations

from matplotlib.colors import to_hex, to_rgb

# Epochpoint's own line colours for a light background: twelve hues around the colour circle,
# dark enough to read on white, neighbours in the list far apart so the first few differ most.
LINE_COLOURS = ("#1b4f8a", "#c0541a", "#2e7d32", "#8e2a6b", "#8a6d00", "#0f7c83",
                "#b3213b", "#5a3fa0", "#4f6b12", "#a85a8a", "#3d5a6c", "#7a3a12")
# Dash patterns (matplotlib (offset, on-off) in points), used in this order once the colours
# run out: line N gets colour N mod (number of colours) and dash N // (number of colours).
LINE_DASHES = ("-", (0, (6, 2)), (0, (1.5, 1.5)), (0, (6, 2, 1.5, 2)), (0, (10, 3)),
               (0, (3, 3)), (0, (6, 2, 1.5, 2, 1.5, 2)), (0, (1.5, 4)), (0, (12, 2, 3, 2)),
               (0, (4, 1.5, 1, 1.5)), (0, (8, 4)), (0, (2, 1, 2, 4)))
# Brightness steps of the foreground for target lines on a dark chart (hue would undo a red
# night theme), brightest first.
DARK_LINE_TINTS = (1.0, 0.8, 0.62, 0.46, 0.34)

# The look of the command line's PNG charts (and the app's light theme).
LIGHT = {
    "background": "#ffffff",
    "foreground": "#000000",
    "grid": "#ffffff",
    "rings": "#c8d0da",  # grid lines drawn on the plain background (sky map, plots)
    "accent": "#1f5fa8",
    # Sun below the horizon, civil, nautical, astronomical darkness (lightest to darkest).
    "shades": ("#e9eef4", "#d6dfe9", "#c2cfdd", "#aebfd1"),
    "limit": "#8a3b12",
    "moon": "#6b6b6b",
    "sun": "#c77700",
    "mask": "#8c7b64",
    "observable": "#1d7a3a",
    "unobservable": "#8f8f8f",
    # Timed events by observability (event_search): whole, in part, not at all.
    "event_full": "#1d7a3a",
    "event_partial": "#b0760a",
    "event_none": "#8f8f8f",
    "muted": "#6b6b6b",
    "lines": LINE_COLOURS,
    "dashes": LINE_DASHES[:5],
}

DARK_BACKGROUND_LUMINANCE = 0.3


def _luminance(colour) -> float:
    r, g, b = to_rgb(colour)
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def is_dark(style: dict) -> bool:
    """True when a (resolved) style draws on a dark background."""
    return _luminance(style["background"]) < DARK_BACKGROUND_LUMINANCE


def mix(colour_a, colour_b, fraction: float) -> str:
    """colour_a moved `fraction` (0..1) of the way towards colour_b, as a hex string."""
    a, b = to_rgb(colour_a), to_rgb(colour_b)
    return to_hex(tuple(x + fraction * (y - x) for x, y in zip(a, b)))


def _dark_palette(background, foreground, accent) -> dict:
    """Every chart colour as a blend of the theme's background and foreground."""
    tint = lambda f: mix(background, foreground, f)  # noqa: E731
    return {
        "grid": tint(0.22),
        "rings": tint(0.3),
        # On a dark chart the darkest level of darkness is the background itself.
        "shades": (tint(0.20), tint(0.13), tint(0.07), tint(0.0)),
        "limit": accent,
        "moon": tint(0.55),
        "sun": foreground,
        "mask": tint(0.30),
        "observable": foreground,
        "unobservable": tint(0.45),
        "event_full": foreground,
        "event_partial": tint(0.62),
        "event_none": tint(0.34),
        "muted": tint(0.55),
        "lines": tuple(tint(f) for f in DARK_LINE_TINTS),
        "dashes": LINE_DASHES,
    }


def resolve_style(style: dict | None = None) -> dict:
    """A complete style: LIGHT, or colours derived from a dark theme, with `style` on top."""
    if not style:
        return dict(LIGHT)
    background = style.get("background", LIGHT["background"])
    foreground = style.get("foreground", LIGHT["foreground"])
    accent = style.get("accent", foreground)
    out = dict(LIGHT, background=background, foreground=foreground, accent=accent)
    if _luminance(background) < DARK_BACKGROUND_LUMINANCE:
        out.update(_dark_palette(background, foreground, accent))
    out.update({k: v for k, v in style.items() if v is not None})
    return out


def line_cycle(style: dict):
    """(colour, dash) pairs for target lines: every dash with every colour, solid lines in
    every colour first."""
    return [(colour, dash) for dash in style["dashes"] for colour in style["lines"]]


def legend_style(style: dict) -> dict:
    """Legend keyword arguments in the style's colours."""
    return {"facecolor": style["background"], "edgecolor": style["rings"],
            "labelcolor": style["foreground"], "framealpha": 1.0}


def apply_axes_style(figure, ax, style: dict) -> None:
    """Background, text, ticks and frame of one axes in the style's colours."""
    figure.set_facecolor(style["background"])
    ax.set_facecolor(style["background"])
    fg = style["foreground"]
    for spine in ax.spines.values():
        spine.set_color(mix(style["background"], fg, 0.6))
    ax.tick_params(colors=fg, which="both")
    ax.xaxis.label.set_color(fg)
    ax.yaxis.label.set_color(fg)
    ax.title.set_color(fg)
