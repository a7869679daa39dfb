"""Read, check and compile plans for a publishing command; nothing is written here.

Both ``build`` and ``cards`` go through :func:`compile_all`, so both stop on
errors with the same diagnostics and exit codes as ``check``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable


def add_publish_options(parser, verb: str) -> None:
    """The options every publishing command shares; ``verb`` says what --strict stops ("build", "write")."""
    parser.add_argument("--force", action="store_true",
                        help="replace DIR even when it is not empty and was not made by planpack")
    parser.add_argument("--strict", action="store_true", help=f"treat warnings as errors: {verb} nothing (exit 1)")
    parser.add_argument("--no-cache", action="store_true", help="compile afresh; do not read or write .planpack-cache/")
    parser.add_argument("--format", choices=("text", "json", "github"), default="text",
                        help="how to print diagnostics: text (stderr), json or github annotations (stdout)")
    parser.add_argument("-q", "--quiet", action="store_true", help="no progress and no summary line")


@dataclass
class Compiled:
    """The plans of one command run, compiled; ``code`` is 0 when publishing may go ahead."""

    pairs: list  # [(ReadResult, CompiledPlan)]
    diagnostics: list
    code: int


def compile_all(args, verb: str, step: Callable[[int, int, str], None] | None = None,
                say: Callable[[str], None] | None = None) -> Compiled:
    """Read and compile every plan in ``args.plans``; print diagnostics as ``check`` would.

    ``verb`` finishes the sentence "...; nothing was <verb>" when the run stops.
    """
    from planpack import cli
    from planpack.workflow.cache import cached_compile

    results = cli.read_all(args.plans)
    diags = [d for r in results for d in r.diagnostics]
    if any(not r.ok for r in results):
        cli.print_diagnostics(diags, args.format)
        if say:
            say(f"{sum(not r.ok for r in results)} plan(s) have errors; nothing was {verb}")
        return Compiled([], diags, cli._exit_for(diags, args.strict))
    pairs = []
    for i, r in enumerate(results, 1):
        if step:
            step(i, len(results), f"compiling {r.plan.net.id}")
        c = cached_compile(r.plan, enabled=not getattr(args, "no_cache", False))
        pairs.append((r, c))
        diags += list(c.diagnostics)
    cli.print_diagnostics(diags, args.format)
    code = cli._exit_for(diags, args.strict)
    if code != cli.EXIT_OK and say:
        say("the plans have " + ("warnings and --strict is set" if args.strict else "errors") + f"; nothing was {verb}")
    seen: dict[str, str] = {}
    for r, c in pairs:
        nid = c.data["net"]["id"]
        if nid in seen:
            raise cli.UsageError(f"{r.plan.source} and {seen[nid]} both define net '{nid}'; each net needs its own id")
        seen[nid] = r.plan.source
    return Compiled(pairs, diags, code)
