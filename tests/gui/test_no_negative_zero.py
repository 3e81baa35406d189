"""No "-0.0" anywhere in the app: one shared formatter writes a value that rounds to zero as
zero, unsigned or "+0.0" (common practice in published tables: a rounded zero carries no sign).
The expected strings are written out here, not produced by the formatter under test."""
import numpy as np
import pytest

from epochpoint.gui.document import Document
from epochpoint.gui.number_text import fixed
from epochpoint.gui.panels import LedgerPanel
from epochpoint.gui.target_model import COLUMN_INDEX, Computed, TargetTableModel
from epochpoint.io.planfile import read_plan_file
from shell_support import DEMO_PLAN


@pytest.mark.parametrize("value, decimals, signed, text", [
    (-0.0, 1, False, "0.0"), (-0.04, 1, False, "0.0"), (-0.04, 1, True, "+0.0"),
    (-0.00004, 4, True, "+0.0000"), (-0.06, 1, True, "-0.1"), (0.04, 2, False, "0.04"),
    (-12.345, 2, False, "-12.35"), (7.0, 0, True, "+7")])
def test_fixed_drops_the_sign_of_a_rounded_zero(value, decimals, signed, text):
    assert fixed(value, decimals, signed=signed) == text


def test_the_table_never_shows_minus_zero_altitudes(qapp):
    doc = Document()
    doc.load(read_plan_file(DEMO_PLAN), DEMO_PLAN)
    model = TargetTableModel(doc)
    n = doc.row_count()
    alt = np.full(n, 10.0)
    alt[:3] = (-0.0, -0.04, -0.049)  # all round to zero at the table's one decimal
    model.set_computed(Computed(alt, np.full(n, ""), None, np.zeros(n)))
    shown = [model.data(model.index(r, COLUMN_INDEX["alt_now"])) for r in range(3)]
    assert shown == ["+0.0", "+0.0", "+0.0"]


def test_the_ledger_never_shows_minus_zero(qtbot):
    panel = LedgerPanel()
    qtbot.addWidget(panel)
    panel.set_row({"name": "Edge", "time": "2027-01-20T03:00:00Z", "refused": "",
                   "alt": -0.00001, "az": 120.0, "airmass": float("nan"),
                   "parallactic_angle": -0.001})
    assert panel.place_text("horizon")[0] == "Alt +0.0000°"
    assert panel.place_text("geometry")[1] == "parallactic angle +0.00°"
