"""Screening a portfolio of case files at once: one table row per case and vessel.

Each case runs through the same engine as ``runaway-screen check`` in a worker process managed
here (:func:`_run_in_workers`: one case at a time per worker, a worker that dies costs only the
case it was running, which is retried once, a per-case time limit, every worker stopped with the
parent). Any object with a ``submit(function, *args)`` method that returns futures with
``result()`` can take its place, for example a ``dask.distributed.Client`` (optional extra
``runaway-screen[cluster]``), so a portfolio too large for one machine can run on an existing
cluster. A case that cannot be screened becomes a row with its error text; it never stops the
batch.

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


def screen_file(path, overrides=(), pdf_path=None, force=False, generated_at=None,
                inputs=None) -> list[dict]:
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
    inputs : sequence of str, optional
        Files the PDF must not replace (default: the case file itself).

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

            write_report(result, pdf_path, force=force, generated_at=generated_at,
                         inputs=inputs if inputs is not None else (path,))
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
    """A PDF path per case that no other case can share.

    The name is the case file's path relative to the common folder of all cases, folders joined
    by ``__`` and the extension replaced by ``.pdf`` (``d1/a.toml`` -> ``d1__a.pdf``; cases in
    one folder keep ``a.pdf``). Where two cases would still get the same name (``a.toml`` and
    ``a.txt``; a file literally named ``d1__a.toml``), every one of them gets its whole file
    name plus a short hash of its absolute path, so no suffix can collide with a real name.
    """
    import hashlib

    if not pdf_dir:
        return [None] * len(files)
    absolute = [os.path.abspath(path) for path in files]
    try:
        root = os.path.commonpath([os.path.dirname(path) for path in absolute])
    except ValueError:  # different drives (Windows)
        root = ""

    def relative(path):
        return os.path.relpath(path, root) if root else os.path.basename(path)

    def key(name):
        return name.casefold()  # also unique on case-insensitive file systems

    names = []
    for path in absolute:
        stem = os.path.splitext(relative(path))[0] or "case"
        names.append("__".join(stem.split(os.sep)) + ".pdf")
    counts: dict[str, int] = {}
    for name in names:
        counts[key(name)] = counts.get(key(name), 0) + 1
    for index, path in enumerate(absolute):
        if counts[key(names[index])] > 1:
            digest = hashlib.sha256(path.encode("utf-8", "surrogateescape")).hexdigest()[:8]
            whole = "__".join(relative(path).split(os.sep)).replace(".", "_")
            names[index] = f"{whole}-{digest}.pdf"
    if len({key(name) for name in names}) != len(names):  # pragma: no cover - sha256 collision
        raise RuntimeError("PDF names of the cases are not unique")
    return [os.path.join(os.fspath(pdf_dir), name) for name in names]


#: Time allowed for one case in a worker process by default [s] (design: a case screens in
#: about a second, a long cooling-failure simulation in well under a minute).
DEFAULT_CASE_TIMEOUT_S = 300.0

#: Attempts per case when its worker process dies (the first run and one retry).
_ATTEMPTS = 2

#: Test-only hooks, read in the worker process: a case whose path contains the value of
#: ``_CRASH_HOOK`` kills its own worker with SIGKILL (only the first time when
#: ``_CRASH_ONCE_HOOK`` names a marker file that does not exist yet); one whose path contains
#: the value of ``_HANG_HOOK`` blocks; with ``_PID_HOOK`` set to a folder each worker leaves a
#: file named by its pid there when it starts a case.
_CRASH_HOOK = "RUNAWAY_SCREEN_TEST_CRASH_CASE"
_CRASH_ONCE_HOOK = "RUNAWAY_SCREEN_TEST_CRASH_ONCE"
_HANG_HOOK = "RUNAWAY_SCREEN_TEST_HANG_CASE"
_PID_HOOK = "RUNAWAY_SCREEN_TEST_PID_DIR"


def _test_hooks(path) -> None:
    import signal
    import time

    path = str(path)
    pid_dir = os.environ.get(_PID_HOOK)
    if pid_dir:
        with open(os.path.join(pid_dir, str(os.getpid())), "w", encoding="utf-8") as handle:
            handle.write(path)
    crash = os.environ.get(_CRASH_HOOK)
    if crash and crash in path:
        marker = os.environ.get(_CRASH_ONCE_HOOK)
        if not marker or not os.path.exists(marker):
            if marker:
                open(marker, "w").close()
            os.kill(os.getpid(), signal.SIGKILL)
    hang = os.environ.get(_HANG_HOOK)
    if hang and hang in path:
        while True:
            time.sleep(60)


def _die_with_parent() -> None:
    """Linux: the kernel sends SIGKILL to this worker when the parent process ends.

    A worker is then never left behind holding the caller's pipes, even if the parent was
    killed with SIGKILL and had no chance to stop its workers.
    """
    import ctypes
    import signal
    import sys

    if not sys.platform.startswith("linux"):
        return
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        pr_set_pdeathsig = 1
        libc.prctl(pr_set_pdeathsig, int(signal.SIGKILL), 0, 0, 0)
    except (OSError, AttributeError):  # pragma: no cover - no prctl
        pass


def _worker_main(connection, parent_pid) -> None:
    """Worker process: screen the cases sent by the parent, one at a time, until None."""
    import signal

    # Ctrl-C reaches the whole process group: the parent alone decides, and stops the workers.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), signal.SIG_DFL)
    _die_with_parent()
    if os.getppid() != parent_pid:  # the parent ended before prctl took effect
        return
    while True:
        try:
            message = connection.recv()
        except (EOFError, OSError):
            return
        if message is None:
            return
        index, arguments = message
        _test_hooks(arguments[0])
        rows = screen_file(*arguments)
        connection.send((index, rows))


class _Worker:
    """One worker process with its pipe, and the case it is running (if any)."""

    def __init__(self, context):
        parent_end, child_end = context.Pipe()
        self.process = context.Process(target=_worker_main, args=(child_end, os.getpid()),
                                       daemon=True)
        self.process.start()
        child_end.close()
        self.connection = parent_end
        self.index = None
        self.started = 0.0

    def assign(self, index, arguments):
        import time

        self.connection.send((index, arguments))
        self.index = index
        self.started = time.monotonic()

    def kill(self):
        if self.process.is_alive():
            self.process.kill()
        self.process.join(5)
        self.connection.close()

    def stop(self):
        try:
            self.connection.send(None)
        except OSError:
            pass


def _death_text(exitcode) -> str:
    import signal

    if exitcode is not None and exitcode < 0:
        try:
            return f"killed by {signal.Signals(-exitcode).name}"
        except ValueError:
            return f"killed by signal {-exitcode}"
    return f"exit status {exitcode}"


def _run_in_workers(arguments, count, case_timeout, finished, failed_row):
    """Screen ``arguments`` in ``count`` worker processes; the parent keeps the schedule.

    A worker that dies costs only the case it was running, which is run once more in a new
    worker; a case that exceeds ``case_timeout`` seconds is stopped with its worker. Any
    exception in the parent (KeyboardInterrupt, SIGTERM) kills every worker before it
    propagates.
    """
    import multiprocessing
    import time
    from collections import deque
    from multiprocessing.connection import wait

    try:
        context = multiprocessing.get_context("fork")  # workers inherit the warmed-up engine
    except ValueError:  # pragma: no cover - no fork (Windows)
        context = multiprocessing.get_context()
    pending = deque(range(len(arguments)))
    attempts = [0] * len(arguments)
    workers: list[_Worker] = []
    try:
        workers.extend(_Worker(context) for _ in range(count))
        while pending or any(w.index is not None for w in workers):
            for position, worker in enumerate(workers):
                if worker.index is None and pending:
                    index = pending.popleft()
                    try:
                        worker.assign(index, arguments[index])
                    except OSError:  # the idle worker is gone: a new one takes the case
                        worker.kill()
                        workers[position] = _Worker(context)
                        pending.appendleft(index)
                        continue
                    attempts[index] += 1
            busy = [w for w in workers if w.index is not None]
            now = time.monotonic()
            timeout = None
            if case_timeout is not None:
                timeout = max(0.0, min(w.started + case_timeout - now for w in busy))
            waitables = [w.connection for w in busy] + [w.process.sentinel for w in busy]
            ready = set(wait(waitables, timeout=timeout))
            for worker in busy:
                index = worker.index
                if worker.connection in ready:
                    try:
                        done_index, rows = worker.connection.recv()
                    except Exception:  # noqa: BLE001 - died while sending: handled below
                        pass
                    else:
                        worker.index = None
                        finished(done_index, rows)
                        continue
                if worker.connection in ready or worker.process.sentinel in ready:
                    worker.process.join(5)
                    cause = _death_text(worker.process.exitcode)
                elif case_timeout is not None and \
                        time.monotonic() - worker.started >= case_timeout:
                    cause = None
                else:
                    continue
                worker.kill()
                workers[workers.index(worker)] = _Worker(context)
                if cause is None:
                    finished(index, failed_row(
                        index, f"no result within {case_timeout:g} s (--case-timeout); the case "
                               f"was stopped; raise --case-timeout if it is just slow"))
                elif attempts[index] < _ATTEMPTS:
                    pending.appendleft(index)  # run it again, in the new worker
                else:
                    finished(index, failed_row(
                        index, f"worker process died ({cause}) while screening this case, "
                               f"also when retried; the other cases are not affected"))
        for worker in workers:
            worker.stop()
        for worker in workers:
            worker.process.join(5)
    finally:
        for worker in workers:
            worker.kill()


def screen_portfolio(paths, workers=None, executor=None, overrides=(), pdf_dir=None,
                     force=False, generated_at=None, recursive=False, progress=None,
                     case_timeout=None):
    """Screen many case files in parallel and return one table.

    Parameters
    ----------
    paths : iterable of str or path-like
        Case files and/or directories of ``*.toml`` case files.
    workers : int, optional
        Worker processes of the default executor; None: the number of CPUs. 1 without
        ``case_timeout`` runs the cases in this process, one after the other.
    executor : object, optional
        Any executor with ``submit(function, *args)`` returning futures with ``result()``
        (:mod:`concurrent.futures` executors, a ``dask.distributed.Client``). It is used as
        given and not shut down; a case whose future fails is submitted once more. Default:
        worker processes managed here (a worker that dies costs only the case it was running,
        which is retried once; a case over ``case_timeout`` is stopped).
    overrides : mapping or sequence of str
        Overrides applied to every case: ``{"KEY": value}`` or ``KEY=VALUE`` strings (see
        :func:`screen.io.case.load_case`).
    pdf_dir : str, optional
        Write a PDF per case into this existing directory, named after the case file's path
        relative to the common folder of the cases (see :func:`_pdf_names`).
    force : bool
        Replace existing PDFs.
    generated_at : str, optional
        Timestamp printed in the PDFs.
    recursive : bool
        Search directories recursively.
    progress : callable, optional
        Called as ``progress(done, total, path)`` after each case.
    case_timeout : float, optional
        Time limit of one case in a worker process [s]; None: no limit. Not applied to a
        given ``executor``.

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
    KeyboardInterrupt, screen.io.fileio.Interrupted
        The run was interrupted; the workers are stopped first, and the exception carries the
        table of the cases finished so far as its ``partial_frame`` attribute.
    """
    from screen.errors import CaseError, OutputError

    files = collect_case_files(paths, recursive=recursive)
    from collections.abc import Mapping

    # A mapping {"KEY": value} (Python) or "KEY=VALUE" strings (command line).
    overrides = dict(overrides) if isinstance(overrides, Mapping) else tuple(overrides or ())
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int)
                                or workers < 1):
        raise CaseError(f"got {workers!r} workers; give a positive integer", "--workers")
    if case_timeout is not None and not case_timeout > 0:
        raise CaseError(f"got {case_timeout!r} s; give a positive time limit", "--case-timeout")
    if pdf_dir is not None:
        pdf_dir = os.fspath(pdf_dir)
        if not os.path.isdir(pdf_dir):
            raise OutputError("is not an existing directory; create it first", path=pdf_dir)
        if not os.access(pdf_dir, os.W_OK):
            raise OutputError("directory is not writable; make it writable (chmod u+w) or "
                              "choose another --pdf-dir", path=pdf_dir)
    pdf_paths = _pdf_names(files, pdf_dir)
    total = len(files)
    results: list[list[dict] | None] = [None] * total

    def finished(index, rows):
        results[index] = rows
        if progress is not None:
            progress(sum(r is not None for r in results), total, files[index])

    def failed_row(index, message):
        row = _empty_row(files[index])
        row["error"] = message
        return [row]

    by_real_path: dict[str, list[str]] = {}
    for path in files:
        by_real_path.setdefault(os.path.realpath(path), []).append(path)
    arguments = []
    for path, pdf_path in zip(files, pdf_paths, strict=True):
        # The PDF must be neither this case nor any other case of the batch.
        inputs = [path] + (by_real_path.get(os.path.realpath(pdf_path), []) if pdf_path else [])
        arguments.append((path, overrides, pdf_path, force, generated_at, tuple(inputs)))
    try:
        if executor is not None:
            _run_in_executor(executor, arguments, finished, failed_row)
        elif total:
            count = workers if workers is not None else (os.cpu_count() or 1)
            count = max(1, min(count, total))
            if count == 1 and case_timeout is None:
                for index, args in enumerate(arguments):
                    finished(index, screen_file(*args))
            else:
                _warm_up()
                _run_in_workers(arguments, count, case_timeout, finished, failed_row)
    except BaseException as exc:
        if isinstance(exc, Exception):
            raise
        exc.partial_frame = _frame(results)  # KeyboardInterrupt, SIGTERM: what was finished
        raise
    return _frame(results)


def _run_in_executor(executor, arguments, finished, failed_row) -> None:
    """Run the cases on a given executor; a case whose future fails is submitted once more."""
    pending = {}
    for index, args in enumerate(arguments):
        pending[index] = None
    for attempt in range(_ATTEMPTS):
        futures = {}
        errors = {}
        for index in pending:
            try:
                futures[executor.submit(screen_file, *arguments[index])] = index
            except Exception as exc:  # e.g. a broken pool or a lost cluster connection
                errors[index] = exc
        standard = all(isinstance(f, Future) for f in futures)
        order = as_completed(futures) if standard else list(futures)
        for future in order:
            index = futures[future]
            try:
                rows = future.result()
            except Exception as exc:
                errors[index] = exc
                continue
            finished(index, rows)
        if not errors:
            return
        if attempt == _ATTEMPTS - 1:
            for index, exc in errors.items():
                finished(index, failed_row(index, f"worker failed ({type(exc).__name__}: "
                                                  f"{exc}), also when retried"))
            return
        pending = dict.fromkeys(sorted(errors))


def _frame(results):
    """The table of the finished cases (columns :data:`COLUMNS`)."""
    import pandas as pd

    table = [row for rows in results if rows for row in rows]
    frame = pd.DataFrame(table, columns=list(COLUMNS))
    # Whole numbers stay whole numbers next to error rows (nullable integer dtype).
    frame["criticality_class"] = frame["criticality_class"].astype("Int64")
    frame["warnings_count"] = frame["warnings_count"].astype("Int64")
    return frame
