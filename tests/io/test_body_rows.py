"""Solar-system rows in target files (io/bodyfields.py): a `body` cell or osculating elements
with empty RA/Dec, read by the CSV row and column readers and by ECSV/VOTable, cells checked
at read time with one-line errors naming file, line, target and column.

The positions of rows read from files are compared with the same bodies given through the
Python API (tests/bodies/ check those against astropy with DE421, PyEphem and Meeus); the
Hipparcos row is the new reduction's HIP 87937 (Barnard's star, van Leeuwen 2007).
"""
import numpy as np
import pytest

from epochpoint.core.positions import positions
from epochpoint.core.targets import Targets
from epochpoint.io import InputError, read_targets
from epochpoint.io.csvtargets import COLUMN_READER_LINES



def body_targets(rows: dict, names) -> Targets:
    """Body rows given through the Python API (text cells in Targets.extra)."""
    extra = {k: np.array([str(v) for v in vals], dtype=object) for k, vals in rows.items()}
    return Targets.from_columns(ra=np.zeros(len(names)), dec=np.zeros(len(names)),
                                name=list(names), extra=extra)

WHEN = "2027-05-01T03:00:00Z"
ELEMENTS_HEADER = ("name,ra,dec,body,semimajor_axis,perihelion_distance,eccentricity,"
                   "inclination,ascending_node,argument_of_perihelion,mean_anomaly,orbit_epoch,"
                   "perihelion_time,abs_magnitude,slope,comet_m1,comet_k1\n")
COLUMNS = ELEMENTS_HEADER.strip().split(",")


def row(**cells) -> str:
    """One line of the elements file, empty cells where not given."""
    return ",".join(str(cells.get(c, "")) for c in COLUMNS) + "\n"


# Invented orbits: an asteroid (mean anomaly at an epoch) and a comet (perihelion time).
ASTEROID = "Rocky,,,,2.7,,0.12,9.5,80.0,73.0,120.5,2461000.5,,12.5,0.15,,\n"
COMET = "Hairy,,,,,0.9,0.995,120.0,300.0,10.0,,,2027-04-20T00:00:00,,,8.0,10.0\n"


def test_body_only_file_without_coordinate_columns(write_file):
    """The shape of the shared contract: 'name,body' and nothing else."""
    targets = read_targets(write_file("b.csv", "name,body\nRed,mars\nLuna,MOON\n"))
    assert list(targets.names()) == ["Red", "Luna"]
    got = positions(targets, None, WHEN)
    want = positions(body_targets({"body": ["mars", "moon"]}, ["Red", "Luna"]), None, WHEN)
    for column in ("ra_apparent", "dec_apparent", "distance_au", "rate_ra"):
        assert np.array_equal(got[column], want[column])


def test_stars_bodies_and_elements_in_one_file(write_file):
    text = (ELEMENTS_HEADER + row(name="Vega", ra=279.2347, dec=38.7837)
            + row(name="Giant", body="Jupiter") + ASTEROID + COMET)
    targets = read_targets(write_file("m.csv", text))
    got = positions(targets, None, WHEN)
    assert np.isnan(got["distance_au"][0]) and np.isfinite(got["distance_au"][1:]).all()
    # The comet reaches 0.9 au from the Sun; the asteroid's H, G give a finite magnitude.
    assert np.isfinite(got["magnitude"][2:]).all()


def test_column_reader_gives_the_same_rows(write_file):
    """A file long enough for the column reader (csvcolumns.py) reads like a short one."""
    stars = "".join(row(name=f"S{i}", ra=f"{(i * 0.37) % 360:.4f}", dec=(i % 170) - 85)
                    for i in range(COLUMN_READER_LINES))
    text = ELEMENTS_HEADER + stars + row(name="Red", body="mars") + ASTEROID
    long_one = read_targets(write_file("long.csv", text))
    short_one = read_targets(write_file("short.csv", ELEMENTS_HEADER + row(name="Red", body="mars")
                                        + ASTEROID))
    assert len(long_one) == COLUMN_READER_LINES + 2
    a = positions(long_one[COLUMN_READER_LINES:], None, WHEN)
    b = positions(short_one, None, WHEN)
    assert np.array_equal(a["ra_apparent"], b["ra_apparent"])
    assert np.array_equal(a["distance_au"], b["distance_au"])


