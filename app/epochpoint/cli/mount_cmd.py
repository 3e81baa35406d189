"""`epochpoint mount slew|status|abort`: point a telescope over INDI, behind the interlocks.

Exit status: 0 done; 2 bad input; 3 refused by the site's interlocks (nothing sent);
4 the INDI server could not be reached or went away (never retried); 5 the mount failed,
refused, did not end in time or ended beyond the largest accepted residual; 130 interrupted
(abort sent).
"""
from __future__ import annotations

import argparse
import sys
from datetime import datetime, timezone

from ..mount.errors import ConnectionLost, InterlockRefused, MountError
from ..mount.options import MAX_RESIDUAL_ARCSEC, MAX_TRACK_S, MAX_WAIT_S
from . import checks, common

EXIT_REFUSED = 3
EXIT_CONNECTION = 4
EXIT_MOUNT = 5


def add_parser(sub) -> None:
    p = sub.add_parser("mount", help="slew, sync, abort or inspect a telescope over INDI",
                       description="Control a telescope mount through an INDI server. Motion "
                                   "is refused when the site's interlocks forbid the target.")
    actions = p.add_subparsers(dest="mount_action", required=True, metavar="ACTION",
                               parser_class=type(p))
    slew = actions.add_parser("slew", help="slew (or sync) to a target's place of date",
                              usage="epochpoint mount slew [-h] TARGETS NAME --site SITE "
                                    "--indi HOST:PORT [options]",
                              description="Slew the mount to target NAME's apparent place of "
                                          "date (or its J2000 astrometric place when the device "
                                          "only takes J2000), tracking; --sync syncs instead. "
                                          "A solar-system body is sent its place at the slew's "
                                          "estimated end, then tracked at its own rate (or, "
                                          "with --wait, re-slewed while watched). "
                                          "Every option is checked before the server is "
                                          "contacted.")
    # TARGETS NAME, like the other commands; the earlier `NAME --targets FILE` still works.
    slew.add_argument("places", nargs="*", metavar="TARGETS NAME",
                      help="the target list (CSV, ECSV or VOTable) and the target's name in it")
    slew.add_argument("--targets", dest="targets_option", metavar="FILE", help=argparse.SUPPRESS)
    common.add_site_arguments(slew)
    add_server_arguments(slew)
    slew.add_argument("--model", metavar="MODEL.json",
                      help="a pointing model (epochpoint pointing fit): command the place its "
                           "axes need to see the target; the interlocks judge both places")
    slew.add_argument("--sync", action="store_true",
                      help="sync the mount's coordinates to the target instead of moving")
    slew.add_argument("--wait", action="store_true",
                      help="follow the motion until it ends, then refine once if needed")
    slew.add_argument("--timeout", default=120.0, metavar="S",
                      type=checks.number(0.0, MAX_WAIT_S, lo_open=True, unit="s"),
                      help=f"seconds to wait for the motion to end (default 120, at most "
                           f"{MAX_WAIT_S:g})")
    residual = checks.number(0.0, MAX_RESIDUAL_ARCSEC, lo_open=True, unit="arcsec")
    slew.add_argument("--max-residual", type=residual, default=2.0, metavar="ARCSEC",
                      help="largest accepted distance between where the mount reports it "
                           "points and the target, after the motion (default 2)")
    # The earlier spelling, kept working but no longer shown.
    slew.add_argument("--tolerance", type=residual, dest="max_residual",
                      default=argparse.SUPPRESS, help=argparse.SUPPRESS)
    slew.add_argument("--push-site", action="store_true",
                      help="first send our site and clock to the device")
    slew.add_argument("--track-minutes", default=10.0, metavar="MIN",
                      type=checks.number(0.0, MAX_TRACK_S / 60.0, unit="min"),
                      help="refuse unless the target stays allowed for this long after the "
                           "slew ends (default 10; use the block's length); with --wait, "
                           "then watch the tracking mount for as long")
    common.add_solar_option(slew, "pointed at")
    slew.add_argument("--at-limit", choices=("stop-tracking", "abort"),
                      default="stop-tracking",
                      help="what the watch does before the tracked mount leaves the allowed "
                           "region (default stop-tracking)")

    status = actions.add_parser("status", help="the mount's position, state, site and clock")
    add_server_arguments(status)
    status.add_argument("--site", metavar="SITE",
                        help="also show our site beside the device's (file or LAT,LON,HEIGHT)")

    abort = actions.add_parser("abort", help="stop any motion now (always allowed)")
    add_server_arguments(abort)


