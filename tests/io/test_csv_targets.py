"""Reading target lists from CSV: columns, defaults, Gaia names and one-line errors."""
import warnings

import numpy as np
import pytest

from epochpoint.io import InputError, SkippedRowWarning, read_targets

CONTRACT_BAD_FILE = "name,ra,dec,epoch\nGood,10,10,2000.0\nBroken,not-a-number,95,2000.0\n"


def test_bad_row_names_file_line_target_and_column(write_file):
    path = write_file("targets.csv", CONTRACT_BAD_FILE)
    with pytest.raises(InputError) as info:
        read_targets(path)
    err = info.value
    assert (err.line, err.target, err.column) == (3, "Broken", "ra")
    text = str(err)
    assert "\n" not in text
    assert text.startswith(str(path))
    assert "line 3 (Broken), column ra: 'not-a-number'" in text


def test_skip_bad_rows_reports_through_callback(write_file):
    path = write_file("targets.csv", CONTRACT_BAD_FILE)
    skipped = []
    targets = read_targets(path, skip_bad_rows=True, on_skip=skipped.append)
    assert list(targets.names()) == ["Good"]
    assert len(skipped) == 1 and isinstance(skipped[0], InputError)
    assert skipped[0].line == 3 and skipped[0].target == "Broken"


def test_skip_bad_rows_default_is_a_one_line_warning(write_file):
    path = write_file("targets.csv", CONTRACT_BAD_FILE)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        targets = read_targets(path, skip_bad_rows=True)
    assert len(targets) == 1
    messages = [w for w in caught if issubclass(w.category, SkippedRowWarning)]
    assert len(messages) == 1 and "line 3 (Broken)" in str(messages[0].message)


def test_all_rows_bad_with_skip_is_input_error(write_file):
    path = write_file("t.csv", "ra,dec\nx,1\ny,2\n")
    with pytest.raises(InputError, match="no usable targets"):
        read_targets(path, skip_bad_rows=True, on_skip=lambda e: None)


def test_comments_blank_lines_case_and_spaces(write_file):
    path = write_file("t.csv", "# Demo list\n#  more notes\n\n Name , RA ,DEC,Epoch\n"
                               "\n  Alpha , 12:30:00 , -00:30:00 , J2016.0\n# mid comment\n"
                               "Beta,187.5,+45:15:36,B1950.0\n   \n")
    targets = read_targets(path)
    assert list(targets.names()) == ["Alpha", "Beta"]
    np.testing.assert_allclose(targets.ra, [187.5, 187.5])        # 12.5 h x 15
    np.testing.assert_allclose(targets.dec, [-0.5, 45.26])
    assert targets.epoch[0] == 2016.0
    assert targets.epoch[1] == pytest.approx(1949.99979, abs=1e-5)  # B1950.0 (Lieske 1979)


def test_line_numbers_count_comment_lines(write_file):
    path = write_file("t.csv", "# comment\nname,ra,dec\n# another\n\nA,10,10\nB,10,-91\n")
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert info.value.line == 6 and info.value.column == "dec" and info.value.target == "B"


def test_defaults_for_missing_columns_and_empty_cells(write_file):
    # A row without proper motion needs no epoch (its place is the same at every epoch).
    path = write_file("t.csv", "ra,dec,epoch,pm_dec,parallax,radial_velocity\n10,20,,,,\n"
                               "30,40,2000.0,5,2,-3\n")
    targets = read_targets(path)
    assert list(targets.names()) == ["T1", "T2"]
    np.testing.assert_array_equal(targets.epoch, [2000.0, 2000.0])
    np.testing.assert_array_equal(targets.pm_ra_cosdec, [0.0, 0.0])
    np.testing.assert_array_equal(targets.pm_dec, [0.0, 5.0])
    np.testing.assert_array_equal(targets.parallax, [0.0, 2.0])
    np.testing.assert_array_equal(targets.radial_velocity, [0.0, -3.0])
    assert targets.errors == {} and targets.extra == {}


