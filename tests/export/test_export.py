"""The telescope hand-off export: metadata in every format, interlock refusals, the validity
window and the exported numbers themselves.

Outside references (tests only): astropy AltAz and get_sun for which targets are up or near
the Sun; astropy.io.votable to parse the VOTable; the sidereal rotation of the Earth, 15.041
arcsec of hour angle per second (common practice), and the definition of proper motion for
the validity windows.
"""
import csv
import io
import json

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_sun
from astropy.io.votable import parse as parse_votable
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.core.export import export_positions, export_text, write_export
from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.positions import positions
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented southern site with its interlocks; an instant inside the shipped IERS table.
SITE = Site(latitude=-30.2, longitude=-70.8, height=2200.0, name="Cerro Ventoso (invented)",
            temperature=8.0, humidity=0.3,
            interlocks=Interlocks(mount=MountLimits(min_altitude=15.0), sun_avoidance=30.0))
WHEN = "2025-03-10T04:00:00Z"
SIDEREAL_ARCSEC_PER_S = 15.041  # Earth's rotation against the stars (common practice)
META_KEYS = ("time", "frame", "frame_description", "corrections", "site", "latitude",
             "longitude", "mount_type", "interlocks", "interlocks_checked", "tolerance_arcsec",
             "valid_for_s", "valid_until", "validity_basis", "validity_scope")


def _astropy_altaz(ra_deg, dec_deg):
    location = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                           SITE.height * u.m)
    frame = AltAz(obstime=Time(WHEN), location=location, pressure=0 * u.hPa)
    altaz = SkyCoord(ra=ra_deg * u.deg, dec=dec_deg * u.deg).transform_to(frame)
    return altaz.alt.deg


def _sample_targets() -> tuple[Targets, dict]:
    """Invented targets placed at WHEN with astropy: well up, well down, beside the Sun.

    Returns the targets and the expected verdict per name: '' (exported), 'altitude' or 'Sun'.
    """
    # The Sun's geocentric direction (GCRS); transforming it to ICRS would give the
    # barycentre's view of a body 0.005 AU away, meaningless here.
    sun = get_sun(Time(WHEN))
    grid_ra = np.arange(0.0, 360.0, 30.0)
    grid_dec = np.full(grid_ra.shape, -45.0)
    alt = _astropy_altaz(grid_ra, grid_dec)
    up = grid_ra[alt > 35.0][:3]
    down = grid_ra[alt < -5.0][:3]
    ra = np.concatenate([up, down, [sun.ra.deg]])
    dec = np.concatenate([np.full(up.size + down.size, -45.0), [sun.dec.deg + 4.0]])
    names = [f"Up{i}" for i in range(up.size)] + [f"Down{i}" for i in range(down.size)] + \
        ["BesideSun"]
    verdict = {n: "" for n in names[:up.size]}
    verdict.update({n: "altitude" for n in names[up.size:-1]})
    verdict["BesideSun"] = "Sun"
    assert up.size == 3 and down.size == 3, "the sample instant no longer splits the sky"
    return Targets.from_columns(ra=ra, dec=dec, epoch=2000.0, name=names), verdict


@pytest.fixture(scope="module")
def sample():
    return _sample_targets()


@pytest.mark.parametrize("frame", ["apparent", "icrs", "observed"])
@pytest.mark.parametrize("fmt", ["csv", "json", "votable"])
def test_every_format_carries_its_metadata(sample, frame, fmt):
    targets, _ = sample
    table = export_positions(targets, SITE, WHEN, frame)
    text = export_text(table, fmt)
    if fmt == "csv":
        meta = dict(line[2:].split(": ", 1) for line in text.splitlines() if line.startswith("#"))
    elif fmt == "json":
        meta = json.loads(text)["meta"]
    else:
        votable = parse_votable(io.BytesIO(text.encode()))
        meta = {info.name: info.value for info in votable.resources[0].infos}
    for key in META_KEYS:
        assert key in meta, f"{fmt}/{frame}: {key} missing"
    assert str(meta["frame"]) == frame
    # The frame description is not called "equinox" (an equinox is one date, not a frame).
    assert "equinox" not in meta
    description = str(meta["frame_description"])
    expected_words = {"apparent": "true equator and equinox of date 2025-03-10T04:00:00",
                      "icrs": "ICRS, epoch 2025-03-10T04:00:00",
                      "observed": "refracted with"}[frame]
    assert expected_words in description
    # The file says the interlocks were checked at the export instant, for the destination
    # only, and that the validity covers coordinate accuracy only.
    checked = str(meta["interlocks_checked"])
    assert "export instant 2025-03-10T04:00:00" in checked and "not the path" in checked
    assert str(meta["validity_scope"]).startswith("coordinate accuracy only")
    assert str(meta["mount_type"]) == "fork equatorial"  # MountLimits' default type


