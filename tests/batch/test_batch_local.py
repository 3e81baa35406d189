"""`epochpoint batch` in one process (local threads): each partition's answer equals the core's
single-process answer bit for bit (the reference is core.positions / core.drift on the whole
catalogue at once, built straight from the arrays; the core itself is checked against
astropy and ERFA in tests/core), bad rows are flagged and never stop the batch, and the input
may be a file, a folder or a glob with Gaia archive names or our own."""
from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from epochpoint.cli.main import main
from epochpoint.core.drift import drift
from epochpoint.core.positions import positions
from epochpoint.io import read_site

from .catalogue import (SITE_SPEC, WHEN, arrow_table, assert_same_columns, engine_of,
                        expected_targets, gaia_columns, write_files)

N_ROWS = 300_000


def run_cli(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def big_catalogue(tmp_path_factory):
    """300,000 invented stars in three files whose row groups do not line up with the
    partitions (one row group larger than a partition, so it is cut)."""
    cols = gaia_columns(N_ROWS)
    folder = tmp_path_factory.mktemp("catalogue") / "extract"
    write_files(cols, folder, [90_000, 150_000, 60_000], row_group_size=40_000)
    pq.write_table(arrow_table({k: v[240_000:] for k, v in cols.items()}),
                   folder / "extract-02.parquet", row_group_size=60_000)
    return cols, folder


def test_local_batch_equals_core_positions_bit_for_bit(big_catalogue, tmp_path, capsys):
    cols, folder = big_catalogue
    out = tmp_path / "positions_out"
    code, stdout, err = run_cli(capsys, "batch", "positions", folder, "--at", WHEN,
                                f"--site={SITE_SPEC}", "--output", out,
                                "--partition-rows", 50_000)
    assert code == 0, err
    assert "300000 rows in 8 partition(s)" in err and "no row with a problem" in err, err
    got = pq.read_table(out)
    assert got.column_names[0] == "source_id"
    assert got["source_id"].to_pylist() == cols["source_id"].tolist()  # input order kept
    assert set(got["problem"].to_pylist()) == {""}
    # The single-process answer: the whole catalogue in one call, its engine chosen as usual.
    expected = positions(expected_targets(cols), read_site(SITE_SPEC), WHEN)
    names = [c for c in expected if c != "name"]
    assert got.column_names == ["source_id"] + names + ["problem"]
    assert_same_columns({c: got[c].to_numpy() for c in names}, expected, names)


def test_glob_input_and_chosen_columns(big_catalogue, tmp_path, capsys):
    """A glob picks two of the three files; --columns keeps some results and carries an input
    column along (the reference: core positions on those rows, without a site)."""
    cols, folder = big_catalogue
    out = tmp_path / "glob_out"
    code, _, err = run_cli(capsys, "batch", "positions", folder / "extract-0[02].parquet",
                           "--at", WHEN, "--output", out,
                           "--columns", "ra_apparent,dec_apparent,ref_epoch")
    assert code == 0, err
    got = pq.read_table(out)
    assert got.column_names == ["source_id", "ref_epoch", "ra_apparent", "dec_apparent",
                                "problem"]
    rows = np.r_[0:90_000, 240_000:300_000]
    expected = positions(expected_targets(cols, rows), None, WHEN)
    assert_same_columns({c: got[c].to_numpy() for c in got.column_names[1:4]},
                        {"ref_epoch": cols["ref_epoch"][rows], **expected},
                        ["ref_epoch", "ra_apparent", "dec_apparent"])


def test_bad_rows_are_flagged_not_fatal(tmp_path, capsys):
    """Rows the target-file rules refuse get null results and a `problem`; the others are
    computed as the core computes them without the bad rows; one summary line counts them."""
    cols = gaia_columns(2_000, seed=7)
    table = arrow_table(cols)
    bad = {3: ("ra", float("nan")), 10: ("dec", 95.0), 11: ("parallax", float("inf")),
           500: ("ref_epoch", None), 1999: ("pmra", float("nan"))}
    columns = {name: table[name].to_pylist() for name in table.column_names}
    for row, (name, value) in bad.items():
        columns[name][row] = value
    # Written without NaN-to-null conversion: a NaN cell is a NaN, a None cell is null.
    pq.write_table(pa.table({k: pa.array(v, type=table[k].type) for k, v in columns.items()}),
                   tmp_path / "bad.parquet")
    out = tmp_path / "bad_out"
    code, _, err = run_cli(capsys, "batch", "positions", tmp_path / "bad.parquet",
                           "--at", WHEN, f"--site={SITE_SPEC}", "--output", out,
                           "--partition-rows", 700)
    assert code == 0, err
    assert "5 row(s) with a problem" in err
    assert f"first: source_id {cols['source_id'][3]}: column ra: " in err
    assert len(err.strip().splitlines()) <= 2  # the summary (and an Earth-orientation word)
    got = pq.read_table(out)
    problems = got["problem"].to_pylist()
    flagged = {i: p for i, p in enumerate(problems) if p}
    assert sorted(flagged) == sorted(bad)
    for row, (name, _) in bad.items():
        assert f"column {name}:" in flagged[row]
    assert "epoch" in flagged[500] and "not a finite number" in flagged[11]
    assert all(got["alt"][row].as_py() is None for row in bad)
    good = np.setdiff1d(np.arange(2_000), list(bad))
    expected = positions(expected_targets(cols, good), read_site(SITE_SPEC), WHEN,
                         engine=engine_of(got))
    names = [c for c in expected if c != "name"]
    assert_same_columns({c: got[c].to_numpy(zero_copy_only=False)[good] for c in names},
                        expected, names)


def test_drift_with_gaia_errors_equals_core_drift(tmp_path, capsys):
    """batch drift --all on a file with Gaia error columns: every column as core.drift gives it
    (ellipse and crossing uncertainty included); without --all only rows over the tolerance."""
    cols = gaia_columns(20_000, seed=11, errors=True)
    write_files(cols, tmp_path / "in", [20_000], row_group_size=8_000)
    out = tmp_path / "drift_out"
    code, _, err = run_cli(capsys, "batch", "drift", tmp_path / "in", "--at", WHEN,
                           "--tolerance", "0.5", "--all", "--output", out,
                           "--partition-rows", 6_000)
    assert code == 0, err
    got = pq.read_table(out)
    expected = drift(expected_targets(cols), WHEN, 0.5)
    names = [c for c in expected if c != "name"]
    assert "error_major" in names and "crossing_sigma_days" in names
    assert got.column_names == ["source_id"] + names + ["problem"]
    assert_same_columns({c: got[c].to_numpy(zero_copy_only=False) for c in names}, expected,
                        names)

    code, _, err = run_cli(capsys, "batch", "drift", tmp_path / "in", "--at", WHEN,
                           "--tolerance", "0.5", "--output", out)
    assert code == 0, err
    over = pq.read_table(out)
    assert over["source_id"].to_pylist() == cols["source_id"][expected["over_tolerance"]].tolist()


def test_gaia_and_our_names_agree_and_match_astropy(tmp_path, capsys):
    """The same stars with our column names give the same answer; a few propagated places
    agree with astropy's SkyCoord.apply_space_motion to 1 mas (outside reference)."""
    import astropy.units as u
    from astropy.coordinates import SkyCoord
    from astropy.time import Time

    cols = gaia_columns(1_000, seed=3)
    ours = {"name": cols["source_id"].astype(str), "ra": cols["ra"], "dec": cols["dec"],
            "pm_ra_cosdec": cols["pmra"], "pm_dec": cols["pmdec"], "parallax": cols["parallax"],
            "radial_velocity": cols["radial_velocity"], "epoch": cols["ref_epoch"]}
    pq.write_table(arrow_table(cols), tmp_path / "gaia.parquet")
    pq.write_table(arrow_table(ours), tmp_path / "ours.parquet")
    for stem in ("gaia", "ours"):
        code, _, err = run_cli(capsys, "batch", "positions", tmp_path / f"{stem}.parquet",
                               "--at", WHEN, "--output", tmp_path / f"{stem}_out")
        assert code == 0, err
    gaia, mine = pq.read_table(tmp_path / "gaia_out"), pq.read_table(tmp_path / "ours_out")
    assert mine.column_names[0] == "name"
    assert mine["name"].to_pylist() == [str(s) for s in gaia["source_id"].to_pylist()]
    assert mine.drop(["name"]).equals(gaia.drop(["source_id"]).replace_schema_metadata(
        mine.schema.metadata))

    plain = np.flatnonzero(np.isfinite(cols["pmra"]) & (cols["parallax"] > 0.0))[:20]
    stars = SkyCoord(ra=cols["ra"][plain] * u.deg, dec=cols["dec"][plain] * u.deg,
                     pm_ra_cosdec=cols["pmra"][plain] * u.mas / u.yr,
                     pm_dec=cols["pmdec"][plain] * u.mas / u.yr,
                     distance=(cols["parallax"][plain] * u.mas).to(u.pc, u.parallax()),
                     radial_velocity=cols["radial_velocity"][plain] * u.km / u.s,
                     obstime=Time(2016.0, format="jyear", scale="tdb"))
    moved = stars.apply_space_motion(new_obstime=Time(WHEN.rstrip("Z"), scale="utc"))
    ours_moved = SkyCoord(ra=gaia["ra_propagated"].to_numpy()[plain] * u.deg,
                          dec=gaia["dec_propagated"].to_numpy()[plain] * u.deg)
    assert np.max(ours_moved.separation(moved).to_value(u.mas)) < 1.0


def test_bad_input_is_one_line_exit_2(tmp_path, capsys):
    pq.write_table(arrow_table(gaia_columns(10)), tmp_path / "c.parquet")
    (tmp_path / "keep").mkdir()
    (tmp_path / "keep" / "notes.txt").write_text("mine")
    (tmp_path / "not_parquet.parquet").write_text("hello")
    cases = [
        (["batch", "positions", tmp_path / "missing", "--at", WHEN, "--output",
          tmp_path / "o"], "does not exist"),
        (["batch", "positions", tmp_path / "not_parquet.parquet", "--at", WHEN, "--output",
          tmp_path / "o"], "not a readable Parquet file"),
        (["batch", "positions", tmp_path / "c.parquet", "--at", WHEN, "--output",
          tmp_path / "keep"], "holding other files"),
        (["batch", "positions", tmp_path / "c.parquet", "--at", WHEN, "--output",
          tmp_path / "o", "--columns", "alt"], "'alt' is neither a result column"),
        (["batch", "drift", tmp_path / "c.parquet", "--at", WHEN, "--output",
          tmp_path / "o", "--tolerance", "-1"], "--tolerance"),
    ]
    for argv, words in cases:
        code, _, err = run_cli(capsys, *argv)
        assert code == 2 and words in err and "Traceback" not in err, err
        assert len([line for line in err.splitlines() if "error" in line]) == 1, err
    assert (tmp_path / "keep" / "notes.txt").read_text() == "mine"
    assert not (tmp_path / "o").exists()
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".partial")]