def test_extra_columns_kept_as_strings(write_file):
    path = write_file("t.csv", 'name,ra,dec,Priority,exposure,notes\n'
                               'A,10,20,1,120,"windy, check focus"\nB,11,21,,60,\n')
    targets = read_targets(path)
    assert list(targets.extra) == ["Priority", "exposure", "notes"]
    assert list(targets.extra["Priority"]) == ["1", ""]
    assert list(targets.extra["notes"]) == ["windy, check focus", ""]


def test_errors_and_correlations_our_names(write_file):
    path = write_file("t.csv", "name,ra,dec,ra_error,pm_ra_cosdec_error,ra_dec_corr\n"
                               "A,10,20,0.5,0.1,-0.3\nB,11,21,,,\n")
    targets = read_targets(path)
    assert targets.errors["ra_error"][0] == 0.5
    assert np.isnan(targets.errors["ra_error"][1])  # empty error cell: unknown
    assert targets.errors["ra_dec_corr"][0] == -0.3


GAIA_HEADER = ("source_id,ra,dec,parallax,parallax_error,pmra,pmra_error,pmdec,pmdec_error,"
               "ref_epoch,radial_velocity,radial_velocity_error,ra_error,dec_error,ra_dec_corr,"
               "ra_parallax_corr,ra_pmra_corr,ra_pmdec_corr,dec_parallax_corr,dec_pmra_corr,"
               "dec_pmdec_corr,parallax_pmra_corr,parallax_pmdec_corr,pmra_pmdec_corr,"
               "phot_g_mean_mag\n")


def test_gaia_archive_columns_map_onto_ours(write_file):
    # Invented values in the Gaia archive's gaia_source column layout (names as published in
    # the Gaia DR3 data model); empty parallax/rv cells as the archive writes nulls.
    path = write_file("gaia.csv", GAIA_HEADER +
                      "1234567890123,150.25,-30.5,12.5,0.05,-120.0,0.06,45.0,0.07,2016.0,"
                      "33.0,1.5,0.02,0.03,0.1,0.2,0.3,0.4,-0.1,-0.2,-0.3,-0.4,0.5,0.6,11.2\n"
                      "987,10.0,5.0,,,1.0,,2.0,,2016.0,,,,,,,,,,,,,,,18.0\n")
    targets = read_targets(path)
    assert list(targets.names()) == ["1234567890123", "987"]
    assert targets.pm_ra_cosdec[0] == -120.0 and targets.pm_dec[0] == 45.0
    assert targets.parallax[0] == 12.5 and targets.radial_velocity[0] == 33.0
    assert targets.parallax[1] == 0.0 and targets.radial_velocity[1] == 0.0
    np.testing.assert_array_equal(targets.epoch, [2016.0, 2016.0])
    assert targets.errors["pm_ra_cosdec_error"][0] == 0.06
    assert targets.errors["pm_dec_error"][0] == 0.07
    assert targets.errors["ra_pm_ra_cosdec_corr"][0] == 0.3
    assert targets.errors["dec_pm_dec_corr"][0] == -0.3
    assert targets.errors["pm_ra_cosdec_pm_dec_corr"][0] == 0.6
    assert len(targets.errors) == 16  # 6 errors + 10 correlations
    assert list(targets.extra) == ["phot_g_mean_mag"]


def test_designation_preferred_over_source_id(write_file):
    path = write_file("gaia.csv", "source_id,designation,ra,dec\n42,Gaia DR3 42,1,2\n")
    targets = read_targets(path)
    assert targets.names()[0] == "Gaia DR3 42"
    assert list(targets.extra["source_id"]) == ["42"]


def test_utf8_bom_and_crlf(write_file):
    path = write_file("t.csv", "\ufeffname,ra,dec\r\nÅsa,10,20\r\n")
    targets = read_targets(path)
    assert targets.names()[0] == "Åsa" and targets.ra[0] == 10.0


