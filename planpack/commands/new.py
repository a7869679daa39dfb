"""``planpack new``: write a commented starter plan that checks clean."""

from __future__ import annotations

import os
import sys
import tempfile

from planpack.commands.common import EXIT_OK, UsageError

NAME = "new"
HELP = "write a commented starter plan"
DESCRIPTION = ("Write a starter plan for NET-ID in an invented scenario, every key explained in a comment. "
               "It checks clean; edit it into your own net.")


def add_arguments(p) -> None:
    p.add_argument("net_id", metavar="NET-ID", help="the net id: lowercase letters, digits and '-' (e.g. north-ridge)")
    p.add_argument("--out", metavar="FILE", help="write to FILE (a new *.yaml file; never overwritten) instead of stdout")


def write_new_file(path: str, text: str) -> None:
    """Write ``text`` as a new file at ``path``, whole or not at all; never replaces a file. Raises UsageError."""
    if os.path.lexists(path):
        raise UsageError(f"{path}: already exists; planpack new never overwrites a file (choose another name)")
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise UsageError(f"{path}: the folder {os.path.dirname(path)} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=".planpack-new-", suffix=".yaml", dir=folder)
    except OSError as exc:
        raise UsageError(f"{path}: cannot write in {folder}: {exc.strerror}") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
        os.chmod(tmp, 0o644)
        os.link(tmp, path)  # fails if the name was taken meanwhile: nothing is replaced
    except FileExistsError:
        raise UsageError(f"{path}: already exists; planpack new never overwrites a file (choose another name)") from None
    except OSError as exc:
        raise UsageError(f"{path}: cannot write it: {exc.strerror}") from None
    finally:
        try:
            os.unlink(tmp)
        except OSError:
            pass


def run(args) -> int:
    from planpack.workflow.starter import is_slug, starter_plan

    if not is_slug(args.net_id):
        raise UsageError(f"NET-ID '{args.net_id}' is not a slug: use lowercase letters, digits and single '-' "
                         "between them, at most 40 characters (e.g. north-ridge)")
    if args.out is None:
        sys.stdout.write(starter_plan(args.net_id))
        return EXIT_OK
    if not args.out.endswith((".yaml", ".yml")):
        raise UsageError(f"--out {args.out}: a plan file name ends in .yaml (folders are searched for *.yaml)")
    hint = args.out if args.out.isprintable() else None
    write_new_file(args.out, starter_plan(args.net_id, hint))
    print(f"planpack: wrote {args.out}; check it with: planpack check {args.out}", file=sys.stderr)
    return EXIT_OK
