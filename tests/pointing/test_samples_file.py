"""The samples file's pier_side column and the one-sample append.

References: the file format of io/pointing_samples.py (our own: CSV, RFC 4180 quoting as
Python's csv module writes it); expected values are written out by hand.
"""
import csv

import pytest

from epochpoint.io import InputError
from epochpoint.io.pointing_samples import append_sample, read_samples, write_samples

HEADER = "time,name,ha_target,dec_target,ha_mount,dec_mount"


def _sample(name, side=None, **extra):
    row = {"time": "2026-03-20T03:00:00Z", "name": name, "ha_target": -20.5,
           "dec_target": 30.25, "ha_mount": -20.49, "dec_mount": 30.26, **extra}
    if side is not None:
        row["pier_side"] = side
    return row


def test_pier_side_read_in_any_case_and_empty_for_a_fork(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text(HEADER + ",Pier_Side\n"
                    "t,A,-20,30,-20.01,30.01,East\n"
                    "t,B,20,30,20.01,30.01, west \n"
                    "t,C,5,30,5.01,30.01,\n")
    columns = read_samples(path)
    assert list(columns["pier_side"]) == ["east", "west", ""]
    with pytest.raises(InputError) as err:
        read_samples(path, "german")
    assert str(err.value) == (f"{path}, line 4, column pier_side: no pier side given (east or "
                              f"west; a German mount's samples need it)")


def test_a_bad_pier_side_is_one_line_naming_file_line_and_column(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text("# recorded by hand\n" + HEADER + ",pier_side\n"
                    "t,A,-20,30,-20.01,30.01,east\n"
                    "t,B,20,30,20.01,30.01,up\n")
    with pytest.raises(InputError) as err:
        read_samples(path)
    message = str(err.value)
    assert "\n" not in message and "s.csv" in message and "line 4" in message
    assert "column pier_side" in message and "'up' is not a pier side (east or west)" in message


def test_a_german_file_needs_the_column(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text(HEADER + "\nt,A,-20,30,-20.01,30.01\n")
    assert list(read_samples(path)["pier_side"]) == [""]
    with pytest.raises(InputError, match="line 1: has no pier_side column"):
        read_samples(path, "german")


def test_append_adds_the_column_and_keeps_everything_else(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text("# night of 2026-03-19, \"first\" run\n" + HEADER + ",seeing\n"
                    "t,\"Star, one\",-20,30,-20.01,30.01,1.5\n"
                    "t,B,20,30,20.01,30.01\n")
    append_sample(path, _sample("HIP 87937", "West", alt_target=51.5, az_target=101.25,
                                alt_mount=51.51, az_mount=101.26))
    text = path.read_text()
    assert text.startswith("# night of 2026-03-19, \"first\" run\n")
    rows = [r for r in csv.reader(text.splitlines()[1:])]
    assert rows[0] == HEADER.split(",") + ["seeing", "pier_side", "alt_target", "az_target",
                                           "alt_mount", "az_mount"]
    assert rows[1] == ["t", "Star, one", "-20", "30", "-20.01", "30.01", "1.5", "", "", "",
                       "", ""]
    assert rows[2][6:] == ["", "", "", "", "", ""]
    assert rows[3][:2] == ["2026-03-20T03:00:00Z", "HIP 87937"]
    assert rows[3][6:] == ["", "west", "51.5", "101.25", "51.51", "101.26"]
    columns = read_samples(path)
    assert list(columns["pier_side"]) == ["", "", "west"]
    assert columns["dec_mount"][2] == 30.26
    # A second sample: the columns are there now, nothing else changes.
    before = path.read_text()
    append_sample(path, _sample("C", "east"))
    after = path.read_text()
    assert after.startswith(before)
    assert after[len(before):].rstrip("\n").split(",")[-6:] == ["", "east", "", "", "", ""]


def test_append_refuses_a_bad_side_and_leaves_the_file(tmp_path):
    path = tmp_path / "s.csv"
    write_samples(path, [_sample("A")])
    before = path.read_bytes()
    with pytest.raises(ValueError, match="not a pier side"):
        append_sample(path, _sample("B", "north"))
    assert path.read_bytes() == before


def test_a_new_file_holds_the_optional_columns_the_sample_has(tmp_path):
    path = tmp_path / "new.csv"
    append_sample(path, _sample("A", "east"))
    assert path.read_text().splitlines()[0] == HEADER + ",pier_side"
    append_sample(path, _sample("B"))
    assert list(read_samples(path)["pier_side"]) == ["east", ""]
    plain = tmp_path / "plain.csv"
    write_samples(plain, [_sample("A"), _sample("B")])
    assert plain.read_text().splitlines()[0] == HEADER
