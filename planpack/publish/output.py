"""The one place that writes the output folder: build beside it, then swap it in whole.

A build writes every file into a temporary folder next to ``DIR``, fsyncs it,
writes the marker file last (so a temporary folder with a marker is complete),
and only then swaps it into place with a rename. On Linux the swap is one
``renameat2(RENAME_EXCHANGE)`` call, so ``DIR`` is at every instant either the
previous complete site or the new one; elsewhere two renames are used and an
interrupted swap is repaired by the next run. Either way a failed or killed
build leaves the previous site whole, and the next run removes what it left.

It refuses to replace what it did not make: a non-empty folder without the
marker needs ``force``; the file-system root, a folder that holds the home
folder, the current directory, a git work tree (anywhere below it) or the
plans being read is never replaced. A lock file beside ``DIR`` serialises
builds into the same folder.

When ``DIR`` already holds exactly the files a build would write (byte for
byte, with the marker), nothing is written at all; and
:func:`read_previous` reads files of the previous site back, without
following a link, so that unchanged parts need not be rendered again.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import errno
import fcntl
import os
import shutil
import stat
import tempfile
import time
from collections.abc import Iterable, Mapping
from pathlib import Path

from planpack.errors import UsageError

MARKER = ".planpack-site"
MARKER_TEXT = (b"This folder was written by planpack build.\n"
               b"planpack replaces it whole on every build: anything else put here is lost.\n")
LOCK_WAIT_S = 60.0
MAX_FILE_BYTES = 256 * 1024 * 1024  # a file of the previous site read back; larger ones are rendered again


class OutputError(UsageError):
    """The output folder cannot be written or may not be replaced (exit 2, nothing changed)."""


def _tmp_prefix(out: Path) -> str:
    return f".{out.name}.planpack-tmp-"


def _old_prefix(out: Path) -> str:
    return f".{out.name}.planpack-old-"


def check_relative(path: str) -> None:
    """A path planpack may write under DIR: relative, plain parts, no way out."""
    if not isinstance(path, str):
        raise ValueError(f"refusing to write {path!r}: not a path")
    parts = path.split("/")
    if (not path or path.startswith("/") or "\\" in path or "\0" in path
            or any(p in ("", ".", "..") for p in parts) or path == MARKER):
        raise ValueError(f"refusing to write {path!r}: not a plain relative path inside the output folder")


def _os_error(exc: OSError, out: Path) -> OutputError:
    where = exc.filename or out.parent
    if exc.errno in (errno.ENOSPC, errno.EDQUOT):
        why = "the disk is full (or the quota is used up)"
    elif exc.errno == errno.EROFS:
        why = "the file system is read-only"
    elif exc.errno in (errno.EACCES, errno.EPERM):
        why = "permission denied"
    else:
        why = exc.strerror or str(exc)
    return OutputError(f"cannot write the site to {out}: {where}: {why}. The previous contents of {out} were left as they were.")


def _is_within(child: Path, parent: Path) -> bool:
    try:
        child.relative_to(parent)
        return True
    except ValueError:
        return False


def _git_work_tree_below(root: Path) -> Path | None:
    """The first folder at or below ``root`` that holds ``.git`` (a work tree or a repository); links not followed."""
    for dirpath, dirnames, filenames in os.walk(root, followlinks=False, onerror=lambda exc: None):
        if ".git" in dirnames or ".git" in filenames:
            return Path(dirpath)
        dirnames.sort()
    return None


def check_target(out: Path, *, force: bool, protect: Iterable[str] = ()) -> None:
    """Raise OutputError when out may not be replaced."""
    real = Path(os.path.realpath(out))
    never = "planpack never replaces this folder, even with --force; choose an empty or new folder"
    if real == Path(real.anchor):
        raise OutputError(f"--out {out}: is the root of the file system; {never}")
    if _is_within(Path(os.path.realpath(os.getcwd())), real):
        raise OutputError(f"--out {out}: holds the current folder; {never}")
    home = os.path.expanduser("~")
    if home not in ("~", "/", "") and _is_within(Path(os.path.realpath(home)), real):
        what = "is your home folder" if real == Path(os.path.realpath(home)) else f"holds your home folder {home}"
        raise OutputError(f"--out {out}: {what}; {never}")
    for p in protect:
        if _is_within(Path(os.path.realpath(p)), real):
            raise OutputError(f"--out {out}: holds the plan {p} being read; {never}")
    if os.path.islink(out):
        raise OutputError(f"--out {out}: is a symbolic link; give the real folder")
    if not os.path.lexists(out):
        return
    if not os.path.isdir(out):
        raise OutputError(f"--out {out}: exists and is not a folder")
    try:
        entries = os.listdir(out)
    except OSError as exc:
        raise _os_error(exc, out) from None
    if entries:
        tree = _git_work_tree_below(out)
        if tree is not None:
            what = "is a git work tree" if tree == out else f"holds the git work tree {tree}"
            raise OutputError(f"--out {out}: {what}; {never}")
    marker = out / MARKER
    if entries and not (marker.is_file() and not marker.is_symlink()) and not force:
        raise OutputError(f"--out {out}: is not empty and was not made by planpack (no {MARKER} file in it); "
                          "choose another folder, or give --force to replace it with the site")


class _Lock:
    """An advisory lock beside DIR; released by the kernel if the process dies."""

    def __init__(self, path: Path, out: Path, wait_s: float) -> None:
        self.path, self.out, self.wait_s, self.fd = path, out, wait_s, -1

    def __enter__(self) -> _Lock:
        try:
            self.fd = os.open(self.path, os.O_RDWR | os.O_CREAT | os.O_NOFOLLOW, 0o644)
        except OSError as exc:
            raise _os_error(exc, self.out) from None
        deadline = time.monotonic() + self.wait_s
        while True:
            try:
                fcntl.flock(self.fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
                return self
            except BlockingIOError:
                if time.monotonic() >= deadline:
                    os.close(self.fd)
                    raise OutputError(f"another planpack build is writing {self.out} (lock {self.path}); "
                                      "try again when it has finished") from None
                time.sleep(0.05)

    def __exit__(self, *exc) -> None:
        fcntl.flock(self.fd, fcntl.LOCK_UN)
        os.close(self.fd)


def _rmtree(path: Path) -> None:
    if os.path.islink(path) or os.path.isfile(path):
        os.unlink(path)
    elif os.path.isdir(path):
        shutil.rmtree(path)


def recover(out: Path) -> None:
    """Undo what an interrupted earlier run left beside out (call with the lock held)."""
    parent = out.parent
    try:
        names = sorted(os.listdir(parent))
    except OSError:
        return
    olds = [parent / n for n in names if n.startswith(_old_prefix(out))]
    if not os.path.lexists(out):
        # killed between the two renames of the fallback swap: put the previous site back
        for old in olds:
            # only a real folder this module set aside: never a planted link to somewhere else
            if not old.is_symlink() and old.is_dir() and (old / MARKER).is_file() and not (old / MARKER).is_symlink():
                os.rename(old, out)
                break
    for n in names:
        if n.startswith((_tmp_prefix(out), _old_prefix(out))) and os.path.lexists(parent / n):
            _rmtree(parent / n)


def _fsync_dir(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY | os.O_DIRECTORY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _write_file(path: Path, data: bytes) -> None:
    with open(path, "xb") as fh:
        fh.write(data)
        fh.flush()
        os.fsync(fh.fileno())


def _write_tree(root: Path, files: Mapping[str, bytes]) -> None:
    umask = os.umask(0)
    os.umask(umask)
    os.chmod(root, 0o777 & ~umask)  # mkdtemp made it private
    dirs = {root}
    for rel in sorted(files):
        dest = root / rel
        if dest.parent not in dirs:
            dest.parent.mkdir(parents=True, exist_ok=True)
            dirs.add(dest.parent)
        _write_file(dest, files[rel])
    for d in sorted(dirs, key=lambda p: len(p.parts), reverse=True):
        _fsync_dir(d)
    _write_file(root / MARKER, MARKER_TEXT)  # last: a folder with the marker is complete
    _fsync_dir(root)


_RENAME_EXCHANGE = 2
_AT_FDCWD = -100


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths atomically (Linux renameat2); False when the system cannot."""
    name = ctypes.util.find_library("c")
    try:
        libc = ctypes.CDLL(name, use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError, TypeError):
        return False
    fn.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    if fn(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.EINVAL, errno.ENOSYS, errno.ENOTSUP, errno.EXDEV):
        return False
    raise OSError(err, os.strerror(err), str(b))


