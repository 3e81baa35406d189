"""The solar option on the command line: `plan` and `export` take --solar-filter-fitted with
one meaning (as the site file's [safety] solar_filter_fitted = true). Off by default: the Sun
is refused by the interlocks and no caution is said. On (flag or site file): the Sun is no
longer refused for being the Sun, the caution goes to stderr on every run, and the plan's
JSON (`cautions`), the plan's CSV and the export's JSON, CSV and VOTable metadata carry it.

Site, instant and targets are invented. Outside reference for the Sun's exported place:
astropy's get_sun (its own Earth ephemeris and aberration) taken to the true equator and
equinox of date (astropy TETE); the export gives the topocentric place, which differs from
the geocentric one by at most the solar parallax, 8.8 arcsec (common practice), so the bound
is 12 arcsec. The pointing model's term names and JSON layout are those of
tests/pointing/test_pointing_cli.py.
"""
import csv
import io
import json

import numpy as np
import pytest
from astropy.coordinates import TETE, get_sun
from astropy.io.votable import parse as parse_votable
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.core.limits import SOLAR_CAUTION, SUN_REFUSED

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SITE = "--site=-30.5,-70.7,2200"
# Local apparent noon at the site is near 16:45 UTC: the Sun about 44 deg up, well inside
# the default mount limits.
WHEN = "2027-05-01T16:40:00Z"
NIGHT = "2027-05-01"


@pytest.fixture
def files(tmp_path):
    targets = tmp_path / "day.csv"
    targets.write_text("name,ra,dec,body\nSol,,,sun\nRed,,,mars\nFar star,101.287,-16.716,\n")
    site = tmp_path / "site.toml"
    site.write_text("[site]\nname = \"Filtered roof (invented)\"\nlatitude = -30.5\n"
                    "longitude = -70.7\nheight = 2200.0\n\n[safety]\n"
                    "solar_filter_fitted = true\n")
    return str(targets), str(site)


def _run(capsys, argv):
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 0, err
    return out, err


# The two ways to switch the solar option on.
SOLAR_ON = {"flag": lambda site_file: [SITE, "--solar-filter-fitted"],
            "site file": lambda site_file: ["--site", site_file]}


# -- plan ---------------------------------------------------------------------------------------

def _plan(capsys, targets, *extra):
    return _run(capsys, ["plan", targets, "--night", NIGHT, "--schedule-iterations", "0",
                         *extra])


def test_plan_json_has_an_empty_cautions_list_by_default(files, capsys):
    targets, _ = files
    out, err = _plan(capsys, targets, SITE, "--format", "json")
    data = json.loads(out)
    assert data["cautions"] == []
    assert data["targets"][0]["reason"] == SUN_REFUSED
    assert "CAUTION" not in err


@pytest.mark.parametrize("how", SOLAR_ON)
def test_plan_with_the_option_lists_the_caution_in_json_and_csv(files, capsys, how):
    targets, site_file = files
    on = SOLAR_ON[how](site_file)
    for _ in range(2):  # every run says it again
        out, err = _plan(capsys, targets, *on, "--format", "json")
        assert err.count(SOLAR_CAUTION) == 1
        data = json.loads(out)
        assert data["cautions"] == [SOLAR_CAUTION]
        assert data["targets"][0]["reason"] != SUN_REFUSED
    out, err = _plan(capsys, targets, *on, "--format", "csv")
    assert f"# cautions: {SOLAR_CAUTION}" in out.splitlines() and SOLAR_CAUTION in err


def test_plan_csv_cautions_line_is_empty_without_the_option(files, capsys):
    targets, _ = files
    out, _ = _plan(capsys, targets, SITE, "--format", "csv")
    assert "# cautions: " in out.splitlines() or "# cautions:" in out.splitlines()
    assert "CAUTION" not in out


# -- export -------------------------------------------------------------------------------------

def _export(capsys, targets, *extra, fmt="json"):
    return _run(capsys, ["export", targets, "--at", WHEN, "--frame", "apparent", "--all",
                         "--format", fmt, *extra])


def test_export_refuses_the_sun_without_the_option_and_says_no_caution(files, capsys):
    targets, _ = files
    out, err = _export(capsys, targets, SITE)
    document = json.loads(out)
    refused = {row["name"]: row["refused"] for row in document["targets"]}
    assert refused["Sol"] == SUN_REFUSED
    assert document["meta"]["cautions"] == [] and "CAUTION" not in err
    # Without --all the Sun is left out, and stderr says targets were refused.
    out, err = _run(capsys, ["export", targets, SITE, "--at", WHEN, "--frame", "apparent",
                             "--format", "json"])
    assert "Sol" not in [row["name"] for row in json.loads(out)["targets"]]
    assert "target(s) refused" in err and "CAUTION" not in err


