"""Options and steps shared by the commands: reading targets and sites, writing results."""
from __future__ import annotations

import datetime as dt
import sys
import warnings
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from ..core.site import Site


def add_targets_argument(parser) -> None:
    parser.add_argument("targets", metavar="TARGETS",
                        help="target list: CSV, ECSV or VOTable")
    parser.add_argument("--skip-bad-rows", action="store_true",
                        help="report each unreadable row on stderr and go on without it")


def add_time_argument(parser) -> None:
    parser.add_argument("--at", required=True, metavar="TIME",
                        help="ISO 8601 UTC instant (e.g. 2027-01-20T23:10:00Z) or 'now'")


def add_site_arguments(parser) -> None:
    parser.add_argument("--site", required=True, metavar="SITE",
                        help="site file (TOML) or LAT,LON,HEIGHT in degrees (east-positive) and "
                             "metres; write --site=-24.6,-70.4,2635 for southern sites")
    parser.add_argument("--pressure", type=float, metavar="HPA",
                        help="air pressure in hPa (default: the site's; 0 turns refraction off)")
    parser.add_argument("--temperature", type=float, metavar="C", help="air temperature, deg C")
    parser.add_argument("--humidity", type=float, metavar="FRAC",
                        help="relative humidity, 0..1")
    parser.add_argument("--wavelength", type=float, metavar="UM",
                        help="effective wavelength in micrometres")


def add_output_arguments(parser, formats) -> None:
    parser.add_argument("--format", choices=formats, default=formats[0],
                        help=f"output format (default {formats[0]})")
    parser.add_argument("--output", metavar="FILE",
                        help="write to FILE (atomically) instead of standard output")


def load_targets(args):
    """Read the target file; with --skip-bad-rows each skipped row is one stderr line."""
    from ..io import read_targets

    def report(error):
        print(f"epochpoint: skipped: {error}", file=sys.stderr)

    return read_targets(args.targets, skip_bad_rows=args.skip_bad_rows, on_skip=report)


def load_site(args) -> Site:
    """The site from --site, with any weather options applied on top."""
    from ..io import read_site

    site = read_site(args.site)
    return site.with_weather(pressure=args.pressure, temperature=args.temperature,
                             humidity=args.humidity, wavelength=args.wavelength)


def local_time_text(utc_iso: str, timezone: str) -> str:
    """The site's local civil time for an ISO 8601 UTC instant, with the zone abbreviation."""
    instant = dt.datetime.fromisoformat(utc_iso.replace("Z", "+00:00"))
    try:
        zone = ZoneInfo(timezone)
    except (ZoneInfoNotFoundError, ValueError):
        warnings.warn(f"unknown time zone {timezone!r}; showing UTC")
        zone = dt.timezone.utc
    local = instant.astimezone(zone)
    return f"{local:%Y-%m-%d %H:%M:%S} {local.tzname()}"


def emit(table, args, people_formatter) -> None:
    """Write a result table in the chosen format to --output or standard output."""
    from ..io import write_result

    if args.format == "table":
        text = people_formatter(table)
        if args.output:
            from ..io import atomic_write_text
            atomic_write_text(args.output, text)
        else:
            sys.stdout.write(text)
        return
    text = write_result(dict(table), table.meta, args.output, args.format, units=table.units)
    if args.output is None and text is not None:
        sys.stdout.write(text if text.endswith("\n") else text + "\n")
