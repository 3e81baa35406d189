"""The event search over many nights: complete against a brute force in the test, and usable
from the Python API and the command line.

Brute-force reference (independent of the code under test): every cycle's observed mid time
from astropy's barycentric light travel time (inverted by iteration), the Sun's and the
target's altitude at that instant from astropy's AltAz (no refraction), and the Sun's
distance from astropy's separation.
"""
import datetime as dt
import json
import warnings

import astropy.units as u
import numpy as np
import pytest
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_sun
from astropy.time import Time

import epochpoint as ep
from epochpoint.cli.main import main
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

SEED = 20270310
MARGIN_DEG = 0.5


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def _catalogue(rng, n, first_jd):
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-0.9, 0.9, n)))
    period = rng.uniform(0.6, 5.0, n)
    extra = {"event_epoch": np.char.mod("%.6f", first_jd - rng.uniform(0.0, 400.0, n)),
             "event_period": np.char.mod("%.7f", period),
             "event_duration": np.char.mod("%.3f", rng.uniform(1.0, 4.0, n)),
             "event_baseline": np.full(n, "20"), "event_kind": np.full(n, "transit")}
    return Targets.from_columns(ra=ra, dec=dec, name=[f"E{i}" for i in range(n)], extra=extra)


def _brute_force(targets, site, first_date, nights):
    """{(name, cycle): mid Time} of every cycle whose mid-event (astropy) falls when the Sun is
    below -18 - margin and the target above 10 + margin deg and over 30 + margin deg from the
    Sun, between the first night's noon and the last night's next noon."""
    loc = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                      site.height * u.m)
    start = Time(f"{first_date}T12:00:00", scale="utc") - site.longitude / 360.0 * u.day
    end = start + nights * u.day
    names, cycles, bjds, coords = [], [], [], []
    for i, name in enumerate(targets.names()):
        t0 = float(targets.extra["event_epoch"][i])
        period = float(targets.extra["event_period"][i])
        lo = int(np.floor((start.tdb.jd - t0) / period)) - 1
        hi = int(np.ceil((end.tdb.jd - t0) / period)) + 1
        for n in range(lo, hi + 1):
            names.append(name)
            cycles.append(n)
            bjds.append(t0 + n * period)
            coords.append((targets.ra[i], targets.dec[i]))
    coord = SkyCoord(ra=[c[0] for c in coords] * u.deg, dec=[c[1] for c in coords] * u.deg)
    bjd = np.array(bjds)
    t = Time(bjd, format="jd", scale="tdb", location=loc)
    for _ in range(4):
        ltt = t.light_travel_time(coord, kind="barycentric", location=loc)
        t = Time(Time(bjd, format="jd", scale="tdb") - ltt, location=loc)
    frame = AltAz(obstime=t.utc, location=loc)
    sun = get_sun(t.utc)
    sun_alt = sun.transform_to(frame).alt.deg
    alt = coord.transform_to(frame).alt.deg
    sun_sep = coord.separation(sun).deg
    inside = (t.utc > start) & (t.utc < end)
    good = inside & (sun_alt < -18.0 - MARGIN_DEG) & (alt > 10.0 + MARGIN_DEG) & \
        (sun_sep > 30.0 + MARGIN_DEG)
    return {(names[k], cycles[k]): t.utc[k] for k in np.flatnonzero(good)}


@pytest.mark.parametrize("latitude,longitude,first_date", [
    (31.96, -111.6, "2027-01-05"), (-30.2, -70.7, "2027-06-10"), (51.5, 10.0, "2028-10-20"),
    (-24.6, 135.2, "2029-03-02")])
def test_every_observable_mid_event_is_listed(latitude, longitude, first_date):
    """Completeness over 20 nights: every cycle whose mid-event is in astronomical darkness with
    the target above 10 deg (and clear of the Sun) is listed, not as 'none', with its mid
    time within 1 s of the brute force (source: astropy, see module)."""
    rng = np.random.default_rng([SEED, int(latitude * 100) + 9000])
    site = Site(latitude=latitude, longitude=longitude, height=1500.0)
    first_jd = Time(f"{first_date}T00:00:00", scale="utc").jd
    targets = _catalogue(rng, 25, first_jd)
    expected = _brute_force(targets, site, first_date, 20)
    found = ep.events(targets, site, first_date, 20)
    listed = {(n, int(c)): (mid, obs) for n, c, mid, obs in zip(
        found["name"], found["cycle"], found["mid"], found["observable"])}
    assert len(expected) > 20
    missing = sorted(set(expected) - set(listed))
    assert not missing
    for key, reference in expected.items():
        mid, observable = listed[key]
        assert observable in ("full", "partial")
        assert abs((Time(mid.rstrip("Z"), scale="utc") - reference).sec) < 1.0


