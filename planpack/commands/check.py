"""``planpack check``: read every plan and print each problem as ``path:line:col: severity code: message``.

Everything ``build`` would refuse is reported here first: reading and
validation errors, and (unless ``--no-analysis``) what the predictions and the
antenna solutions find, and field cards that cannot be laid out.
"""

from __future__ import annotations

import sys

from planpack.commands.common import FORMATS, exit_for, plural, print_diagnostics, read_all

NAME = "check"
HELP = "check plans and report problems"
DESCRIPTION = "Read every plan, print each problem as path:line:col: severity code: message."


def add_arguments(p) -> None:
    p.add_argument("plans", nargs="+", metavar="PLAN", help="plan files or folders (every *.yaml under a folder, sorted)")
    p.add_argument("--format", choices=FORMATS, default="text", help="text (stderr), json (stdout) or github annotations (stdout)")
    p.add_argument("--strict", action="store_true", help="fail (exit 1) on warnings too")
    p.add_argument("--no-analysis", action="store_true", help="only read and validate; skip predictions and antenna checks")
    p.add_argument("-q", "--quiet", action="store_true", help="no summary line")


def run(args) -> int:
    results = read_all(args.plans)
    diags = []
    with_errors = 0
    for r in results:
        found = list(r.diagnostics)
        if r.ok and not args.no_analysis:
            from planpack.compile import compile_plan
            from planpack.publish.pipeline import card_problems

            compiled = compile_plan(r.plan, cells=False)
            found += compiled.diagnostics
            if not any(d.severity == "error" for d in compiled.diagnostics):
                found += card_problems(r, compiled.data)
        # a plan counts as having errors whether reading or the analysis found them
        with_errors += any(d.severity == "error" for d in found)
        diags += found
    print_diagnostics(diags, args.format)
    if args.format == "text" and not args.quiet:
        errors = sum(d.severity == "error" for d in diags)
        print(f"checked {plural(len(results), 'plan')}: {with_errors} with errors, "
              f"{plural(errors, 'error')}, {plural(len(diags) - errors, 'warning')}", file=sys.stderr)
    return exit_for(diags, args.strict)
