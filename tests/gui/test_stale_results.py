"""Only consistent results are drawn: while the plan of an earlier target list is still shown
(a target was just added or removed), selecting a row it does not cover raises nothing, the
charts keep showing the earlier plan's lines instead of bare axes, and a click on them never
selects the wrong target; the new plan then shows the new row."""
import pytest

from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def test_adding_a_target_draws_no_stale_selection(make_window, qtbot, capfd):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    window.show_tab(0)
    qtbot.wait(50)
    capfd.readouterr()
    old_plan = window.plan
    assert len(old_plan.windows.names) == 30

    window.add_target()  # row 30: selected and edited at once, before any new plan exists
    qtbot.wait(50)
    assert window.selected == 30
    # The earlier plan stays drawn (lines, not bare axes), with nothing selected on it.
    assert window.tonight.plan is old_plan and window.tonight.ax is not None
    assert window.tonight.ax.get_lines(), "the chart shows bare axes"
    assert window.tonight.selected is None and window.skydome.selected is None
    assert window.skydome.ax is not None
    # A click on the earlier plan cannot select a row by its old numbering.
    window.tonight.target_clicked.emit(3)
    assert window.selected == 30

    window.table.setFocus()  # close the name editor as it is
    wait_for_plan(qtbot, window, lambda plan: len(plan.windows.names) == 31)
    qtbot.wait(50)
    assert window.tonight.selected == 30 and window.skydome.selected == 30
    err = capfd.readouterr().err
    assert "Error" not in err and "Traceback" not in err, err[:800]


def test_removing_a_target_keeps_clicks_on_the_earlier_plan_harmless(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    window.document.remove_targets([0])  # every later row moves up by one
    qtbot.wait(20)
    assert window.selected == 0  # the first row of the new list
    # Line 10 of the earlier plan is row 9 now: its old number must not select row 10.
    window.tonight.target_clicked.emit(10)
    window.skydome.target_clicked.emit(10)
    assert window.selected == 0
    wait_for_plan(qtbot, window, lambda plan: len(plan.windows.names) == 29)
    window.tonight.target_clicked.emit(10)
    assert window.selected == 10
