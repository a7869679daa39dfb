"""What every command shares: exit codes, usage errors, printing diagnostics, reading plans.

This module imports no command (the commands import it), and nothing heavy at
import time: ``planpack --help`` and a refused ``SOURCE_DATE_EPOCH`` must not
pay for numpy or the YAML reader.

Exit codes: 0 clean, 1 a plan has errors (or warnings with --strict), 2 bad
usage or an unreadable file, 3 an internal error (a bug: please report).
"""

from __future__ import annotations

import argparse
import json
import os
import re
import sys

from planpack.errors import UsageError

EXIT_OK, EXIT_PLAN_ERRORS, EXIT_USAGE, EXIT_INTERNAL = 0, 1, 2, 3
UNREADABLE = {"file-unreadable"}
FORMATS = ("text", "json", "github")

__all__ = ["EXIT_OK", "EXIT_PLAN_ERRORS", "EXIT_USAGE", "EXIT_INTERNAL", "FORMATS", "UsageError", "bounded",
           "add_publish_options", "check_source_date_epoch", "compile_for_publishing", "exit_for", "github_annotation",
           "plural", "print_diagnostics", "read_all", "say"]


# ------------------------------------------------------------------ environment

#: The last second a four-digit year can show (9999-12-31T23:59:59Z); the date on a card has four digits.
MAX_EPOCH_S = 253_402_300_799
_EPOCH = re.compile(r"[0-9]{1,12}")  # ASCII digits only: str.isdigit() also accepts '²' and '٣'


def check_source_date_epoch(environ=None) -> str | None:
    """Why ``SOURCE_DATE_EPOCH`` cannot be used, or None when it is unset or a sane timestamp.

    The value must be what ``date +%s`` prints: an integer number of seconds
    since 1970-01-01 UTC in ASCII digits, here at most 9999-12-31T23:59:59Z
    (https://reproducible-builds.org/specs/source-date-epoch/ asks a tool to
    stop on a malformed value rather than guess).
    """
    env = os.environ if environ is None else environ
    raw = env.get("SOURCE_DATE_EPOCH")
    if raw is None:
        return None
    shown = ascii(raw) if len(raw) <= 40 else ascii(raw[:37]) + "..."
    if not _EPOCH.fullmatch(raw):
        return (f"SOURCE_DATE_EPOCH={shown} is not a timestamp: expected whole seconds since 1970-01-01 UTC "
                "written in digits 0-9, as 'date +%s' or 'git log -1 --format=%ct' print them")
    if int(raw) > MAX_EPOCH_S:
        return (f"SOURCE_DATE_EPOCH={shown} is after 9999-12-31 (at most {MAX_EPOCH_S}); "
                "expected whole seconds since 1970-01-01 UTC, as 'date +%s' prints them")
    return None


# ------------------------------------------------------------------ diagnostics

def _use_colour(stream) -> bool:
    return stream.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"


def _paint(text: str, severity: str, colour: bool) -> str:
    if not colour:
        return text
    code = "31" if severity == "error" else "33"
    return f"\x1b[{code}m{text}\x1b[0m"


def _annotation_data(text: str) -> str:
    """The message of a CI annotation: control characters shown escaped, then % CR LF as the syntax asks."""
    from planpack.plan.diagnostics import printable

    return printable(text).replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")


def _annotation_property(text: str) -> str:
    """A property value of a CI annotation: as data, and ':' ',' escaped so no field can be added or ended."""
    return _annotation_data(text).replace(":", "%3A").replace(",", "%2C")


def github_annotation(d) -> str:
    """One diagnostic as a workflow command line, which no file name or key can steer.

    The syntax (``::error file=F,line=L,col=C,title=T::MESSAGE``) is GitHub
    Actions' "workflow commands" format; its runner unescapes %25, %0D, %0A in
    the message and also %3A, %2C in properties.
    """
    level = "error" if d.severity == "error" else "warning"
    return (f"::{level} file={_annotation_property(d.file)},line={max(int(d.line), 1)},col={max(int(d.column), 1)},"
            f"title={_annotation_property(d.code)}::{_annotation_data(d.message)}")


