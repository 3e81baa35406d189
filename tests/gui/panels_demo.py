"""The demo scenario the panel tests share: the invented Loma Candil site, its invented targets
and the night of 2027-01-19 (sample_targets/). Not a test module (no test_ prefix)."""
from __future__ import annotations

import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO_TARGETS = ROOT / "sample_targets" / "loma_candil_targets.csv"
DEMO_SITE = ROOT / "sample_targets" / "loma_candil.toml"
DEMO_NIGHT = "2027-01-19"


def demo_inputs():
    """(targets, site) read from the demo files."""
    from epochpoint.io import read_site, read_targets

    return read_targets(str(DEMO_TARGETS)), read_site(str(DEMO_SITE))


def demo_plan():
    """(plan, targets, site) for the demo night; about a second to build."""
    from epochpoint.core.plan import plan

    targets, site = demo_inputs()
    with warnings.catch_warnings():
        # The demo night lies beyond the shipped Earth-orientation table: expected, harmless.
        warnings.simplefilter("ignore")
        return plan(targets, site, DEMO_NIGHT), targets, site


def settle(qtbot, widget, canvas=None) -> None:
    """Show a widget, let Qt lay it out and draw its canvas so transforms are final."""
    widget.show()
    qtbot.waitExposed(widget)
    qtbot.wait(20)
    if canvas is not None:
        canvas.draw()


def shown_panel(qtbot, panel_class, size, plan):
    """A chart panel of `panel_class` at `size`, showing `plan`, laid out and drawn."""
    widget = panel_class()
    qtbot.addWidget(widget)
    widget.resize(*size)
    widget.set_plan(plan)
    settle(qtbot, widget, widget.canvas)
    return widget


def demo_site_editor(qtbot):
    """The Site & limits tab, shown at a working size, holding the demo site."""
    from epochpoint.gui.panels import SiteEditor

    widget = SiteEditor()
    qtbot.addWidget(widget)
    widget.resize(1150, 760)
    settle(qtbot, widget)
    widget.set_site(demo_inputs()[1])
    return widget
