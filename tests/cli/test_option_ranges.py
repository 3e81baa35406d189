"""Numeric options outside their range are one-line errors with exit 2, and the core
functions refuse the same values with a one-line ValueError.

The ranges are facts of the trade (common practice): an altitude lies in 0..90 deg above the
horizon; airmass is 1 at the zenith and grows towards the horizon, so a limit below 1 admits
nothing; an angular distance on the sky lies in 0..180 deg, so no drift exceeds 648000 arcsec;
a time budget or a count cannot be negative; NaN is no number at all.
"""
from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pytest

from epochpoint.cli.main import build_parser, main
from epochpoint.core.drift import drift
from epochpoint.core.export import export_positions
from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.windows import Constraints

SAMPLES = Path(__file__).resolve().parents[2] / "sample_targets"
TARGETS = str(SAMPLES / "loma_candil_targets.csv")
SITE = str(SAMPLES / "loma_candil.toml")
PLAN = ["plan", TARGETS, "--site", SITE, "--night", "2027-01-19", "--schedule-seconds", "0.01"]
DRIFT = ["drift", TARGETS, "--at", "2027-01-20T03:00:00Z"]
EXPORT = ["export", TARGETS, "--site", SITE, "--at", "2027-01-20T03:00:00Z", "--frame", "icrs"]
POSITIONS = ["positions", TARGETS, "--site", SITE, "--at", "2027-01-20T03:00:00Z"]

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")


def run_cli(capsys, argv):
    """(exit status, stderr lines) of `epochpoint ARGV`; usage errors exit inside main()."""
    try:
        code = main(argv)
    except SystemExit as done:
        code = done.code
    return code, capsys.readouterr().err.strip().splitlines()


CASES = [
    (PLAN + ["--min-altitude", "95"], "--min-altitude", "from 0 to 90 deg"),
    (PLAN + ["--min-altitude", "170"], "--min-altitude", "from 0 to 90 deg"),
    (PLAN + ["--min-altitude", "-1"], "--min-altitude", "from 0 to 90 deg"),
    (PLAN + ["--min-altitude", "nan"], "--min-altitude", "nan must be"),
    (PLAN + ["--max-airmass", "0.5"], "--max-airmass", "at least 1"),
    (PLAN + ["--max-airmass", "nan"], "--max-airmass", "nan must be"),
    (PLAN + ["--max-airmass", "inf"], "--max-airmass", "inf must be"),
    (PLAN + ["--moon-separation", "nan"], "--moon-separation", "nan must be"),
    (PLAN + ["--moon-separation", "-5"], "--moon-separation", "from 0 to 180 deg"),
    (PLAN + ["--schedule-seconds", "nan"], "--schedule-seconds", "nan must be"),
    (PLAN + ["--schedule-seconds", "-1"], "--schedule-seconds", "-1 must be"),
    (PLAN + ["--chart-targets", "-1"], "--chart-targets", "at least 1"),
    (DRIFT + ["--tolerance", "0"], "--tolerance", "more than 0"),
    (DRIFT + ["--tolerance", "-3"], "--tolerance", "more than 0"),
    (DRIFT + ["--tolerance", "nan"], "--tolerance", "nan must be"),
    (DRIFT + ["--tolerance", "1e30"], "--tolerance", "less than 648000 arcsec"),
    (EXPORT + ["--valid-within", "nan"], "--valid-within", "nan must be"),
    (EXPORT + ["--valid-within", "0"], "--valid-within", "more than 0"),
    (POSITIONS + ["--pressure", "nan"], "--pressure", "nan"),
    (POSITIONS + ["--temperature", "inf"], "--temperature", "inf"),
]


@pytest.mark.parametrize("argv, option, words", CASES, ids=[" ".join(c[0][-2:]) for c in CASES])
def test_out_of_range_option_is_one_line_and_exit_2(capsys, argv, option, words):
    code, err = run_cli(capsys, argv)
    assert code == 2
    assert len(err) == 1, err
    assert f"argument {option}:" in err[0] and words in err[0], err[0]
    assert "Traceback" not in err[0]


def test_renamed_options_keep_their_old_spelling_hidden(capsys):
    parser = build_parser()
    old = parser.parse_args(EXPORT + ["--tolerance", "3"])
    new = parser.parse_args(EXPORT + ["--valid-within", "3"])
    assert old.valid_within == new.valid_within == 3.0
    with pytest.raises(SystemExit):
        parser.parse_args(["export", "--help"])
    shown = capsys.readouterr().out
    assert "--valid-within" in shown and "--tolerance" not in shown


# -- the same values through the Python API -----------------------------------------------------

STAR = Targets.from_columns(ra=[38.7], dec=[-41.3], pm_ra_cosdec=[187.2], pm_dec=[-92.6],
                            epoch=2016.0, name=["Wick"])
HERE = Site(latitude=-28.47, longitude=-67.29, height=2870.0, timezone="America/Argentina/Salta")


@pytest.mark.parametrize("field, value", [("min_altitude", 95.0), ("min_altitude", np.nan),
                                          ("max_airmass", 0.5), ("max_airmass", np.nan),
                                          ("moon_separation", np.nan),
                                          ("moon_separation", -1.0)])
def test_constraints_refuse_impossible_values(field, value):
    with pytest.raises(ValueError) as caught:
        Constraints(**{field: value})
    assert field in str(caught.value) and "\n" not in str(caught.value)


def test_plan_refuses_before_computing():
    for kwargs in ({"min_altitude": 170.0}, {"max_seconds": -1.0}, {"max_seconds": np.nan},
                   {"max_airmass": 0.9}):
        with pytest.raises(ValueError, match=next(iter(kwargs))):
            plan(STAR, HERE, "2027-01-19", **kwargs)


# (0, NaN and inf were refused already; these are the absurd values that got through.)
@pytest.mark.parametrize("tolerance", [648000.0, 1e30])
def test_drift_and_export_refuse_a_tolerance_out_of_range(tolerance):
    with pytest.raises(ValueError, match="tolerance"):
        drift(STAR, "2027-01-20T03:00:00Z", tolerance)
    with pytest.raises(ValueError, match="tolerance"):
        export_positions(STAR, HERE, "2027-01-20T03:00:00Z", "icrs",
                         tolerance_arcsec=tolerance)


def test_a_tolerance_near_half_a_circle_never_overflows():
    # A slow star and a tolerance of almost 180 deg: the crossing lies beyond any horizon.
    slow = Targets.from_columns(ra=[10.0, 200.0], dec=[5.0, -30.0], pm_ra_cosdec=[0.002, 3000.0],
                                pm_dec=[0.0, 0.0], epoch=2016.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        result = drift(slow, "2027-01-20T03:00:00Z", 647999.0)
    assert list(result["crossing"]) == [None, None]
