"""Each window constraint against astropy: horizon mask, hour-angle and declination limits,
the German mount's meridian flip, the Moon, the Sun, and the reason given when nothing is left.

Reference (tests only): astropy AltAz (site weather; pressure 0 for separations), astropy's
apparent sidereal time with TETE right ascension for hour angles, get_body('sun'/'moon') for
the Sun and the Moon. Invented targets are placed on the sky with astropy (a given hour angle
at an instant, or a given offset from the Sun or the Moon), then the engine plans them.
The southern site sees a long night in June 2024: the Moon is a 3-day crescent on the 9th,
waxing gibbous on the 16th (setting at about 03:20 local) and full on the 22nd.
The planning issue asks for edges within 30 s; measured agreement is noted beside each check.
"""
from dataclasses import replace

import numpy as np
import pytest

from epochpoint.core.limits import HorizonMask, Interlocks, MountLimits
from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

import plan_reference as ref

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# Altitude, mask and hour-angle edges: the issue asks 30 s; measured under 0.5 s (the astropy side
# is re-sampled every 1 s, so its edges carry +-0.5 s).
EDGE_TOLERANCE_S = 5.0
# Moon rise/set edges: the engine takes the Moon as up while its centre is above -0.833 deg
# unrefracted; the upper limb on the refracted horizon is at -(34' + s), s = 14.7'..16.8' the
# semidiameter (Astronomical Almanac convention, common practice): the 1' spread moves the
# edge by up to about 5 s (the Moon sinks about 13' a minute). The issue asks 30 s; measured 0.4 s.
MOON_EDGE_TOLERANCE_S = 30.0
MOON_UP_DEG = -0.833

SITE = Site(-30.24, -70.74, 2200.0, pressure=775.0, temperature=7.0, humidity=0.35,
            wavelength=0.62, timezone="America/Santiago", name="southern mountain")
NIGHT = "2024-06-10"
NIGHT_CRESCENT, NIGHT_GIBBOUS, NIGHT_FULL = "2024-06-09", "2024-06-16", "2024-06-22"


def with_limits(site=SITE, **kwargs) -> Site:
    """The site with interlocks: mount=..., horizon=..., sun_avoidance=..."""
    return replace(site, interlocks=Interlocks(**kwargs))


def run(site, night, ra, dec, **kwargs):
    targets = Targets.from_columns(ra=np.atleast_1d(ra), dec=np.atleast_1d(dec), epoch=2000.0)
    return plan(targets, site, night, max_seconds=0.05, **kwargs)


@pytest.fixture(scope="module")
def night():
    """The night's clock (any plan's t_ref) and astropy's astronomical darkness."""
    clock = run(SITE, NIGHT, 0.0, 0.0)
    (dark,) = ref.sun_below(SITE, clock, -18.0)
    return clock, dark


def ra_at_hour_angle(site, clock, seconds: float, ha_deg: float) -> float:
    """ICRS right ascension that sits at about hour angle ha_deg at an instant (astropy
    sidereal time; precession since J2000 shifts it by up to a degree near the poles, which
    only moves the test's target a little: expectations come from astropy's own hour angle)."""
    return float(np.mod(ref.local_sidereal_deg(site, clock, seconds) - ha_deg, 360.0))


def assert_windows_match(ours, theirs, tolerance_s, what):
    assert len(ours) == len(theirs), f"{what}: ours {ours}, astropy {theirs}"
    diff = np.abs(np.subtract(ours, theirs)) if ours else np.zeros(1)
    assert diff.max() <= tolerance_s, f"{what}: ours {ours}, astropy {theirs}"
    return diff.max()


# --- Horizon mask -----------------------------------------------------------------------

WALL = HorizonMask(azimuth=np.array([0.0, 79.999, 80.0, 120.0, 120.001]),
                   altitude=np.array([0.0, 0.0, 40.0, 40.0, 0.0]))


def wall_altitude(az_deg):
    """The wall as the test reads it: 40 deg over azimuths 80-120, nothing elsewhere."""
    return np.where((az_deg >= 80.0) & (az_deg <= 120.0), 40.0, 0.0)


