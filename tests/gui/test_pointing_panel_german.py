"""The Pointing model tab fits a German equatorial mount's samples on both sides of the pier.

Reference: the rigorous synthetic German mount of tests/pointing/test_german_mount.py
(rotation matrices, independent of the code under test; the term values its imperfections
amount to are stated there), without its declination-axis droop, which the tab's default
terms leave out. Its seeded readings, with their pier sides, are written to a samples file;
the tab (mount type from a German site) must show each default term within 3 standard errors
of the built value, the samples on each side in the summary, and frame every sample by its
side in the charts (square east, diamond west: the chart's own convention).
"""
from __future__ import annotations

import csv
import json
import sys
from pathlib import Path

import numpy as np
import pytest

from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.pointing_model.terms import DEFAULT_TERMS
from epochpoint.core.site import Site
from epochpoint.gui import workers
from epochpoint.gui.panels.pointing_panel import TABLE_HEADERS
from pointing_panel_helpers import fit_file, open_panel

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pointing"))
from test_german_mount import BUILT, EXPECTED, NOISE, two_sided_samples  # noqa: E402

SEED = 20261203
LATITUDE = 44.6  # an invented site
N_STARS = 90
GERMAN_SITE = Site(latitude=LATITUDE, longitude=11.3, height=250.0,
                   name="Poplar Bend (invented)",
                   interlocks=Interlocks(mount=MountLimits(mount_type="german")))


@pytest.fixture
def samples_file(tmp_path, monkeypatch):
    """The synthetic mount's samples (no droop) with a pier_side column; their sides."""
    monkeypatch.setitem(BUILT, "droop", 0.0)
    rng = np.random.default_rng(SEED)
    h, d, ha_fw, dec_fw, sides = two_sided_samples(rng, N_STARS, LATITUDE)
    path = tmp_path / "german.csv"
    with open(path, "w", newline="") as handle:
        out = csv.writer(handle)
        out.writerow(["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount",
                      "pier_side"])
        for k in range(N_STARS):
            out.writerow([f"2027-05-02T{21 + k // 60:02d}:{k % 60:02d}:00Z", f"Star {k + 1}",
                          *(repr(float(x[k])) for x in (h, d, ha_fw, dec_fw)), sides[k]])
    return path, np.char.lower(sides.astype(str))


@pytest.fixture
def panel(qtbot):
    yield open_panel(qtbot, GERMAN_SITE)
    workers.wait_for_workers()


def shown_terms(panel) -> dict:
    column = {h: k for k, h in enumerate(TABLE_HEADERS)}
    return {panel.table.item(r, column["Term"]).text():
            [panel.table.item(r, c).text() for c in range(panel.table.columnCount())]
            for r in range(panel.table.rowCount())}


def count(ax, gid) -> int:
    found = [c for c in ax.collections if c.get_gid() == gid]
    assert len(found) == 1, gid
    return len(found[0].get_offsets())


def test_a_german_fit_shows_its_terms_and_both_sides(qtbot, panel, samples_file, tmp_path):
    path, sides = samples_file
    # The German site chose the German mount type.
    assert panel.mount_combo.currentText() == "German equatorial"
    fit_file(qtbot, panel, path)
    assert panel.problem.text() == ""
    shown = shown_terms(panel)
    assert set(shown) == set(DEFAULT_TERMS["german"])
    for name in DEFAULT_TERMS["german"]:
        value, error = float(shown[name][1]), float(shown[name][2])
        assert 0.0 < error < 10.0, (name, error)
        assert abs(value - EXPECTED[name]) < 3.0 * error, (name, value, EXPECTED[name], error)
    model = panel.fitted.fit.model
    assert model.mount_type == "german"
    assert model.rms_after_arcsec == pytest.approx(NOISE * np.sqrt(2.0), rel=0.25)
    east, west = int(np.sum(sides == "east")), int(np.sum(sides == "west"))
    assert east > 10 and west > 10
    summary = panel.summary.text()
    assert summary.startswith("German equatorial mount")
    assert f"{east} samples east" in summary and f"{west} west" in summary

    # Every sample framed by its side, in every view; the after-marks of the kept ones.
    panel.canvas.draw()
    axes = panel.axes
    kept = panel.fitted.fit.kept
    for ax, gid in ((axes["on_axes"], "on_axes_side_{}"),
                    (axes["coverage"], "coverage_side_{}")):
        assert count(ax, gid.format("east")) == east
        assert count(ax, gid.format("west")) == west
    for name in ("against_ha", "against_dec"):
        for k in (0, 1):
            for side in ("east", "west"):
                assert count(axes[name], f"{name}_side_{side}_{k}") == \
                    int(np.sum(kept & (sides == side)))
    # The two sides have different marks, named in the legend.
    frames = {side: [c for c in axes["coverage"].collections
                     if c.get_gid() == f"coverage_side_{side}"][0] for side in ("east", "west")}
    paths = [frames[s].get_paths()[0].vertices for s in ("east", "west")]
    assert paths[0].shape != paths[1].shape or not np.allclose(paths[0], paths[1])
    labels = [t.get_text() for t in axes["against_dec"].get_legend().get_texts()]
    assert "east pier side" in labels and "west pier side" in labels

    out = tmp_path / "model.json"
    assert panel.save_model(str(out))
    assert json.loads(out.read_text())["mount_type"] == "german"


def test_the_same_file_fitted_as_a_fork_mount_says_to_fit_it_as_german(qtbot, panel,
                                                                        samples_file):
    path, _ = samples_file
    panel.set_mount_type("equatorial")
    fit_file(qtbot, panel, path)
    assert panel.problem.text() == ""
    summary = panel.summary.text()
    assert summary.startswith("fork equatorial mount") and "both pier sides" in summary
    # A German file's sides stay marked in the charts.
    assert count(panel.axes["coverage"], "coverage_side_east") > 0


def test_a_german_file_without_sides_is_one_line_and_keeps_the_last_fit(qtbot, panel,
                                                                        samples_file, tmp_path):
    path, _ = samples_file
    fit_file(qtbot, panel, path)
    before = shown_terms(panel)
    bare = tmp_path / "bare.csv"
    with open(path) as source:
        bare.write_text("".join(",".join(line.rstrip("\n").split(",")[:6]) + "\n"
                                for line in source))
    fit_file(qtbot, panel, bare)
    text = panel.problem.text()
    assert "bare.csv" in text and "pier_side" in text and "\n" not in text
    assert shown_terms(panel) == before
