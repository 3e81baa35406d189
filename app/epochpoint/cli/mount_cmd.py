"""`epochpoint mount slew|status|abort`: point a telescope over INDI, behind the interlocks.

Exit status: 0 done; 2 bad input; 3 refused by the site's interlocks (nothing sent);
4 the INDI server could not be reached or went away (never retried); 5 the mount failed,
refused, did not end in time or ended beyond the tolerance; 130 interrupted (abort sent).
"""
from __future__ import annotations

import sys
from datetime import datetime, timezone

from ..mount.errors import ConnectionLost, InterlockRefused, MountError
from . import common

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
                              description="Slew the mount to target NAME's apparent place of "
                                          "date (or its J2000 astrometric place when the device "
                                          "only takes J2000), tracking; --sync syncs instead.")
    slew.add_argument("name", metavar="NAME", help="the target's name in the list")
    slew.add_argument("--targets", required=True, metavar="FILE",
                      help="target list: CSV, ECSV or VOTable")
    common.add_site_arguments(slew)
    _add_server_arguments(slew)
    slew.add_argument("--sync", action="store_true",
                      help="sync the mount's coordinates to the target instead of moving")
    slew.add_argument("--wait", action="store_true",
                      help="follow the motion until it ends, then refine once if needed")
    slew.add_argument("--timeout", type=float, default=120.0, metavar="S",
                      help="seconds to wait for the motion to end (default 120)")
    slew.add_argument("--tolerance", type=float, default=2.0, metavar="ARCSEC",
                      help="largest accepted pointing residual (default 2)")
    slew.add_argument("--push-site", action="store_true",
                      help="first send our site and clock to the device")

    status = actions.add_parser("status", help="the mount's position, state, site and clock")
    _add_server_arguments(status)
    status.add_argument("--site", metavar="SITE",
                        help="also show our site beside the device's (file or LAT,LON,HEIGHT)")

    abort = actions.add_parser("abort", help="stop any motion now (always allowed)")
    _add_server_arguments(abort)


def _add_server_arguments(parser) -> None:
    parser.add_argument("--indi", required=True, metavar="HOST:PORT",
                        help="the INDI server, e.g. localhost:7624")
    parser.add_argument("--device", metavar="NAME",
                        help="the telescope device (default: the only telescope there)")
    parser.add_argument("--connect-timeout", type=float, default=10.0, metavar="S",
                        help="seconds to wait for the server and the device (default 10)")


def run(args) -> int:
    try:
        return {"slew": _slew, "status": _status, "abort": _abort}[args.mount_action](args)
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

    if not args.connect_timeout > 0:
        raise ValueError("--connect-timeout must be a positive number of seconds")
    return Telescope.open(args.indi, args.device, timeout_s=args.connect_timeout,
                          connect_device=connect_device, notify=_say)


def _slew(args) -> int:
    from ..io import read_targets
    from ..mount.telescope import checked_pointing, slew_to_target

    if not (args.timeout > 0 and args.tolerance > 0):
        raise ValueError("--timeout and --tolerance must be positive numbers")
    targets = read_targets(args.targets)
    site = common.load_site(args)
    # Refuse before touching the server: nothing is sent for a forbidden target.
    checked_pointing(targets, site, args.name)
    with _open(args) as scope:
        _say("\n".join(_status_lines(scope.status(), site)))
        if args.push_site:
            scope.push_site(site, notify=_say)
        try:
            report = slew_to_target(scope, targets, site, args.name, sync=args.sync,
                                    wait=args.wait, timeout_s=args.timeout,
                                    tolerance_arcsec=args.tolerance, notify=_say)
        except KeyboardInterrupt:
            _say("Interrupted: aborting the motion.")
            scope.abort()
            return 130
        except ConnectionLost as err:
            raise ConnectionLost(f"{err}; the mount may still be moving: check it") from None
    if report.residual_arcsec is None:
        _say(f"Sent; not waiting for the {report.action} to end.")
        return 0
    _say(f"Residual: {report.residual_arcsec:.2f} arcsec "
         f"(reported {report.coordinate_property} against the target's place now"
         + (f"; {report.first_residual_arcsec:.2f} arcsec before refining)"
            if report.refined else ")"))
    if not report.within_tolerance:
        return _fail(f"the mount ended {report.residual_arcsec:.2f} arcsec from {args.name}, "
                     f"beyond the tolerance of {args.tolerance:g} arcsec", EXIT_MOUNT)
    return 0


def _status(args) -> int:
    site = None
    if args.site:
        from ..io import read_site
        site = read_site(args.site)
    with _open(args, connect_device=False) as scope:
        _say("\n".join(_status_lines(scope.status(), site)))
    return 0


def _abort(args) -> int:
    with _open(args) as scope:
        state = scope.abort()
    _say(f"Abort sent to {scope.device}; coordinates now {state or 'unknown'}.")
    return 0


def _status_lines(status, site) -> list[str]:
    from ..io import format_dec_dms, format_ra_hms
    from ..mount.telescope import FRAME_TEXT

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
    if status.latitude is not None:
        lines.append(f"Device site  lat {status.latitude:+.5f}, lon {status.longitude:+.5f}, "
                     f"{status.height or 0.0:.0f} m")
    if site is not None:
        lines.append(f"Our site     lat {site.latitude:+.5f}, lon {site.longitude:+.5f}, "
                     f"{site.height:.0f} m")
    if status.time_utc is not None:
        offset = "" if status.utc_offset_h is None else f", offset {status.utc_offset_h:+.2f} h"
        lines.append(f"Device clock TIME_UTC {status.time_utc}{offset} (as last reported)")
    lines.append(f"Our clock    {datetime.now(timezone.utc):%Y-%m-%dT%H:%M:%S}Z")
    return lines
