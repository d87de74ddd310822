"""Atomic file writing: a file is either its old self or its complete new self, never half.

Write to a temporary file in the same folder, flush and fsync it, then rename it over the
target (``os.replace`` is atomic on POSIX within one filesystem), then fsync the folder so
the rename itself survives a crash. On any failure the temporary file is removed and the
target is untouched. Imports only the standard library.

Every file we write gets the mode a plain ``open()`` would give it (0666 less the umask);
a file we replace keeps the mode it had.

The output rule, for every command that writes a file (``claim_output``): an existing
file is refused unless the user says ``--force``; an input of the command is never its
output; what is there is not a regular file (a folder, a FIFO) is refused; and a file that
is replaced keeps its previous version as ``NAME.bak``.
"""

from __future__ import annotations

import contextlib
import errno
import functools
import os
import shutil
import stat
import tempfile
from collections.abc import Iterable, Iterator
from pathlib import Path

from .errors import UserInputError


@functools.lru_cache(maxsize=1)
def _umask() -> int:
    """The process's umask (read once: os.umask can only be read by setting it)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def fsync_dir(folder: Path) -> None:
    """Make a rename in ``folder`` durable (POSIX); a no-op where folders cannot be opened."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)  # a failure here is reported: the rename may not survive a crash
    finally:
        os.close(fd)


def describe_os_error(err: OSError) -> str:
    """One line for a failed write: what happened, in words a user can act on."""
    if err.errno in (errno.ENOSPC, errno.EDQUOT):
        return "the disk is full (no space left); free some space and run again"
    if err.errno == errno.EFBIG:
        return "the file is larger than this system allows (file size limit reached)"
    if err.errno in (errno.EACCES, errno.EPERM, errno.EROFS):
        return "no permission to write here; choose a folder you can write to"
    if err.errno == errno.ENOENT:
        return "the folder does not exist"
    return err.strerror or str(err)


@contextlib.contextmanager
def atomic_path(target: str | os.PathLike[str], suffix: str | None = None) -> Iterator[Path]:
    """Yield a temporary path beside ``target``; on success it is renamed over ``target``.

    The caller writes the complete file to the yielded path (by any means, e.g. an
    encoder that takes a file name). If the block raises, the temporary file is removed
    and ``target`` is left as it was.
    """
    target = Path(target)
    folder = target.parent if str(target.parent) else Path(".")
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix or target.suffix
                                    + ".tmp", dir=folder)
    os.close(fd)
    tmp = Path(tmp_name)
    # mkstemp makes the file private (0600): give it the mode a plain open() would, or
    # the mode of the file it replaces.
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode) if target.is_file() else None
    except OSError:
        mode = None
    os.chmod(tmp, 0o666 & ~_umask() if mode is None else mode)
    try:
        yield tmp
        with open(tmp, "rb+") as f:
            os.fsync(f.fileno())
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    try:
        fsync_dir(folder)
    except OSError as err:
        raise FolderSyncError(err.errno, err.strerror) from err


class FolderSyncError(OSError):
    """The new file is in place, but its folder could not be synced (the rename may not
    survive a crash)."""


class WriteError(UserInputError):
    """A write that could not be done; the message says what is on disk now."""


def _write_all(path: Path, data: bytes) -> None:
    fd = os.open(path, os.O_WRONLY | os.O_TRUNC)
    try:
        view = memoryview(data)
        while view:
            n = os.write(fd, view)
            view = view[n:]
    finally:
        os.close(fd)


def _backup(path: Path) -> Path:
    """Copy ``path`` to NAME.bak through a fsynced temporary file and one rename, with the
    mode the file has."""
    bak = path.with_name(path.name + ".bak")
    fd, tmp = tempfile.mkstemp(prefix=f".{bak.name}.", suffix=".tmp", dir=path.parent)
    try:
        with open(path, "rb") as src, os.fdopen(fd, "wb", closefd=False) as dst:
            shutil.copyfileobj(src, dst, 1 << 20)
            dst.flush()
        os.fsync(fd)
        os.chmod(tmp, stat.S_IMODE(path.stat().st_mode))
        os.close(fd)
        fd = -1
        os.replace(tmp, bak)
    except BaseException:
        if fd >= 0:
            os.close(fd)
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise
    return bak


