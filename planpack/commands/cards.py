"""``planpack cards``: check and compile plans, then write their PDF field cards.

Like ``planpack check`` for errors and exit codes. Everything is rendered in
memory first; :func:`planpack.publish.output.publish` then swaps the finished
folder into place whole, so a failed run leaves the previous cards as they were.
"""

from __future__ import annotations

import sys

from planpack.commands.common import (EXIT_OK, EXIT_PLAN_ERRORS, add_publish_options, compile_for_publishing,
                                      plural, print_diagnostics, say)

NAME = "cards"
HELP = "write the pocket PDF field cards of a plan"
DESCRIPTION = ("Check and compile a plan, then write one card PDF per station (<station>.pdf), the net card "
               "for control (net-control.pdf) and all cards in one file (all-cards.pdf) into DIR. DIR is "
               "written beside itself and swapped in whole. With several plans each net gets DIR/<net-id>/.")
SIZES = ("3.5x5in", "a6", "3x5in")
SHEETS = ("a4", "letter")


def add_arguments(p) -> None:
    p.add_argument("plans", nargs="+", metavar="PLAN", help="plan file (or folder of plans)")
    p.add_argument("--out", required=True, metavar="DIR", help="folder to write the cards into (replaced whole)")
    p.add_argument("--size", choices=SIZES, default=None, help="card size (default: the plan's net.card_size, else 3.5x5in)")
    p.add_argument("--impose", choices=SHEETS, default=None,
                   help="also write cards-SHEET.pdf: several cards a sheet with crop marks, backs mirrored "
                        "for long-edge duplex printing")
    add_publish_options(p, "write")


def run(args) -> int:
    from planpack.publish import output, pipeline

    pairs, _, code = compile_for_publishing(args, "written")
    if code != EXIT_OK:
        return code
    try:
        rendered = pipeline.render_card_files(pairs, out=args.out, size=args.size, impose=args.impose,
                                              use_cache=not args.no_cache)
    except pipeline.CardsRefused as exc:
        print_diagnostics([exc.diagnostic()], args.format)
        say(args, "no cards were written")
        return EXIT_PLAN_ERRORS
    for r, c in pairs:
        for w in rendered.notes.get(c.data["net"]["id"], []):
            print(f"{r.plan.source}: warning cards-glyphs: {w}", file=sys.stderr)
    from planpack.publish import cardfonts

    src = cardfonts.font_source()
    if not src.full_unicode:
        say(args, f"warning: DejaVu Sans not found; cards are set in {src.name}, which has Latin-1 letters only "
                  "(install Debian's fonts-dejavu-core and fonts-dejavu-extra, or set PLANPACK_FONT_DIR)")
    out = output.publish(rendered.files, args.out, force=args.force, protect=[r.plan.source for r, _ in pairs])
    rendered.reuse.save()
    say(args, f"wrote {plural(len(rendered.files), 'card file')} into {out}")
    return code
