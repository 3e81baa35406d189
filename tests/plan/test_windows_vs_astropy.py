"""Observable windows, peak altitudes and transits against a dense astropy altitude grid.

Reference (tests only): astropy AltAz with the same pressure, temperature, humidity and
wavelength as the site (ERFA refco/atioq refraction), sampled every 25 s through astropy's own
astronomical darkness (get_body('sun') below -18 deg, pressure 0); astropy HADec for the hour
angle. 40 random targets, three sites (south, north, near the equator), two nights, with and
without refraction (pressure 0 on both sides). The targets are Gaia-epoch (2016.0) positions
with proper motion and parallax, four of them moving 5-10"/yr (Barnard's star moves 10.4"/yr,
from memory): astropy carries them to mid-darkness with SkyCoord.apply_space_motion, so a
window computed from the catalogue place instead of the place of the night would be caught.
Altitude limits are 20 deg and above, where the engine's refraction is SOFA's A tan z +
B tan^3 z (refraction.py), so both sides use one model. The planning issue asks for window
edges within 30 s, peaks within 0.01 deg, transits within 30 s; measured agreement is
recorded beside each tolerance.
"""
import zlib

import numpy as np
import pytest

from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

import plan_reference as ref

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# The issue asks for 30 s, 0.01 deg and 30 s; measured worst (2024 nights below): altitude
# edges 0.15 s, darkness edges 0.05 s, peaks 0.0002 deg, transits 0.13 s. The bounds keep a
# tenfold margin over the measurements and still fail if the fast movers were planned at
# their catalogue place (their edges then move by 3.5-5 s).
EDGE_TOLERANCE_S = 2.0
DARK_TOLERANCE_S = 2.0
PEAK_TOLERANCE_DEG = 0.002
TRANSIT_TOLERANCE_S = 2.0
# Targets whose astropy peak in the dark is this close to the limit graze it: a window of a
# few seconds may appear on one side only, so they are left out of the edge comparison.
GRAZE_DEG = 0.02
N_TARGETS = 40

WEATHER = dict(pressure=775.0, temperature=7.0, humidity=0.35, wavelength=0.62)
# Invented sites at real-world latitudes: (site, altitude limit in deg).
SITES = {
    "south": (Site(-30.24, -70.74, 2200.0, timezone="America/Santiago", **WEATHER), 20.0),
    "north": (Site(47.26, 11.39, 600.0, timezone="Europe/Vienna", **WEATHER), 25.0),
    "equator": (Site(0.9, 36.8, 1800.0, timezone="Africa/Nairobi", **WEATHER), 30.0),
}
NIGHTS = ("2024-03-12", "2024-09-05")


def random_targets(latitude: float, seed: int) -> dict:
    """Targets.from_columns keywords: RA uniform, declinations that rise and set through the
    limit at this latitude, epoch 2016.0, motions up to 10"/yr."""
    rng = np.random.default_rng(seed)
    ra = rng.uniform(0.0, 360.0, N_TARGETS)
    lo, hi = max(-88.0, latitude - 70.0), min(88.0, latitude + 70.0)
    dec = np.degrees(np.arcsin(rng.uniform(np.sin(np.radians(lo)), np.sin(np.radians(hi)),
                                           N_TARGETS)))
    pm_total = rng.uniform(0.0, 200.0, N_TARGETS)
    pm_total[:4] = [5000.0, 7000.0, 8500.0, 10000.0]
    angle = rng.uniform(0.0, 2.0 * np.pi, N_TARGETS)
    return dict(ra=ra, dec=dec, pm_ra_cosdec=pm_total * np.cos(angle),
                pm_dec=pm_total * np.sin(angle), parallax=rng.uniform(1.0, 300.0, N_TARGETS),
                radial_velocity=rng.uniform(-100.0, 100.0, N_TARGETS), epoch=2016.0)


CASES = [(name, night, refracted) for name in SITES for night in NIGHTS
         for refracted in (True, False)]


@pytest.fixture(scope="module", params=CASES,
                ids=[f"{n}-{d}-{'refracted' if r else 'pressure0'}" for n, d, r in CASES])
def compared(request):
    """Our plan and astropy's grid for one site, night and refraction setting."""
    name, night, refracted = request.param
    site, limit = SITES[name]
    if not refracted:
        site = site.with_weather(pressure=0.0)
    columns = random_targets(site.latitude, seed=zlib.crc32(f"{name} {night}".encode()))
    ours = plan(Targets.from_columns(**columns), site, night, min_altitude=limit,
                max_seconds=0.05)
    (dark,) = ref.sun_below(site, ours, -18.0)
    coords = ref.catalogue_place(columns, ours, 0.5 * (dark[0] + dark[1]))
    t_s = ref.grid_inside(*dark)
    alt, _ = ref.target_altaz(site, ours, coords, t_s)
    return dict(site=site, limit=limit, plan=ours, dark=dark, t_s=t_s, alt=alt,
                coords=coords)


def test_darkness_edges_match_astropy_sun(compared):
    # Reference: astropy get_body('sun') in AltAz, pressure 0, crossing -18 deg (the
    # Astronomical Almanac's astronomical twilight). Measured: under 0.5 s.
    night = compared["plan"].night
    ours = [float((t - compared["plan"].t_ref).to_value("s"))
            for t in (night.astronomical_twilight_end, night.astronomical_twilight_start)]
    diff = np.abs(np.subtract(ours, compared["dark"]))
    assert diff.max() <= DARK_TOLERANCE_S, f"darkness edges off by {diff} s"


