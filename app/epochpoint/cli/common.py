"""Options and steps shared by the commands: reading targets and sites, writing results."""
from __future__ import annotations

import datetime as dt
import sys
import warnings
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from ..core.site import Site
from ..core.zones import clock_label
from . import checks


def add_targets_argument(parser) -> None:
    parser.add_argument("targets", metavar="TARGETS",
                        help="target list: CSV, ECSV or VOTable")
    parser.add_argument("--skip-bad-rows", action="store_true",
                        help="report each unreadable row on stderr and go on without it")
    parser.add_argument("--elements", metavar="FILE", action="append", default=[],
                        help="add the asteroids and comets of an orbital-elements file in "
                             "the Minor Planet Center's one-line layouts (may be repeated)")


def add_time_argument(parser) -> None:
    parser.add_argument("--at", required=True, metavar="TIME",
                        help="ISO 8601 UTC instant (e.g. 2027-01-20T23:10:00Z) or 'now'")


def add_site_arguments(parser, required: bool = True) -> None:
    parser.add_argument("--site", required=required, metavar="SITE",
                        help="site file (TOML) or LAT,LON,HEIGHT in degrees (east-positive) and "
                             "metres; write --site=-24.6,-70.4,2635 for southern sites")
    parser.add_argument("--pressure", type=checks.number(), metavar="HPA",
                        help="air pressure in hPa (default: the site's; 0 turns refraction off)")
    parser.add_argument("--temperature", type=checks.number(), metavar="C", help="air temperature, deg C")
    parser.add_argument("--humidity", type=checks.number(), metavar="FRAC",
                        help="relative humidity, 0..1")
    parser.add_argument("--wavelength", type=checks.number(), metavar="UM",
                        help="effective wavelength in micrometres")
    parser.add_argument("--timezone", metavar="NAME",
                        help="IANA time zone for local times, e.g. America/Phoenix (default: "
                             "the site file's, else the zone holding the site's coordinates); "
                             "times are labelled only, the night is fixed by the longitude")


def add_solar_option(parser, allows: str) -> None:
    """--solar-filter-fitted: the site's solar option for this run. `allows` completes
    'so the Sun may be ...' (planned, exported, pointed at)."""
    parser.add_argument("--solar-filter-fitted", action="store_true",
                        help=f"declare a full-aperture solar filter fitted on the telescope "
                             f"and on every finder, so the Sun may be {allows} (as the site "
                             f"file's [safety] solar_filter_fitted = true); a caution is shown "
                             f"every time")


def with_solar_option(site: Site, args) -> Site:
    """The site with --solar-filter-fitted applied. With the solar option on (flag or site
    file) the caution (core.limits.SOLAR_CAUTION) goes to standard error on every run."""
    if getattr(args, "solar_filter_fitted", False):
        from dataclasses import replace

        site = replace(site, interlocks=replace(site.interlocks, solar_filter_fitted=True))
    for caution in site.interlocks.cautions():
        print(f"epochpoint: {caution}", file=sys.stderr)
    return site


def add_output_arguments(parser, formats) -> None:
    parser.add_argument("--format", choices=formats, default=formats[0],
                        help=f"output format (default {formats[0]})")
    parser.add_argument("--output", metavar="FILE",
                        help="write to FILE (atomically) instead of standard output")


def load_targets(args):
    """Read the target file (and the --elements files); with --skip-bad-rows each skipped row
    or elements line is one stderr line."""
    from ..io import read_targets

    def report(error):
        print(f"epochpoint: skipped: {error}", file=sys.stderr)

    targets = read_targets(args.targets, skip_bad_rows=args.skip_bad_rows, on_skip=report)
    elements = getattr(args, "elements", None) or []
    if not elements:
        return targets
    # --elements FILE: the file's bodies join the list, after the targets.
    from ..core.targets import concatenate
    from ..io.catalogues.mpc_elements import read_mpc_elements

    return concatenate([targets] + [read_mpc_elements(path, skip_bad_rows=args.skip_bad_rows,
                                                      on_skip=report) for path in elements])


def load_site(args) -> Site:
    """The site from --site, with any weather options applied on top."""
    from ..io import read_site

    site = read_site(args.site)
    zone = getattr(args, "timezone", None)
    if zone:
        site = _with_zone_option(site, zone)
    return site.with_weather(pressure=args.pressure, temperature=args.temperature,
                             humidity=args.humidity, wavelength=args.wavelength)


def _with_zone_option(site: Site, name: str) -> Site:
    """--timezone applied: it replaces a zone found from the coordinates; a site file's own
    `timezone` wins (with a warning saying so)."""
    try:
        ZoneInfo(name)
    except (ZoneInfoNotFoundError, ValueError, OSError):
        raise ValueError(f"--timezone {name!r} is not an IANA time zone name "
                         "(e.g. America/Phoenix, Europe/Madrid, Etc/GMT+10, UTC)") from None
    if not site.timezone_from_coordinates:
        if name != site.timezone:
            warnings.warn(f"--timezone {name} ignored: the site file names {site.timezone}")
        return site
    return site.with_timezone(name)


def utc_datetime(utc_iso: str) -> dt.datetime:
    """An aware UTC datetime from ISO 8601 text. datetime has no second 60: a leap second
    (23:59:60.x) is shown as the last microsecond before it, 23:59:59.999999."""
    text = utc_iso.replace("Z", "+00:00")
    if text[17:19] == "60":
        return dt.datetime.fromisoformat(text[:17] + "59.999999" + text[text.index("+", 17):])
    return dt.datetime.fromisoformat(text)


def local_datetime(utc_iso: str, timezone: str) -> dt.datetime:
    """The site's local civil time (aware datetime) for an ISO 8601 UTC instant."""
    instant = utc_datetime(utc_iso)
    try:
        zone = ZoneInfo(timezone)
    except (ZoneInfoNotFoundError, ValueError):
        warnings.warn(f"unknown time zone {timezone!r}; showing UTC")
        zone = dt.timezone.utc
    return instant.astimezone(zone)


def local_time_text(utc_iso: str, timezone: str) -> str:
    """'YYYY-MM-DD HH:MM:SS ABBR': local civil time with the zone's abbreviation or offset."""
    local = local_datetime(utc_iso, timezone)
    return f"{local:%Y-%m-%d %H:%M:%S} {local.tzname()}"


def local_clock_text(utc_iso: str | None, timezone: str) -> str:
    """'HH:MM ABBR (HH:MM UTC)' for people, or 'none' when there is no instant."""
    if utc_iso is None:
        return "none"
    return clock_label(utc_datetime(utc_iso), timezone)


def zone_line(site: Site) -> str:
    """One line naming the zone the local times are shown in, and where it came from."""
    origin = ("found from the site's coordinates" if site.timezone_from_coordinates
              else "from the site")
    return f"Local times: {site.timezone} ({origin})"


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


def emit_chunks(chunks, args) -> None:
    """Write a result computed chunk by chunk (`chunks` has names, meta and units, and yields
    column chunks) in a machine format to --output or standard output, a chunk at a time."""
    from ..io.resultstream import stream_result

    # JSON holds no meta: it is not made (a site's zone would be looked up for nothing).
    meta = None if args.format == "json" else chunks.meta
    stream_result(chunks, chunks.names, meta, args.output, args.format,
                  units=chunks.units, out=sys.stdout)
