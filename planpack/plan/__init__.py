"""Reading plans: strict YAML with positions, the declared schema, semantic checks, models."""

from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass

from planpack.plan import yamlread
from planpack.plan.diagnostics import Collector, Diagnostic
from planpack.plan.models import Plan
from planpack.plan.schema import FORMAT_VERSION, PLAN
from planpack.plan.types import INVALID, Ctx
from planpack.plan.validate import build, check_semantics
from planpack.plan.yamlread import Mapping, Scalar


@dataclass
class ReadResult:
    plan: Plan | None  # None when the plan has errors
    diagnostics: list[Diagnostic]

    @property
    def ok(self) -> bool:
        return self.plan is not None


def read_plan(path: str) -> ReadResult:
    """Read and validate one plan file. Never raises for anything in the file."""
    out = Collector(path)
    raw = yamlread.read_bytes(path, out)
    root = None if raw is None else yamlread.parse_bytes(raw, out)
    if root is None:
        if not out.items:
            out.error("not-a-mapping", "", "the file is empty; a plan starts with 'planpack: 1'")
        return ReadResult(None, out.sorted())
    if not isinstance(root, Mapping):
        what = "a list" if isinstance(root, yamlread.Sequence) else "a single value"
        out.error("not-a-mapping", "", f"the plan must be a mapping of keys (planpack, net, stations, ...), got {what}", root)
        return ReadResult(None, out.sorted())
    version = root.entries.get("planpack")
    if version is None:
        out.error("format-version", "planpack", f"planpack: missing the format version; start the plan with 'planpack: {FORMAT_VERSION}'", root)
        return ReadResult(None, out.sorted())
    vnode = version[1]
    if not (isinstance(vnode, Scalar) and vnode.plain and vnode.raw.strip() == str(FORMAT_VERSION)):
        shown = vnode.raw if isinstance(vnode, Scalar) else "a " + type(vnode).__name__.lower()
        out.error("format-version", "planpack", f"planpack: format version '{shown}' is not one this planpack reads (it reads {FORMAT_VERSION})", vnode)
        return ReadResult(None, out.sorted())
    ctx = Ctx(out)
    data = PLAN.read(root, "", ctx)
    if data is INVALID:
        return ReadResult(None, out.sorted())
    check_semantics(data, ctx, root)
    if out.has_errors:
        return ReadResult(None, out.sorted())
    sha = hashlib.sha256(raw).hexdigest()  # the bytes that were read, not a second read (a pipe is empty by then)
    return ReadResult(build(data, path, sha, ctx.positions), out.sorted())


def plan_files(args: list[str]) -> tuple[list[str], list[str]]:
    """Expand arguments: files as given, directories to their *.yaml/*.yml files (sorted).

    Returns (files, problems) where problems are arguments that name nothing.
    """
    files: list[str] = []
    problems: list[str] = []
    for arg in args:
        if os.path.isdir(arg):
            found = []
            for dirpath, dirnames, filenames in os.walk(arg):
                dirnames[:] = sorted(d for d in dirnames if not d.startswith("."))
                found += [os.path.join(dirpath, f) for f in filenames if f.endswith((".yaml", ".yml")) and not f.startswith(".")]
            if not found:
                problems.append(f"{arg}: no *.yaml plan files in this folder")
            files += sorted(found)
        elif os.path.exists(arg):
            files.append(arg)
        else:
            problems.append(f"{arg}: no such file or folder")
    return files, problems


__all__ = ["ReadResult", "read_plan", "plan_files", "Plan", "Diagnostic"]