def _swap(tmp: Path, out: Path) -> None:
    if not os.path.lexists(out):
        os.rename(tmp, out)
        _fsync_dir(out.parent)
        return
    if _exchange(tmp, out):  # now out is the new site and tmp holds the previous one
        _fsync_dir(out.parent)
        _cleanup(tmp)
        return
    old = Path(tempfile.mkdtemp(prefix=_old_prefix(out), dir=out.parent))
    os.rmdir(old)
    os.rename(out, old)
    os.rename(tmp, out)
    _fsync_dir(out.parent)
    _cleanup(old)


def publish(files: Mapping[str, bytes], out_dir: str | os.PathLike, *, force: bool = False,
            protect: Iterable[str] = (), lock_wait_s: float = LOCK_WAIT_S) -> Path:
    """Write files ({relative path: bytes}) as the whole content of out_dir, atomically.

    force: replace a non-empty folder that has no planpack marker.
    protect: paths (the plans being read) that must never be inside out_dir.
    Returns the absolute output path. Raises OutputError with a message for the user.
    """
    for rel in files:
        check_relative(rel)
    out = Path(os.path.abspath(out_dir))
    protect = list(protect)
    check_target(out, force=force, protect=protect)
    try:
        out.parent.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise _os_error(exc, out) from None
    with _Lock(out.parent / f".{out.name}.planpack-lock", out, lock_wait_s):
        try:
            recover(out)
        except OSError as exc:
            raise _os_error(exc, out) from None
        check_target(out, force=force, protect=protect)  # again, now that nobody else writes
        if holds_exactly(out, files):
            return out  # nothing to write: the folder already is this site
        try:
            tmp = Path(tempfile.mkdtemp(prefix=_tmp_prefix(out), dir=out.parent))
        except OSError as exc:
            raise _os_error(exc, out) from None
        try:
            _write_tree(tmp, files)
            _swap(tmp, out)
        except OSError as exc:
            _cleanup(tmp)
            raise _os_error(exc, out) from None
        except BaseException:
            _cleanup(tmp)
            raise
    return out


