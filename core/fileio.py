"""Atomic file writing shared by study saves and exports."""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import BinaryIO

__all__ = ["atomic_write", "atomic_write_bytes"]


def atomic_write(path: str | os.PathLike[str], write: Callable[[BinaryIO], None]) -> None:
    """Write a file atomically: temporary file in the same folder, flush, fsync, replace.

    Parameters
    ----------
    path : path-like
        Destination. Its folder must exist.
    write : callable
        Called with a binary file object open on the temporary file.

    Raises
    ------
    OSError
        From any step; the previous file at ``path`` is then left byte-for-byte intact and
        the temporary file is removed.
    """
    target = Path(path)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        with contextlib.suppress(OSError):
            # Keep the permissions of an existing file (mkstemp creates 0600).
            os.chmod(tmp_name, target.stat().st_mode & 0o7777 if target.exists() else 0o644)
        os.replace(tmp_name, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp_name)
        raise
    if hasattr(os, "O_DIRECTORY"):
        # Make the rename itself durable; not every file system allows fsync on a folder.
        with contextlib.suppress(OSError):
            dfd = os.open(target.parent, os.O_RDONLY | os.O_DIRECTORY)
            try:
                os.fsync(dfd)
            finally:
                os.close(dfd)


def atomic_write_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Atomically replace ``path`` with ``data`` (see :func:`atomic_write`)."""
    atomic_write(path, lambda fh: fh.write(data))
