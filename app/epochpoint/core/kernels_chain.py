"""The per-star chain compiled into one loop: catalogue astrometry to the observed place.

The same formulae as the numpy reference path, step for step. numba compiles them into loops
over blocks of BLOCK stars: the blocks run in parallel on every core (prange), and inside a
block each physical stage is one loop without branches or library calls (selects instead of
ifs, kernels_math's atan2 and sin_cos instead of the C library's), which the compiler
vectorises four stars to an AVX2 register; each block's intermediates stay in the cache
instead of ~100 full-array passes:
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

No fastmath: the loops vectorise without it (elementwise, no reductions to reorder), so IEEE
semantics are kept. Measured on a million stars against the earlier one-star-at-a-time loop
with the C library's functions: see benchmarks/bench_positions.py and the README. Division by
zero gives inf/NaN as in numpy (error_model="numpy"), not an exception; a select computes both
of its sides, so a discarded side may divide by zero harmlessly. Imported only when
kernels.py chooses the compiled chain: importing numba costs
about 0.2-0.3 s.
"""
from __future__ import annotations

import math

import numpy as np
from numba import njit, prange

from .kernels_math import atan2, sin_cos
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
# Stars per block. A block works in one flat array, `work`, of rows of BLOCK values (inputs,
# outputs, intermediates; 31 rows, 62 KB, within the core's cache), always over all BLOCK
# places (the last block padded with its last star): with one array and constant row offsets
# the compiler can prove the rows never overlap and vectorises each stage without run-time
# alias checks.
BLOCK = 256
# Row offsets in `work`: the seven inputs, the 17 output rows (out row r at _OUT + r * BLOCK),
# then the propagated direction, the apparent (GCRS) direction and sin(altitude).
_N_IN = 7
_OUT = _N_IN * BLOCK
_RA, _DEC, _PLX, _PMRA, _PMDEC, _RV, _EPOCH = (r * BLOCK for r in range(_N_IN))
(_RA_P, _DEC_P, _PMRA_P, _PMDEC_P, _PLX_P, _RV_P, _RA_TOD, _DEC_TOD, _RA_CIRS, _DEC_CIRS,
 _DRIFT, _HA, _DEC_OBS, _ALT, _AZ, _AIRMASS, _PA) = (_OUT + r * BLOCK for r in range(17))
