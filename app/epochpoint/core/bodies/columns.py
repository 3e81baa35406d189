"""Position columns for the body rows of a target list at one instant.

The usual columns (the propagated place becomes the astrometric geocentric direction, ICRS;
apparent and CIRS places are geocentric; hour angle, altitude and azimuth are topocentric,
through the same observed-place step as stars) plus:
  distance_au, light_time_s      from the observer (the site when given, else the geocentre)
  rate_ra, rate_dec              arcsec/s of the apparent place seen by the observer (true
                                 equator of date; rate_ra includes cos Dec)
  rate_alt, rate_az              arcsec/s of the unrefracted altitude and of the azimuth
  elongation, phase_angle        deg (Sun-observer-body and Sun-body-observer angles)
  illuminated_fraction           (1 + cos phase_angle) / 2
  magnitude                      V (magnitudes.py), NaN without a formula or parameters
Rates differentiate the light-time-corrected observer-to-body vector analytically (body and
observer velocities, the Earth's rotation at the ERA rate, IERS Conventions 2010 eq. 5.15);
the slow change of aberration and of the precession-nutation matrix is neglected
(relative error ~1e-4). Star rows get NaN in these columns. Per body about 1 ms.
"""
from __future__ import annotations

import numpy as np

from ..constants import RAD_TO_ARCSEC, RAD_TO_DEG, SECONDS_PER_DAY
from ..observed import observed_place, site_matrices
from ..vectors import dot, separation, to_spherical
from .magnitudes import SATURN_POLE_DEC_DEG, SATURN_POLE_RA_DEG, asteroid_magnitude, \
    comet_magnitude, planet_magnitude
from .observer import observer_from_context
from .rows import sources_of
from .sources import MajorBody, apparent_place

BODY_COLUMNS_OUT = ("distance_au", "light_time_s", "rate_ra", "rate_dec", "rate_alt", "rate_az",
                    "elongation", "phase_angle", "illuminated_fraction", "magnitude")
BODY_UNITS = {"distance_au": "AU", "light_time_s": "s", "rate_ra": "arcsec/s",
              "rate_dec": "arcsec/s", "rate_alt": "arcsec/s", "rate_az": "arcsec/s",
              "elongation": "deg", "phase_angle": "deg", "illuminated_fraction": "",
              "magnitude": "mag"}
# Earth rotation angle rate, rad per UT1 day (IERS Conventions 2010 eq. 5.15).
ERA_RATE_RAD_PER_DAY = 2.0 * np.pi * 1.00273781191135448
TO_ARCSEC_PER_S = RAD_TO_ARCSEC / SECONDS_PER_DAY
NO_MOTION_COLUMNS = ("pm_ra_cosdec_propagated", "pm_dec_propagated", "parallax_propagated",
                     "radial_velocity_propagated", "drift")


def _radec_rates(u, du):
    """(rate of RA times cos Dec, rate of Dec) of unit vectors u moving at du (same units)."""
    rho = np.sqrt(u[0] ** 2 + u[1] ** 2)
    return (u[0] * du[1] - u[1] * du[0]) / rho, du[2] / rho


def _unit_rate(rho_rate, u, distance):
    """Rate of the unit vector u = rho/|rho| from the rate of rho."""
    return (rho_rate - u * dot(u, rho_rate)) / distance


def _magnitude(source, r, delta, alpha_deg, body_to_observer):
    if isinstance(source, MajorBody):
        ring = None
        if source.name == "saturn":
            ra, dec = np.radians(SATURN_POLE_RA_DEG), np.radians(SATURN_POLE_DEC_DEG)
            pole = np.array([np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)])
            ring = dot(body_to_observer, pole) / np.sqrt(dot(body_to_observer,
                                                             body_to_observer))
        return planet_magnitude(source.name, alpha_deg, r, delta, ring)
    if np.isfinite(source.abs_magnitude):
        return asteroid_magnitude(source.abs_magnitude, source.slope, alpha_deg, r, delta)
    if np.isfinite(source.comet_m1):
        k1 = source.comet_k1 if np.isfinite(source.comet_k1) else 10.0
        return comet_magnitude(source.comet_m1, k1, r, delta)
    return np.full(np.shape(r), np.nan)


