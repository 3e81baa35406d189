"""A date field that reads a typed date as typed.

QDateEdit edits one section (year, month, day) at a time: a click in the month puts the
cursor there, and typing "2027-03-15" then fills the month and day with the wrong digits
(2027-01-03); typed over a selected year it keeps the old year. Here the digits and dashes
typed after entering the field (a click or Tab) are read together as one date in the shown
order, yyyy-MM-dd (ISO 8601; also yyyyMMdd), and set once they form a valid date. Any other
key (arrows, Up/Down) ends the typing and edits sections as usual.
"""
from __future__ import annotations

import re

from PySide6.QtCore import QDate, QEvent, Qt
from PySide6.QtWidgets import QDateEdit

DATE_FORMAT = "yyyy-MM-dd"
TYPED_DATE = re.compile(r"^(\d{4})-(\d{1,2})-(\d{1,2})$|^(\d{4})(\d{2})(\d{2})$")


def typed_date(text: str) -> QDate | None:
    """The date typed so far, if it is a whole valid one."""
    match = TYPED_DATE.match(text)
    if match is None:
        return None
    y, m, d = (int(g) for g in match.groups() if g is not None)
    date = QDate(y, m, d)
    return date if date.isValid() else None


class DateField(QDateEdit):
    """QDateEdit in ISO order with a calendar that reads a whole typed date."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setDisplayFormat(DATE_FORMAT)
        self.setCalendarPopup(True)
        self.typed = ""
        self.lineEdit().installEventFilter(self)  # clicks land on the text, not on us

    def focusInEvent(self, event):  # noqa: N802 (Qt name)
        super().focusInEvent(event)
        self.typed = ""

    def focusOutEvent(self, event):  # noqa: N802 (Qt name)
        if self.typed:
            self.typed = ""
            # An unfinished date is dropped: show the date in force.
            self.lineEdit().setText(self.textFromDateTime(self.dateTime()))
        super().focusOutEvent(event)

    def eventFilter(self, watched, event):  # noqa: N802 (Qt name)
        if watched is self.lineEdit() and event.type() == QEvent.Type.MouseButtonPress:
            self.typed = ""  # a click starts a new date
        return super().eventFilter(watched, event)

    def keyPressEvent(self, event):  # noqa: N802 (Qt name)
        text = event.text()
        if text and (text.isdigit() or text == "-"):
            self.typed += text
        elif event.key() == Qt.Key.Key_Backspace and self.typed:
            self.typed = self.typed[:-1]
        else:
            self.typed = ""
            super().keyPressEvent(event)
            return
        date = typed_date(self.typed)
        if date is not None and self.minimumDate() <= date <= self.maximumDate():
            typed, self.typed = self.typed, ""
            self.setDate(date)
            self.typed = typed  # more digits may follow (a one-digit day)
        self.lineEdit().setText(self.typed or self.text())
        event.accept()
