"""The one place where files are read as inputs and written as outputs.

Writing: every output (CSV, PDF, TOML, PNG) goes through :func:`write_atomic`: the data are
written to a temporary file in the target folder, flushed to disk and then moved onto the
target. Without ``force`` the target is *claimed exclusively* (a hard link of the finished
temporary file, or an ``O_EXCL`` creation where the file system has no hard links), so of two
processes writing the same new file exactly one succeeds and the other is told the file exists.
The temporary file is removed on any error and on an interruption (Ctrl-C raises
KeyboardInterrupt; the command line turns SIGTERM and SIGHUP into :class:`Interrupted`), so a
stopped run leaves neither a half-written output nor a temporary file. An output is never the
same file as one of the command's inputs, not even with ``force``.

Reading: :func:`require_regular_file` refuses a FIFO, a device or a directory before anything is
opened (a FIFO would block the read for ever).
"""

from __future__ import annotations

import os
import stat
import tempfile

from screen.errors import OutputError, ScreenError

__all__ = ["Interrupted", "check_writable", "require_regular_file", "same_file",
           "write_atomic"]


class Interrupted(BaseException):
    """The process received SIGTERM or SIGHUP (raised by the command line's signal handler).

    A BaseException like KeyboardInterrupt, so that cleanup code (``finally``, ``except
    BaseException``) runs, and ordinary ``except Exception`` handlers do not swallow it.
    """

    def __init__(self, signum: int):
        super().__init__(signum)
        self.signum = signum


def require_regular_file(path, error_class=ScreenError, what: str = "file") -> None:
    """Raise ``error_class`` unless ``path`` is an existing regular file (or a link to one).

    A FIFO or a character device could block a read for ever or never end; a directory cannot
    be read as a file. All are refused at once, before the file is opened.

    Parameters
    ----------
    path : str or path-like
        File to be read.
    error_class : type
        ScreenError subclass raised (CaseError for case files, DataFileError for data files).
    what : str
        What the file should be, for the message ("TOML case file", "CSV file").
    """
    name = os.fspath(path)
    try:
        mode = os.stat(name).st_mode
    except FileNotFoundError:
        raise error_class(f"file not found; check the path of the {what}", path=str(name)) \
            from None
    except OSError as exc:
        raise error_class(f"cannot be read ({exc.strerror}); check the path and permissions",
                          path=str(name)) from None
    if stat.S_ISREG(mode):
        return
    if stat.S_ISDIR(mode):
        kind = "a directory"
    elif stat.S_ISFIFO(mode):
        kind = "a FIFO (named pipe)"
    elif stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        kind = "a device"
    elif stat.S_ISSOCK(mode):
        kind = "a socket"
    else:  # pragma: no cover - no other file types on POSIX
        kind = "not a regular file"
    raise error_class(f"is {kind}, not a regular file; give the path of a {what}",
                      path=str(name))


def same_file(first, second) -> bool:
    """True if both paths name the same file (same inode, or the same resolved path).

    Parameters
    ----------
    first, second : str or path-like
        The two paths; either may not exist yet.
    """
    first, second = os.fspath(first), os.fspath(second)
    try:
        return os.path.samefile(first, second)
    except OSError:  # one of them does not exist (yet): compare the resolved names
        return os.path.realpath(first) == os.path.realpath(second)


def check_writable(path, force: bool = False, inputs=()) -> None:
    """Raise OutputError unless ``path`` may be written.

    Parameters
    ----------
    path : str or path-like
        Target file.
    force : bool
        An existing file may be replaced.
    inputs : iterable of str or path-like
        Files the command reads; the target must be none of them, even with ``force``.
    """
    path = os.fspath(path)
    for source in inputs or ():
        if source is not None and same_file(path, source):
            raise OutputError(f"is also an input of this command ({os.fspath(source)}); write "
                              f"the output to another file (--force does not allow this)",
                              path=path)
    if os.path.isdir(path):
        raise OutputError("is a directory; give a file name", path=path)
    if os.path.lexists(path) and not force:
        raise OutputError("exists; use --force to overwrite it or choose another name", path=path)
    directory = os.path.dirname(os.path.abspath(path))
    if os.path.exists(directory) and not os.path.isdir(directory):
        raise OutputError(f"{directory} is a file, not a folder; choose a path in a folder",
                          path=path)
    if not os.path.isdir(directory):
        raise OutputError(f"directory {directory} does not exist; create it first", path=path)
    if not os.access(directory, os.W_OK):
        raise OutputError(f"directory {directory} is not writable; make it writable "
                          f"(chmod u+w) or choose another folder", path=path)


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def _exists_error(path):
    return OutputError("exists; use --force to overwrite it or choose another name", path=path)


def _claim_and_move(temporary: str, path: str, force: bool) -> None:
    """Move the finished temporary file onto ``path``; without ``force`` claim it exclusively."""
    if force:
        os.replace(temporary, path)
        return
    try:
        os.link(temporary, path)  # fails if the name exists, also if it appeared meanwhile
    except FileExistsError:
        raise _exists_error(path) from None
    except OSError:
        # No hard links on this file system: claim the name with an exclusive creation.
        try:
            descriptor = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
        except FileExistsError:
            raise _exists_error(path) from None
        os.close(descriptor)
        try:
            os.replace(temporary, path)
        except BaseException:
            os.unlink(path)  # give the claimed (empty) name back
            raise
        return
    os.unlink(temporary)


def write_atomic(path, data: bytes, force: bool = False, inputs=()) -> None:
    """Write ``data`` to ``path`` whole or not at all; never overwrite without ``force``.

    Parameters
    ----------
    path : str or path-like
        Target file.
    data : bytes
        The complete content.
    force : bool
        Replace an existing file.
    inputs : iterable of str or path-like
        Files the command reads; the target must be none of them (see :func:`check_writable`).

    Raises
    ------
    OutputError
        The target exists (without ``force``; also when another process created it while this
        one was writing), is an input, its folder is missing or not writable, or the disk is
        full or a file-size limit is reached.
    """
    path = os.fspath(path)
    check_writable(path, force, inputs)
    directory = os.path.dirname(os.path.abspath(path))
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{os.path.basename(path)[:80]}.",
                                             suffix=".tmp", dir=directory)
    except OSError as exc:
        raise OutputError(f"cannot create a file in {directory} ({exc.strerror})",
                          path=path) from None
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, 0o666 & ~_umask())
        _claim_and_move(temporary, path, force)
    except BaseException as exc:  # also KeyboardInterrupt and Interrupted (SIGTERM, SIGHUP)
        try:
            os.unlink(temporary)
        except OSError:
            pass
        if isinstance(exc, OutputError):
            raise
        if isinstance(exc, OSError):
            raise OutputError(f"cannot write ({exc.strerror or exc}); free some space or "
                              f"choose another place", path=path) from None
        raise
