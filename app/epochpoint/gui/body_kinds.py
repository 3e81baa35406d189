"""What kind of target each row is, in our own short words: a star, the Sun, the Moon, a
planet, a dwarf planet, an asteroid or a comet.

A row is a body by the same rule the engine uses (core/bodies/rows.py: a `body` cell, or any
orbital element). A minor body given by its perihelion time and distance, or with comet
magnitude parameters, is a comet (the layout the Minor Planet Center's comet format uses);
one given by a mean anomaly is an asteroid.
"""
from __future__ import annotations

import numpy as np

from epochpoint.core.bodies.ephemeris import MAJOR_BODIES
from epochpoint.core.bodies.rows import BODY_COLUMNS, blank, body_rows

KIND_OF_BODY = {"sun": "Sun", "moon": "Moon", "pluto": "dwarf planet"}
# The bodies the "add a body" dialog offers, with the names shown.
BODY_CHOICES = tuple((key, key.capitalize()) for key in MAJOR_BODIES)


def kind_of_body(body: str) -> str:
    return KIND_OF_BODY.get(body, "planet")


def row_kinds(columns: dict) -> np.ndarray:
    """Per row: 'star', 'Sun', 'Moon', 'planet', 'dwarf planet', 'asteroid' or 'comet'."""
    n = len(columns["name"])
    extra = {k: columns[k] for k in BODY_COLUMNS if k in columns}
    kinds = np.full(n, "star", dtype=object)
    for i in np.flatnonzero(body_rows(extra, n)).tolist():
        body = extra.get("body", [""] * n)[i]
        if not blank(body):
            kinds[i] = kind_of_body(str(body).strip().lower())
            continue
        cometary = any(not blank(extra[c][i]) for c in
                       ("perihelion_time", "comet_m1", "comet_k1") if c in extra)
        kinds[i] = "comet" if cometary else "asteroid"
    return kinds
