"""`epochpoint drift`: targets whose catalogue position is off by more than a tolerance."""
from __future__ import annotations

import numpy as np

from ..core.drift import MAX_TOLERANCE_ARCSEC, drift
from . import checks, common
from .people import LOWER_BOUND_NOTE, PeopleColumn, lower_bound_cells, people_table

FORMATS = ["table", "csv", "json", "ecsv", "votable"]


def add_parser(sub) -> None:
    p = sub.add_parser("drift", help="targets that have moved beyond a tolerance",
                       description="List the targets whose catalogue position is off by more "
                                   "than ARCSEC at TIME: drift, drift rate, the date the drift "
                                   "crossed (or will cross) the tolerance, and the position "
                                   "uncertainty at TIME where errors are known.")
    common.add_targets_argument(p)
    common.add_time_argument(p)
    p.add_argument("--tolerance", required=True, metavar="ARCSEC",
                   type=checks.number(0.0, MAX_TOLERANCE_ARCSEC, lo_open=True, hi_open=True,
                                      unit="arcsec"),
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
              "Drift: offset of the position now (propagated) from the catalogue position. "
              "Crossing: when the drift reached (or will reach) the tolerance."]
    columns = [PeopleColumn("Name", "name", str),
               PeopleColumn('Drift "', "drift", "{:10.3f}"),
               PeopleColumn('Rate "/yr', "drift_rate", "{:9.4f}"),
               PeopleColumn("Over", "over_tolerance", "{}"),
               PeopleColumn("Crossing (UTC)", "crossing", "date"),
               PeopleColumn("+- d", "crossing_sigma_days", _sigma_cells(table["crossing"]))]
    if "error_major" in table:
        # ">=": the row's proper-motion errors are unknown, so the ellipse is a lower bound.
        bound = table["error_lower_bound"]
        columns += [PeopleColumn("Err maj mas", "error_major", lower_bound_cells("{:8.3f}", bound)),
                    PeopleColumn("Err min mas", "error_minor", lower_bound_cells("{:8.3f}", bound)),
                    PeopleColumn("Err PA deg", "error_pa", "{:6.1f}")]
        if np.any(bound):
            header.append(LOWER_BOUND_NOTE)
    unknown = [c is not None and not np.isfinite(v)
               for v, c in zip(table["crossing_sigma_days"], table["crossing"])]
    if any(unknown):
        header.append('"?": the crossing\'s uncertainty is unknown (errors not in the catalogue).')
    return people_table(table, columns, header)


def _sigma_cells(crossing):
    """The crossing's 1-sigma in days; '?' where there is a crossing but its errors are unknown."""
    def cells(values):
        return [f"{v:8.1f}" if np.isfinite(v) else ("" if c is None else "?")
                for v, c in zip(np.asarray(values, dtype=float), crossing)]
    return cells