@pytest.mark.parametrize("dec, leaves_by", [(-20.0, "the wall's top"), (-10.0, "its side")])
def test_horizon_mask_edges_where_astropy_track_clears_the_wall(night, dec, leaves_by):
    # Reference: astropy AltAz of the target every 25 s, re-sampled every 1 s at each change
    # of "altitude >= max(20, wall(azimuth))"; the target rises at hour angle -6 h at dusk
    # through the wall (dec -20 climbs over its top, dec -10 leaves it by its north side).
    # Measured: 0.4 s.
    clock, dark = night
    ra = ra_at_hour_angle(SITE, clock, dark[0], -90.0)
    coords = ref.icrs([ra], [dec])
    site = with_limits(horizon=WALL)

    def visible(seconds, wall=True):
        alt, az = ref.target_altaz(site, clock, coords, seconds)
        return alt[0] >= np.maximum(20.0, wall_altitude(az[0]) if wall else 0.0)

    t_s = ref.grid_inside(*dark)
    theirs = ref.refined_runs(t_s, visible(t_s), visible)
    without_wall = ref.refined_runs(t_s, visible(t_s, False), lambda s: visible(s, False))
    assert theirs and theirs[0][0] > without_wall[0][0] + 600.0, "the wall must cut"
    ours = run(site, NIGHT, ra, dec, min_altitude=20.0).windows.windows[0]
    assert_windows_match(ours, theirs, EDGE_TOLERANCE_S, f"dec {dec} leaving by {leaves_by}")


# --- Mount limits -----------------------------------------------------------------------

def astropy_hour_angle(site, clock, coords, t_s):
    """Hour angle (deg, -180..180) = apparent sidereal time - RA of date (astropy)."""
    ra, _ = ref.of_date_deg(coords, clock, float(np.mean(t_s)))
    return np.mod(ref.local_sidereal_deg(site, clock, t_s) - ra + 180.0, 360.0) - 180.0


def time_of_hour_angle(t_s, ha_deg, level):
    (cross,) = [t for t, rising in ref.crossings(t_s, ha_deg, level) if rising]
    return cross


def test_hour_angle_limits_cut_where_astropy_hour_angle_reaches_them(night):
    # Reference: astropy apparent sidereal time minus TETE right ascension crossing -3 h
    # (east limit) and +2 h (west limit); a circumpolar target (dec -80, never below 20 deg
    # here) transiting at mid-darkness. Measured: 0.002 s.
    clock, dark = night
    middle = 0.5 * (dark[0] + dark[1])
    ra = ra_at_hour_angle(SITE, clock, middle, 0.0)
    site = with_limits(mount=MountLimits(ha_east=3.0, ha_west=2.0))
    t_s = ref.grid_inside(*dark)
    ha = astropy_hour_angle(site, clock, ref.icrs([ra], [-80.0]), t_s)
    theirs = [(time_of_hour_angle(t_s, ha, -45.0), time_of_hour_angle(t_s, ha, 30.0))]
    ours = run(site, NIGHT, ra, -80.0).windows.windows[0]
    assert_windows_match(ours, theirs, EDGE_TOLERANCE_S, "hour-angle limits -3 h .. +2 h")


def test_german_mount_splits_at_meridian_limit_and_at_meridian(night):
    # Reference: astropy hour angle (sidereal time - TETE RA). A German mount tracking up
    # to 15 deg past the meridian gives two overlapping blocks (the pieces an observation
    # must fit in): east side from dusk to HA = +15 deg, flipped side from HA = 0 to dawn;
    # the target's window is their union. The hour-angle limits of +-6 h lie outside this
    # night; dec -75 stays above 15 deg all night. Measured: 0.004 s.
    clock, dark = night
    ra = ra_at_hour_angle(SITE, clock, 0.5 * (dark[0] + dark[1]), 0.0)
    site = with_limits(mount=MountLimits(mount_type="german", meridian_limit=15.0,
                                         ha_east=6.0, ha_west=6.0))
    t_s = ref.grid_inside(*dark)
    ha = astropy_hour_angle(site, clock, ref.icrs([ra], [-75.0]), t_s)
    assert ha[0] > -90.0 and ha[-1] < 90.0, "the +-6 h limits must not bind"
    theirs = [(dark[0], time_of_hour_angle(t_s, ha, 15.0)),
              (time_of_hour_angle(t_s, ha, 0.0), dark[1])]
    w = run(site, NIGHT, ra, -75.0).windows
    assert_windows_match(w.blocks[0], theirs, EDGE_TOLERANCE_S, "German mount flip")
    assert w.blocks[0][1][0] < w.blocks[0][0][1], "the two sides of the flip overlap"
    assert_windows_match(w.windows[0], [dark], EDGE_TOLERANCE_S, "union of the two sides")


