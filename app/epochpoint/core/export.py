"""Hand-off to the telescope: every target's coordinates at one instant in the frame a
controller expects, what those numbers mean, which targets the site may point at, and how
long the numbers stay good.

Frames:
- apparent: geocentric apparent place, true equator and equinox of date (what an INDI
  controller's EQUATORIAL_EOD_COORD takes);
- icrs: the rigorously propagated barycentric ICRS place at the instant (catalogue-style
  coordinates with the proper motion applied);
- observed: refracted altitude/azimuth and hour angle/declination at the site;
- mount: the observed place through a fitted pointing model (core.pointing_model.mount_frame):
  where the mount's axes must go (ha_mount, dec_mount) and the right ascension of date that
  brings a controller's axes there (ra_mount, with dec_mount; what EQUATORIAL_EOD_COORD takes
  from a controller without a model of its own). The interlocks then judge the sky place and
  the axes, and say which.

Interlocks: a target is refused when the site's interlocks (core.limits) forbid it at the
instant; the Sun's place for the avoidance check is the topocentric apparent place of date
from core.sunmoon.moon_track, compared with the target's apparent place of date. They are
checked once, at the export instant, at each target's place (the destination, not the path a
slew takes to it); the file says so (meta `interlocks_checked`).

Solar-system bodies (core/bodies/): in the apparent frame a body row carries its topocentric
apparent place of date at the site (what a controller at the site must be sent; the Moon's
differs from the geocentric one by up to a degree, stars' by nothing measurable), the place
`mount slew` sends; in the other frames the positions() columns (ICRS: the astrometric
geocentric direction). One place is not enough for something that moves, so the export of a
body carries a short ephemeris (core/export_ephemeris.py) and the validity window below is
that of the fixed stars, bounded by the ephemeris's span. The Sun as a target is refused
unless a solar filter is declared fitted (core.limits).

Validity window (coordinate accuracy only; the interlocks are not re-checked over it): how
long until the exported coordinates of the fastest-moving target change by more than the
tolerance, from a finite difference of the same computation (positions at the instant and one
step later): one hour for the apparent and ICRS places (space motion, aberration, precession
and nutation are slow and smooth over an hour), ten seconds for the observed place (the sky
turns about 15 arcsec per second, common practice), and for the mount frame, whose axes
follow the sky's turning.
"""
from __future__ import annotations

import io
import json
import os
import warnings

import numpy as np
from astropy.time import TimeDelta

from .columns import ColumnTable
from .constants import DEG_TO_RAD, RAD_TO_ARCSEC, RAD_TO_DEG
from .drift import MAX_TOLERANCE_ARCSEC
from .limits import MOUNT_TYPE_NAMES
from .pointing_model.mount_frame import mount_axes, place_of_date
from .positions import COLUMN_UNITS, positions
from .ranges import checked
from .site import Site
from .sunmoon import moon_track
from .targets import Targets
from .timescale import iso_z, parse_time
from .vectors import separation, unit_vectors

FRAMES = ("apparent", "icrs", "observed", "mount")
EXPORT_FORMATS = ("csv", "json", "votable")
# Exported columns per frame (names and units as in core.positions).
FRAME_COLUMNS = {
    "apparent": ("ra_apparent", "dec_apparent"),
    "icrs": ("ra_propagated", "dec_propagated", "pm_ra_cosdec_propagated",
             "pm_dec_propagated"),
    "observed": ("alt", "az", "ha", "dec_observed"),
    "mount": ("ra_mount", "dec_mount", "ha_mount"),
}
# Finite-difference steps for the validity window, seconds.
VALIDITY_STEP_S = {"apparent": 3600.0, "icrs": 3600.0, "observed": 10.0, "mount": 10.0}
# Pairs of exported (longitude, latitude) columns whose on-sky motion limits the validity.
_MOVING_PAIRS = {
    "apparent": (("ra_apparent", "dec_apparent"),),
    "icrs": (("ra_propagated", "dec_propagated"),),
    "observed": (("az", "alt"), ("ha", "dec_observed")),
    "mount": (("ha_mount", "dec_mount"),),
}
_SPACE_MOTION = ("space motion from the catalogue epoch (rigorous propagation of position, "
                 "proper motion, parallax and radial velocity)")
