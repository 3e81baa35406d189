"""The column reader of CSV target files (io/csvcolumns.py) against the row reader.

Reference: the row reader in io/csvtargets.py (the standard library's csv module over each
line, then one cell at a time), whose messages tests/io/test_csv_targets.py pins. For files
drawn from a seeded generator over the odd cases people's files have (sexagesimal angles,
'J2016.0', NaN and infinity spellings, Unicode digits and spaces, quoted cells, comment and
blank lines anywhere, CR LF, a byte-order mark, trailing commas, short rows, bad values),
both readers must give the same targets bit for bit, or the same one-line error, and the same
skipped-row reports and warnings with --skip-bad-rows. Numbers are also checked against
Python's float() of the text written (the language's round-trip guarantee for repr).
"""
import random
import warnings

import numpy as np
import pytest

from epochpoint.io import InputError, read_targets
from epochpoint.io import csvtargets
from epochpoint.io.csvcolumns import CsvLines
from epochpoint.io.targetrows import build_targets

SEED = 20270120
N_FILES = 160

PLAIN = ["12.5", "0.25", "1e-3", "+1", ".5", "5.", "-0", "3", "2.5E1", " 7.25 ", "\t8"]
ODD = ["", "nan", "NaN", "inf", "-Infinity", "nan(1)", "1_0", "\u0661", "\u00a01.5\u3000",
       "abc", "1e999", "0x10", "1,5"]
RA_ODD = ["12:30:00", "23 59 59.9", "24:00:00", "400", "360", "-1", "12:61:00"]
DEC_ODD = ["-00:30:00", "+07 24 25.4", "91", "-90", "+45:00:60"]
EPOCH_ODD = ["J2016.0", "B1950.0", "2.016e3", "9999", "J", ""]
NAMES = ["Vega", "NGC 224", '"M 31, Andromeda"', '"say ""hi"""', "\u00c9ta Car", "# hash",
         '"# quoted hash"', "", " spaced ", "x\u2028y"]


def _number(rng: random.Random) -> str:
    return repr(rng.uniform(-1e3, 1e3)) if rng.random() < 0.7 else rng.choice(PLAIN)


def _cell(rng: random.Random, column: str, odd: float) -> str:
    if column == "name":
        return rng.choice(NAMES) if rng.random() < 0.5 else f"S{rng.randrange(10**6)}"
    if column == "ra":
        good = repr(rng.uniform(0.0, 359.9))
        return rng.choice(RA_ODD + ODD) if rng.random() < odd else good
    if column == "dec":
        good = repr(rng.uniform(-89.9, 89.9))
        return rng.choice(DEC_ODD + ODD) if rng.random() < odd else good
    if column == "epoch":
        return rng.choice(EPOCH_ODD + ODD) if rng.random() < odd else rng.choice(
            ["2016.0", "2000", "1991.25"])
    if column.endswith("_error"):
        return rng.choice(ODD + ["-1"]) if rng.random() < odd else repr(rng.uniform(0, 5))
    if column == "priority":
        return rng.choice(["1", "2", "high", ""])
    return rng.choice(ODD) if rng.random() < odd else _number(rng)


def _invented_file(rng: random.Random) -> bytes:
    """One CSV target file with a few of the odd features, chosen by rng."""
    columns = ["name", "ra", "dec"] + rng.sample(
        ["epoch", "pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity", "ra_error",
         "priority"], rng.randrange(0, 7))
    if "pm_ra_cosdec" in columns and "epoch" not in columns:
        columns.append("epoch")
    rng.shuffle(columns)
    odd = rng.choice([0.0, 0.0, 0.0, 0.002, 0.02, 0.2])
    header = ",".join(c.upper() if rng.random() < 0.1 else c for c in columns)
    trailing = "," if rng.random() < 0.1 else ""
    lines = ["# invented targets"] * rng.randrange(0, 3)
    if rng.random() < 0.2:
        lines.append("# catalogue_epoch: 2016.0")
    lines.append(header + trailing)
    for _ in range(rng.randrange(1, 60)):
        roll = rng.random()
        if roll < 0.03:
            lines.append(rng.choice(["", "   ", "# note", "  # indented", "\u00a0# nbsp"]))
            continue
        cells = [_cell(rng, c, odd) for c in columns]
        if rng.random() < 0.02 * (odd > 0):
            cells = cells[:-1]  # a short row
        lines.append(",".join(cells) + trailing)
    text = "\n".join(lines) + ("\n" if rng.random() < 0.8 else "")
    if rng.random() < 0.1:
        text = text.replace("\n", "\r\n")
    data = text.encode("utf-8")
    return (b"\xef\xbb\xbf" + data) if rng.random() < 0.1 else data


