"""Reading target lists from ECSV and VOTable through astropy.table, with units."""
import io

import astropy.units as u
import numpy as np
import pytest
from astropy.table import MaskedColumn, Table

from epochpoint.io import InputError, read_targets


def _save(table, path, fmt):
    table.write(path, format={"ecsv": "ascii.ecsv", "votable": "votable"}[fmt], overwrite=True)
    return path


@pytest.fixture(params=["ecsv", "votable"])
def fmt(request):
    return request.param


def _suffix(fmt):
    return ".ecsv" if fmt == "ecsv" else ".vot"


def test_units_are_converted(tmp_path, fmt):
    table = Table()
    table["name"] = ["A", "B"]
    table["ra"] = [12.5, 1.0] * u.hourangle            # 12.5 h = 187.5 deg
    table["dec"] = [-0.5, np.pi / 4] * u.rad            # pi/4 rad = 45 deg
    table["pmra"] = [0.1, -0.2] * u.arcsec / u.yr       # 100 and -200 mas/yr
    table["pmdec"] = [1.0, 2.0] * u.mas / u.day         # x 365.25 per Julian year
    table["parallax"] = [0.01, 0.002] * u.arcsec        # 10 and 2 mas
    table["radial_velocity"] = [1000.0, -500.0] * u.m / u.s  # 1 and -0.5 km/s
    table["ra_error"] = [1e-6, 2e-6] * u.deg            # 3.6 and 7.2 mas
    table["ref_epoch"] = [2016.0, 2016.0] * u.yr
    targets = read_targets(_save(table, tmp_path / ("t" + _suffix(fmt)), fmt))
    np.testing.assert_allclose(targets.ra, [187.5, 15.0])
    np.testing.assert_allclose(targets.dec, [np.degrees(-0.5), 45.0])
    np.testing.assert_allclose(targets.pm_ra_cosdec, [100.0, -200.0])
    np.testing.assert_allclose(targets.pm_dec, [365.25, 730.5])
    np.testing.assert_allclose(targets.parallax, [10.0, 2.0])
    np.testing.assert_allclose(targets.radial_velocity, [1.0, -0.5])
    np.testing.assert_allclose(targets.errors["ra_error"], [3.6, 7.2])
    np.testing.assert_array_equal(targets.epoch, [2016.0, 2016.0])


def test_unitless_columns_take_default_units_and_masked_motion_is_zero(tmp_path, fmt):
    table = Table()
    table["RA"] = [10.0, 20.0]
    table["Dec"] = [-5.0, 5.0]
    table["pm_ra_cosdec"] = MaskedColumn([3.0, 99.0], mask=[False, True])
    table["parallax"] = MaskedColumn([1.5, 99.0], mask=[True, False])
    table["epoch"] = MaskedColumn([2016.0, 0.0], mask=[False, True])
    table["priority"] = [1, 2]
    table["weight"] = MaskedColumn([0.5, 0.0], mask=[False, True])
    table["notes"] = MaskedColumn(["x", "?"], mask=[False, True])
    targets = read_targets(_save(table, tmp_path / ("t" + _suffix(fmt)), fmt))
    np.testing.assert_array_equal(targets.ra, [10.0, 20.0])
    np.testing.assert_array_equal(targets.pm_ra_cosdec, [3.0, 0.0])
    np.testing.assert_array_equal(targets.parallax, [0.0, 99.0])
    np.testing.assert_array_equal(targets.epoch, [2016.0, 2000.0])
    assert list(targets.names()) == ["T1", "T2"]
    # Planning columns keep numbers numeric; masked numbers are NaN, masked text ''.
    assert targets.extra["priority"].dtype.kind in "iu"
    assert list(targets.extra["priority"]) == [1, 2]
    assert targets.extra["weight"][0] == 0.5 and np.isnan(targets.extra["weight"][1])
    assert list(targets.extra["notes"]) == ["x", ""]


def test_sexagesimal_text_columns(tmp_path):
    table = Table({"name": ["A"], "ra": ["12:30:00"], "dec": ["-00:30:00"], "epoch": ["B1950.0"]})
    targets = read_targets(_save(table, tmp_path / "t.ecsv", "ecsv"))
    assert targets.ra[0] == 187.5 and targets.dec[0] == -0.5
    assert targets.epoch[0] == pytest.approx(1949.99979, abs=1e-5)


def test_bad_row_is_named_by_data_row(tmp_path, fmt):
    table = Table({"name": ["Good", "Broken"], "ra": [10.0, 10.0], "dec": [10.0, 95.0]})
    path = _save(table, tmp_path / ("t" + _suffix(fmt)), fmt)
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert (info.value.line, info.value.target, info.value.column) == (2, "Broken", "dec")
    assert "row 2 (Broken), column dec" in str(info.value)
    skipped = []
    assert list(read_targets(path, skip_bad_rows=True, on_skip=skipped.append).names()) == ["Good"]
    assert [s.line for s in skipped] == [2]


def test_nan_in_motion_column_is_an_error_but_masked_is_zero(tmp_path):
    table = Table({"ra": [1.0, 2.0], "dec": [1.0, 2.0], "pm_dec": [np.nan, 1.0]})
    with pytest.raises(InputError) as info:
        read_targets(_save(table, tmp_path / "t.ecsv", "ecsv"))
    assert info.value.column == "pm_dec" and info.value.line == 1


