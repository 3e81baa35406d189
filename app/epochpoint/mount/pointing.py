"""Where to point the mount for one target now, and whether the site allows it.

A controller that takes coordinates of date (INDI EQUATORIAL_EOD_COORD) gets the geocentric
apparent place, true equator and equinox of date (core.positions). A controller that only
takes J2000 coordinates (INDI EQUATORIAL_COORD) gets the geocentric astrometric place: the
propagated ICRS direction with annual parallax applied (SOFA pmpx) and rotated by the IAU 2006
frame bias (ERFA bp06) onto the mean equator and equinox of J2000.0; aberration, deflection,
precession and nutation are then the controller's to apply. The interlocks are the site's
(core.limits), with the Sun seen from the site (core.export.refusals).

A solar-system body (core/bodies/) is sent its topocentric apparent place of date at the site
(core.export.placed: the Moon's differs from its geocentric place by up to a degree, which a
controller, knowing no distances, cannot correct), or on J2000 its topocentric astrometric
direction rotated by the frame bias; its apparent rates (arcsec/s, seen from the site) come
with it for the tracking rate. The Sun is refused unless a solar filter is declared fitted.

With a pointing model the mount-frame stage (core.pointing_model.mount_frame) turns the
observed place into where the mount's axes must go and those axes into the coordinates of date
to send; the J2000 coordinates for them are the target's J2000 place moved by the same small
offset, rotated from the equator of date to the mean equator of J2000.0 (IAU 2006/2000A: ERFA
pnm06a and bp06); the aberration left out of that offset changes by under 0.4 arcsec per degree
of offset (the annual aberration's 20.5 arcsec times the offset in radians). The interlocks then
judge the sky place and the commanded axes, and say which one they refuse.

For a German equatorial mount the place comes with the pier side a slew to it takes (that of
the hour angle, with a model the commanded axes'; core.pointing_model.pier_sides), or the side
given, on which a German model (mount type "german") corrects; before a slew mount.telescope
finds the side at the slew's estimated end and checks the meridian limit over the track.

Cost: one positions() call for one star plus one Sun place, about 10 ms.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np

from ..core.apparent import apply_parallax, rotate
from ..core.constants import DEG_TO_RAD, RAD_TO_DEG
from ..core.export import placed, refusals, sun_rows, sun_separation_deg
from ..core.pointing_model.mount_frame import mount_axes, pier_side_for, place_of_date
from ..core.site import Site
from ..core.targets import Targets
from ..core.vectors import to_spherical, unit_vectors


@dataclass(frozen=True)
class Pointing:
    """One target's place for the mount at one instant (degrees; time ISO 8601 UTC)."""

    name: str
    time: str
    ra_apparent_deg: float  # geocentric apparent, true equator and equinox of date
    dec_apparent_deg: float
    ra_j2000_deg: float  # geocentric astrometric, mean equator and equinox of J2000.0
    dec_j2000_deg: float
    alt_deg: float  # observed (refracted) at the site
    az_deg: float
    ha_deg: float
    dec_observed_deg: float
    sun_separation_deg: float
    refusal: str  # why the interlocks forbid it; '' when allowed
    # With a pointing model: where the axes must go (ha, dec) and what is sent for them.
    axes_deg: tuple | None = None
    command_eod_deg: tuple | None = None  # (RA, Dec) of date
    command_j2000_deg: tuple | None = None  # (RA, Dec), mean equator and equinox of J2000.0
    # A solar-system body: its source (core.bodies.sources) and apparent rates seen from the
    # site (arcsec/s, true equator of date; rate_ra including cos Dec).
    source: object = None
    rate_ra_arcsec_s: float = float("nan")
    rate_dec_arcsec_s: float = float("nan")
    is_sun: bool = False
    # A German mount: the pier side a slew to this place takes, "east" (target east of the
    # meridian) or "west" (core.pointing_model.pier_sides; with a model, the commanded axes'
    # hour angle); before a slew, mount.telescope.checked_track makes it the side at the
    # slew's estimated end. "" for other mounts.
    pier_side: str = ""

    @property
    def is_body(self) -> bool:
        return self.source is not None

    @property
    def allowed(self) -> bool:
        return self.refusal == ""


def find_target(targets: Targets, name: str) -> Targets:
    """The one target called `name` (ValueError naming a few others when absent)."""
    names = targets.names()
    rows = np.flatnonzero(names == name)
    if rows.size == 0:
        sample = ", ".join(str(n) for n in names[:5])
        more = ", ..." if len(names) > 5 else ""
        raise ValueError(f"no target named {name!r} in the list (it has {sample}{more})")
    if rows.size > 1:
        raise ValueError(f"{rows.size} targets are named {name!r}; names must be unique "
                         "to point at one")
    return targets[rows]


def _astrometric_j2000(result, one: Targets) -> tuple[float, float]:
    """Geocentric astrometric place on the mean equator and equinox of J2000.0 (degrees)."""
    ctx = result.context
    u_bcrs = unit_vectors(result["ra_propagated"] * DEG_TO_RAD,
                          result["dec_propagated"] * DEG_TO_RAD)
    # Annual parallax: the direction from the geocentre.
    p_astrometric = apply_parallax(u_bcrs, result["parallax_propagated"], ctx.earth_bary_au)
    # ICRS -> mean J2000.0 (IAU 2006 frame bias, about 23 mas).
    frame_bias, _, _ = erfa.bp06(*ctx.tt)
    ra, dec = to_spherical(rotate(np.asarray(frame_bias), p_astrometric))
    return float(ra[0] * RAD_TO_DEG), float(dec[0] * RAD_TO_DEG)