def test_declination_limits_give_the_reason(night):
    # Reference: astropy TETE declination of date against the mount's range -60..+20 deg;
    # all three targets transit at mid-darkness, so only the declination decides.
    clock, dark = night
    middle = 0.5 * (dark[0] + dark[1])
    ra = ra_at_hour_angle(SITE, clock, middle, 0.0)
    decs = np.array([-70.0, 25.0, -20.0])
    _, dec_of_date = ref.of_date_deg(ref.icrs(np.full(3, ra), decs), clock, middle)
    inside = (dec_of_date >= -60.0) & (dec_of_date <= 20.0)
    assert list(inside) == [False, False, True]
    site = with_limits(mount=MountLimits(dec_min=-60.0, dec_max=20.0))
    w = run(site, NIGHT, np.full(3, ra), decs).windows
    assert list(w.reason[:2]) == ["outside the mount's declination limits"] * 2
    assert not w.windows[0] and not w.windows[1]
    assert w.windows[2] and not w.reason[2]


# --- Moon and Sun -----------------------------------------------------------------------

def placed_above(site, clock, body: str, seconds: float, offset_deg: float):
    """ICRS direction offset_deg straight above the body (same azimuth) at an instant."""
    alt, az = ref.body_altaz(site, clock, body, np.array([seconds]))
    coords = ref.from_altaz(site, clock, seconds, alt + offset_deg, az)
    return coords, float(coords.ra.deg[0]), float(coords.dec.deg[0])


def astropy_moon_rule(site, clock, coords, limit, separation):
    """ok(seconds): target above the limit and (Moon down or at least `separation` away)."""
    airless = site.with_weather(pressure=0.0)

    def ok(seconds):
        alt, _ = ref.target_altaz(site, clock, coords, seconds)
        geo_alt, geo_az = ref.target_altaz(airless, clock, coords, seconds)
        moon_alt, moon_az = ref.body_altaz(site, clock, "moon", seconds)
        far = ref.separation_deg(geo_alt[0], geo_az[0], moon_alt, moon_az) >= separation
        return (alt[0] >= limit) & ((moon_alt <= MOON_UP_DEG) | far)

    return ok


def test_moon_separation_cuts_the_window_while_the_moon_is_up():
    # Reference: astropy AltAz of the target and get_body('moon'). A target placed 10 deg
    # above the waxing gibbous Moon at mid-darkness, with a 20 deg Moon separation, can only
    # be observed once the Moon has set, low in the west: from moonset until it sinks below
    # the 5 deg limit (while the Moon is up a target 10 deg from it cannot also be above
    # the limit with the Moon more than 20 deg away). Measured: moonset edge 0.4 s, 5 deg
    # edge 1.4 s (the refraction models part below 15 deg, by a few arcseconds here).
    site = with_limits(mount=MountLimits(min_altitude=5.0))
    clock = run(site, NIGHT_GIBBOUS, 0.0, 0.0)
    (dark,) = ref.sun_below(site, clock, -18.0)
    coords, ra, dec = placed_above(site, clock, "moon", 0.5 * (dark[0] + dark[1]), 10.0)
    ok = astropy_moon_rule(site, clock, coords, 5.0, 20.0)
    t_s = ref.grid_inside(*dark)
    theirs = ref.refined_runs(t_s, ok(t_s), ok)
    (moon_down,) = [s for s in ref.body_below(site, clock, "moon", MOON_UP_DEG)
                    if dark[0] < s[0] < dark[1]]
    assert len(theirs) == 1 and abs(theirs[0][0] - moon_down[0]) < 2.0, "starts at moonset"
    assert theirs[0][1] - theirs[0][0] > 600.0
    free = run(site, NIGHT_GIBBOUS, ra, dec).windows.windows[0]
    assert free[0][0] < moon_down[0] - 3600.0, "without the rule it is up long before"
    ours = run(site, NIGHT_GIBBOUS, ra, dec, moon_separation=20.0).windows.windows[0]
    assert_windows_match(ours, theirs, MOON_EDGE_TOLERANCE_S, "cut by the Moon")


