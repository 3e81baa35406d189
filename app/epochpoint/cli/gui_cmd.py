"""`epochpoint gui`: open the desktop app, optionally on a plan file or a target list."""
from __future__ import annotations


def add_parser(sub) -> None:
    p = sub.add_parser("gui", help="open the desktop app",
                       description="Open the desktop app on a plan file (.json) or a target "
                                   "list (CSV, ECSV, VOTable). With --screenshot it renders "
                                   "the window to a PNG once everything is computed and exits "
                                   "(works without a screen: QT_QPA_PLATFORM=offscreen).")
    p.add_argument("file", nargs="?", metavar="PLAN_OR_TARGETS",
                   help="plan file (.json) or target list to open")
    p.add_argument("--site", metavar="SITE",
                   help="site file (TOML) or LAT,LON,HEIGHT; for a target list (default: a "
                        "placeholder at 0,0 until you set the site) or to replace a plan's")
    p.add_argument("--night", metavar="YYYY-MM-DD",
                   help="local date of the evening the night starts (default: the plan's, "
                        "or today)")
    p.add_argument("--screenshot", metavar="FILE.png",
                   help="render the window to FILE.png after computing, then exit")


def run(args) -> int:
    from ..gui.app import run_gui

    return run_gui(args.file, screenshot=args.screenshot, site_spec=args.site,
                   night=args.night)
