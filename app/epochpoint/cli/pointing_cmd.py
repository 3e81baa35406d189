"""`epochpoint pointing stars|fit|apply`: calibrate a mount's pointing with centred stars.

stars  bright Hipparcos stars spread over the sky the mount may reach now, in slew order
fit    a pointing model (JSON) from a samples file (core/pointing_model, io/pointing_samples)
apply  where the mount's axes must go for sky places: a samples-style file with ha_target and
       dec_target, or any target list with --site --at
record slew to each calibration star over INDI (interlocked), let the user centre it, and
       append one sample per star to the samples file (mount.calibration; io.pointing_samples
       append_sample keeps the file's other columns): for a German mount with its pier side,
       for an alt-az mount with the altitude and azimuth columns
"""
from __future__ import annotations

import json
import sys

import numpy as np

from ..core.limits import MOUNT_TYPE_NAMES
from ..core.pointing_model.terms import HOUR_ANGLE_MOUNTS, MOUNT_TYPES
from . import checks, common

DEFAULT_MAX_MAGNITUDE = 4.0
# The sky-place and mount-reading columns a model of each kind of axes reads, first axis
# first: hour angle and declination, or azimuth and altitude.
HOUR_ANGLE_COLUMNS = (("ha_target", "dec_target"), ("ha_mount", "dec_mount"))
ALTAZ_COLUMNS = (("az_target", "alt_target"), ("az_mount", "alt_mount"))


def add_parser(sub) -> None:
    p = sub.add_parser("pointing", help="calibration stars, pointing-model fit and use",
                       description="Pick calibration stars, fit a pointing model to centred "
                                   "stars, and correct sky places for the mount's "
                                   "imperfections.")
    actions = p.add_subparsers(dest="pointing_action", required=True, metavar="ACTION",
                               parser_class=type(p))
    stars = actions.add_parser("stars", help="bright stars spread over the reachable sky now")
    common.add_site_arguments(stars)
    common.add_time_argument(stars)
    stars.add_argument("--count", type=checks.count(1, 500), default=20, metavar="N",
                       help="how many stars (default 20)")
    stars.add_argument("--min-altitude", type=checks.number(0.0, 89.0, unit="deg"),
                       default=20.0, metavar="DEG",
                       help="lowest altitude (default 20; the site's interlocks also apply)")
    stars.add_argument("--max-magnitude", type=checks.number(-2.0, 12.0, unit="mag"),
                       default=DEFAULT_MAX_MAGNITUDE, metavar="MAG",
                       help=f"faintest Hipparcos magnitude (default {DEFAULT_MAX_MAGNITUDE:g})")
    common.add_output_arguments(stars, ("table", "csv", "json"))

    fit = actions.add_parser("fit", help="fit a pointing model to a samples file")
    fit.add_argument("samples", metavar="SAMPLES", help="samples CSV (time, name, ha_target, "
                                                        "dec_target, ha_mount, dec_mount)")
    fit.add_argument("--site", required=True, metavar="SITE",
                     help="site file (TOML) or LAT,LON,HEIGHT: the latitude is used")
    fit.add_argument("--mount-type", choices=MOUNT_TYPES, default=None,
                     help="equatorial (fork: ha/dec columns), german (German equatorial: "
                          "ha/dec and pier_side columns) or altaz (alt/az columns); default "
                          "the site file's [mount] type, else equatorial")
    fit.add_argument("--terms", metavar="NAME,NAME",
                     help="terms to fit (default: the standard set of the mount type)")
    fit.add_argument("--output", required=True, metavar="MODEL.json",
                     help="the model file to write (atomically)")

    apply = actions.add_parser("apply", help="mount axis readings for sky places")
    apply.add_argument("model", metavar="MODEL.json")
    apply.add_argument("targets", metavar="TARGETS",
                       help="CSV with ha_target, dec_target (alt_target, az_target for an "
                            "alt-az model; for a German model optionally pier_side, east or "
                            "west, else the side a slew takes), or any target list with "
                            "--site --at")
    apply.add_argument("--skip-bad-rows", action="store_true", help="(target lists) report "
                       "each unreadable row on stderr and go on without it")
    common.add_site_arguments(apply, required=False)
    apply.add_argument("--at", metavar="TIME", help="ISO 8601 UTC instant or 'now' (target "
                                                    "lists)")
    common.add_output_arguments(apply, ("json", "csv"))
    _add_record_parser(actions)


