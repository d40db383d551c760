"""Crash-safe file replacement (formats layer, stdlib only).

A file written with :func:`atomic_write_text` or :func:`atomic_write_bytes`
is, after a crash or power loss at any moment, either the old file or the
complete new one, never a mix or a truncated file:

1. write the new content to a temporary file in the same directory;
2. flush and ``fsync`` it;
3. ``os.replace`` it over the target (atomic on POSIX and Windows);
4. ``fsync`` the directory so the rename itself is on disk (POSIX).

A symbolic link as target is followed: the file it points to is replaced and
the link stays.  An existing file's permission bits are kept; a new file
gets the usual ``0o666`` less the process umask.
"""

from __future__ import annotations

import os
import secrets
import stat

__all__ = ["atomic_write_bytes", "atomic_write_text", "fsync_directory"]


def fsync_directory(directory: str | os.PathLike) -> None:
    """Flush a directory entry change (create, rename) to disk.

    No-op where directories cannot be opened for syncing (Windows).
    """
    if os.name == "nt":  # pragma: no cover - no directory fsync on Windows
        return
    fd = os.open(os.fspath(directory), os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def atomic_write_bytes(path: str | os.PathLike, data: bytes) -> None:
    """Replace the file at ``path`` with ``data``, atomically and durably.

    Parameters
    ----------
    path : str or path-like
        Target file; its directory must exist.
    data : bytes
        Complete new content.

    Raises
    ------
    OSError
        When the directory cannot be written; the old file is then unchanged
        and no temporary file is left behind.
    """
    if not isinstance(data, (bytes, bytearray, memoryview)):
        raise TypeError(f"atomic_write_bytes: expected bytes, got {type(data).__name__}")
    target = os.path.realpath(os.fspath(path))
    directory = os.path.dirname(target) or "."
    base = os.path.basename(target)
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode)
    except FileNotFoundError:
        mode = None
    tmp = os.path.join(directory, f".{base}.{secrets.token_hex(6)}.tmp")
    # O_EXCL: never write through someone else's file; 0o666 & ~umask.
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        if mode is not None:
            os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    fsync_directory(directory)


def atomic_write_text(path: str | os.PathLike, text: str, *, encoding: str = "utf-8") -> None:
    """Replace the file at ``path`` with ``text``, atomically and durably.

    The text is encoded as given: no newline translation (write ``"\\r\\n"``
    yourself where a format asks for it).  See :func:`atomic_write_bytes`.
    """
    if not isinstance(text, str):
        raise TypeError(f"atomic_write_text: expected str, got {type(text).__name__}")
    atomic_write_bytes(path, text.encode(encoding))
