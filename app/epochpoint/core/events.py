"""Periodic events (transits, eclipses) timed at the site: from a barycentric ephemeris
T0 + nP (BJD in TDB) to the UTC instant the event is seen by the observer.

A published mid-event time is the instant the light of that event reaches the Solar System
barycentre, on the TDB scale. The same light reaches the observer at a different instant;
following Eastman, Siverd & Gaudi 2010 (PASP 122, 935, sec. 2 and eq. 1) the barycentric time
of an observed instant t is

    BJD_TDB = t_TT + (TDB - TT) + r_obs . n / c + Delta_Shapiro

where each term is:
- the Einstein delay TDB - TT, ERFA dtdb (Fairhead & Bretagnon 1990 series with the site's
  topocentric terms; amplitude 1.7 ms annual, about 2 us diurnal);
- the Roemer delay r_obs . n / c: the light time along the target's direction n (after its
  space motion, spacemotion.py, Hipparcos Vol. 1 sec. 1.5.5) of the observer's barycentric
  position r_obs = the Earth's (ERFA epv00, Bretagnon & Francou fits to VSOP2000/DE405, about
  5 km = 17 us) plus the site's geocentric position (ERFA pvtob, WGS84, rotated by the Earth
  rotation angle ERFA era00 from UT1 and into GCRS with ERFA c2i06a, IAU 2006/2000A; up to
  21 ms). Its annual amplitude is 499 s for a target on the ecliptic (the light time for
  1 au; common practice);
- the Shapiro delay of the Sun, -(2 G M_sun / c^3) ln(1 + cos theta) with theta the angle at
  the Sun between the observer and the target (Eastman et al. 2010, sec. 2.4; Backer &
  Hellings 1986, ARA&A 24, 537). Light passing the Sun arrives late, so barycentric time is
  earlier than the observed one by that much: under 10 us away from the Sun, included but
  negligible.
Left out and stated: the curvature of the wavefront for nearby stars (r^2 / (2 c d), about
1 ms at 1 pc: Eastman et al. 2010 sec. 2.3) and polar motion (metres: nanoseconds).

The inverse (the observed instant whose barycentric time is T0 + nP) is solved by fixed-point
iteration t <- B - delay(t): the delay changes by v/c ~ 1e-4 of a step, so three rounds reach
nanoseconds. Everything runs on arrays of (target, cycle) pairs; the Earth's position, TDB-TT
and TT-UT1 are tabulated once per hour over the searched span (`BarycentricClock`) and
interpolated linearly (error under 10 km = 30 us of light time), the Earth rotation angle is
evaluated at each instant. Cost: about 30 ms per month of span once, then about 2 us per
(target, cycle) pair.

Times inside are TT as days after J2000.0 (JD 2451545.0 TT) in float64 (about 5 ns resolution
over these centuries); UTC appears only at the edges.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np
from astropy.time import Time

from . import earth_orientation
from .constants import AU_M, C_M_PER_S, DAYS_PER_JULIAN_YEAR, DEG_TO_RAD, JD_J2000
from .site import Site
from .spacemotion import propagate
from .timescale import quiet_erfa

# Solar mass parameter G M_sun (IAU 2015 Resolution B3 nominal value), m^3 s^-2.
GM_SUN_M3_S2 = 1.3271244e20
# 2 G M_sun / c^3, seconds: the scale of the Sun's Shapiro delay (about 9.85 us).
SHAPIRO_SCALE_S = 2.0 * GM_SUN_M3_S2 / C_M_PER_S ** 3
AU_LIGHT_S = AU_M / C_M_PER_S
SECONDS_PER_DAY = 86400.0
TIME_SCALES = ("bjd_tdb", "hjd_utc", "jd_utc")
CLOCK_STEP_D = 1.0 / 24.0
_ITERATIONS = 4
# Error after k rounds: about 500 s x (1e-4)^k; three reach nanoseconds.
_OBSERVED_ITERATIONS = 3


@dataclass(frozen=True, eq=False)
class EventEphemerides:
    """Per-target linear ephemerides, columnar (NaN epoch: the target has none).

    epoch_bjd_tdb: mid-event T0 as a Julian date, TDB, barycentric (after any conversion);
    period_d: days; duration_h: first to last contact, hours; epoch_error_d and
    period_error_d: 1-sigma, days (NaN: unknown); baseline_min: minutes wanted before and
    after; kind: free text; assumed: what a conversion of T0 assumed ('' when none).
    """

    epoch_bjd_tdb: np.ndarray
    period_d: np.ndarray
    duration_h: np.ndarray
    epoch_error_d: np.ndarray
    period_error_d: np.ndarray
    baseline_min: np.ndarray
    kind: np.ndarray
    assumed: np.ndarray

    @property
    def periodic(self) -> np.ndarray:
        """True for targets that carry an ephemeris."""
        return np.isfinite(self.epoch_bjd_tdb) & np.isfinite(self.period_d)


def mid_error_s(epoch_error_d, period_error_d, cycle) -> np.ndarray:
    """1-sigma uncertainty (s) of the mid time of cycle n: sqrt(sigma_T0^2 + n^2 sigma_P^2),
    the linear ephemeris' errors taken as independent (common practice)."""
    return SECONDS_PER_DAY * np.sqrt(np.square(epoch_error_d)
                                     + np.square(np.asarray(cycle, float) * period_error_d))


