"""``planpack build``: check, compile and publish plans as a static site (with the field cards).

Errors in a plan stop the build with the same diagnostics and exit codes as
``planpack check``; warnings are printed and shown on the site. Everything is
computed and rendered in memory first (a net whose data, renderer and options
did not change is taken from the previous site, checked against the hashes
recorded when it was written); only then does
:func:`planpack.publish.output.publish` swap the finished site into place.
"""

from __future__ import annotations

import sys
import time

from planpack.commands.common import (EXIT_OK, EXIT_PLAN_ERRORS, add_publish_options, compile_for_publishing,
                                      plural, print_diagnostics)

NAME = "build"
HELP = "check, compile and publish plans as a static site with field cards"
DESCRIPTION = ("Check every plan (errors stop the build, as with 'check'), compile it, and write a static "
               "site for an intranet share or a file share into DIR, with the PDF field cards under "
               "DIR/<net-id>/cards/. The site is built beside DIR and swapped in whole.")


def add_arguments(p) -> None:
    p.add_argument("plans", nargs="+", metavar="PLAN_OR_DIR", help="plan files or folders (every *.yaml under a folder, sorted)")
    p.add_argument("--out", required=True, metavar="DIR", help="the folder to publish into (replaced whole)")
    p.add_argument("--no-cards", action="store_true", help="do not render the PDF field cards")
    add_publish_options(p, "build")


class Progress:
    """One line per step on stderr: rewritten in place on a terminal, plain lines otherwise."""

    def __init__(self, quiet: bool, stream=None) -> None:
        self.quiet = quiet
        self.stream = stream or sys.stderr
        self.tty = self.stream.isatty()
        self._open = False

    def step(self, i: int, n: int, text: str) -> None:
        if self.quiet:
            return
        line = f"[{i}/{n}] {text}"
        if self.tty:
            self.stream.write("\r\x1b[2K" + line)
            self._open = True
        else:
            self.stream.write(f"planpack: {line}\n")
        self.stream.flush()

    def done(self) -> None:
        if self._open:
            self.stream.write("\n")
            self._open = False

    def say(self, text: str) -> None:
        if not self.quiet:
            self.done()
            print(f"planpack: {text}", file=self.stream)


def run(args) -> int:
    from planpack.publish import output, pipeline

    started = time.monotonic()
    progress = Progress(args.quiet)
    pairs, diags, code = compile_for_publishing(args, "built", progress.step)
    progress.done()
    if code != EXIT_OK:
        return code
    try:
        rendered = pipeline.render_build(pairs, out=args.out, with_cards=not args.no_cards,
                                         use_cache=not args.no_cache, step=progress.step)
    except pipeline.CardsRefused as exc:
        progress.done()
        print_diagnostics([exc.diagnostic()], args.format)
        progress.say("nothing was built")
        return EXIT_PLAN_ERRORS
    progress.done()
    out = output.publish(rendered.files, args.out, force=args.force, protect=[r.plan.source for r, _ in pairs])
    rendered.reuse.save()
    n = len(pairs)
    pages = sum(p.endswith(".html") for p in rendered.files)
    ncards = sum(len(v) for v in rendered.card_names.values())
    again = f"; {len(rendered.reused)} of {len(rendered.reused) + len(rendered.rendered)} parts unchanged" \
        if rendered.reused else ""
    sheets = f"{plural(len(rendered.sheet_names), 'request sheet')}, " if rendered.sheet_names else ""
    progress.say(f"built {plural(n, 'net')} ({pages} pages, {plural(ncards, 'card file')}, {sheets}"
                 f"{plural(len(diags), 'warning')}{again}) into {out} in {time.monotonic() - started:.1f} s")
    return code
