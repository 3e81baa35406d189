"""Safety cautions: the strip always shown at the top of the window, and the longer text of
Help > Safety cautions."""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (QFrame, QHBoxLayout, QLabel, QMessageBox, QVBoxLayout,
                               QWidget)

CAUTION_TEXT = ("Never point at or near the Sun without a proper solar filter. A moving mount "
                "can injure: keep clear. Follow your observatory's procedures.")

SAFETY_TEXT = """\
<h3>Before you point the telescope</h3>
<p><b>The Sun.</b> Sunlight focused by a telescope or finder blinds in an instant and sets
fire to equipment. Never point at or near the Sun without a proper solar filter over the
front of the telescope and of every finder. Epochpoint refuses targets closer to the Sun than
the site's Sun-avoidance radius (Site &amp; limits tab); keep that radius generous, and
remember that a slew may pass close to the Sun on its way.</p>
<p><b>The mount.</b> A moving mount can crush fingers and knock people over, and a telescope
can strike its pier or the dome. Keep clear while it moves; know where the emergency stop is.
The mount limits and horizon mask here are planning aids, not a substitute for the mount's
own limit switches.</p>
<p><b>The numbers.</b> Positions are only as good as the catalogue, the site coordinates, the
clock and the Earth-orientation table (its age is in the status bar). Check the first
pointing of a night on a known star.</p>
<p><b>The observatory.</b> Follow your observatory's procedures: they know the building, the
weather limits and the people around you.</p>
"""


class CautionStrip(QFrame):
    """The always-visible caution with the Sun-avoidance radius in force."""

    def __init__(self, parent: QWidget | None = None):
        super().__init__(parent)
        self.setObjectName("cautionStrip")
        layout = QHBoxLayout(self)
        layout.setContentsMargins(10, 5, 10, 5)
        layout.setSpacing(10)
        mark = QLabel("CAUTION")
        mark.setObjectName("cautionMark")
        self.text = QLabel(CAUTION_TEXT)
        self.text.setWordWrap(True)
        self.radius = QLabel()
        self.radius.setAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        self.radius.setStyleSheet("font-weight: bold;")
        self.solar = QLabel()  # the Sun as a target: its caution, or why it is refused
        self.solar.setObjectName("solarCaution")
        self.solar.setWordWrap(True)
        self.solar.setStyleSheet("font-weight: bold;")
        self.solar.hide()
        text_column = QVBoxLayout()
        text_column.setSpacing(2)
        text_column.addWidget(self.text)
        text_column.addWidget(self.solar)
        layout.addWidget(mark)
        layout.addLayout(text_column, 1)
        layout.addWidget(self.radius)
        self.set_sun_avoidance(30.0)

    def set_solar(self, sun_target: bool, filter_fitted: bool) -> None:
        """With a Sun row: SOLAR_CAUTION when the solar option is on, else the refusal and
        its reason (core.limits); nothing without one."""
        from epochpoint.core.limits import SOLAR_CAUTION, SUN_REFUSED

        text = "" if not sun_target else SOLAR_CAUTION if filter_fitted else \
            (f"Target {SUN_REFUSED}: the site's solar option (a full-aperture solar filter "
             "declared fitted, [safety] solar_filter_fitted) is off.")
        self.solar.setText(text)
        self.solar.setVisible(bool(text))
        self.setAccessibleDescription(" ".join(filter(None, (CAUTION_TEXT, text,
                                                             self.radius.text()))))

    def set_sun_avoidance(self, radius_deg: float) -> None:
        if radius_deg > 0.0:
            self.radius.setText(f"Sun avoidance in force: {radius_deg:g}°")
        else:
            self.radius.setText("Sun avoidance is OFF for this site")
        self.setAccessibleDescription(f"{CAUTION_TEXT} {self.radius.text()}")


def show_safety_dialog(parent: QWidget | None) -> None:
    box = QMessageBox(parent)
    box.setWindowTitle("Safety cautions")
    box.setIcon(QMessageBox.Icon.Warning)
    box.setTextFormat(Qt.TextFormat.RichText)
    box.setText(SAFETY_TEXT)
    box.exec()
