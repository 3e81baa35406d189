"""Local times in the plan table across a daylight-saving change (Europe/Madrid).

References: zoneinfo with the IANA database (the reference for every local time here); the
EU rule (Directive 2000/84/EC, number from memory; common practice): clocks change at
01:00 UTC on the last Sunday of March (CET +1 h to CEST +2 h) and of October (back). The
nights of Saturday 2024-03-30 and Saturday 2024-10-26 hold the change: the evening is on one
offset, the morning on the other.
"""
import calendar
import contextlib
import datetime as dt
import io
import json
import re
from zoneinfo import ZoneInfo

import pytest

from epochpoint.cli.main import main
from plan_cli import DEMO_TARGETS, utc

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

MADRID = ZoneInfo("Europe/Madrid")
SITE_TOML = """[site]
name = "meseta test site"
latitude = 40.45
longitude = -3.70
height = 660.0
timezone = "Europe/Madrid"
"""
# (night, offset in the evening, offset in the morning), hours east of UTC.
NIGHTS = [("2024-03-30", 1, 2), ("2024-10-26", 2, 1)]
# "HH:MM ABBR (HH:MM UTC)": local time with the zone's abbreviation in force, then UTC.
LOCAL_AND_UTC = re.compile(r"(\d\d):(\d\d) (\S+) \((\d\d):(\d\d) UTC\)")
WINDOW = re.compile(r"(\d\d:\d\d)-(\d\d:\d\d)")


def last_sunday(year: int, month: int) -> dt.date:
    last = calendar.monthrange(year, month)[1]
    day = dt.date(year, month, last)
    return day - dt.timedelta(days=(day.weekday() - calendar.SUNDAY) % 7)


def change_instant(night: str) -> dt.datetime:
    """01:00 UTC on the last Sunday of the night's month (the EU rule)."""
    date = dt.date.fromisoformat(night)
    return dt.datetime.combine(last_sunday(date.year, date.month), dt.time(1, 0),
                               tzinfo=dt.timezone.utc)


def local_hhmm(iso: str) -> str:
    return f"{utc(iso).astimezone(MADRID):%H:%M}"


def local_label(iso: str) -> str:
    """'HH:MM ABBR (HH:MM UTC)' from zoneinfo (the reference for the plan's labels)."""
    local = utc(iso).astimezone(MADRID)
    return f"{local:%H:%M} {local.tzname()} ({utc(iso):%H:%M} UTC)"


@pytest.fixture(scope="module", params=NIGHTS, ids=[n for n, _, _ in NIGHTS])
def night_outputs(request, tmp_path_factory):
    """(night, evening offset, morning offset, JSON plan, table text) for one DST night
    (module-scoped, so stdout is captured here rather than with capsys)."""
    night, evening, morning = request.param
    site = tmp_path_factory.mktemp("madrid") / "site.toml"
    site.write_text(SITE_TOML)
    outputs = {}
    for fmt in ("json", "table"):
        buffer = io.StringIO()
        with contextlib.redirect_stdout(buffer):
            assert main(["plan", str(DEMO_TARGETS), "--site", str(site), "--night", night,
                         "--min-altitude", "15", "--format", fmt]) == 0
        outputs[fmt] = buffer.getvalue()
    return night, evening, morning, json.loads(outputs["json"]), outputs["table"]


@pytest.mark.parametrize("night, before, after", NIGHTS)
def test_zoneinfo_follows_the_eu_rule(night, before, after):
    # Reference check: zoneinfo's offsets a second before and after 01:00 UTC on the last
    # Sunday agree with the EU rule (so zoneinfo can judge the table below).
    change = change_instant(night)
    second = dt.timedelta(seconds=1)
    assert (change - second).astimezone(MADRID).utcoffset() == dt.timedelta(hours=before)
    assert change.astimezone(MADRID).utcoffset() == dt.timedelta(hours=after)


def test_night_boundaries_use_the_offset_in_force(night_outputs):
    # Reference: zoneinfo for each boundary; and the EU rule: events before 01:00 UTC on the
    # Sunday are on the evening offset, later ones on the morning offset.
    night, evening, morning, data, table = night_outputs
    change = change_instant(night)
    offsets = set()
    for key, iso in data["night"].items():
        line = next(l for l in table.splitlines() if l.strip().startswith(key.replace("_", " ")))
        (lh, lm, abbr, uh, um), = LOCAL_AND_UTC.findall(line)
        assert f"{uh}:{um}" == f"{utc(iso):%H:%M}", line
        assert f"{lh}:{lm}" == local_hhmm(iso), (key, line)
        assert abbr == utc(iso).astimezone(MADRID).tzname(), (key, line)
        shown = ((int(lh) * 60 + int(lm)) - (int(uh) * 60 + int(um))) % (24 * 60) / 60
        expected = evening if utc(iso) < change else morning
        assert shown == expected, (key, line, expected)
        offsets.add(shown)
    assert offsets == {evening, morning}, "the night spans the change"


def test_target_windows_and_order_in_local_time(night_outputs):
    # Reference: zoneinfo for each transit, window edge and scheduled block of the JSON plan.
    night, _, _, data, table = night_outputs
    lines = table.splitlines()
    checked = 0
    for target in data["targets"]:
        row = next(l for l in lines if l.startswith(target["name"] + " "))
        transit = target["transit"]
        assert local_label(transit) in row, row
        if not target["windows"]:
            continue
        expected = [(local_hhmm(s), local_hhmm(e)) for s, e in target["windows"]]
        assert WINDOW.findall(row) == expected, (row, expected)
        checked += 1
    assert checked >= 5
    crossing = 0
    for entry in data["schedule"]:
        start_text = local_label(entry["start"])
        assert any(start_text in l and entry["name"] in l for l in lines), start_text
        crossing += utc(entry["start"]) >= change_instant(night)
    assert 0 < crossing < len(data["schedule"]), "blocks on both sides of the change"
