"""The revision stamped on a site and its cards: the plan's git commit, else a content hash.

Never the wall clock: the date shown is ``SOURCE_DATE_EPOCH`` when set, else
the commit date of the plan's last change, else none.

A person reads a revision aloud by its number: the count of commits in the
plan's git history that touched the plan file (it only grows as the plan is
changed and committed), printed with the issue date and the short hash:
"Rev 14 of 2027-03-01 (a1b2c3d)". Outside git there is no number; the label
is then the issue date and the content hash.
"""

from __future__ import annotations

import datetime as dt
import os
import subprocess
from dataclasses import dataclass


@dataclass(frozen=True)
class Revision:
    id: str  # "3f2a91c", "3f2a91c+dirty" or "c-1a2b3c4d5e6f"
    kind: str  # "git" | "content"
    date: str | None  # YYYY-MM-DD
    number: int | None = None  # commits that touched the plan file; None outside git

    @property
    def label(self) -> str:
        """What pages and cards print: 'Rev 14 of 2027-03-01 (a1b2c3d)', 'Issue 2027-03-01 (c-1a2b3c4d5e6f)'."""
        when = f" of {self.date}" if self.date else ""
        if self.kind == "git" and self.number is not None:
            changed = "+" if self.id.endswith("+dirty") else ""  # uncommitted changes on top of that revision
            return f"Rev {self.number}{changed}{when} ({self.id})"
        if self.date:
            return f"Issue {self.date} ({self.id})"
        return f"Issue {self.id}, undated"

    def to_dict(self) -> dict:
        return {"id": self.id, "kind": self.kind, "date": self.date, "number": self.number,
                "issue_date": self.date, "label": self.label}


def _git(args: list[str], cwd: str) -> str | None:
    try:
        r = subprocess.run(["git", *args], cwd=cwd, capture_output=True, text=True, timeout=10,
                           env={**os.environ, "GIT_OPTIONAL_LOCKS": "0", "LC_ALL": "C"})
    except (OSError, subprocess.SubprocessError):
        return None
    return r.stdout.strip() if r.returncode == 0 else None


def _epoch_date() -> str | None:
    raw = os.environ.get("SOURCE_DATE_EPOCH")
    if raw is None:
        return None
    try:
        return dt.datetime.fromtimestamp(int(raw), tz=dt.timezone.utc).date().isoformat()
    except (ValueError, OverflowError, OSError):
        return None


def plan_revision(path: str, sha256: str) -> Revision:
    """The revision of the plan file at ``path`` whose bytes hash to ``sha256``."""
    folder = os.path.dirname(os.path.abspath(path)) or "."
    name = os.path.basename(path)
    commit = None
    if _git(["rev-parse", "--is-inside-work-tree"], folder) == "true":
        tracked = _git(["ls-files", "--error-unmatch", "--", name], folder)
        if tracked:
            commit = _git(["log", "-1", "--format=%h %cs", "--", name], folder)
    if commit:
        short, _, cdate = commit.partition(" ")
        dirty = _git(["status", "--porcelain", "--", name], folder)
        rid = short + ("+dirty" if dirty else "")
        count = _git(["rev-list", "--count", "HEAD", "--", name], folder)
        number = int(count) if count and count.isdigit() else None
        return Revision(rid, "git", _epoch_date() or cdate or None, number)
    return Revision("c-" + sha256[:12], "content", _epoch_date())
