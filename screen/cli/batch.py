"""``runaway-screen batch``: screen a portfolio of case files and write one table.

Only click is imported at module level: :mod:`screen.cli` imports this module while it builds
the command group; :mod:`screen.cli`, pandas and the engine are imported inside the command.

Exit status: 0 when every case was screened; 1 when some rows carry an error (0 with
``--allow-errors``); 2 for bad arguments (no case files found, a path that does not exist, an
output that exists without ``--force``, an unusable ``--scheduler``); 130 when interrupted by
Ctrl-C (SIGINT), 143 by SIGTERM, 129 by SIGHUP (the rows finished so far are written to the CSV,
marked as partial).
"""

from __future__ import annotations

import click

EXIT_ROWS_WITH_ERRORS = 1


def _connect_scheduler(address):
    """A dask.distributed Client for ``address`` (optional extra ``runaway-screen[cluster]``)."""
    from screen.errors import CaseError

    try:
        from dask.distributed import Client
    except ImportError:
        raise CaseError("dask.distributed is not installed; install the optional extra with "
                        "pip install 'runaway-screen[cluster]' or leave out --scheduler",
                        "--scheduler") from None
    try:
        return Client(address, timeout="10s")
    except Exception as exc:  # OSError, TimeoutError, ValueError for a bad address ...
        raise CaseError(f"cannot connect to the scheduler at {address!r} ({type(exc).__name__}: "
                        f"{exc}); give the address as tcp://HOST:PORT", "--scheduler") from None


def _json_rows(frame):
    import math

    rows = []
    for record in frame.astype(object).to_dict("records"):
        clean = {}
        for key, value in record.items():
            if value is None or (isinstance(value, float) and not math.isfinite(value)):
                clean[key] = None
            elif hasattr(value, "item") and not isinstance(value, (str, bytes)):
                clean[key] = value.item()  # numpy scalar
            else:
                try:
                    missing = value != value  # pandas.NA and NaN
                    clean[key] = None if missing is True else value
                except TypeError:
                    clean[key] = None
        rows.append(clean)
    return rows


def format_portfolio(frame, files_count: int) -> str:
    """Plain-text table of a portfolio (one line per row, errors in full below).

    Parameters
    ----------
    frame : pandas.DataFrame
        Portfolio table (:data:`screen.runs.portfolio.COLUMNS`).
    files_count : int
        Number of case files screened.
    """
    from screen.report.terminal import caution_head, caution_lines

    errors = frame[frame["error"].notna()]
    lines = [f"Portfolio screening: {files_count} case files, {len(frame)} rows, "
             f"{len(errors)} with errors", *caution_head(), ""]
    lines.append(f"{'file':<28}{'vessel':<20}{'class':>5}{'MTSR':>7}{'TD24':>7}"
                 f"{'TMRad h':>10}  {'decomp./synthesis/barrier'}")

    def missing(value):
        import pandas

        return value is None or bool(pandas.isna(value))

    def cell(value, fmt):
        if missing(value):  # None, NaN, pandas.NA
            return "-"
        return format(value, fmt)

    def word(value):
        return "-" if missing(value) else str(value)

    for _, row in frame.iterrows():
        name = str(row["file"]).replace("\\", "/").rsplit("/", 1)[-1]
        vessel = row["vessel"] if isinstance(row["vessel"], str) else "-"
        if isinstance(row["error"], str) and not isinstance(row["title"], str):
            lines.append(f"{name[:27]:<28}ERROR (see below)")
            continue
        klass = row["criticality_class"]
        klass_text = "n/c" if missing(klass) else str(int(klass))
        tmr = row["tmrad_at_mtsr_h"]
        tmr_text = cell(tmr, ".3g") if missing(tmr) or tmr < 1e5 else f"{tmr:.1e}"
        status = "/".join(word(row[k]) for k in ("vessel_stability", "synthesis_stability",
                                                  "barrier_verdict"))
        flag = "  ERROR" if isinstance(row["error"], str) else ""
        lines.append(f"{name[:27]:<28}{vessel[:19]:<20}{klass_text:>5}"
                     f"{cell(row['mtsr_degC'], '.1f'):>7}{cell(row['td24_degC'], '.1f'):>7}"
                     f"{tmr_text:>10}  {status:<12}{flag}")
    if len(errors):
        lines += ["", "Errors"]
        for _, row in errors.iterrows():
            lines.append(f"  {row['error']}")
    classes = frame.drop_duplicates("file")["criticality_class"].dropna()
    if len(classes):
        counts = classes.astype(int).value_counts().sort_index()
        lines += ["", "Cases per class: " + ", ".join(f"class {k}: {v}"
                                                     for k, v in counts.items())]
    lines += ["", "(MTSR and TD24 in degC; class n/c: cannot conclude; status: decomposition heat "
              "balance / synthesis cooling / boiling barrier)", ""] + caution_lines()
    return "\n".join(lines)


