"""The `epochpoint` command line: parses arguments, calls the same functions a script would,
formats the result. Errors are one line on stderr and a non-zero exit; never a traceback.
"""
from __future__ import annotations

import argparse
import sys
import warnings

from ..core.timescale import StaleEarthOrientation
from ..io.atomic import termination_cleanup
from . import (batch_cmd, drift_cmd, events_cmd, export_cmd, gui_cmd, mount_cmd, plan_cmd,
               pointing_cmd, positions_cmd)

EXIT_INPUT_ERROR = 2
COMMANDS = {"positions": positions_cmd, "drift": drift_cmd, "plan": plan_cmd,
            "export": export_cmd, "mount": mount_cmd, "gui": gui_cmd, "batch": batch_cmd,
            "events": events_cmd, "pointing": pointing_cmd}


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage errors in one line with our prefix."""

    def error(self, message):
        self.exit(EXIT_INPUT_ERROR, f"epochpoint: error: {message} (see --help)\n")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="epochpoint",
                     description="Epoch-corrected positions, drift checks and night plans.")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND",
                                parser_class=_Parser)
    for name, module in COMMANDS.items():
        module.add_parser(sub)
    return parser


def _warning_line(message, category, *args, **kwargs):
    label = "warning"
    if issubclass(category, StaleEarthOrientation):
        label = "warning (Earth orientation)"
    print(f"epochpoint: {label}: {message}", file=sys.stderr)


def main(argv=None) -> int:
    """Entry point of the console script; returns the exit status."""
    try:
        args = build_parser().parse_args(argv)
    except SystemExit as done:
        if not done.code:
            raise  # --help and --version end here, as argparse intends
        return done.code  # a usage error, already said in one line: like any input error
    warnings.showwarning = _warning_line
    warnings.filterwarnings("ignore", module="erfa")
    warnings.filterwarnings("ignore", module="astropy")
    try:
        # SIGTERM removes any half-written output before the process ends (status 143).
        with termination_cleanup():
            return COMMANDS[args.command].run(args) or 0
    except (ValueError, OSError) as exc:
        # InputError, SiteError, TargetError and TimeInputError are ValueErrors with
        # one-line messages that name the file, row and column where they know them.
        print(f"epochpoint: error: {_one_line(exc)}", file=sys.stderr)
        return EXIT_INPUT_ERROR
    except KeyboardInterrupt:
        print("epochpoint: interrupted", file=sys.stderr)
        return 130


def _one_line(exc: BaseException) -> str:
    if isinstance(exc, OSError) and exc.filename:
        return f"{exc.filename}: {exc.strerror or exc}"
    text = " ".join(str(exc).split())
    return text or type(exc).__name__



if __name__ == "__main__":
    sys.exit(main())
