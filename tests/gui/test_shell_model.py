"""The target table model: display, validated inline edits, sorting, filtering, and speed on
long lists (data() must not format per call)."""
import numpy as np
import pytest
from PySide6.QtCore import Qt

from epochpoint.core.targets import Targets
from epochpoint.gui.document import Document
from epochpoint.gui.target_model import (COLUMN_INDEX, COLUMNS, Computed, TargetFilterProxy,
                                         TargetTableModel)
from epochpoint.io.planfile import read_plan_file
from shell_support import DEMO_PLAN

DISPLAY, EDIT = Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole


@pytest.fixture
def doc(qapp):
    d = Document()
    d.load(read_plan_file(DEMO_PLAN), DEMO_PLAN)
    return d


@pytest.fixture
def model(doc):
    return TargetTableModel(doc)


def _cell(model, row, key):
    return model.index(row, COLUMN_INDEX[key])


def test_angles_show_sexagesimal_and_accept_degrees_or_sexagesimal(model, doc):
    # Wick: 02:34:51.22 -41:16:37.8 in the demo target list (sample_targets).
    assert model.data(_cell(model, 0, "ra")) == "02:34:51.22"
    assert model.data(_cell(model, 0, "dec")) == "-41:16:37.8"
    assert model.setData(_cell(model, 0, "ra"), "12:00:00")
    assert doc.value(0, "ra") == 180.0  # 12 h = 180 deg (definition of the hour angle unit)
    assert model.setData(_cell(model, 0, "ra"), "90.25")
    assert doc.value(0, "ra") == 90.25 and model.data(_cell(model, 0, "ra")) == "06:01:00.00"
    assert model.setData(_cell(model, 0, "dec"), "-00:30:00")
    assert doc.value(0, "dec") == -0.5  # the sign belongs to the whole angle (common practice)


@pytest.mark.parametrize("key, text, fragment", [
    ("dec", "95", "outside [-90, +90]"),
    ("dec", "north", "not an angle"),
    ("ra", "24:00:01", "not below 24 hours"),
    ("parallax", "-2", "must not be negative"),
    ("parallax", "lots", "not a number"),
    ("priority", "7", "from 1 (highest) to 5"),
    ("priority", "2.5", "whole number"),
    ("repeats", "0", "whole number from 1"),
    ("exposure", "-5", "from 0 to"),
    ("epoch", "Q2000", "not an epoch"),
    ("name", "  ", "a value is needed"),
    ("pm_dec", "", "a value is needed"),
])
def test_bad_value_is_rejected_with_the_reason_and_the_old_value_kept(model, doc, qtbot,
                                                                     key, text, fragment):
    before = doc.value(2, key)
    with qtbot.waitSignal(model.edit_rejected, timeout=1000) as signal:
        assert not model.setData(_cell(model, 2, key), text)
    row, column, reason = signal.args
    assert (row, column) == (2, key) and fragment in reason and "Sconce" in reason
    assert doc.value(2, key) == before and doc.undo_stack.count() == 0


def test_edit_text_keeps_full_precision(model, doc):
    assert model.data(_cell(model, 1, "parallax"), EDIT) == "163.41"
    assert model.data(_cell(model, 1, "ra"), EDIT) == "03:29:37.480"
    assert model.flags(_cell(model, 1, "alt_now")) & Qt.ItemFlag.ItemIsEditable == \
        Qt.ItemFlag.NoItemFlags


def test_computed_columns_and_refusal_markers(model, doc):
    n = doc.row_count()
    refused = np.full(n, "", dtype=object)
    refused[0] = "within 35 deg of the Sun"
    refused[1] = "below the minimum altitude 12 deg"
    tonight = np.full(n, "", dtype=object)
    tonight[2] = "never rises above 12 deg"
    model.set_computed(Computed(alt_now=np.linspace(-10, 80, n), refused_now=refused,
                                tonight=tonight, drift=np.full(n, 1.25)))
    assert model.data(_cell(model, 0, "pointing")) == "SUN"
    assert model.data(_cell(model, 1, "pointing")) == "too low"
    assert model.data(_cell(model, 3, "pointing")) == "ok"
    # Shape (icon), word and colour all mark the refusal; an allowed row has none of them.
    assert model.data(_cell(model, 0, "name"), Qt.ItemDataRole.DecorationRole) is not None
    assert model.data(_cell(model, 3, "name"), Qt.ItemDataRole.DecorationRole) is None
    assert model.data(_cell(model, 0, "alt_now"), Qt.ItemDataRole.ForegroundRole) is not None
    assert "Sun" in model.data(_cell(model, 0, "name"), Qt.ItemDataRole.ToolTipRole)
    assert model.data(_cell(model, 2, "tonight")) == "no: never rises above 12 deg"
    assert model.data(_cell(model, 4, "tonight")) == "yes"
    assert model.data(_cell(model, 0, "drift")) == "1.25"
    # Results for another number of rows are not shown against these rows.
    model.set_computed(Computed(np.zeros(3), np.full(3, ""), None, np.zeros(3)))
    assert model.computed is None and model.data(_cell(model, 0, "alt_now")) == ""


def test_sorting_by_a_number_and_filtering_by_name_or_notes(model, doc):
    proxy = TargetFilterProxy()
    proxy.setSourceModel(model)
    proxy.sort(COLUMN_INDEX["dec"], Qt.SortOrder.AscendingOrder)
    decs = [doc.value(proxy.doc_row(proxy.index(r, 0)), "dec") for r in range(proxy.rowCount())]
    assert decs == sorted(decs)
    proxy.sort(COLUMN_INDEX["priority"], Qt.SortOrder.DescendingOrder)
    pri = [doc.value(proxy.doc_row(proxy.index(r, 0)), "priority")
           for r in range(proxy.rowCount())]
    assert pri == sorted(pri, reverse=True)
    proxy.setFilterFixedString("DRIFT")  # in the notes of several demo targets
    names = {proxy.index(r, 0).data() for r in range(proxy.rowCount())}
    assert "Girandole" in names and "Wick" not in names and 0 < len(names) < 30
    # An edit reaches the right document row through sorting and filtering.
    index = proxy.index(0, COLUMN_INDEX["notes"])
    row = proxy.doc_row(index)
    assert proxy.setData(index, "changed through the proxy")
    assert doc.value(row, "notes") == "changed through the proxy"


def test_ten_thousand_rows_format_each_column_once(qapp):
    n = 10_000
    rng = np.random.default_rng(7)
    doc = Document()
    doc.import_targets(Targets.from_columns(ra=rng.uniform(0, 360, n), dec=rng.uniform(-90, 90, n),
                                            name=[f"S{i}" for i in range(n)]))
    model = TargetTableModel(doc)
    assert model.rowCount() == n
    visible = range(5000, 5040)  # one screenful in the middle of the list
    for _ in range(3):  # repainting asks again and again
        for row in visible:
            for column in range(len(COLUMNS)):
                model.data(model.index(row, column))
    assert model.column_builds == len(COLUMNS)
    # One edit updates one string, not the column.
    model.setData(model.index(5001, COLUMN_INDEX["dec"]), "12.5")
    model.data(model.index(5001, COLUMN_INDEX["dec"]))
    assert model.column_builds == len(COLUMNS)
    assert model.data(model.index(5001, COLUMN_INDEX["dec"])) == "+12:30:00.0"