def test_moon_separation_scaled_by_a_thin_crescent_does_not_cut():
    # Reference: astropy's Moon and Sun give the crescent's illuminated fraction
    # k = (1 + cos i) / 2, i the phase angle (Meeus, Astronomical Algorithms, ch. 48), with i
    # taken as 180 deg - elongation (eq. 48.3 less a term under 0.15 deg): 20 x k is far
    # below the 10 deg the target stands from the Moon, so the scaled rule never cuts, while
    # the full 20 deg rule cuts until the Moon sets (astropy's moonset, 30 s).
    clock = run(SITE, NIGHT_CRESCENT, 0.0, 0.0)
    (dark,) = ref.sun_below(SITE, clock, -18.0)
    (moon_down,) = [s for s in ref.body_below(SITE, clock, "moon", MOON_UP_DEG)
                    if dark[0] < s[0] < dark[1]]
    assert moon_down[0] - dark[0] > 1800.0, "the crescent is up for a while in the dark"
    placed_at = 0.5 * (dark[0] + moon_down[0])
    coords, ra, dec = placed_above(SITE, clock, "moon", placed_at, 10.0)
    sun_alt, sun_az = ref.body_altaz(SITE, clock, "sun", np.array([placed_at]))
    moon_alt, moon_az = ref.body_altaz(SITE, clock, "moon", np.array([placed_at]))
    elongation = ref.separation_deg(sun_alt, sun_az, moon_alt, moon_az)[0]
    illuminated = 0.5 * (1.0 + np.cos(np.radians(180.0 - elongation)))
    assert 20.0 * illuminated < 5.0

    site = with_limits(mount=MountLimits(min_altitude=5.0))
    free = run(site, NIGHT_CRESCENT, ra, dec).windows.windows[0]
    scaled = run(site, NIGHT_CRESCENT, ra, dec, moon_separation=20.0,
                 moon_scale=True).windows.windows[0]
    full = run(site, NIGHT_CRESCENT, ra, dec, moon_separation=20.0).windows.windows[0]
    assert free and free[0][0] < moon_down[0] - 1800.0, "the target is up with the Moon"
    assert_windows_match(scaled, free, 1.0, "scaled by the crescent")
    assert abs(full[0][0] - moon_down[0]) <= MOON_EDGE_TOLERANCE_S, (full, moon_down)


def test_sun_avoidance_removes_a_twilight_target_near_the_sun():
    # Reference: astropy get_body('sun'): with civil darkness the Sun is at -6 deg when the
    # night starts; a target 25 deg straight above it stands at about 19 deg altitude,
    # above the 10 deg limit, but inside the 30 deg avoidance radius all night; one 35 deg
    # above is kept, and astropy puts every instant of its window 30 deg or more from the Sun.
    clock = run(SITE, NIGHT, 0.0, 0.0)
    (civil,) = ref.sun_below(SITE, clock, -6.0)
    near, ra_near, dec_near = placed_above(SITE, clock, "sun", civil[0] + 60.0, 25.0)
    far, ra_far, dec_far = placed_above(SITE, clock, "sun", civil[0] + 60.0, 35.0)
    alt, _ = ref.target_altaz(SITE, clock, near, np.array([civil[0] + 60.0]))
    assert alt[0, 0] > 15.0, "the near target is above the limit in the civil dark"
    t_s = ref.grid_inside(*civil, step_s=600.0)
    airless = SITE.with_weather(pressure=0.0)
    t_alt, t_az = ref.target_altaz(airless, clock, near, t_s)
    s_alt, s_az = ref.body_altaz(SITE, clock, "sun", t_s)
    assert ref.separation_deg(t_alt[0], t_az[0], s_alt, s_az).max() < 30.0
    w = run(SITE, NIGHT, [ra_near, ra_far], [dec_near, dec_far], darkness="civil").windows
    assert w.reason[0] == "too near the Sun" and not w.windows[0]
    assert w.windows[1] and not w.reason[1]
    for start, end in w.windows[1]:
        t_s = ref.grid_inside(start, end)
        t_alt, t_az = ref.target_altaz(airless, clock, far, t_s)
        s_alt, s_az = ref.body_altaz(SITE, clock, "sun", t_s)
        assert ref.separation_deg(t_alt[0], t_az[0], s_alt, s_az).min() >= 30.0 - 0.01


# --- Reasons for targets never observable -----------------------------------------------

def test_reason_never_rises_above_the_limit(night):
    # Reference: astropy AltAz over the whole noon-to-noon window: dec +65 at latitude -30
    # culminates at about -5 deg, below the 20 deg limit.
    clock, _ = night
    coords = ref.icrs([40.0], [65.0])
    alt, _ = ref.target_altaz(SITE, clock, coords, np.arange(0.0, 86400.0, 300.0))
    assert alt.max() < 20.0
    w = run(SITE, NIGHT, 40.0, 65.0, min_altitude=20.0).windows
    assert w.reason[0] == "never rises above 20 deg" and not w.windows[0]


