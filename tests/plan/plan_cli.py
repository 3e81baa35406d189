"""Running `epochpoint plan` in-process for the tests, and reading what it prints."""
from __future__ import annotations

import datetime as dt
import json
import re
from pathlib import Path

from epochpoint.cli.main import main

ROOT = Path(__file__).resolve().parents[2]
DEMO_TARGETS = ROOT / "sample_targets" / "loma_candil_targets.csv"
DEMO_SITE = ROOT / "sample_targets" / "loma_candil.toml"
# ISO 8601 UTC with a trailing Z (the project's rule for every time at a boundary).
ISO_Z = re.compile(r"^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z$")


def run_cli(capsys, *argv) -> tuple[int, str, str]:
    """(exit status, stdout, stderr) of `epochpoint ARGV`; argparse's exits are caught."""
    capsys.readouterr()
    try:
        code = main([str(a) for a in argv])
    except SystemExit as stop:
        code = stop.code
    out, err = capsys.readouterr()
    return code, out, err


def plan_json(capsys, *argv) -> dict:
    code, out, err = run_cli(capsys, "plan", *argv, "--format", "json")
    assert code == 0, err
    return json.loads(out)


def utc(iso: str) -> dt.datetime:
    return dt.datetime.fromisoformat(iso.replace("Z", "+00:00"))
