"""Body rows through the streamed positions (`position_chunks`, what the command line writes)
and through `epochpoint positions` in JSON, CSV and the table for people, for a list mixing
stars and bodies.

References: the Moon's geocentric distance against DE421 read by jplephem's own reader with
light time iterated in the test (body_helpers.jplephem_bary_au), within 1e-8 au (1.5 km,
the light-time and topocentric parts being absent at the geocentre); the streamed and
gathered columns against each other bit for bit.
"""
import csv
import io
import json

import numpy as np
import pytest
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.core.positions import position_chunks, positions
from epochpoint.core.site import Site
from epochpoint.io import read_targets

from .body_helpers import jplephem_bary_au

WHEN = "2027-05-01T03:00:00Z"
SITE = "--site=-30.5,-70.7,2200"
MIXED = ("name,ra,dec,body,perihelion_distance,eccentricity,inclination,ascending_node,"
         "argument_of_perihelion,perihelion_time\n"
         "Vega,279.2347,38.7837,,,,,,,\n"
         "Red,,,mars,,,,,,\n"
         "Luna,,,moon,,,,,,\n"
         "Achernar,24.4285,-57.2367,,,,,,,\n"
         "Hairy,,,,0.9,0.995,120.0,300.0,10.0,2027-04-20T00:00:00\n")
BODY_FIELDS = ("distance_au", "light_time_s", "rate_ra", "rate_dec", "rate_alt", "rate_az",
               "elongation", "phase_angle", "illuminated_fraction", "magnitude")


@pytest.fixture
def mixed(tmp_path):
    path = tmp_path / "mixed.csv"
    path.write_text(MIXED)
    return str(path)


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("engine", ["numpy", "kernel"])
def test_streamed_chunks_carry_the_body_columns(mixed, engine):
    targets = read_targets(mixed)
    site = Site(latitude=-30.5, longitude=-70.7, height=2200.0)
    whole = positions(targets, site, WHEN, engine=engine)
    chunks = position_chunks(targets, site, WHEN, chunk_size=2, engine=engine)
    assert all(c in chunks.names for c in BODY_FIELDS)
    assert chunks.units["rate_ra"] == "arcsec/s"
    parts = list(chunks)
    assert len(parts) == 3
    for column in chunks.names[1:]:
        streamed = np.concatenate([p[column] for p in parts])
        assert np.array_equal(streamed, whole[column], equal_nan=True), column
    assert np.isnan(whole["distance_au"][[0, 3]]).all()
    assert np.isfinite(whole["distance_au"][[1, 2, 4]]).all()


def test_positions_json_mixing_stars_and_bodies(capsys, mixed):
    code, out, err = run(capsys, "positions", mixed, SITE, "--at", WHEN, "--format", "json")
    assert code == 0, err
    rows = json.loads(out)
    assert [r["name"] for r in rows] == ["Vega", "Red", "Luna", "Achernar", "Hairy"]
    assert rows[0]["distance_au"] is None and rows[0]["rate_ra"] is None
    for row in rows[1:3] + rows[4:]:
        assert all(row[f] is not None for f in ("distance_au", "rate_ra", "rate_dec"))
    # The Moon moves east about 0.5 arcsec per second of time (common practice).
    assert 0.3 < rows[2]["rate_ra"] < 0.8


def test_positions_csv_and_table(capsys, mixed):
    code, out, _ = run(capsys, "positions", mixed, SITE, "--at", WHEN, "--format", "csv")
    assert code == 0
    lines = [line for line in out.splitlines() if not line.startswith("#")]
    rows = list(csv.DictReader(io.StringIO("\n".join(lines))))
    assert float(rows[1]["distance_au"]) > 0.5 and rows[0]["distance_au"] == ""
    code, out, _ = run(capsys, "positions", mixed, SITE, "--at", WHEN)
    assert code == 0 and "Dist au" in out and 'dRA "/s' in out


def test_moon_distance_from_a_file_matches_de421():
    """Geocentric distance of the Moon, light-time corrected, against DE421 through
    jplephem's own reader (reference: JPL DE421)."""
    from epochpoint.core.targets import Targets

    t = Time(WHEN.rstrip("Z"), scale="utc")
    targets = Targets.from_columns(ra=[0.0], dec=[0.0], name=["Luna"],
                                   extra={"body": np.array(["moon"], dtype=object)})
    got = positions(targets, None, t)["distance_au"][0]
    jd, earth = t.tdb.jd, jplephem_bary_au("earth", t.tdb.jd)
    tau = 0.0
    for _ in range(5):
        rho = jplephem_bary_au("moon", jd - tau) - earth
        tau = np.linalg.norm(rho) * 149597870.7 / 299792.458 / 86400.0
    assert abs(got - np.linalg.norm(rho)) < 1e-8


def test_bad_body_cell_exits_2_with_one_line(capsys, tmp_path):
    path = tmp_path / "bad.csv"
    path.write_text("name,body\nRed,mars\nOdd,vulcan\n")
    code, out, err = run(capsys, "positions", str(path), SITE, "--at", WHEN, "--format", "json")
    assert code == 2 and "line 3" in err and "column body" in err
    assert len(err.strip().splitlines()) == 1
