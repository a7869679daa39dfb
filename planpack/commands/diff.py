"""``planpack diff``: compare two plans by what they do to the net.

Its exit code is its answer: 0 nothing operational changed, 1 the schedule or
the addresses changed, 2 the plans could not be compared. ``OLD`` and ``NEW``
are plan files or git revisions written ``REV:path``; a revision is handed to
git only after ``--end-of-options`` (so ``--output=...`` is never an option),
and must name a file, not a folder.
"""

from __future__ import annotations

import dataclasses
import os
import subprocess
import sys
import tempfile

from planpack.commands.common import UsageError, bounded, print_diagnostics

NAME = "diff"
HELP = "compare two plans by what they do to the net"
DESCRIPTION = ("Compile two plans and list what changed for the net: the channel of each hour, each link's "
               "first choice, hours without a channel, fractions of good days, stations and addresses, "
               "channels and antenna cut lengths. OLD and NEW are plan files or git revisions written "
               "REV:path (e.g. HEAD~1:plans/net.yaml). Exit 0: nothing operational changed; 1: the "
               "schedule or the addresses changed; 2: the plans could not be compared.")

DIFF_SAME, DIFF_CHANGED, DIFF_ERROR = 0, 1, 2
GIT_TIMEOUT_S = 30


def add_arguments(p) -> None:
    p.add_argument("old", metavar="OLD", help="plan file, or REV:path of a plan in git")
    p.add_argument("new", metavar="NEW", help="plan file, or REV:path of a plan in git")
    p.add_argument("--format", choices=("text", "markdown"), default="text",
                   help="text for a terminal, or markdown for a merge-request comment (stdout)")
    p.add_argument("--good-days-threshold", type=bounded(float, 0.0, 1.0, "a fraction between 0 and 1"), default=None,
                   metavar="F", help="report links whose fraction of good days on the first choice moves by more "
                                     "than F in any hour (0 to 1, default 0.1)")
    p.add_argument("--no-cache", action="store_true", help="compile afresh; do not read or write the compile cache")


@dataclasses.dataclass(frozen=True)
class Source:
    label: str  # as the user wrote it
    path: str  # the file to read (a temporary copy for a git revision)


def split_revision(arg: str) -> tuple[str, str] | None:
    """``("HEAD~1", "plans/net.yaml")`` for ``HEAD~1:plans/net.yaml``; None for a plain path."""
    if os.path.exists(arg) or ":" not in arg:
        return None
    rev, _, path = arg.partition(":")
    if not path:
        return None
    return rev, path


def _check_revision(rev: str, path: str) -> None:
    """Refuse what git would read as an option, or what cannot name one plan file."""
    where = f"{rev}:{path}"
    if not rev:
        raise UsageError(f"{where!r}: no revision before ':' (write REV:path, e.g. HEAD~1:{path})")
    if rev.startswith("-"):
        raise UsageError(f"{where!r}: a revision cannot start with '-' (it would be read as an option of git)")
    if not (rev.isprintable() and path.isprintable()):
        raise UsageError(f"{where!r}: the revision or path holds a control character")
    base = os.path.basename(path)
    if path.endswith(("/", os.sep)) or base in ("", ".", ".."):
        raise UsageError(f"{where!r}: names a folder; diff compares two plan files")


def _git(args: list[str], folder: str, where: str) -> subprocess.CompletedProcess:
    try:
        return subprocess.run(["git", *args], cwd=folder, capture_output=True, timeout=GIT_TIMEOUT_S, stdin=subprocess.DEVNULL,
                              env={**os.environ, "GIT_OPTIONAL_LOCKS": "0", "LC_ALL": "C", "GIT_TERMINAL_PROMPT": "0"})
    except FileNotFoundError:
        raise UsageError(f"{where}: git is not installed, so revisions cannot be read") from None
    except (OSError, subprocess.SubprocessError) as exc:
        raise UsageError(f"{where}: git could not be run: {exc}") from None


def git_show(rev: str, path: str) -> bytes:
    """The bytes of the file ``path`` at revision ``rev`` (git run in the path's folder). Raises UsageError."""
    from planpack.plan.yamlread import MAX_BYTES

    _check_revision(rev, path)
    where = f"{rev}:{path}"
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise UsageError(f"{where}: the folder {os.path.dirname(path) or '.'} does not exist here, "
                         "so git cannot be asked for the file")
    spec = f"{rev}:./{os.path.basename(path)}"
    kind = _git(["cat-file", "-t", "--end-of-options", spec], folder, where)
    if kind.returncode != 0:
        why = kind.stderr.decode("utf-8", "replace").strip().splitlines()
        raise UsageError(f"{where}: git cannot show that file at that revision" + (f" ({why[-1]})" if why else ""))
    found = kind.stdout.decode("ascii", "replace").strip()
    if found != "blob":
        what = "a folder" if found == "tree" else f"a git {found}"
        raise UsageError(f"{where}: is {what} at that revision; diff compares two plan files")
    size = _git(["cat-file", "-s", "--end-of-options", spec], folder, where)
    try:
        nbytes = int(size.stdout)
    except ValueError:
        nbytes = -1
    if size.returncode != 0 or nbytes < 0:
        raise UsageError(f"{where}: git cannot tell the size of that file")
    if nbytes > MAX_BYTES:
        raise UsageError(f"{where}: the file is larger than {MAX_BYTES // (1024 * 1024)} MiB; a plan is far smaller")
    r = _git(["cat-file", "blob", "--end-of-options", spec], folder, where)
    if r.returncode != 0:
        why = r.stderr.decode("utf-8", "replace").strip().splitlines()
        raise UsageError(f"{where}: git cannot show that file at that revision" + (f" ({why[-1]})" if why else ""))
    return r.stdout


def _source(arg: str, tmp: str, n: int) -> Source:
    rev = split_revision(arg)
    if rev is None:
        if not os.path.exists(arg):
            raise UsageError(f"{arg}: no such file (write a git revision as REV:path, e.g. HEAD~1:{arg})")
        if os.path.isdir(arg):
            raise UsageError(f"{arg}: is a folder; diff compares two plan files")
        return Source(arg, arg)
    content = git_show(*rev)
    path = os.path.join(tmp, f"{'old' if n == 0 else 'new'}.yaml")  # a fixed name: the label names it in messages
    with open(path, "wb") as fh:
        fh.write(content)
    return Source(arg, path)


def compile_source(src: Source, use_cache: bool):
    """(CompiledPlan or None, diagnostics that stop the diff, named as the user wrote the plan)."""
    from planpack.plan import read_plan
    from planpack.workflow.cache import cached_compile

    def named(diags):
        return [d if d.file != src.path else dataclasses.replace(d, file=src.label) for d in diags]

    r = read_plan(src.path)
    if not r.ok:
        return None, named(r.diagnostics)
    compiled = cached_compile(r.plan, enabled=use_cache)
    errors = [d for d in compiled.diagnostics if d.severity == "error"]
    if errors:
        return None, named(errors)
    return compiled, []


def run(args) -> int:
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
    except UsageError as exc:
        print(f"planpack: {exc}", file=sys.stderr)
        return DIFF_ERROR
    if stop:
        print_diagnostics(stop, "text")
        print("planpack: the plans cannot be compared until these errors are fixed", file=sys.stderr)
        return DIFF_ERROR
    result = diff.diff_compiled(results[0].data, results[1].data, old_label=args.old, new_label=args.new,
                                good_days_threshold=threshold)
    render = diff.render_markdown if args.format == "markdown" else diff.render_text
    sys.stdout.write(render(result))
    return DIFF_CHANGED if result.operational else DIFF_SAME
