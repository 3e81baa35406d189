"""Windows near the mount's declination limits use the observed (refracted) declination, the
same definition the interlocks use before a slew.

Reference (tests only): astropy's HADec frame with the site's weather (observed, refracted
hour angle and declination; ERFA apco/atioq with refco) and AltAz with the same weather, for
targets carried by astropy from their catalogue place; sampled every 20 s through astropy's
astronomical darkness. Refraction lifts a target towards the zenith, so for a southern site a
target low in the north is seen at a smaller declination than its place of date: a target just
above a northern declination limit becomes reachable around its transit, which the windows
must show, and one just below it is refused where refraction is small.
"""
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, HADec, SkyCoord
from astropy.time import Time, TimeDelta

from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.export import refusals
from epochpoint.core.positions import positions

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

DEC_MAX = 35.0
MIN_ALT = 5.0
WEATHER = dict(pressure=780.0, temperature=5.0, humidity=0.3, wavelength=0.6)
# Agreement is required wherever astropy's observed declination is more than 2" from the
# limit: the window search holds each place of date fixed for the night and leaves out the
# diurnal aberration (up to 0.3"), so its declinations agree with the full chain to about 1"
# (measured worst 0.76").
DEC_MARGIN_DEG = 2.0 / 3600.0
ALT_MARGIN_DEG = 0.01


@pytest.fixture(scope="module")
def compared():
    rng = np.random.default_rng(35)
    n = 40
    ra = rng.uniform(0.0, 360.0, n)
    # Catalogue declinations around the limit: their places of date (2027) lie within about
    # 0.2 deg of the catalogue's (precession since J2000).
    dec = rng.uniform(DEC_MAX - 0.4, DEC_MAX + 0.4, n)
    site = Site(-30.2, -70.7, 2200.0, timezone="America/Santiago",
                interlocks=Interlocks(mount=MountLimits(dec_max=DEC_MAX, min_altitude=MIN_ALT),
                                      sun_avoidance=0.0), **WEATHER)
    result = plan(Targets.from_columns(ra=ra, dec=dec, epoch=2000.0), site, "2027-06-10",
                  max_seconds=0.05)
    data = result.to_json()
    start = Time(data["night"]["astronomical_twilight_end"].rstrip("Z"), scale="utc")
    end = Time(data["night"]["astronomical_twilight_start"].rstrip("Z"), scale="utc")
    t_s = np.arange(0.0, (end - start).sec, 20.0)
    times = start + TimeDelta(t_s, format="sec")
    location = EarthLocation.from_geodetic(-70.7 * u.deg, -30.2 * u.deg, 2200.0 * u.m)
    air = dict(obstime=times, location=location, pressure=WEATHER["pressure"] * u.hPa,
               temperature=WEATHER["temperature"] * u.deg_C,
               relative_humidity=WEATHER["humidity"], obswl=WEATHER["wavelength"] * u.micron)
    stars = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, frame="icrs")[:, None]
    dec_obs = stars.transform_to(HADec(**air)).dec.deg
    alt_obs = stars.transform_to(AltAz(**air)).alt.deg
    dec_unrefracted = stars.transform_to(HADec(**dict(air, pressure=0.0 * u.hPa))).dec.deg
    return dict(data=data, site=site, ra=ra, dec=dec, start=start, t_s=t_s, times=times,
                dec_obs=dec_obs, alt_obs=alt_obs, dec_unrefracted=dec_unrefracted)


def inside(windows, start, t_s):
    """For each sample time, whether it lies in one of the windows (ISO pairs)."""
    flags = np.zeros(t_s.shape, dtype=bool)
    for a, b in windows:
        ta = (Time(a.rstrip("Z"), scale="utc") - start).sec
        tb = (Time(b.rstrip("Z"), scale="utc") - start).sec
        flags |= (t_s >= ta) & (t_s <= tb)
    return flags


def test_windows_follow_the_observed_declination(compared):
    dec_obs, alt_obs, t_s = compared["dec_obs"], compared["alt_obs"], compared["t_s"]
    allowed = (dec_obs <= DEC_MAX) & (alt_obs >= MIN_ALT)
    clear = (np.abs(dec_obs - DEC_MAX) > DEC_MARGIN_DEG) & (np.abs(alt_obs - MIN_ALT) >
                                                            ALT_MARGIN_DEG)
    reached_only_by_refraction = 0
    for i, target in enumerate(compared["data"]["targets"]):
        ours = inside(target["windows"], compared["start"], t_s)
        bad = clear[i] & (ours != allowed[i])
        assert not bad.any(), (f"{target['name']}: disagrees with astropy at "
                               f"{np.count_nonzero(bad)} samples; reason {target['reason']!r}")
        # Targets whose unrefracted topocentric place is beyond the limit all night long.
        reached_only_by_refraction += bool(allowed[i].any() and
                                           compared["dec_unrefracted"][i].min() > DEC_MAX)
    assert reached_only_by_refraction >= 1, "the sample must hold a target refraction lets in"


def test_the_interlocks_agree_inside_every_window(compared):
    """Inside a window the interlock check (the one run before every slew) never refuses the
    target for its declination."""
    site, data = compared["site"], compared["data"]
    targets = Targets.from_columns(ra=compared["ra"], dec=compared["dec"], epoch=2000.0)
    checked = 0
    for i, target in enumerate(data["targets"]):
        for a, b in target["windows"]:
            ta, tb = Time(a.rstrip("Z"), scale="utc"), Time(b.rstrip("Z"), scale="utc")
            for t in (ta + 0.02 * (tb - ta), ta + 0.5 * (tb - ta), ta + 0.98 * (tb - ta)):
                result = positions(targets[i:i + 1], site, t.isot + "Z")
                assert "declination" not in refusals(result, site)[0], (target["name"], t.isot)
                checked += 1
    assert checked >= 15