def test_votable_parses_with_astropy_and_has_info_and_param(sample):
    # Reference: astropy.io.votable, the IVOA VOTable 1.4 parser; numbers also as PARAMs.
    targets, _ = sample
    table = export_positions(targets, SITE, WHEN, "apparent", tolerance_arcsec=0.5)
    votable = parse_votable(io.BytesIO(export_text(table, "votable").encode()))
    vo_table = votable.get_first_table()
    params = {p.name: p for p in vo_table.params}
    assert params["tolerance_arcsec"].value == pytest.approx(0.5)
    assert str(params["tolerance_arcsec"].unit) == "arcsec"
    assert params["valid_for_s"].value == pytest.approx(table.meta["valid_for_s"])
    assert str(params["valid_for_s"].unit) == "s"
    data = vo_table.to_table()
    assert list(data["name"]) == ["Up0", "Up1", "Up2"]
    assert str(data["ra_apparent"].unit) == "deg"


def test_refused_targets_are_left_out_unless_all(sample):
    # Reference: astropy AltAz and get_sun placed each target up, down or beside the Sun.
    targets, verdict = sample
    kept = export_positions(targets, SITE, WHEN, "apparent")
    assert list(kept["name"]) == [n for n, v in verdict.items() if v == ""]
    assert "refused" not in kept
    assert kept.meta["targets_refused"] == 4
    everything = export_positions(targets, SITE, WHEN, "apparent", include_all=True)
    assert list(everything["name"]) == list(verdict)
    for name, reason in zip(everything["name"], everything["refused"]):
        if verdict[name] == "":
            assert reason == ""
        else:
            assert verdict[name] in reason, f"{name}: {reason!r}"


def test_apparent_and_icrs_columns_equal_positions_output(sample):
    targets, _ = sample
    reference = positions(targets, SITE, WHEN)
    for frame, columns in (("apparent", ("ra_apparent", "dec_apparent")),
                           ("icrs", ("ra_propagated", "dec_propagated"))):
        table = export_positions(targets, SITE, WHEN, frame, include_all=True)
        for column in columns:
            np.testing.assert_array_equal(table[column], reference[column])
        # CSV text reads back to the same doubles.
        rows = list(csv.DictReader(line for line in export_text(table, "csv").splitlines()
                                   if not line.startswith("#")))
        np.testing.assert_array_equal([float(r[columns[0]]) for r in rows],
                                      reference[columns[0]])


def _moving_pair(pm_mas_per_year):
    """Two targets at one place, well up at WHEN; the second moves north at the given rate."""
    targets, _ = _sample_targets()
    ra, dec = np.repeat(targets.ra[:1], 2), np.repeat(targets.dec[:1], 2)
    return Targets.from_columns(ra=ra, dec=dec, pm_dec=[0.0, pm_mas_per_year], epoch=2016.0,
                                name=["Still", "Runner"])


def test_icrs_validity_is_tolerance_over_proper_motion():
    # Definition of proper motion: 10 arcsec/yr takes 0.1 Julian year to move 1 arcsec.
    table = export_positions(_moving_pair(10_000.0), SITE, WHEN, "icrs", tolerance_arcsec=1.0)
    expected_s = 0.1 * 365.25 * 86400.0
    assert table.meta["valid_for_s"] == pytest.approx(expected_s, rel=1e-3)
    assert "Runner" in table.meta["validity_basis"]
    still = export_positions(_moving_pair(0.0)[[0]], SITE, WHEN, "icrs")
    assert still.meta["valid_for_s"] is None and still.meta["valid_until"] == "unlimited"


