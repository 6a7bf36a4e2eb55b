"""Screening a portfolio of case files at once: one table row per case and vessel.

Each case runs through the same engine as ``runaway-screen check`` in a worker process
(:class:`concurrent.futures.ProcessPoolExecutor` by default). Any object with a
``submit(function, *args)`` method that returns futures with ``result()`` can take its place,
for example a ``dask.distributed.Client`` (optional extra ``runaway-screen[cluster]``), so a
portfolio too large for one machine can run on an existing cluster. A case that cannot be
screened becomes a row with its error text; it never stops the batch.

pandas is imported only when the table is built.
"""

from __future__ import annotations

import os
from concurrent.futures import Future, as_completed

__all__ = ["COLUMNS", "collect_case_files", "screen_file", "screen_portfolio"]

#: Columns of the portfolio table, in order.
COLUMNS = (
    "file", "title", "revision", "vessel", "error", "warnings_count",
    "criticality_class", "severity", "probability", "verdict_status",
    "process_temperature_degC", "mtsr_degC", "mtt_degC", "td24_degC", "td8_degC",
    "tmrad_at_mtsr_h", "onset_margin_K", "synthesis_adiabatic_rise_K",
    "decomposition_adiabatic_rise_K", "final_temperature_degC", "decomposition_model",
    "decomposition_basis",
    "vessel_stability", "critical_coolant_temperature_degC", "coolant_margin_K",
    "no_return_temperature_degC", "mtsr_above_no_return", "time_constant_h",
    "synthesis_stability", "synthesis_cooling_ratio", "barrier_verdict",
    "verdict", "vessel_verdict", "pdf", "sha256",
)

#: Case-level figures copied from ``results`` (same names).
_CASE_FIGURES = ("criticality_class", "verdict_status", "process_temperature_degC", "mtsr_degC",
                 "mtt_degC", "td24_degC", "td8_degC", "tmrad_at_mtsr_h", "onset_margin_K",
                 "synthesis_adiabatic_rise_K", "decomposition_adiabatic_rise_K",
                 "final_temperature_degC", "decomposition_model", "decomposition_basis",
                 "verdict")
#: Vessel figures: column -> key of the vessel entry.
_VESSEL_FIGURES = {
    "vessel_stability": "stability",
    "critical_coolant_temperature_degC": "critical_coolant_temperature_degC",
    "coolant_margin_K": "coolant_margin_K",
    "no_return_temperature_degC": "no_return_temperature_degC",
    "mtsr_above_no_return": "mtsr_above_no_return",
    "time_constant_h": "time_constant_h",
    "synthesis_stability": "synthesis_stability",
    "synthesis_cooling_ratio": "synthesis_cooling_ratio",
    "vessel_verdict": "verdict",
}


def collect_case_files(paths, recursive: bool = False) -> list[str]:
    """Case files named by files and directories (``*.toml`` inside a directory).

    Parameters
    ----------
    paths : iterable of str or path-like
        Case files and directories. A file is taken whatever its extension; a path that does
        not exist is kept, so that the batch reports it as an error row.
    recursive : bool
        Also search the subdirectories of a directory.

    Returns
    -------
    list of str
        Files in the order given, directory contents sorted by name; duplicates removed.
    """
    found: list[str] = []
    for item in paths:
        item = os.fspath(item)
        if os.path.isdir(item):
            matches = []
            if recursive:
                for root, dirs, files in os.walk(item):
                    dirs.sort()
                    matches.extend(os.path.join(root, name) for name in files
                                   if name.lower().endswith(".toml"))
            else:
                matches = [os.path.join(item, name) for name in os.listdir(item)
                           if name.lower().endswith(".toml")
                           and os.path.isfile(os.path.join(item, name))]
            found.extend(sorted(matches))
        else:
            found.append(item)
    unique, seen = [], set()
    for path in found:
        key = os.path.abspath(path)
        if key not in seen:
            seen.add(key)
            unique.append(path)
    return unique