def test_reason_only_in_daylight(night):
    # Reference: astropy: a target 15 deg above the Sun at local noon is above 10 deg for
    # hours in the day but never during astropy's astronomical darkness.
    clock, dark = night
    coords, ra, dec = placed_above(SITE, clock, "sun", 0.0, 15.0)
    day = np.arange(0.0, 86400.0, 300.0)
    alt, _ = ref.target_altaz(SITE, clock, coords, day)
    in_dark = (day >= dark[0]) & (day <= dark[1])
    assert alt[0][~in_dark].max() > 30.0 and alt[0][in_dark].max() < 0.0
    w = run(SITE, NIGHT, ra, dec).windows
    assert w.reason[0] == "above 10 deg only in daylight" and not w.windows[0]


def test_reason_outside_hour_angle_limits(night):
    # Reference: astropy hour angle: a circumpolar target (dec -80) that transits at local
    # noon has |HA| > 4 h all through the dark, outside a mount limited to +-1 h.
    clock, dark = night
    ra = ra_at_hour_angle(SITE, clock, 0.0, 0.0)
    t_s = ref.grid_inside(*dark, step_s=300.0)
    ha = astropy_hour_angle(SITE, clock, ref.icrs([ra], [-80.0]), t_s)
    assert np.abs(ha).min() > 60.0
    site = with_limits(mount=MountLimits(ha_east=1.0, ha_west=1.0))
    w = run(site, NIGHT, ra, -80.0).windows
    assert w.reason[0] == "outside the mount's hour-angle limits" and not w.windows[0]


def test_reason_behind_the_horizon_mask(night):
    # Reference: astropy AltAz: from latitude -30 a dec +10 target stays in the northern
    # half of the sky (azimuth beyond 270 or below 90) and culminates at about 50 deg,
    # under a 60 deg wall that covers the north.
    clock, dark = night
    north_wall = HorizonMask(azimuth=np.array([0.0, 90.0, 90.001, 269.999, 270.0]),
                             altitude=np.array([60.0, 60.0, 0.0, 0.0, 60.0]))
    ra = ra_at_hour_angle(SITE, clock, 0.5 * (dark[0] + dark[1]), 0.0)
    alt, az = ref.target_altaz(SITE, clock, ref.icrs([ra], [10.0]),
                               ref.grid_inside(*dark, step_s=120.0))
    north = (az[0] < 90.0) | (az[0] > 270.0)
    assert alt[0].max() > 40.0 and np.all(~north | (alt[0] < 60.0))
    assert np.all(north | (alt[0] < 10.0))
    w = run(with_limits(horizon=north_wall), NIGHT, ra, 10.0).windows
    assert w.reason[0] == "behind the horizon mask" and not w.windows[0]


def test_reason_too_near_the_moon():
    # Reference: astropy: a target 5 deg above the full Moon; whenever it is above 10 deg
    # in the dark, the Moon is up and under 20 deg away.
    clock = run(SITE, NIGHT_FULL, 0.0, 0.0)
    (dark,) = ref.sun_below(SITE, clock, -18.0)
    coords, ra, dec = placed_above(SITE, clock, "moon", 0.5 * (dark[0] + dark[1]), 5.0)
    t_s = ref.grid_inside(*dark, step_s=120.0)
    ok = astropy_moon_rule(SITE, clock, coords, 10.0, 20.0)(t_s)
    alt, _ = ref.target_altaz(SITE, clock, coords, t_s)
    assert not ok.any() and alt.max() > 40.0
    w = run(SITE, NIGHT_FULL, ra, dec, moon_separation=20.0).windows
    assert w.reason[0] == "too near the Moon" and not w.windows[0]


def test_reason_no_darkness_at_69_north_in_june():
    # Reference: astropy's Sun stays above -18 deg all through the night of 2024-06-21 at
    # +69.65 deg (the midnight Sun; it never even sets there then).
    arctic = Site(69.65, 18.96, 20.0, timezone="Europe/Oslo")
    p = run(arctic, "2024-06-21", [10.0, 200.0], [60.0, 20.0])
    assert ref.sun_below(arctic, p, -18.0) == []
    assert list(p.windows.reason) == ["no astronomical darkness tonight"] * 2
    assert p.windows.windows == [[], []]
