"""Windows of moving bodies (core/body_track.py, core/windows.py): the edges where the Moon
and a planet cross the altitude limit against an independent pipeline, astropy ICRS -> AltAz
with DE421 positions (jplephem's own reader, light time iterated in the test, placed on
astropy's Earth as in test_vs_astropy_de421.py), within a few seconds of time; the Sun
refused by the interlocks unless a solar filter is declared fitted.

Sites and nights are drawn from a seeded generator over latitudes -50..+50 and 2024-2030.
Refraction is off (pressure 0) so both sides compare unrefracted altitudes.
"""
import erfa
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, CartesianRepresentation, EarthLocation, ICRS
from astropy.time import Time

from epochpoint.core.limits import Interlocks, SUN_REFUSED
from epochpoint.core.plan import plan
from epochpoint.core.site import Site

from .body_helpers import jplephem_bary_au, planet_targets

C_KM_S = 299792.458
LIMIT_DEG = 10.0  # the mount's default minimum altitude


def _astropy_alt(body: str, t: Time, loc: EarthLocation) -> float:
    """Unrefracted topocentric altitude (deg) from DE421 through astropy's AltAz."""
    gcrs_p, _ = loc.get_gcrs_posvel(t)
    offset = gcrs_p.xyz.to_value(u.au)
    jd = t.tdb.jd
    observer = jplephem_bary_au("earth", jd) + offset
    tau = 0.0
    for _ in range(5):
        pb = jplephem_bary_au(body, jd - tau)
        tau = np.linalg.norm(pb - observer) * 149597870.7 / C_KM_S / 86400.0
    astropy_earth = erfa.epv00(t.tdb.jd1, t.tdb.jd2)[1][0]
    icrs = ICRS(CartesianRepresentation((pb - observer + offset + astropy_earth) * u.au))
    return float(icrs.transform_to(AltAz(obstime=t, location=loc, pressure=0.0 * u.hPa)).alt.deg)


def _astropy_crossing(body, t0: Time, loc, half_s=240.0) -> float:
    """Seconds from t0 of the astropy altitude crossing LIMIT_DEG near t0 (bisection)."""
    lo, hi = -half_s, half_s
    f_lo = _astropy_alt(body, t0 + lo * u.s, loc) - LIMIT_DEG
    assert f_lo * (_astropy_alt(body, t0 + hi * u.s, loc) - LIMIT_DEG) < 0
    for _ in range(16):
        mid = 0.5 * (lo + hi)
        f_mid = _astropy_alt(body, t0 + mid * u.s, loc) - LIMIT_DEG
        if f_mid * f_lo > 0:
            lo, f_lo = mid, f_mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def _edges_checked(result, bodies, loc) -> int:
    """Compare every window edge that is an altitude crossing (not a darkness boundary)."""
    dark = (result.night.spans["astronomical"][0], result.night.spans["astronomical"][1])
    checked = 0
    for i, body in enumerate(bodies):
        for edge_s in [t for window in result.windows.windows[i] for t in window]:
            t = result.sky.time_at(edge_s)
            if min(abs((t - d).to_value("s")) for d in dark) < 1.0:
                continue
            offset = _astropy_crossing(body, t, loc)
            assert abs(offset) < 3.0, (body, t.isot, offset)
            checked += 1
    return checked


@pytest.mark.parametrize("seed", [3, 4])
def test_moon_and_planet_window_edges_match_astropy(seed):
    rng = np.random.default_rng(seed)
    checked = 0
    bodies = ["moon", "mars", "jupiter", "venus"]
    for _ in range(3):
        lat, lon = rng.uniform(-50, 50), rng.uniform(-180, 180)
        night = Time(rng.uniform(2460310.5, 2462502.5), format="jd").datetime.date()
        site = Site(latitude=lat, longitude=lon, height=1000.0, pressure=0.0)
        result = plan(planet_targets(bodies), site, night, max_iterations=0)
        loc = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, 1000.0 * u.m)
        checked += _edges_checked(result, bodies, loc)
    assert checked >= 3  # the draw must exercise some edges


