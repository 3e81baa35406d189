"""The command line marks what it does not know: an error ellipse that leaves out unknown
proper-motion errors reads ">= value" and carries `error_lower_bound` in the machine formats;
a crossing whose errors are unknown reads "?" instead of a number.

The catalogue is invented: a Gaia-like five-parameter row, a two-parameter row (position errors
only, no motion) and a row with a proper motion but no motion errors. Expected sizes are the
textbook growth sqrt(s0^2 + t^2 s_pm^2) (linear error propagation, common practice).
"""
import json

import numpy as np
import pytest

from epochpoint.cli.main import main

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

MIXED_CSV = ("name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity,ra_error,"
             "dec_error,pm_ra_cosdec_error,pm_dec_error\n"
             "measured,10.0,5.0,2016.0,40,0,0,0,0.02,0.02,1.5,1.5\n"
             "two-parameter,11.0,6.0,2016.0,,,,,1.0,1.0,,\n"
             "motion-no-errors,12.0,7.0,2016.0,300,-400,0,0,1.0,1.0,,\n")
WHEN = "2027-01-01T00:00:00Z"
SITE = "--site=45,7,300"


@pytest.fixture
def mixed(tmp_path):
    path = tmp_path / "mixed.csv"
    path.write_text(MIXED_CSV)
    return str(path)


def _run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    assert code == 0, err
    return out


def _row(text: str, name: str) -> str:
    return next(line for line in text.splitlines() if line.startswith(name))


def test_drift_table_marks_lower_bounds_and_unknown_crossing_errors(capsys, mixed):
    out = _run(capsys, "drift", mixed, "--at", WHEN, "--tolerance", "1", "--all")
    measured, two, moving = (_row(out, n) for n in ("measured", "two-parameter",
                                                    "motion-no-errors"))
    # 11 years of 1.5 mas/yr: 16.5 mas, a measured value, no mark.
    assert "16.499" in measured and ">=" not in measured
    assert two.count(">= 1.000") == 2  # semi-major and semi-minor
    assert moving.count(">= 1.000") == 2
    # The fast row crossed 1" in 2018; its 1-sigma is unknown, never a number.
    cells = moving.split()
    assert "2017-12-31" in cells and cells[cells.index("2017-12-31") + 2] == "?"
    assert '">="' in out and '"?"' in out  # the header says what the marks mean


def test_positions_table_marks_lower_bounds(capsys, mixed):
    out = _run(capsys, "positions", mixed, SITE, "--at", WHEN)
    assert _row(out, "measured").endswith("16.50")
    assert _row(out, "two-parameter").endswith(">= 1.00")
    assert _row(out, "motion-no-errors").endswith(">= 1.00")


@pytest.mark.parametrize("command", ["drift", "positions"])
def test_machine_formats_carry_error_lower_bound(capsys, mixed, command):
    extra = ["--tolerance", "1", "--all"] if command == "drift" else [SITE]
    rows = json.loads(_run(capsys, command, mixed, "--at", WHEN, *extra, "--format", "json"))
    assert [r["error_lower_bound"] for r in rows] == [False, True, True]
    csv = _run(capsys, command, mixed, "--at", WHEN, *extra, "--format", "csv")
    header = next(line for line in csv.splitlines() if not line.startswith("#"))
    assert "error_lower_bound" in header.split(",")
    if command == "drift":
        assert rows[2]["crossing_sigma_days"] is None
        assert np.isfinite(rows[0]["crossing_sigma_days"])