_APPARENT_STEPS = ("annual parallax; light deflection by the Sun; annual aberration; frame "
                   "bias, precession and nutation (IAU 2006/2000A)")
CORRECTIONS = {
    "apparent": f"{_SPACE_MOTION}; {_APPARENT_STEPS}",
    "icrs": f"{_SPACE_MOTION} only: barycentric, no parallax, deflection, aberration, "
            "precession or nutation",
    "observed": f"{_SPACE_MOTION}; {_APPARENT_STEPS}; Earth rotation and polar motion; "
                "diurnal aberration; atmospheric refraction",
    "mount": f"{_SPACE_MOTION}; {_APPARENT_STEPS}; Earth rotation and polar motion; diurnal "
             "aberration; atmospheric refraction; the pointing model's terms (observed place "
             "-> mount axes); the axes' hour angle as right ascension of date (local apparent "
             "sidereal time minus hour angle)",
}


def sun_separation_deg(site: Site, when, ra_apparent_deg, dec_apparent_deg) -> np.ndarray:
    """Angle (deg) between each apparent place of date and the Sun seen from the site."""
    track = moon_track(site, parse_time(when).reshape((1,)))
    sun = unit_vectors(track.sun_ra_deg * DEG_TO_RAD, track.sun_dec_deg * DEG_TO_RAD)
    stars = unit_vectors(np.asarray(ra_apparent_deg, dtype=float) * DEG_TO_RAD,
                         np.asarray(dec_apparent_deg, dtype=float) * DEG_TO_RAD)
    return separation(stars, sun) / DEG_TO_RAD


def refusals(result, site: Site, sun_deg=None, is_sun=False) -> np.ndarray:
    """Why the site's interlocks refuse each target of a positions() result ('' if allowed).

    sun_deg: the targets' separations from the Sun when already computed; is_sun: which
    targets are the Sun itself (sun_rows).
    """
    if sun_deg is None:
        sun_deg = sun_separation_deg(site, result.context.time, result["ra_apparent"],
                                     result["dec_apparent"])
    return site.interlocks.violations(result["alt"], result["az"], result["ha"],
                                      result["dec_observed"], sun_deg, is_sun=is_sun)


def sun_rows(targets: Targets) -> np.ndarray:
    """Which rows of `targets` are the Sun (a `body` cell naming it)."""
    out = np.zeros(len(targets), dtype=bool)
    body = {k.strip().lower(): v for k, v in targets.extra.items()}.get("body")
    if body is not None:
        out[:] = [str(b).strip().lower() == "sun" for b in np.asarray(body, dtype=object)]
    return out


def placed(targets: Targets, site: Site, when):
    """positions() of the targets at `when`, with the body rows' ra_apparent, dec_apparent
    replaced by their topocentric apparent place of date at the site (see the module
    docstring); the table keeps the result's `context`. Bodies cost one light-time solution
    each on the same context."""
    result = positions(targets, site, when)
    from .bodies.rows import sources_of

    rows, sources = sources_of(targets)
    if not len(rows):
        return result
    from .body_track import apparent_of_date

    ra, dec = np.array(result["ra_apparent"], float), np.array(result["dec_apparent"], float)
    ra_topo, dec_topo, _ = apparent_of_date(sources, [result.context])
    ra[rows], dec[rows] = ra_topo[:, 0], dec_topo[:, 0]
    table = ColumnTable({**{k: result[k] for k in result}, "ra_apparent": ra,
                         "dec_apparent": dec}, result.meta, result.units)
    table.context = result.context
    return table


