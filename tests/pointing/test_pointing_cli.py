"""`epochpoint pointing stars|fit|apply` end to end on invented samples.

The synthetic mount here has only index errors and a polar-axis tilt, written out from the
first-order terms of the published pointing analysis (P. T. Wallace, Proc. SPIE 4848, 125
(2002); from memory) in our sign convention (mount reading minus sky).
"""
import json

import numpy as np
import pytest

from epochpoint.cli.main import main

SITE = "37.5,-3.2,900"
AT = "2027-01-20T23:10:00Z"
TRUE = {"hour_axis_index": -95.0, "dec_axis_index": 40.0, "polar_axis_tilt_meridian": 120.0}


@pytest.fixture(autouse=True)
def _cache_in_tmp(tmp_path_factory, monkeypatch):
    monkeypatch.setenv("EPOCHPOINT_CACHE_DIR", str(tmp_path_factory.getbasetemp() / "cache"))


def _offsets(h_deg, d_deg):
    h, d = np.radians(h_deg), np.radians(d_deg)
    dh = TRUE["hour_axis_index"] + TRUE["polar_axis_tilt_meridian"] * np.sin(h) * np.tan(d)
    dd = TRUE["dec_axis_index"] + TRUE["polar_axis_tilt_meridian"] * np.cos(h)
    return dh / 3600, dd / 3600


def _write_samples(path, n=40, seed=11):
    rng = np.random.default_rng(seed)
    mh, md = rng.uniform(-80, 80, n), rng.uniform(-20, 75, n)
    dh, dd = _offsets(mh, md)
    noise = rng.normal(0, 1.0 / 3600, (2, n))
    lines = ["time,name,ha_target,dec_target,ha_mount,dec_mount"]
    for i in range(n):
        sky_h = mh[i] - dh[i] + noise[0, i] / np.cos(np.radians(md[i]))
        cells = [float(x) for x in (sky_h, md[i] - dd[i] + noise[1, i], mh[i], md[i])]
        lines.append(f"2027-01-20T23:{i % 60:02d}:00Z,S{i}," + ",".join(map(repr, cells)))
    path.write_text("\n".join(lines) + "\n")


def test_fit_writes_model_with_terms(tmp_path, capsys):
    samples, model = tmp_path / "samples.csv", tmp_path / "model.json"
    _write_samples(samples)
    assert main(["pointing", "fit", str(samples), "--site", SITE, "--output", str(model),
                 "--terms", "hour_axis_index,dec_axis_index,polar_axis_tilt_meridian,"
                            "polar_axis_tilt_east"]) == 0
    data = json.loads(model.read_text())
    assert data["mount_type"] == "equatorial" and data["latitude"] == 37.5
    assert {"rms_before_arcsec", "rms_after_arcsec", "samples", "rejected"} <= set(data)
    for name, truth in TRUE.items():
        term = data["terms"][name]
        assert abs(term["value_arcsec"] - truth) < 3 * term["error_arcsec"]
    assert abs(data["terms"]["polar_axis_tilt_east"]["value_arcsec"]) < \
        3 * data["terms"]["polar_axis_tilt_east"]["error_arcsec"]
    assert data["samples"] == 40 and data["rms_after_arcsec"] < 3
    assert "polar_axis_tilt_meridian" in capsys.readouterr().out


def test_apply_rows_and_target_list(tmp_path, capsys):
    model = tmp_path / "model.json"
    model.write_text(json.dumps({"mount_type": "equatorial", "latitude": 37.5, "terms": {
        n: {"value_arcsec": v, "error_arcsec": 1.0} for n, v in TRUE.items()}}))
    rows = tmp_path / "rows.csv"
    rows.write_text("name,ha_target,dec_target\nA,30.0,10.0\nB,-45.0,60.0\n")
    assert main(["pointing", "apply", str(model), str(rows), "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert [r["name"] for r in out] == ["A", "B"]
    for r in out:  # mount = sky + offsets(mount), checked with the independent formulas
        dh, dd = _offsets(r["ha_mount"], r["dec_mount"])
        assert r["ha_mount"] == pytest.approx(r["ha_target"] + dh, abs=1e-7)
        assert r["dec_mount"] == pytest.approx(r["dec_target"] + dd, abs=1e-7)
    targets = tmp_path / "list.csv"
    targets.write_text("name,ra,dec\nHIP 37279,,\nOwn,150.0,20.0\n")
    assert main(["pointing", "apply", str(model), str(targets), "--site", SITE, "--at", AT,
                 "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert [r["name"] for r in out] == ["HIP 37279", "Own"]
    assert all({"ha_mount", "dec_mount"} <= set(r) for r in out)


def test_stars_spread_and_allowed(capsys):
    assert main(["pointing", "stars", "--site", SITE, "--at", AT, "--count", "10",
                 "--min-altitude", "25", "--format", "json"]) == 0
    stars = json.loads(capsys.readouterr().out)
    assert len(stars) == 10 and len({s["name"] for s in stars}) == 10
    assert all(s["alt"] >= 25 and s["hp_mag"] <= 4.0 for s in stars)
    assert len({int(s["az"] // 90) for s in stars}) == 4  # every quarter of the sky


def test_bad_samples_one_line_exit_2(tmp_path, capsys):
    samples = tmp_path / "bad.csv"
    samples.write_text("time,name,ha_target,dec_target,ha_mount,dec_mount\n"
                       "2027-01-20T23:00:00Z,A,1.0,2.0,x,2.0\n")
    assert main(["pointing", "fit", str(samples), "--site", SITE, "--output",
                 str(tmp_path / "m.json")]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "line 2" in err and "ha_mount" in err