def _empty_row(path) -> dict:
    row = dict.fromkeys(COLUMNS)
    row["file"] = str(path)
    row["warnings_count"] = 0
    return row


def screen_file(path, overrides=(), pdf_path=None, force=False, generated_at=None) -> list[dict]:
    """Screen one case file and return its table rows (one per vessel; one if it has none).

    Never raises for a problem of the case: the error text goes into the ``error`` column.

    Parameters
    ----------
    path : str
        Case file.
    overrides : mapping or sequence of str
        What-if overrides applied to the case (see :func:`screen.io.case.load_case`).
    pdf_path : str, optional
        Also write the PDF screening summary there.
    force : bool
        Replace an existing PDF.
    generated_at : str, optional
        Timestamp printed in the PDF.

    Returns
    -------
    list of dict
        Rows with the keys of :data:`COLUMNS`.
    """
    from screen.errors import ScreenError

    row = _empty_row(path)
    try:
        from screen.io.case import load_case
        from screen.runs.screening import screen_case

        case = load_case(path, overrides=overrides)
        result = screen_case(case)
    except ScreenError as exc:
        row["error"] = exc.one_line()
        return [row]
    except Exception as exc:  # a bug or a broken environment: still only this row
        row["error"] = f"internal error ({type(exc).__name__}: {exc}); please report it"
        return [row]
    results = result.results
    header = case.sections["case"]
    row.update(title=header.title, revision=header.revision, sha256=case.sha256,
               warnings_count=len(result.warnings), severity=results.get("severity_4"),
               probability=results.get("probability_6"))
    for key in _CASE_FIGURES:
        row[key] = results.get(key)
    if pdf_path:
        try:
            from screen.report import write_report

            write_report(result, pdf_path, force=force, generated_at=generated_at)
            row["pdf"] = str(pdf_path)
        except ScreenError as exc:
            row["error"] = f"PDF not written: {exc.one_line()}"
        except Exception as exc:
            row["error"] = f"PDF not written: internal error ({type(exc).__name__}: {exc})"
    vessels = results.get("vessels") or []
    if not vessels:
        return [row]
    rows = []
    for entry in vessels:
        vessel_row = dict(row)
        vessel_row["vessel"] = entry.get("name")
        for column, key in _VESSEL_FIGURES.items():
            vessel_row[column] = entry.get(key)
        barrier = results.get("barrier") or {}
        for item in barrier.get("vessels", []) or []:
            if item.get("name") == entry.get("name"):
                vessel_row["barrier_verdict"] = item.get("barrier_verdict")
        rows.append(vessel_row)
    return rows


def _warm_up() -> None:
    """Import the engine and build the unit registry once in the parent process.

    Worker processes started by fork inherit them, instead of each paying the import time of
    scipy and pint again (about a second per worker).
    """
    import scipy.integrate  # noqa: F401
    import scipy.optimize  # noqa: F401

    from screen.io import case  # noqa: F401
    from screen.models import decomposition, semenov  # noqa: F401
    from screen.runs import screening  # noqa: F401  (engine and every analysis it composes)
    from screen.units import registry

    registry()


def _pdf_names(files, pdf_dir):
    """A distinct PDF path per case (stem.pdf; stem-2.pdf, ... when stems repeat)."""
    if not pdf_dir:
        return [None] * len(files)
    names, used = [], {}
    for path in files:
        stem = os.path.splitext(os.path.basename(path))[0] or "case"
        count = used.get(stem, 0) + 1
        used[stem] = count
        name = f"{stem}.pdf" if count == 1 else f"{stem}-{count}.pdf"
        names.append(os.path.join(os.fspath(pdf_dir), name))
    return names


