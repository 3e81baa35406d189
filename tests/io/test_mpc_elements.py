"""Orbital elements in the Minor Planet Center's one-line layouts (io/catalogues/mpc_elements.py).

The lines below are hand-written for these tests, field by field at the columns of the MPC's
published "Export Format for Minor-Planet Orbits" and "Export Format for Comet Orbits"
(1-based, inclusive); the orbits are invented. Dates are checked against astropy's Time
(an independent calendar), the packed-date examples J9611 = 1996 Jan 1 and K01AM = 2001 Oct
22 are those of the MPC's description of packed dates (from memory).
"""
import json

import numpy as np
import pytest
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.io import InputError, read_targets
from epochpoint.io.catalogues.mpc_elements import parse_mpc_elements, unpack_epoch


def place(fields: dict, width: int = 202) -> str:
    """A line with each text starting at its 1-based column (right-aligned to `last`)."""
    line = [" "] * width
    for (first, last), text in fields.items():
        assert len(text) <= last - first + 1
        text = text.rjust(last - first + 1) if first != 167 and first != 103 else text
        line[first - 1:first - 1 + len(text)] = list(text)
    return "".join(line).rstrip()


ASTEROID = place({(1, 7): "K27X01A", (9, 13): "13.25", (15, 19): "0.15",
                  (21, 25): "K2555", (27, 35): "123.45678", (38, 46): "45.67891",
                  (49, 57): "210.98765", (60, 68): "11.23456", (71, 79): "0.1234567",
                  (81, 91): "0.21456789", (93, 103): "2.7654321",
                  (167, 194): "(99942) Invented Rock"})
COMET = place({(1, 4): "0321", (5, 5): "P", (15, 18): "2027", (20, 21): "04",
               (23, 29): "20.5000", (31, 39): "0.912345", (42, 49): "0.987654",
               (52, 59): "111.2222", (62, 69): "222.3333", (72, 79): "33.4444",
               (82, 85): "2027", (86, 87): "05", (88, 89): "12", (92, 95): "9.5",
               (97, 100): "4.0", (103, 158): "321P/Invented"})
PREAMBLE = ("MINOR PLANET CENTER ORBIT DATABASE (invented sample)\n\n"
            "Des'n     H     G   Epoch     M        Peri.      Node       Incl.       e\n"
            + "-" * 160 + "\n")


def test_layout_of_the_hand_written_lines():
    """The fields sit at the published columns (a check of the test's own lines)."""
    assert ASTEROID[20:25] == "K2555" and ASTEROID[92:103] == "  2.7654321"
    assert COMET[14:18] == "2027" and COMET[30:39] == " 0.912345"


def test_values_parsed_exactly(tmp_path):
    targets = parse_mpc_elements("e.txt", PREAMBLE + ASTEROID + "\n\n" + COMET + "\n")
    assert list(targets.names()) == ["(99942) Invented Rock", "321P/Invented"]
    x = targets.extra
    assert x["abs_magnitude"][0] == 13.25 and x["slope"][0] == 0.15
    assert x["mean_anomaly"][0] == 123.45678 and x["argument_of_perihelion"][0] == 45.67891
    assert x["ascending_node"][0] == 210.98765 and x["inclination"][0] == 11.23456
    assert x["eccentricity"][0] == 0.1234567 and x["semimajor_axis"][0] == 2.7654321
    assert x["orbit_epoch"][0] == Time("2025-05-05T00:00:00", scale="tt").jd
    assert x["perihelion_distance"][1] == 0.912345 and x["eccentricity"][1] == 0.987654
    assert x["argument_of_perihelion"][1] == 111.2222 and x["inclination"][1] == 33.4444
    assert abs(x["perihelion_time"][1] - Time("2027-04-20T12:00:00", scale="tt").jd) < 1e-9
    assert x["orbit_epoch"][1] == Time("2027-05-12T00:00:00", scale="tt").jd
    # Comets: m = H + 5 log Delta + 2.5 n log r, so K1 = 2.5 n = 10.
    assert x["comet_m1"][1] == 9.5 and x["comet_k1"][1] == 10.0
    assert np.isnan(x["mean_anomaly"][1]) and np.isnan(x["perihelion_distance"][0])


@pytest.mark.parametrize("packed, date", [("J9611", "1996-01-01"), ("K01AM", "2001-10-22"),
                                          ("K2555", "2025-05-05")])
def test_packed_epochs(packed, date):
    assert unpack_epoch("e.txt", 1, packed) == Time(date + "T00:00:00", scale="tt").jd


@pytest.mark.parametrize("line, columns, fragment", [
    (ASTEROID[:26] + "12x.45678" + ASTEROID[35:], "27-35", "mean anomaly"),
    (ASTEROID[:20] + "K25Z5" + ASTEROID[25:], "21-25", "packed epoch"),
    (COMET[:30] + "  abcdef " + COMET[39:], "31-39", "perihelion distance"),
    (ASTEROID[:70] + "1.2345678" + ASTEROID[79:], "93-103", "ellipse"),
])
def test_bad_field_is_a_one_line_error(line, columns, fragment):
    with pytest.raises(InputError) as info:
        parse_mpc_elements("e.txt", PREAMBLE + ASTEROID + "\n" + line + "\n")
    err = info.value
    assert err.line == 6 and err.column == columns and fragment in str(err)
    assert str(err).startswith("e.txt, line 6") and "\n" not in str(err)