def mount_columns(result, site: Site, model, is_sun=False) -> tuple[ColumnTable, np.ndarray]:
    """The mount frame of a positions() result (name, ra_mount, dec_mount, ha_mount, degrees)
    by a pointing model, and why the interlocks refuse each target's axes ('' if allowed;
    is_sun: which targets are the Sun itself, as for `refusals`)."""
    axes = mount_axes(model, result["ha"], result["dec_observed"], result["alt"],
                      result["az"], site.latitude)
    ra, dec = place_of_date(axes.ha, axes.dec, result.context.site.last_rad * RAD_TO_DEG)
    sun_deg = sun_separation_deg(site, result.context.time, ra, dec)
    why = site.interlocks.violations(axes.alt, axes.az, axes.ha, axes.dec, sun_deg,
                                     is_sun=is_sun)
    table = ColumnTable({"name": result["name"], "ra_mount": ra, "dec_mount": dec,
                         "ha_mount": axes.ha})
    return table, why


def _both_places(sky, axes) -> np.ndarray:
    """One reason per target naming which place the interlocks refuse: the sky place, the
    commanded axes, or both."""
    out = np.full(sky.shape, "", dtype=object)
    for k, (a, b) in enumerate(zip(sky, axes)):
        out[k] = "; ".join([f"sky place {a}"] * bool(a) + [f"commanded axes {b}"] * bool(b))
    return out


def _motion_arcsec(frame: str, now, later) -> np.ndarray:
    """Largest on-sky change (arcsec) of each target's exported coordinate pairs."""
    largest = np.zeros(now.nrows)
    for lon, lat in _MOVING_PAIRS[frame]:
        a = unit_vectors(now[lon] * DEG_TO_RAD, now[lat] * DEG_TO_RAD)
        b = unit_vectors(later[lon] * DEG_TO_RAD, later[lat] * DEG_TO_RAD)
        largest = np.maximum(largest, separation(a, b) * RAD_TO_ARCSEC)
    return largest


def validity(targets: Targets, site: Site, when, result, frame: str,
             tolerance_arcsec: float, model=None):
    """(seconds until the fastest target moves by the tolerance, its name, its rate "/s).

    result: the positions of `targets` at `when` (the mount frame's columns for frame
    'mount', with the model that made them). The rate is the on-sky change of the
    exported coordinates over VALIDITY_STEP_S divided by the step. Seconds is inf when
    nothing moves (or there are no targets).
    """
    if len(targets) == 0:
        return float("inf"), None, 0.0
    step_s = VALIDITY_STEP_S[frame]
    later_time = parse_time(when) + TimeDelta(step_s, format="sec")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the staleness warning was given for the instant
        later = positions(targets, site if frame in ("observed", "mount") else None,
                          later_time)
        if frame == "mount":
            later, _ = mount_columns(later, site, model)
    rate = _motion_arcsec(frame, result, later) / step_s
    fastest = int(np.argmax(rate))
    seconds = tolerance_arcsec / rate[fastest] if rate[fastest] > 0.0 else float("inf")
    return float(seconds), str(result["name"][fastest]), float(rate[fastest])


def _frame_text(frame: str, time_iso: str, site: Site) -> str:
    if frame == "apparent":
        return f"true equator and equinox of date {time_iso}"
    if frame == "icrs":
        return f"ICRS, epoch {time_iso} (propagated)"
    if frame == "mount":
        return (f"mount axes (hour angle, declination) by the pointing model, and the right "
                f"ascension of date that commands them at {time_iso}, from the observed place "
                f"({_frame_text('observed', time_iso, site)})")
    if site.pressure == 0.0:
        weather = "no refraction (pressure 0)"
    else:
        weather = (f"{site.pressure:.1f} hPa, {site.temperature:.1f} C, relative humidity "
                   f"{site.humidity:.2f}, wavelength {site.wavelength:.2f} um")
    return f"observed alt/az and HA/Dec at the site, refracted with {weather}"


