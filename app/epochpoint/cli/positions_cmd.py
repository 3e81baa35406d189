"""`epochpoint positions`: every target's propagated, apparent and observed place at TIME."""
from __future__ import annotations

import numpy as np

from ..core.positions import LEDGER_COLUMNS, positions
from ..core.vectors import wrap_pm180
from . import common
from .people import PeopleColumn, people_table

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
    result = positions(targets, site, args.at, ledger=args.ledger)
    common.emit(result, args, lambda table: _people(table, site, args.ledger))
    return 0


def _people(table, site, ledger: bool) -> str:
    """Aligned columns for reading at the telescope, with UTC, local and sidereal time."""
    ctx = table.context
    last_deg = np.degrees(ctx.site.last_rad)
    utc_text = table.meta["time"][:19].replace("T", " ")
    header = [f"Positions at {utc_text} UTC  |  "
              f"{common.local_time_text(table.meta['time'], site.timezone)} local  |  "
              f"LST {people_hours(last_deg)}",
              f"Site {table.meta['site']}: lat {site.latitude:+.4f}, lon {site.longitude:+.4f}, "
              f"{site.height:.0f} m; {site.pressure:.0f} hPa, {site.temperature:.1f} C, "
              f"RH {site.humidity:.2f}, {site.wavelength:.2f} um",
              "Apparent place: true equator and equinox of date. Alt/Az observed (refracted); "
              "Az from north through east."]
    if "earth_orientation_warning" in table.meta:
        header.append("Warning: " + table.meta["earth_orientation_warning"])
    columns = [PeopleColumn("Name", "name", str),
               PeopleColumn("RA (date)", "ra_apparent", "ra"),
               PeopleColumn("Dec (date)", "dec_apparent", "dec"),
               PeopleColumn("HA", "ha", "hours"),
               PeopleColumn("Alt", "alt", "{:6.2f}"),
               PeopleColumn("Az", "az", "{:6.2f}"),
               PeopleColumn("Airmass", "airmass", "{:6.3f}"),
               PeopleColumn("Par.ang", "parallactic_angle", "{:7.2f}"),
               PeopleColumn('Drift"', "drift", "{:8.2f}")]
    if "error_major" in table:
        columns.append(PeopleColumn("Err mas", "error_major", "{:7.2f}"))
    if ledger:
        columns += [PeopleColumn(c.replace("ledger_", "").replace("_", " ") + '"', c, "{:8.3f}")
                    for c in LEDGER_COLUMNS if c in table]
    return people_table(table, columns, header)


def people_hours(angle_deg: float) -> str:
    from ..io import format_hours

    return str(format_hours(np.atleast_1d(wrap_pm180(angle_deg) % 360.0), 1)[0])