def body_columns(source, ctx) -> tuple[dict, list]:
    """Every position column of one source at the context's instant (arrays of length 1)."""
    geo = apparent_place(source, observer_from_context(ctx, topocentric=False))
    out = {}
    ra, dec = to_spherical(geo.u_astrometric)
    out["ra_propagated"], out["dec_propagated"] = np.mod(ra * RAD_TO_DEG, 360.0), dec * RAD_TO_DEG
    for c in NO_MOTION_COLUMNS:
        out[c] = np.full(1, np.nan)
    p_tod = ctx.npb_true_of_date @ geo.p_gcrs
    ra, dec = to_spherical(p_tod)
    out["ra_apparent"], out["dec_apparent"] = ra * RAD_TO_DEG, dec * RAD_TO_DEG
    out["ra_cirs"] = np.mod(ra + ctx.cirs_minus_tod_rad, 2 * np.pi) * RAD_TO_DEG
    out["dec_cirs"] = dec * RAD_TO_DEG

    seen = geo
    if ctx.site is not None:
        # The same body from the site: topocentric parallax, then the observed place.
        seen = apparent_place(source, observer_from_context(ctx, topocentric=True))
        obs = observed_place(seen.p_gcrs, ctx.site, to_cirs=ctx.c2i)
        for name, value in (("ha", obs.ha), ("dec_observed", obs.dec), ("alt", obs.alt),
                            ("az", obs.az), ("parallactic_angle", obs.parallactic_angle)):
            out[name] = value * RAD_TO_DEG
        out["airmass"] = obs.airmass
    out["distance_au"] = seen.distance_au
    out["light_time_s"] = seen.light_time_d * SECONDS_PER_DAY

    # Rates of the apparent direction seen by the observer, in the true equator of date.
    du_gcrs = _unit_rate(seen.rate_au_d, seen.u_astrometric, seen.distance_au)
    u_tod = ctx.npb_true_of_date @ seen.p_gcrs
    rate_ra, rate_dec = _radec_rates(u_tod, ctx.npb_true_of_date @ du_gcrs)
    out["rate_ra"], out["rate_dec"] = rate_ra * TO_ARCSEC_PER_S, rate_dec * TO_ARCSEC_PER_S
    out["rate_alt"] = out["rate_az"] = np.full(1, np.nan)
    if ctx.site is not None:
        # Horizon frame: the direction's own rate plus the Earth's rotation under it.
        to_hadec, to_horizon = site_matrices(ctx.site)
        spin = np.array([[0.0, 1.0, 0.0], [-1.0, 0.0, 0.0], [0.0, 0.0, 0.0]])
        u_hd = to_hadec @ ctx.c2i @ seen.p_gcrs
        du_hd = to_hadec @ ctx.c2i @ du_gcrs + ERA_RATE_RAD_PER_DAY * (spin @ u_hd)
        x, y, z = to_horizon @ u_hd
        dx, dy, dz = to_horizon @ du_hd
        rho2 = x * x + y * y
        out["rate_alt"] = dz / np.sqrt(rho2) * TO_ARCSEC_PER_S
        out["rate_az"] = (-x * dy + y * dx) / rho2 * TO_ARCSEC_PER_S

    # Sun-observer-body and Sun-body-observer angles, and the lit fraction.
    out["elongation"] = separation(seen.observer_to_sun_au, seen.u_astrometric) * RAD_TO_DEG
    body_to_observer = -seen.u_astrometric * seen.distance_au
    phase = separation(seen.body_to_sun_au, body_to_observer)
    out["phase_angle"] = phase * RAD_TO_DEG
    out["illuminated_fraction"] = (1.0 + np.cos(phase)) / 2.0
    r = np.sqrt(dot(seen.body_to_sun_au, seen.body_to_sun_au))
    out["magnitude"] = _magnitude(source, r, seen.distance_au, out["phase_angle"],
                                  body_to_observer)
    if isinstance(source, MajorBody) and source.name == "sun":
        for c in ("elongation", "phase_angle", "illuminated_fraction"):
            out[c] = np.full(1, np.nan)
    return out, source.warnings(*ctx.tdb)


def fill_body_rows(out: dict, targets, ctx) -> list:
    """Overwrite the body rows of `out` (a positions column mapping) and add the body columns
    (NaN on star rows). Returns the warnings (stale elements). Does nothing without bodies."""
    rows, sources = sources_of(targets)
    if not len(rows):
        return []
    n = len(targets)
    for c in BODY_COLUMNS_OUT:
        out[c] = np.full(n, np.nan)
    warnings = []
    for i, source in zip(rows, sources):
        columns, notes = body_columns(source, ctx)
        warnings += notes
        for c, value in columns.items():
            if c in out:
                out[c][i] = value[0]
    # The correction ledger describes a star's chain: not given for bodies.
    for c in out:
        if c.startswith("ledger_"):
            out[c][rows] = np.nan
    return warnings


def body_warnings(targets, ctx) -> list:
    """The warnings of the body rows at the context's instant (elements far from their epoch),
    without computing their places: a few microseconds a row."""
    _, sources = sources_of(targets)
    return [note for source in sources for note in source.warnings(*ctx.tdb)]
