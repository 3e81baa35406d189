"""The Pointing model tab: a synthetic mount's samples file is fitted in a worker and the table
shows each term within 3 standard errors of the value the mount was built with; the charts hold
one mark per sample; a bad file is one line and keeps the last fit; the model saves as JSON.

The synthetic mount is written out here from the published first-order pointing terms of an
equatorial mount (offsets "telescope reading minus star", hour angle H, declination D,
latitude phi): index errors (constant in H and in D), collimation (c sec D in H),
non-perpendicular axes (n tan D in H), polar axis misaligned in elevation
(dH = e sin H tan D, dD = e cos H) and in azimuth (dH = -a cos H tan D, dD = a sin H), tube
flexure (dH = f cos phi sin H sec D, dD = f (cos phi cos H sin D - sin phi cos D)): P. T.
Wallace, "A rigorous algorithm for telescope pointing", Proc. SPIE 4848 (2002), and the
pointing chapter of Trueblood & Genet, "Telescope Control" (1997) (from memory). Our terms
are signed physically (core/pointing_model/terms.py docstrings): the tilt toward the east is
minus the published azimuth term, the tube sag minus the published flexure; the mapping is
written beside TRUTH. Seeded noise of 1.5 arcsec per axis on the sky.
"""
from __future__ import annotations

import csv
import json

import numpy as np
import pytest

from epochpoint.core.site import Site
from epochpoint.gui import workers
from epochpoint.gui.panels.pointing_panel import TABLE_HEADERS
from pointing_panel_helpers import fit_file, open_panel

SEED = 20270311
LATITUDE = 37.2  # an invented site
SITE = Site(latitude=LATITUDE, longitude=-5.5, height=600.0, name="Cork Hill (invented)")
NOISE_ARCSEC = 1.5
N_STARS = 70
# Published term -> value (arcsec) of the synthetic mount.
PUBLISHED = {"index_h": 95.0, "index_d": -42.0, "collimation": 31.0, "non_perpendicular": -18.0,
             "polar_elevation": 66.0, "polar_azimuth": -120.0, "tube_flexure": 24.0}
# Our names, with the sign that maps them from the published terms (module docstring).
TRUTH = {"hour_axis_index": PUBLISHED["index_h"], "dec_axis_index": PUBLISHED["index_d"],
         "optical_axis_skew": PUBLISHED["collimation"],
         "axes_non_square": PUBLISHED["non_perpendicular"],
         "polar_axis_tilt_meridian": PUBLISHED["polar_elevation"],
         "polar_axis_tilt_east": -PUBLISHED["polar_azimuth"],
         "tube_sag": -PUBLISHED["tube_flexure"]}
OUTLIER = "Star 17"


def published_offsets(h, d):
    """(dH, dD) in arcsec, telescope minus star, at H, D in radians (module docstring)."""
    p, phi = PUBLISHED, np.radians(LATITUDE)
    dh = (p["index_h"] + p["collimation"] / np.cos(d) + p["non_perpendicular"] * np.tan(d)
          + p["polar_elevation"] * np.sin(h) * np.tan(d)
          - p["polar_azimuth"] * np.cos(h) * np.tan(d)
          + p["tube_flexure"] * np.cos(phi) * np.sin(h) / np.cos(d))
    dd = (p["index_d"] + p["polar_elevation"] * np.cos(h) + p["polar_azimuth"] * np.sin(h)
          + p["tube_flexure"] * (np.cos(phi) * np.cos(h) * np.sin(d)
                                 - np.sin(phi) * np.cos(d)))
    return dh, dd