@pytest.mark.parametrize("row, column, fragment", [
    ("A,10,20,nan,0", "parallax", "not a finite number"),
    ("A,10,95,1,0", "dec", "outside [-90, +90]"),
    ("A,400,20,1,0", "ra", "outside [0, 360)"),
    ("A,,20,1,0", "ra", "no value"),
    ("A,10,20,1,fast", "pm_dec", "'fast' is not a number"),
    ("A,10,20,1,inf", "pm_dec", "not a finite number"),
])
def test_bad_values(write_file, row, column, fragment):
    path = write_file("t.csv", "name,ra,dec,parallax,pm_dec\n" + row + "\n")
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert info.value.column == column and info.value.line == 2
    assert fragment in str(info.value)


def test_bad_error_and_correlation_values(write_file):
    path = write_file("t.csv", "name,ra,dec,ra_error,ra_dec_corr\nA,1,2,-0.1,0\nB,1,2,0.1,1.5\n")
    problems = []
    with pytest.raises(InputError) as info:
        read_targets(path, skip_bad_rows=True, on_skip=problems.append)
    assert [(p.line, p.column) for p in problems] == [(2, "ra_error"), (3, "ra_dec_corr")]
    assert "no usable targets" in str(info.value)


def test_row_with_wrong_cell_count(write_file):
    path = write_file("t.csv", "name,ra,dec\nA,1,2,3\nB,1,2\n")
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert info.value.line == 2 and "4 cells" in str(info.value)


def test_trailing_comma_columns_are_ignored_when_empty(write_file):
    targets = read_targets(write_file("t.csv", "name,ra,dec,\nA,1,2,\n"))
    assert targets.extra == {}
    with pytest.raises(InputError, match="no name"):
        read_targets(write_file("u.csv", "name,ra,dec,\nA,1,2,x\n"))


@pytest.mark.parametrize("content, fragment, line", [
    ("", "is empty", None),
    ("  \n\n", "is empty", None),
    ("# only a comment\n", "no header", None),
    ("name,dec\nA,1\n", "no ra column", 1),
    ("name,ra,dec\n", "no targets", None),
    ("name,ra,RA,dec\nA,1,2,3\n", "appears twice", 1),
    ("name,pmra,pm_ra_cosdec,ra,dec\nA,1,2,3,4\n", "both give pm_ra_cosdec", 1),
    (b"name,ra,dec\nA,1,2\n\xff\xfe,1,2\n", "not UTF-8", 3),
    # A field longer than the csv module's limit (131072 characters).
    ("name,ra,dec\nA,1,2\n\"" + "x" * 200_000 + "\",1,2\n", "not valid CSV", 3),
])
def test_whole_file_problems(write_file, content, fragment, line):
    path = write_file("t.csv", content)
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert fragment in str(info.value) and info.value.line == line
    assert "\n" not in str(info.value)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(InputError, match="file not found"):
        read_targets(tmp_path / "nope.csv")
    with pytest.raises(InputError, match="folder"):
        read_targets(tmp_path)


def test_format_by_content_when_extension_unknown(write_file):
    targets = read_targets(write_file("list.txt", "name,ra,dec\nA,1,2\n"))
    assert targets.ra[0] == 1.0


def test_demo_file_reads(pytestconfig):
    """The shipped demo list starts with comment lines and reads without error."""
    demo = pytestconfig.rootpath / "sample_targets" / "loma_candil_targets.csv"
    if not demo.exists():
        pytest.skip("demo file not present")
    targets = read_targets(demo)
    assert len(targets) > 10 and "notes" in targets.extra


def test_default_names_follow_the_data_row_when_rows_are_skipped(write_file):
    path = write_file("t.csv", "ra,dec\n1,1\nbad,2\n3,3\n")
    skipped = []
    targets = read_targets(path, skip_bad_rows=True, on_skip=skipped.append)
    assert list(targets.names()) == ["T1", "T3"]
    assert skipped[0].target is None and skipped[0].line == 3
