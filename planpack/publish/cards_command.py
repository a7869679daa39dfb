"""``planpack cards``: check and compile plans, then write their PDF field cards.

Like ``planpack check`` for errors and exit codes. Everything is rendered in
memory first; :func:`planpack.publish.output.publish` then swaps the finished
folder into place whole, so a failed run leaves the previous cards as they were.
"""

from __future__ import annotations

import sys

SIZES = ("3.5x5in", "a6", "3x5in")
SHEETS = ("a4", "letter")


def register(subparsers) -> None:
    from planpack.publish import pipeline

    c = subparsers.add_parser(
        "cards", help="write the pocket PDF field cards of a plan",
        description="Check and compile a plan, then write one card PDF per station (<station>.pdf), the net card "
                    "for control (net-control.pdf) and all cards in one file (all-cards.pdf) into DIR. DIR is "
                    "written beside itself and swapped in whole. With several plans each net gets DIR/<net-id>/.")
    c.add_argument("plans", nargs="+", metavar="PLAN", help="plan file (or folder of plans)")
    c.add_argument("--out", required=True, metavar="DIR", help="folder to write the cards into (replaced whole)")
    c.add_argument("--size", choices=SIZES, default=None,
                   help="card size (default: the plan's net.card_size, else 3.5x5in)")
    c.add_argument("--impose", choices=SHEETS, default=None,
                   help="also write cards-SHEET.pdf: several cards a sheet with crop marks, backs mirrored "
                        "for long-edge duplex printing")
    pipeline.add_publish_options(c, "write")
    c.set_defaults(func=cmd_cards)


def _say(args, text: str) -> None:
    if not args.quiet:
        print(f"planpack: {text}", file=sys.stderr)


def cmd_cards(args) -> int:
    from planpack import cli
    from planpack.publish import cardfonts, output, pipeline
    from planpack.publish.cards import CardLayoutError, CardSizeError, render_cards, text_warnings

    run = pipeline.compile_all(args, "written", say=lambda text: _say(args, text))
    if run.code != cli.EXIT_OK:
        return run.code
    compiled, code = run.pairs, run.code

    files: dict[str, bytes] = {}
    for r, c in compiled:
        nid = c.data["net"]["id"]
        try:
            pdfs = render_cards(c.data, size=args.size, impose=args.impose)
        except (CardLayoutError, CardSizeError) as exc:
            print(f"{r.plan.source}: error cards-layout: {exc}", file=sys.stderr)
            _say(args, "no cards were written")
            return cli.EXIT_PLAN_ERRORS
        for w in text_warnings(c.data):
            print(f"{r.plan.source}: warning cards-glyphs: {w}", file=sys.stderr)
        prefix = f"{nid}/" if len(compiled) > 1 else ""
        files.update({prefix + name: data for name, data in pdfs.items()})
    src = cardfonts.font_source()
    if not src.full_unicode:
        _say(args, f"warning: DejaVu Sans not found; cards are set in {src.name}, which has Latin-1 letters only "
                   "(install Debian's fonts-dejavu-core and fonts-dejavu-extra, or set PLANPACK_FONT_DIR)")
    out = output.publish(dict(sorted(files.items())), args.out, force=args.force,
                         protect=[r.plan.source for r, _ in compiled])
    _say(args, f"wrote {len(files)} card file{'s' * (len(files) != 1)} into {out}")
    return code