def _open_below(root_fd: int, rel: str) -> int:
    """A descriptor of the regular file ``rel`` below the folder ``root_fd``; no component may be a link."""
    parts = rel.split("/")
    fd = root_fd
    try:
        for part in parts[:-1]:
            nxt = os.open(part, os.O_RDONLY | os.O_DIRECTORY | os.O_NOFOLLOW | os.O_CLOEXEC, dir_fd=fd)
            if fd != root_fd:
                os.close(fd)
            fd = nxt
        return os.open(parts[-1], os.O_RDONLY | os.O_NOFOLLOW | os.O_NONBLOCK | os.O_CLOEXEC, dir_fd=fd)
    finally:
        if fd != root_fd:
            os.close(fd)


def _read_fd(fd: int, limit: int) -> bytes | None:
    st = os.fstat(fd)
    if not stat.S_ISREG(st.st_mode) or st.st_size > limit:
        return None
    with os.fdopen(os.dup(fd), "rb") as fh:
        data = fh.read(limit + 1)
    return data if len(data) <= limit else None


def _open_site(out: Path) -> int | None:
    """A descriptor of ``out`` when it is a real folder with planpack's marker (a site planpack wrote); else None."""
    try:
        fd = os.open(out, os.O_RDONLY | os.O_DIRECTORY | os.O_NOFOLLOW | os.O_CLOEXEC)
    except OSError:
        return None
    try:
        mfd = os.open(MARKER, os.O_RDONLY | os.O_NOFOLLOW | os.O_NONBLOCK | os.O_CLOEXEC, dir_fd=fd)
    except OSError:
        os.close(fd)
        return None
    try:
        if _read_fd(mfd, len(MARKER_TEXT)) != MARKER_TEXT:
            os.close(fd)
            return None
    except OSError:
        os.close(fd)
        return None
    finally:
        os.close(mfd)
    return fd


def read_previous(out_dir: str | os.PathLike, paths: Iterable[str]) -> dict[str, bytes] | None:
    """The bytes of ``paths`` in the site planpack wrote at ``out_dir``; None when any cannot be read.

    Only a real folder holding planpack's marker is read; every path must be
    plain and relative, and no folder or file on the way may be a link.
    """
    out = Path(os.path.abspath(out_dir))
    root = _open_site(out)
    if root is None:
        return None
    found: dict[str, bytes] = {}
    try:
        for rel in paths:
            try:
                check_relative(rel)
            except ValueError:
                return None
            try:
                fd = _open_below(root, rel)
            except OSError:
                return None
            try:
                data = _read_fd(fd, MAX_FILE_BYTES)
            except OSError:
                data = None
            finally:
                os.close(fd)
            if data is None:
                return None
            found[rel] = data
    finally:
        os.close(root)
    return found


def holds_exactly(out: Path, files: Mapping[str, bytes]) -> bool:
    """Whether the site at ``out`` is these files byte for byte (and nothing else but the marker)."""
    root = _open_site(out)
    if root is None:
        return False
    try:
        seen = 0
        for dirpath, dirnames, filenames, dfd in os.fwalk(".", dir_fd=root, follow_symlinks=False):
            for name in filenames:
                rel = os.path.normpath(os.path.join(dirpath, name))
                if rel == MARKER:
                    continue
                want = files.get(rel)
                if want is None:
                    return False
                try:
                    fd = os.open(name, os.O_RDONLY | os.O_NOFOLLOW | os.O_NONBLOCK | os.O_CLOEXEC, dir_fd=dfd)
                except OSError:
                    return False
                try:
                    if _read_fd(fd, len(want)) != want:
                        return False
                finally:
                    os.close(fd)
                seen += 1
            for name in dirnames:
                if stat.S_ISLNK(os.stat(name, dir_fd=dfd, follow_symlinks=False).st_mode):
                    return False  # fwalk lists a link to a folder among the folders (and does not enter it)
        return seen == len(files)
    except OSError:
        return False
    finally:
        os.close(root)


def _cleanup(tmp: Path) -> None:
    try:
        if os.path.lexists(tmp):
            _rmtree(tmp)
    except OSError:
        pass  # the next run removes it
