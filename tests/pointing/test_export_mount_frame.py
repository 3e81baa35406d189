"""`epochpoint export --frame mount --model MODEL.json`: model-corrected coordinates.

Independent reference: the observed place is the `--frame observed` export of the same instant
(checked against ERFA and astropy elsewhere); the model's terms are the written-out formulas
of test_pointing_cli (P. T. Wallace, Proc. SPIE 4848, 125 (2002); from memory), inverted here by
our own loop; the local apparent sidereal time is astropy's (IAU 2006/2000A). A controller's
right ascension of date is that sidereal time minus its axes' hour angle (common practice).
"""
import json

import numpy as np
import pytest
from astropy import units as u
from astropy.time import Time

from epochpoint.cli.main import main
from test_pointing_cli import AT, SITE, TRUE, _offsets

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

LATITUDE, LONGITUDE = 37.5, -3.2
AGREE_ARCSEC = 0.01


@pytest.fixture
def files(tmp_path):
    targets = tmp_path / "list.csv"
    targets.write_text("name,ra,dec\nEast,150.0,20.0\nHigh,90.0,45.0\nWest,40.0,-5.0\n"
                       "Low,250.0,-60.0\n")
    model = tmp_path / "model.json"
    model.write_text(json.dumps({"mount_type": "equatorial", "latitude": LATITUDE,
                                 "terms": {n: {"value_arcsec": v, "error_arcsec": 1.5}
                                           for n, v in TRUE.items()},
                                 "rms_before_arcsec": 160.0, "rms_after_arcsec": 3.5,
                                 "samples": 24, "rejected": []}))
    return targets, model


def _export(capsys, *extra):
    assert main(["export", *extra, "--site", SITE, "--at", AT, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_mount_frame_is_the_model_inverted_at_the_observed_place(files, capsys):
    targets, model = files
    observed = _export(capsys, str(targets), "--frame", "observed")
    mount = _export(capsys, str(targets), "--frame", "mount", "--model", str(model))
    assert [r["name"] for r in mount["targets"]] == [r["name"] for r in observed["targets"]]
    assert mount["targets"], "no target exported: the test would prove nothing"
    last = Time(AT.rstrip("Z"), scale="utc").sidereal_time(
        "apparent", longitude=LONGITUDE * u.deg).deg
    for sky, row in zip(observed["targets"], mount["targets"]):
        ha_m, dec_m = sky["ha"], sky["dec_observed"]
        for _ in range(50):  # mount = sky + offsets(mount)
            dh, dd = _offsets(ha_m, dec_m)
            ha_m, dec_m = sky["ha"] + dh, sky["dec_observed"] + dd
        assert abs(((row["ha_mount"] - ha_m + 180) % 360 - 180) * 3600) < AGREE_ARCSEC
        assert abs(row["dec_mount"] - dec_m) * 3600 < AGREE_ARCSEC
        ra_off = ((row["ra_mount"] - (last - ha_m)) + 180) % 360 - 180
        assert abs(ra_off * np.cos(np.radians(dec_m))) * 3600 < AGREE_ARCSEC
    meta = mount["meta"]
    assert meta["frame"] == "mount" and meta["model_file"] == str(model)
    assert meta["model_rms_after_arcsec"] == 3.5 and meta["model_samples"] == 24
    assert "pointing model" in meta["corrections"]
    assert mount["units"]["ha_mount"] == "deg"


def test_mount_frame_without_a_model_is_a_one_line_error(files, capsys):
    targets, model = files
    code = main(["export", str(targets), "--site", SITE, "--at", AT, "--frame", "mount"])
    err = capsys.readouterr().err
    assert code == 2 and "--model" in err and len(err.strip().splitlines()) == 1
    code = main(["export", str(targets), "--site", SITE, "--at", AT, "--frame", "observed",
                 "--model", str(model)])
    assert code == 2


def test_mount_frame_csv_names_the_model(files, capsys):
    targets, model = files
    assert main(["export", str(targets), "--site", SITE, "--at", AT, "--frame", "mount",
                 "--model", str(model), "--format", "csv"]) == 0
    text = capsys.readouterr().out
    assert f"# model_file: {model}" in text and "# model_rms_after_arcsec: 3.5" in text
    assert "ra_mount" in text and "ha_mount" in text