def print_diagnostics(diags, fmt: str) -> None:
    """Diagnostics as text lines on stderr, a JSON list on stdout, or CI annotations on stdout."""
    if fmt == "json":
        json.dump([d.to_dict() for d in diags], sys.stdout, indent=2)
        sys.stdout.write("\n")
        return
    if fmt == "github":
        for d in diags:
            print(github_annotation(d))
        return
    colour = _use_colour(sys.stderr)
    for d in diags:
        print(_paint(d.format(), d.severity, colour), file=sys.stderr)


def exit_for(diags, strict: bool) -> int:
    """The exit code diagnostics call for: 2 an unreadable file, 1 errors (or any warning with strict), else 0."""
    if any(d.code in UNREADABLE for d in diags):
        return EXIT_USAGE
    if any(d.severity == "error" for d in diags):
        return EXIT_PLAN_ERRORS
    if strict and diags:
        return EXIT_PLAN_ERRORS
    return EXIT_OK


# ------------------------------------------------------------------ plans and options

def read_all(paths: list[str]):
    """Read every plan named (folders expanded, sorted); a name that names nothing is a UsageError."""
    from planpack.plan import plan_files, read_plan

    files, problems = plan_files(paths)
    if problems:
        raise UsageError("; ".join(problems))
    return [read_plan(f) for f in files]


def say(args, text: str) -> None:
    """A progress or summary line on stderr, unless -q."""
    if not getattr(args, "quiet", False):
        print(f"planpack: {text}", file=sys.stderr)


def bounded(cast, low, high, what: str):
    """An argparse type: ``cast(text)`` between low and high, else a message naming what was expected."""
    def parse(text: str):
        try:
            v = cast(text)
        except (ValueError, OverflowError):
            v = None
        if v is None or v != v or not low <= v <= high:
            raise argparse.ArgumentTypeError(f"expected {what}, got '{text}'")
        return v
    return parse


def plural(n: int, word: str) -> str:
    return f"{n} {word}{'s' * (n != 1)}"


# ------------------------------------------------------------------ publishing commands (build, cards)

def add_publish_options(parser, verb: str) -> None:
    """The options every publishing command shares; ``verb`` says what --strict stops ("build", "write")."""
    parser.add_argument("--force", action="store_true",
                        help="replace DIR even when it is not empty and was not made by planpack")
    parser.add_argument("--strict", action="store_true", help=f"treat warnings as errors: {verb} nothing (exit 1)")
    parser.add_argument("--no-cache", action="store_true",
                        help="compile and render afresh; neither read nor write the cache")
    parser.add_argument("--format", choices=FORMATS, default="text",
                        help="how to print diagnostics: text (stderr), json or github annotations (stdout)")
    parser.add_argument("-q", "--quiet", action="store_true", help="no progress and no summary line")


def compile_for_publishing(args, verb: str, step=None):
    """Read and compile ``args.plans`` as ``check`` would, printing the diagnostics the same way.

    Returns ``(pairs, diagnostics, code)``: ``pairs`` is ``[(ReadResult, compiled plan)]`` and
    ``code`` is EXIT_OK when publishing may go ahead; otherwise the run says that nothing was ``verb``.
    """
    from planpack.publish import pipeline

    results = read_all(args.plans)
    diags = [d for r in results for d in r.diagnostics]
    if any(not r.ok for r in results):
        print_diagnostics(diags, args.format)
        say(args, f"{plural(sum(not r.ok for r in results), 'plan')} with errors; nothing was {verb}")
        return [], diags, exit_for(diags, args.strict)
    pairs = pipeline.compile_results(results, use_cache=not args.no_cache, step=step)
    diags += [d for _, c in pairs for d in c.diagnostics]
    print_diagnostics(diags, args.format)
    code = exit_for(diags, args.strict)
    if code != EXIT_OK:
        say(args, "the plans have " + ("warnings and --strict is set" if args.strict and not any(
            d.severity == "error" for d in diags) else "errors") + f"; nothing was {verb}")
    return pairs, diags, code
