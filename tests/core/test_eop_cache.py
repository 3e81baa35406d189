"""The Earth-orientation and leap-second cache: built once, reused, rebuilt when its source
changes or it is damaged, and giving astropy's own numbers.

References: astropy's IERS_Auto table (astropy.utils.iers, read from the same
astropy-iers-data files: Bulletin A finals2000A with the IERS EOP 14 C04 finals) and its
UT1-UTC and polar-motion interpolation; IERS_B (the C04 series alone) for the final values;
astropy's start-up leap-second update (astropy.time.update_leap_seconds) for ERFA's TAI-UTC
list. Instants are drawn from a seeded generator over the whole table and beyond its ends.
"""
import json
import os
import shutil
import subprocess
import sys
import warnings

import numpy as np
import pytest
from astropy.time import Time
from astropy.utils import iers

from epochpoint.core import earth_orientation, iers_cache
from epochpoint.core.context import make_context
from epochpoint.core.timescale import StaleEarthOrientation

SEED = 20270120


@pytest.fixture
def counted_parses(tmp_path, monkeypatch):
    """The cache folder is tmp_path; returns a list that grows by one per table parse."""
    monkeypatch.setenv(iers_cache.CACHE_DIR_VARIABLE, str(tmp_path))
    calls = []
    parse = iers_cache.parse_tables

    def counted():
        calls.append(1)
        return parse()

    monkeypatch.setattr(iers_cache, "parse_tables", counted)
    return calls


def _equal_tables(a: dict, b: dict) -> bool:
    return all(np.array_equal(a[name], b[name]) for name in iers_cache.COLUMNS)


def test_built_on_first_use_then_reused_without_parsing(tmp_path, counted_parses):
    first = iers_cache.load_tables()
    assert len(counted_parses) == 1
    files = list(tmp_path.glob("earth-orientation-*.npz"))
    assert len(files) == 1
    second = iers_cache.load_tables()
    assert len(counted_parses) == 1  # read from the cache, no table parsing
    assert _equal_tables(first, second)


def test_rebuilt_when_a_source_table_changes(tmp_path, counted_parses, monkeypatch):
    # A copy of the shipped leap-second list stands in for a source file that is updated.
    source = tmp_path / "sources" / "Leap_Second.dat"
    source.parent.mkdir()
    shutil.copy(iers_cache.source_files()[-1], source)
    monkeypatch.setattr(iers_cache, "source_files",
                        lambda files=iers_cache.source_files(): files[:-1] + (str(source),))
    iers_cache.load_tables()
    old = list(tmp_path.glob("earth-orientation-*.npz"))
    stat = os.stat(source)
    os.utime(source, ns=(stat.st_atime_ns, stat.st_mtime_ns + 10**9))  # touched a second later
    iers_cache.load_tables()
    assert len(counted_parses) == 2
    new = list(tmp_path.glob("earth-orientation-*.npz"))
    assert len(new) == 1 and new != old  # the old cache is gone


def test_rebuilt_when_the_package_version_changes(counted_parses, monkeypatch):
    import astropy_iers_data

    iers_cache.load_tables()
    monkeypatch.setattr(astropy_iers_data, "__version__", "0.9999.1.1")
    iers_cache.load_tables()
    assert len(counted_parses) == 2


@pytest.mark.parametrize("damage", [b"", b"not a zip file", b"PK\x03\x04 truncated"])
def test_a_damaged_cache_is_rebuilt_not_fatal(tmp_path, counted_parses, damage):
    good = iers_cache.load_tables()
    path = next(tmp_path.glob("earth-orientation-*.npz"))
    path.write_bytes(damage)
    again = iers_cache.load_tables()
    assert len(counted_parses) == 2
    assert _equal_tables(good, again)
    assert iers_cache.read_cache(path, iers_cache.source_key()) is not None  # repaired


def test_a_cache_of_another_key_at_the_same_path_is_not_used(tmp_path, counted_parses):
    iers_cache.load_tables()
    path = next(tmp_path.glob("earth-orientation-*.npz"))
    assert iers_cache.read_cache(path, iers_cache.source_key() + " other") is None


def test_an_unwritable_cache_folder_still_gives_the_table(tmp_path, counted_parses,
                                                          monkeypatch):
    blocker = tmp_path / "a file, not a folder"
    blocker.write_text("x")
    monkeypatch.setenv(iers_cache.CACHE_DIR_VARIABLE, str(blocker / "cache"))
    tables = iers_cache.load_tables()
    assert len(tables["mjd"]) > 10000 and len(counted_parses) == 1


def _instants(table_mjd: np.ndarray, n: int) -> tuple:
    """Seeded UTC two-part JDs over the whole table, its ends and a year beyond each end."""
    rng = np.random.default_rng(SEED)
    mjd = np.concatenate([
        rng.uniform(table_mjd[0] - 365.0, table_mjd[-1] + 365.0, n),
        table_mjd[[0, 1, -2, -1]], table_mjd[[0, -1]] + [-1e-9, 1e-9],
        # Around leap seconds (1972-2017): the ends of 30 June and 31 December.
        np.repeat([41498.0, 41682.0, 50630.0, 57753.0], 3) + np.tile([-1e-6, 0.0, 0.5], 4)])
    jd1 = np.floor(mjd) + 2400000.5
    return jd1, mjd - np.floor(mjd)


