"""Time zones on the command line: found from the coordinates, overridden by --timezone, a
site file's own zone winning, and every local time labelled with its zone.

References: the IANA time zone database through zoneinfo (offsets and abbreviations);
the zones of two real places, from memory: southern Arizona keeps America/Phoenix (MST,
UTC-7, no daylight saving) and inland New South Wales keeps Australia/Sydney (AEST, UTC+10
in June). Night events: PyEphem (tests only) searched from local mean solar noon (12:00 UTC
minus longitude/15 h; common practice).
"""
import datetime as dt
import json
import re
from zoneinfo import ZoneInfo

import ephem
import pytest

from epochpoint.cli.main import main

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

TARGETS = ("name,ra,dec,epoch\n"
           "North,150.0,40.0,2000.0\nSouth,280.0,-30.0,2000.0\nEast,60.0,10.0,2000.0\n")
# The two cases that once lost half their night (sites given without a zone).
ARIZONA = ("--site=31.68,-110.88,2300", "2027-03-20", "America/Phoenix")
NEW_SOUTH_WALES = ("--site=-31.27,149.06,1165", "2027-06-21", "Australia/Sydney")
LABEL = re.compile(r"(\d\d):(\d\d) (\S+) \((\d\d):(\d\d) UTC\)")


@pytest.fixture
def targets(tmp_path):
    path = tmp_path / "targets.csv"
    path.write_text(TARGETS)
    return str(path)


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def pyephem_event(lat, lon, date, horizon, rising):
    lon_wrapped = (lon + 180.0) % 360.0 - 180.0
    start = dt.datetime.fromisoformat(date + "T12:00:00") - dt.timedelta(hours=lon_wrapped / 15)
    observer = ephem.Observer()
    observer.lat, observer.lon, observer.pressure, observer.horizon = str(lat), str(lon), 0, horizon
    observer.date = ephem.Date(start)
    search = observer.next_rising if rising else observer.next_setting
    found = ephem.Date(search(ephem.Sun(), use_center=True)).datetime()
    return found.replace(tzinfo=dt.timezone.utc)


@pytest.mark.parametrize("site,night,zone", [ARIZONA, NEW_SOUTH_WALES],
                         ids=["110.88W", "149.06E"])
def test_far_sites_without_a_zone_keep_their_whole_night(capsys, targets, site, night, zone):
    code, out, _ = run(capsys, "plan", targets, site, "--night", night, "--format", "json")
    assert code == 0
    data = json.loads(out)
    assert data["timezone"] == zone and data["timezone_source"] == "coordinates"
    lat, lon, _ = (float(v) for v in site.split("=")[1].split(","))
    for key, horizon, rising in (("sunset", "-0:50", False), ("sunrise", "-0:50", True),
                                 ("astronomical_twilight_end", "-18", False),
                                 ("astronomical_twilight_start", "-18", True)):
        assert data["night"][key] is not None, key
        ours = dt.datetime.fromisoformat(data["night"][key].replace("Z", "+00:00"))
        theirs = pyephem_event(lat, lon, night, horizon, rising)
        assert abs((ours - theirs).total_seconds()) < 5.0, (key, ours, theirs)


def test_local_times_carry_the_zone_abbreviation_never_the_word_local(capsys, targets):
    site, night, zone = ARIZONA
    code, out, _ = run(capsys, "plan", targets, site, "--night", night)
    assert code == 0
    assert " local (" not in out and "(local)" not in out
    assert "America/Phoenix" in out
    labels = LABEL.findall(out)
    assert len(labels) >= 8
    for lh, lm, abbr, uh, um in labels:
        assert abbr == "MST"
        assert (int(uh) * 60 + int(um) - int(lh) * 60 - int(lm)) % 1440 == 7 * 60


def test_timezone_option_relabels_but_never_moves_the_night(capsys, targets):
    site, night, _ = ARIZONA
    _, plain, _ = run(capsys, "plan", targets, site, "--night", night, "--format", "json")
    code, out, _ = run(capsys, "plan", targets, site, "--night", night, "--format", "json",
                       "--timezone", "America/Denver")
    assert code == 0
    relabelled, plain = json.loads(out), json.loads(plain)
    assert relabelled["timezone"] == "America/Denver"
    assert relabelled["timezone_source"] == "site"
    assert relabelled["night"] == plain["night"]
    code, text, _ = run(capsys, "plan", targets, site, "--night", night,
                        "--timezone", "America/Denver")
    # 2027-03-20 is after the second Sunday of March: Denver keeps MDT, UTC-6 (zoneinfo).
    sunset = dt.datetime.fromisoformat(plain["night"]["sunset"].replace("Z", "+00:00"))
    local = sunset.astimezone(ZoneInfo("America/Denver"))
    assert f"{local:%H:%M} {local.tzname()} ({sunset:%H:%M} UTC)" in text


def test_a_site_files_zone_wins_over_the_option(capsys, targets, tmp_path):
    site = tmp_path / "site.toml"
    site.write_text('[site]\nlatitude = 31.68\nlongitude = -110.88\nheight = 2300\n'
                    'timezone = "UTC"\n')
    code, out, err = run(capsys, "plan", targets, "--site", site, "--night", "2027-03-20",
                         "--format", "json", "--timezone", "America/Phoenix")
    assert code == 0
    assert json.loads(out)["timezone"] == "UTC"
    assert "--timezone America/Phoenix ignored" in err


def test_an_unknown_zone_is_a_one_line_error(capsys, targets):
    code, _, err = run(capsys, "plan", targets, ARIZONA[0], "--night", "2027-03-20",
                       "--timezone", "Mars/Olympus_Mons")
    assert code == 2 and "Traceback" not in err and len(err.strip().splitlines()) == 1
    assert "Mars/Olympus_Mons" in err


def test_positions_and_export_metadata_name_the_zone(capsys, targets):
    code, out, _ = run(capsys, "positions", targets, NEW_SOUTH_WALES[0], "--at",
                       "2027-06-21T12:00:00Z", "--format", "ecsv")
    assert code == 0
    assert "timezone: Australia/Sydney" in out and "timezone_source: coordinates" in out
    code, out, _ = run(capsys, "export", targets, NEW_SOUTH_WALES[0], "--at",
                       "2027-06-21T12:00:00Z", "--frame", "apparent", "--format", "json")
    assert code == 0
    assert '"timezone": "Australia/Sydney"' in out