def _add_record_parser(actions) -> None:
    from ..mount.options import MAX_TRACK_S, MAX_WAIT_S
    from .mount_cmd import add_server_arguments

    record = actions.add_parser(
        "record", help="slew to calibration stars over INDI and record centred samples",
        description="For each star: slew (behind the site's interlocks), wait while you centre "
                    "the star by hand and press Enter, then append one sample (the star's "
                    "observed place and the mount's axes) to the samples file. The mount "
                    "moves: keep people, hands and cables clear of it and follow your "
                    "observatory's procedures.")
    record.add_argument("stars", nargs="+", metavar="STAR",
                        help="Hipparcos names ('HIP 87937'), or one target list or "
                             "`pointing stars --format csv` file whose rows are visited in order")
    common.add_site_arguments(record)
    add_server_arguments(record)
    record.add_argument("--samples", required=True, metavar="FILE",
                        help="samples CSV; each new sample is appended (atomically) to the "
                             "ones already in it, whose other columns are kept")
    record.add_argument("--no-prompt", action="store_true",
                        help="record each star once the slew has ended and settled, without "
                             "waiting for Enter (scripts and tests)")
    record.add_argument("--settle", type=checks.number(0.0, 600.0, unit="s"), default=2.0,
                        metavar="S", help="with --no-prompt, seconds to wait after the slew "
                                          "(default 2)")
    record.add_argument("--push-site", action="store_true",
                        help="first send our site and clock to the device")
    record.add_argument("--timeout", default=120.0, metavar="S",
                        type=checks.number(0.0, MAX_WAIT_S, lo_open=True, unit="s"),
                        help="seconds to wait for each slew to end (default 120)")
    record.add_argument("--track-minutes", default=5.0, metavar="MIN",
                        type=checks.number(0.0, MAX_TRACK_S / 60.0, unit="min"),
                        help="refuse a star unless it stays allowed this long after the slew "
                             "(time to centre it; default 5)")


def run(args) -> int:
    if args.pointing_action == "record":
        from .mount_cmd import run_mount_action

        return run_mount_action(_record, args)
    return {"stars": _stars, "fit": _fit, "apply": _apply}[args.pointing_action](args)


def _stars(args) -> int:
    from ..core.pointing_model.star_picks import pick_calibration_stars
    from ..io.catalogues.hipparcos import read_hipparcos

    site = common.load_site(args)
    catalogue = read_hipparcos(max_magnitude=args.max_magnitude)
    rows, result = pick_calibration_stars(catalogue, site, args.at, args.count,
                                          min_altitude=args.min_altitude)
    if result is None:
        raise ValueError("no Hipparcos star the interlocks allow stands above "
                         f"{args.min_altitude:g} deg now; try a fainter --max-magnitude")
    if len(rows) < args.count:
        print(f"epochpoint: warning: only {len(rows)} stars are allowed now", file=sys.stderr)
    columns = {"order": list(range(1, len(rows) + 1)),
               "name": [str(n) for n in catalogue.names()[rows]],
               "hp_mag": [round(float(m), 2) for m in catalogue.extra["hp_mag"][rows]]}
    for key in ("ra_apparent", "dec_apparent", "ha", "dec_observed", "alt", "az"):
        columns[key] = [round(float(v), 5) for v in result[key]]
    _emit(columns, args, meta={"time": result.meta["time"]})
    return 0


def axis_columns(mount_type: str):
    """((sky first, sky second), (mount first, mount second)) column names of a mount type."""
    return HOUR_ANGLE_COLUMNS if mount_type in HOUR_ANGLE_MOUNTS else ALTAZ_COLUMNS


def _fit(args) -> int:
    from ..core.pointing_model import fit_pointing_model
    from ..io import atomic_write_text, read_site
    from ..io.pointing_samples import PIER_SIDE, read_samples

    site = read_site(args.site)
    # The site's mount type unless one is asked for (a LAT,LON,HEIGHT site: equatorial).
    mount_type = args.mount_type or site.interlocks.mount.mount_type
    samples = read_samples(args.samples, mount_type)
    sky, mount = axis_columns(mount_type)
    terms = None if not args.terms else [t.strip() for t in args.terms.split(",") if t.strip()]
    # The samples' sides: a German fit needs them; an equatorial one notes two sides.
    sides = samples[PIER_SIDE] if any(samples[PIER_SIDE]) else None
    fit = fit_pointing_model(samples[sky[0]], samples[sky[1]], samples[mount[0]],
                             samples[mount[1]], mount_type=mount_type,
                             latitude_deg=site.latitude, terms=terms, names=samples["name"],
                             pier_side=sides if mount_type in HOUR_ANGLE_MOUNTS else None)
    model = fit.model
    atomic_write_text(args.output, json.dumps(model.to_dict(), indent=2) + "\n")
    print(_term_table(model, fit.pier_side,
                      "" if args.mount_type else " (the site's mount type)"))
    return 0