def _interlocks_text(site: Site) -> str:
    lock = site.interlocks
    mount = lock.mount
    parts = [f"minimum altitude {mount.min_altitude:g} deg"]
    if lock.horizon is not None:
        parts.append("horizon mask")
    parts += [f"hour angle -{mount.ha_east:g} h to +{mount.ha_west:g} h",
              f"declination {mount.dec_min:g} to {mount.dec_max:g} deg",
              f"Sun avoidance {lock.sun_avoidance:g} deg"]
    return "; ".join(parts)


def export_positions(targets: Targets, site: Site, when, frame: str, include_all: bool = False,
                     tolerance_arcsec: float = 1.0, model=None,
                     model_source: str = "") -> ColumnTable:
    """Coordinates to hand to a telescope controller, with their metadata.

    frame: 'apparent', 'icrs', 'observed' or 'mount' (which needs `model`, a
    core.pointing_model.PointingModel; model_source names its file in the meta, with its
    figures). Targets the interlocks refuse at `when` are left
    out unless include_all, which keeps them with a `refused` column giving the reason ('' for
    allowed targets). meta holds time, frame, frame_description, corrections, site, mount
    type, interlocks and when they were checked, and the validity window (valid_for_s,
    valid_until, validity_basis, validity_scope); units the column units.
    Cost: two positions() calls and one Sun place.
    """
    if frame not in FRAMES:
        raise ValueError(f"frame {frame!r} is not one of {', '.join(FRAMES)}")
    tolerance = checked(tolerance_arcsec, "tolerance", 0.0, MAX_TOLERANCE_ARCSEC, lo_open=True,
                        hi_open=True, unit="arcsec")
    if frame == "mount" and model is None:
        raise ValueError("the mount frame needs a pointing model (--model MODEL.json, from "
                         "epochpoint pointing fit)")
    result = placed(targets, site, when)
    is_sun = sun_rows(targets)
    reasons = refusals(result, site, is_sun=is_sun)
    table = result
    if frame == "mount":
        table, axes_reasons = mount_columns(result, site, model, is_sun=is_sun)
        reasons = _both_places(reasons, axes_reasons)
    keep = np.ones(len(targets), bool) if include_all else reasons == ""
    rows = np.flatnonzero(keep)
    exported = targets[rows]
    shown = table.select(rows)
    instant = result.context.time
    # Fixed stars set the validity window; bodies are carried by their ephemeris.
    from .bodies.rows import sources_of
    from .export_ephemeris import body_ephemeris

    body_idx, _ = sources_of(exported)
    stars = np.setdiff1d(np.arange(len(rows)), body_idx)
    seconds, fastest, rate = validity(exported[stars], site, instant, shown.select(stars),
                                      frame, tolerance, model)
    # The ephemeris is given for the bodies the interlocks allow (a refused one is listed
    # with --all, without an ephemeris to point by).
    allowed_bodies = body_idx[reasons[rows][body_idx] == ""]
    ephemeris = None
    if len(allowed_bodies):
        ephemeris = body_ephemeris(exported[allowed_bodies], site, instant, frame, tolerance,
                                   model=model)

    columns = {"name": shown["name"]}
    columns.update({c: shown[c] for c in FRAME_COLUMNS[frame]})
    if include_all:
        columns["refused"] = reasons[rows]
    time_iso = result.meta["time"]
    meta = {"time": time_iso, "frame": frame,
            "frame_description": _frame_text(frame, time_iso, site),
            "corrections": CORRECTIONS[frame]}
    meta.update({k: result.meta[k] for k in ("site", "latitude", "longitude", "height",
                                              "timezone", "timezone_source")})
    meta["mount_type"] = MOUNT_TYPE_NAMES[site.interlocks.mount.mount_type]
    meta["interlocks"] = _interlocks_text(site)
    meta["cautions"] = site.interlocks.cautions()  # the solar caution with the option on
    meta["interlocks_checked"] = (f"at the export instant {time_iso} only, at each target's "
                                  "exported place (the destination, not the path of a slew); "
                                  "check again before pointing at any later time")
    meta.update(targets_allowed=int(np.count_nonzero(reasons == "")),
                targets_refused=int(np.count_nonzero(reasons != "")),
                targets_distance_unknown=int(np.count_nonzero(exported.distance_unknown)),
                tolerance_arcsec=tolerance)
    meta.update(_validity_meta(frame, instant, seconds, fastest, rate, tolerance,
                               exported=len(stars) > 0))
    if ephemeris is not None:
        meta.update(ephemeris.meta)
        span = ephemeris.meta["ephemeris_span_s"]
        if meta["valid_for_s"] is None or meta["valid_for_s"] > span:
            meta["valid_for_s"] = span
            meta["valid_until"] = iso_z(instant + TimeDelta(span, format="sec"))
            meta["validity_basis"] = (f"the span of the bodies' ephemeris ({span:g} s); "
                                      f"fixed stars: {meta['validity_basis']}")
        else:
            meta["validity_basis"] += "; bodies: their ephemeris covers the window"
    if frame == "mount":
        meta.update(model_file=model_source, model_mount_type=model.mount_type,
                    model_terms=", ".join(f"{n} {v:.2f} arcsec" for n, v in model.values.items()),
                    model_rms_before_arcsec=_finite_or_none(model.rms_before_arcsec),
                    model_rms_after_arcsec=_finite_or_none(model.rms_after_arcsec),
                    model_samples=model.samples)
    if "earth_orientation_warning" in result.meta:
        meta["earth_orientation_warning"] = result.meta["earth_orientation_warning"]
    units = {c: COLUMN_UNITS.get(c, "deg") for c in FRAME_COLUMNS[frame]}
    out = ColumnTable(columns, meta, units)
    out.ephemeris = ephemeris  # a ColumnTable of the bodies' ephemeris rows, or None
    return out


