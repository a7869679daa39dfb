"""The planpack command line: builds the parser from the command modules and runs one.

The commands live in :mod:`planpack.commands`, one module each, listed in
:data:`planpack.commands.COMMANDS`. Exit codes: 0 clean, 1 a plan has errors
(or warnings with --strict), 2 bad usage or an unreadable file, 3 an internal
error (a bug: please report). Messages go to stderr, results to stdout.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

from planpack import __version__
from planpack.commands import COMMANDS
from planpack.commands.common import (EXIT_INTERNAL, EXIT_OK, EXIT_PLAN_ERRORS, EXIT_USAGE, UsageError,
                                      check_source_date_epoch)

__all__ = ["main", "build_parser", "command_modules", "EXIT_OK", "EXIT_PLAN_ERRORS", "EXIT_USAGE", "EXIT_INTERNAL",
           "UsageError"]


def command_modules() -> list:
    """The command modules, in the order of the registry."""
    return [importlib.import_module(f"planpack.commands.{name}") for name in COMMANDS]


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="planpack", description="Check and compile HF net plans into schedules, a site and field cards.")
    p.add_argument("--version", action="version", version=f"planpack {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True
    for mod in command_modules():
        c = sub.add_parser(mod.NAME, help=mod.HELP, description=mod.DESCRIPTION)
        mod.add_arguments(c)
        c.set_defaults(func=mod.run)
    return p


def main(argv: list[str] | None = None) -> int:
    # first, before any command (and numpy, the YAML reader, ...) is imported
    problem = check_source_date_epoch()
    if problem:
        print(f"planpack: {problem}", file=sys.stderr)
        return EXIT_USAGE
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help (0) or usage error (2)
        return int(exc.code or 0)
    try:
        return args.func(args)
    except UsageError as exc:
        print(f"planpack: {exc}", file=sys.stderr)
        return EXIT_USAGE
    except KeyboardInterrupt:
        print("planpack: interrupted; nothing was written", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return EXIT_OK
    except Exception as exc:  # the last line of defence: never a traceback at the user
        if os.environ.get("PLANPACK_DEBUG"):
            raise
        print(f"planpack: internal error: {type(exc).__name__}: {exc}. This is a bug in planpack; "
              "please report it with the plan that caused it (set PLANPACK_DEBUG=1 for the traceback).", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