def test_ut1_utc_and_polar_motion_equal_astropy_iers_auto_to_the_bit():
    auto = iers.IERS_Auto.open()
    jd1, jd2 = _instants(np.asarray(auto["MJD"].to_value("d")), 20000)
    table = earth_orientation.table()
    ut1_utc, = table.interpolate(jd1, jd2, ("ut1_utc_s",))
    pm_x, pm_y = table.interpolate(jd1, jd2, ("pm_x_arcsec", "pm_y_arcsec"))
    expected_x, expected_y = auto.pm_xy(jd1, jd2)
    np.testing.assert_array_equal(ut1_utc, auto.ut1_utc(jd1, jd2).to_value("s"))
    np.testing.assert_array_equal(pm_x, expected_x.to_value("arcsec"))
    np.testing.assert_array_equal(pm_y, expected_y.to_value("arcsec"))


def test_final_values_equal_astropy_iers_b_to_a_microsecond():
    """Where the C04 series has final values, they are what the cache holds (the IERS_B
    table read on its own, interpolated by astropy)."""
    b_table = iers.IERS_B.open()
    table = earth_orientation.table()
    final = ~table.ut1_predicted
    rng = np.random.default_rng(SEED)
    mjd = rng.uniform(table.mjd[final][0], table.mjd[final][-2], 5000)
    jd1, jd2 = np.floor(mjd) + 2400000.5, mjd - np.floor(mjd)
    flags = iers_cache.load_tables()["ut1_flag"][np.searchsorted(table.mjd, np.floor(mjd))]
    from_b = flags == "B"
    assert from_b.mean() > 0.9
    ut1_utc, = table.interpolate(jd1, jd2, ("ut1_utc_s",))
    expected = b_table.ut1_utc(jd1, jd2).to_value("s")
    assert np.max(np.abs(ut1_utc - expected)[from_b]) < 1e-6


def test_time_ut1_and_context_polar_motion_equal_astropy():
    """The UT1 Julian dates astropy's Time gives with its own IERS_Auto table, and the polar
    motion in radians astropy's Quantity conversion gives, are reproduced bit for bit."""
    auto = iers.IERS_Auto.open()
    rng = np.random.default_rng(SEED)
    for mjd in rng.uniform(42000.0, float(auto["MJD"][-1].value) + 200.0, 40):
        ours = Time(mjd, format="mjd", scale="utc")
        theirs = Time(mjd, format="mjd", scale="utc")
        theirs.delta_ut1_utc = auto.ut1_utc(theirs)  # what astropy's t.ut1 looks up itself
        expected = theirs.ut1
        got = earth_orientation.with_ut1_utc(ours).ut1
        assert (got.jd1, got.jd2) == (expected.jd1, expected.jd2)
        xp, yp = auto.pm_xy(ours)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", StaleEarthOrientation)
            ctx = make_context(ours)
        assert ctx.polar_motion_rad == (float(xp.to_value("rad")), float(yp.to_value("rad")))
        assert ctx.ut1 == (float(expected.jd1), float(expected.jd2))


def _run(code: str, env_extra: dict | None = None) -> str:
    env = dict(os.environ, **(env_extra or {}))
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          env=env, timeout=240)
    assert done.returncode == 0, done.stderr
    return done.stdout


LEAP_STATE = ("import erfa, json; print(json.dumps([erfa.leap_seconds.get().tolist(), "
              "str(erfa.leap_seconds.expires)]))")


def test_leap_seconds_are_those_astropy_installs_at_start(tmp_path):
    """ERFA's leap-second list after importing Epochpoint equals the one astropy's own first
    UTC conversion installs (offline), and astropy does not parse the list again."""
    astropy_own = _run(
        "from astropy.utils import iers; iers.conf.auto_download = False; "
        "iers.conf.auto_max_age = None\n"
        "from astropy.time import Time; Time('2020-01-01', scale='utc').tai\n" + LEAP_STATE)
    cache = {iers_cache.CACHE_DIR_VARIABLE: str(tmp_path)}
    _run("import epochpoint", cache)  # builds the cache (astropy parses the tables once)
    ours = _run(
        "import sys, epochpoint\n"
        "from astropy.time import Time; Time('2020-01-01', scale='utc').tai\n"
        "assert 'astropy.utils.iers' not in sys.modules, 'astropy parsed the list again'\n"
        + LEAP_STATE, cache)
    assert json.loads(ours) == json.loads(astropy_own)


def test_astropy_iers_is_set_offline_when_imported_after_epochpoint(tmp_path):
    out = _run("import epochpoint\nfrom astropy.utils import iers\n"
               "print(iers.conf.auto_download, iers.conf.auto_max_age, "
               "iers.conf.iers_degraded_accuracy)",
               {iers_cache.CACHE_DIR_VARIABLE: str(tmp_path)})
    assert out.split() == ["False", "None", "ignore"]


def test_a_table_the_program_chose_in_astropy_is_the_one_used():
    """A script that sets astropy's Earth-orientation table (here IERS_B alone, with its
    values shifted so that they differ from the shipped table's) gets its values."""
    import astropy.units as u

    b_table = iers.IERS_B.open().copy()
    b_table["PM_x"] += 1.0 * u.arcsec
    b_table["UT1_UTC"] += 0.25 * u.s
    when = Time("2019-05-04T03:00:00", scale="utc")
    with iers.earth_orientation_table.set(b_table):
        ctx = make_context(when)
        ut1 = earth_orientation.with_ut1_utc(Time(when)).ut1
    xp, yp = b_table.pm_xy(when)
    assert ctx.polar_motion_rad == (float(xp.to_value("rad")), float(yp.to_value("rad")))
    expected = Time(when)
    expected.delta_ut1_utc = b_table.ut1_utc(expected)
    assert (ut1.jd1, ut1.jd2) == (expected.ut1.jd1, expected.ut1.jd2)
    # Back to the shipped (combined) table afterwards.
    shipped = make_context(when)
    assert shipped.polar_motion_rad[0] != ctx.polar_motion_rad[0]
    assert shipped.polar_motion_rad[1] == ctx.polar_motion_rad[1]
