"""Positions at an instant: catalogue targets carried to the propagated, apparent and observed
place, with drift, error ellipses and (on request) the correction ledger.

The per-instant context is built once; stars are processed in chunks of CHUNK_SIZE so memory
stays bounded (a few hundred bytes per star of scratch) for catalogues of any size.
"""
from __future__ import annotations

import os
import warnings
from collections import deque
from concurrent.futures import ThreadPoolExecutor
from functools import cached_property

import numpy as np

from . import kernels
from .columns import ColumnTable
from .apparent import geocentric_direction, rotate
from .constants import RAD_TO_ARCSEC, RAD_TO_DEG
from .context import AstrometryContext, make_context
from .observed import observed_place
from .site import Site
from .spacemotion import propagate
from .uncertainty import ELLIPSE_COLUMNS, error_ellipse_at
from .targets import Targets
from .timescale import iso_z
from .vectors import chord_separation, separation, to_spherical

CHUNK_SIZE = 8192

# Units of the result columns, for files and for people.
COLUMN_UNITS = {
    "ra_propagated": "deg", "dec_propagated": "deg",
    "pm_ra_cosdec_propagated": "mas/yr", "pm_dec_propagated": "mas/yr",
    "parallax_propagated": "mas", "radial_velocity_propagated": "km/s",
    "ra_apparent": "deg", "dec_apparent": "deg", "ra_cirs": "deg", "dec_cirs": "deg",
    "ha": "deg", "dec_observed": "deg", "alt": "deg", "az": "deg", "airmass": "",
    "parallactic_angle": "deg", "drift": "arcsec",
    "error_major": "mas", "error_minor": "mas", "error_pa": "deg",
}
LEDGER_COLUMNS = ("ledger_space_motion", "ledger_parallax", "ledger_light_deflection",
                  "ledger_annual_aberration", "ledger_precession_nutation",
                  "ledger_diurnal_aberration", "ledger_refraction")
COLUMN_UNITS.update({name: "arcsec" for name in LEDGER_COLUMNS})
SITE_COLUMNS = ("ha", "dec_observed", "alt", "az", "airmass", "parallactic_angle")
SITE_LEDGER = ("ledger_diurnal_aberration", "ledger_refraction")
BASE_COLUMNS = ("ra_propagated", "dec_propagated", "pm_ra_cosdec_propagated",
                "pm_dec_propagated", "parallax_propagated", "radial_velocity_propagated",
                "ra_apparent", "dec_apparent", "ra_cirs", "dec_cirs", "drift")
WORKERS = max(1, min(4, os.cpu_count() or 1))


def _context_meta(ctx: AstrometryContext) -> dict:
    """What the numbers mean: instant, site, weather, frames, warnings."""
    meta = {"time": iso_z(ctx.time),
            "frame_propagated": "ICRS (barycentric), at the time",
            "frame_apparent": "geocentric apparent, true equator and equinox of date",
            "frame_cirs": "geocentric apparent, CIRS"}
    if ctx.site is not None:
        s = ctx.site.site
        meta.update(site=s.name or f"{s.latitude:.6f},{s.longitude:.6f},{s.height:.1f}",
                    latitude=s.latitude, longitude=s.longitude, height=s.height,
                    pressure_hpa=s.pressure, temperature_c=s.temperature,
                    humidity=s.humidity, wavelength_um=s.wavelength, timezone=s.timezone,
                    timezone_source=s.timezone_source)
    if ctx.eop_warning:
        meta["earth_orientation_warning"] = ctx.eop_warning
    return meta


class Positions(ColumnTable):
    """Result columns (name -> numpy array, degrees/arcsec) with the context they belong to."""

    def __init__(self, columns: dict, context: AstrometryContext):
        super().__init__(columns, _context_meta(context), COLUMN_UNITS)
        self.context = context


