"""Target rows that used to be silently wrong: an empty epoch on a moving row, a parallax of
zero or less, and motions beyond any known star's.

References: astropy's SkyCoord.apply_space_motion without a distance (through ERFA pmsafe,
which treats a missing or non-positive parallax as a very distant star) for a Gaia-like row
with a negative parallax; the speed of light (exact, SI); the fastest known proper motion,
Barnard's star at 10.4"/yr, and the fastest known stars at under 2,000 km/s (from memory).
"""
from __future__ import annotations

import warnings

import astropy.units as u
import numpy as np
import pytest
from astropy.coordinates import SkyCoord
from astropy.io.votable.tree import Info, Param
from astropy.io.votable import from_table
from astropy.table import Table
from astropy.time import Time

import epochpoint as ep
from epochpoint.cli.main import main
from epochpoint.core.spacemotion import propagate
from epochpoint.io import InputError, TargetValueWarning, read_targets

pytestmark = [pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation"),
              pytest.mark.filterwarnings("ignore::erfa.ErfaWarning")]

WHEN = "2027-01-20T03:00:00Z"
C_KM_S = 299_792.458
KM_S_PER_AU_YR = 4.740470463533348  # 1 au per Julian year in km/s (IAU 2012 au)
MOVING = "name,ra,dec,epoch,pm_ra_cosdec,pm_dec\nA,10,20,2016.0,100,50\nB,30,40,,120,-80\n"


def _read(path):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        targets = read_targets(path)
    return targets, [w for w in caught if issubclass(w.category, TargetValueWarning)]


# -- the epoch a moving row needs ---------------------------------------------------------------

def test_an_empty_epoch_on_a_moving_row_is_refused(write_file):
    path = write_file("t.csv", MOVING)
    with pytest.raises(InputError) as caught:
        read_targets(path)
    error = caught.value
    assert (error.line, error.column, error.target) == (3, "epoch", "B")
    assert str(error).startswith(f"{path}, line 3 (B), column epoch: no epoch given")
    assert "not taken as J2000.0" in str(error) and "catalogue_epoch" in str(error)


def test_no_epoch_column_is_refused_for_a_moving_row_only(write_file):
    with pytest.raises(InputError, match="line 3 .*no epoch column"):
        read_targets(write_file("t.csv", "name,ra,dec,pm_dec\nStill,10,20,0\nMoving,11,21,5\n"))
    # Without proper motion the place is the same at every epoch: J2000.0 is harmless.
    still = read_targets(write_file("s.csv", "name,ra,dec\nStill,10,20\n"))
    assert still.epoch[0] == 2000.0


def test_a_csv_comment_states_one_epoch_for_all_rows(write_file):
    path = write_file("t.csv", "# invented list\n# catalogue_epoch: J2016.0\n" + MOVING)
    targets, _ = _read(path)
    np.testing.assert_array_equal(targets.epoch, [2016.0, 2016.0])


def test_a_stated_epoch_that_is_not_one_names_the_line(write_file):
    with pytest.raises(InputError, match=r"line 1: catalogue_epoch: 'soon' is not an epoch"):
        read_targets(write_file("t.csv", "# catalogue_epoch: soon\n" + MOVING))


def _moving_table():
    return Table({"name": ["A", "B"], "ra": [10.0, 30.0], "dec": [20.0, 40.0],
                  "epoch": np.ma.MaskedArray([2016.0, 0.0], mask=[False, True]),
                  "pm_ra_cosdec": [100.0, 120.0], "pm_dec": [50.0, -80.0]})


def test_ecsv_meta_states_the_epoch(tmp_path):
    table = _moving_table()
    path = tmp_path / "t.ecsv"
    table.write(path, format="ascii.ecsv")
    with pytest.raises(InputError, match="row 2 .B., column epoch: no epoch given"):
        read_targets(path)
    table.meta["catalogue_epoch"] = "J2015.5"
    table.write(path, format="ascii.ecsv", overwrite=True)
    np.testing.assert_array_equal(read_targets(path).epoch, [2016.0, 2015.5])


@pytest.mark.parametrize("element", ["INFO", "PARAM"])
def test_votable_info_or_param_states_the_epoch(tmp_path, element):
    votable = from_table(_moving_table())
    if element == "INFO":
        votable.resources[0].infos.append(Info(name="catalogue_epoch", value="2015.5"))
    else:
        table = votable.get_first_table()
        table.params.append(Param(votable, name="catalogue_epoch", datatype="double",
                                  value=2015.5))
    path = tmp_path / "t.vot"
    votable.to_xml(str(path))
    np.testing.assert_array_equal(read_targets(path).epoch, [2016.0, 2015.5])


