"""`epochpoint plan`: the night's boundaries, each target's windows and an observing order."""
from __future__ import annotations

import json
import sys

import numpy as np

from ..core.plan import (DARKNESS_LEVELS, SCHEDULE_ITERATIONS, SCHEDULE_SECONDS,
                         SCHEDULE_SEED, plan)
from ..core.schedule import MAX_ITERATIONS
from . import checks, common
from .people import PeopleColumn, people_table

FORMATS = ["table", "json", "csv"]
# Longest schedule search the command line allows (an hour; the default search stops on its
# iteration limit after about 0.1 s on the demo).
MAX_SCHEDULE_SECONDS = 3600.0


def add_parser(sub) -> None:
    p = sub.add_parser("plan", help="when each target is observable tonight, and in what order",
                       description="Plan the local night starting on DATE at the site: sunset, "
                                   "twilights and sunrise, the Moon, each target's windows "
                                   "(altitude, horizon mask, Moon, mount limits, Sun avoidance) "
                                   "and an observing order that favours high priorities.")
    common.add_targets_argument(p)
    common.add_site_arguments(p)
    p.add_argument("--night", required=True, metavar="YYYY-MM-DD",
                   help="local date of the evening the night starts")
    p.add_argument("--min-altitude", type=checks.number(0.0, 90.0, unit="deg"), metavar="DEG",
                   help="lowest observed altitude (default: the mount's minimum altitude)")
    p.add_argument("--max-airmass", type=checks.number(1.0), metavar="X",
                   help="highest airmass allowed (1 or more)")
    p.add_argument("--darkness", choices=DARKNESS_LEVELS, default="astronomical",
                   help="how dark the sky must be (default astronomical: Sun below -18 deg)")
    p.add_argument("--moon-separation", type=checks.number(0.0, 180.0, unit="deg"), default=0.0,
                   metavar="DEG",
                   help="smallest distance from the Moon while it is up (default 0: none)")
    p.add_argument("--moon-scaled", action="store_true",
                   help="scale the Moon distance with the Moon's illuminated fraction")
    common.add_solar_option(p, "planned")
    p.add_argument("--schedule-seconds", type=checks.number(0.0, MAX_SCHEDULE_SECONDS, unit="s"),
                   default=SCHEDULE_SECONDS, metavar="S",
                   help=f"upper limit on the time the scheduler may spend improving the order "
                        f"(default {SCHEDULE_SECONDS:g}); it normally stops earlier, after "
                        f"--schedule-iterations")
    p.add_argument("--schedule-iterations", type=checks.count(0), default=SCHEDULE_ITERATIONS,
                   metavar="N", help=f"improvement rounds of the scheduler (default "
                                     f"{MAX_ITERATIONS}, fewer for long lists)")
    p.add_argument("--seed", type=checks.count(0), default=SCHEDULE_SEED, metavar="N",
                   help=f"seed of the scheduler's random choices: the same seed gives the same "
                        f"order (default {SCHEDULE_SEED})")
    common.add_output_arguments(p, FORMATS)
    p.add_argument("--chart", metavar="FILE.png",
                   help="also draw observed altitude against time to a PNG file")
    p.add_argument("--chart-targets", type=checks.count(1), default=12, metavar="N",
                   help="how many targets the chart shows (highest priority first)")


def run(args) -> int:
    targets = common.load_targets(args)
    site = common.with_solar_option(common.load_site(args), args)
    events = _events(targets, args)
    result = plan(targets, site, args.night, darkness=args.darkness,
                  min_altitude=args.min_altitude, max_airmass=args.max_airmass,
                  moon_separation=args.moon_separation, moon_scale=args.moon_scaled,
                  max_seconds=args.schedule_seconds, seed=args.seed,
                  max_iterations=args.schedule_iterations, events=events,
                  time_constraints=_time_constraints(targets, events, args))
    if args.chart:
        from ..charts import save_night_chart
        save_night_chart(result, args.chart, top_n=args.chart_targets)
    data = result.to_json()
    if args.format == "json":
        # The C encoder (no indent) keeps 10,000-target plans fast.
        _write(args, json.dumps(data) + "\n")
    elif args.format == "csv":
        _write(args, _schedule_csv(result, data))
    else:
        _write(args, _people(result, data))
    return 0


def _events(targets, args):
    """The targets' event ephemerides when the file has event columns, else None."""
    if "event_epoch" not in targets.extra:
        return None
    from ..io.eventfields import event_ephemerides
    return event_ephemerides(targets, args.targets)


def _time_constraints(targets, events, args):
    """The targets' not_before/not_after and phase windows when the file has such columns,
    else None."""
    from ..io.timeconstraintfields import time_constraints
    return time_constraints(targets, events, args.targets)


def _write(args, text: str) -> None:
    if args.output:
        from ..io import atomic_write_text
        atomic_write_text(args.output, text)
    else:
        sys.stdout.write(text)


def _local(result, iso: str | None) -> str:
    """'HH:MM ABBR (HH:MM UTC)' for an ISO instant (the site zone's abbreviation or offset),
    or 'none'."""
    return common.local_clock_text(iso, result.site.timezone)


