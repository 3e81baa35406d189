"""Result tables to CSV, JSON, ECSV, VOTable and aligned text."""
import csv
import io
import json

import numpy as np
import pytest
from astropy.io.votable import parse
from astropy.table import Table

from epochpoint.io import (InputError, format_dec_dms, format_people_table, format_ra_hms,
                           write_result)

META = {"time": "2027-01-20T23:10:00Z", "site": "Cerro Ficticio", "targets": np.int64(2)}
UNITS = {"alt": "deg", "airmass": ""}


def _columns():
    return {"name": np.array(["Alpha", "B & <c>"], dtype=object),
            "alt": np.array([45.5, np.nan]),
            "airmass": np.array([1.4, np.nan]),
            "visible": np.array([True, False]),
            "rank": np.array([1, 2])}


def test_json_is_a_plain_list_of_objects_with_null():
    text = write_result(_columns(), META, None, "json")
    rows = json.loads(text)
    assert rows == [{"name": "Alpha", "alt": 45.5, "airmass": 1.4, "visible": True, "rank": 1},
                    {"name": "B & <c>", "alt": None, "airmass": None, "visible": False,
                     "rank": 2}]
    assert "NaN" not in text
    # Plain JSON types only (RFC 8259): ints stay ints, floats are floats.
    assert type(rows[0]["rank"]) is int and type(rows[0]["alt"]) is float


def test_json_of_no_rows():
    assert json.loads(write_result({"alt": np.array([])}, {}, None, "json")) == []


def test_csv_has_meta_comments_header_and_empty_cells():
    text = write_result(_columns(), META, None, "csv")
    lines = text.splitlines()
    assert lines[:3] == ["# time: 2027-01-20T23:10:00Z", "# site: Cerro Ficticio",
                         "# targets: 2"]
    rows = list(csv.reader(lines[3:]))
    assert rows[0] == ["name", "alt", "airmass", "visible", "rank"]
    assert rows[1] == ["Alpha", "45.5", "1.4", "true", "1"]
    assert rows[2] == ["B & <c>", "", "", "false", "2"]


def test_csv_floats_round_trip_exactly():
    value = 0.1 + 0.2  # 0.30000000000000004: needs 17 significant digits
    text = write_result({"x": np.array([value])}, {}, None, "csv")
    assert float(text.splitlines()[1]) == value


@pytest.mark.parametrize("fmt, read_format", [("ecsv", "ascii.ecsv"), ("votable", "votable")])
def test_astropy_formats_carry_units_meta_and_nulls(tmp_path, fmt, read_format):
    path = tmp_path / ("result." + ("ecsv" if fmt == "ecsv" else "vot"))
    assert write_result(_columns(), META, path, fmt, units=UNITS) is None
    table = Table.read(path, format=read_format)
    assert str(table["alt"].unit) == "deg"
    assert table["alt"][0] == 45.5 and np.ma.is_masked(table["alt"][1])
    assert list(table["name"]) == ["Alpha", "B & <c>"]
    assert list(table["rank"]) == [1, 2]
    if fmt == "ecsv":
        assert table.meta["time"] == "2027-01-20T23:10:00Z" and table.meta["targets"] == 2


def test_votable_meta_as_info_elements():
    text = write_result(_columns(), META, None, "votable", units=UNITS)
    votable = parse(io.BytesIO(text.encode("utf-8")))
    infos = {info.name: info.value for info in votable.resources[0].infos}
    assert infos["site"] == "Cerro Ficticio" and infos["targets"] == "2"


def test_people_table_is_aligned_with_formatters():
    columns = {"name": np.array(["Alpha", "Be"], dtype=object),
               "ra": np.array([187.5, 15.0]), "dec": np.array([-0.5, 45.26]),
               "airmass": np.array([1.23456789, np.nan])}
    text = format_people_table(columns, {"ra": format_ra_hms, "dec": format_dec_dms},
                               {"time": "2027-01-20T23:10:00Z"}, units={"airmass": ""})
    lines = text.splitlines()
    assert lines[0] == "time: 2027-01-20T23:10:00Z" and lines[1] == ""
    assert lines[2].split() == ["name", "ra", "dec", "airmass"]
    assert set(lines[3]) <= {"-", " "}
    assert lines[4].split() == ["Alpha", "12:30:00.00", "-00:30:00.0", "1.23457"]
    assert lines[5].split() == ["Be", "01:00:00.00", "+45:15:36.0"]
    # Every row is as wide as the rule (numbers right-aligned, the last cell blank for NaN).
    assert len(lines[4]) == len(lines[3])
    assert write_result(columns, {}, None, "table",
                        formatters={"ra": format_ra_hms}).splitlines()[2].split()[1] == \
        "12:30:00.00"


def test_write_result_to_file_is_atomic_and_returns_none(tmp_path):
    path = tmp_path / "out.json"
    path.write_text("old")
    assert write_result(_columns(), META, path, "json") is None
    assert json.loads(path.read_text())[0]["name"] == "Alpha"
    assert [p.name for p in tmp_path.iterdir()] == ["out.json"]


def test_unknown_format_and_unwritable_path(tmp_path):
    with pytest.raises(InputError, match="unknown result format"):
        write_result(_columns(), META, None, "yaml")
    with pytest.raises(InputError, match="cannot be written"):
        write_result(_columns(), META, tmp_path / "no" / "such" / "dir.csv", "csv")
