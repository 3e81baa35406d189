"""`epochpoint plan` as a program: the JSON contract, the table, the chart, refraction off,
bad input and a night with no darkness.

References: the JSON contract of the planning issue (key names, ISO 8601 UTC with Z or null);
zoneinfo for local times; the PNG signature (PNG specification, ISO/IEC 15948, sec. 5.2);
Saemundsson's refraction at 10 deg (Meeus, Astronomical Algorithms, 2nd ed., eq. 16.4: about
5.3' at 1010 hPa and 10 C) for the size of the refraction-off change; astropy get_body('sun')
for the midnight Sun at +69.65 deg.
"""
import json
from zoneinfo import ZoneInfo

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, get_body
from astropy.time import Time

import epochpoint as ep
from epochpoint.cli.main import main
from epochpoint.io import read_site
from plan_cli import DEMO_SITE, DEMO_TARGETS, ISO_Z, plan_json, run_cli, utc

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

NIGHT = "2026-03-18"  # inside the shipped Earth-orientation table
NIGHT_KEYS = {"sunset", "civil_twilight_end", "nautical_twilight_end",
              "astronomical_twilight_end", "astronomical_twilight_start",
              "nautical_twilight_start", "civil_twilight_start", "sunrise"}
TARGET_KEYS = {"name", "transit", "max_altitude", "windows", "reason"}
SCHEDULE_KEYS = {"name", "start", "end"}
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The demo night as JSON (written with --output) with its chart."""
    folder = tmp_path_factory.mktemp("demo")
    out, chart = folder / "plan.json", folder / "night.png"
    code = main(["plan", str(DEMO_TARGETS), "--site", str(DEMO_SITE), "--night", NIGHT,
                 "--format", "json", "--output", str(out), "--chart", str(chart)])
    assert code == 0
    return json.loads(out.read_text()), chart


def test_json_has_the_contract_keys(demo):
    # Reference: the planning contract's key names; night boundaries exactly these eight.
    data, _ = demo
    assert {"night", "moon", "targets", "schedule"} <= set(data)
    assert set(data["night"]) == NIGHT_KEYS
    assert isinstance(data["moon"], dict) and {"moonrise", "moonset"} <= set(data["moon"])
    assert len(data["targets"]) == 30
    for target in data["targets"]:
        assert TARGET_KEYS <= set(target), target.keys()
        assert all(isinstance(pair, list) and len(pair) == 2 for pair in target["windows"])
    assert data["schedule"], "the demo night schedules something"
    for entry in data["schedule"]:
        assert SCHEDULE_KEYS <= set(entry), entry.keys()


def test_every_time_is_iso_utc_with_z_or_null(demo):
    # Reference: the project's rule (ISO 8601 UTC with a trailing Z at every boundary).
    data, _ = demo
    times = list(data["night"].values()) + [data["moon"]["moonrise"], data["moon"]["moonset"]]
    for target in data["targets"]:
        times.append(target["transit"])
        times += [t for pair in target["windows"] for t in pair]
    times += [e[k] for e in data["schedule"] for k in ("start", "end")]
    assert all(t is None or ISO_Z.match(t) for t in times), [t for t in times
                                                            if t and not ISO_Z.match(t)]
    assert all(t is not None for t in data["night"].values()), "an ordinary night at -28"


def test_reason_is_null_exactly_when_a_target_has_windows(demo):
    data, _ = demo
    for target in data["targets"]:
        assert (target["reason"] is None) == bool(target["windows"]), target


def test_schedule_entries_lie_in_their_windows_and_do_not_overlap(demo):
    data, _ = demo
    windows = {t["name"]: [(utc(s), utc(e)) for s, e in t["windows"]] for t in data["targets"]}
    entries = sorted(((utc(e["start"]), utc(e["end"]), e["name"]) for e in data["schedule"]))
    for start, end, name in entries:
        assert start < end
        assert any(s <= start and end <= e for s, e in windows[name]), (name, start, end)
    for (_, end, _), (start, _, _) in zip(entries, entries[1:]):
        assert end <= start, "blocks overlap"


def test_schedule_never_spans_a_meridian_flip():
    # The demo site has a German mount: through the Python API, every scheduled block lies
    # inside one flip-free piece of its target's window (TargetWindows.blocks), not merely
    # inside the window (common practice: a German mount cannot track through the flip).
    result = ep.plan(ep.read_targets(DEMO_TARGETS), read_site(DEMO_SITE), NIGHT,
                     max_seconds=0.3)
    assert result.site.interlocks.mount.mount_type == "german"
    flips = sum(len(b) > 1 for b in result.windows.blocks)
    assert flips >= 5, "the demo night has targets crossing the meridian"
    for i, start, end in zip(result.schedule.index, result.schedule.start_s,
                             result.schedule.end_s):
        pieces = result.windows.blocks[i]
        assert any(s - 1e-6 <= start and end <= e + 1e-6 for s, e in pieces), (i, start, end)


def test_chart_is_a_png_file(demo):
    # Reference: PNG signature (ISO/IEC 15948, sec. 5.2); a real chart is well over 10 kB.
    _, chart = demo
    data = chart.read_bytes()
    assert data[:8] == PNG_SIGNATURE and len(data) > 10_000


def test_table_shows_local_time_and_utc(capsys, demo):
    # Reference: zoneinfo (America/Argentina/Catamarca, UTC-3 all year) for the local time of
    # every night boundary in the JSON.
    data, _ = demo
    code, out, _ = run_cli(capsys, "plan", DEMO_TARGETS, "--site", DEMO_SITE, "--night", NIGHT)
    assert code == 0
    zone = ZoneInfo("America/Argentina/Catamarca")
    for key, iso in data["night"].items():
        instant = utc(iso)
        local = instant.astimezone(zone)
        # The zone's abbreviation (here its offset, "-03") labels the local time, never "local".
        expected = f"{local:%H:%M} {local.tzname()} ({instant:%H:%M} UTC)"
        line = next(l for l in out.splitlines() if l.strip().startswith(key.replace("_", " ")))
        assert expected in line, (key, line, expected)


def _edges(data):
    return {t["name"]: [utc(x) for pair in t["windows"] for x in pair] for t in data["targets"]}


def test_pressure_zero_shortens_windows_at_a_low_limit(capsys):
    # Reference: Saemundsson (Meeus eq. 16.4) gives 5.3' of refraction at 10 deg at sea level;
    # an altitude changes at most 15.04"/s x cos(latitude) (the sidereal rate, common
    # practice), so every edge set by the 10 deg limit moves inward by at least
    # 5.3' / (13.0"/s) = 24 s at latitude -30 when refraction is turned off. Edges set by
    # darkness do not move.
    site = "--site=-30.2,-70.7,0"
    with_air = plan_json(capsys, DEMO_TARGETS, site, "--night", NIGHT, "--min-altitude", "10")
    airless = plan_json(capsys, DEMO_TARGETS, site, "--night", NIGHT, "--min-altitude", "10",
                        "--pressure", "0")
    dark = {utc(with_air["night"]["astronomical_twilight_end"]),
            utc(with_air["night"]["astronomical_twilight_start"])}
    moved = 0
    for name, edges in _edges(with_air).items():
        other = _edges(airless)[name]
        assert len(edges) == len(other), name
        for k, (a, b) in enumerate(zip(edges, other)):
            if a in dark:
                assert b == a, (name, "a darkness edge moved")
                continue
            inward_s = (b - a).total_seconds() * (1 if k % 2 == 0 else -1)
            assert 20.0 <= inward_s <= 900.0, (name, k, inward_s)
            moved += 1
    assert moved >= 10


@pytest.mark.parametrize("argv, words", [
    (["--night", "2026-02-30"], "2026-02-30"),
    (["--night", "2026-03-18", "--darkness", "pitch"], "darkness"),
    (["--night", "2026-03-18", "--site", "no/such/site.toml"], "site"),
    (["--night", "2026-03-18", "--site=95,10,0"], "latitude"),
], ids=["bad-date", "unknown-darkness", "missing-site-file", "latitude-out-of-range"])
def test_bad_input_gives_one_line_and_a_nonzero_exit(capsys, argv, words):
    # Reference: the project's rule for bad input (one line naming what is wrong, no traceback).
    full = ["plan", DEMO_TARGETS, "--site", DEMO_SITE] + argv
    code, out, err = run_cli(capsys, *full)
    assert code != 0
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in err, err
    assert lines[0].startswith("epochpoint: error:") and words in lines[0], lines[0]


def test_bad_planning_column_names_file_row_and_column(capsys, tmp_path):
    # Reference: the project's rule for bad input (one line naming file, row and column).
    path = tmp_path / "bad_priority.csv"
    path.write_text("name,ra,dec,priority,exposure,repeats\nA,10,-30,2,300,1\n"
                    "B,20,-35,high,300,1\n")
    code, _, err = run_cli(capsys, "plan", path, "--site=-30,-70,0", "--night", NIGHT)
    assert code != 0 and len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert "bad_priority.csv" in err and "line 3" in err and "priority" in err, err


def test_midnight_sun_at_69_north_gives_null_boundaries(capsys):
    # Reference: astropy get_body('sun') in AltAz (pressure 0) every 10 min from noon to noon
    # UTC (the site's zone) on 2024-06-21 at +69.65 deg stays above -50' (the sunset altitude
    # of the Astronomical Almanac), so none of the eight events happens.
    location = EarthLocation.from_geodetic(18.96 * u.deg, 69.65 * u.deg, 20.0 * u.m)
    times = Time("2024-06-21T12:00:00", scale="utc") + np.arange(0, 24 * 60 + 1, 10) * u.min
    sun = get_body("sun", times, location).transform_to(
        AltAz(obstime=times, location=location, pressure=0.0 * u.hPa))
    assert sun.alt.deg.min() > -50.0 / 60.0
    data = plan_json(capsys, DEMO_TARGETS, "--site=69.65,18.96,20", "--night", "2024-06-21")
    assert set(data["night"]) == NIGHT_KEYS and all(v is None for v in data["night"].values())
    assert {t["reason"] for t in data["targets"]} == {"no astronomical darkness tonight"}
    assert all(t["windows"] == [] for t in data["targets"])
    assert data["schedule"] == []