def _window_text(result, start_s: float, end_s: float) -> str:
    """'HH:MM-HH:MM' in the site's zone (the column header names the zone)."""
    start = common.local_datetime(result.iso(start_s), result.site.timezone)
    end = common.local_datetime(result.iso(end_s), result.site.timezone)
    return f"{start:%H:%M}-{end:%H:%M}"


def _zone_abbreviations(result) -> str:
    """The zone's abbreviation(s) in force over the night, e.g. 'MST' or 'CET/CEST'."""
    names = []
    for t in (result.night.window_start, result.night.window_end):
        name = common.local_datetime(t.isot + "Z", result.site.timezone).tzname()
        if name not in names:
            names.append(name)
    return "/".join(names)


def _schedule_csv(result, data) -> str:
    """The observing order as CSV rows (one per block), then the targets left out."""
    from ..io import write_result

    columns = {"name": np.array([e["name"] for e in data["schedule"]], dtype=object),
               "start": np.array([e["start"] for e in data["schedule"]], dtype=object),
               "end": np.array([e["end"] for e in data["schedule"]], dtype=object),
               "slew_s": np.array([e["slew_s"] for e in data["schedule"]], dtype=float)}
    meta = {"site": data["site"], "night": data["date"], "darkness": data["darkness"]}
    meta.update({k: v for k, v in data["night"].items()})
    meta["unscheduled"] = "; ".join(f"{u['name']} ({u['reason']})" for u in data["unscheduled"])
    meta["cautions"] = " | ".join(data["cautions"])
    return write_result(columns, meta, None, "csv")


def _people(result, data) -> str:
    """The plan for reading before dusk: the night, the Moon, windows, then the order."""
    night, moon = data["night"], data["moon"]
    lines = [f"Night of {data['date']} at {data['site']} ({data['darkness']} darkness)",
             common.zone_line(result.site), ""]
    lines[2:2] = data["cautions"]
    for key in night:
        lines.append(f"  {key.replace('_', ' '):<28} {_local(result, night[key])}")
    lit = moon.get("illumination")
    lines += ["", f"  Moon: {100 * lit:.0f}% lit, {'waxing' if moon.get('waxing') else 'waning'}"
              f"; rises {_local(result, moon.get('moonrise'))}, "
              f"sets {_local(result, moon.get('moonset'))}", ""]
    w = result.windows
    window_text = np.array(["; ".join(_window_text(result, s, e) for s, e in win)
                            for win in w.windows], dtype=object)
    table = {"name": w.names, "priority": result.priority,
             "transit": np.array([_local(result, t["transit"]) for t in data["targets"]],
                                 dtype=object),
             "max_altitude": w.max_altitude, "windows": window_text,
             "reason": np.array([r or "" for r in w.reason], dtype=object)}
    columns = [PeopleColumn("Name", "name", str), PeopleColumn("Pri", "priority", "{:.0f}"),
               PeopleColumn("Transit", "transit", str),
               PeopleColumn("Max alt deg", "max_altitude", "{:6.1f}"),
               PeopleColumn(f"Windows ({_zone_abbreviations(result)})", "windows", str),
               PeopleColumn("Not observable because", "reason", str)]
    text = people_table(table, columns, lines + ["Targets:"])
    order = {"start": np.array([_local(result, e["start"]) for e in data["schedule"]], dtype=object),
             "end": np.array([_local(result, e["end"]) for e in data["schedule"]], dtype=object),
             "name": np.array([f"{e['name']} (fixed: {e['kind']} {e['cycle']})"
                               if e.get("fixed") else e["name"] for e in data["schedule"]],
                              dtype=object),
             "slew": np.array([e["slew_s"] for e in data["schedule"]], dtype=float)}
    text += "\n" + people_table(order, [PeopleColumn("Start", "start", str),
                                        PeopleColumn("End", "end", str),
                                        PeopleColumn("Target", "name", str),
                                        PeopleColumn("Slew s", "slew", "{:5.0f}")],
                                [f"Observing order ({len(data['schedule'])} blocks):"])
    text += _search_line(data["search"])
    if data["unscheduled"]:
        text += "\nNot scheduled:\n" + "".join(f"  {u['name']}: {u['reason']}\n"
                                              for u in data["unscheduled"])
    if data.get("collisions"):
        text += "\nEvents that collide with a reserved one:\n" + "".join(
            f"  {c['name']} cycle {c['cycle']} ({_local(result, c['start'])} to "
            f"{_local(result, c['end'])}): overlaps the block reserved for {c['lost_to']}\n"
            for c in data["collisions"])
    return text


# How people read what ended the schedule search.
_STOPPED_BY_WORDS = {"iterations": "its iteration limit", "patience": "no improvement for a while",
                     "time": "its time limit (another run may differ)",
                     "empty": "nothing to improve"}


def _search_line(search: dict) -> str:
    return (f"Search: {search['iterations']} iterations with seed {search['seed']}, stopped by "
            f"{_STOPPED_BY_WORDS.get(search['stopped_by'], search['stopped_by'])}.\n")