def test_moon_edge_is_not_the_fixed_ra_closed_form():
    """The Moon moves about 13 deg a day: holding its mid-night place would misplace its
    rising by minutes. Here the window's edge is within 3 s of astropy, and the fixed-place
    estimate from the mid-night hour angle is more than a minute away."""
    site = Site(latitude=-30.5, longitude=-70.7, height=2200.0, pressure=0.0)
    result = plan(planet_targets(["moon"]), site, "2027-05-01", max_iterations=0)
    loc = EarthLocation.from_geodetic(-70.7 * u.deg, -30.5 * u.deg, 2200.0 * u.m)
    assert _edges_checked(result, ["moon"], loc) >= 1
    start = result.windows.windows[0][0][0]
    geo = result.windows.geometry
    fixed_ha = geo.ha_mid[0] + 15.041 / 3600.0 * (start - geo.t_mid)
    assert abs(fixed_ha - geo.ha(np.array([0]), np.array([start]))[0]) > 0.25


def test_sun_refused_unless_a_solar_filter_is_declared():
    site = Site(latitude=-30.5, longitude=-70.7, height=2200.0)
    result = plan(planet_targets(["sun", "mars"]), site, "2027-05-01", max_iterations=0)
    assert result.windows.reason[0] == SUN_REFUSED and result.windows.windows[0] == []
    assert result.windows.windows[1]
    fitted = site.with_interlocks(Interlocks(solar_filter_fitted=True)) \
        if hasattr(site, "with_interlocks") else None
    if fitted is None:
        from dataclasses import replace
        fitted = replace(site, interlocks=Interlocks(solar_filter_fitted=True))
    result = plan(planet_targets(["sun"]), fitted, "2027-05-01", max_iterations=0)
    # Not refused; the Sun is simply never up in astronomical darkness.
    assert result.windows.reason[0] == "above 10 deg only in daylight"


def test_moon_separation_and_sun_avoidance_apply_to_planets():
    """With a Moon limit no separation meets (179 deg), a planet loses the time the Moon is
    up in its window (mid-May 2027: a waxing Moon in the evening sky, Mars setting after
    dusk); the Moon itself is never "too near the Moon". Venus, 38 deg from the Sun on
    2028-01-15 and in the dark sky at latitude 45 N, is refused with a 60 deg Sun-avoidance
    radius and kept with the default 30 deg."""
    site = Site(latitude=-30.5, longitude=-70.7, height=2200.0)
    free = plan(planet_targets(["mars", "moon"]), site, "2027-05-15", max_iterations=0)
    limited = plan(planet_targets(["mars", "moon"]), site, "2027-05-15", max_iterations=0,
                   moon_separation=179.0)
    total = lambda w: sum(e - s for s, e in w)  # noqa: E731
    assert free.windows.windows[0]
    assert total(free.windows.windows[0]) - total(limited.windows.windows[0]) > 600.0
    assert limited.windows.reason[1] != "too near the Moon" and limited.windows.windows[1]
    from dataclasses import replace
    north = Site(latitude=45.0, longitude=-70.7, height=2200.0, pressure=0.0)
    kept = plan(planet_targets(["venus"]), north, "2028-01-15", max_iterations=0)
    wary = replace(north, interlocks=Interlocks(sun_avoidance=60.0))
    avoided = plan(planet_targets(["venus"]), wary, "2028-01-15", max_iterations=0)
    assert kept.windows.windows[0] and avoided.windows.reason[0] == "too near the Sun"


def test_plan_command_solar_option_and_caution(tmp_path, capsys):
    """Off by default (the Sun refused, no caution); on by the flag or the site file's
    [safety] key, and then the caution is printed on every run, in every format."""
    import json

    from epochpoint.cli.main import main
    from epochpoint.core.limits import SOLAR_CAUTION

    targets = tmp_path / "t.csv"
    targets.write_text("name,body\nSol,sun\nRed,mars\n")
    site_file = tmp_path / "site.toml"
    site_file.write_text("[site]\nlatitude = -30.5\nlongitude = -70.7\nheight = 2200.0\n"
                         "[safety]\nsolar_filter_fitted = true\n")
    base = ["plan", str(targets), "--night", "2027-05-01", "--schedule-iterations", "0"]
    assert main(base + ["--site=-30.5,-70.7,2200", "--format", "json"]) == 0
    out, err = capsys.readouterr()
    assert json.loads(out)["targets"][0]["reason"] == SUN_REFUSED and "CAUTION" not in err
    for extra in (["--site=-30.5,-70.7,2200", "--solar-filter-fitted"],
                  ["--site", str(site_file)]):
        for fmt in ("json", "table"):
            assert main(base + extra + ["--format", fmt]) == 0
            out, err = capsys.readouterr()
            assert SOLAR_CAUTION in err
            if fmt == "table":
                assert SOLAR_CAUTION in out
            else:
                assert json.loads(out)["targets"][0]["reason"] != SUN_REFUSED