def _outcome(reader, path, data, skip: bool):
    """What building targets from reader's RawTable gives: values or the error, reports,
    warnings."""
    skipped = []
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            targets = build_targets(reader(path, data), skip_bad_rows=skip,
                                    on_skip=lambda err: skipped.append(str(err)))
        except InputError as err:
            return ("error", str(err), skipped)
    got = {c: np.asarray(getattr(targets, c)).view(np.uint64).tolist()
           for c in ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax",
                     "radial_velocity")}
    got.update({c: v.view(np.uint64).tolist() for c, v in targets.errors.items()})
    got.update({k: list(v) for k, v in targets.extra.items()})
    return ("ok", got, list(targets.names()), skipped, [str(w.message) for w in caught])


def test_column_reader_equals_row_reader_on_odd_files(monkeypatch):
    # These files are short: let the column reader take them, as it takes long files.
    monkeypatch.setattr(csvtargets, "COLUMN_READER_LINES", 0)
    rng = random.Random(SEED)
    by_columns = 0
    for index in range(N_FILES):
        data = _invented_file(rng)
        path = f"invented_{index}.csv"
        lines = CsvLines.scan(data)
        if lines is not None:
            try:
                by_columns += csvtargets._read_by_columns(path, lines) is not None
            except InputError:
                by_columns += 1
        for skip in (False, True):
            expected = _outcome(csvtargets._read_by_rows, path, data, skip)
            assert _outcome(csvtargets.read_csv_targets, path, data, skip) == expected, \
                (index, skip, data[:300])
    # The comparison means something only if most files went the column way.
    assert by_columns > N_FILES // 2


def test_a_plain_file_is_read_without_the_row_loop(write_file, monkeypatch):
    """A file of plain numbers never goes through the per-row csv loop, and every number is
    float() of its text, bit for bit (repr round trip: Python language reference)."""
    rng = np.random.default_rng(SEED)
    n = 5000
    ra, dec = rng.uniform(0, 360, n), rng.uniform(-90, 90, n)
    pm = rng.normal(0, 100, n)
    text = "name,ra,dec,epoch,pm_ra_cosdec,pm_dec\n" + "".join(
        f"S{i},{ra_i!r},{dec_i!r},2016.0,{pm_i!r},0\n"
        for i, (ra_i, dec_i, pm_i) in enumerate(zip(ra.tolist(), dec.tolist(), pm.tolist())))
    path = write_file("plain.csv", text)

    def no_rows(*args):
        raise AssertionError("the per-row reader was used")

    monkeypatch.setattr(csvtargets, "_rows", no_rows)
    targets = read_targets(path)
    assert np.array_equal(targets.ra.view(np.uint64), ra.view(np.uint64))
    assert np.array_equal(targets.dec.view(np.uint64), dec.view(np.uint64))
    assert np.array_equal(targets.pm_ra_cosdec.view(np.uint64), pm.view(np.uint64))
    assert list(targets.names()[:2]) == ["S0", "S1"]


@pytest.mark.parametrize("cell, message", [
    ("400", "'400' is outside [0, 360) degrees"),
    ("1e999", "'1e999' is not a finite number"),
    ("12:30:00x", "'12:30:00x' is not an angle (degrees or hh:mm:ss)"),
])
def test_messages_quote_the_cell_as_written(write_file, cell, message):
    rows = "".join(f"S{i},{i}.5,-{i % 80}.25\n" for i in range(1, 200))
    path = write_file("t.csv", "# c\nname,ra,dec\n" + rows + f"Bad,{cell},1\n")
    with pytest.raises(InputError) as err:
        read_targets(path)
    assert str(err.value) == f"{path}, line 202 (Bad), column ra: {message}"
