"""The compile cache: a rebuild of a plan that has not changed skips the predictions and antenna solutions.

Compiled data is never trusted more than the plan it came from:

- **Outside the plan's repository.** Entries live in the user's cache folder
  (``compiled/`` under :func:`planpack.workflow.cachedir.cache_root`:
  ``$PLANPACK_CACHE_DIR``, else ``$XDG_CACHE_HOME/planpack``, else
  ``~/.cache/planpack``), never beside the plan, so a file committed into a
  plan repository is never read as a compiled plan. The folder and its entries
  are never followed through a symbolic link (:mod:`planpack.workflow.cachedir`).
- **Keyed by everything the figures depend on**: the SHA-256 of the plan
  file's bytes; planpack's version and a hash of the source of every module
  the compile runs (everything under ``planpack/`` but the publishers, the
  commands and this package); the versions of PyIRI, PyNEC, numpy, scipy and
  tzdata, and of Python.
- **Bound to the exact plan bytes**: an entry records the plan's hash, and
  what the compiled data says of the plan (net id, validity, stations and
  their addresses, positions and power, channels and their frequencies and
  modes, links, antennas) must equal what the plan says.
- **Checked before use**: the data must match the schema of ``plan.json``
  (:mod:`planpack.output_schema`) and refer only to stations, channels, links
  and antennas it holds; the diagnostics must be well-formed.

Any mismatch is a miss: the plan is compiled afresh and the entry rewritten.
The revision stamp (git commit or content hash) is not part of the figures:
it is stamped afresh on every load. Entries are written whole (a temporary
entry renamed into place); the least recently used beyond a bound are dropped.
"""

from __future__ import annotations

import functools
import hashlib
import json
import platform
import re
from dataclasses import dataclass, field
from importlib import metadata
from pathlib import Path

from planpack import __version__
from planpack.plan.diagnostics import Diagnostic
from planpack.plan.models import Plan
from planpack.revision import plan_revision
from planpack.workflow.cachedir import CACHE_ENV, cache_root, open_cache  # noqa: F401 - CACHE_ENV for callers

KIND = "compiled"
ENTRY_FORMAT = 2
PACKAGE = Path(__file__).resolve().parents[1]
# code that cannot change a compiled plan
NOT_COMPILE = ("publish", "workflow", "commands", "cli.py", "__main__.py", "errors.py", "__pycache__")
LIBRARIES = ("PyIRI", "PyNEC", "numpy", "scipy", "tzdata")
MAX_ENTRIES = 200  # a few versions of each plan of a large plan repository
MAX_ENTRY_BYTES = 512 * 1024 * 1024  # above the largest plan.json a plan within the size bounds makes
ENTRY_NAME = re.compile(r"[0-9a-f]{48}\.json")
DIAGNOSTIC_FIELDS = ("file", "line", "column", "severity", "code", "key", "message")


@dataclass(frozen=True)
class CachedPlan:
    """A compiled plan answered from the cache: the same ``data`` and ``diagnostics`` as a fresh compile."""

    data: dict
    diagnostics: list = field(default_factory=list)
    arrays: None = None  # the numpy arrays are not cached


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


def entry_name(plan: Plan) -> str:
    """The file name of ``plan``'s entry in the ``compiled/`` folder (a copy of the same bytes finds it too)."""
    return f"{entry_key(plan)[:48]}.json"


def cache_folder(cache_dir=None) -> Path | None:
    """Where entries live: ``compiled/`` under ``cache_dir`` or the cache root (None: no cache folder)."""
    root = Path(cache_dir) if cache_dir is not None else cache_root()
    return None if root is None else root / KIND


# --------------------------------------------------------------------- checks

def _no_constants(name: str):
    raise ValueError(f"{name} is not JSON planpack writes")


def _parse(raw: bytes):
    try:
        return json.loads(raw.decode("utf-8"), parse_constant=_no_constants)
    except (ValueError, RecursionError):
        return None


def _same(a, b) -> bool:
    """JSON equality of two plain values: 5410 equals 5410.0, but true is not 1 and "5410" is not 5410."""
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return float(a) == float(b)
    return type(a) is type(b) and a == b


