"""The compile cache: a rebuild of a plan that has not changed skips the predictions and antenna solutions.

An entry holds one compiled plan (its ``data`` and its analysis diagnostics)
as JSON. It is keyed by everything the compiled figures can depend on:

- the SHA-256 of the plan file's bytes (a reorder of keys is a new entry:
  the bytes differ; cheap and never wrong);
- planpack's version and a hash of the source of every module the compile
  runs (everything under ``planpack/`` but the publishers and this package),
  so an edited model is never answered from an old cache during development;
- the versions of PyIRI, PyNEC, numpy, scipy and tzdata, and the Python version.

The revision stamp (git commit or content hash) is not part of the figures:
it changes when the work tree does. It is stamped afresh on every load.

Entries live in ``.planpack-cache/`` beside the plan, or in the folder named
by ``PLANPACK_CACHE_DIR``, named by their key alone (a copy of the same bytes
elsewhere, such as a git revision being diffed, finds the same entry); the
least recently used beyond a bound are dropped. They are written to a temporary file and renamed
into place, so a reader sees a whole entry or none. An entry that does not
load, or does not hold what this version writes, is ignored and rebuilt:
the cache is never trusted over the compiler.
"""

from __future__ import annotations

import functools
import hashlib
import json
import os
import platform
import tempfile
from importlib import metadata
from pathlib import Path

from planpack import __version__
from planpack.plan.diagnostics import Diagnostic
from planpack.plan.models import Plan
from planpack.revision import plan_revision

CACHE_ENV = "PLANPACK_CACHE_DIR"
CACHE_FOLDER = ".planpack-cache"
ENTRY_FORMAT = 1
PACKAGE = Path(__file__).resolve().parents[1]
# packages whose code cannot change a compiled plan
NOT_COMPILE = ("publish", "workflow", "__pycache__")
LIBRARIES = ("PyIRI", "PyNEC", "numpy", "scipy", "tzdata")
# what every entry's data must hold (CONTRACT.md), checked before it is trusted
DATA_KEYS = ("planpack", "generator", "net", "revision", "assumptions", "stations", "channels", "links",
             "net_schedule", "gaps", "scan_lists", "antennas", "safety", "diagnostics")
MAX_ENTRIES = 200  # a few versions of each plan of a large plan repository
GITIGNORE = "# written by planpack: a cache of compiled plans, safe to delete\n*\n"


def _library_version(name: str) -> str:
    try:
        return metadata.version(name)
    except metadata.PackageNotFoundError:
        return "absent"


@functools.lru_cache(maxsize=1)
def environment_key() -> str:
    """Hash of planpack's compile code and the versions of the libraries it runs [hex]."""
    h = hashlib.sha256()
    h.update(f"entry {ENTRY_FORMAT}\nplanpack {__version__}\npython {platform.python_version()}\n".encode())
    for name in LIBRARIES:
        h.update(f"{name} {_library_version(name)}\n".encode())
    for path in sorted(PACKAGE.rglob("*")):
        rel = path.relative_to(PACKAGE)
        if not path.is_file() or rel.parts[0] in NOT_COMPILE or "__pycache__" in rel.parts or path.suffix == ".pyc":
            continue
        h.update(rel.as_posix().encode() + b"\0")
        h.update(hashlib.sha256(path.read_bytes()).digest())
    return h.hexdigest()


def entry_key(plan: Plan) -> str:
    """The cache key of ``plan``: its file's content hash and the environment [hex]."""
    return hashlib.sha256(f"{plan.sha256}\n{environment_key()}".encode()).hexdigest()


def cache_folder(plan: Plan, cache_dir: str | os.PathLike | None = None) -> Path:
    """Where ``plan``'s entries live: ``cache_dir``, else ``$PLANPACK_CACHE_DIR``, else beside the plan."""
    return Path(cache_dir) if cache_dir is not None else default_cache_dir(plan.source)


def default_cache_dir(plan_path: str) -> Path:
    """``$PLANPACK_CACHE_DIR`` when set, else ``.planpack-cache/`` in the plan file's folder."""
    env = os.environ.get(CACHE_ENV)
    if env:
        return Path(env)
    return Path(os.path.dirname(os.path.abspath(plan_path))) / CACHE_FOLDER


def entry_path(plan: Plan, cache_dir: str | os.PathLike | None = None) -> Path:
    """The entry of ``plan``: named by its key alone, so a copy of the same plan (a git revision) finds it too."""
    return cache_folder(plan, cache_dir) / f"{entry_key(plan)[:48]}.json"