@pytest.mark.parametrize("line, column, fragment", [
    (row(name="Red", body="vulcan").strip(), "body", "'vulcan' is not a body"),
    ("Rocky,,,,2.7,,0.12,9.5,80.0,73.0,abc,2461000.5,,,,,", "mean_anomaly",
     "'abc' is not a number"),
    ("Rocky,,,,2.7,,0.12,9.5,80.0,73.0,120.5,,,,,,", "orbit_epoch", "no value given"),
    ("Rocky,,,,2.7,,0.12,200,80.0,73.0,120.5,2461000.5,,,,,", "inclination", "outside"),
    ("Hairy,,,,,0.9,0.995,120.0,300.0,10.0,,,next week,,,,", "perihelion_time",
     "neither a Julian date"),
    ("Rocky,,,,2.7,,0.12,9.5,80.0,73.0,120.5,2461000.5,,bright,,,", "abs_magnitude",
     "not a number"),
])
def test_bad_cells_are_one_line_errors(write_file, line, column, fragment):
    path = write_file("bad.csv", ELEMENTS_HEADER + row(name="Vega", ra=279.2347, dec=38.7837)
                      + line + "\n")
    with pytest.raises(InputError) as info:
        read_targets(path)
    err = info.value
    assert err.line == 3 and err.column == column and fragment in str(err)
    assert err.target == line.split(",")[0] and str(path) in str(err)
    assert "\n" not in str(err)


def test_bad_body_row_skipped_with_skip_bad_rows(write_file):
    skipped = []
    targets = read_targets(write_file("s.csv", "name,body\nRed,mars\nOdd,vulcan\n"),
                           skip_bad_rows=True, on_skip=skipped.append)
    assert list(targets.names()) == ["Red"] and skipped[0].line == 3


def test_row_without_coordinates_or_body_is_still_an_error(write_file):
    with pytest.raises(InputError) as info:
        read_targets(write_file("n.csv", "name,ra,dec,body\nRed,,,mars\nLost,,,\n"))
    assert info.value.line == 3 and info.value.column == "ra" and "no ra" in str(info.value)
    with pytest.raises(InputError, match="no ra column"):
        read_targets(write_file("p.csv", "name,dec,notes\nA,1,x\n"))
    with pytest.raises(InputError, match="no ra given"):
        read_targets(write_file("q.csv", "name,body\nRed,mars\nLost,\n"))


def test_hip_names_still_read_beside_bodies(write_file):
    """HIP 87937 from the on-board Hipparcos new reduction: RA 269.45402 deg at 1991.25
    (van Leeuwen 2007; from memory)."""
    targets = read_targets(write_file("h.csv", "name,ra,dec,body\nHIP 87937,,,\nRed,,,mars\n"))
    assert abs(targets.ra[0] - 269.45402) < 1e-4


@pytest.mark.parametrize("suffix", [".ecsv", ".vot"])
def test_table_formats_read_body_rows(tmp_path, suffix):
    from astropy.table import MaskedColumn, Table

    table = Table()
    table["name"] = ["Red", "Rocky"]
    table["body"] = ["Mars", ""]
    for column, value in (("semimajor_axis", 2.7), ("eccentricity", 0.12),
                          ("inclination", 9.5), ("ascending_node", 80.0),
                          ("argument_of_perihelion", 73.0), ("mean_anomaly", 120.5),
                          ("orbit_epoch", 2461000.5)):
        table[column] = MaskedColumn([0.0, value], mask=[True, False])
    path = tmp_path / f"t{suffix}"
    table.write(path, format="ascii.ecsv" if suffix == ".ecsv" else "votable")
    targets = read_targets(path)
    got = positions(targets, None, WHEN)
    assert np.isfinite(got["distance_au"]).all()
    want = positions(body_targets({"body": ["mars"]}, ["Red"]), None, WHEN)
    assert got["ra_apparent"][0] == want["ra_apparent"][0]


def test_demo_bodies_file_reads(pytestconfig):
    """The shipped demo list of solar-system targets (invented minor bodies, a planet and
    the Moon) reads, and every row is a body."""
    demo = pytestconfig.rootpath / "sample_targets" / "loma_candil_bodies.csv"
    targets = read_targets(demo)
    assert len(targets) == 5
    got = positions(targets, None, "2027-01-20T03:00:00Z")
    assert np.isfinite(got["distance_au"]).all()