class PositionChunks:
    """Positions computed chunk by chunk: `meta`, `units` and `names` at once, then iterating
    yields one mapping name -> array per chunk of targets, in target order.

    Chunks run on all cores (numpy releases the GIL), at most WORKERS + 1 ahead of the
    reader, so memory holds a few chunks whatever the number of targets; the per-instant
    context is computed once. At least one chunk is yielded (empty when there are no targets).
    """

    def __init__(self, targets: Targets, site: Site | None, when, *, ledger: bool = False,
                 context: AstrometryContext | None = None, chunk_size: int = CHUNK_SIZE,
                 engine: str | None = None):
        self.targets, self.ledger, self.chunk_size = targets, ledger, max(1, int(chunk_size))
        # The compiled chain or the numpy reference path (kernels.use_kernel).
        self.use_kernel = kernels.use_kernel(len(targets), engine, ledger=ledger)
        self.context = ctx = context if context is not None else make_context(when, site)
        self.computed = list(BASE_COLUMNS)
        if ctx.site is not None:
            self.computed += list(SITE_COLUMNS)
        if ledger:
            self.computed += [c for c in LEDGER_COLUMNS
                              if ctx.site is not None or c not in SITE_LEDGER]
        self.names = ["name"] + self.computed
        if targets.has_errors:
            self.names += list(ELLIPSE_COLUMNS)
        self.units = {k: v for k, v in COLUMN_UNITS.items() if k in self.names}
        # Solar-system rows (core/bodies/) add their columns; DE421 is read only for them.
        self.has_bodies, self.body_warnings = _has_body_columns(targets), []
        # How many targets have no known distance, when a computed column already tells.
        self.distances_unknown = None
        if self.has_bodies:
            from .bodies.columns import BODY_COLUMNS_OUT, BODY_UNITS, body_warnings
            self.names += list(BODY_COLUMNS_OUT)
            self.units.update(BODY_UNITS)
            self.body_warnings = body_warnings(targets, ctx)
            for note in self.body_warnings:
                warnings.warn(note, stacklevel=3)

    @cached_property
    def meta(self) -> dict:
        """The context's meta, made when first read (a site's zone may have to be found)."""
        meta = _context_meta(self.context)
        # Targets without a known distance get no annual parallax (ledger_parallax NaN).
        meta["targets_distance_unknown"] = (
            self.distances_unknown if self.distances_unknown is not None
            else int(np.count_nonzero(self.targets.distance_unknown)))
        if self.body_warnings:
            meta["body_warnings"] = list(self.body_warnings)
        return meta

    def spans(self) -> list:
        n = len(self.targets)
        return [slice(start, min(start + self.chunk_size, n))
                for start in range(0, n, self.chunk_size)] or [slice(0, 0)]

    def chunk(self, rows: slice) -> dict:
        """Every column for the targets in `rows` (a slice)."""
        part = self.targets[rows]
        out = {"name": part.names()}
        if self.use_kernel:
            out.update(kernels.chain_columns(part, self.context))
        else:
            out.update({c: np.empty(len(part)) for c in self.computed})
            _fill_chunk(part, self.context, out, slice(None), ledger=self.ledger)
        if part.has_errors:
            out.update(error_ellipse_at(part, self.context.epoch_jyear))
        if self.has_bodies:
            _add_body_rows(out, part, self.context)
        return out

    def fill(self, out: dict, rows: slice) -> None:
        """Every column but the name and the bodies' for the targets in `rows`, written into
        those rows of the whole columns `out`."""
        if self.use_kernel:
            for c, values in kernels.chain_columns(self.targets[rows], self.context).items():
                out[c][rows] = values
        else:
            _fill_chunk(self.targets, self.context, out, rows, ledger=self.ledger)
        if self.targets.has_errors:
            part = self.targets[rows]
            for c, values in error_ellipse_at(part, self.context.epoch_jyear).items():
                out[c][rows] = values

    def __iter__(self):
        spans = self.spans()
        if len(spans) == 1:
            yield self.chunk(spans[0])
            return
        with ThreadPoolExecutor(max_workers=WORKERS) as pool:
            pending = deque()
            for rows in spans:
                pending.append(pool.submit(self.chunk, rows))
                if len(pending) > WORKERS:
                    yield pending.popleft().result()
            while pending:
                yield pending.popleft().result()


def position_chunks(targets: Targets, site: Site | None, when, *, ledger: bool = False,
                    context: AstrometryContext | None = None,
                    chunk_size: int = CHUNK_SIZE, engine: str | None = None) -> PositionChunks:
    """The positions of `positions()`, as an iterable of column chunks (see PositionChunks)."""
    return PositionChunks(targets, site, when, ledger=ledger, context=context,
                          chunk_size=chunk_size, engine=engine)


def positions(targets: Targets, site: Site | None, when, *, ledger: bool = False,
              context: AstrometryContext | None = None, engine: str | None = None) -> Positions:
    """Propagated, apparent and (with a site) observed places of all targets at one instant.

    `when` is an ISO 8601 UTC string, 'now' or an astropy Time. Without a site only the
    propagated and apparent columns are computed. The chunks of `position_chunks` are
    gathered into whole columns. `engine`: 'auto' (default), 'numpy' (the reference path) or
    'kernel' (the compiled chain); see kernels.py and the EPOCHPOINT_ENGINE variable.
    """
    chunks = position_chunks(targets, site, when, ledger=ledger, context=context,
                             engine=engine)
    n = len(targets)
    out = {"name": targets.names}  # made when first read
    if chunks.use_kernel and not targets.has_errors:
        # The compiled chain in one parallel pass over all targets, straight into the columns.
        out.update(kernels.chain_columns(targets, chunks.context))
        # The chain's propagated parallax is 0 exactly where no distance is known.
        chunks.distances_unknown = int(np.count_nonzero(out["parallax_propagated"] == 0.0))
        if chunks.has_bodies:
            _add_body_rows(out, targets, chunks.context)
    else:
        # Each chunk computed straight into its rows of the whole columns, on a few threads
        # (no per-chunk copies, and the names stay lazy).
        out.update({c: np.empty(n, dtype=bool if c == "error_lower_bound" else float)
                    for c in chunks.names[1:]})
        with ThreadPoolExecutor(max_workers=WORKERS) as pool:
            list(pool.map(lambda rows: chunks.fill(out, rows), chunks.spans()))
        if chunks.has_bodies:
            _add_body_rows(out, targets, chunks.context)
    result = Positions(out, chunks.context)
    result.meta.update(chunks.meta)
    result.units.update(chunks.units)
    return result