def test_masked_ra_is_an_error(tmp_path, fmt):
    table = Table({"ra": MaskedColumn([1.0, 2.0], mask=[False, True]), "dec": [1.0, 2.0]})
    with pytest.raises(InputError) as info:
        read_targets(_save(table, tmp_path / ("t" + _suffix(fmt)), fmt))
    assert info.value.line == 2 and info.value.column == "ra"


def test_wrong_unit_is_an_input_error(tmp_path, fmt):
    table = Table({"ra": [1.0] * u.m, "dec": [1.0] * u.deg})
    with pytest.raises(InputError) as info:
        read_targets(_save(table, tmp_path / ("t" + _suffix(fmt)), fmt))
    assert info.value.column == "ra" and "cannot be converted" in str(info.value)


def test_missing_dec_column(tmp_path, fmt):
    table = Table({"ra": [1.0]})
    with pytest.raises(InputError, match="no dec column"):
        read_targets(_save(table, tmp_path / ("t" + _suffix(fmt)), fmt))


@pytest.mark.parametrize("name, content", [
    ("t.ecsv", "# %ECSV 1.0\n# ---\n# datatype:\n# - {name: ra, datatype: float64\nra\n1\n"),
    ("t.ecsv", "# %ECSV 1.0\nnot yaml at all: [\n"),
    ("t.vot", "<?xml version='1.0'?><VOTABLE><RESOURCE><TABLE><FIELD name='ra'"),
    ("t.vot", "just some text"),
    ("t.xml", "<a></a>"),
])
def test_garbled_files_are_input_errors(write_file, name, content):
    with pytest.raises(InputError) as info:
        read_targets(write_file(name, content))
    assert "\n" not in str(info.value)


def test_votable_detected_by_content(tmp_path):
    table = Table({"ra": [10.0], "dec": [20.0]})
    buffer = io.BytesIO()
    table.write(buffer, format="votable")
    path = tmp_path / "targets.dat"
    path.write_bytes(buffer.getvalue())
    assert read_targets(path).dec[0] == 20.0


GAIA_STYLE_VOTABLE = """<?xml version="1.0" encoding="UTF-8"?>
<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3">
 <RESOURCE type="results">
  <TABLE>
   <FIELD name="source_id" datatype="long"/>
   <FIELD name="ra" datatype="double" unit="deg"/>
   <FIELD name="dec" datatype="double" unit="deg"/>
   <FIELD name="parallax" datatype="double" unit="mas"/>
   <FIELD name="pmra" datatype="double" unit="mas.yr**-1"/>
   <FIELD name="pmdec" datatype="double" unit="mas.yr**-1"/>
   <FIELD name="radial_velocity" datatype="float" unit="km.s**-1"/>
   <FIELD name="ref_epoch" datatype="double" unit="yr"/>
   <FIELD name="pmra_pmdec_corr" datatype="float"/>
   <FIELD name="phot_g_mean_mag" datatype="float" unit="mag"/>
   <DATA><TABLEDATA>
    <TR><TD>4472832130942575872</TD><TD>269.45</TD><TD>4.69</TD><TD>546.97</TD><TD>-801.55</TD>
        <TD>10362.39</TD><TD>-110.5</TD><TD>2016.0</TD><TD>0.25</TD><TD>8.19</TD></TR>
    <TR><TD>17</TD><TD>10.0</TD><TD>-5.0</TD><TD></TD><TD>1.5</TD><TD>-2.5</TD><TD></TD>
        <TD>2016.0</TD><TD></TD><TD>19.9</TD></TR>
   </TABLEDATA></DATA>
  </TABLE>
 </RESOURCE>
</VOTABLE>
"""


def test_gaia_archive_style_votable(write_file):
    """Column names, types and unit strings as the Gaia archive writes them (Gaia DR3 data
    model); values invented, nulls as empty cells."""
    targets = read_targets(write_file("gaia.vot", GAIA_STYLE_VOTABLE))
    assert list(targets.names()) == ["4472832130942575872", "17"]
    np.testing.assert_allclose(targets.pm_ra_cosdec, [-801.55, 1.5])
    np.testing.assert_allclose(targets.pm_dec, [10362.39, -2.5])
    np.testing.assert_allclose(targets.parallax, [546.97, 0.0])         # null parallax: zero
    np.testing.assert_allclose(targets.radial_velocity, [-110.5, 0.0], rtol=1e-6)
    np.testing.assert_array_equal(targets.epoch, [2016.0, 2016.0])
    corr = targets.errors["pm_ra_cosdec_pm_dec_corr"]
    assert corr[0] == pytest.approx(0.25) and np.isnan(corr[1])          # null: unknown
    np.testing.assert_allclose(targets.extra["phot_g_mean_mag"], [8.19, 19.9], rtol=1e-6)


def test_ecsv_time_columns(tmp_path):
    """ECSV can hold astropy Time columns: an epoch Time becomes a Julian year, a Time
    planning column ISO 8601 UTC text with Z."""
    from astropy.time import Time

    table = Table({"ra": [1.0], "dec": [2.0], "epoch": Time([2016.0], format="jyear"),
                   "not_before": Time(["2027-01-20T23:10:00"], scale="utc")})
    targets = read_targets(_save(table, tmp_path / "t.ecsv", "ecsv"))
    assert targets.epoch[0] == pytest.approx(2016.0, abs=1e-9)
    assert list(targets.extra["not_before"]) == ["2027-01-20T23:10:00.000Z"]
