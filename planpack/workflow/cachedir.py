"""planpack's cache folder: where it is, and reading and writing in it without following a link.

The cache lives outside any plan repository, in the user's cache folder per
the XDG base directory specification: ``$XDG_CACHE_HOME/planpack`` (default
``~/.cache/planpack``). ``PLANPACK_CACHE_DIR`` names another folder (a CI job
that keeps its cache between runs points it at the folder it keeps).

Each kind of record has its own sub-folder (``compiled/``, ``rendered/``),
made private (0700) by planpack. Every operation goes through a directory
descriptor opened with ``O_NOFOLLOW``, and every entry is opened with
``O_NOFOLLOW`` relative to it, so a cache folder, a sub-folder or an entry
that is a symbolic link is never followed: the cache is then simply not used.
A sub-folder owned by someone else, or writable by others, is not used
either. Nothing outside the sub-folders is ever written or removed, apart
from the ``CACHEDIR.TAG`` file that tells backup tools the folder is a cache
(https://bford.info/cachedir/).
"""

from __future__ import annotations

import errno
import os
import re
import secrets
import stat
from pathlib import Path

CACHE_ENV = "PLANPACK_CACHE_DIR"
TAG_NAME = "CACHEDIR.TAG"
TAG_TEXT = (b"Signature: 8a477f597d28d172789f06886806bc55\n"
            b"# This folder is planpack's cache (compiled plans, records of rendered output).\n"
            b"# It is safe to delete; planpack rebuilds what it needs.\n")
_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]{0,127}")
_TMP_PREFIX = ".tmp-"


def cache_root(environ=None) -> Path | None:
    """The cache folder: ``$PLANPACK_CACHE_DIR``, else ``$XDG_CACHE_HOME/planpack``, else ``~/.cache/planpack``.

    None when none can be named (no home folder). A relative ``XDG_CACHE_HOME``
    is ignored, as the XDG specification asks.
    """
    env = os.environ if environ is None else environ
    explicit = env.get(CACHE_ENV)
    if explicit:
        return Path(os.path.abspath(explicit))
    xdg = env.get("XDG_CACHE_HOME")
    if xdg and os.path.isabs(xdg):
        return Path(xdg) / "planpack"
    home = os.path.expanduser("~")
    if home in ("~", "/", ""):
        return None
    return Path(home) / ".cache" / "planpack"


def _open_dir(name: str | os.PathLike, dir_fd: int | None = None) -> int:
    return os.open(name, os.O_RDONLY | os.O_DIRECTORY | os.O_NOFOLLOW | os.O_CLOEXEC, dir_fd=dir_fd)


class CacheDir:
    """One sub-folder of the cache, held open as a directory descriptor.

    Use :func:`open_cache` to get one. Every method takes a plain entry name
    (no ``/``), never follows a link, and reports failure by returning
    None/False: a cache that cannot be used only costs time.
    """

    def __init__(self, fd: int, path: Path) -> None:
        self.fd = fd
        self.path = path

    def close(self) -> None:
        if self.fd >= 0:
            os.close(self.fd)
            self.fd = -1

    def __enter__(self) -> CacheDir:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    @staticmethod
    def _check(name: str) -> None:
        if not _NAME.fullmatch(name):
            raise ValueError(f"not a cache entry name: {name!r}")

    def read(self, name: str, max_bytes: int) -> bytes | None:
        """The bytes of a regular file ``name`` (at most max_bytes), or None."""
        self._check(name)
        try:
            fd = os.open(name, os.O_RDONLY | os.O_NOFOLLOW | os.O_NONBLOCK | os.O_CLOEXEC, dir_fd=self.fd)
        except OSError:
            return None
        try:
            st = os.fstat(fd)
            if not stat.S_ISREG(st.st_mode) or st.st_size > max_bytes:
                return None
            chunks, left = [], max_bytes + 1
            while left > 0:
                chunk = os.read(fd, min(left, 1 << 20))
                if not chunk:
                    break
                chunks.append(chunk)
                left -= len(chunk)
            data = b"".join(chunks)
            return data if len(data) <= max_bytes else None
        except OSError:
            return None
        finally:
            os.close(fd)

    def write(self, name: str, data: bytes) -> bool:
        """Write ``name`` whole (a temporary entry renamed into place); False when it cannot."""
        self._check(name)
        tmp = f"{_TMP_PREFIX}{secrets.token_hex(8)}"
        try:
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW | os.O_CLOEXEC, 0o600, dir_fd=self.fd)
        except OSError:
            return False
        try:
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
            os.replace(tmp, name, src_dir_fd=self.fd, dst_dir_fd=self.fd)  # a rename replaces a link, never follows it
            return True
        except OSError:
            try:
                os.unlink(tmp, dir_fd=self.fd)
            except OSError:
                pass
            return False

    def touch(self, name: str) -> None:
        """Mark ``name`` recently used (pruned last)."""
        self._check(name)
        try:
            os.utime(name, dir_fd=self.fd, follow_symlinks=False)
        except (OSError, NotImplementedError):
            pass

    def remove(self, name: str) -> None:
        self._check(name)
        try:
            os.unlink(name, dir_fd=self.fd)
        except OSError:
            pass

    def prune(self, pattern: re.Pattern, keep: int) -> None:
        """Remove the least recently used regular files whose names match ``pattern`` beyond ``keep``.

        Only names this module's callers write are candidates; anything else in the folder is left alone.
        """
        found = []
        try:
            with os.scandir(self.fd) as it:
                for e in it:
                    if not pattern.fullmatch(e.name):
                        continue
                    try:
                        st = e.stat(follow_symlinks=False)
                    except OSError:
                        continue
                    if stat.S_ISREG(st.st_mode):
                        found.append((st.st_mtime_ns, e.name))
        except OSError:
            return
        for _, name in sorted(found, reverse=True)[keep:]:
            self.remove(name)


def open_cache(kind: str, root: Path | None = None, create: bool = True) -> CacheDir | None:
    """The sub-folder ``kind`` of the cache, opened safely; None when there is no usable cache.

    Refused (None): a cache folder or sub-folder that is a symbolic link or not
    a folder, a sub-folder owned by another user or writable by others.
    """
    CacheDir._check(kind)
    root = cache_root() if root is None else Path(root)
    if root is None:
        return None
    try:
        if create and not os.path.lexists(root):
            os.makedirs(root, mode=0o700, exist_ok=True)
        rfd = _open_dir(root)
    except OSError:
        return None
    try:
        if create:
            _write_tag(rfd)
            try:
                os.mkdir(kind, 0o700, dir_fd=rfd)
            except FileExistsError:
                pass
        fd = _open_dir(kind, dir_fd=rfd)
    except OSError:
        return None
    finally:
        os.close(rfd)
    st = os.fstat(fd)
    if st.st_uid != os.geteuid() or st.st_mode & 0o022:
        os.close(fd)
        return None
    return CacheDir(fd, root / kind)


def _write_tag(rfd: int) -> None:
    try:
        fd = os.open(TAG_NAME, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW | os.O_CLOEXEC, 0o644, dir_fd=rfd)
    except OSError as exc:
        if exc.errno not in (errno.EEXIST, errno.ELOOP, errno.EACCES, errno.EPERM, errno.EROFS):
            raise
        return
    with os.fdopen(fd, "wb") as fh:
        fh.write(TAG_TEXT)
