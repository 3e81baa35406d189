"""`epochpoint positions`: every target's propagated, apparent and observed place at TIME."""
from __future__ import annotations

import numpy as np

from ..core.positions import LEDGER_COLUMNS, position_chunks, positions
from ..io.angles import DEG_PER_HOUR, sidereal_time_text
from . import common
from .people import LOWER_BOUND_NOTE, PeopleColumn, lower_bound_cells, people_table

FORMATS = ["table", "csv", "json", "ecsv", "votable"]


def add_parser(sub) -> None:
    p = sub.add_parser("positions", help="positions of date and at the site at one instant",
                       description="Carry each target from its catalogue epoch to TIME and give "
                                   "its propagated (ICRS), apparent (true equator and equinox of "
                                   "date, CIRS) and observed place at the site.")
    common.add_targets_argument(p)
    common.add_site_arguments(p)
    common.add_time_argument(p)
    p.add_argument("--ledger", action="store_true",
                   help="add the correction ledger: the size in arcsec of each effect")
    common.add_output_arguments(p, FORMATS)


def run(args) -> int:
    targets = common.load_targets(args)
    site = common.load_site(args)
    if args.format != "table":  # machine formats are written as the chunks are computed
        common.emit_chunks(position_chunks(targets, site, args.at, ledger=args.ledger), args)
        return 0
    result = positions(targets, site, args.at, ledger=args.ledger)
    common.emit(result, args, lambda table: _people(table, site, args.ledger))
    return 0


def _people(table, site, ledger: bool) -> str:
    """Aligned columns for reading at the telescope, with UTC, local and sidereal time."""
    last_hours = np.degrees(table.context.site.last_rad) / DEG_PER_HOUR
    utc_text = table.meta["time"][:19].replace("T", " ")
    header = [f"Positions at {utc_text} UTC  |  "
              f"{common.local_time_text(table.meta['time'], site.timezone)} "
              f"({site.timezone})  |  "
              f"{sidereal_time_text(last_hours)}",
              f"Site {table.meta['site']}: lat {site.latitude:+.4f} deg, "
              f"lon {site.longitude:+.4f} deg, {site.height:.0f} m; {site.pressure:.0f} hPa, "
              f"{site.temperature:.1f} C, RH {site.humidity:.2f}, {site.wavelength:.2f} um",
              "Apparent place: true equator and equinox of date. Alt/Az observed (refracted); "
              "Az from north through east."]
    if "earth_orientation_warning" in table.meta:
        header.append("Warning: " + table.meta["earth_orientation_warning"])
    columns = [PeopleColumn("Name", "name", str),
               PeopleColumn("RA (of date)", "ra_apparent", "ra"),
               PeopleColumn("Dec (of date)", "dec_apparent", "dec"),
               PeopleColumn("HA", "ha", "hours"),
               PeopleColumn("Alt deg", "alt", "{:6.2f}"),
               PeopleColumn("Az deg", "az", "{:6.2f}"),
               PeopleColumn("Airmass", "airmass", "{:6.3f}"),
               PeopleColumn("Par.ang deg", "parallactic_angle", "{:7.2f}"),
               PeopleColumn('Drift "', "drift", "{:8.2f}")]
    if "error_major" in table:
        # ">=": the row's proper-motion errors are unknown, so the ellipse is a lower bound.
        columns.append(PeopleColumn("Err mas", "error_major",
                                    lower_bound_cells("{:7.2f}", table["error_lower_bound"])))
        if np.any(table["error_lower_bound"]):
            header.append(LOWER_BOUND_NOTE)
    if "distance_au" in table:
        # Solar-system rows: distance, apparent rates, angle from the Sun, V magnitude.
        columns += [PeopleColumn("Dist au", "distance_au", "{:10.6f}"),
                    PeopleColumn('dRA "/s', "rate_ra", "{:8.4f}"),
                    PeopleColumn('dDec "/s', "rate_dec", "{:8.4f}"),
                    PeopleColumn("Elong deg", "elongation", "{:6.1f}"),
                    PeopleColumn("Mag", "magnitude", "{:5.1f}")]
        header.append('Bodies: RA/Dec rates in arcsec per second of time (dRA includes '
                      'cos Dec); elongation from the Sun.')
        for note in table.meta.get("body_warnings", []):
            header.append("Warning: " + note)
    if ledger:
        columns += [PeopleColumn(c.replace("ledger_", "").replace("_", " ") + ' "', c,
                                 "{:8.3f}")
                    for c in LEDGER_COLUMNS if c in table]
    return people_table(table, columns, header)