def _prune(folder: Path, keep: int | None = None) -> None:
    """Drop the least recently used entries beyond ``keep`` (default MAX_ENTRIES; a hit touches its entry)."""
    keep = MAX_ENTRIES if keep is None else keep
    entries = []
    for p in folder.glob("*.json"):
        try:
            entries.append((p.stat().st_mtime, p.name, p))
        except OSError:
            pass
    for _, _, p in sorted(entries, reverse=True)[keep:]:
        p.unlink(missing_ok=True)


def _load(path: Path, key: str):
    """The (data, diagnostics dicts) in an entry, or None when it is missing or not to be trusted."""
    try:
        with open(path, "rb") as fh:
            entry = json.loads(fh.read().decode("utf-8"))
    except (OSError, ValueError):
        return None
    if not isinstance(entry, dict) or entry.get("entry") != ENTRY_FORMAT or entry.get("key") != key \
            or entry.get("planpack") != __version__:
        return None
    data, diags, source = entry.get("data"), entry.get("diagnostics"), entry.get("source")
    if not isinstance(data, dict) or not isinstance(diags, list) or not isinstance(source, str):
        return None
    if any(k not in data for k in DATA_KEYS) or not isinstance(data.get("generator"), dict) \
            or data["generator"].get("version") != __version__ or not isinstance(data.get("diagnostics"), list):
        return None
    return data, diags, source


def _diagnostics(items: list, source: str, now: str) -> list[Diagnostic] | None:
    """Diagnostics from their dicts, moved to the path the plan is read from now; None if any is malformed."""
    out = []
    try:
        for d in items:
            if not isinstance(d, dict):
                return None
            fields = {k: d[k] for k in ("file", "line", "column", "severity", "code", "key", "message")}
            if fields["file"] == source:
                fields["file"] = now
            if not all(isinstance(fields[k], int) for k in ("line", "column")) \
                    or not all(isinstance(fields[k], str) for k in ("file", "severity", "code", "key", "message")):
                return None
            out.append(Diagnostic(**fields))
    except (KeyError, ValueError, TypeError):
        return None
    return out


def _write(path: Path, entry: dict) -> bool:
    """Write an entry atomically; False (and nothing left behind) when the folder cannot be written."""
    tmp = None
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        ignore = path.parent / ".gitignore"
        if not ignore.exists():
            _replace_text(ignore, GITIGNORE)
        fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=".json", dir=path.parent)
        with os.fdopen(fd, "wb") as fh:
            fh.write(json.dumps(entry, ensure_ascii=False, separators=(",", ":")).encode("utf-8"))
        os.chmod(tmp, 0o644)  # mkstemp makes it private; a shared cache folder should be readable
        os.replace(tmp, path)
        tmp = None
        _prune(path.parent)
    except (OSError, TypeError, ValueError):  # unwritable folder, or data that is not plain JSON
        return False
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except OSError:
                pass
    return True


def _replace_text(path: Path, text: str) -> None:
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def cached_compile(plan: Plan, cache_dir: str | os.PathLike | None = None, enabled: bool = True):
    """``compile_plan(plan)``, answered from the cache when nothing it depends on has changed.

    Parameters
    ----------
    plan : Plan
        A plan read without errors (``read_plan(path).plan``).
    cache_dir : path, optional
        The cache folder; default ``$PLANPACK_CACHE_DIR``, else ``.planpack-cache/`` beside the plan.
    enabled : bool
        False compiles without reading or writing the cache (``--no-cache``).

    Returns
    -------
    CompiledPlan
        Equal in ``data`` and ``diagnostics`` to a fresh compile; ``arrays`` is None on a hit.
        The revision is stamped afresh. A cache that cannot be written only costs time.
    """
    from planpack.compile import CompiledPlan, compile_plan

    if not enabled:
        return compile_plan(plan)
    key = entry_key(plan)
    path = entry_path(plan, cache_dir)
    hit = _load(path, key)
    if hit is not None:
        data, diag_dicts, source = hit
        diags = _diagnostics(diag_dicts, source, plan.source)
        in_data = _diagnostics(data["diagnostics"], source, plan.source)
        if diags is not None and in_data is not None:
            data["diagnostics"] = [d.to_dict() for d in in_data]
            data["revision"] = plan_revision(plan.source, plan.sha256).to_dict()
            try:
                os.utime(path)  # recently used: pruned last
            except OSError:
                pass
            return CompiledPlan(data, diags)
    compiled = compile_plan(plan)
    _write(path, {"entry": ENTRY_FORMAT, "key": key, "planpack": __version__, "source": plan.source,
                  "data": compiled.data, "diagnostics": [d.to_dict() for d in compiled.diagnostics]})
    return compiled