def test_read_targets_detects_elements_by_content(tmp_path):
    path = tmp_path / "orbits.dat"
    path.write_text(PREAMBLE + ASTEROID + "\n" + COMET + "\n")
    targets = read_targets(path)
    assert len(targets) == 2 and targets.extra["semimajor_axis"][0] == 2.7654321
    with pytest.raises(InputError, match="line 1"):
        parse_mpc_elements("x.txt", "this is not an elements line\n")


def test_elements_option_adds_bodies_to_positions(tmp_path, capsys):
    stars = tmp_path / "stars.csv"
    stars.write_text("name,ra,dec,priority\nVega,279.2347,38.7837,2\n")
    orbits = tmp_path / "orbits.txt"
    orbits.write_text(ASTEROID + "\n" + COMET + "\n")
    code = main(["positions", str(stars), "--elements", str(orbits),
                 "--site=-30.5,-70.7,2200", "--at", "2027-05-01T03:00:00Z", "--format", "json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    rows = json.loads(out)
    assert [r["name"] for r in rows] == ["Vega", "(99942) Invented Rock", "321P/Invented"]
    assert rows[0]["distance_au"] is None
    assert all(r["distance_au"] > 0 and r["rate_ra"] is not None for r in rows[1:])


BAD_LINES = [(ASTEROID[:26] + "12x.45678" + ASTEROID[35:], "27-35", "mean anomaly"),
             (ASTEROID[:70] + "1.2345678" + ASTEROID[79:], "93-103", "ellipse")]


def test_skip_bad_rows_reports_each_bad_line_and_keeps_the_others(tmp_path):
    """With skip_bad_rows a bad field and an orbit no engine rule allows are each reported
    (file, line, columns) and left out; the good lines are read as without them."""
    text = (PREAMBLE + BAD_LINES[0][0] + "\n" + ASTEROID + "\n" + BAD_LINES[1][0] + "\n"
            + COMET + "\n")
    skipped = []
    targets = parse_mpc_elements("e.txt", text, skip_bad_rows=True, on_skip=skipped.append)
    assert list(targets.names()) == ["(99942) Invented Rock", "321P/Invented"]
    alone = parse_mpc_elements("e.txt", ASTEROID + "\n" + COMET + "\n")
    for column in alone.extra:
        np.testing.assert_array_equal(targets.extra[column], alone.extra[column])
    assert [(e.line, e.column) for e in skipped] == [(5, "27-35"), (7, "93-103")]
    for err, (_, _, fragment) in zip(skipped, BAD_LINES):
        assert fragment in str(err) and str(err).startswith(f"e.txt, line {err.line}")
    # Without the option the first bad line stops the reading, as before.
    with pytest.raises(InputError) as info:
        parse_mpc_elements("e.txt", text)
    assert info.value.line == 5
    # read_targets passes the option on for an elements file.
    path = tmp_path / "orbits.dat"
    path.write_text(text)
    skipped.clear()
    assert len(read_targets(path, skip_bad_rows=True, on_skip=skipped.append)) == 2
    assert len(skipped) == 2
    # Every line bad: nothing usable is still an error.
    with pytest.raises(InputError, match="all 2 lines have errors"):
        parse_mpc_elements("e.txt", BAD_LINES[0][0] + "\n" + BAD_LINES[1][0] + "\n",
                           skip_bad_rows=True, on_skip=skipped.append)


def test_skip_bad_rows_applies_to_elements_files_on_the_command_line(tmp_path, capsys):
    stars = tmp_path / "stars.csv"
    stars.write_text("name,ra,dec,priority\nVega,279.2347,38.7837,2\n")
    orbits = tmp_path / "orbits.txt"
    orbits.write_text(ASTEROID + "\n" + BAD_LINES[0][0] + "\n" + COMET + "\n")
    argv = ["positions", str(stars), "--elements", str(orbits), "--site=-30.5,-70.7,2200",
            "--at", "2027-05-01T03:00:00Z", "--format", "json"]
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2 and out == ""
    assert err.strip() == err.strip().splitlines()[0]  # one line
    assert f"{orbits}, line 2" in err and "27-35" in err and "mean anomaly" in err
    code = main(argv + ["--skip-bad-rows"])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert [r["name"] for r in json.loads(out)] == ["Vega", "(99942) Invented Rock",
                                                   "321P/Invented"]
    skipped = [line for line in err.splitlines() if line.startswith("epochpoint: skipped:")]
    assert len(skipped) == 1 and f"{orbits}, line 2" in skipped[0] and "27-35" in skipped[0]