def _edge_differences(ours_per_target, theirs_per_target, dark) -> dict:
    """Per kind of edge ('altitude' or 'darkness'), |ours - astropy's| for matching edges;
    a target whose window count differs fails at once."""
    found = {"altitude": [], "darkness": []}
    for i, (ours, theirs) in enumerate(zip(ours_per_target, theirs_per_target)):
        if theirs is None:  # grazing target, left out
            continue
        assert len(ours) == len(theirs), f"target {i}: ours {ours} vs astropy {theirs}"
        for edge_ours, edge_theirs in zip(np.ravel(ours), np.ravel(theirs)):
            kind = "darkness" if np.abs(np.subtract(dark, edge_theirs)).min() < 1e-6 else \
                "altitude"
            found[kind].append(abs(edge_ours - edge_theirs))
    return {kind: np.array(diffs) for kind, diffs in found.items()}


def test_window_edges_match_astropy_altitude_crossings(compared):
    # Reference: the 25 s astropy AltAz grid through astropy's darkness, crossings of the
    # limit interpolated; edges clipped by darkness are astropy's Sun crossings of -18 deg.
    # Measured worst: 0.15 s (refracted and pressure 0 alike).
    alt, limit = compared["alt"], compared["limit"]
    theirs = [None if abs(row.max() - limit) < GRAZE_DEG
              else ref.runs_above(compared["t_s"], row, limit) for row in alt]
    diffs = _edge_differences(compared["plan"].windows.windows, theirs, compared["dark"])
    assert diffs["altitude"].size >= 15, "too few edges set by the altitude limit to test"
    for kind, diff in diffs.items():
        assert diff.max(initial=0.0) <= EDGE_TOLERANCE_S, f"{kind} edges off by {diff.max()} s"


def kasten_young_airmass(alt_deg):
    """Kasten & Young (1989), Applied Optics 28, 4735: X = 1 / (sin h + 0.50572 (h + 6.07995)
    ^-1.6364), h the observed altitude in degrees (coefficients as published)."""
    h = np.maximum(alt_deg, 0.0)
    return 1.0 / (np.sin(np.radians(h)) + 0.50572 * (h + 6.07995) ** -1.6364)


def test_max_airmass_edges_match_kasten_young_on_astropy_altitudes():
    # Reference: astropy's refracted altitudes turned into airmass by the published formula;
    # windows are where that airmass is at most 1.5 (about 41.8 deg). Measured worst: 0.15 s.
    site, _ = SITES["south"]
    columns = random_targets(site.latitude, seed=15)
    ours = plan(Targets.from_columns(**columns), site, NIGHTS[0], max_airmass=1.5,
                max_seconds=0.05)
    (dark,) = ref.sun_below(site, ours, -18.0)
    t_s = ref.grid_inside(*dark)
    coords = ref.catalogue_place(columns, ours, 0.5 * (dark[0] + dark[1]))
    alt, _ = ref.target_altaz(site, ours, coords, t_s)
    airmass = kasten_young_airmass(alt)
    theirs = [None if abs(row.min() - 1.5) < 1e-3 else ref.runs_above(t_s, -row, -1.5)
              for row in airmass]
    diffs = _edge_differences(ours.windows.windows, theirs, dark)
    assert diffs["altitude"].size >= 15
    for kind, diff in diffs.items():
        assert diff.max(initial=0.0) <= EDGE_TOLERANCE_S, f"{kind} edges off by {diff.max()} s"


def test_unobservable_targets_never_reach_the_limit_in_astropy(compared):
    # Reference: the same astropy grid; a target without windows stays below the limit.
    p, limit = compared["plan"], compared["limit"]
    for i, windows in enumerate(p.windows.windows):
        if not windows:
            assert compared["alt"][i].max() < limit + GRAZE_DEG, f"target {i} is up in astropy"


def test_max_altitude_matches_astropy_grid_maximum(compared):
    # Reference: astropy's highest altitude in its darkness: the 25 s grid maximum refined on
    # a 1 s astropy grid around it (the 25 s grid alone can miss a near-zenith peak by more
    # than 0.01 deg). Targets whose peak is below 15 deg are left out (refraction models part
    # there). Measured worst: 0.0002 deg.
    p, t_s = compared["plan"], compared["t_s"]
    alt = compared["alt"]
    j = np.argmax(alt, axis=1)
    high = np.flatnonzero(alt[np.arange(alt.shape[0]), j] > 15.0)
    dark = compared["dark"]
    fine = np.clip(t_s[j[high], None] + np.arange(-30.0, 31.0, 1.0)[None, :], dark[0], dark[1])
    fine_alt, _ = ref.target_altaz(compared["site"], p, compared["coords"][high], fine)
    theirs = np.maximum(fine_alt.max(axis=1), alt[high].max(axis=1))
    diff = np.abs(p.windows.max_altitude[high] - theirs)
    assert high.size >= 20
    assert diff.max() <= PEAK_TOLERANCE_DEG, f"worst {diff.max():.5f} deg"


def test_transit_matches_astropy_hour_angle_zero(compared):
    # Reference: astropy HADec (topocentric hour angle, pressure 0) crossing 0 upward, on a
    # 20 s grid of +-10 min around our transit (the hour angle is linear in time, so the
    # interpolation is exact to milliseconds). Measured worst: 0.13 s.
    p = compared["plan"]
    t_s = p.windows.transit[:, None] + np.arange(-600.0, 601.0, 20.0)[None, :]
    ha = ref.target_ha_deg(compared["site"], p, compared["coords"], t_s)
    worst = 0.0
    for i, transit in enumerate(p.windows.transit):
        ups = [t for t, rising in ref.crossings(t_s[i], ha[i], 0.0) if rising]
        assert len(ups) == 1, f"target {i}: astropy hour angle does not pass 0 within 10 min"
        worst = max(worst, abs(ups[0] - transit))
    assert worst <= TRANSIT_TOLERANCE_S, f"worst {worst:.2f} s"
