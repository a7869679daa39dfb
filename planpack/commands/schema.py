"""``planpack schema``: the JSON Schema of the plan format (for editors), or of ``plan.json``."""

from __future__ import annotations

import sys

from planpack.commands.common import EXIT_OK

NAME = "schema"
HELP = "print the JSON Schema of the plan format"
DESCRIPTION = "Print a JSON Schema of the plan format for editors."


def add_arguments(p) -> None:
    p.add_argument("--output", dest="output_schema", action="store_true",
                   help="print the schema of plan.json (the compiled plan) instead")


def run(args) -> int:
    if args.output_schema:
        from planpack.output_schema import output_schema_text

        sys.stdout.write(output_schema_text())
    else:
        from planpack.plan.schema import json_schema_text

        sys.stdout.write(json_schema_text())
    return EXIT_OK