@pytest.mark.parametrize("how", SOLAR_ON)
def test_export_with_the_option_exports_the_sun_with_the_caution(files, capsys, how):
    targets, site_file = files
    on = SOLAR_ON[how](site_file)
    out, err = _export(capsys, targets, *on)
    assert err.count(SOLAR_CAUTION) == 1
    document = json.loads(out)
    assert document["meta"]["cautions"] == [SOLAR_CAUTION]
    sol = next(row for row in document["targets"] if row["name"] == "Sol")
    assert sol["refused"] == ""
    # The Sun's exported place: astropy's geocentric apparent Sun of date, within the solar
    # parallax (module docstring).
    t = Time(WHEN.rstrip("Z"), scale="utc")
    ref = get_sun(t).transform_to(TETE(obstime=t))
    ra, dec = np.radians([sol["ra_apparent"], sol["dec_apparent"]])
    ra_ref, dec_ref = ref.ra.rad, ref.dec.rad
    cos_sep = (np.sin(dec) * np.sin(dec_ref)
               + np.cos(dec) * np.cos(dec_ref) * np.cos(ra - ra_ref))
    assert np.degrees(np.arccos(min(1.0, cos_sep))) * 3600.0 < 12.0
    # CSV: a `# cautions:` metadata line; VOTable: an INFO named cautions.
    out, err = _export(capsys, targets, *on, fmt="csv")
    assert f"# cautions: {SOLAR_CAUTION}" in out.splitlines() and SOLAR_CAUTION in err
    rows = list(csv.DictReader(line for line in out.splitlines() if not line.startswith("#")))
    assert next(r for r in rows if r["name"] == "Sol")["refused"] == ""
    out, err = _export(capsys, targets, *on, fmt="votable")
    infos = {info.name: info.value for info in
             parse_votable(io.BytesIO(out.encode("utf-8"))).resources[0].infos}
    assert infos["cautions"] == SOLAR_CAUTION and SOLAR_CAUTION in err


def test_export_mount_frame_judges_the_suns_axes_as_the_sun(files, capsys, tmp_path):
    """With the option on, the Sun's commanded axes (a small pointing model) are not refused
    for being near the Sun, as its sky place is not; without it both are refused."""
    targets, _ = files
    model = tmp_path / "model.json"
    model.write_text(json.dumps({"mount_type": "equatorial", "latitude": -30.5,
                                 "terms": {"hour_axis_index": {"value_arcsec": -95.0,
                                                               "error_arcsec": 1.5}},
                                 "rms_before_arcsec": 100.0, "rms_after_arcsec": 3.0,
                                 "samples": 12, "rejected": []}))
    mount = ["--frame", "mount", "--model", str(model)]
    argv = ["export", targets, SITE, "--at", WHEN, "--all", "--format", "json", *mount]
    out, _ = _run(capsys, argv)
    refused = {r["name"]: r["refused"] for r in json.loads(out)["targets"]}
    assert SUN_REFUSED in refused["Sol"]
    out, err = _run(capsys, argv + ["--solar-filter-fitted"])
    refused = {r["name"]: r["refused"] for r in json.loads(out)["targets"]}
    assert refused["Sol"] == "" and SOLAR_CAUTION in err


# -- the same words everywhere --------------------------------------------------------------

@pytest.mark.parametrize("command", [["plan", "t.csv", "--site", "s.toml", "--night", NIGHT],
                                     ["export", "t.csv", "--site", "s.toml", "--at", WHEN,
                                      "--frame", "apparent"],
                                     ["mount", "slew", "t.csv", "Sol", "--site", "s.toml",
                                      "--indi", "localhost:7624"]])
def test_every_command_that_judges_the_sun_takes_the_option(command, capsys):
    """plan, export and mount slew parse --solar-filter-fitted, and their help says the
    same thing: a full-aperture filter on the telescope and every finder, the site key."""
    from epochpoint.cli.main import build_parser

    args = build_parser().parse_args(command + ["--solar-filter-fitted"])
    assert args.solar_filter_fitted is True
    assert build_parser().parse_args(command).solar_filter_fitted is False
    with pytest.raises(SystemExit):
        main(command[:2 if command[0] == "mount" else 1] + ["--help"])
    text = " ".join(capsys.readouterr().out.split())
    assert "--solar-filter-fitted" in text
    assert "full-aperture solar filter fitted on the telescope and on every finder" in text
    assert "[safety] solar_filter_fitted = true" in text