# -- parallax of zero or less: distance unknown -----------------------------------------------

GAIA_LIKE = ("source_id,ra,dec,parallax,pmra,pmdec,ref_epoch,radial_velocity\n"
             "4711,150.25,-30.5,-0.8,-15.2,8.3,2016.0,40.0\n"
             "4712,151.0,-31.0,-0.2,3.0,1.0,2016.0,\n"
             "4713,152.0,-32.0,-1.5,0.0,0.0,2016.0,\n"
             "4714,153.0,-33.0,2.5,7.0,1.0,2016.0,\n")


def test_negative_parallax_rows_are_kept_with_one_warning(write_file):
    targets, caught = _read(write_file("gaia.csv", GAIA_LIKE))
    assert len(targets) == 4
    assert len(caught) == 1
    message = str(caught[0].message)
    assert "3 target(s) with a parallax of zero or less" in message
    assert "first: line 2 (4711)" in message and "\n" not in message
    np.testing.assert_array_equal(targets.parallax, [0.0, 0.0, 0.0, 2.5])


def test_negative_parallax_propagates_like_astropy_without_a_distance(write_file):
    targets, _ = _read(write_file("gaia.csv", GAIA_LIKE))
    site = ep.Site(latitude=-30.2, longitude=-70.7, height=2200.0, timezone="UTC")
    result = ep.positions(targets, site, WHEN, ledger=True)
    moved = SkyCoord(ra=150.25 * u.deg, dec=-30.5 * u.deg, pm_ra_cosdec=-15.2 * u.mas / u.yr,
                     pm_dec=8.3 * u.mas / u.yr, radial_velocity=40.0 * u.km / u.s,
                     obstime=Time(2016.0, format="jyear", scale="tdb")
                     ).apply_space_motion(new_obstime=Time(WHEN.rstrip("Z"), scale="utc"))
    ours = SkyCoord(ra=result["ra_propagated"][0] * u.deg, dec=result["dec_propagated"][0] * u.deg)
    assert ours.separation(moved).to_value(u.mas) < 0.01
    assert result["parallax_propagated"][0] == 0.0
    # The ledger shows the parallax step as unknown; the metadata counts such targets.
    assert np.isnan(result["ledger_parallax"][:3]).all() and result["ledger_parallax"][3] > 0
    assert result.meta["targets_distance_unknown"] == 3


def test_machine_formats_carry_the_count(write_file, capsys):
    path = str(write_file("gaia.csv", GAIA_LIKE))
    code = main(["positions", path, "--site=-30.2,-70.7,2200", "--at", WHEN, "--format", "csv"])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "# targets_distance_unknown: 3" in out
    assert err.count("parallax of zero or less") == 1


# -- motions beyond any known star's ------------------------------------------------------------

def test_implausible_motions_are_named_in_one_warning(write_file):
    path = write_file("t.csv", "name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity\n"
                               "Fast,10,20,2016.0,1,1,10,5000\n"
                               "Quick,11,21,2016.0,25000,0,10,0\n"
                               "Fine,12,22,2016.0,10300,0,500,100\n")
    targets, caught = _read(path)
    assert len(targets) == 3 and len(caught) == 1
    message = str(caught[0].message)
    assert "line 2 (Fast): radial velocity 5000 km/s" in message
    assert "line 3 (Quick): proper motion 25\"/yr" in message
    assert "Fine" not in message


def test_propagation_never_implies_a_speed_above_light():
    # Seeded random rows far outside any real star's range (units mistaken by 1000x or more).
    rng = np.random.default_rng(20270120)
    n = 2000
    parallax = 10.0 ** rng.uniform(-3.0, 3.0, n)
    pm = 10.0 ** rng.uniform(0.0, 8.0, n) * rng.choice([-1.0, 1.0], n)
    rv = rng.uniform(-1e6, 1e6, n)
    there = propagate(rng.uniform(0.0, 360.0, n), rng.uniform(-89.0, 89.0, n), parallax,
                      pm, pm * 0.3, rv, rng.uniform(-300.0, 300.0, n))
    known = there.parallax > 0.0
    assert known.any() and (~known).any()
    transverse = np.hypot(there.pm_ra_cosdec, there.pm_dec)[known] / there.parallax[known]
    speed = np.hypot(transverse * KM_S_PER_AU_YR, there.radial_velocity[known])
    assert speed.max() < C_KM_S
    assert np.isfinite(there.u).all()
