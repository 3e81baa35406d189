"""Correction ledger panel: effect sizes and bars, places in sexagesimal, and the refusal line,
for a row of core.positions(..., ledger=True) (demo targets and site, see panels_demo.py)."""
from __future__ import annotations

import numpy as np
import pytest

from epochpoint.core.positions import LEDGER_COLUMNS, positions
from epochpoint.gui.panels import LedgerPanel
from epochpoint.gui.panels.ledger import BAR_ROLE, EFFECTS
from panels_demo import demo_inputs, settle

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

WHEN = "2027-01-20T03:00:00Z"


@pytest.fixture(scope="module")
def rows():
    targets, site = demo_inputs()
    table = positions(targets, site, WHEN, ledger=True)
    out = []
    for i in range(len(targets)):
        row = {k: table[k][i] for k in table}
        row.update(time=WHEN, refused="")
        out.append(row)
    return out


@pytest.fixture
def panel(qtbot):
    widget = LedgerPanel()
    qtbot.addWidget(widget)
    widget.resize(640, 560)
    settle(qtbot, widget)
    yield widget
    widget.close()


def _sexagesimal_hours(deg: float) -> str:
    """hh:mm:ss.sss written out here, independently of io.angles."""
    total_ms = round(deg / 15.0 * 3600.0 * 1000.0)
    h, rest = divmod(total_ms, 3600 * 1000)
    m, rest = divmod(rest, 60 * 1000)
    return f"{h:02d}:{m:02d}:{rest / 1000:06.3f}"


def test_every_effect_is_listed_with_its_size(panel, rows):
    row = rows[1]
    panel.set_row(row)
    assert [key for key, _, _ in EFFECTS] == list(LEDGER_COLUMNS)
    shown = panel.effect_sizes()
    for key, label, _ in EFFECTS:
        # Equal to the shown precision (half a unit of the last digit), at least 3 digits.
        decimals = len(shown[label].split(".")[1])
        assert float(shown[label]) == pytest.approx(float(row[key]), abs=0.5 * 10 ** -decimals)
        assert float(row[key]) < 0.01 or len(shown[label].replace(".", "").lstrip("0")) >= 3


def test_bars_are_ordered_like_the_sizes_on_a_log_scale(panel, rows):
    panel.set_row(rows[1])
    sizes = np.array([float(rows[1][key]) for key, _, _ in EFFECTS])
    bars = np.array([panel.effects.item(r, 2).data(BAR_ROLE) for r in range(len(EFFECTS))])
    assert list(np.argsort(sizes)) == list(np.argsort(bars))
    # Logarithmic: a 10x larger effect adds the same length anywhere on the scale.
    from epochpoint.gui.panels.ledger import bar_fraction
    assert bar_fraction(10.0) - bar_fraction(1.0) == pytest.approx(
        bar_fraction(0.01) - bar_fraction(0.001))


def test_places_and_instant(panel, rows):
    row = rows[0]
    panel.set_row(row)
    ra_text, _ = panel.place_text("propagated")
    assert ra_text == f"RA {_sexagesimal_hours(float(row['ra_propagated']))}"
    alt_text, az_text = panel.place_text("horizon")
    assert alt_text == f"Alt {float(row['alt']):+.4f}°"
    assert az_text == f"Az {float(row['az']):.4f}°"
    assert panel.place_text("instant")[0] == WHEN
    assert "Allowed" in panel.verdict.text()


def test_refusal_is_spelled_out(panel, rows):
    row = dict(rows[2], refused="within 35 deg of the Sun")
    panel.set_row(row)
    assert panel.verdict.isVisible()
    assert "Refused for pointing at 2027-01-20T03:00:00Z: within 35 deg of the Sun" in \
        panel.verdict.text()


def test_no_row_clears_everything(panel, rows):
    panel.set_row(rows[0])
    panel.set_row(None)
    assert set(panel.effect_sizes().values()) == {"—"}
    assert panel.place_text("propagated") == ("", "")
    assert not panel.verdict.isVisible()


def test_row_without_site_columns(panel, rows):
    """A row from positions() without a site has no observed columns: shown as absent."""
    row = {k: v for k, v in rows[0].items()
           if k not in ("ha", "dec_observed", "alt", "az", "airmass", "parallactic_angle",
                        "ledger_diurnal_aberration", "ledger_refraction")}
    panel.set_row(row)
    assert panel.effect_sizes()["Refraction"] == "—"
    assert panel.place_text("observed")[0] == "no site"


def test_a_long_title_wraps_at_words_and_is_never_cut(qtbot):
    """At a narrow width the title shows every word of a long target name: it lies inside the
    panel and is tall enough for its wrapped lines (Qt's heightForWidth at its width)."""
    panel = LedgerPanel()
    qtbot.addWidget(panel)
    panel.resize(360, 400)
    name = "Brazilian Southern Survey Comparison Star Number Forty Two"
    panel.set_row({"name": name, "instant_label": "01:40 -03", "refused": ""})
    panel.show()
    qtbot.waitExposed(panel)
    qtbot.wait(50)
    title = panel.title
    assert name in title.text()
    right = title.mapTo(panel, title.rect().topRight()).x()
    assert right <= panel.width()
    assert title.wordWrap() and title.height() >= title.heightForWidth(title.width())