def _write_partial_csv(frame, csv_path, force, files, exc) -> None:
    """The rows finished before an interruption, under a first line marking the table partial."""
    import csv
    import signal

    from screen.cautions import csv_comment
    from screen.io.fileio import Interrupted, write_atomic

    signal_name = (signal.Signals(exc.signum).name if isinstance(exc, Interrupted)
                   else "Ctrl-C (SIGINT)")
    finished = frame["file"].nunique()
    head = (f"# PARTIAL: interrupted by {signal_name}; {finished} of {len(files)} case files "
            f"screened, the others are missing from this table\n")
    body = csv_comment() + frame.to_csv(index=False, lineterminator="\n",
                                        quoting=csv.QUOTE_NONNUMERIC)
    try:
        write_atomic(csv_path, (head + body).encode("utf-8"), force=force, inputs=files)
    except Exception:  # noqa: BLE001 - the interruption is what gets reported
        pass


@click.command("batch")
@click.argument("paths", nargs=-1, required=True, type=click.Path(), metavar="DIR-or-FILES...")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False), default=None,
              metavar="OUT.csv", help="Write the table as CSV (one row per case and vessel).")
@click.option("--workers", type=click.IntRange(min=1), default=None, metavar="N",
              help="Worker processes (default: number of CPUs; 1 runs in this process).")
@click.option("--pdf-dir", "pdf_dir", type=click.Path(file_okay=False), default=None,
              metavar="DIR", help="Also write one PDF per case into this existing folder.")
@click.option("--allow-errors", is_flag=True,
              help="Exit with status 0 even when some cases could not be screened.")
@click.option("--json", "as_json", is_flag=True, help="Print the table as JSON records.")
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="What-if override applied to every case. Repeatable.")
@click.option("--recursive", "-r", is_flag=True, help="Search directories recursively.")
@click.option("--force", is_flag=True, help="Overwrite an existing CSV file and PDFs.")
@click.option("--case-timeout", "case_timeout", type=click.FloatRange(min=0, min_open=True),
              default=None, metavar="SECONDS",
              help="Time limit of one case; a case over it gets an error row and the others go "
                   "on. Default 300 s (not applied with --scheduler).")
@click.option("--scheduler", default=None, metavar="ADDRESS",
              help="Run the cases on a dask.distributed cluster (tcp://HOST:PORT); needs "
                   "pip install 'runaway-screen[cluster]'.")