def _term_table(model, sides=None, chosen: str = "") -> str:
    """The fitted terms, their errors and significance, and the fit's figures; a German
    model's with which terms change sign on the west side and the samples on each side."""
    from ..core.pointing_model.terms import TERMS

    lines = [f"{MOUNT_TYPE_NAMES[model.mount_type]} model{chosen}, latitude "
             f"{model.latitude:+.4f} deg"
             + ("; values as seen on the east pier side" if model.german else "")]
    lines.append(f"{'term':26} {'value':>10} {'error':>8} {'signif.':>8}"
                 + (f"  {'west side':9}" if model.german else ""))
    for name, value in model.values.items():
        error = model.errors[name]
        row = (f"{name:26} {value:10.2f} {error:8.2f} {abs(value) / error:8.1f}"
               if error > 0 else f"{name:26} {value:10.2f} {error:8.2f} {'':8}")
        if model.german:
            row += "  " + ("reversed" if TERMS["german"][name].flips_with_pier else "same")
        lines.append(row.rstrip())
    lines.append(f"samples {model.samples}, rejected {len(model.rejected)}"
                 + (f" ({', '.join(map(str, model.rejected))})" if model.rejected else ""))
    if model.german and sides is not None:
        east = int(sum(1 for s in sides if s == "east"))
        lines.append(f"pier sides of the samples: east {east}, west {len(sides) - east}")
    lines.append(f"rms before {model.rms_before_arcsec:.2f} arcsec, after "
                 f"{model.rms_after_arcsec:.2f} arcsec")
    return "\n".join(lines)


def load_model(path):
    """The pointing model in a JSON file; ModelError in one line naming file and field."""
    from ..core.pointing_model import ModelError, PointingModel

    try:
        with open(path, encoding="utf-8") as handle:
            data = json.load(handle)
    except json.JSONDecodeError as err:
        raise ModelError(f"{path}: line {err.lineno}: not JSON ({err.msg})") from None
    return PointingModel.from_dict(data, source=str(path))


def _has_sky_columns(path, names) -> bool:
    """True when the file's first non-comment line (a CSV header) has all `names`."""
    try:
        with open(path, encoding="utf-8-sig") as handle:
            for line in handle:
                if line.strip() and not line.lstrip().startswith("#"):
                    labels = {c.strip().lower() for c in line.split(",")}
                    return all(n in labels for n in names)
    except UnicodeDecodeError:
        return False
    return False


def _apply(args) -> int:
    model = load_model(args.model)
    sky, out = axis_columns(model.mount_type)
    if _has_sky_columns(args.targets, sky):
        from ..io.pointing_samples import PIER_SIDE, read_table

        table, lines = read_table(args.targets, sky)
        names = table.get("name", [f"line {n}" for n in lines])
        first, second = table[sky[0]], table[sky[1]]
        # A German model's given sides ("" where a row leaves it to the slew).
        m1, m2, chosen = _axes_for_rows(model, first, second, table.get(PIER_SIDE))
    else:
        if args.site is None or args.at is None:
            raise ValueError(f"{args.targets}: has no {sky[0]}/{sky[1]} columns; for a target "
                             f"list give --site and --at")
        from ..core.pointing_model.mount_frame import mount_axes
        from ..core.positions import positions

        targets = common.load_targets(args)
        site = common.load_site(args)
        result = positions(targets, site, args.at)
        names = [str(n) for n in targets.names()]
        first, second = ((result["ha"], result["dec_observed"]) if model.equatorial
                         else (result["az"], result["alt"]))
        # The mount-frame stage; a German model on the side a slew to each place takes now.
        axes = mount_axes(model, result["ha"], result["dec_observed"], result["alt"],
                          result["az"], site.latitude)
        m1, m2 = (axes.ha, axes.dec) if model.equatorial else (axes.az, axes.alt)
        chosen = axes.pier_side
    columns = {"name": list(names), sky[0]: [float(v) for v in first],
               sky[1]: [float(v) for v in second],
               out[0]: [round(float(v), 7) for v in np.ravel(m1)],
               out[1]: [round(float(v), 7) for v in np.ravel(m2)]}
    if model.german:
        columns["pier_side"] = [str(s) for s in np.ravel(chosen)]
    _emit(columns, args, meta={})
    return 0


def _axes_for_rows(model, first, second, sides):
    """(first, second, sides) of the axes for sky places given as rows: a German model's on
    each row's pier side, or where a row gives none the side a slew takes (model.py)."""
    m1, m2, chosen = model.mount_from_sky_with_side(first, second)
    if not model.german or sides is None:
        return m1, m2, chosen
    given = np.asarray(sides, dtype=object) != ""
    if np.any(given):
        g1, g2, g_sides = model.mount_from_sky_with_side(first[given], second[given],
                                                         sides[given])
        m1, m2, chosen = np.array(m1), np.array(m2), np.array(chosen, dtype=object)
        m1[given], m2[given], chosen[given] = g1, g2, g_sides
    return m1, m2, chosen


