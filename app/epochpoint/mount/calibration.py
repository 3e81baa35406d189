"""Recording pointing samples over INDI: slew to a calibration star, let the user centre it,
and note where the star is and where the mount's axes say they are.

One sample (io/pointing_samples) is: the instant, the star's name, the star's observed place
(ha_target, dec_target) computed by the core at that instant, and the mount's axes
(ha_mount, dec_mount): the coordinates the device reports, of date (EQUATORIAL_EOD_COORD) or
J2000 carried onto the equator of date near the star (mount.pointing.shifted_place), turned into
hour angle with our local apparent sidereal time (core.pointing_model.mount_frame). The slew
goes through mount.telescope.slew_to_target with all its interlocks, clock check and latched
abort; the reading is taken only after the motion ended (and, without a person at the mount,
after a settling pause), while the mount tracks.

A German equatorial mount's sample also says on which pier side it was taken (`pier_side`,
east or west: the side of the meridian the star was on when the slew ended): the device's
TELESCOPE_PIER_SIDE when it reports one (PIER_WEST, the tube west of the pier pointing east,
is our east; mount.telescope), else the side our interlock check found for the slew, else the
side of the axes' hour angle now. An alt-az mount's sample also holds the star's observed
altitude and azimuth (`alt_target`, `az_target`) and the axes' (`alt_mount`, `az_mount`): the
reported place turned into altitude and azimuth by the same stage that commands it
(core.pointing_model.mount_frame.altaz_from_hadec), so a model fitted on them round-trips.

Pure Python, no Qt: the command line drives it; `confirm` is how the user says "centred".
"""
from __future__ import annotations

import time
from datetime import datetime, timezone
from typing import Callable

from ..core.constants import RAD_TO_DEG
from ..core.pointing_model.model import wrap_ha
from ..core.pointing_model.mount_frame import altaz_from_hadec, axes_from_place_of_date
from ..core.positions import positions
from ..core.site import Site
from ..core.targets import Targets
from .errors import MountFailed
from .pointing import (_astrometric_j2000, date_from_j2000, find_target, pier_side_of,
                       shifted_place)
from .telescope import J2000_COORD, SIDE_OF_INDI, Telescope, slew_to_target

Notify = Callable[[str], None]


def sample_from_reading(targets: Targets, site: Site, name: str, ra_deg: float,
                        dec_deg: float, coordinate_property: str, when,
                        pier_side: str = "") -> dict:
    """One sample (dict with the io.pointing_samples header keys) for star `name` whose
    mount reads (ra_deg, dec_deg) through `coordinate_property` at `when`; for a German
    mount with `pier_side` (the side found else, "": that of the axes' hour angle now), for
    an alt-az mount with the altitude and azimuth columns (module docstring)."""
    one = find_target(targets, name)
    result = positions(one, site, when)
    ctx = result.context
    ra_date, dec_date = ra_deg, dec_deg
    if coordinate_property == J2000_COORD:
        # J2000 reading -> of date, by the star's own J2000 and apparent places.
        ra_date, dec_date = shifted_place(
            ra_deg, dec_deg, _astrometric_j2000(result, one),
            (result["ra_apparent"][0], result["dec_apparent"][0]), date_from_j2000(ctx))
    ha_mount, dec_mount = axes_from_place_of_date(ra_date, dec_date,
                                                  ctx.site.last_rad * RAD_TO_DEG)
    sample = {"time": result.meta["time"], "name": str(name),
              "ha_target": float(result["ha"][0]),
              "dec_target": float(result["dec_observed"][0]),
              "ha_mount": float(ha_mount), "dec_mount": float(dec_mount)}
    mount_type = site.interlocks.mount.mount_type
    if mount_type == "german":
        sample["pier_side"] = pier_side or pier_side_of(site, float(ha_mount))
    elif mount_type == "altaz":
        # The axes' altitude and azimuth: the stage's own conversion (module docstring).
        alt_mount, az_mount = altaz_from_hadec(ha_mount, dec_mount, site.latitude)
        sample.update(alt_target=float(result["alt"][0]), az_target=float(result["az"][0]),
                      alt_mount=float(alt_mount), az_mount=float(az_mount))
    return sample


def sample_offsets_text(sample: dict, arcsec: str = " arcsec") -> str:
    """Mount minus star of a sample in arcsec (written `arcsec`: the app writes ″), with its
    pier side, for the user."""
    dha = wrap_ha(sample["ha_mount"] - sample["ha_target"]) * 3600.0
    ddec = (sample["dec_mount"] - sample["dec_target"]) * 3600.0
    text = (f"mount minus star {float(dha):+.1f}{arcsec} in hour angle, {ddec:+.1f}{arcsec} in "
            "declination")
    if "az_mount" in sample:
        daz = ((sample["az_mount"] - sample["az_target"] + 180.0) % 360.0 - 180.0) * 3600.0
        dalt = (sample["alt_mount"] - sample["alt_target"]) * 3600.0
        text += f" ({daz:+.1f}{arcsec} in azimuth, {dalt:+.1f}{arcsec} in altitude)"
    if sample.get("pier_side"):
        text += f", {sample['pier_side']} pier side"
    return text


def read_sample(scope: Telescope, targets: Targets, site: Site, name: str,
                slew_side: str = "") -> dict:
    """The sample for star `name` from what the mount reports now. A German mount's pier
    side: the device's TELESCOPE_PIER_SIDE, else slew_side (the side our check found for the
    slew, SlewReport.pointing.pier_side), else that of the axes' hour angle now."""
    status = scope.status()
    if status.ra_deg is None or status.dec_deg is None:
        raise MountFailed(f"device {scope.device} reports no coordinates to record")
    when = datetime.now(timezone.utc)
    side = SIDE_OF_INDI.get(scope.reported_pier_side(), slew_side)
    return sample_from_reading(targets, site, name, status.ra_deg, status.dec_deg,
                               status.coordinate_property, when, pier_side=side)


def record_star(scope: Telescope, targets: Targets, site: Site, name: str, *,
                confirm: Callable[[str], bool] | None = None, settle_s: float = 1.0,
                timeout_s: float = 120.0, track_s: float = 600.0,
                notify: Notify = print) -> dict | None:
    """Slew to star `name` (all interlocks), then record one sample: after `confirm(name)`
    returns True (the user centred it), or, without confirm, after settle_s seconds.
    None when the slew was aborted or the user skipped the star."""
    token = scope.begin_command()
    report = slew_to_target(scope, targets, site, name, wait=True, timeout_s=timeout_s,
                            track_s=track_s, token=token, notify=notify)
    if report.aborted:
        return None
    if report.final_state != "Ok":
        raise MountFailed(f"the slew to {name} ended {report.final_state}; nothing recorded")
    if confirm is None:
        time.sleep(settle_s)
    elif not confirm(name):
        return None
    if scope.aborted_since(token):  # stopped while being centred: not a centred star
        return None
    return read_sample(scope, targets, site, name, slew_side=report.pointing.pier_side)
