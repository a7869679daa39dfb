"""Reusing what the previous publish wrote, so that a rebuild with nothing changed renders nothing.

A publishing run renders in units: the cards of one net, and the site. Each
unit has a key, the SHA-256 of everything its bytes can depend on:

- the compiled data it is rendered from (canonical JSON of ``plan.json``,
  and for the site the warnings shown and the card file names linked);
- the renderer: a hash of the source of every planpack module and every
  site template, the versions of planpack, Python and the rendering
  libraries (reportlab, jinja2, markupsafe, markdown-it-py, qrcode, pillow),
  the card fonts found (``PLANPACK_FONT_DIR`` and the DejaVu files'
  names, sizes and times) and ``SOURCE_DATE_EPOCH``;
- the options (card size, imposition sheet).

After a publish succeeds, a record ``{unit: {key, files: {path: sha256}}}``
for that output folder is written into the cache (``rendered/`` under the
cache root, named by a hash of the folder's real path). The next run into
the same folder reuses a unit when its key is unchanged and every one of its
files, read back from the folder (no link followed, see
:func:`planpack.publish.output.read_previous`), has exactly the hash recorded.
A missing or damaged record, a changed key, a missing, extra or changed file:
the unit is rendered afresh. The record is in the user's own cache, not in
the published folder, so a file changed on the share is never carried into
the next build.
"""

from __future__ import annotations

import functools
import hashlib
import json
import os
import platform
import re
import sys
from importlib import metadata
from pathlib import Path

from planpack import __version__
from planpack.workflow.cachedir import open_cache

KIND = "rendered"
RECORD_FORMAT = 1
MAX_RECORDS = 50  # output folders remembered
MAX_RECORD_BYTES = 16 * 1024 * 1024
RECORD_NAME = re.compile(r"[0-9a-f]{48}\.json")
PACKAGE = Path(__file__).resolve().parents[1]
LIBRARIES = ("reportlab", "jinja2", "MarkupSafe", "markdown-it-py", "qrcode", "pillow")
FONT_DIRS = ("/usr/share/fonts/truetype/dejavu",)
SHA256 = re.compile(r"[0-9a-f]{64}")


def _version(name: str) -> str:
    try:
        return metadata.version(name)
    except metadata.PackageNotFoundError:
        return "absent"


def _templates_dirs() -> list[Path]:
    """Where the site templates can be: beside the package (a checkout) and where a wheel puts them."""
    return [PACKAGE.parent / "site_templates", Path(sys.prefix) / "share" / "planpack" / "site_templates"]


def _hash_tree(h, root: Path, label: str) -> None:
    if not root.is_dir():
        h.update(f"{label} absent\n".encode())
        return
    for path in sorted(root.rglob("*")):
        rel = path.relative_to(root)
        if not path.is_file() or "__pycache__" in rel.parts or path.suffix == ".pyc":
            continue
        h.update(f"{label}/{rel.as_posix()}\0".encode())
        h.update(hashlib.sha256(path.read_bytes()).digest())


def _fonts(h) -> None:
    folder = os.environ.get("PLANPACK_FONT_DIR") or ""
    h.update(f"PLANPACK_FONT_DIR={folder!r}\n".encode())
    for d in ([folder] if folder else []) + list(FONT_DIRS):
        try:
            names = sorted(n for n in os.listdir(d) if n.lower().endswith(".ttf"))
        except OSError:
            h.update(f"fonts {d!r} absent\n".encode())
            continue
        for n in names:
            try:
                st = os.stat(os.path.join(d, n))
            except OSError:
                continue
            h.update(f"font {d!r} {n!r} {st.st_size} {st.st_mtime_ns}\n".encode())


@functools.lru_cache(maxsize=1)
def _code_key() -> str:
    h = hashlib.sha256()
    h.update(f"format {RECORD_FORMAT}\nplanpack {__version__}\npython {platform.python_version()}\n".encode())
    for name in LIBRARIES:
        h.update(f"{name} {_version(name)}\n".encode())
    _hash_tree(h, PACKAGE, "planpack")
    for d in _templates_dirs():
        _hash_tree(h, d, str(d))
    return h.hexdigest()


