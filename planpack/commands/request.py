"""``planpack request``: the fewest frequencies to ask the spectrum manager for, proven by the link budget.

Reads one plan, solves its antennas, predicts its assigned channels and then
every candidate frequency on the links with gaps, and chooses with an
integer programme (HiGHS) the fewest new frequencies that serve every
(link, hour) pair any frequency can serve; ``--max N`` the N serving the
most. Prints the request as text, Markdown or JSON on stdout; ``--pdf FILE``
also writes the one-page request sheet.

Exit codes as the other commands: 0 done (also when the plan has no gaps),
1 the plan has errors, 2 bad usage or an unreadable file.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import sys
import tempfile

FORMATS = ("text", "markdown", "json")
_SEGMENT = re.compile(r"\s*([0-9]+(?:\.[0-9]+)?)\s*(?:-\s*([0-9]+(?:\.[0-9]+)?))?\s*\Z")


def _segments(text: str, allow_single: bool) -> list:
    """'3000-4000,5000' -> [[3000.0, 4000.0], 5000.0] [kHz]."""
    out = []
    for part in text.split(","):
        m = _SEGMENT.match(part)
        if not m or (m[2] is None and not allow_single):
            want = "LOW-HIGH or a single frequency" if allow_single else "LOW-HIGH"
            raise argparse.ArgumentTypeError(f"expected comma-separated {want} in kHz (e.g. 2000-4500,6200-7000), got '{part.strip()}'")
        out.append([float(m[1]), float(m[2])] if m[2] is not None else float(m[1]))
    return out


def _bands(text: str) -> list:
    return _segments(text, allow_single=False)


def _exclusions(text: str) -> list:
    return _segments(text, allow_single=True)


def _positive(cast, what: str):
    def parse(text: str):
        try:
            v = cast(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"expected {what}, got '{text}'") from None
        if not v > 0 or v != v or v == float("inf"):
            raise argparse.ArgumentTypeError(f"expected {what}, got '{text}'")
        return v
    return parse


NAME = "request"
HELP = "the fewest frequencies to ask the spectrum manager for"
DESCRIPTION = ("Predict every candidate frequency on the links with gaps and choose, with an integer programme "
               "(HiGHS), the fewest new frequencies that, with the assigned channels, serve every (link, hour) pair "
               "any frequency can serve. Each proposal comes with the window of frequencies that would do as "
               "well; pairs no frequency can serve are listed with the reason. The plan's request: section "
               "(bands_khz, exclude_khz, mode, step_khz) says what may be asked for; the options override it. "
               "The international distress and safety frequencies (ITU RR Appendix 15) are never proposed.")


def add_arguments(r) -> None:
    r.add_argument("plan", metavar="PLAN", help="the plan file")
    r.add_argument("--max", dest="max_new", type=_positive(int, "a whole number of frequencies, 1 or more"), metavar="N",
                   help="at most N new frequencies: the N that serve the most (link, hour) pairs")
    r.add_argument("--format", choices=FORMATS, default="text",
                   help="text for a terminal, markdown for a memo or merge request, json for tools (stdout)")
    r.add_argument("--pdf", metavar="FILE", help="also write the one-page request sheet to FILE (*.pdf)")
    r.add_argument("--bands", type=_bands, metavar="LOW-HIGH[,...]", help="kHz segments that may be asked for "
                   "(overrides request.bands_khz; default 1600-30000)")
    r.add_argument("--exclude", type=_exclusions, metavar="F|LOW-HIGH[,...]",
                   help="kHz frequencies or segments never to propose (overrides request.exclude_khz)")
    r.add_argument("--mode", metavar="MODE", help="mode of the new channels (overrides request.mode)")
    r.add_argument("--step", type=_positive(float, "a spacing above 0 kHz"), metavar="KHZ",
                   help="candidate spacing in kHz (overrides request.step_khz; default 25)")
    r.add_argument("--time-limit", type=_positive(float, "a number of seconds above 0"), default=60.0, metavar="S",
                   help="seconds for all the solver's work (default 60); what it cannot prove by then is reported "
                        "as not proven optimal")
    r.add_argument("--jobs", type=_positive(int, "a whole number of processes, 1 or more"), metavar="N",
                   help="processes for the candidate predictions (default: by the size of the plan)")
    r.add_argument("-q", "--quiet", action="store_true", help="no progress on stderr")


def _say(args, text: str) -> None:
    if not args.quiet:
        print(f"planpack: {text}", file=sys.stderr)


_OPTION = {"bands_khz": "--bands", "exclude_khz": "--exclude", "step_khz": "--step", "mode": "--mode"}


def run(args) -> int:
    from planpack.commands import common as cli
    from planpack.plan.diagnostics import Collector
    from planpack.predictions import predict_links
    from planpack.requests import candidates, report
    from planpack.requests.engine import plan_requests
    from planpack.stationsetup import solve_station_antennas

    if os.path.isdir(args.plan):
        raise cli.UsageError(f"{args.plan}: a folder; planpack request takes one plan file")
    if args.pdf is not None and (not args.pdf.lower().endswith(".pdf") or os.path.isdir(args.pdf)):
        raise cli.UsageError(f"--pdf: expected a file name ending in .pdf, got '{args.pdf}'")
    (result,) = cli.read_all([args.plan])
    diags = list(result.diagnostics)
    if not result.ok:
        cli.print_diagnostics(diags, "text")
        return cli.exit_for(diags, False)
    plan = result.plan
    out = Collector(plan.source)
    _say(args, f"solving the antennas of {plan.net.id}")
    setup = solve_station_antennas(plan, out)
    diags += out.sorted()
    if setup is None or out.has_errors:
        cli.print_diagnostics(diags, "text")
        return cli.EXIT_PLAN_ERRORS
    cli.print_diagnostics(diags, "text")  # reading warnings: shown, not fatal
    _say(args, "predicting the assigned channels")
    pred = predict_links(plan, setup)
    try:
        data = plan_requests(plan, setup, pred, max_new=args.max_new, bands_khz=args.bands, exclude_khz=args.exclude,
                             mode=args.mode, step_khz=args.step, workers=args.jobs, time_limit=args.time_limit,
                             progress=None if args.quiet else (lambda text: _say(args, text)))
    except candidates.GridError as exc:
        key = exc.key.split(".")[-1].split("[")[0]
        given = {"bands_khz": args.bands, "exclude_khz": args.exclude, "step_khz": args.step, "mode": args.mode}
        if given.get(key) is not None:
            raise cli.UsageError(f"{_OPTION[key]}: {exc.message}") from None
        line, col = plan.where(exc.key)
        print(f"{plan.source}:{line}:{col}: error bad-request: {exc}", file=sys.stderr)
        return cli.EXIT_PLAN_ERRORS
    pdf = None
    if args.pdf is not None:
        from planpack.publish.requestsheet import render_request_sheet

        pdf = render_request_sheet(data)
    if pdf is not None:  # before anything is printed: a failed write leaves no half result behind
        _write_atomic(args.pdf, pdf)
        _say(args, f"wrote the request sheet to {args.pdf}")
    if args.format == "json":
        sys.stdout.write(json.dumps(data, indent=2, ensure_ascii=False) + "\n")
    elif args.format == "markdown":
        sys.stdout.write(report.markdown(data))
    else:
        sys.stdout.write(report.text(data))
    return cli.EXIT_OK


def _write_atomic(path: str, data: bytes) -> None:
    """Write beside the target and rename over it: never a half-written file."""
    from planpack.commands import common as cli

    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise cli.UsageError(f"--pdf: the folder {folder} does not exist")
    tmp = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=".request-", suffix=".pdf.tmp", dir=folder)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.replace(tmp, path)
    except OSError as exc:
        raise cli.UsageError(f"--pdf: cannot write {path}: {exc.strerror or exc}") from None
    finally:
        if tmp is not None and os.path.exists(tmp):
            os.unlink(tmp)
