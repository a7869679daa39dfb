"""The plan-repository commands: ``diff``, ``new`` and ``serve``.

``planpack.cli`` calls :func:`register` with its subparsers. Exit codes follow
the rest of planpack (0 clean, 2 bad usage or an unreadable file), except
``diff``, whose exit code is its answer: 0 nothing operational changed, 1 the
schedule or the addresses changed, 2 it could not compare.
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import subprocess
import sys
import tempfile

DIFF_SAME, DIFF_CHANGED, DIFF_ERROR = 0, 1, 2


def register(subparsers) -> None:
    d = subparsers.add_parser(
        "diff", help="compare two plans by what they do to the net",
        description="Compile two plans and list what changed for the net: the channel of each hour, each link's "
                    "first choice, hours without a channel, fractions of good days, stations and addresses, "
                    "channels and antenna cut lengths. OLD and NEW are plan files or git revisions written "
                    "REV:path (e.g. HEAD~1:plans/net.yaml). Exit 0: nothing operational changed; 1: the "
                    "schedule or the addresses changed; 2: the plans could not be compared.")
    d.add_argument("old", metavar="OLD", help="plan file, or REV:path of a plan in git")
    d.add_argument("new", metavar="NEW", help="plan file, or REV:path of a plan in git")
    d.add_argument("--format", choices=("text", "markdown"), default="text",
                   help="text for a terminal, or markdown for a merge-request comment (stdout)")
    d.add_argument("--good-days-threshold", type=_fraction, default=None, metavar="F",
                   help="report links whose fraction of good days on the first choice moves by more than F "
                        "in any hour (0 to 1, default 0.1)")
    d.add_argument("--no-cache", action="store_true", help="compile afresh; do not read or write .planpack-cache/")
    d.set_defaults(func=cmd_diff)

    n = subparsers.add_parser(
        "new", help="write a commented starter plan",
        description="Write a starter plan for NET-ID in an invented scenario, every key explained in a comment. "
                    "It checks clean; edit it into your own net.")
    n.add_argument("net_id", metavar="NET-ID", help="the net id: lowercase letters, digits and '-' (e.g. north-ridge)")
    n.add_argument("--out", metavar="FILE", help="write to FILE (a new *.yaml file; never overwritten) instead of stdout")
    n.set_defaults(func=cmd_new)

    s = subparsers.add_parser(
        "serve", help="preview the site while you edit a plan",
        description="Build the site of the plans into a temporary folder, serve it on 127.0.0.1 only, rebuild "
                    "when a plan file changes and reload the browser. A plan with errors shows its diagnostics "
                    "on the page. Stop with Ctrl-C.")
    s.add_argument("plans", nargs="+", metavar="PLAN_OR_DIR", help="plan files or folders (every *.yaml under a folder)")
    s.add_argument("--port", type=_port, default=8000, metavar="N", help="port on 127.0.0.1 (default 8000; 0 picks a free one)")
    s.add_argument("--interval", type=float, default=0.5, metavar="S", help=argparse.SUPPRESS)
    s.add_argument("--no-cache", action="store_true", help="compile afresh on every rebuild")
    s.set_defaults(func=cmd_serve)


def _bounded(cast, low, high, what: str):
    """An argparse type: ``cast(text)`` between low and high, else a message naming what was expected."""
    def parse(text: str):
        try:
            v = cast(text)
        except ValueError:
            v = None
        if v is None or not low <= v <= high:
            raise argparse.ArgumentTypeError(f"expected {what}, got '{text}'")
        return v
    return parse


_fraction = _bounded(float, 0.0, 1.0, "a fraction between 0 and 1")
_port = _bounded(int, 0, 65535, "a port number 0 to 65535")


# --------------------------------------------------------------------- diff

@dataclasses.dataclass(frozen=True)
class Source:
    label: str  # as the user wrote it
    path: str  # the file to read (a temporary copy for a git revision)
    home: str  # the plan's path in the work tree: its cache folder is beside it


def split_revision(arg: str) -> tuple[str, str] | None:
    """``("HEAD~1", "plans/net.yaml")`` for ``HEAD~1:plans/net.yaml``; None for a plain path."""
    if os.path.exists(arg) or ":" not in arg:
        return None
    rev, _, path = arg.partition(":")
    if not path:
        return None
    return rev, path


def git_show(rev: str, path: str) -> bytes:
    """The bytes of ``path`` at revision ``rev`` (git run in the path's folder). Raises UsageError."""
    from planpack.cli import UsageError

    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise UsageError(f"{rev}:{path}: the folder {os.path.dirname(path) or '.'} does not exist here, "
                         "so git cannot be asked for the file")
    spec = f"{rev}:./{os.path.basename(path)}"
    try:
        r = subprocess.run(["git", "show", spec], cwd=folder, capture_output=True, timeout=30,
                           env={**os.environ, "GIT_OPTIONAL_LOCKS": "0", "LC_ALL": "C"})
    except FileNotFoundError:
        raise UsageError(f"{rev}:{path}: git is not installed, so revisions cannot be read") from None
    except (OSError, subprocess.SubprocessError) as exc:
        raise UsageError(f"{rev}:{path}: git could not be run: {exc}") from None
    if r.returncode != 0:
        why = r.stderr.decode("utf-8", "replace").strip().splitlines()
        raise UsageError(f"{rev}:{path}: git cannot show that file at that revision"
                         + (f" ({why[-1]})" if why else ""))
    return r.stdout


def _source(arg: str, tmp: str, n: int) -> Source:
    from planpack.cli import UsageError

    rev = split_revision(arg)
    if rev is None:
        if not os.path.exists(arg):
            raise UsageError(f"{arg}: no such file (write a git revision as REV:path, e.g. HEAD~1:{arg})")
        if os.path.isdir(arg):
            raise UsageError(f"{arg}: is a folder; diff compares two plan files")
        return Source(arg, arg, arg)
    content = git_show(*rev)
    folder = os.path.join(tmp, str(n))
    os.mkdir(folder)
    path = os.path.join(folder, os.path.basename(rev[1]))
    with open(path, "wb") as fh:
        fh.write(content)
    return Source(arg, path, rev[1])


def compile_source(src: Source, use_cache: bool):
    """(CompiledPlan or None, diagnostics that stop the diff, named as the user wrote the plan)."""
    from planpack.plan import read_plan
    from planpack.workflow.cache import cached_compile, default_cache_dir

    def named(diags):
        return [d if d.file != src.path else dataclasses.replace(d, file=src.label) for d in diags]

    r = read_plan(src.path)
    if not r.ok:
        return None, named(r.diagnostics)
    compiled = cached_compile(r.plan, cache_dir=default_cache_dir(src.home), enabled=use_cache)
    errors = [d for d in compiled.diagnostics if d.severity == "error"]
    if errors:
        return None, named(errors)
    return compiled, []


def cmd_diff(args) -> int:
    from planpack import cli
    from planpack.workflow import diff

    threshold = diff.DEFAULT_GOOD_DAYS_THRESHOLD if args.good_days_threshold is None else args.good_days_threshold
    try:
        with tempfile.TemporaryDirectory(prefix="planpack-diff-") as tmp:
            sources = [_source(args.old, tmp, 0), _source(args.new, tmp, 1)]
            results, stop = [], []
            for s in sources:
                compiled, diags = compile_source(s, not args.no_cache)
                results.append(compiled)
                stop += diags
    except cli.UsageError as exc:
        print(f"planpack: {exc}", file=sys.stderr)
        return DIFF_ERROR
    if stop:
        cli.print_diagnostics(stop, "text")
        print("planpack: the plans cannot be compared until these errors are fixed", file=sys.stderr)
        return DIFF_ERROR
    result = diff.diff_compiled(results[0].data, results[1].data, old_label=args.old, new_label=args.new,
                                good_days_threshold=threshold)
    render = diff.render_markdown if args.format == "markdown" else diff.render_text
    sys.stdout.write(render(result))
    return DIFF_CHANGED if result.operational else DIFF_SAME


# ---------------------------------------------------------------------- new

def write_new_file(path: str, text: str) -> None:
    """Write ``text`` as a new file at ``path``, whole or not at all; never replaces a file. Raises UsageError."""
    from planpack.cli import UsageError

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


def cmd_new(args) -> int:
    from planpack.cli import EXIT_OK, UsageError
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


# -------------------------------------------------------------------- serve

def cmd_serve(args) -> int:
    from planpack.workflow import serve

    return serve.run(args.plans, port=args.port, interval_s=args.interval, use_cache=not args.no_cache)