def renderer_key() -> str:
    """Hash of everything rendering depends on besides the data and the options [hex]."""
    h = hashlib.sha256(_code_key().encode())
    h.update(f"SOURCE_DATE_EPOCH={os.environ.get('SOURCE_DATE_EPOCH')!r}\n".encode())
    _fonts(h)
    return h.hexdigest()


def canonical(value) -> bytes:
    """The one JSON spelling of a plain value: sorted keys, no spaces, UTF-8."""
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False).encode("utf-8")


def unit_key(kind: str, payload, renderer: str | None = None) -> str:
    """The key of one rendering unit: what kind it is, its inputs (plain JSON) and the renderer [hex]."""
    h = hashlib.sha256()
    h.update(f"{kind}\n{renderer or renderer_key()}\n".encode())
    h.update(canonical(payload))
    return h.hexdigest()


def _digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


class Reuse:
    """What the previous publish into ``out`` rendered, and what this run renders, unit by unit.

    ``take(unit, key, read)`` gives the files of a unit whose key is unchanged,
    read with ``read(paths) -> {path: bytes} | None`` and checked hash by hash;
    ``note(unit, key, files, notes)`` records what this run rendered or reused (and any warnings about it);
    ``save()`` writes the record once the publish has succeeded.
    """

    def __init__(self, out: str | os.PathLike, enabled: bool = True) -> None:
        self.enabled = enabled
        self.name = hashlib.sha256(os.fsencode(os.path.realpath(out))).hexdigest()[:48] + ".json"
        self.previous: dict = {}
        self.current: dict = {}
        self.reused: list[str] = []
        if enabled:
            self.previous = self._load()

    def _load(self) -> dict:
        folder = open_cache(KIND, create=False)
        if folder is None:
            return {}
        with folder:
            raw = folder.read(self.name, MAX_RECORD_BYTES)
        if raw is None:
            return {}
        try:
            rec = json.loads(raw.decode("utf-8"))
        except (ValueError, UnicodeDecodeError, RecursionError):
            return {}
        if not isinstance(rec, dict) or rec.get("format") != RECORD_FORMAT or not isinstance(rec.get("units"), dict):
            return {}
        units = {}
        for unit, u in rec["units"].items():
            if isinstance(u, dict) and isinstance(u.get("key"), str) and isinstance(u.get("files"), dict) \
                    and all(isinstance(p, str) and isinstance(d, str) and SHA256.fullmatch(d)
                            for p, d in u["files"].items()) \
                    and isinstance(u.get("notes", []), list) and all(isinstance(x, str) for x in u.get("notes", [])):
                units[unit] = u
        return units

    def take(self, unit: str, key: str, read) -> dict[str, bytes] | None:
        """The files of ``unit`` from the previous publish, when its key is ``key`` and every file checks."""
        prev = self.previous.get(unit)
        if not self.enabled or prev is None or prev["key"] != key:
            return None
        files = read(sorted(prev["files"]))
        if files is None or set(files) != set(prev["files"]):
            return None
        if any(_digest(files[p]) != prev["files"][p] for p in files):
            return None
        self.reused.append(unit)
        return files

    def notes_of(self, unit: str) -> list[str]:
        """The notes (warnings about the unit's content) recorded with a unit of the previous publish."""
        return list(self.previous.get(unit, {}).get("notes", []))

    def note(self, unit: str, key: str, files: dict[str, bytes], notes: list[str] | None = None) -> None:
        self.current[unit] = {"key": key, "files": {p: _digest(b) for p, b in sorted(files.items())},
                              "notes": list(notes or [])}

    def save(self) -> None:
        """Remember what was published (call after the publish succeeded; a failure only costs time)."""
        if not self.enabled:
            return
        folder = open_cache(KIND)
        if folder is None:
            return
        with folder:
            if folder.write(self.name, canonical({"format": RECORD_FORMAT, "units": self.current})):
                folder.prune(RECORD_NAME, MAX_RECORDS)