_UX, _UY, _UZ, _PX, _PY, _PZ, _SIN_ALT = ((24 + r) * BLOCK for r in range(7))
N_WORK_ROWS = 31
_AU_KM_PER_S_YEAR_2 = AU_KM_PER_S_YEAR * AU_KM_PER_S_YEAR


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
    for block in prange((n + BLOCK - 1) // BLOCK):
        lo = block * BLOCK
        work = np.empty(N_WORK_ROWS * BLOCK)
        for row, column in enumerate((ra_deg, dec_deg, parallax_in, pm_ra_cosdec, pm_dec,
                                      radial_velocity, epoch)):
            _gather(work, row * BLOCK, column, lo)
        _space_motion(work, instant[EPOCH_JYEAR])
        _apparent(work, instant, vectors, npb)
        if observed:
            _observed(work, instant, to_hadec, to_horizon)
            _airmass(work)
        for row in range(out.shape[0]):
            _scatter(out[row], work, _OUT + row * BLOCK, lo)


@njit(cache=True, error_model="numpy")
def _gather(work, offset, column, lo):
    """Stars lo..lo+BLOCK of an input column into a row of `work`, the last star repeated
    past the end."""
    last = column.shape[0] - 1
    for k in range(BLOCK):
        work[offset + k] = column[min(lo + k, last)]


@njit(cache=True, error_model="numpy")
def _scatter(row_out, work, offset, lo):
    """A row of `work` back into its output row (the real stars only)."""
    for k in range(min(BLOCK, row_out.shape[0] - lo)):
        row_out[lo + k] = work[offset + k]


@njit(cache=True, error_model="numpy")
def _space_motion(w, epoch_now):
    """Space motion (Hipparcos Vol. 1 sec. 1.5.5; spacemotion.py): the propagated position,
    proper motion, parallax, radial velocity and drift, and the new unit direction."""
    for k in range(BLOCK):
        pmra, pmdec, rv, plx = w[_PMRA + k], w[_PMDEC + k], w[_RV + k], w[_PLX + k]
        # A distance only where it is physical (spacemotion.known_parallax).
        room = (VMAX_KM_S * VMAX_KM_S - rv * rv) * (plx * plx)
        physical = (plx > 0.0) & (_AU_KM_PER_S_YEAR_2 * (pmra * pmra + pmdec * pmdec) < room)
        plx = plx if physical else 0.0
        sin_ra, cos_ra = sin_cos(w[_RA + k] * DEG_TO_RAD)
        sin_dec, cos_dec = sin_cos(w[_DEC + k] * DEG_TO_RAD)
        r0x, r0y, r0z = cos_dec * cos_ra, cos_dec * sin_ra, sin_dec
        t = epoch_now - w[_EPOCH + k]
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
        has_distance = plx_t > 0.0
        rv_t = zeta_t * AU_KM_PER_S_YEAR / (plx_t if has_distance else 1.0)
        w[_RV_P + k] = rv_t if has_distance else rv
        w[_PLX_P + k] = plx_t
        # East and north at the new position (vectors.triad_of) carry the proper motion.
        rho = math.sqrt(ux * ux + uy * uy)
        off_pole = rho > 0.0
        rho_safe = rho if off_pole else 1.0
        east_x = -uy / rho_safe if off_pole else 0.0
        east_y = ux / rho_safe if off_pole else 1.0
        w[_PMRA_P + k] = east_x * ptx + east_y * pty
        w[_PMDEC_P + k] = -uz * east_y * ptx + uz * east_x * pty + rho * ptz
        lon = atan2(uy, ux)
        w[_RA_P + k] = (lon + TWO_PI if lon < 0.0 else lon) * RAD_TO_DEG
        w[_DEC_P + k] = atan2(uz, rho) * RAD_TO_DEG
        # Drift from the catalogue position: twice the arcsine of the half chord.
        dx, dy, dz = r0x - ux, r0y - uy, r0z - uz
        half_chord = min(0.5 * math.sqrt(dx * dx + dy * dy + dz * dz), 1.0)
        w[_DRIFT + k] = 2.0 * atan2(half_chord, math.sqrt(1.0 - half_chord * half_chord)) \
            * RAD_TO_ARCSEC
        w[_UX + k], w[_UY + k], w[_UZ + k] = ux, uy, uz


@njit(cache=True, error_model="numpy")
def _apparent(w, instant, vectors, npb):
    """Parallax, light deflection and aberration (SOFA pmpx, ldsun, ab; apparent.py), then the
    true equator and equinox of date and CIRS, keeping the apparent GCRS direction."""
    ex, ey, ez = vectors[0, 0], vectors[0, 1], vectors[0, 2]
    sx, sy, sz = vectors[1, 0], vectors[1, 1], vectors[1, 2]
    vx, vy, vz = vectors[2, 0], vectors[2, 1], vectors[2, 2]
    em = instant[SUN_DISTANCE_AU]
    dlim = 1e-6 / max(em * em, 1.0)
    srs_em = SUN_SCHWARZSCHILD_AU / em
    linv = instant[LORENTZ_INVERSE]
    eo = instant[CIRS_MINUS_TOD]
    m00, m01, m02 = npb[0, 0], npb[0, 1], npb[0, 2]
    m10, m11, m12 = npb[1, 0], npb[1, 1], npb[1, 2]
    m20, m21, m22 = npb[2, 0], npb[2, 1], npb[2, 2]
    for k in range(BLOCK):
        # Annual parallax (SOFA pmpx): look from the Earth, renormalise.
        plx_rad = w[_PLX_P + k] * MAS_TO_RAD
        px, py, pz = (w[_UX + k] - plx_rad * ex, w[_UY + k] - plx_rad * ey,
                      w[_UZ + k] - plx_rad * ez)
        norm = math.sqrt(px * px + py * py + pz * pz)
        px, py, pz = px / norm, py / norm, pz / norm
        # Light deflection by the Sun (SOFA ldsun/ld), star at infinity.
        p_dot_e = px * sx + py * sy + pz * sz
        q = srs_em / max(1.0 + p_dot_e, dlim)
        px, py, pz = (px + q * (sx - p_dot_e * px), py + q * (sy - p_dot_e * py),
                      pz + q * (sz - p_dot_e * pz))
        # Relativistic annual aberration with the Sun's gravitational term (SOFA ab).
        p_dot_v = px * vx + py * vy + pz * vz
        w1 = 1.0 + p_dot_v / (1.0 + linv)
        px, py, pz = (px * linv + w1 * vx + srs_em * (vx - p_dot_v * px),
                      py * linv + w1 * vy + srs_em * (vy - p_dot_v * py),
                      pz * linv + w1 * vz + srs_em * (vz - p_dot_v * pz))
        norm = math.sqrt(px * px + py * py + pz * pz)
        px, py, pz = px / norm, py / norm, pz / norm
        w[_PX + k], w[_PY + k], w[_PZ + k] = px, py, pz
        # True equator and equinox of date; CIRS differs only in right ascension.
        tx = m00 * px + m01 * py + m02 * pz
        ty = m10 * px + m11 * py + m12 * pz
        tz = m20 * px + m21 * py + m22 * pz
        ra_tod = atan2(ty, tx)
        ra_tod = ra_tod + TWO_PI if ra_tod < 0.0 else ra_tod
        dec_tod = atan2(tz, math.sqrt(tx * tx + ty * ty)) * RAD_TO_DEG
        w[_RA_TOD + k], w[_DEC_TOD + k] = ra_tod * RAD_TO_DEG, dec_tod
        ra_cirs = ra_tod + eo
        ra_cirs = ra_cirs - TWO_PI if ra_cirs >= TWO_PI else ra_cirs
        ra_cirs = ra_cirs + TWO_PI if ra_cirs < 0.0 else ra_cirs
        w[_RA_CIRS + k], w[_DEC_CIRS + k] = ra_cirs * RAD_TO_DEG, dec_tod


@njit(inline="always", cache=True, error_model="numpy")
def _refraction(sin_alt, cos_alt, refa, refb, join, horizon):
    """refraction.refraction_rad for one star: A tan z + B tan^3 z above 15 deg, scaled
    Saemundsson below (both computed, one selected)."""
    r = max(cos_alt, 1e-6)
    z = max(sin_alt, 0.05)
    tz = r / z
    q = refb * tz * tz
    high = (refa + q) * tz / (1.0 + (refa + 3.0 * q) / (z * z))
    alt_deg = atan2(sin_alt, cos_alt) * RAD_TO_DEG
    weight = min(max(alt_deg / JOIN_ALTITUDE_DEG, 0.0), 1.0)
    factor = horizon + (join - horizon) * weight
    h = max(alt_deg, LOWEST_ALTITUDE_DEG)
    sin_h, cos_h = sin_cos((h + 10.3 / (h + 5.11)) * DEG_TO_RAD)
    low = factor * (1.02 * _ARCMIN_TO_RAD * cos_h / sin_h)
    return low if sin_alt < _SIN_JOIN else high


@njit(cache=True, error_model="numpy")
def _observed(w, instant, to_hadec, to_horizon):
    """Earth rotation, polar motion, diurnal aberration and refraction (SOFA atioq;
    observed.py, refraction.py), then observed hour angle, declination, altitude, azimuth
    and parallactic angle (Meeus eq. 14.1)."""
    a00, a01, a02 = to_hadec[0, 0], to_hadec[0, 1], to_hadec[0, 2]
    a10, a11, a12 = to_hadec[1, 0], to_hadec[1, 1], to_hadec[1, 2]
    a20, a21, a22 = to_hadec[2, 0], to_hadec[2, 1], to_hadec[2, 2]
    b00, b01, b02 = to_horizon[0, 0], to_horizon[0, 1], to_horizon[0, 2]
    b10, b11, b12 = to_horizon[1, 0], to_horizon[1, 1], to_horizon[1, 2]
    b20, b21, b22 = to_horizon[2, 0], to_horizon[2, 1], to_horizon[2, 2]
    diurab = instant[DIURNAL_ABERRATION]
    refa, refb = instant[REFA], instant[REFB]
    join, horizon = instant[REFRACTION_JOIN], instant[REFRACTION_HORIZON]
    sin_lat, cos_lat = instant[SIN_LAT], instant[COS_LAT]
    for k in range(BLOCK):
        px, py, pz = w[_PX + k], w[_PY + k], w[_PZ + k]
        # Earth rotation and polar motion (SOFA atioq): the local -HA/Dec frame.
        xhd = a00 * px + a01 * py + a02 * pz
        yhd = a10 * px + a11 * py + a12 * pz
        zhd = a20 * px + a21 * py + a22 * pz
        # Diurnal aberration (first order, as atioq).
        f = 1.0 - diurab * yhd
        xhd, yhd, zhd = f * xhd, f * (yhd + diurab), f * zhd
        # The horizon frame (x south, y east, z zenith).
        xa = b00 * xhd + b01 * yhd + b02 * zhd
        ya = b10 * xhd + b11 * yhd + b12 * zhd
        za = b20 * xhd + b21 * yhd + b22 * zhd
        az = atan2(ya, -xa)
        az = az + TWO_PI if az < 0.0 else az
        r = math.sqrt(xa * xa + ya * ya)
        # Refraction lifts the star towards the zenith by delta.
        delta = _refraction(za, r, refa, refb, join, horizon)
        sindel, cosdel = sin_cos(delta)
        f = cosdel - sindel * za / max(r, 1e-6)
        xo, yo, zo = xa * f, ya * f, cosdel * za + sindel * r
        rf = r * f
        alt = atan2(zo, rf)
        # Back to -HA/Dec (the transposed rotation) for the observed hour angle, declination
        # and parallactic angle.
        hx = b00 * xo + b10 * yo + b20 * zo
        hy = b01 * xo + b11 * yo + b21 * zo
        hz = b02 * xo + b12 * yo + b22 * zo
        rho2 = hx * hx + hy * hy
        w[_HA + k] = atan2(-hy, hx) * RAD_TO_DEG
        w[_DEC_OBS + k] = atan2(hz, math.sqrt(rho2)) * RAD_TO_DEG
        w[_ALT + k] = alt * RAD_TO_DEG
        w[_AZ + k] = az * RAD_TO_DEG
        w[_PA + k] = atan2(-hy * cos_lat, sin_lat * rho2 - cos_lat * hz * hx) * RAD_TO_DEG
        w[_SIN_ALT + k] = zo / math.sqrt(zo * zo + rf * rf)


@njit(cache=True, error_model="numpy")
def _airmass(w):
    """Kasten & Young (1989) airmass, NaN below the horizon: a loop of its own, as its power
    is a library call the other loops must not hold."""
    for k in range(BLOCK):
        alt_deg = w[_ALT + k]
        w[_AIRMASS + k] = (1.0 / (w[_SIN_ALT + k] + 0.50572 * (alt_deg + 6.07995) ** -1.6364)
                           if alt_deg >= 0.0 else math.nan)
