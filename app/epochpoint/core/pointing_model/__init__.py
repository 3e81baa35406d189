"""The mount-frame stage: from the observed place to where a real mount's axes must go.

terms.py    the geometric terms (physical imperfections) of equatorial, German and alt-az
            mounts; which of a German mount's terms change sign with the pier side
pier_sides.py   a German mount's pier sides and mechanical axis angles (the one home of that
            geometry: slews, interlocks and the scheduler's slew costs)
fit.py      least-squares fit to centred stars, standard errors, robust outlier rejection
model.py    a fitted model: JSON form, mount readings <-> sky places (on a pier side)
mount_frame.py  observed place -> model -> mount axes -> coordinates of date for a controller
"""
from .fit import PointingFit, PoorCoverage, fit_pointing_model
from .model import ModelError, PointingModel
from .pier_sides import PIER_SIDES, pier_side_for
from .terms import (ALTAZ_TERMS, DEFAULT_TERMS, EQUATORIAL_TERMS, GERMAN_TERMS,
                    HOUR_ANGLE_MOUNTS, MOUNT_TYPES, term_set)

__all__ = ["ALTAZ_TERMS", "DEFAULT_TERMS", "EQUATORIAL_TERMS", "GERMAN_TERMS",
           "HOUR_ANGLE_MOUNTS", "MOUNT_TYPES", "ModelError", "PIER_SIDES", "PointingFit",
           "PointingModel", "PoorCoverage", "fit_pointing_model", "pier_side_for", "term_set"]