def add_server_arguments(parser) -> None:
    parser.add_argument("--indi", required=True, metavar="HOST:PORT",
                        help="the INDI server, e.g. localhost:7624")
    parser.add_argument("--device", metavar="NAME",
                        help="the telescope device (default: the only telescope there)")
    parser.add_argument("--connect-timeout", default=10.0, metavar="S",
                        type=checks.number(0.0, MAX_WAIT_S, lo_open=True, unit="s"),
                        help="seconds to wait for the server and the device (default 10)")


def run(args) -> int:
    return run_mount_action(
        lambda a, say, open_scope: {"slew": _slew, "status": _status,
                                    "abort": _abort}[a.mount_action](a), args)


def run_mount_action(action, args) -> int:
    """Run action(args, say, open_scope) with the mount's errors mapped to exit statuses."""
    try:
        return action(args, _say, _open)
    except InterlockRefused as err:
        return _fail(err, EXIT_REFUSED)
    except ConnectionLost as err:
        return _fail(err, EXIT_CONNECTION)
    except MountError as err:
        return _fail(err, EXIT_MOUNT)


def _fail(message, code: int) -> int:
    print(f"epochpoint: error: {' '.join(str(message).split())}", file=sys.stderr)
    return code


def _say(text: str) -> None:
    print(text, flush=True)


def _open(args, connect_device: bool = True):
    from ..mount.telescope import Telescope

    return Telescope.open(args.indi, args.device, timeout_s=args.connect_timeout,
                          connect_device=connect_device, notify=_say)


def _slew(args) -> int:
    from ..io import read_targets
    from ..mount.telescope import checked_pointing, slew_to_target
    from ..mount.track_watch import watch_track

    targets_path, name = _targets_and_name(args)
    targets = read_targets(targets_path)
    site = common.with_solar_option(common.load_site(args), args)
    model = _model(args.model, site) if args.model else None
    # Refuse before touching the server: nothing is sent for a forbidden target.
    checked_pointing(targets, site, name, model=model)
    with _open(args) as scope:
        _say("\n".join(_status_lines(scope.status(), site, scope.reported_pier_side())))
        if args.push_site:
            scope.push_site(site, notify=_say)
        # A failure once the motion was sent comes back with an abort sent and the words
        # "may still be moving" (slew_to_target does both).
        token = scope.begin_command()
        try:
            report = slew_to_target(scope, targets, site, name, sync=args.sync,
                                    wait=args.wait, timeout_s=args.timeout,
                                    tolerance_arcsec=args.max_residual,
                                    track_s=args.track_minutes * 60.0, token=token,
                                    notify=_say, model=model)
        except KeyboardInterrupt:
            _say("Interrupted: aborting the motion.")
            scope.abort()
            return 130
        if args.wait and not args.sync and not report.aborted and report.final_state == "Ok" \
                and args.track_minutes > 0.0:
            _say(f"Watching the track for {args.track_minutes:g} min (Ctrl-C stops watching; "
                 "the mount then tracks unwatched).")
            try:
                _say("Watch ended: " + watch_track(
                    scope, targets, site, name, seconds=args.track_minutes * 60.0,
                    at_limit=args.at_limit, token=token, notify=_say,
                    tolerance_arcsec=args.max_residual) + ".")
            except KeyboardInterrupt:
                _say("Stopped watching; the mount keeps tracking, unwatched.")
    if report.residual_arcsec is None:
        _say(f"Sent; not waiting for the {report.action} to end.")
        return 0
    _say(f"Residual: {report.residual_arcsec:.2f} arcsec "
         f"(reported {report.coordinate_property} against the target's place now"
         + (f"; {report.first_residual_arcsec:.2f} arcsec before refining)"
            if report.refined else ")"))
    if not report.within_tolerance:
        return _fail(f"the mount ended {report.residual_arcsec:.2f} arcsec from {name}, "
                     f"beyond the largest accepted residual of {args.max_residual:g} arcsec",
                     EXIT_MOUNT)
    return 0


