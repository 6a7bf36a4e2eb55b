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


def check_output_path(path: str, force: bool, inputs=()) -> str:
    """Raise OutputError unless ``path`` may be written; returns its directory.

    Parameters
    ----------
    path : str
        Target file.
    force : bool
        An existing file may be replaced.
    inputs : iterable of str
        Files the command reads; the PDF must be none of them (even with ``force``).
    """
    from screen.io.fileio import check_writable

    if os.path.isdir(path):
        raise OutputError("is a directory; give a file name for the PDF", path=path)
    check_writable(path, force, inputs)
    return os.path.dirname(os.path.abspath(path))


def _default_timestamp() -> str:
    from datetime import datetime, timezone

    return datetime.now(timezone.utc).replace(microsecond=0).isoformat()


def write_report(result, path, force: bool = False, generated_at: str | None = None,
                 since: dict | None = None, inputs=(), notes: list | None = None) -> int:
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
    inputs : iterable of str or path-like
        Files the command read (case, earlier result); the PDF is never written over one.
    notes : list, optional
        Receives one line per kind of text that could not be drawn as written (characters
        without a glyph, unjoined Arabic letters); the PDF itself says so on page 1 too.

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

    from screen.io.fileio import write_atomic

    path = os.fspath(path)
    check_output_path(path, force, inputs)
    data = result.to_json_dict(generated_at=generated_at or _default_timestamp())

    from screen.report.pdf import build_pdf

    buffer = io.BytesIO()
    pages = build_pdf(result, data, buffer, since=since)
    if notes is not None:
        from screen.report.text import notes as text_notes

        notes.extend(text_notes())
    write_atomic(path, buffer.getvalue(), force=force, inputs=inputs)
    return pages
