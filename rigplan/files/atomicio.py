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

With ``backup=True`` the version being replaced is kept beside it as
``<name>.~N~`` (N = 1, 2, ... the next free number, as GNU ``cp
--backup=numbered`` names them): a hard link to the old file made before the
rename, so the old content is never copied or at risk; where the file system
has no hard links it is copied (and fsynced) first.
"""

from __future__ import annotations

import os
import secrets
import stat

__all__ = ["atomic_write_bytes", "atomic_write_text", "backup_path", "fsync_directory"]


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


def backup_path(path: str | os.PathLike) -> str:
    """The next free numbered backup name of ``path``: ``<path>.~N~``.

    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> backup_path(d / "plan.toml").endswith("plan.toml.~1~")
    True
    """
    target = os.fspath(path)
    n = 1
    while os.path.lexists(f"{target}.~{n}~"):
        n += 1
    return f"{target}.~{n}~"


def _keep_backup(target: str) -> str | None:
    """Keep the current ``target`` as a numbered backup; return its name."""
    if not os.path.exists(target):
        return None
    while True:
        backup = backup_path(target)
        try:
            os.link(target, backup)
            return backup
        except FileExistsError:
            continue        # taken meanwhile: the next number
        except OSError:
            break           # no hard links here: copy
    with open(target, "rb") as src:
        data = src.read()
    fd = os.open(backup, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
    with os.fdopen(fd, "wb") as fh:
        fh.write(data)
        fh.flush()
        os.fsync(fh.fileno())
    return backup


def atomic_write_bytes(path: str | os.PathLike, data: bytes, *,
                       backup: bool = False) -> str | None:
    """Replace the file at ``path`` with ``data``, atomically and durably.

    Parameters
    ----------
    path : str or path-like
        Target file; its directory must exist.
    data : bytes
        Complete new content.
    backup : bool
        Keep the version replaced as ``<path>.~N~`` (see the module notes).

    Returns
    -------
    str or None
        The backup's path (None without ``backup`` or when there was no
        file to keep).

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
        kept = _keep_backup(target) if backup else None
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    fsync_directory(directory)
    return kept


def atomic_write_text(path: str | os.PathLike, text: str, *, encoding: str = "utf-8",
                      backup: bool = False) -> str | None:
    """Replace the file at ``path`` with ``text``, atomically and durably.

    The text is encoded as given: no newline translation (write ``"\\r\\n"``
    yourself where a format asks for it).  See :func:`atomic_write_bytes`;
    returns the backup's path with ``backup=True``.
    """
    if not isinstance(text, str):
        raise TypeError(f"atomic_write_text: expected str, got {type(text).__name__}")
    return atomic_write_bytes(path, text.encode(encoding), backup=backup)
