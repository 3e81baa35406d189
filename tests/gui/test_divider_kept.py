"""The divider between the target list and the tabs stays where the user put it when tabs are
switched (every tab, there and back), at a wide and at a narrower window."""
import pytest

from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.mark.parametrize("width, divider_x", [(1900, 900), (1900, 300), (1300, 350)])
def test_divider_stays_across_tab_switches(make_window, qtbot, width, divider_x):
    window = make_window(DEMO_PLAN)
    window.resize(width, 900)
    wait_for_plan(qtbot, window)
    qtbot.wait(50)
    window.splitter.moveSplitter(divider_x, 1)
    qtbot.wait(50)
    before = window.splitter.sizes()
    assert abs(before[0] - divider_x) <= 2  # where the user put it
    for i in list(range(window.tabs.count())) + [0]:
        window.tabs.setCurrentIndex(i)
        qtbot.wait(50)
        assert window.splitter.sizes() == before, window.tabs.tabText(i)