def plan_mismatch(data: dict, plan: Plan, failed: bool = False) -> str | None:
    """Where compiled ``data`` disagrees with what ``plan`` itself says; None when it agrees.

    These are the parts of ``plan.json`` that are the plan's own values, not
    results: an entry made for other bytes (or edited) shows here. ``failed``:
    the compile stopped on an error, so the data holds no links.
    """
    net = data["net"]
    for key, want in (("id", plan.net.id), ("title", plan.net.title), ("handling", plan.net.handling),
                      ("timezone", plan.net.timezone), ("net_address", plan.net.net_address),
                      ("base_url", plan.net.base_url), ("instructions_md", plan.net.instructions)):
        if net.get(key) != want:
            return f"net.{key}"
    if net["valid"] != {"from": plan.net.valid_from.isoformat(), "to": plan.net.valid_to.isoformat()}:
        return "net.valid"
    if len(data["stations"]) != len(plan.stations):
        return "stations"
    for got, st in zip(data["stations"], plan.stations):
        want = {"id": st.id, "name": st.name, "address": st.address, "role": st.role, "lat_deg": st.at.lat_deg,
                "lon_deg": st.at.lon_deg, "power_w": st.power_w, "antennas": list(st.antennas),
                "noise": st.noise}
        for key, value in want.items():
            if not _same(got.get(key), value):
                return f"stations.{st.id}.{key}"
    if len(data["channels"]) != len(plan.channels):
        return "channels"
    for got, ch in zip(data["channels"], plan.channels):
        for key, value in (("id", ch.id), ("freq_khz", ch.khz), ("mode", ch.mode), ("note", ch.note)):
            if not _same(got.get(key), value):
                return f"channels.{ch.id}.{key}"
    links = [(ln["from"], ln["to"]) for ln in data["links"]]
    if links != [tuple(p) for p in plan.links] and not (failed and not links):  # a failed compile predicts no link
        return "links"
    if sorted(a["id"] for a in data["antennas"]) != sorted(a.id for a in plan.antennas):
        return "antennas"
    return None


def reference_problem(data: dict) -> str | None:
    """A reference in ``data`` to a station, channel, link or antenna it does not hold; None when all resolve."""
    stations = {s["id"] for s in data["stations"]}
    channels = {c["id"] for c in data["channels"]}
    optional = channels | {None}
    links = {ln["id"] for ln in data["links"]}
    for ln in data["links"]:
        if ln["from"] not in stations or ln["to"] not in stations or ln["id"] != f"{ln['from']}--{ln['to']}":
            return f"links.{ln['id']}"
        if [h["utc_hour"] for h in ln["hours"]] != list(range(24)):
            return f"links.{ln['id']}.hours"
        for h in ln["hours"]:
            if h["first"] not in optional or h["second"] not in optional \
                    or any(c["channel"] not in channels for c in h["channels"]):
                return f"links.{ln['id']}.hours[{h['utc_hour']}]"
    hours = data["net_schedule"]["hours"]
    if [h["utc_hour"] for h in hours] != list(range(24)):
        return "net_schedule.hours"
    for h in hours:
        if h["first"] not in optional or h["second"] not in optional \
                or h.get("best") not in optional or h.get("weakest_link") not in links | {None}:
            return f"net_schedule.hours[{h['utc_hour']}]"
    for i, g in enumerate(data["gaps"]):
        if any(x not in links for x in g["links"]) or any(c not in channels for c in g.get("channels_outside_hours", [])):
            return f"gaps[{i}]"
    for s in data["scan_lists"]:
        if s["station"] not in stations or any(c not in channels for g in s["groups"] for c in g["channels"]) \
                or any(c not in channels for c in s["wasted"]):
            return f"scan_lists.{s['station']}"
    for a in data["antennas"]:
        if any(s not in stations for s in a["stations"]) or any(c["channel"] not in channels for c in a["channels"]) \
                or any(e["station"] not in stations for e in a["exposure"]):
            return f"antennas.{a['id']}"
    return None


