"""`epochpoint events`: the periodic events (transits, eclipses) observable over coming nights."""
from __future__ import annotations

import json
import sys

from . import checks, common

FORMATS = ["table", "json", "csv"]
DARKNESS = ("civil", "nautical", "astronomical")
MAX_NIGHTS = 3660


def add_parser(sub) -> None:
    p = sub.add_parser("events", help="timed transits and eclipses observable over coming nights",
                       description="List every cycle of the targets' event ephemerides "
                                   "(event_epoch, event_period, event_duration columns) whose "
                                   "event, with its baseline, touches the darkness of the nights "
                                   "from DATE on; mid times are UTC at the site from BJD_TDB.")
    common.add_targets_argument(p)
    common.add_site_arguments(p)
    p.add_argument("--from", dest="start", required=True, metavar="YYYY-MM-DD",
                   help="local date of the evening of the first night")
    p.add_argument("--nights", type=checks.count(1, MAX_NIGHTS), default=1, metavar="N",
                   help="how many nights (default 1)")
    p.add_argument("--min-altitude", type=checks.number(0.0, 90.0, unit="deg"), metavar="DEG",
                   help="lowest observed altitude (default: the mount's minimum altitude)")
    p.add_argument("--darkness", choices=DARKNESS, default="astronomical",
                   help="how dark the sky must be (default astronomical: Sun below -18 deg)")
    p.add_argument("--all", dest="include_all", action="store_true",
                   help="also list events that cannot be observed at all")
    common.add_output_arguments(p, FORMATS)


def run(args) -> int:
    from ..core.event_search import find_events
    from ..io.eventfields import event_ephemerides

    targets = common.load_targets(args)
    site = common.load_site(args)
    found = find_events(targets, event_ephemerides(targets, args.targets), site, args.start,
                        args.nights, darkness=args.darkness, min_altitude=args.min_altitude,
                        include_all=args.include_all)
    if args.format == "json":
        _write(args, json.dumps(found.to_json()) + "\n")
    elif args.format == "csv":
        from ..io import write_result
        text = write_result(dict(found), found.meta, args.output, "csv", units=found.units)
        if args.output is None and text is not None:
            sys.stdout.write(text if text.endswith("\n") else text + "\n")
    else:
        _write(args, _people(found, site))
    return 0


def _write(args, text: str) -> None:
    if args.output:
        from ..io import atomic_write_text
        atomic_write_text(args.output, text)
    else:
        sys.stdout.write(text)


def _people(found, site) -> str:
    from .people import PeopleColumn, people_table

    columns = [PeopleColumn("Name", "name", str), PeopleColumn("Kind", "kind", str),
               PeopleColumn("Cycle", "cycle", "{:d}"), PeopleColumn("Night", "night", str),
               PeopleColumn("Start UTC", "start", "date"), PeopleColumn("Mid UTC", "mid", "date"),
               PeopleColumn("End UTC", "end", "date"),
               PeopleColumn("Mid +- min", "mid_error_s", _minutes),
               PeopleColumn("Alt start", "alt_start", "{:5.1f}"),
               PeopleColumn("Alt mid", "alt_mid", "{:5.1f}"),
               PeopleColumn("Alt end", "alt_end", "{:5.1f}"),
               PeopleColumn("Moon deg", "moon_distance", "{:5.1f}"),
               PeopleColumn("Moon lit", "moon_illumination", "{:4.2f}"),
               PeopleColumn("Observable", "observable", str),
               PeopleColumn("Lost", "lost", str)]
    meta = found.meta
    header = [f"Events at {meta['site']} ({meta['latitude']:.4f}, {meta['longitude']:.4f}), "
              f"{len(meta['nights'])} night(s) from {meta['nights'][0]['date']}; "
              f"{meta['darkness']} darkness, altitude above {meta['min_altitude']:g} deg",
              "Mid times: UTC at the site, from BJD_TDB (light time across the Earth's orbit, "
              "up to 8.3 min; TDB-TT; Shapiro)", common.zone_line(site)]
    header += [f"{c['name']}: event_epoch read as {c['assumed']}"
               for c in meta["epoch_conversions"]]
    if found.nrows == 0:
        return "\n".join(header) + "\n\nNo events in these nights.\n"
    return people_table(found, columns, header) + "\n"


def _minutes(values):
    return ["unknown" if v != v else f"{v / 60.0:.1f}" for v in values]