def _model(path: str, site):
    """The pointing model of `path`, with a one-line note of what it is."""
    from .pointing_cmd import load_model

    model = load_model(path)
    _say(f"Pointing model {path}: {model.mount_type}, terms {', '.join(model.values) or 'none'}; "
         f"rms {model.rms_after_arcsec:.1f} arcsec after fitting ({model.rms_before_arcsec:.1f} "
         f"before), {model.samples} samples.")
    if abs(model.latitude - site.latitude) > 0.01:
        _say(f"Caution: the model was fitted at latitude {model.latitude:g} deg, the site is at "
             f"{site.latitude:g} deg.")
    return model


def _targets_and_name(args) -> tuple[str, str]:
    """(target list, target name) from `TARGETS NAME` or the older `NAME --targets FILE`."""
    given = list(args.places)
    if args.targets_option is not None:
        given.insert(0, args.targets_option)
    if len(given) != 2:
        raise ValueError("mount slew needs the target list and the target's name: "
                         "epochpoint mount slew TARGETS NAME --site SITE --indi HOST:PORT")
    return given[0], given[1]


def _status(args) -> int:
    site = None
    if args.site:
        from ..io import read_site
        site = read_site(args.site)
    with _open(args, connect_device=False) as scope:
        _say("\n".join(_status_lines(scope.status(), site, scope.reported_pier_side())))
    return 0


def _abort(args) -> int:
    with _open(args) as scope:
        state = scope.abort()
    _say(f"Abort sent to {scope.device}; coordinates now {state or 'unknown'}.")
    return 0


def _status_lines(status, site, device_pier_side: str = "") -> list[str]:
    """The status lines; device_pier_side: the device's TELESCOPE_PIER_SIDE (PIER_EAST or
    PIER_WEST, "" for none), shown with our name for the side beside INDI's."""
    from ..core.limits import MOUNT_TYPE_NAMES
    from ..io import format_dec_dms, format_ra_hms
    from ..mount.telescope import FRAME_TEXT, SIDE_OF_INDI, side_words

    lines = [f"Device       {status.device} at {status.address} "
             f"({'connected' if status.connected else 'not connected'})"]
    if status.ra_deg is not None:
        lines.append(f"Pointing     RA {format_ra_hms(status.ra_deg, 2)}  Dec "
                     f"{format_dec_dms(status.dec_deg, 1)}  "
                     f"({FRAME_TEXT[status.coordinate_property]}); state {status.motion_state}")
    flags = {"tracking": status.tracking, "parked": status.parked}
    shown = [f"{k} {'yes' if v else 'no'}" for k, v in flags.items() if v is not None]
    if shown:
        lines.append("Mount        " + ", ".join(shown))
    if device_pier_side in SIDE_OF_INDI:
        lines.append(f"Pier side    {side_words(SIDE_OF_INDI[device_pier_side])}, as the "
                     f"device reports it (TELESCOPE_PIER_SIDE)")
    if status.latitude is not None:
        lines.append(f"Device site  lat {status.latitude:+.5f} deg, "
                     f"lon {status.longitude:+.5f} deg, {status.height or 0.0:.0f} m")
    if site is not None:
        lines.append(f"Our site     lat {site.latitude:+.5f} deg, lon {site.longitude:+.5f} deg, "
                     f"{site.height:.0f} m")
        lines.append(f"Our mount    {MOUNT_TYPE_NAMES[site.interlocks.mount.mount_type]}")
    if status.time_utc is not None:
        offset = "" if status.utc_offset_h is None else f", offset {status.utc_offset_h:+.2f} h"
        lines.append(f"Device clock TIME_UTC {status.time_utc}{offset} (as last reported)")
    lines.append(f"Our clock    {datetime.now(timezone.utc):%Y-%m-%dT%H:%M:%S}Z")
    return lines
