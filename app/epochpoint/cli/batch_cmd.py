"""`epochpoint batch positions|drift`: a Parquet catalogue of any size, partition by
partition on Dask (local threads, or a cluster with --scheduler), to a Parquet dataset."""
from __future__ import annotations

import sys

from ..core.drift import MAX_TOLERANCE_ARCSEC
from . import checks, common

DEFAULT_PARTITION_ROWS = 1_000_000  # the same as epochpoint.batch.DEFAULT_PARTITION_ROWS


def add_parser(sub) -> None:
    p = sub.add_parser("batch", help="positions or drift of a Parquet catalogue, on Dask",
                       description="Compute a Parquet catalogue partition by partition, in "
                                   "local threads or on a Dask cluster, into a Parquet dataset.")
    kinds = p.add_subparsers(dest="batch_kind", required=True, metavar="KIND")
    positions = kinds.add_parser("positions", help="positions at one instant (see positions)",
                                 description="Propagated, apparent and (with --site) observed "
                                             "places of every row at TIME.")
    _add_common(positions)
    common.add_site_arguments(positions, required=False)
    positions.add_argument("--ledger", action="store_true",
                           help="add the correction ledger columns (arcsec)")
    drift = kinds.add_parser("drift", help="drift against a tolerance (see drift)",
                             description="Drift, rate and tolerance crossing of every row at "
                                         "TIME; rows over the tolerance (and rows with a "
                                         "problem) are written, or every row with --all.")
    _add_common(drift)
    drift.add_argument("--tolerance", required=True, metavar="ARCSEC",
                       type=checks.number(0.0, MAX_TOLERANCE_ARCSEC, lo_open=True, hi_open=True,
                                          unit="arcsec"),
                       help="allowed offset, e.g. half the field of view or the slit width")
    drift.add_argument("--all", action="store_true", help="write every row")


def _add_common(p) -> None:
    p.add_argument("input", metavar="INPUT",
                   help="Parquet file, folder of Parquet files, or glob (quote it); our column "
                        "names or the Gaia archive's (source_id, ra, dec, pmra, pmdec, "
                        "parallax, radial_velocity, ref_epoch, ...)")
    common.add_time_argument(p)
    p.add_argument("--output", required=True, metavar="FOLDER",
                   help="the Parquet dataset to write (a folder; an earlier output is replaced "
                        "when the batch has finished)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on an existing Dask cluster, e.g. tcp://10.0.0.5:8786 (INPUT and "
                        "OUTPUT must be on a file system the workers share)")
    p.add_argument("--partition-rows", type=checks.count(1), default=DEFAULT_PARTITION_ROWS,
                   metavar="N", help=f"rows per partition; memory grows with it "
                                     f"(default {DEFAULT_PARTITION_ROWS:,})")
    p.add_argument("--columns", metavar="NAME,...",
                   type=lambda text: [c.strip() for c in text.split(",") if c.strip()],
                   help="result columns to write (default all), and input columns to carry "
                        "along; the id column and `problem` are always written")


def run(args) -> int:
    from ..batch import batch_drift, batch_positions

    shared = dict(columns=args.columns, scheduler=args.scheduler,
                  partition_rows=args.partition_rows)
    if args.batch_kind == "positions":
        site = common.load_site(args) if args.site else None
        summary = batch_positions(args.input, args.at, args.output, site=site,
                                  ledger=args.ledger, **shared)
    else:
        summary = batch_drift(args.input, args.at, args.tolerance, args.output,
                              every_row=args.all, **shared)
    print(f"epochpoint: batch {args.batch_kind}: {summary.line()}", file=sys.stderr)
    return 0
