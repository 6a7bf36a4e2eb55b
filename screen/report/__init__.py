"""PDF screening summary of a :class:`screen.analyses.engine.ScreeningResult`.

Public API: :func:`write_report`. Importing this package is cheap: reportlab and matplotlib are
imported only when a report is written. The pages are laid out in :mod:`screen.report.pdf`, the
feature blocks (simulation, barrier, pressure, scenarios, uncertainty) in
:mod:`screen.report.blocks`, the shared table and paragraph helpers in
:mod:`screen.report.layout`, the figures in :mod:`screen.report.figures` (drawn with
:mod:`screen.report.plot`), fonts, colours and number formats in :mod:`screen.report.style`;
``docs/report.md`` describes the report.
"""

from __future__ import annotations

import os

from screen.errors import OutputError

__all__ = ["check_output_path", "write_report"]


def check_output_path(path: str, force: bool) -> str:
    """Raise OutputError unless ``path`` may be written; returns its directory.

    Parameters
    ----------
    path : str
        Target file.
    force : bool
        An existing file may be replaced.
    """
    if os.path.isdir(path):
        raise OutputError("is a directory; give a file name for the PDF", path=path)
    if os.path.lexists(path) and not force:
        raise OutputError("exists; use --force to overwrite it or choose another name",
                          path=path)
    directory = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(directory):
        raise OutputError(f"directory {directory} does not exist; create it first", path=path)
    if not os.access(directory, os.W_OK):
        raise OutputError(f"directory {directory} is not writable", path=path)
    return directory


def _default_timestamp() -> str:
    from datetime import datetime, timezone

    return datetime.now(timezone.utc).replace(microsecond=0).isoformat()


def write_report(result, path, force: bool = False, generated_at: str | None = None,
                 since: dict | None = None) -> int:
    """Write the PDF screening summary of ``result`` to ``path``.

    The PDF is laid out in memory, written to a temporary file in the target directory and
    renamed onto ``path``: a failed run leaves neither a report nor a temporary file. An
    existing file is replaced only with ``force``.

    Parameters
    ----------
    result : screen.analyses.engine.ScreeningResult
        The screening result to present.
    path : str or path-like
        Target PDF file.
    force : bool
        Replace an existing file.
    generated_at : str, optional
        Timestamp printed in the report (ISO 8601); the current UTC time if not given.
    since : dict, optional
        An earlier JSON result (``ScreeningResult.to_json_dict``) for the "changes since" table.

    Returns
    -------
    int
        Number of pages written.

    Raises
    ------
    OutputError
        The file exists (without ``force``), the directory is missing or not writable, or
        writing failed.
    """
    import io
    import tempfile

    path = os.fspath(path)
    directory = check_output_path(path, force)
    data = result.to_json_dict(generated_at=generated_at or _default_timestamp())

    from screen.report.pdf import build_pdf

    buffer = io.BytesIO()
    pages = build_pdf(result, data, buffer, since=since)
    payload = buffer.getvalue()

    directory = check_output_path(path, force)  # the situation may have changed while laying out
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{os.path.basename(path)}.",
                                             suffix=".tmp", dir=directory)
    except OSError as exc:
        raise OutputError(f"cannot create a file in {directory} ({exc.strerror})",
                          path=path) from None
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(payload)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, 0o666 & ~_umask())
        _move_into_place(temporary, path, force)
    except BaseException as exc:
        try:
            os.unlink(temporary)
        except OSError:
            pass
        if isinstance(exc, OutputError):
            raise
        if isinstance(exc, OSError):
            raise OutputError(f"cannot write the PDF ({exc.strerror or exc})", path=path) from None
        raise
    return pages


def _move_into_place(temporary: str, path: str, force: bool) -> None:
    """Rename the finished file onto ``path``; without ``force`` never replace a file."""
    if force:
        os.replace(temporary, path)
        return
    try:
        # A hard link fails if the name appeared meanwhile: no overwrite even in a race.
        os.link(temporary, path)
    except FileExistsError:
        raise OutputError("exists; use --force to overwrite it or choose another name",
                          path=path) from None
    except OSError:
        # File systems without hard links: the check above is the best we can do.
        if os.path.lexists(path):
            raise OutputError("exists; use --force to overwrite it or choose another name",
                              path=path) from None
        os.replace(temporary, path)
        return
    os.unlink(temporary)


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current