def _finite_or_none(value: float):
    return float(value) if np.isfinite(value) else None


def _validity_meta(frame, t, seconds, fastest, rate, tolerance, exported: bool) -> dict:
    scope = ("coordinate accuracy only: the interlocks were checked at the export instant, "
             "not over the validity window")
    if not np.isfinite(seconds):
        why = "no exported target moves in this frame" if exported else "no target exported"
        return {"valid_for_s": None, "valid_until": "unlimited", "validity_basis": why,
                "validity_scope": scope}
    turning = frame in ("observed", "mount")
    per = "arcsec per second" if turning else "arcsec per hour"
    shown_rate = rate if turning else rate * 3600.0
    basis = (f"{tolerance:g} arcsec / {shown_rate:.6g} {per}, the largest on-sky change of "
             f"the exported coordinates (target {fastest}) over "
             f"{VALIDITY_STEP_S[frame]:g} s")
    if turning:
        basis = "the sky turns about 15 arcsec per second: " + basis
    until = iso_z(t + TimeDelta(min(seconds, 1e4 * 86400.0 * 365.25), format="sec"))
    return {"valid_for_s": seconds, "valid_until": until, "validity_basis": basis,
            "validity_scope": scope}


# -- files ------------------------------------------------------------------------------------

def export_text(table: ColumnTable, format: str) -> str:
    """The text of an export in one of EXPORT_FORMATS, metadata included in every format.

    csv: `# key: value` lines, then the table. json: {"meta", "units", "targets": [rows]}.
    votable: IVOA VOTable 1.4 through astropy; every meta item as an INFO of the resource,
    the numeric ones also as PARAMs of the table (with units).
    """
    from ..io.results import result_csv, result_json

    columns = dict(table)
    ephemeris = getattr(table, "ephemeris", None)
    if format == "csv":
        if ephemeris is not None:
            columns = _with_ephemeris_rows(table, ephemeris)
        return result_csv(columns, {k: _meta_text(v) for k, v in table.meta.items()})
    if format == "json":
        document = {"meta": table.meta, "units": table.units,
                    "targets": json.loads(result_json(columns))}
        if ephemeris is not None:
            document["ephemeris_units"] = ephemeris.units
            document["ephemeris"] = json.loads(result_json(dict(ephemeris)))
        return json.dumps(document, indent=1, allow_nan=False) + "\n"
    if format == "votable":
        return _votable_text(table)
    raise ValueError(f"unknown export format {format!r} (use {', '.join(EXPORT_FORMATS)})")


