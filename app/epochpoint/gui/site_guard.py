"""Edits in the Site & limits form that could not be applied are never dropped in silence.

The form applies an edit only when the whole form is valid (panels.site_editor), so a good
value can wait behind a wrong one in another field. Before the plan is saved, and before it is
closed, the form's typed values are confirmed; if a field still keeps them from applying, the
save is refused (or, when a person is there to answer, they choose to discard the edits or go
back and fix them), and the message names the field and what is wrong with it.
"""
from __future__ import annotations

from PySide6.QtWidgets import QMessageBox

from .panels.site_editor import MOUNT_FIELDS, PLACE_FIELDS, SAFETY_FIELDS, WEATHER_FIELDS

FIELD_LABELS = {key: label for key, label, _ in
                PLACE_FIELDS + WEATHER_FIELDS + MOUNT_FIELDS + SAFETY_FIELDS}
FIELD_LABELS.update(timezone="Time zone", mount_type="Mount type", horizon="Horizon mask")


def unapplied_site_edits(editor) -> dict:
    """{field key: 'Label: reason'} of the fields that keep the form's edits from applying,
    after confirming any value still being typed (as Enter would)."""
    editor.commit()
    return {key: f"{FIELD_LABELS.get(key, key)}: {message}"
            for key, message in editor.problems.items()}


def site_edits_settled(window, doing: str) -> bool:
    """True when nothing typed in the Site & limits form would be lost by `doing` ('save',
    'close the plan'); otherwise tell, show the field, and return False unless the person
    chooses to discard the edits."""
    editor = window.site_editor
    problems = unapplied_site_edits(editor)
    if not problems:
        return True
    fields = "; ".join(problems.values())
    text = f"The Site & limits tab has edits that are not applied because of {fields}"
    if window.interactive:
        answer = QMessageBox.question(
            window, "Site edits not applied",
            f"{text}.\n\nDiscard these edits and {doing}, or cancel to fix them? (The site "
            "in force is the one shown before the edits.)",
            QMessageBox.StandardButton.Discard | QMessageBox.StandardButton.Cancel,
            QMessageBox.StandardButton.Cancel)
        if answer == QMessageBox.StandardButton.Discard:
            editor.set_site(window.document.site)
            return True
    window.show_message(f"Did not {doing}: {text}. Fix it there, then {doing} again.", 20000)
    window.tabs.setCurrentWidget(editor)
    first = editor.fields.get(next(iter(problems)))
    if first is not None:
        first.setFocus()
    return False
