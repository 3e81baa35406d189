"""The command line as scripts use it: contract names, formats and one-line errors.

Checks run the real `main()` in-process (fast) and once as a subprocess (the console script).
"""
import json
import subprocess
import sys

import numpy as np
import pytest

from epochpoint.cli.main import main

GOOD_CSV = ("name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity\n"
            "Alpha,12:30:00.0,-45:00:00,2016.0,-300,250,40,12\n"
            "Beta,210.5,+62.25,J2000.0,0,0,0,0\n")
BAD_CSV = "name,ra,dec,epoch\nGood,10,10,2000.0\nBroken,not-a-number,95,2000.0\n"
CONTRACT_FIELDS = ["name", "ra_propagated", "dec_propagated", "ra_apparent", "dec_apparent",
                   "ha", "dec_observed", "alt", "az", "airmass", "parallactic_angle", "drift"]


@pytest.fixture
def good(tmp_path):
    path = tmp_path / "good.csv"
    path.write_text(GOOD_CSV)
    return str(path)


@pytest.fixture
def bad(tmp_path):
    path = tmp_path / "bad.csv"
    path.write_text(BAD_CSV)
    return str(path)


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_positions_json_southern_site_has_contract_fields(capsys, good):
    code, out, err = run(capsys, "positions", good, "--site=-24.6,-70.4,2635",
                         "--at", "2027-01-20T23:10:00Z", "--format", "json")
    assert code == 0, err
    rows = json.loads(out)
    assert [r["name"] for r in rows] == ["Alpha", "Beta"]
    for field in CONTRACT_FIELDS:
        assert field in rows[0]
    # Beta (dec +62) never rises at latitude -24.6: airmass must be null, altitude negative.
    assert rows[1]["alt"] < 0 and rows[1]["airmass"] is None


def test_pressure_zero_turns_refraction_off(capsys, good):
    args = ("positions", good, "--site=-24.6,-70.4,2635", "--at", "2027-01-20T23:10:00Z",
            "--format", "json", "--ledger")
    _, out_on, _ = run(capsys, *args)
    _, out_off, _ = run(capsys, *args, "--pressure", "0")
    on, off = json.loads(out_on)[0], json.loads(out_off)[0]
    assert off["ledger_refraction"] == 0.0
    assert on["ledger_refraction"] > 10.0  # tens of arcsec above the horizon (common practice)
    assert on["alt"] > off["alt"]


def test_positions_table_for_people(capsys, good):
    code, out, err = run(capsys, "positions", good, "--site=-24.6,-70.4,2635", "--at", "now",
                         "--format", "table")
    assert code == 0, err
    # The local time is labelled with the zone holding the site (northern Chile keeps
    # America/Santiago; from memory), never with the bare word "local".
    assert "UTC" in out and "(America/Santiago)" in out and "LST" in out
    assert "Alpha" in out and "Beta" in out


@pytest.mark.parametrize("fmt", ["csv", "ecsv", "votable"])
def test_positions_machine_formats_to_file(capsys, good, tmp_path, fmt):
    target = tmp_path / f"out.{fmt}"
    code, _, err = run(capsys, "positions", good, "--site=10,20,100", "--at",
                       "2027-01-20T23:10:00Z", "--format", fmt, "--output", str(target))
    assert code == 0, err
    text = target.read_text()
    assert "ra_apparent" in text and "Alpha" in text


def test_bad_row_one_line_error_nonzero_exit(capsys, bad):
    code, out, err = run(capsys, "positions", bad, "--site=10,10,0", "--at", "now",
                         "--format", "json")
    assert code != 0
    assert "Traceback" not in err
    lines = [line for line in err.splitlines() if "error" in line]
    assert len(lines) == 1 and "bad.csv" in lines[0] and "3" in lines[0] and "ra" in lines[0]


def test_skip_bad_rows_reports_and_goes_on(capsys, bad):
    code, out, err = run(capsys, "positions", bad, "--site=10,10,0", "--at", "now",
                         "--format", "json", "--skip-bad-rows")
    assert code == 0
    assert [r["name"] for r in json.loads(out)] == ["Good"]
    assert "Broken" in err or "line 3" in err


@pytest.mark.parametrize("args", [
    ("--site=10,10", "--at", "yesterday-ish"),
    ("--site=95,10,0", "--at", "now"),
    ("--site=no-such-site.toml", "--at", "now"),
])
def test_bad_time_or_site_is_one_line(capsys, good, args):
    code, out, err = run(capsys, "positions", good, *args)
    assert code != 0 and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1


def test_missing_file_is_one_line(capsys, tmp_path):
    code, _, err = run(capsys, "positions", str(tmp_path / "nope.csv"), "--site=1,2,3",
                       "--at", "now")
    assert code != 0 and "nope.csv" in err and len(err.strip().splitlines()) == 1


def test_drift_lists_only_targets_over_tolerance(capsys, good):
    code, out, err = run(capsys, "drift", good, "--at", "2030-01-01T00:00:00Z",
                         "--tolerance", "1", "--format", "json")
    assert code == 0, err
    rows = json.loads(out)
    # Alpha moves 0.39"/yr: 14 years after 2016.0 it is ~5.5" away; Beta does not move.
    assert [r["name"] for r in rows] == ["Alpha"]
    assert rows[0]["drift"] == pytest.approx(np.hypot(0.3, 0.25) * 14.0, rel=0.01)
    # The 1" tolerance was crossed about 1 / 0.39 = 2.6 years after 2016.0.
    assert rows[0]["crossing"].startswith("2018-")


def test_console_script_runs_as_a_process(good):
    result = subprocess.run([sys.executable, "-m", "epochpoint.cli.main", "positions", good,
                             "--site=-24.6,-70.4,2635", "--at", "2027-01-20T23:10:00Z",
                             "--format", "csv"], capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
    assert result.stdout.count("Alpha") == 1
