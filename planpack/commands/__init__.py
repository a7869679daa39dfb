"""The planpack commands: one module each, listed once in :data:`COMMANDS`.

A command module defines

- ``NAME``, ``HELP`` (one line for ``planpack --help``) and ``DESCRIPTION``;
- ``add_arguments(parser)``, which declares its options on an argparse parser;
- ``run(args) -> int``, which does the work and returns the exit code.

It imports :mod:`planpack.commands.common` for what every command shares
(exit codes, usage errors, printing diagnostics, reading plans) and anything
heavy (numpy, reportlab, the compiler) only inside ``run``, so that
``planpack --help`` stays quick. ``common`` imports no command, and no module
below the commands imports one: the flow goes one way.

Adding a command is one module here and one name in :data:`COMMANDS`.
"""

#: Every command, in the order ``planpack --help`` lists them (module names in this package).
COMMANDS = ("check", "build", "cards", "diff", "new", "serve", "request", "schema", "codes")