def _diagnostics(items, source: str, now: str) -> list[Diagnostic] | None:
    """Diagnostics from their dicts, moved to the path the plan is read from now; None if any is malformed."""
    if not isinstance(items, list):
        return None
    out = []
    try:
        for d in items:
            if not isinstance(d, dict) or set(d) != set(DIAGNOSTIC_FIELDS):
                return None
            fields = dict(d)
            if not all(type(fields[k]) is int and fields[k] >= 0 for k in ("line", "column")) \
                    or not all(isinstance(fields[k], str) for k in ("file", "severity", "code", "key", "message")):
                return None
            if fields["file"] != source:
                return None  # an analysis diagnostic names the plan it came from
            fields["file"] = now
            out.append(Diagnostic(**fields))  # refuses an undeclared code or severity
    except (KeyError, ValueError, TypeError):
        return None
    return out


def load_entry(raw: bytes, plan: Plan, key: str) -> CachedPlan | None:
    """The compiled plan an entry holds, when it is whole, well-formed and made from ``plan``'s bytes; else None."""
    from planpack.output_schema import output_schema
    from planpack.workflow.schemacheck import first_error

    entry = _parse(raw)
    if not isinstance(entry, dict) or entry.get("entry") != ENTRY_FORMAT or entry.get("key") != key \
            or entry.get("planpack") != __version__ or entry.get("plan_sha256") != plan.sha256:
        return None
    data, source = entry.get("data"), entry.get("source")
    if not isinstance(data, dict) or not isinstance(source, str):
        return None
    try:
        if first_error(data, output_schema()) is not None:
            return None
        if not isinstance(data.get("generator"), dict) or data["generator"].get("version") != __version__:
            return None
        diags = _diagnostics(entry.get("diagnostics"), source, plan.source)
        in_data = _diagnostics(data.get("diagnostics"), source, plan.source)
        if diags is None or in_data is None:
            return None
        failed = any(d.severity == "error" for d in diags)
        if plan_mismatch(data, plan, failed) is not None or reference_problem(data) is not None:
            return None
    except (KeyError, TypeError, AttributeError, ValueError):  # a shape the schema leaves open
        return None
    data["diagnostics"] = [d.to_dict() for d in in_data]
    data["revision"] = plan_revision(plan.source, plan.sha256).to_dict()
    return CachedPlan(data, diags)


def cached_compile(plan: Plan, cache_dir=None, enabled: bool = True):
    """``compile_plan(plan)``, answered from the cache when nothing it depends on has changed.

    Parameters
    ----------
    plan : Plan
        A plan read without errors (``read_plan(path).plan``).
    cache_dir : path, optional
        The cache folder (entries go in its ``compiled/``); default :func:`cache_root`.
    enabled : bool
        False compiles without reading or writing the cache (``--no-cache``), nor the disk cache of
        NEC solutions (:mod:`planpack.antennas.solvecache`).

    Returns
    -------
    CompiledPlan or CachedPlan
        Equal in ``data`` and ``diagnostics`` to a fresh compile; ``arrays`` is None on a hit.
        The revision is stamped afresh. A cache that cannot be used only costs time.
    """
    if not enabled:
        from planpack.antennas import solvecache
        from planpack.compile import compile_plan

        with solvecache.disabled():  # --no-cache: afresh, the antennas too
            return compile_plan(plan)
    root = Path(cache_dir) if cache_dir is not None else cache_root()
    folder = open_cache(KIND, root) if root is not None else None
    if folder is None:
        from planpack.compile import compile_plan

        return compile_plan(plan)
    with folder:
        key = entry_key(plan)
        name = entry_name(plan)
        raw = folder.read(name, MAX_ENTRY_BYTES)
        if raw is not None:
            hit = load_entry(raw, plan, key)
            if hit is not None:
                folder.touch(name)
                return hit
        from planpack.compile import compile_plan

        compiled = compile_plan(plan)
        entry = {"entry": ENTRY_FORMAT, "key": key, "planpack": __version__, "plan_sha256": plan.sha256,
                 "source": plan.source, "data": compiled.data,
                 "diagnostics": [d.to_dict() for d in compiled.diagnostics]}
        try:
            raw = json.dumps(entry, ensure_ascii=False, separators=(",", ":"), allow_nan=False).encode("utf-8")
        except (TypeError, ValueError):  # data that is not plain JSON: compile it again next time
            return compiled
        if folder.write(name, raw):
            folder.prune(ENTRY_NAME, MAX_ENTRIES)
        return compiled
