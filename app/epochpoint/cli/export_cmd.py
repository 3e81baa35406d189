"""`epochpoint export`: corrected coordinates for a telescope controller, with their meaning."""
from __future__ import annotations

import sys

from ..core.export import EXPORT_FORMATS, FRAMES, export_positions, export_text, write_export
from . import common


def add_parser(sub) -> None:
    p = sub.add_parser("export", help="coordinates to hand to a telescope controller",
                       description="Write every target the site may point at TIME, in the "
                                   "chosen frame, with the file's metadata: site, time, frame "
                                   "and equinox, corrections applied, and how long the "
                                   "coordinates stay within the tolerance.")
    common.add_targets_argument(p)
    common.add_site_arguments(p)
    common.add_time_argument(p)
    p.add_argument("--frame", required=True, choices=FRAMES,
                   help="apparent: true equator and equinox of date; icrs: propagated ICRS at "
                        "TIME; observed: refracted alt/az and HA/Dec at the site")
    p.add_argument("--all", action="store_true",
                   help="also write the refused targets, with a 'refused' column giving why")
    p.add_argument("--tolerance", type=float, default=1.0, metavar="ARCSEC",
                   help="drift allowed before the coordinates expire (default 1)")
    common.add_output_arguments(p, list(EXPORT_FORMATS))


def run(args) -> int:
    targets = common.load_targets(args)
    site = common.load_site(args)
    table = export_positions(targets, site, args.at, args.frame, include_all=args.all,
                             tolerance_arcsec=args.tolerance)
    refused = table.meta["targets_refused"]
    if refused and not args.all:
        print(f"epochpoint: {refused} target(s) refused by the site's interlocks were left out "
              "(--all lists them with the reason)", file=sys.stderr)
    if args.output:
        write_export(table, args.output, args.format)
    else:
        sys.stdout.write(export_text(table, args.format))
    return 0
