"""`epochpoint pointing fit|apply` for a German equatorial mount, end to end on files.

Reference: the rigorous synthetic German mount of test_german_mount.py (rotation matrices,
independent of the code under test; its imperfections, the term values they amount to and the
noise of centring by hand are stated there). Its readings, seeded, are written to a samples
file with a `pier_side` column; the fit's terms must come back within 3 standard errors, and
`apply` must give the mount's readings: for the fitted stars within the noise, for held-out
stars (noise-free) within 1.5 x the noise on each side of the pier. Hour angles of a target
list for the pier side come from astropy (apparent sidereal time minus the TETE right
ascension, IAU 2006/2000A), never from our engine; a slew takes the side of the target's
hour angle (common practice of mount firmware).
"""
from __future__ import annotations

import csv
import json

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import ICRS, TETE, SkyCoord
from astropy.time import Time

from epochpoint.cli.main import main
from test_german_mount import (ALL_TERMS, EXPECTED, NOISE, firmware_readings, random_stars,
                               two_sided_samples)

SEED = 20261202
LATITUDE = -31.3  # an invented southern site, so the pole sign is exercised
LONGITUDE = 149.1
AT = "2027-04-18T13:30:00Z"
TERMS = ",".join(ALL_TERMS)


@pytest.fixture(autouse=True)
def _cache_in_tmp(tmp_path_factory, monkeypatch):
    monkeypatch.setenv("EPOCHPOINT_CACHE_DIR", str(tmp_path_factory.getbasetemp() / "cache"))


def german_site(tmp_path, mount_type="german"):
    path = tmp_path / f"site-{mount_type}.toml"
    path.write_text(f'[site]\nname = "Dry Creek (invented)"\nlatitude = {LATITUDE}\n'
                    f'longitude = {LONGITUDE}\nheight = 400.0\ntimezone = "UTC"\n\n'
                    f'[mount]\ntype = "{mount_type}"\n')
    return path


def write_samples(path, n=120, seed=SEED):
    """The synthetic mount's noisy readings of n stars on both sides, as a samples file."""
    rng = np.random.default_rng(seed)
    h, d, ha_fw, dec_fw, sides = two_sided_samples(rng, n, LATITUDE)
    with open(path, "w", newline="") as handle:
        out = csv.writer(handle)
        out.writerow(["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount",
                      "pier_side"])
        for k in range(n):
            out.writerow([f"2027-04-18T{10 + k // 60:02d}:{k % 60:02d}:00Z", f"S{k + 1}",
                          *(repr(float(x[k])) for x in (h, d, ha_fw, dec_fw)), sides[k]])
    return h, d, ha_fw, dec_fw, np.char.lower(sides.astype(str))


def miss_arcsec(ha_a, dec_a, ha_b, dec_b):
    """Distance on the sky (arcsec, small angles) between two axis readings."""
    dha = (np.asarray(ha_a) - ha_b + 180.0) % 360.0 - 180.0
    return np.hypot(dha * np.cos(np.radians(dec_b)), np.asarray(dec_a) - dec_b) * 3600.0


def run_json(capsys, argv):
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 0, err
    return json.loads(out)


def test_fit_and_apply_round_trip_on_both_sides(tmp_path, capsys):
    samples, model_path = tmp_path / "samples.csv", tmp_path / "model.json"
    h, d, ha_fw, dec_fw, sides = write_samples(samples)
    assert {"east", "west"} <= set(sides)
    # No --mount-type: the site file's German mount.
    assert main(["pointing", "fit", str(samples), "--site", str(german_site(tmp_path)),
                 "--terms", TERMS, "--output", str(model_path)]) == 0
    out = capsys.readouterr().out
    data = json.loads(model_path.read_text())
    assert data["mount_type"] == "german" and data["latitude"] == LATITUDE
    for name, truth in EXPECTED.items():
        term = data["terms"][name]
        assert 0 < term["error_arcsec"] < 10, (name, term)
        assert abs(term["value_arcsec"] - truth) < 3 * term["error_arcsec"], (name, term, truth)
    assert data["rms_after_arcsec"] == pytest.approx(NOISE * np.sqrt(2), rel=0.25)
    # The term table: a German model, which terms turn over on the west side, the sides.
    assert "German equatorial model (the site's mount type)" in out
    rows = {line.split()[0]: line.split() for line in out.splitlines() if line.split()}
    assert rows["dec_axis_index"][-1] == "reversed" and rows["tube_sag"][-1] == "same"
    assert f"east {int(np.sum(sides == 'east'))}, west {int(np.sum(sides == 'west'))}" in out

    # Round trip: the samples file itself through apply gives the recorded readings back,
    # within the noise of centring (2-D rms NOISE sqrt 2), each on its own pier side.
    got = run_json(capsys, ["pointing", "apply", str(model_path), str(samples),
                            "--format", "json"])
    assert [r["name"] for r in got] == [f"S{k + 1}" for k in range(len(h))]
    assert [r["pier_side"] for r in got] == list(sides)
    miss = miss_arcsec([r["ha_mount"] for r in got], [r["dec_mount"] for r in got],
                       ha_fw, dec_fw)
    kept = np.ones(len(h), dtype=bool)
    kept[[int(n[1:]) - 1 for n in data["rejected"]]] = False
    assert np.sqrt(np.mean(miss[kept] ** 2)) < 1.5 * NOISE * np.sqrt(2)

    # Held-out stars, noise-free, on both sides (also past the meridian): the axes to 1.5 x
    # the noise; rows without a side are taken on the side of their hour angle (kept here
    # more than 5 deg from the meridian, far beyond the model's correction).
    rng = np.random.default_rng(SEED + 1)
    hh, dd, east = random_stars(rng, 80, LATITUDE)
    true_ha, true_dec = (np.degrees(x) for x in firmware_readings(hh, dd, east,
                                                                    np.radians(LATITUDE)))
    given = np.where(east, "east", "west")
    blank = (np.arange(hh.size) % 3 == 0) & (np.abs(np.degrees(hh)) > 5.0) \
        & (east == (hh < 0))
    rows_path = tmp_path / "held_out.csv"
    with open(rows_path, "w", newline="") as handle:
        out_rows = csv.writer(handle)
        out_rows.writerow(["name", "ha_target", "dec_target", "pier_side"])
        for k in range(hh.size):
            out_rows.writerow([f"H{k}", repr(float(np.degrees(hh[k]))),
                               repr(float(np.degrees(dd[k]))),
                               "" if blank[k] else given[k].upper()])
    got = run_json(capsys, ["pointing", "apply", str(model_path), str(rows_path),
                            "--format", "json"])
    assert blank.sum() > 5 and [r["pier_side"] for r in got] == list(given)
    miss = miss_arcsec([r["ha_mount"] for r in got], [r["dec_mount"] for r in got],
                       true_ha, true_dec)
    assert np.sqrt(np.mean(miss ** 2)) < 1.5 * NOISE


