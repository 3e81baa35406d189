"""Build the demo plan file from the invented observatory's site and target list.

    .venv/bin/python sample_targets/build_demo_plan.py   (or: make sample_targets/loma_candil_plan.json)

Writes sample_targets/loma_candil_plan.json: the site file, the target list, the night of
2027-01-19 (astronomical darkness, 30 degrees from the Moon) and the schedule computed for
it. Everything in it is invented demo data.
"""
import os
import sys
import warnings

from epochpoint.core.timescale import StaleEarthOrientation
from epochpoint.io.planfile import (NightSettings, PlanDocument, schedule_entries,
                                    write_plan_file)
from epochpoint.io import read_site, read_targets
from epochpoint.io.planningfields import with_planning_columns
from epochpoint.core.plan import plan

HERE = os.path.dirname(os.path.abspath(__file__))
DESCRIPTION = ("Demo data: the invented Loma Candil Observatory and invented targets for "
               "Epochpoint's examples. Not a real site; do not observe these targets.")


def main(out_path: str) -> int:
    warnings.simplefilter("ignore", StaleEarthOrientation)
    site = read_site(os.path.join(HERE, "loma_candil.toml"))
    targets = with_planning_columns(read_targets(os.path.join(HERE, "loma_candil_targets.csv")))
    night = NightSettings(date="2027-01-19", darkness="astronomical", moon_separation=30.0)
    doc = PlanDocument(site=site, night=night, targets=targets, drift_tolerance_arcsec=1.0,
                       description=DESCRIPTION)
    doc.schedule = schedule_entries(plan(targets, site, night.date, **night.plan_options()))
    write_plan_file(out_path, doc)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1] if len(sys.argv) > 1 else
                  os.path.join(HERE, "loma_candil_plan.json")))
