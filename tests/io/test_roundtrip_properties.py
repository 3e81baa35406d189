"""Property tests: garbled CSV never escapes as anything but InputError, and valid target
lists survive write_targets -> read_targets unchanged in every format."""
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from epochpoint.core.targets import CORRELATION_COLUMNS, ERROR_COLUMNS, Targets
from epochpoint.io import InputError, read_targets, write_targets

PROPERTY_SETTINGS = settings(max_examples=60, deadline=None,
                             suppress_health_check=[HealthCheck.function_scoped_fixture])

# Text people put in cells: no control characters or line separators; stripped like CSV cells.
_CHARS = st.characters(blacklist_categories=("Cc", "Cs", "Zl", "Zp"))
_TEXT = st.text(_CHARS, max_size=12).map(str.strip)
_NAME = _TEXT.filter(bool)

_HEADER_WORDS = ["name", "ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax",
                 "radial_velocity", "pmra", "ref_epoch", "frame", "equinox", "ra_error",
                 "ra_dec_corr", "RA", "notes", "", "#x", '"q"', "source_id", "designation"]
_CELLS = ["10", "-10", "95", "12:30:00", "-00:30:00", "24:00:00", "12:60:00", "1e400", "nan",
          "inf", "-0", "", " ", "B1950.0", "J2016.0", "X1", "fk4", "fk5", "galactic", "icrs",
          "J1975", "B100", '"', '""', "a,b", "#", "Ω", "1_0", "0x10", "1" * 400, "-91:00:00",
          "359.9999999999", "360", "-1e-300", "2000", "5001"]


def _garbled_csv():
    header = st.lists(st.sampled_from(_HEADER_WORDS), min_size=0, max_size=8)
    row = st.lists(st.one_of(st.sampled_from(_CELLS), _TEXT), min_size=0, max_size=9)
    lines = st.tuples(header, st.lists(row, max_size=6)).map(
        lambda hr: [",".join(hr[0])] + [",".join(r) for r in hr[1]])
    noise = st.lists(st.sampled_from(["\n", "\r", "\r\n", "#", '"', ",", "\x00", "\ufeff", " "]),
                     max_size=3)
    return st.tuples(lines, noise, st.binary(max_size=8)).map(
        lambda t: ("\n".join(t[0]) + "".join(t[1])).encode("utf-8") + t[2])


@PROPERTY_SETTINGS
@given(content=st.one_of(_garbled_csv(), st.binary(max_size=200)), skip=st.booleans())
def test_garbled_csv_raises_only_input_error(tmp_path, content, skip):
    path = tmp_path / "garbled.csv"
    path.write_bytes(content)
    try:
        targets = read_targets(path, skip_bad_rows=skip, on_skip=lambda error: None)
    except InputError as err:
        assert "\n" not in str(err)
    else:
        assert isinstance(targets, Targets) and len(targets) >= 1


@PROPERTY_SETTINGS
@given(content=st.binary(max_size=300), suffix=st.sampled_from([".ecsv", ".vot"]))
def test_garbled_tables_raise_only_input_error(tmp_path, content, suffix):
    path = tmp_path / ("garbled" + suffix)
    path.write_bytes(b"# %ECSV 1.0\n# ---\n" + content if suffix == ".ecsv" else content)
    try:
        read_targets(path)
    except InputError as err:
        assert "\n" not in str(err)


def _sample_file_bytes(suffix: str) -> bytes:
    """A valid target file of each format, written once, as the seed for mutations."""
    import tempfile
    from pathlib import Path

    targets = Targets.from_columns(
        name=np.array(["Alpha", "B"], dtype=object), ra=np.array([10.0, 20.0]),
        dec=np.array([-5.0, 5.0]), epoch=2016.0, pm_ra_cosdec=np.array([1.0, -2.0]),
        parallax=np.array([3.0, 0.0]), errors={"ra_error": np.array([0.1, np.nan])},
        extra={"notes": np.array(["x", ""], dtype=object)})
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / ("seed" + suffix)
        write_targets(targets, path)
        return path.read_bytes()


_SEEDS = {suffix: _sample_file_bytes(suffix) for suffix in (".csv", ".ecsv", ".vot")}
_SPLICES = [b"", b"#", b"\n", b'"', b"<", b">", b"nan", b"-1", b"1e999", b"x", b"\xff", b" ",
            b"- {name: ra, datatype: string}", b"unit: hourangle", b"datatype: int64", b"</TD>",
            b"<TD>", b"mas.yr**-1"]


@PROPERTY_SETTINGS
@given(suffix=st.sampled_from(sorted(_SEEDS)),
       edits=st.lists(st.tuples(st.floats(0.0, 1.0), st.integers(0, 8), st.sampled_from(_SPLICES)),
                      min_size=1, max_size=4))
def test_mutated_valid_files_raise_only_input_error(tmp_path, suffix, edits):
    """A valid file of each format with a few bytes cut or spliced in."""
    content = _SEEDS[suffix]
    for where, cut, splice in edits:
        at = int(where * len(content))
        content = content[:at] + splice + content[at + cut:]
    path = tmp_path / ("mutated" + suffix)
    path.write_bytes(content)
    try:
        read_targets(path, skip_bad_rows=True, on_skip=lambda error: None)
    except InputError as err:
        assert "\n" not in str(err)


def _finite(lo, hi, **kw):
    return st.floats(min_value=lo, max_value=hi, allow_nan=False, allow_infinity=False, **kw)


@st.composite
def target_lists(draw):
    n = draw(st.integers(min_value=1, max_value=5))

    def column(strategy):
        return np.array(draw(st.lists(strategy, min_size=n, max_size=n)))

    errors = {}
    for col in draw(st.lists(st.sampled_from(ERROR_COLUMNS + CORRELATION_COLUMNS), unique=True,
                             max_size=4)):
        bound = (-1.0, 1.0) if col.endswith("_corr") else (0.0, 1e3)
        errors[col] = column(st.one_of(st.just(math.nan), _finite(*bound)))
    extra = {}
    if draw(st.booleans()):
        extra["notes"] = np.array(draw(st.lists(_TEXT, min_size=n, max_size=n)), dtype=object)
    return Targets.from_columns(
        name=column(_NAME), ra=column(_finite(0.0, 360.0, exclude_max=True)),
        dec=column(_finite(-90.0, 90.0)), epoch=column(_finite(1900.0, 2100.0)),
        pm_ra_cosdec=column(_finite(-1e4, 1e4)), pm_dec=column(_finite(-1e4, 1e4)),
        parallax=column(_finite(0.0, 1e3)), radial_velocity=column(_finite(-1e3, 1e3)),
        errors=errors, extra=extra)


@pytest.mark.parametrize("suffix", [".csv", ".ecsv", ".vot"])
@PROPERTY_SETTINGS
@given(targets=target_lists())
def test_valid_targets_round_trip(tmp_path, suffix, targets):
    path = tmp_path / ("targets" + suffix)
    write_targets(targets, path)
    back = read_targets(path)
    assert list(back.names()) == list(targets.names())
    for col in ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity"):
        np.testing.assert_array_equal(getattr(back, col), getattr(targets, col), err_msg=col)
    assert set(back.errors) == set(targets.errors)
    for col, values in targets.errors.items():
        np.testing.assert_array_equal(back.errors[col], values, err_msg=col)  # NaN == NaN here
    assert set(back.extra) == set(targets.extra)
    for col, values in targets.extra.items():
        assert [str(v) for v in back.extra[col]] == [str(v) for v in values]
