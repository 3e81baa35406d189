"""The document and its undo stack: every change undoes and redoes exactly."""
import numpy as np
import pytest

from epochpoint.core.limits import Interlocks
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.gui.document import Document
from epochpoint.io.planfile import NightSettings, read_plan_file
from shell_support import DEMO_PLAN


@pytest.fixture
def doc(qapp):
    d = Document()
    d.load(read_plan_file(DEMO_PLAN), DEMO_PLAN)
    return d


def _snapshot(doc):
    rows = doc.rows
    return ({k: v.copy() for k, v in rows.columns.items()},
            {k: v.copy() for k, v in rows.errors.items()}, doc.site, doc.night, doc.tolerance)


def _assert_same(a, b):
    cols_a, err_a, *rest_a = a
    cols_b, err_b, *rest_b = b
    assert cols_a.keys() == cols_b.keys() and err_a.keys() == err_b.keys()
    for k in cols_a:
        assert cols_a[k].dtype == cols_b[k].dtype and np.array_equal(cols_a[k], cols_b[k]), k
    for k in err_a:
        assert np.array_equal(err_a[k], err_b[k], equal_nan=True), k
    assert rest_a == rest_b


def test_loaded_document_is_clean_and_matches_the_file(doc):
    assert not doc.dirty and doc.row_count() == 30
    assert doc.value(0, "name") == "Wick" and doc.value(0, "priority") == 2


def test_every_change_undoes_and_redoes_exactly(doc):
    start = _snapshot(doc)
    new_site = Site(latitude=10.0, longitude=20.0, name="Elsewhere",
                    interlocks=Interlocks(sun_avoidance=45.0))
    imported = Targets.from_columns(ra=[1.0, 2.0], dec=[3.0, 4.0], name=["I1", "I2"],
                                    errors={"parallax_error": [0.5, 0.6]},
                                    extra={"priority": ["5", "1"]})
    steps = [
        lambda: doc.edit_cell(3, "dec", -12.5),
        lambda: doc.edit_cell(0, "notes", "edited"),
        lambda: doc.add_target(),
        lambda: doc.remove_targets([1, 5, 7]),
        lambda: doc.import_targets(imported, "more.csv"),
        lambda: doc.replace_site(new_site),
        lambda: doc.change_night(NightSettings(date="2027-02-01", darkness="civil"), "date"),
        lambda: doc.change_tolerance(7.5),
    ]
    states = [start]
    for step in steps:
        step()
        states.append(_snapshot(doc))
        assert doc.dirty
    assert doc.row_count() == 30 + 1 - 3 + 2
    assert "parallax_error" in doc.rows.errors  # the import added an error column
    for expected in reversed(states[:-1]):
        doc.undo_stack.undo()
        _assert_same(_snapshot(doc), expected)
    assert not doc.dirty  # back at the saved state
    for expected in states[1:]:
        doc.undo_stack.redo()
        _assert_same(_snapshot(doc), expected)


def test_repeated_changes_of_one_night_setting_merge_into_one_step(doc):
    base = doc.night
    for separation in (10.0, 11.0, 12.0):
        doc.change_night(NightSettings(**{**base.__dict__, "moon_separation": separation}),
                         "Moon distance")
    assert doc.undo_stack.count() == 1
    doc.undo_stack.undo()
    assert doc.night == base


def test_bad_night_settings_are_refused_and_change_nothing(doc):
    with pytest.raises(ValueError):
        doc.change_night(NightSettings(date="2027-13-01"), "date")
    with pytest.raises(ValueError):
        doc.change_tolerance(0.0)
    assert doc.undo_stack.count() == 0 and not doc.dirty


def test_check_cell_uses_the_targets_own_limits(doc):
    doc.check_cell(0, "dec", -90.0)  # the pole itself is allowed
    for key, value in (("dec", 90.5), ("parallax", -0.1), ("ra", 360.0), ("epoch", 6000.0)):
        with pytest.raises(ValueError):
            doc.check_cell(0, key, value)
    with pytest.raises(ValueError):
        doc.check_cell(0, "name", "   ")


def test_targets_carry_the_planning_fields_for_the_planner(doc):
    t = doc.targets()
    assert len(t) == 30 and list(t.extra) == ["priority", "exposure", "repeats", "notes"]
    doc.edit_cell(0, "priority", 5)
    assert doc.targets().extra["priority"][0] == 5 and t.extra["priority"][0] == 2
