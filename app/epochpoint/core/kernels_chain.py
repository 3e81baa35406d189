"""The per-star chain compiled into one loop: catalogue astrometry to the observed place.

The same formulae as the numpy reference path, step for step, evaluated star by star in a
loop that numba compiles and runs in parallel over the stars (prange), so each star's
intermediate values stay in registers instead of ~100 full-array passes:
1. space motion, Hipparcos Vol. 1 sec. 1.5.5 (spacemotion.py, including `known_parallax`);
2. annual parallax, light deflection by the Sun and relativistic aberration, SOFA pmpx,
   ldsun and ab (apparent.py);
3. the IAU 2006/2000A bias-precession-nutation rotation to the true equator of date and the
   equation of the origins to CIRS (apparent.py, context.py);
4. Earth rotation, polar motion, diurnal aberration, refraction and the way back to observed
   hour angle and declination, SOFA atioq (observed.py, refraction.py); Kasten & Young 1989
   airmass; parallactic angle, Meeus eq. 14.1.
Agreement with the numpy path is at the level of rounding (about 1e-15 rad); the tests hold
it to 1 micro-arcsecond on random stars, instants and sites.

No fastmath: measured on a million stars, fastmath=True, {'contract'} and {'arcp', 'contract'}
were 0-10 % faster (within the machine's noise) and moved results by up to 0.02 uas in
angle, so IEEE semantics are kept; the loop is bound by atan2, sin and cos, which no flag can
vectorise without SVML. Division by zero gives inf/NaN as in numpy (error_model="numpy"), not
an exception. Imported only when kernels.py chooses the compiled chain: importing numba costs
about 0.2-0.3 s.
"""
from __future__ import annotations

import math

from numba import njit, prange

from .kernels_math import atan2, sin_cos_small
from .constants import (AU_KM_PER_S_YEAR, DEG_TO_RAD, MAS_TO_RAD, RAD_TO_ARCSEC, RAD_TO_DEG,
                        SUN_SCHWARZSCHILD_AU)
from .refraction import JOIN_ALTITUDE_DEG, LOWEST_ALTITUDE_DEG
from .spacemotion import VMAX_KM_S

TWO_PI = 2.0 * math.pi
_ARCMIN_TO_RAD = DEG_TO_RAD / 60.0
_SIN_JOIN = math.sin(JOIN_ALTITUDE_DEG * DEG_TO_RAD)

# Layout of the per-instant scalars (`instant`) and of the output rows; kernels.py packs and
# names them.
EPOCH_JYEAR, SUN_DISTANCE_AU, LORENTZ_INVERSE, CIRS_MINUS_TOD = 0, 1, 2, 3
DIURNAL_ABERRATION, REFA, REFB, REFRACTION_JOIN, REFRACTION_HORIZON = 4, 5, 6, 7, 8
SIN_LAT, COS_LAT = 9, 10
N_INSTANT = 11
# Output rows: 11 without a site (kernels.CHAIN_COLUMNS), 6 more with one.
N_BASE_ROWS = 11


@njit(cache=True, error_model="numpy")
def _spherical(x, y, z):
    """Longitude in [0, 2 pi) and latitude of a vector (vectors.to_spherical)."""
    lon = atan2(y, x)
    if lon < 0.0:
        lon += TWO_PI
    return lon, atan2(z, math.sqrt(x * x + y * y))


@njit(cache=True, error_model="numpy")
def _rotate(m, x, y, z):
    """A 3x3 matrix times a vector."""
    return (m[0, 0] * x + m[0, 1] * y + m[0, 2] * z,
            m[1, 0] * x + m[1, 1] * y + m[1, 2] * z,
            m[2, 0] * x + m[2, 1] * y + m[2, 2] * z)


@njit(cache=True, error_model="numpy")
def _rotate_transposed(m, x, y, z):
    """The transpose of a 3x3 rotation (its inverse) times a vector."""
    return (m[0, 0] * x + m[1, 0] * y + m[2, 0] * z,
            m[0, 1] * x + m[1, 1] * y + m[2, 1] * z,
            m[0, 2] * x + m[1, 2] * y + m[2, 2] * z)


@njit(cache=True, error_model="numpy")
def _refraction(sin_alt, cos_alt, refa, refb, join, horizon):
    """refraction.refraction_rad for one star: A tan z + B tan^3 z above 15 deg, scaled
    Saemundsson below."""
    r = max(cos_alt, 1e-6)
    z = max(sin_alt, 0.05)
    tz = r / z
    w = refb * tz * tz
    refraction = (refa + w) * tz / (1.0 + (refa + 3.0 * w) / (z * z))
    if sin_alt < _SIN_JOIN:
        alt_deg = atan2(sin_alt, cos_alt) * RAD_TO_DEG
        weight = min(max(alt_deg / JOIN_ALTITUDE_DEG, 0.0), 1.0)
        factor = horizon + (join - horizon) * weight
        h = max(alt_deg, LOWEST_ALTITUDE_DEG)
        refraction = factor * (1.02 * _ARCMIN_TO_RAD / math.tan((h + 10.3 / (h + 5.11))
                                                                 * DEG_TO_RAD))
    return refraction


