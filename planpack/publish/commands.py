"""``planpack build``: check, compile and publish plans as a static site (with the field cards).

Errors in a plan stop the build with the same diagnostics and exit codes as
``planpack check``; warnings are printed and shown on the site. Everything is
computed and rendered in memory first; only then does
:func:`planpack.publish.output.publish` swap the finished site into place.
"""

from __future__ import annotations

import importlib
import re
import sys
import time

CARD_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,99}\.pdf")


def register(subparsers) -> None:
    from planpack.publish import pipeline

    b = subparsers.add_parser(
        "build", help="check, compile and publish plans as a static site with field cards",
        description="Check every plan (errors stop the build, as with 'check'), compile it, and write a static "
                    "site for an intranet share or a file share into DIR, with the PDF field cards under "
                    "DIR/<net-id>/cards/. The site is built beside DIR and swapped in whole.")
    b.add_argument("plans", nargs="+", metavar="PLAN_OR_DIR", help="plan files or folders (every *.yaml under a folder, sorted)")
    b.add_argument("--out", required=True, metavar="DIR", help="the folder to publish into (replaced whole)")
    b.add_argument("--no-cards", action="store_true", help="do not render the PDF field cards")
    pipeline.add_publish_options(b, "build")
    b.set_defaults(func=cmd_build)

    from planpack.publish import cards_command

    cards_command.register(subparsers)


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


def cmd_build(args) -> int:
    from planpack import cli
    from planpack.publish import output, pipeline, site

    cards_mod = importlib.import_module("planpack.publish.cards")  # through sys.modules, so tests can stand in for it

    started = time.monotonic()
    progress = Progress(args.quiet)
    run = pipeline.compile_all(args, "built", progress.step, progress.say)
    progress.done()
    if run.code != cli.EXIT_OK:
        return run.code
    compiled, diags, code = run.pairs, run.diagnostics, run.code
    n = len(compiled)

    card_files: dict[str, dict[str, bytes]] = {}
    if not args.no_cards:
        for i, (_, c) in enumerate(compiled, 1):
            progress.step(i, n, f"cards for {c.data['net']['id']}")
            try:
                pdfs = cards_mod.render_cards(c.data)
            except (cards_mod.CardLayoutError, cards_mod.CardSizeError) as exc:
                progress.done()
                print(f"{c.data['net']['id']}: error cards-layout: {exc}", file=sys.stderr)
                progress.say("nothing was built")
                return cli.EXIT_PLAN_ERRORS
            for name in pdfs:
                if not CARD_NAME.fullmatch(name) or ".." in name:
                    raise ValueError(f"card renderer returned an unsafe file name {name!r}")
            card_files[c.data["net"]["id"]] = dict(pdfs)
        progress.done()

    progress.step(n, n, "rendering the site")
    # reading warnings are not in plan.json; the analysis ones usually are (shown once)
    read_warnings = {c.data["net"]["id"]: [d.to_dict() for d in list(r.diagnostics) + list(c.diagnostics)]
                     for r, c in compiled}
    files = site.render_site([c.data for _, c in compiled], warnings=read_warnings,
                             cards={k: sorted(v) for k, v in card_files.items()})
    for nid, pdfs in card_files.items():
        for name, data in pdfs.items():
            files[f"{site.safe_name(nid)}/cards/{name}"] = data
    progress.done()
    out = output.publish(dict(sorted(files.items())), args.out, force=args.force,
                         protect=[r.plan.source for r, _ in compiled])
    pages = sum(p.endswith(".html") for p in files)
    ncards = sum(len(v) for v in card_files.values())
    progress.say(f"built {n} net{'s' * (n != 1)} ({pages} pages, {ncards} card file{'s' * (ncards != 1)}, "
                 f"{len(diags)} warning{'s' * (len(diags) != 1)}) into {out} in {time.monotonic() - started:.1f} s")
    return code