def test_apparent_validity_is_positive_and_shorter_for_a_faster_target():
    # Annual aberration (20.5 arcsec, Bradley's constant) turns once a year and precession is
    # 50 arcsec/yr: the apparent place of a still star moves at most ~0.02 arcsec per hour
    # (common practice), so 1 arcsec lasts at least a day. An invented 1000 arcsec/yr star
    # moves 0.114 arcsec/h on its own: 1 arcsec lasts under 9 h whatever aberration does.
    pair = _moving_pair(1_000_000.0)
    slow = export_positions(pair[[0]], SITE, WHEN, "apparent")
    fast = export_positions(pair[[1]], SITE, WHEN, "apparent")
    assert slow.meta["valid_for_s"] > 24 * 3600.0
    assert 0.0 < fast.meta["valid_for_s"] < 9 * 3600.0
    both = export_positions(pair, SITE, WHEN, "apparent")
    assert both.meta["valid_for_s"] == fast.meta["valid_for_s"]
    assert "Runner" in both.meta["validity_basis"]
    assert both.meta["valid_until"] > WHEN


def test_observed_validity_follows_the_turning_sky():
    # A target on the celestial equator moves 15.041 arcsec/s in alt/az and HA/Dec (common
    # practice), refraction's change adds a little: 1 arcsec lasts about 1/15 s.
    equatorial = Targets.from_columns(ra=[_up_on_equator()], dec=[0.0], epoch=2000.0,
                                      name=["Equator"])
    table = export_positions(equatorial, SITE, WHEN, "observed", tolerance_arcsec=1.0)
    assert table.meta["valid_for_s"] == pytest.approx(1.0 / SIDEREAL_ARCSEC_PER_S, rel=0.03)
    assert "15 arcsec per second" in table.meta["validity_basis"]
    polar = Targets.from_columns(ra=[0.0], dec=[-85.0], epoch=2000.0, name=["NearPole"])
    slow = export_positions(polar, SITE, WHEN, "observed", tolerance_arcsec=1.0)
    # cos(85 deg) = 0.087: the sky moves 1.31 arcsec/s there.
    assert slow.meta["valid_for_s"] == pytest.approx(
        1.0 / (SIDEREAL_ARCSEC_PER_S * np.cos(np.radians(85.0))), rel=0.03)


def _up_on_equator() -> float:
    grid = np.arange(0.0, 360.0, 5.0)
    alt = _astropy_altaz(grid, np.zeros_like(grid))
    return float(grid[np.argmax(alt)])


def test_write_export_and_command_line(sample, tmp_path, capsys):
    targets, _ = sample
    path = tmp_path / "handoff.json"
    write_export(export_positions(targets, SITE, WHEN, "icrs"), path, "json")
    assert json.loads(path.read_text())["meta"]["frame"] == "icrs"
    target_file = tmp_path / "targets.csv"
    rows = ["name,ra,dec,epoch"] + [f"{n},{float(r)!r},{float(d)!r},2000.0" for n, r, d in
                                    zip(targets.names(), targets.ra, targets.dec)]
    target_file.write_text("\n".join(rows) + "\n")
    site_arg = f"--site={SITE.latitude},{SITE.longitude},{SITE.height}"
    out_file = tmp_path / "out.xml"
    code = main(["export", str(target_file), site_arg, "--at", WHEN, "--frame", "apparent",
                 "--format", "votable", "--output", str(out_file), "--all"])
    _, err = capsys.readouterr()
    assert code == 0, err
    data = parse_votable(str(out_file)).get_first_table().to_table()
    assert "refused" in data.colnames and len(data) == 7
    code = main(["export", str(target_file), site_arg, "--at", WHEN, "--frame", "observed"])
    out, err = capsys.readouterr()
    assert code == 0 and "left out" in err and "Down0" not in out
    code = main(["export", str(target_file), site_arg, "--at", WHEN, "--frame", "icrs",
                 "--tolerance", "-1"])
    _, err = capsys.readouterr()
    assert code == 2 and err.count("\n") == 1 and "tolerance" in err