def target_direction(targets, rows, epoch_jyear) -> np.ndarray:
    """(3, k) barycentric unit vectors of targets `rows` at Julian years `epoch_jyear`, after
    their space motion (Hipparcos Vol. 1 sec. 1.5.5 via spacemotion.propagate)."""
    ra, dec, plx, pmra, pmdec, rv, epoch = targets.astrometry(rows)
    return propagate(ra, dec, plx, pmra, pmdec, rv, np.asarray(epoch_jyear) - epoch).u


def _jyear(tt_days) -> np.ndarray:
    return 2000.0 + np.asarray(tt_days, dtype=float) / DAYS_PER_JULIAN_YEAR


class BarycentricClock:
    """The site's barycentric clock over a span: BJD_TDB of observed instants and back.

    Built once per (site, span): hourly tables of the Earth's barycentric and heliocentric
    position, TDB-TT at the site and TT-UT1, and one GCRS-to-CIRS matrix per day (precession
    moves the site vector by under 2 us of light time in a day).
    """

    @quiet_erfa
    def __init__(self, site: Site, start_tt_days: float, end_tt_days: float):
        self.site = site
        first = np.floor(start_tt_days) - 1.0
        count = int(np.ceil((end_tt_days + 1.0 - first) / CLOCK_STEP_D)) + 1
        self.grid = first + CLOCK_STEP_D * np.arange(count)
        tt = Time(JD_J2000, self.grid, format="jd", scale="tt")
        # TT - UT1 from the IERS table (held at its ends beyond it), seconds.
        ut1 = earth_orientation.with_ut1_utc(tt.utc).ut1
        self.tt_minus_ut1_s = ((tt.jd1 - ut1.jd1) + (tt.jd2 - ut1.jd2)) * SECONDS_PER_DAY
        # The site: longitude, latitude and its distances from the spin axis and equator.
        self.elong = site.longitude * DEG_TO_RAD
        self.phi = site.latitude * DEG_TO_RAD
        xyz = erfa.gd2gc(1, self.elong, self.phi, site.height)
        u_km, v_km = np.hypot(xyz[0], xyz[1]) / 1000.0, xyz[2] / 1000.0
        # Einstein delay TDB - TT at the site (ERFA dtdb), seconds.
        ut_fraction = np.mod(ut1.jd1 - 0.5, 1.0) + ut1.jd2
        self.tdb_minus_tt_s = erfa.dtdb(JD_J2000, self.grid, np.mod(ut_fraction, 1.0),
                                        self.elong, u_km, v_km)
        helio, bary = erfa.epv00(JD_J2000, self.grid + self.tdb_minus_tt_s / SECONDS_PER_DAY)
        self.earth_bary_au = np.ascontiguousarray(bary["p"].T)
        self.earth_helio_au = np.ascontiguousarray(helio["p"].T)
        self.days = np.arange(first, self.grid[-1] + 1.0)
        self.c2i = erfa.c2i06a(JD_J2000, self.days)

    def _weights(self, t) -> tuple[np.ndarray, np.ndarray]:
        """Grid index and fraction of instants t, for linear interpolation in every table."""
        x = np.clip((np.asarray(t, dtype=float) - self.grid[0]) / CLOCK_STEP_D, 0.0,
                    len(self.grid) - 1.000001)
        i = x.astype(np.int64)
        return i, x - i

    @staticmethod
    def _interp(table: np.ndarray, weights) -> np.ndarray:
        i, f = weights
        return table[..., i] * (1.0 - f) + table[..., i + 1] * f

    def site_gcrs_au(self, tt_days, weights=None) -> np.ndarray:
        """(3, k) geocentric GCRS position of the site (au) at TT instants."""
        t = np.asarray(tt_days, dtype=float)
        weights = self._weights(t) if weights is None else weights
        ut1 = t - self._interp(self.tt_minus_ut1_s, weights) / SECONDS_PER_DAY
        era = erfa.era00(JD_J2000, ut1)
        p_cirs_m = erfa.pvtob(self.elong, self.phi, self.site.height, 0.0, 0.0, 0.0, era)["p"]
        day = np.clip(np.round(t - self.days[0]).astype(int), 0, len(self.days) - 1)
        # GCRS = C2I^T CIRS, with the day's matrix.
        p_gcrs_m = np.einsum("kji,kj->ik", self.c2i[day], p_cirs_m)
        return p_gcrs_m / AU_M

    def barycentric_offset_s(self, tt_days, direction) -> np.ndarray:
        """BJD_TDB - TT (s) at TT instants for light arriving from unit vectors (3, k):
        Einstein + Roemer + Shapiro delays (see module)."""
        t = np.asarray(tt_days, dtype=float)
        weights = self._weights(t)
        site = self.site_gcrs_au(t, weights)
        r_bary = self._interp(self.earth_bary_au, weights) + site
        r_helio = self._interp(self.earth_helio_au, weights) + site
        romer_s = AU_LIGHT_S * np.einsum("ik,ik->k", r_bary, direction)
        cos_theta = (np.einsum("ik,ik->k", r_helio, direction)
                     / np.sqrt(np.einsum("ik,ik->k", r_helio, r_helio)))
        shapiro_s = SHAPIRO_SCALE_S * np.log1p(cos_theta)
        return self._interp(self.tdb_minus_tt_s, weights) + romer_s + shapiro_s

    def bjd_tdb(self, tt_days, direction) -> np.ndarray:
        """Barycentric TDB (days after J2000.0) of observed TT instants."""
        t = np.asarray(tt_days, dtype=float)
        return t + self.barycentric_offset_s(t, direction) / SECONDS_PER_DAY

    def observed_tt(self, bjd_tdb_days, direction) -> np.ndarray:
        """The observed TT instants (days after J2000.0) whose BJD_TDB is given: the
        fixed-point iteration t <- B - offset(t) (see module)."""
        b = np.asarray(bjd_tdb_days, dtype=float)
        t = b.copy()
        for _ in range(_OBSERVED_ITERATIONS):
            t = b - self.barycentric_offset_s(t, direction) / SECONDS_PER_DAY
        return t