@njit(parallel=True, cache=True, error_model="numpy")
def star_chain(ra_deg, dec_deg, parallax_in, pm_ra_cosdec, pm_dec, radial_velocity, epoch,
               instant, vectors, npb, to_hadec, to_horizon, out):
    """Every result column for each star, written into out[k, i] (rows as BASE_COLUMNS, then
    SITE_COLUMNS when `out` has room for them).

    instant: per-instant scalars (layout above); vectors: rows Earth barycentric position
    (AU), heliocentric unit vector of the Earth, Earth velocity (c); npb: GCRS to true
    equator of date; to_hadec: GCRS to the local -HA/Dec frame (polar motion, Earth rotation
    and the CIO-based bias-precession-nutation in one); to_horizon: -HA/Dec to horizon.
    """
    n = ra_deg.shape[0]
    observed = out.shape[0] > N_BASE_ROWS
    ex, ey, ez = vectors[0, 0], vectors[0, 1], vectors[0, 2]
    sx, sy, sz = vectors[1, 0], vectors[1, 1], vectors[1, 2]
    vx, vy, vz = vectors[2, 0], vectors[2, 1], vectors[2, 2]
    em = instant[SUN_DISTANCE_AU]
    dlim = 1e-6 / max(em * em, 1.0)
    srs_em = SUN_SCHWARZSCHILD_AU / em
    linv = instant[LORENTZ_INVERSE]
    diurab = instant[DIURNAL_ABERRATION]
    for i in prange(n):
        # Space motion (Hipparcos Vol. 1 sec. 1.5.5): a distance only where it is physical.
        pmra, pmdec, rv = pm_ra_cosdec[i], pm_dec[i], radial_velocity[i]
        plx = parallax_in[i]
        room = (VMAX_KM_S * VMAX_KM_S - rv * rv) * (plx * plx)
        if not (plx > 0.0 and AU_KM_PER_S_YEAR * AU_KM_PER_S_YEAR * (pmra * pmra + pmdec * pmdec)
                < room):
            plx = 0.0
        ra, dec = ra_deg[i] * DEG_TO_RAD, dec_deg[i] * DEG_TO_RAD
        sin_ra, cos_ra, sin_dec, cos_dec = math.sin(ra), math.cos(ra), math.sin(dec), math.cos(dec)
        r0x, r0y, r0z = cos_dec * cos_ra, cos_dec * sin_ra, sin_dec
        t = instant[EPOCH_JYEAR] - epoch[i]
        # Proper-motion vector p0 pmra + q0 pmdec and the radial proper motion (mas/yr).
        pvx = -sin_ra * pmra - sin_dec * cos_ra * pmdec
        pvy = cos_ra * pmra - sin_dec * sin_ra * pmdec
        pvz = 0.0 * pmra + cos_dec * pmdec
        zeta0 = rv * plx / AU_KM_PER_S_YEAR
        prx, pry, prz = pvx * MAS_TO_RAD, pvy * MAS_TO_RAD, pvz * MAS_TO_RAD
        zeta0_rad = zeta0 * MAS_TO_RAD
        pm2_rad = prx * prx + pry * pry + prz * prz
        # Distance factor and the new direction, parallax, proper motion and radial velocity.
        one_plus_zt = 1.0 + zeta0_rad * t
        speed2 = pm2_rad + zeta0_rad * zeta0_rad
        f = 1.0 / math.sqrt(2.0 * one_plus_zt - 1.0 + speed2 * t * t)
        f3 = f * f * f
        ux, uy, uz = ((r0x * one_plus_zt + prx * t) * f, (r0y * one_plus_zt + pry * t) * f,
                      (r0z * one_plus_zt + prz * t) * f)
        plx_t = plx * f
        radial = pm2_rad * t / MAS_TO_RAD
        ptx = (pvx * one_plus_zt - r0x * radial) * f3
        pty = (pvy * one_plus_zt - r0y * radial) * f3
        ptz = (pvz * one_plus_zt - r0z * radial) * f3
        zeta_t = (zeta0 + speed2 * t / MAS_TO_RAD) * (f * f)
        rv_t = zeta_t * AU_KM_PER_S_YEAR / plx_t if plx_t > 0.0 else rv
        # East and north at the new position (vectors.triad_of) carry the proper motion.
        rho = math.sqrt(ux * ux + uy * uy)
        east_x, east_y = (-uy / rho, ux / rho) if rho > 0.0 else (0.0, 1.0)
        out[2, i] = east_x * ptx + east_y * pty
        out[3, i] = -uz * east_y * ptx + uz * east_x * pty + rho * ptz
        out[4, i] = plx_t
        out[5, i] = rv_t
        lon, lat = _spherical(ux, uy, uz)
        out[0, i], out[1, i] = lon * RAD_TO_DEG, lat * RAD_TO_DEG
        # Drift from the catalogue position, from the chord.
        dx, dy, dz = r0x - ux, r0y - uy, r0z - uz
        out[10, i] = 2.0 * math.asin(min(0.5 * math.sqrt(dx * dx + dy * dy + dz * dz), 1.0)) \
            * RAD_TO_ARCSEC

        # Annual parallax (SOFA pmpx): look from the Earth, renormalise.
        plx_rad = plx_t * MAS_TO_RAD
        px, py, pz = ux - plx_rad * ex, uy - plx_rad * ey, uz - plx_rad * ez
        norm = math.sqrt(px * px + py * py + pz * pz)
        px, py, pz = px / norm, py / norm, pz / norm
        # Light deflection by the Sun (SOFA ldsun/ld), star at infinity.
        p_dot_e = px * sx + py * sy + pz * sz
        w = srs_em / max(1.0 + p_dot_e, dlim)
        px, py, pz = (px + w * (sx - p_dot_e * px), py + w * (sy - p_dot_e * py),
                      pz + w * (sz - p_dot_e * pz))
        # Relativistic annual aberration with the Sun's gravitational term (SOFA ab).
        p_dot_v = px * vx + py * vy + pz * vz
        w1 = 1.0 + p_dot_v / (1.0 + linv)
        px, py, pz = (px * linv + w1 * vx + srs_em * (vx - p_dot_v * px),
                      py * linv + w1 * vy + srs_em * (vy - p_dot_v * py),
                      pz * linv + w1 * vz + srs_em * (vz - p_dot_v * pz))
        norm = math.sqrt(px * px + py * py + pz * pz)
        px, py, pz = px / norm, py / norm, pz / norm
        # True equator and equinox of date; CIRS differs only in right ascension.
        tx, ty, tz = _rotate(npb, px, py, pz)
        ra_tod, dec_tod = _spherical(tx, ty, tz)
        out[6, i], out[7, i] = ra_tod * RAD_TO_DEG, dec_tod * RAD_TO_DEG
        ra_cirs = ra_tod + instant[CIRS_MINUS_TOD]
        if ra_cirs >= TWO_PI:
            ra_cirs -= TWO_PI
        elif ra_cirs < 0.0:
            ra_cirs += TWO_PI
        out[8, i] = ra_cirs * RAD_TO_DEG
        out[9, i] = out[7, i]
        if not observed:
            continue

        # Earth rotation and polar motion (SOFA atioq): the local -HA/Dec frame.
        xhd, yhd, zhd = _rotate(to_hadec, px, py, pz)
        # Diurnal aberration (first order, as atioq).
        f = 1.0 - diurab * yhd
        xhd, yhd, zhd = f * xhd, f * (yhd + diurab), f * zhd
        # The horizon frame (x south, y east, z zenith).
        xa, ya, za = _rotate(to_horizon, xhd, yhd, zhd)
        az = atan2(ya, -xa)
        if az < 0.0:
            az += TWO_PI
        r = math.sqrt(xa * xa + ya * ya)
        # Refraction lifts the star towards the zenith by delta.
        delta = _refraction(za, r, instant[REFA], instant[REFB], instant[REFRACTION_JOIN],
                            instant[REFRACTION_HORIZON])
        sindel, cosdel = sin_cos_small(delta)
        f = cosdel - sindel * za / max(r, 1e-6)
        xo, yo, zo = xa * f, ya * f, cosdel * za + sindel * r
        rf = r * f
        alt = atan2(zo, rf)
        # Back to -HA/Dec for the observed hour angle, declination and parallactic angle.
        hx, hy, hz = _rotate_transposed(to_horizon, xo, yo, zo)
        rho2 = hx * hx + hy * hy
        sin_lat, cos_lat = instant[SIN_LAT], instant[COS_LAT]
        out[11, i] = atan2(-hy, hx) * RAD_TO_DEG
        out[12, i] = atan2(hz, math.sqrt(rho2)) * RAD_TO_DEG
        out[13, i] = alt * RAD_TO_DEG
        out[14, i] = az * RAD_TO_DEG
        # Kasten & Young (1989) airmass, NaN below the horizon.
        sin_alt = zo / math.sqrt(zo * zo + rf * rf)
        out[15, i] = (1.0 / (sin_alt + 0.50572 * (alt * RAD_TO_DEG + 6.07995) ** -1.6364)
                      if alt >= 0.0 else math.nan)
        out[16, i] = atan2(-hy * cos_lat, sin_lat * rho2 - cos_lat * hz * hx) * RAD_TO_DEG
