"""Atomic writing of output files; nothing is overwritten without ``force``."""

from __future__ import annotations

import os
import tempfile

from screen.errors import OutputError


def check_writable(path, force: bool = False) -> None:
    """Raise OutputError if ``path`` exists (without force) or its directory is missing.

    Parameters
    ----------
    path : str or os.PathLike
        Output file.
    force : bool
        Allow overwriting an existing file.
    """
    path = os.fspath(path)
    if os.path.isdir(path):
        raise OutputError("is a directory; give a file name", path=path)
    if os.path.exists(path) and not force:
        raise OutputError("exists; use --force to overwrite it or choose another name", path=path)
    directory = os.path.dirname(os.path.abspath(path))
    if os.path.exists(directory) and not os.path.isdir(directory):
        raise OutputError(f"{directory} is a file, not a folder; choose a path in a folder",
                          path=path)
    if not os.path.isdir(directory):
        raise OutputError(f"directory {directory} does not exist; create it first", path=path)
    if not os.access(directory, os.W_OK):
        raise OutputError(f"directory {directory} is not writable", path=path)


def write_atomic(path, data: bytes, force: bool = False) -> None:
    """Write ``data`` to ``path`` through a temporary file and a rename (no half-written file).

    Parameters
    ----------
    path : str or os.PathLike
        Output file.
    data : bytes
        Complete file content.
    force : bool
        Allow overwriting an existing file.
    """
    path = os.fspath(path)
    check_writable(path, force)
    directory = os.path.dirname(os.path.abspath(path))
    handle, temporary = tempfile.mkstemp(prefix=".tmp-", suffix=os.path.basename(path),
                                         dir=directory)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
        os.replace(temporary, path)
    except BaseException as exc:
        try:
            os.unlink(temporary)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise OutputError(f"cannot write ({exc.strerror})", path=path) from None
        raise