def _has_body_columns(targets: Targets) -> bool:
    return any(str(k).strip().lower() in _BODY_KEYS for k in targets.extra)


def _add_body_rows(out: dict, targets: Targets, ctx: AstrometryContext) -> None:
    """Solar-system rows (a `body` or element columns, core/bodies/) replace their placeholder
    star columns and add the body columns (NaN on star rows, and on every row when none is a
    body); DE421 is loaded only when such a row is present."""
    from .bodies.columns import BODY_COLUMNS_OUT, fill_body_rows
    fill_body_rows(out, targets, ctx)
    for c in BODY_COLUMNS_OUT:
        out.setdefault(c, np.full(len(targets), np.nan))


_BODY_KEYS = {"body", "semimajor_axis", "perihelion_distance", "eccentricity",
              "perihelion_time", "mean_anomaly"}


def _store_radec(out: dict, rows: slice, prefix: str, p: np.ndarray):
    """Write right ascension and declination (degrees) of vectors p into out[...][rows]."""
    ra, dec = to_spherical(p)
    np.multiply(ra, RAD_TO_DEG, out=out[f"ra_{prefix}"][rows])
    np.multiply(dec, RAD_TO_DEG, out=out[f"dec_{prefix}"][rows])


def _fill_chunk(targets: Targets, ctx: AstrometryContext, out: dict, rows: slice, *,
                ledger: bool):
    """Compute every column for one chunk of targets into `out`."""
    ra, dec, parallax, pm_ra_cosdec, pm_dec, radial_velocity, epoch = targets.astrometry(rows)
    # Space motion from each target's catalogue epoch to the instant.
    prop = propagate(ra, dec, parallax, pm_ra_cosdec, pm_dec, radial_velocity,
                     ctx.epoch_jyear - epoch)
    _store_radec(out, rows, "propagated", prop.u)
    out["pm_ra_cosdec_propagated"][rows] = prop.pm_ra_cosdec
    out["pm_dec_propagated"][rows] = prop.pm_dec
    out["parallax_propagated"][rows] = prop.parallax
    out["radial_velocity_propagated"][rows] = prop.radial_velocity
    # Drift: how far the star has moved from its catalogue position.
    np.multiply(chord_separation(prop.u0, prop.u), RAD_TO_ARCSEC, out=out["drift"][rows])

    # Parallax, light deflection and aberration seen from the geocentre.
    p_astrometric, p_deflected, p_gcrs = geocentric_direction(prop.u, prop.parallax, ctx)
    # Rotate into the true equator and equinox of date, and into CIRS.
    p_tod = rotate(ctx.npb_true_of_date, p_gcrs)
    ra_tod, dec_tod = to_spherical(p_tod)
    np.multiply(ra_tod, RAD_TO_DEG, out=out["ra_apparent"][rows])
    np.multiply(dec_tod, RAD_TO_DEG, out=out["dec_apparent"][rows])
    # CIRS shares the pole with the true equator of date: only right ascension shifts.
    ra_cirs = np.mod(ra_tod + ctx.cirs_minus_tod_rad, 2.0 * np.pi)
    np.multiply(ra_cirs, RAD_TO_DEG, out=out["ra_cirs"][rows])
    out["dec_cirs"][rows] = out["dec_apparent"][rows]

    observed = None
    if ctx.site is not None:
        # Earth rotation, polar motion, diurnal aberration and refraction at the site.
        observed = observed_place(p_gcrs, ctx.site, to_cirs=ctx.c2i)
        np.multiply(observed.ha, RAD_TO_DEG, out=out["ha"][rows])
        np.multiply(observed.dec, RAD_TO_DEG, out=out["dec_observed"][rows])
        np.multiply(observed.alt, RAD_TO_DEG, out=out["alt"][rows])
        np.multiply(observed.az, RAD_TO_DEG, out=out["az"][rows])
        out["airmass"][rows] = observed.airmass
        np.multiply(observed.parallactic_angle, RAD_TO_DEG, out=out["parallactic_angle"][rows])

    if ledger:
        stages = {
            "ledger_space_motion": (prop.u0, prop.u),
            "ledger_parallax": (prop.u, p_astrometric),
            "ledger_light_deflection": (p_astrometric, p_deflected),
            "ledger_annual_aberration": (p_deflected, p_gcrs),
            # The coordinate change of the same direction between the GCRS and the true
            # equator and equinox of date (frame bias, precession, nutation).
            "ledger_precession_nutation": (p_gcrs, p_tod),
        }
        for column, (before, after) in stages.items():
            out[column][rows] = separation(before, after) * RAD_TO_ARCSEC
        # Distance unknown: no parallax was applied, and its true size is unknown.
        out["ledger_parallax"][rows][prop.parallax == 0.0] = np.nan
        if observed is not None:
            out["ledger_diurnal_aberration"][rows] = observed.diurnal_aberration * RAD_TO_ARCSEC
            out["ledger_refraction"][rows] = observed.refraction * RAD_TO_ARCSEC
