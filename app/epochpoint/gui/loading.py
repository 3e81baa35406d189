"""Opening files in the app: a plan file, or a target list with a site and a night.

    load_path(path, site_spec=None, night=None, targets=None)
        -> (PlanDocument, document path or None)

A `.json` file is a plan file (io.planfile); anything else is a target list (CSV, ECSV,
VOTable; io.read_targets). A target list becomes an untitled plan: its site is `site_spec`
(a TOML site file or LAT,LON,HEIGHT) or, without one, a placeholder at latitude 0, longitude 0
that the window flags until the user sets the real site. `night` (YYYY-MM-DD) overrides the
plan file's date, or gives the target list's (default: today, UTC). Bad input raises
InputError (one line naming the file and place). `targets`, when given, are the list's rows
already read (the good rows of a list with bad ones, gui/refused_rows.py).
"""
from __future__ import annotations

import os
from dataclasses import replace

from epochpoint.io import read_site, read_targets
from epochpoint.io.errors import InputError
from epochpoint.io.planfile import NightSettings, PlanDocument, check_night, read_plan_file
from epochpoint.io.planningfields import with_planning_columns

from .document import placeholder_site, today_iso

PLAN_FILE_FILTER = "Epochpoint plans (*.json)"
TARGET_FILE_FILTER = "Target lists (*.csv *.ecsv *.xml *.vot *.votable)"


def is_plan_file(path) -> bool:
    return os.fspath(path).lower().endswith(".json")


def load_path(path, site_spec: str | None = None, night: str | None = None,
              targets=None) -> tuple[PlanDocument, str | None]:
    """The document in `path` and the path to keep for saving (None for a target list)."""
    path = os.fspath(path)
    if is_plan_file(path):
        doc = read_plan_file(path)
        if site_spec:
            doc.site = read_site(site_spec)
        kept = path
    else:
        targets = with_planning_columns(read_targets(path) if targets is None else targets,
                                        path)
        site = read_site(site_spec) if site_spec else placeholder_site()
        doc = PlanDocument(site=site, night=NightSettings(date=today_iso()), targets=targets)
        kept = None
    if night:
        try:
            doc.night = check_night(replace(doc.night, date=night))
        except ValueError as err:
            raise InputError(None, f"--night: {err}") from None
    return doc, kept