def screen_portfolio(paths, workers=None, executor=None, overrides=(), pdf_dir=None,
                     force=False, generated_at=None, recursive=False, progress=None):
    """Screen many case files in parallel and return one table.

    Parameters
    ----------
    paths : iterable of str or path-like
        Case files and/or directories of ``*.toml`` case files.
    workers : int, optional
        Worker processes of the default executor; None: the number of CPUs. 1 runs the cases
        in this process, one after the other.
    executor : object, optional
        Any executor with ``submit(function, *args)`` returning futures with ``result()``
        (:mod:`concurrent.futures` executors, a ``dask.distributed.Client``). It is used as
        given and not shut down. Default: a ProcessPoolExecutor with ``workers`` processes.
    overrides : mapping or sequence of str
        Overrides applied to every case: ``{"KEY": value}`` or ``KEY=VALUE`` strings (see
        :func:`screen.io.case.load_case`).
    pdf_dir : str, optional
        Write a PDF per case into this existing directory (named after the case file).
    force : bool
        Replace existing PDFs.
    generated_at : str, optional
        Timestamp printed in the PDFs.
    recursive : bool
        Search directories recursively.
    progress : callable, optional
        Called as ``progress(done, total, path)`` after each case.

    Returns
    -------
    pandas.DataFrame
        One row per case and vessel, columns :data:`COLUMNS`, in the order of the files. A case
        that failed is one row whose ``error`` holds the message.

    Raises
    ------
    OutputError
        ``pdf_dir`` is not an existing, writable directory.
    CaseError
        ``workers`` is not a positive integer.
    """
    import pandas as pd

    from screen.errors import CaseError, OutputError

    files = collect_case_files(paths, recursive=recursive)
    from collections.abc import Mapping

    # A mapping {"KEY": value} (Python) or "KEY=VALUE" strings (command line).
    overrides = dict(overrides) if isinstance(overrides, Mapping) else tuple(overrides or ())
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int)
                                or workers < 1):
        raise CaseError(f"got {workers!r} workers; give a positive integer", "--workers")
    if pdf_dir is not None:
        pdf_dir = os.fspath(pdf_dir)
        if not os.path.isdir(pdf_dir):
            raise OutputError("is not an existing directory; create it first", path=pdf_dir)
        if not os.access(pdf_dir, os.W_OK):
            raise OutputError("directory is not writable", path=pdf_dir)
    pdf_paths = _pdf_names(files, pdf_dir)
    total = len(files)
    results: list[list[dict] | None] = [None] * total

    def finished(index, rows):
        results[index] = rows
        if progress is not None:
            progress(sum(r is not None for r in results), total, files[index])

    def failed_rows(index, exc):
        row = _empty_row(files[index])
        row["error"] = f"worker failed ({type(exc).__name__}: {exc})"
        return [row]

    arguments = [(path, overrides, pdf_path, force, generated_at)
                 for path, pdf_path in zip(files, pdf_paths, strict=True)]
    own_pool = None
    if executor is None:
        count = workers if workers is not None else (os.cpu_count() or 1)
        count = max(1, min(count, total))
        if count == 1:
            for index, args in enumerate(arguments):
                finished(index, screen_file(*args))
        else:
            from concurrent.futures import ProcessPoolExecutor

            _warm_up()
            own_pool = executor = ProcessPoolExecutor(max_workers=count)
    try:
        if executor is not None and total:
            futures = {}
            for index, args in enumerate(arguments):
                try:
                    futures[executor.submit(screen_file, *args)] = index
                except Exception as exc:  # e.g. a broken pool or a lost cluster connection
                    finished(index, failed_rows(index, exc))
            standard = all(isinstance(f, Future) for f in futures)
            order = as_completed(futures) if standard else list(futures)
            for future in order:
                index = futures[future]
                try:
                    rows = future.result()
                except Exception as exc:
                    rows = failed_rows(index, exc)
                finished(index, rows)
    finally:
        if own_pool is not None:
            own_pool.shutdown(wait=True, cancel_futures=True)
    table = [row for rows in results if rows for row in rows]
    frame = pd.DataFrame(table, columns=list(COLUMNS))
    # Whole numbers stay whole numbers next to error rows (nullable integer dtype).
    frame["criticality_class"] = frame["criticality_class"].astype("Int64")
    frame["warnings_count"] = frame["warnings_count"].astype("Int64")
    return frame
