"""The planpack command line.

Exit codes: 0 clean, 1 a plan has errors (or warnings with --strict),
2 bad usage or an unreadable file, 3 an internal error (a bug: please report).
Messages go to stderr, results to stdout.
"""

from __future__ import annotations

import argparse
import json
import os
import sys

from planpack import __version__

EXIT_OK, EXIT_PLAN_ERRORS, EXIT_USAGE, EXIT_INTERNAL = 0, 1, 2, 3
UNREADABLE = {"file-unreadable"}


class UsageError(Exception):
    """A problem with how planpack was called (exit 2)."""


def _use_colour(stream) -> bool:
    return stream.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"


def _paint(text: str, severity: str, colour: bool) -> str:
    if not colour:
        return text
    code = "31" if severity == "error" else "33"
    return f"\x1b[{code}m{text}\x1b[0m"


def print_diagnostics(diags, fmt: str) -> None:
    if fmt == "json":
        json.dump([d.to_dict() for d in diags], sys.stdout, indent=2)
        sys.stdout.write("\n")
        return
    if fmt == "github":
        for d in diags:
            level = "error" if d.severity == "error" else "warning"
            msg = d.message.replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")
            print(f"::{level} file={d.file},line={max(d.line, 1)},col={max(d.column, 1)},title={d.code}::{msg}")
        return
    colour = _use_colour(sys.stderr)
    for d in diags:
        print(_paint(d.format(), d.severity, colour), file=sys.stderr)


def _exit_for(diags, strict: bool) -> int:
    if any(d.code in UNREADABLE for d in diags):
        return EXIT_USAGE
    if any(d.severity == "error" for d in diags):
        return EXIT_PLAN_ERRORS
    if strict and diags:
        return EXIT_PLAN_ERRORS
    return EXIT_OK


def read_all(paths: list[str]):
    """Read every plan named (folders expanded); returns (results, usage problems)."""
    from planpack.plan import plan_files, read_plan

    files, problems = plan_files(paths)
    if problems:
        raise UsageError("; ".join(problems))
    return [read_plan(f) for f in files]


def cmd_check(args) -> int:
    results = read_all(args.plans)
    diags = []
    for r in results:
        diags += r.diagnostics
        if r.ok and not args.no_analysis:
            from planpack.compile import compile_plan

            diags += compile_plan(r.plan, cells=False).diagnostics
    print_diagnostics(diags, args.format)
    if args.format == "text" and not args.quiet:
        errors = sum(d.severity == "error" for d in diags)
        warnings = len(diags) - errors
        bad = sum(not r.ok for r in results)
        print(f"checked {len(results)} plan{'s' * (len(results) != 1)}: {bad} with errors, "
              f"{errors} error{'s' * (errors != 1)}, {warnings} warning{'s' * (warnings != 1)}", file=sys.stderr)
    return _exit_for(diags, args.strict)


def cmd_schema(args) -> int:
    from planpack.plan.schema import json_schema_text

    if args.output_schema:
        from planpack.output_schema import output_schema_text

        sys.stdout.write(output_schema_text())
    else:
        sys.stdout.write(json_schema_text())
    return EXIT_OK


def cmd_codes(args) -> int:
    from planpack.plan.diagnostics import CODES

    for code, text in CODES.items():
        print(f"{code:28s} {text}")
    return EXIT_OK


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="planpack", description="Check and compile HF net plans into schedules, a site and field cards.")
    p.add_argument("--version", action="version", version=f"planpack {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True

    c = sub.add_parser("check", help="check plans and report problems", description="Read every plan, print each problem as path:line:col: severity code: message.")
    c.add_argument("plans", nargs="+", metavar="PLAN", help="plan files or folders (every *.yaml under a folder, sorted)")
    c.add_argument("--format", choices=("text", "json", "github"), default="text", help="text (stderr), json (stdout) or github annotations (stdout)")
    c.add_argument("--strict", action="store_true", help="fail (exit 1) on warnings too")
    c.add_argument("--no-analysis", action="store_true", help="only read and validate; skip predictions and antenna checks")
    c.add_argument("-q", "--quiet", action="store_true", help="no summary line")
    c.set_defaults(func=cmd_check)

    s = sub.add_parser("schema", help="print the JSON Schema of the plan format", description="Print a JSON Schema of the plan format for editors.")
    s.add_argument("--output", dest="output_schema", action="store_true", help="print the schema of plan.json (the compiled plan) instead")
    s.set_defaults(func=cmd_schema)

    k = sub.add_parser("codes", help="list every diagnostic code", description="List every diagnostic code and what it means.")
    k.set_defaults(func=cmd_codes)

    _add_publish_commands(sub)
    from planpack.workflow import commands as workflow_commands

    workflow_commands.register(sub)
    from planpack.commands import request as request_command

    request_command.add_parser(sub)
    return p


def _add_publish_commands(sub) -> None:
    """Commands that compile and publish (build, cards)."""
    from planpack.publish import commands

    commands.register(sub)


def main(argv: list[str] | None = None) -> int:
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