def write_atomic(path: str | os.PathLike[str], data: str | bytes, *,
                 backup: bool = False) -> Path:
    """Write ``data`` to ``path`` through ``atomic_path``, so that a failure or a kill at
    any step leaves either the old file or the new one, complete; with ``backup`` the
    previous version is kept as ``NAME.bak``. Returns the path written.

    Raises WriteError (exit 2) saying what is on disk when a step fails: before the
    rename the file is unchanged; after it, the new version is in place.
    """
    p = Path(path)
    if p.is_symlink():
        p = p.resolve()
    blob = data.encode("utf-8") if isinstance(data, str) else data
    exists = p.exists()
    if exists and not p.is_file():
        raise WriteError(str(p), "cannot save: this is not a regular file")
    if exists and not os.access(p, os.W_OK):
        raise WriteError(str(p), "cannot save: the file is read-only; the file is unchanged")
    try:
        with atomic_path(p) as tmp:
            _write_all(tmp, blob)
            if exists and backup:
                _backup(p)
    except FolderSyncError as err:
        raise WriteError(str(p), f"saved, but the folder could not be synced ({err.strerror}); "
                         "the new version is in place") from None
    except OSError as err:
        raise WriteError(str(p), f"cannot save: {describe_os_error(err)}; the file is unchanged"
                         + (" (the previous version may also be in "
                            f"{p.name}.bak)" if backup and exists else "")) from None
    return p


def atomic_write_bytes(target: str | os.PathLike[str], data: bytes) -> None:
    """Write ``data`` to ``target`` atomically (see the module docstring)."""
    with atomic_path(target) as tmp, open(tmp, "wb") as f:
        f.write(data)
        f.flush()


def user_write_error(target: str | os.PathLike[str], err: OSError) -> UserInputError:
    """A UserInputError (exit 2) for a write that failed for a reason the user can fix."""
    return UserInputError(str(target), f"cannot write the file: {describe_os_error(err)}")


def _same_file(a: Path, b: Path) -> bool:
    try:
        return a.resolve() == b.resolve() or (a.exists() and b.exists() and a.samefile(b))
    except OSError:
        return False


def claim_output(target: str | os.PathLike[str], *, force: bool,
                 inputs: Iterable[str | os.PathLike[str]] = (), flag: str = "-o") -> Path:
    """Check ``target`` against the output rule (module docstring) before any work is done.

    When ``target`` exists and ``force`` is given, its present version is kept as NAME.bak
    now (a hard link, or a copy where links are not possible): the file itself is replaced
    later, atomically, by the writer, so a failed write still leaves it as it was.
    Raises UserInputError naming ``flag``.
    """
    path = Path(target)
    for source in inputs:
        if _same_file(path, Path(source)):
            raise UserInputError(flag, f"{str(path)!r} is also the input ({source}); the input "
                                 "is never overwritten: choose another output name")
    if not path.exists() and not path.is_symlink():
        return path
    if not path.is_file():
        raise UserInputError(flag, f"{str(path)!r} exists and is not a regular file; choose "
                             "another name")
    if not force:
        raise UserInputError(flag, f"{str(path)!r} exists; choose a new name, or give --force "
                             f"to replace it (the old file is kept as {path.name}.bak)")
    _keep_backup(path)
    return path


def _keep_backup(path: Path) -> None:
    """NAME.bak: the present version of ``path`` (``_backup``), a failure as exit 2."""
    try:
        _backup(path)
    except OSError as err:
        raise user_write_error(path.with_name(path.name + ".bak"), err) from None


def write_output(target: str | os.PathLike[str], data: bytes) -> None:
    """Write a command's output file atomically; a failure the user can fix is exit 2."""
    try:
        atomic_write_bytes(target, data)
    except OSError as err:
        raise user_write_error(target, err) from None


class NotRegularFileError(OSError):
    """The path is a folder, FIFO, device or socket: nothing we read or replace."""


def read_regular_bytes(path: str | os.PathLike[str], max_bytes: int | None = None) -> bytes:
    """The bytes of a regular file (at most ``max_bytes + 1`` of them, to see an excess).

    Opened without blocking and checked on the open descriptor, so a FIFO (which would
    wait for a writer for ever) or a device is refused with NotRegularFileError at once.
    """
    fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            raise NotRegularFileError(errno.EINVAL, "not a regular file (a folder, FIFO, "
                                      "device or socket)")
        os.set_blocking(fd, True)
        with os.fdopen(fd, "rb", closefd=False) as f:
            return f.read(-1 if max_bytes is None else max_bytes + 1)
    finally:
        os.close(fd)
