"""`epochpoint drift`: targets whose catalogue position is off by more than a tolerance."""
from __future__ import annotations

from ..core.drift import drift
from . import common
from .people import PeopleColumn, people_table

FORMATS = ["table", "csv", "json", "ecsv", "votable"]


def add_parser(sub) -> None:
    p = sub.add_parser("drift", help="targets that have moved beyond a tolerance",
                       description="List the targets whose catalogue position is off by more "
                                   "than ARCSEC at TIME: drift, drift rate, the date the drift "
                                   "crossed (or will cross) the tolerance, and the position "
                                   "uncertainty at TIME where errors are known.")
    common.add_targets_argument(p)
    common.add_time_argument(p)
    p.add_argument("--tolerance", type=float, required=True, metavar="ARCSEC",
                   help="allowed offset, e.g. half the field of view or the slit width")
    p.add_argument("--all", action="store_true",
                   help="list every target, not only those over the tolerance")
    common.add_output_arguments(p, FORMATS)


def run(args) -> int:
    targets = common.load_targets(args)
    result = drift(targets, args.at, args.tolerance)
    if not args.all:
        result = result.select(result["over_tolerance"])
    common.emit(result, args, _people)
    return 0


def _people(table) -> str:
    header = [f"Drift at {table.meta['time'][:19].replace('T', ' ')} UTC against a tolerance of "
              f"{table.meta['tolerance_arcsec']:g} arcsec: {table.nrows} target(s) listed",
              "Drift: catalogue position to the propagated position now. Crossing: when the "
              "drift reached (or will reach) the tolerance."]
    columns = [PeopleColumn("Name", "name", str),
               PeopleColumn('Drift"', "drift", "{:10.3f}"),
               PeopleColumn('Rate "/yr', "drift_rate", "{:9.4f}"),
               PeopleColumn("Over", "over_tolerance", "{}"),
               PeopleColumn("Crossing (UTC)", "crossing", "date"),
               PeopleColumn("+- days", "crossing_sigma_days", "{:8.1f}")]
    if "error_major" in table:
        columns += [PeopleColumn("Err maj mas", "error_major", "{:8.3f}"),
                    PeopleColumn("min mas", "error_minor", "{:8.3f}"),
                    PeopleColumn("PA deg", "error_pa", "{:6.1f}")]
    return people_table(table, columns, header)
