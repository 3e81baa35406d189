"""The solar option of the Site & limits tab: one check box saying a full-aperture solar filter
is fitted on the telescope and every finder (core.limits.Interlocks.solar_filter_fitted, the
site file's [safety] solar_filter_fitted).

Off by default, and then the interlocks refuse the Sun as a target. Switching it on asks
first, every time, in a dialog that states the caution (core.limits.SOLAR_CAUTION); anything
but an explicit yes leaves it off. Switching it off needs no question. While it is on, the
caution stays written under the box.
"""
from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QCheckBox, QLabel, QVBoxLayout, QWidget

from ...core.limits import SOLAR_CAUTION
from ..cautious_question import CautiousQuestion

OPTION_TEXT = ("Solar filter fitted: a full-aperture solar filter covers the telescope and "
               "every finder (the Sun may be a target)")
OPTION_TIP = ("Off by default: the interlocks then refuse the Sun as a target. Saved with the "
              "site (site file [safety] solar_filter_fitted).")
ASK_TEXT = ("Switch the solar option on only while a full-aperture solar filter is fitted and "
            "secured on the front of the telescope and of every finder. With it on, the "
            "interlocks no longer refuse the Sun as a target (Sun avoidance still guards every "
            "other target).")


class SolarOptionDialog(CautiousQuestion):
    """The question before the solar option goes on: the caution, then an explicit choice
    (Cancel is the default, so Enter or Escape leave the option off)."""

    def __init__(self, parent=None):
        super().__init__("Switch the solar option on?", f"{ASK_TEXT}\n\n{SOLAR_CAUTION}",
                         "Filter fitted: switch on", "solarAsk", 480, parent)


class SolarOption(QWidget):
    """The check box and, while it is on, the caution under it. `changed` is sent after each
    switch by the user (on only once confirmed); set_on fills it from a site and sends
    nothing."""

    changed = Signal()

    def __init__(self, parent=None):
        super().__init__(parent)
        self.check = QCheckBox(OPTION_TEXT)
        self.check.setObjectName("solarOption")
        self.check.setToolTip(OPTION_TIP)
        self.check.clicked.connect(self._on_clicked)
        self.note = QLabel(SOLAR_CAUTION)
        self.note.setObjectName("solarNote")
        self.note.setWordWrap(True)
        self.note.setVisible(False)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.check)
        layout.addWidget(self.note)

    def is_on(self) -> bool:
        return self.check.isChecked()

    def set_on(self, on: bool) -> None:
        self.check.blockSignals(True)
        self.check.setChecked(bool(on))
        self.check.blockSignals(False)
        self.note.setVisible(bool(on))

    def confirm(self) -> bool:
        """Ask (SolarOptionDialog); True only for an explicit yes."""
        dialog = SolarOptionDialog(self)
        accepted = dialog.exec() == CautiousQuestion.DialogCode.Accepted
        dialog.deleteLater()
        return accepted

    def _on_clicked(self, checked: bool) -> None:
        if checked and not self.confirm():
            self.set_on(False)
            return
        self.set_on(checked)
        self.changed.emit()