def _meta_text(value):
    """A meta value for a one-line slot (a CSV comment, a VOTable INFO): None as empty, a
    list (the cautions) as its items joined by ' | '."""
    if value is None:
        return ""
    if isinstance(value, list):
        return " | ".join(str(v) for v in value)
    return value


def _with_ephemeris_rows(table: ColumnTable, ephemeris: ColumnTable) -> dict:
    """CSV columns: the targets' rows (`row` = place, at the export instant), then the
    bodies' ephemeris rows (`row` = ephemeris), one table; cells a row kind lacks are empty."""
    n, m = table.nrows, ephemeris.nrows
    names = list(dict.fromkeys(["row", "name", "time", *table, *ephemeris]))
    out = {}
    for c in names:
        if c == "row":
            out[c] = np.array(["place"] * n + ["ephemeris"] * m, dtype=object)
        elif c == "time":
            out[c] = np.array([table.meta["time"]] * n + list(ephemeris["time"]), dtype=object)
        else:
            a = table[c] if c in table else None
            b = ephemeris[c] if c in ephemeris else None
            numeric = all(x is None or np.asarray(x).dtype.kind == "f" for x in (a, b))
            fill = (np.full(n, np.nan) if numeric else np.full(n, "", dtype=object)) \
                if a is None else np.asarray(a)
            more = (np.full(m, np.nan) if numeric else np.full(m, "", dtype=object)) \
                if b is None else np.asarray(b)
            out[c] = np.concatenate([fill.astype(object) if not numeric else fill,
                                     more.astype(object) if not numeric else more])
    return out


_PARAM_UNITS = {"tolerance_arcsec": "arcsec", "valid_for_s": "s", "latitude": "deg",
                "longitude": "deg", "height": "m", "model_rms_before_arcsec": "arcsec",
                "model_rms_after_arcsec": "arcsec"}


def _votable_text(table: ColumnTable) -> str:
    from astropy.io.votable import from_table
    from astropy.io.votable.tree import Info, Param

    from ..io.results import result_table

    votable = from_table(result_table(dict(table), {}, table.units))
    resource, vo_table = votable.resources[0], votable.resources[0].tables[0]
    ephemeris = getattr(table, "ephemeris", None)
    if ephemeris is not None:
        # The bodies' ephemeris as a second table of the resource, named "ephemeris".
        extra = from_table(result_table(dict(ephemeris), {}, ephemeris.units))
        second = extra.resources[0].tables[0]
        second.name = second.ID = "ephemeris"
        resource.tables.append(second)
    for key, value in table.meta.items():
        resource.infos.append(Info(name=key, value=str(_meta_text(value))))
        if isinstance(value, (int, float)) and not isinstance(value, bool) and \
                np.isfinite(value):
            datatype = "int" if isinstance(value, int) else "double"
            vo_table.params.append(Param(votable, ID=f"param_{key}", name=key,
                                         datatype=datatype, value=value,
                                         unit=_PARAM_UNITS.get(key)))
    out = io.BytesIO()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # VOTable notes on names that are not XML IDs
        # astropy's pure-Python TABLEDATA writer, as io.astropytables explains.
        votable.to_xml(out, _debug_python_based_parser=True)
    return out.getvalue().decode("utf-8")


def write_export(table: ColumnTable, path, format: str) -> None:
    """Save an export atomically (temporary file in the same folder, fsync, rename)."""
    from ..io import InputError, atomic_write_text

    text = export_text(table, format)
    try:
        atomic_write_text(path, text)
    except OSError as err:
        raise InputError(os.fspath(path), f"cannot be written ({err.strerror or err})") from None