def write_samples(path, outlier_arcsec=600.0):
    """Stars spread over the sky above 20 deg altitude; the mount reads the star's place plus
    the offsets at its own reading (fixed point), plus noise; one star badly centred."""
    rng = np.random.default_rng(SEED)
    phi = np.radians(LATITUDE)
    ha, dec = [], []
    while len(ha) < N_STARS:
        h, d = rng.uniform(-90.0, 90.0), np.degrees(np.arcsin(rng.uniform(-0.6, 0.99)))
        alt = np.degrees(np.arcsin(np.sin(phi) * np.sin(np.radians(d)) + np.cos(phi)
                                   * np.cos(np.radians(d)) * np.cos(np.radians(h))))
        if alt > 20.0 and d < 85.0:
            ha.append(h)
            dec.append(d)
    ha, dec = np.array(ha), np.array(dec)
    mh, md = ha.copy(), dec.copy()
    for _ in range(8):  # offsets depend on where the axes are
        dh, dd = published_offsets(np.radians(mh), np.radians(md))
        mh, md = ha + dh / 3600.0, dec + dd / 3600.0
    mh = mh + rng.normal(0.0, NOISE_ARCSEC, N_STARS) / 3600.0 / np.cos(np.radians(dec))
    md = md + rng.normal(0.0, NOISE_ARCSEC, N_STARS) / 3600.0
    md[16] += outlier_arcsec / 3600.0
    with open(path, "w", newline="") as handle:
        out = csv.writer(handle)
        out.writerow(["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount"])
        for k in range(N_STARS):
            out.writerow([f"2027-03-11T{21 + k // 60:02d}:{k % 60:02d}:00Z", f"Star {k + 1}",
                          ha[k], dec[k], mh[k], md[k]])
    return ha, dec


@pytest.fixture
def panel(qtbot):
    yield open_panel(qtbot, SITE)
    workers.wait_for_workers()


def shown_terms(panel) -> dict:
    table = panel.table
    column = {h: k for k, h in enumerate(TABLE_HEADERS)}
    out = {}
    for r in range(table.rowCount()):
        cells = [table.item(r, c).text() for c in range(table.columnCount())]
        out[cells[column["Term"]]] = cells
    return out


def test_the_fit_shows_each_term_within_three_errors_of_the_mount(qtbot, panel, tmp_path):
    path = tmp_path / "samples.csv"
    write_samples(path)
    fit_file(qtbot, panel, path)
    assert panel.problem.text() == ""
    shown = shown_terms(panel)
    assert set(shown) == set(TRUTH)
    for name, truth in TRUTH.items():
        _, value, error, significance, note = shown[name]
        value, error = float(value), float(error)
        assert 0.0 < error < 5.0 * NOISE_ARCSEC, (name, error)
        assert abs(value - truth) < 3.0 * error, (name, value, truth, error)
        # Value and error are shown to 0.01": their quotient to within that rounding.
        rounding = 0.005 / error + 0.005 / max(abs(value), 0.01)
        assert float(significance) == pytest.approx(abs(value) / error, rel=rounding, abs=0.06)
        assert note == ""
    # The badly centred star is rejected and named; the residual falls to the noise.
    model = panel.fitted.fit.model
    assert model.rejected == (OUTLIER,)
    assert OUTLIER in panel.summary.text()
    assert model.rms_after_arcsec < 1.5 * np.sqrt(2.0) * NOISE_ARCSEC
    assert model.rms_before_arcsec > 50.0


def test_charts_hold_one_mark_per_sample(qtbot, panel, tmp_path):
    path = tmp_path / "samples.csv"
    write_samples(path)
    fit_file(qtbot, panel, path)
    panel.canvas.draw()
    kept = N_STARS - 1

    def count(ax, gid):
        found = [c for c in ax.collections if c.get_gid() == gid]
        assert len(found) == 1, gid
        return len(found[0].get_offsets())

    axes = panel.axes
    assert count(axes["coverage"], "coverage_kept") == kept
    assert count(axes["coverage"], "coverage_rejected") == 1
    assert count(axes["on_axes"], "arrows_before") == kept
    assert count(axes["on_axes"], "arrows_after") == kept
    assert count(axes["on_axes"], "rejected_on_axes") == 1
    for name in ("against_ha", "against_dec"):
        for k in (0, 1):
            assert count(axes[name], f"before_{k}") == N_STARS
            assert count(axes[name], f"after_{k}") == kept
    # The coverage map puts every star above the horizon (zenith distance below 70 deg).
    zd = axes["coverage"].collections[0].get_offsets()[:, 1]
    assert np.all(zd < 70.0)


