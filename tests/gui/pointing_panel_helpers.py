"""Opening the Pointing model tab on a site and fitting a samples file in it, for the tab's
tests."""
from __future__ import annotations

from epochpoint.gui.panels.pointing_panel import PointingPanel


def open_panel(qtbot, site) -> PointingPanel:
    """The tab, shown at a working size, on `site`."""
    widget = PointingPanel()
    qtbot.addWidget(widget)
    widget.resize(1000, 900)
    widget.set_site(site)
    widget.show()
    return widget


def fit_file(qtbot, panel, path) -> None:
    """Fit the samples in `path` and wait for the worker to finish."""
    panel.set_samples_path(str(path))
    panel.fit()
    qtbot.waitUntil(lambda: panel.task is None, timeout=60_000)
