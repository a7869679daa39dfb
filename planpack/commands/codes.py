"""``planpack codes``: every diagnostic code with what it means."""

from __future__ import annotations

from planpack.commands.common import EXIT_OK

NAME = "codes"
HELP = "list every diagnostic code"
DESCRIPTION = "List every diagnostic code and what it means."


def add_arguments(p) -> None:
    pass


def run(args) -> int:
    from planpack.plan.diagnostics import CODES

    for code, text in CODES.items():
        print(f"{code:28s} {text}")
    return EXIT_OK