def tt_days_of(t: Time) -> np.ndarray:
    """TT days after J2000.0 of an astropy Time."""
    tt = t.tt
    return (np.asarray(tt.jd1) - JD_J2000) + np.asarray(tt.jd2)


@quiet_erfa
def utc_of_tt_days(tt_days) -> Time:
    """UTC Time(s) of TT days after J2000.0."""
    t = Time(JD_J2000, np.asarray(tt_days, dtype=float), format="jd", scale="tt").utc
    t.format = "isot"
    return t


@quiet_erfa
def to_bjd_tdb(jd, scale: np.ndarray, direction: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Mid-event epochs as BJD_TDB (Julian dates) from `scale` per value, and what was assumed.

    bjd_tdb: unchanged. jd_utc: an observed UTC Julian date, taken as seen from the Earth's
    centre (the site would change it by at most 21 ms); add TT-UTC, TDB-TT (ERFA dtdb,
    geocentric) and the geocentric Roemer delay. hjd_utc: a heliocentric Julian date on the
    UTC scale (the usual practice before about 2010, Eastman et al. 2010 sec. 4): the
    geocentric instant t with t + r_helio(t) . n / c = HJD is found by iteration, then
    converted as jd_utc. The TDB-UTC and barycentre-heliocentre differences are each up to
    about a minute and several seconds, which is why the scale matters.
    """
    jd = np.asarray(jd, dtype=float)
    scale = np.asarray(scale, dtype=object)
    out, assumed = jd.copy(), np.full(jd.shape, "", dtype=object)
    convert = np.flatnonzero(scale != "bjd_tdb")
    if convert.size == 0:
        return out, assumed
    n = direction[:, convert]
    given = jd[convert]
    helio = scale[convert] == "hjd_utc"
    utc = given.copy()
    for _ in range(_ITERATIONS if helio.any() else 0):
        # The heliocentric light time at the geocentre, subtracted where the value is an HJD.
        tt = Time(utc, format="jd", scale="utc").tt
        earth_helio, _ = erfa.epv00(tt.jd1, tt.jd2)
        delay_d = np.einsum("ki,ik->k", earth_helio["p"], n) * AU_LIGHT_S / SECONDS_PER_DAY
        utc = np.where(helio, given - delay_d, given)
    t = Time(utc, format="jd", scale="utc")
    tdb = t.tdb
    _, earth_bary = erfa.epv00(tdb.jd1, tdb.jd2)
    romer_d = np.einsum("ki,ik->k", earth_bary["p"], n) * AU_LIGHT_S / SECONDS_PER_DAY
    out[convert] = (tdb.jd1 - JD_J2000) + tdb.jd2 + romer_d + JD_J2000
    assumed[convert] = np.where(
        helio, "HJD on the UTC scale, heliocentric light time from the Earth's centre; "
               "converted to BJD_TDB",
        "JD on the UTC scale as seen from the Earth's centre; converted to BJD_TDB")
    return out, assumed