def batch_command(paths, csv_path, workers, pdf_dir, allow_errors, as_json, overrides,
                  recursive, force, case_timeout, scheduler):
    """Screen many case files in parallel; one table row per case and vessel.

    DIR-or-FILES are case files or folders of *.toml case files. A case that cannot be
    screened gives a row with its error and never stops the batch. Exit status: 0 all cases
    screened; 1 some rows have errors (0 with --allow-errors); 2 bad arguments; 130
    interrupted (Ctrl-C; 143 SIGTERM, 129 SIGHUP), with the finished rows in the CSV marked
    as partial.

    \f

    Parameters
    ----------
    paths : tuple of str
        DIR-or-FILES arguments: case files and/or folders of case files.
    csv_path : str or None
        ``--csv``: write the table as CSV.
    workers : int or None
        ``--workers``: worker processes (None: number of CPUs).
    pdf_dir : str or None
        ``--pdf-dir``: also write one PDF per case into this folder.
    allow_errors : bool
        ``--allow-errors``: exit with status 0 even when some cases failed.
    as_json : bool
        ``--json``: print the table as JSON records.
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides for every case.
    recursive : bool
        ``-r/--recursive``: search directories recursively.
    force : bool
        ``--force``: overwrite an existing CSV file and PDFs.
    case_timeout : float or None
        ``--case-timeout``: time limit of one case [s] (None: the default, 300 s).
    scheduler : str or None
        ``--scheduler``: address of a dask.distributed scheduler.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        import json
        import os
        import sys

        from screen.cautions import CAUTIONS
        from screen.cli.common import timestamp
        from screen.errors import CaseError
        from screen.io.fileio import check_writable, require_regular_file, write_atomic
        from screen.runs.portfolio import (DEFAULT_CASE_TIMEOUT_S, collect_case_files,
                                           screen_portfolio)

        for item in paths:
            if not os.path.exists(item):
                raise CaseError("does not exist; give case files or folders of case files",
                                path=item)
            if not os.path.isdir(item):  # a FIFO or a device would block or never end
                require_regular_file(item, CaseError, "TOML case file or a folder of them")
        files = collect_case_files(paths, recursive=recursive)
        if not files:
            raise CaseError("no case files (*.toml) found in " + ", ".join(paths)
                            + ("" if recursive else "; use --recursive for subfolders"))
        if scheduler and workers is not None:
            raise CaseError("give --workers or --scheduler, not both", "--workers")
        if csv_path:
            check_writable(csv_path, force, files)  # fail before the computation, not after
        if pdf_dir is not None and not os.path.isdir(pdf_dir):
            raise CaseError("is not an existing directory; create it first", "--pdf-dir",
                            pdf_dir)
        if pdf_dir is not None and not os.access(pdf_dir, os.W_OK):
            raise CaseError("directory is not writable; make it writable (chmod u+w) or choose "
                            "another --pdf-dir", "--pdf-dir", pdf_dir)
        for text in overrides:  # a malformed --set is a bad argument (exit 2), not 80 row errors
            from screen.io.case import SCHEMA

            key = text.split("=", 1)[0].strip() if "=" in text else ""
            parts = key.split(".")
            if not key or parts[0] not in SCHEMA or (
                    parts[-1] not in SCHEMA[parts[0]] and SCHEMA[parts[0]]):
                raise CaseError(f"--set {text!r}: expected SECTION.KEY=VALUE with a key of the "
                                f"case schema, e.g. 'process.temperature=70 degC'", "--set")
        executor = _connect_scheduler(scheduler) if scheduler else None
        limit = None if executor is not None else (case_timeout or DEFAULT_CASE_TIMEOUT_S)
        from screen.progress import ProgressBar

        try:
            with ProgressBar(len(files), "Screening", enabled=not as_json, unit="cases") as bar:
                frame = screen_portfolio(files, workers=workers, executor=executor,
                                         overrides=overrides, pdf_dir=pdf_dir, force=force,
                                         generated_at=timestamp(), progress=bar,
                                         case_timeout=limit)
        except BaseException as exc:
            partial = getattr(exc, "partial_frame", None)
            if csv_path and partial is not None and not isinstance(exc, Exception):
                _write_partial_csv(partial, csv_path, force, files, exc)
            raise
        finally:
            if executor is not None:
                executor.close()
        if csv_path:
            import csv

            from screen.cautions import csv_comment

            # Leading comment line with the cautions; text cells quoted, so that a '#' in a name
            # never reads as a comment (pandas.read_csv(path, comment="#")).
            text = csv_comment() + frame.to_csv(index=False, lineterminator="\n",
                                                quoting=csv.QUOTE_NONNUMERIC)
            write_atomic(csv_path, text.encode("utf-8"), force=force, inputs=files)
        error_count = int(frame["error"].notna().sum())
        if as_json:
            payload = {"files": len(files), "rows": _json_rows(frame), "rows_with_errors":
                       error_count, "csv": csv_path, "cautions": list(CAUTIONS)}
            click.echo(json.dumps(payload, indent=2, ensure_ascii=False))
        else:
            click.echo(format_portfolio(frame, len(files)))
            if csv_path:
                click.echo(f"\nCSV written to {csv_path} (first line: the cautions, as a # "
                           f"comment)")
        if error_count and not allow_errors:
            sys.exit(EXIT_ROWS_WITH_ERRORS)

    run()