def test_none_only_with_all_and_fields_are_complete():
    """'none' events appear only when asked for; every row carries the listed fields, times
    end in Z (the project's rule for every boundary)."""
    rng = np.random.default_rng(SEED)
    site = Site(latitude=-30.2, longitude=-70.7, height=2200.0)
    targets = _catalogue(rng, 15, 2461450.0)
    some = ep.events(targets, site, "2027-03-01", 5)
    every = ep.events(targets, site, "2027-03-01", 5, include_all=True)
    assert "none" not in set(some["observable"])
    assert "none" in set(every["observable"])
    assert every.nrows > some.nrows
    data = every.to_json()
    assert data["timezone"] and len(data["nights"]) == 5
    for row in data["events"]:
        assert {"name", "cycle", "start", "mid", "end", "mid_error_s", "alt_start", "alt_mid",
                "alt_end", "moon_distance", "moon_illumination", "observable"} <= set(row)
        assert row["mid"].endswith("Z") and row["start"] < row["mid"] < row["end"]
        assert (row["observable"] == "full") == (not row["lost"])


def _write_csv(path, rows):
    header = ("name,ra,dec,event_epoch,event_time_scale,event_period,event_duration,"
              "event_epoch_error,event_period_error,event_baseline,event_kind")
    path.write_text("\n".join([header] + rows) + "\n")


def test_cli_json_and_one_line_errors(tmp_path, capsys):
    """`epochpoint events` writes an object with an events list; a bad cell is one line
    naming the file, row and column, with exit status 2."""
    good = tmp_path / "events.csv"
    _write_csv(good, ["Alpha,150.0,-20.0,2461400.5123,bjd_tdb,2.3456,2.5,0.0004,0.000003,30,"
                      "transit",
                      "Beta,170.0,-45.0,2455000.1234,hjd_utc,1.2345,1.8,0.001,0.00002,45,"
                      "primary eclipse"])
    status = main(["events", str(good), "--site=-30.2,-70.7,2200", "--from", "2027-03-01",
                   "--nights", "5", "--format", "json"])
    out = capsys.readouterr().out
    assert status == 0
    data = json.loads(out)
    assert data["events"] and data["epoch_conversions"][0]["name"] == "Beta"
    bad = tmp_path / "bad.csv"
    _write_csv(bad, ["Alpha,150.0,-20.0,2461400.5123,bjd_tdb,-2.3,2.5,,,,transit"])
    status = main(["events", str(bad), "--site=-30.2,-70.7,2200", "--from", "2027-03-01"])
    err = capsys.readouterr().err.strip()
    assert status == 2 and "\n" not in err
    assert "bad.csv" in err and "event_period" in err and "2" in err
    scale = tmp_path / "scale.csv"
    _write_csv(scale, ["Alpha,150.0,-20.0,2461400.5123,hjd_tt,2.3,2.5,,,,transit"])
    assert main(["events", str(scale), "--site=-30.2,-70.7,2200", "--from", "2027-03-01"]) == 2
    assert "event_time_scale" in capsys.readouterr().err


def test_cli_table_lists_events(tmp_path, capsys):
    """The people's table names each event and its observability."""
    good = tmp_path / "events.csv"
    _write_csv(good, ["Alpha,150.0,-20.0,2461400.5123,bjd_tdb,2.3456,2.5,0.0004,0.000003,30,"
                      "transit"])
    assert main(["events", str(good), "--site=-30.2,-70.7,2200", "--from", "2027-03-01",
                 "--nights", "10"]) == 0
    out = capsys.readouterr().out
    assert "Alpha" in out and ("full" in out or "partial" in out)
