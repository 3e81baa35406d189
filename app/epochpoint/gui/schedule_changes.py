"""What a new schedule changed against the one shown before: blocks added, removed and moved.

Blocks are matched by target name (a name scheduled twice is matched in time order); a block
moved when its start differs by more than MOVED_S seconds. Entries are the plan file's
{"name", "start", "end"} with ISO 8601 UTC times.
"""
from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

MOVED_S = 1.0


@dataclass(frozen=True)
class ScheduleChanges:
    added: tuple
    removed: tuple
    moved: tuple

    @property
    def unchanged(self) -> bool:
        return not (self.added or self.removed or self.moved)

    def text(self) -> str:
        """'unchanged', or e.g. '2 added (Wick, Tallow), 1 removed (Ashlamp), 3 moved'."""
        if self.unchanged:
            return "unchanged"
        parts = []
        for word, names in (("added", self.added), ("removed", self.removed),
                            ("moved", self.moved)):
            if names:
                shown = ", ".join(names[:4]) + (", …" if len(names) > 4 else "")
                parts.append(f"{len(names)} {word} ({shown})")
        return ", ".join(parts)


def _instant(text: str) -> dt.datetime:
    return dt.datetime.fromisoformat(text.replace("Z", "+00:00"))


def schedule_changes(before: list, after: list) -> ScheduleChanges:
    """The changes from the entries `before` to the entries `after`."""
    def by_name(entries):
        out: dict = {}
        for e in sorted(entries, key=lambda e: e["start"]):
            out.setdefault(e["name"], []).append(_instant(e["start"]))
        return out

    old, new = by_name(before), by_name(after)
    added, removed, moved = [], [], []
    for name in sorted(set(old) | set(new)):
        a, b = old.get(name, []), new.get(name, [])
        for t_old, t_new in zip(a, b):
            if abs((t_new - t_old).total_seconds()) > MOVED_S:
                moved.append(name)
        added += [name] * max(0, len(b) - len(a))
        removed += [name] * max(0, len(a) - len(b))
    return ScheduleChanges(tuple(added), tuple(removed), tuple(moved))