def _emit(columns: dict, args, meta: dict) -> None:
    """JSON: a list of objects in row order; CSV; or a plain table."""
    from ..io import atomic_write_text

    names = list(columns)
    rows = list(zip(*(columns[n] for n in names)))
    if args.format == "json":
        text = json.dumps([dict(zip(names, r)) for r in rows], indent=1) + "\n"
    elif args.format == "csv":
        text = "\n".join([",".join(names)] + [",".join(str(v) for v in r) for r in rows]) + "\n"
    else:
        widths = [max(len(n), *(len(str(v)) for v in columns[n])) for n in names]
        text = "\n".join(" ".join(str(v).rjust(w) for v, w in zip(r, widths))
                         for r in [names] + rows) + "\n"
    if args.output:
        atomic_write_text(args.output, text)
    else:
        sys.stdout.write(text)


def _record_stars(given):
    """(Targets, names in visiting order) from one target file, or from Hipparcos names."""
    import os

    from ..io import read_targets
    from ..io.catalogues.hipparcos import hipparcos_number, hipparcos_stars

    if len(given) == 1 and os.path.isfile(given[0]):
        listed = _hipparcos_names_only(given[0])
        if listed is None:
            targets = read_targets(given[0])
            return targets, [str(n) for n in targets.names()]
        given = listed
    numbers = [hipparcos_number(n) for n in given]
    if None in numbers:
        bad = given[numbers.index(None)]
        raise ValueError(f"{bad!r} is neither a file nor a Hipparcos name like 'HIP 87937'")
    targets = hipparcos_stars(numbers)
    return targets, [str(n) for n in targets.names()]


def _hipparcos_names_only(path):
    """The name column of a CSV file without an ra column (a `pointing stars` list), else
    None (a target list, read as such)."""
    import csv

    try:
        with open(path, encoding="utf-8-sig", newline="") as handle:
            rows = [r for r in csv.reader(handle)
                    if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#")]
    except (UnicodeDecodeError, OSError):
        return None
    labels = [c.strip().lower() for c in rows[0]] if rows else []
    if "ra" in labels or "name" not in labels:
        return None
    j = labels.index("name")
    return [r[j].strip() for r in rows[1:] if j < len(r)]


def _check_samples_file(path) -> None:
    """A samples file that exists must be readable before the mount moves (InputError)."""
    import os

    from ..io.pointing_samples import read_samples

    if os.path.exists(path):
        read_samples(path)


def _centred(name: str) -> bool:
    """Ask the user to centre the star; True to record, False to skip (KeyboardInterrupt
    on q or end of input stops the run)."""
    try:
        answer = input(f"Centre {name} in the eyepiece or camera with the hand controller, "
                       "then press Enter to record it (s Enter: skip, q Enter: stop): ")
    except EOFError:
        raise KeyboardInterrupt from None
    if answer.strip().lower().startswith("q"):
        raise KeyboardInterrupt
    return not answer.strip().lower().startswith("s")


def _record(args, say, open_scope) -> int:
    from ..io.pointing_samples import append_sample
    from ..mount.calibration import record_star, sample_offsets_text
    from .mount_cmd import EXIT_REFUSED
    from ..mount.errors import InterlockRefused

    targets, names = _record_stars(args.stars)
    site = common.load_site(args)
    _check_samples_file(args.samples)  # a bad file stops here, before the mount moves
    recorded, refused = 0, []
    with open_scope(args) as scope:
        if args.push_site:
            scope.push_site(site, notify=say)
        try:
            for k, name in enumerate(names, start=1):
                say(f"Star {k} of {len(names)}: {name}")
                try:
                    sample = record_star(scope, targets, site, name,
                                         confirm=None if args.no_prompt else _centred,
                                         settle_s=args.settle, timeout_s=args.timeout,
                                         track_s=args.track_minutes * 60.0, notify=say)
                except InterlockRefused as err:  # nothing was sent: go on with the next star
                    say(f"Skipped: {err}")
                    refused.append(name)
                    continue
                if sample is None:
                    say(f"{name} not recorded.")
                    continue
                # Appended: the file's other rows, columns and comments stay as they were.
                append_sample(args.samples, sample)
                recorded += 1
                say(f"Recorded {name}: {sample_offsets_text(sample)}.")
        except KeyboardInterrupt:
            say("Stopped: aborting any motion.")
            scope.abort()
            say(f"{recorded} sample(s) recorded in {args.samples}.")
            return 130
    say(f"{recorded} sample(s) recorded in {args.samples}"
        + (f"; refused by the interlocks: {', '.join(refused)}" if refused else "") + ".")
    return EXIT_REFUSED if refused and not recorded else 0
