"""`epochpoint export`: corrected coordinates for a telescope controller, with their meaning."""
from __future__ import annotations

import argparse
import sys

from ..core.drift import MAX_TOLERANCE_ARCSEC
from ..core.export import EXPORT_FORMATS, FRAMES, export_positions, export_text, write_export
from . import checks, common


def add_parser(sub) -> None:
    p = sub.add_parser("export", help="coordinates to hand to a telescope controller",
                       description="Write every target the site may point at TIME, in the "
                                   "chosen frame, with the file's metadata: site, time, frame "
                                   "description, corrections applied, the interlocks (checked "
                                   "at TIME, for each target's place, not a slew's path) and "
                                   "how long the coordinates stay accurate to the tolerance "
                                   "(coordinate accuracy only).")
    common.add_targets_argument(p)
    common.add_site_arguments(p)
    common.add_time_argument(p)
    p.add_argument("--frame", required=True, choices=FRAMES,
                   help="apparent: true equator and equinox of date; icrs: propagated ICRS at "
                        "TIME; observed: refracted alt/az and HA/Dec at the site; mount: "
                        "where the mount's axes must go by a pointing model (--model)")
    p.add_argument("--model", metavar="MODEL.json",
                   help="the pointing model (epochpoint pointing fit) for --frame mount")
    p.add_argument("--all", action="store_true",
                   help="also write the refused targets, with a 'refused' column giving why")
    within = checks.number(0.0, MAX_TOLERANCE_ARCSEC, lo_open=True, hi_open=True, unit="arcsec")
    p.add_argument("--valid-within", type=within, default=1.0, metavar="ARCSEC",
                   help="the coordinates count as valid until a target's true place moves this "
                        "far from them (default 1)")
    # The earlier spelling, kept working but no longer shown.
    p.add_argument("--tolerance", type=within, dest="valid_within", default=argparse.SUPPRESS,
                   help=argparse.SUPPRESS)
    common.add_solar_option(p, "exported")
    common.add_output_arguments(p, list(EXPORT_FORMATS))


def run(args) -> int:
    targets = common.load_targets(args)
    site = common.with_solar_option(common.load_site(args), args)
    model = None
    if args.model or args.frame == "mount":
        if args.frame != "mount" or not args.model:
            raise ValueError("--model and --frame mount go together: the mount frame is the "
                             "model-corrected place")
        from .pointing_cmd import load_model

        model = load_model(args.model)
    table = export_positions(targets, site, args.at, args.frame, include_all=args.all,
                             tolerance_arcsec=args.valid_within, model=model,
                             model_source=args.model or "")
    refused = table.meta["targets_refused"]
    if refused and not args.all:
        print(f"epochpoint: {refused} target(s) refused by the site's interlocks were left out "
              "(--all lists them with the reason)", file=sys.stderr)
    if args.output:
        write_export(table, args.output, args.format)
    else:
        sys.stdout.write(export_text(table, args.format))
    return 0