def test_a_bad_file_is_one_line_and_keeps_the_last_fit(qtbot, panel, tmp_path):
    good = tmp_path / "samples.csv"
    write_samples(good)
    fit_file(qtbot, panel, good)
    before = shown_terms(panel)
    bad = tmp_path / "bad.csv"
    bad.write_text("time,name,ha_target,dec_target,ha_mount,dec_mount\n"
                   "2027-03-11T21:00:00Z,A,10.0,20.0,10.01,20.0\n"
                   "2027-03-11T21:01:00Z,B,twelve,20.0,12.01,20.0\n")
    fit_file(qtbot, panel, bad)
    text = panel.problem.text()
    assert "bad.csv" in text and "line 3" in text and "ha_target" in text
    assert "\n" not in text
    assert shown_terms(panel) == before


def test_the_model_saves_as_json(qtbot, panel, tmp_path):
    path = tmp_path / "samples.csv"
    write_samples(path)
    fit_file(qtbot, panel, path)
    out = tmp_path / "model.json"
    assert panel.save_model(str(out))
    data = json.loads(out.read_text())
    assert data["mount_type"] == "equatorial" and data["latitude"] == LATITUDE
    assert set(data["terms"]) == set(TRUTH)
    shown = shown_terms(panel)
    for name, entry in data["terms"].items():
        assert f"{entry['value_arcsec']:.2f}" == shown[name][1]
    assert data["rejected"] == [OUTLIER] and data["samples"] == N_STARS - 1


def test_samples_in_one_patch_say_so(qtbot, panel, tmp_path):
    path = tmp_path / "patch.csv"
    with open(path, "w") as handle:
        handle.write("time,name,ha_target,dec_target,ha_mount,dec_mount\n")
        for k in range(12):
            h, d = 10.0 + (k % 4) * 2.0, 30.0 + (k // 4) * 2.0
            handle.write(f"2027-03-11T21:{k:02d}:00Z,S{k},{h},{d},{h + 0.01},{d - 0.02}\n")
    fit_file(qtbot, panel, path)
    assert "one patch" in panel.summary.text()
    shown = shown_terms(panel)
    left_out = [name for name, cells in shown.items() if "left out" in cells[-1]]
    assert left_out, "a term the patch cannot determine is listed with the reason"
    assert all(shown[name][1] == "—" for name in left_out)


def test_the_charts_follow_the_night_theme(tmp_path):
    """Drawn in the night theme's colours (gui.themes): its background behind every view and
    its accent on the after-residuals, no other hue."""
    from matplotlib.colors import to_hex
    from matplotlib.figure import Figure

    from epochpoint.charts.pointing_chart import draw_pointing_charts
    from epochpoint.gui import themes

    night = themes.chart_style("night")
    ha, dec = np.array([-30.0, 10.0, 40.0]), np.array([20.0, 50.0, -10.0])
    figure = Figure(figsize=(8, 6))
    axes = draw_pointing_charts(figure, "equatorial", ha, dec, ha, dec, [40.0, 60.0, 30.0],
                                [100.0, 200.0, 250.0], ([10.0, -5.0, 3.0], [4.0, 2.0, -8.0]),
                                ([1.0, -0.5, 0.2], [0.3, 0.1, -0.4]), [True, True, False],
                                style=night)
    figure.canvas.draw()
    assert to_hex(figure.get_facecolor()) == to_hex(night["background"])
    for ax in axes.values():
        assert to_hex(ax.get_facecolor()) == to_hex(night["background"])
    after = [c for c in axes["against_ha"].collections if c.get_gid() == "after_0"][0]
    assert to_hex(after.get_facecolor()[0]) == to_hex(night["accent"])