def date_from_j2000(ctx) -> np.ndarray:
    """Rotation from the mean equator and equinox of J2000.0 to the true equator and equinox
    of date (ERFA pnm06a times the transpose of the frame bias bp06)."""
    frame_bias, _, _ = erfa.bp06(*ctx.tt)
    return ctx.npb_true_of_date @ np.asarray(frame_bias).T


def shifted_place(ra_deg, dec_deg, base_from, base_to, rotation) -> tuple[float, float]:
    """A place near base_from (ra, dec) carried into base_to's frame: base_to plus the small
    offset from base_from, rotated by `rotation` (see the module docstring)."""
    def u(ra, dec):
        return unit_vectors(np.atleast_1d(ra) * DEG_TO_RAD, np.atleast_1d(dec) * DEG_TO_RAD)

    moved = u(*base_to) + np.asarray(rotation) @ (u(ra_deg, dec_deg) - u(*base_from))
    ra, dec = to_spherical(moved / np.linalg.norm(moved, axis=0))
    return float(ra[0] * RAD_TO_DEG) % 360.0, float(dec[0] * RAD_TO_DEG)


def pointing_for(targets: Targets, site: Site, name: str, when="now", model=None,
                 pier_side: str = "") -> Pointing:
    """The place to send for target `name` at `when`, with the interlocks' verdict; with a
    pointing model (core.pointing_model.PointingModel) the place its axes need. pier_side
    ("east"/"west"): the side a German mount will be on (mount.telescope.checked_track finds
    it for the slew's end), which a German model corrects on; "" for the side a slew to the
    place now takes."""
    one = find_target(targets, name)
    result = placed(one, site, when)
    source = _body_source(one)
    if source is None:
        ra_j2000, dec_j2000 = _astrometric_j2000(result, one)
        body_fields = {}
    else:
        ra_j2000, dec_j2000 = _body_j2000(source, result.context)
        body_fields = dict(source=source, rate_ra_arcsec_s=float(result["rate_ra"][0]),
                           rate_dec_arcsec_s=float(result["rate_dec"][0]),
                           is_sun=bool(sun_rows(one)[0]))
    sun_deg = sun_separation_deg(site, result.context.time, result["ra_apparent"],
                                 result["dec_apparent"])
    refusal = str(refusals(result, site, sun_deg, is_sun=sun_rows(one))[0])
    model_fields = {}
    if model is not None:
        ctx = result.context
        # Observed place -> the model's axes -> the coordinates of date for those axes.
        axes = mount_axes(model, result["ha"], result["dec_observed"], result["alt"],
                          result["az"], site.latitude,
                          pier_side=pier_side if pier_side and model.german else None)
        ra_cmd, dec_cmd = place_of_date(axes.ha, axes.dec, ctx.site.last_rad * RAD_TO_DEG)
        command_eod = (float(ra_cmd[0]), float(dec_cmd[0]))
        command_j2000 = shifted_place(*command_eod, (result["ra_apparent"][0],
                                                     result["dec_apparent"][0]),
                                      (ra_j2000, dec_j2000), date_from_j2000(ctx).T)
        # The interlocks judge the commanded axes too, and say which place they refuse.
        sun_axes = sun_separation_deg(site, ctx.time, ra_cmd, dec_cmd)
        axes_refusal = str(site.interlocks.violations(axes.alt, axes.az, axes.ha, axes.dec,
                                                      sun_axes, is_sun=sun_rows(one))[0])
        refusal = "; ".join([f"sky place {refusal}"] * bool(refusal)
                            + [f"commanded axes {axes_refusal}"] * bool(axes_refusal))
        model_fields = dict(axes_deg=(float(axes.ha[0]), float(axes.dec[0])),
                            command_eod_deg=command_eod, command_j2000_deg=command_j2000)
        if not pier_side and axes.pier_side is not None:  # the side a German model chose
            pier_side = str(np.ravel(axes.pier_side)[0])
    ha_axes = model_fields["axes_deg"][0] if model_fields else float(result["ha"][0])
    return Pointing(
        name=str(name), time=result.meta["time"],
        ra_apparent_deg=float(result["ra_apparent"][0]),
        dec_apparent_deg=float(result["dec_apparent"][0]),
        ra_j2000_deg=ra_j2000, dec_j2000_deg=dec_j2000,
        alt_deg=float(result["alt"][0]), az_deg=float(result["az"][0]),
        ha_deg=float(result["ha"][0]), dec_observed_deg=float(result["dec_observed"][0]),
        sun_separation_deg=float(sun_deg[0]), refusal=refusal,
        pier_side=pier_side or pier_side_of(site, ha_axes), **model_fields, **body_fields)


def pier_side_of(site: Site, ha_axes_deg: float) -> str:
    """The pier side ("east"/"west") a German mount takes for axes at this hour angle (deg;
    core.pointing_model.pier_sides); "" for other mounts."""
    if site.interlocks.mount.mount_type != "german":
        return ""
    return str(pier_side_for(float(ha_axes_deg)))


def _body_source(one: Targets):
    """The source of a one-row Targets that is a solar-system body, else None."""
    from ..core.bodies.rows import sources_of

    _, sources = sources_of(one)
    return sources[0] if sources else None


def _body_j2000(source, ctx) -> tuple[float, float]:
    """A body's topocentric astrometric direction (light time, no aberration or deflection)
    on the mean equator and equinox of J2000.0 (ERFA bp06 frame bias), degrees."""
    from ..core.body_track import apparent_of_date

    _, _, places = apparent_of_date([source], [ctx])
    frame_bias, _, _ = erfa.bp06(*ctx.tt)
    ra, dec = to_spherical(np.asarray(frame_bias) @ places[0].u_astrometric)
    return float(ra[0] * RAD_TO_DEG) % 360.0, float(dec[0] * RAD_TO_DEG)