def test_a_target_list_takes_the_side_of_its_hour_angle(tmp_path, capsys):
    """--site --at: a German model's output names the side a slew takes (astropy's hour
    angle, > 10 deg from the meridian) and gives the synthetic mount's readings there."""
    model_path = tmp_path / "model.json"
    model_path.write_text(json.dumps({"mount_type": "german", "latitude": LATITUDE, "terms": {
        name: {"value_arcsec": value, "error_arcsec": 1.0} for name, value in EXPECTED.items()}}))
    when = Time(AT.rstrip("Z"), scale="utc")
    last = when.sidereal_time("apparent", longitude=LONGITUDE * u.deg).deg
    rng = np.random.default_rng(SEED + 2)
    ha_want = np.concatenate([rng.uniform(-80, -10, 6), rng.uniform(10, 80, 6)])
    dec_want = rng.uniform(-75, 10, ha_want.size)  # high in the southern sky
    icrs = SkyCoord(ra=((last - ha_want) % 360.0) * u.deg, dec=dec_want * u.deg,
                    frame=TETE(obstime=when)).transform_to(ICRS())
    targets = tmp_path / "targets.csv"
    targets.write_text("name,ra,dec\n" + "".join(
        f"T{k},{float(icrs.ra.deg[k])!r},{float(icrs.dec.deg[k])!r}\n"
        for k in range(ha_want.size)))
    site = str(german_site(tmp_path))
    got = run_json(capsys, ["pointing", "apply", str(model_path), str(targets), "--site", site,
                            "--at", AT, "--format", "json"])
    assert [r["name"] for r in got] == [f"T{k}" for k in range(ha_want.size)]
    # Observed hour angle: astropy's apparent one, refraction moving it by under 0.1 deg.
    np.testing.assert_allclose([r["ha_target"] for r in got], ha_want, atol=0.1)
    assert [r["pier_side"] for r in got] == ["east" if h < 0 else "west" for h in ha_want]
    # The axes: the rigorous chain's readings of the observed place on that side (the model
    # holds the chain's own values: first order, within 1 arcsec for these terms).
    h, d = np.radians([r["ha_target"] for r in got]), np.radians([r["dec_target"] for r in got])
    ha_fw, dec_fw = (np.degrees(x) for x in firmware_readings(h, d, ha_want < 0,
                                                                np.radians(LATITUDE)))
    miss = miss_arcsec([r["ha_mount"] for r in got], [r["dec_mount"] for r in got],
                       ha_fw, dec_fw)
    assert np.max(miss) < 1.0, miss


def test_an_equatorial_fit_of_two_sided_samples_says_so_and_german_needs_sides(tmp_path,
                                                                               capsys):
    samples = tmp_path / "samples.csv"
    write_samples(samples, n=60)
    site = f"--site={LATITUDE},{LONGITUDE},400"
    # A LAT,LON,HEIGHT site has no mount type: equatorial, with a note on the two sides.
    assert main(["pointing", "fit", str(samples), site, "--output",
                 str(tmp_path / "m.json")]) == 0
    out, err = capsys.readouterr()
    assert json.loads((tmp_path / "m.json").read_text())["mount_type"] == "equatorial"
    assert "fork equatorial model" in out and "both pier sides" in err and "german" in err
    # --mount-type german on a file without the pier_side column: one line, exit 2.
    bare = tmp_path / "bare.csv"
    with open(samples) as source:
        bare.write_text("".join(",".join(line.rstrip("\n").split(",")[:6]) + "\n"
                                for line in source))
    assert main(["pointing", "fit", str(bare), site, "--mount-type", "german", "--output",
                 str(tmp_path / "g.json")]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "bare.csv" in err and "pier_side" in err
    assert not (tmp_path / "g.json").exists()
