"""Atomic file writing: a file is either its old self or its complete new self, never half.

Write to a temporary file in the same folder, flush and fsync it, then rename it over the
target (``os.replace`` is atomic on POSIX within one filesystem), then fsync the folder so
the rename itself survives a crash. On any failure the temporary file is removed and the
target is untouched. Imports only the standard library.
"""

from __future__ import annotations

import contextlib
import errno
import functools
import os
import tempfile
from collections.abc import Iterator
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
    # mkstemp makes the file private (0600); give it the mode a plain open() would.
    os.chmod(tmp, 0o666 & ~_umask())
    try:
        yield tmp
        with open(tmp, "rb+") as f:
            os.fsync(f.fileno())
        os.replace(tmp, target)
        fsync_dir(folder)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise


def atomic_write_bytes(target: str | os.PathLike[str], data: bytes) -> None:
    """Write ``data`` to ``target`` atomically (see the module docstring)."""
    with atomic_path(target) as tmp, open(tmp, "wb") as f:
        f.write(data)
        f.flush()


def user_write_error(target: str | os.PathLike[str], err: OSError) -> UserInputError:
    """A UserInputError (exit 2) for a write that failed for a reason the user can fix."""
    return UserInputError(str(target), f"cannot write the file: {describe_os_error(err)}")
