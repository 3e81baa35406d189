"""Site and horizon files in the Site & limits tab: loaded as the command line reads them
(io.sitefile.read_site_file, io.sitelimits.read_horizon_file), saved so that they read back
equal, atomically, and only from a valid form.

The site-file writer is checked against Python's own TOML reader (tomllib, TOML 1.0) on
seeded invented sites with awkward names (quotes, backslashes, tabs, non-ASCII); the form is
checked on invented site files, one without a time zone (found from the coordinates) and one
with a park position for the mount.
"""
from __future__ import annotations

import tomllib

import numpy as np
import pytest

from epochpoint.core.limits import HorizonMask, Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.io.sitefile import read_site_file, site_to_tables
from epochpoint.io.sitelimits import read_horizon_file
from epochpoint.io.sitewrite import site_file_text
from panels_demo import demo_site_editor

SEED = 10
NAMES = ('Cerro "Quote" \\ Obs', "Tab\there", "Mirador del Río", "", "x" * 90, "ünï\u0001")

NO_ZONE = """[site]
name = "Salt Flat (invented)"
latitude = 40.5
longitude = -112.5
height = 1290
"""
PARKED = """[site]
name = "Pine Knoll (invented)"
latitude = 47.25
longitude = 11.4
height = 900.0
timezone = "Europe/Vienna"

[mount]
type = "german"
park_ha = -90.0
park_dec = 60.0
"""


def _random_site(rng, name) -> Site:
    azimuth = np.sort(rng.choice(np.arange(0.0, 360.0, 7.5), size=6, replace=False))
    mount = MountLimits(mount_type=str(rng.choice(["german", "equatorial", "altaz"])),
                        min_altitude=float(rng.uniform(0, 30)),
                        ha_east=float(rng.uniform(1, 12)), park_ha=float(rng.uniform(-180, 180)),
                        park_dec=float(rng.uniform(-90, 90)))
    return Site(latitude=float(rng.uniform(-89, 89)), longitude=float(rng.uniform(-180, 180)),
                height=float(rng.uniform(-100, 5000)), name=name,
                timezone=["UTC", "Asia/Kolkata", "America/Santiago", None][rng.integers(4)],
                temperature=float(rng.uniform(-30, 35)),
                interlocks=Interlocks(mount=mount, horizon=HorizonMask(
                    azimuth, rng.uniform(-5, 40, size=6)), sun_avoidance=float(rng.uniform(0, 60))))


@pytest.mark.parametrize("name", NAMES)
def test_site_file_text_reads_back_with_tomllib(name, tmp_path):
    site = _random_site(np.random.default_rng([SEED, NAMES.index(name)]), name)
    text = site_file_text(site)
    expected = {t: {k: v for k, v in table.items() if v is not None}
                for t, table in site_to_tables(site).items()}
    assert tomllib.loads(text) == expected
    path = tmp_path / "site.toml"
    path.write_text(text, encoding="utf-8")
    assert read_site_file(path)[0] == site


@pytest.fixture
def editor(qtbot):
    widget = demo_site_editor(qtbot)
    yield widget
    widget.close()


def test_loading_a_site_file_applies_it(editor, qtbot, tmp_path):
    path = tmp_path / "parked.toml"
    path.write_text(PARKED, encoding="utf-8")
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        assert editor.load_site_file(str(path))
    assert blocker.args[0] == read_site_file(path)[0]
    assert (blocker.args[0].interlocks.mount.park_ha,
            blocker.args[0].interlocks.mount.park_dec) == (-90.0, 60.0)


def test_a_site_file_without_zone_takes_the_zone_of_its_coordinates(editor, qtbot, tmp_path):
    path = tmp_path / "nozone.toml"
    path.write_text(NO_ZONE, encoding="utf-8")
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        assert editor.load_site_file(str(path))
    site = blocker.args[0]
    # 40.5 N, 112.5 W lies in Utah, on Mountain time (common knowledge, from memory).
    assert site.timezone_from_coordinates and site.timezone == "America/Denver"
    saved = tmp_path / "saved.toml"
    assert editor.save_site_file(str(saved))
    assert "timezone" not in tomllib.loads(saved.read_text(encoding="utf-8"))["site"]


def test_park_position_survives_an_edit_and_a_save(editor, qtbot, tmp_path):
    path = tmp_path / "parked.toml"
    path.write_text(PARKED, encoding="utf-8")
    editor.load_site_file(str(path))
    editor.fields["height"].setText("950")
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        editor.commit()
    assert blocker.args[0].interlocks.mount.park_dec == 60.0
    saved = tmp_path / "saved.toml"
    assert editor.save_site_file(str(saved))
    again = read_site_file(saved)[0]
    assert again == blocker.args[0] and again.height == 950.0


def test_saving_is_refused_while_a_field_is_wrong(editor, tmp_path):
    editor.fields["humidity"].setText("wet")
    path = tmp_path / "site.toml"
    assert not editor.save_site_file(str(path))
    assert "humidity" in editor.status.text() and not path.exists()
    assert list(tmp_path.iterdir()) == []


def test_a_bad_site_file_is_named_and_changes_nothing(editor, qtbot, tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(PARKED.replace("47.25", "147.25"), encoding="utf-8")
    before = editor.site
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        assert not editor.load_site_file(str(path))
    assert "bad.toml" in editor.status.text() and "latitude" in editor.status.text()
    assert editor.site is before and editor.fields["latitude"].text() == str(before.latitude)


def test_horizon_file_load_and_save(editor, qtbot, tmp_path):
    path = tmp_path / "ridge.txt"
    path.write_text("# invented ridge\n0 5\n90, 22.5\n180\t3\n270 11 # west trees\n",
                    encoding="utf-8")
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        assert editor.load_horizon_file(str(path))
    mask = blocker.args[0].interlocks.horizon
    assert mask.azimuth.tolist() == [0, 90, 180, 270]
    assert mask.altitude.tolist() == [5, 22.5, 3, 11]
    saved = tmp_path / "saved.txt"
    assert editor.save_horizon_file(str(saved))
    again = read_horizon_file(saved)
    assert again.azimuth.tolist() == mask.azimuth.tolist()
    assert again.altitude.tolist() == mask.altitude.tolist()
