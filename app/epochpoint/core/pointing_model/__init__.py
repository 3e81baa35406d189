"""The mount-frame stage: from the observed place to where a real mount's axes must go.

terms.py    the geometric terms (physical imperfections) of equatorial and alt-az mounts
fit.py      least-squares fit to centred stars, standard errors, robust outlier rejection
model.py    a fitted model: JSON form, mount readings <-> sky places
mount_frame.py  observed place -> model -> mount axes -> coordinates of date for a controller
"""
from .fit import PointingFit, PoorCoverage, fit_pointing_model
from .model import ModelError, PointingModel
from .terms import ALTAZ_TERMS, DEFAULT_TERMS, EQUATORIAL_TERMS, MOUNT_TYPES, term_set

__all__ = ["ALTAZ_TERMS", "DEFAULT_TERMS", "EQUATORIAL_TERMS", "MOUNT_TYPES", "ModelError",
           "PointingFit", "PointingModel", "PoorCoverage", "fit_pointing_model", "term_set"]
