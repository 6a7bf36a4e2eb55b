"""``runaway-screen report``: the PDF screening summary of one case.

Only click is imported at module level: :mod:`screen.cli` imports this module while it builds
the command group, so :mod:`screen.cli` itself is imported inside the command.
"""

from __future__ import annotations

import click


def load_earlier_result(path) -> dict:
    """An earlier result as a JSON-ready dict: a ``check --json`` output or a case file.

    Parameters
    ----------
    path : str or path-like
        A ``check --json`` output (``.json``) or a case file.

    Raises
    ------
    DataFileError
        The JSON file is missing, unreadable or not a result of ``check --json``.
    """
    from screen.errors import DataFileError

    path = str(path)
    if path.lower().endswith(".json"):
        from screen.io.result_json import read_result_json

        try:
            return read_result_json(path)  # bounded read, same checks as `compare`
        except DataFileError as exc:
            raise DataFileError(exc.message, key="--since", path=path) from None
    from screen.cli.common import run_check

    return run_check(path).to_json_dict(generated_at=None)


@click.command("report")
@click.argument("case_file", type=click.Path(dir_okay=False))
@click.option("-o", "--output", "output", type=click.Path(dir_okay=False), required=True,
              metavar="FILE.pdf", help="PDF file to write.")
@click.option("--force", is_flag=True, help="Overwrite an existing output file.")
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="What-if override of a case value, e.g. --set 'process.temperature=70 degC'. "
                   "Repeatable.")
@click.option("--since", "since_path", type=click.Path(dir_okay=False), default=None,
              metavar="OLD.json|OLD.toml",
              help="Earlier result (a 'check --json' output or an older case file): adds a "
                   "table of what changed since.")
@click.option("--limits", "with_limits", is_flag=True,
              help="Add the safe operating limits block (as the 'limits' command).")
@click.option("--window", "window", nargs=2, default=None, metavar="KEY1 KEY2",
              help="With --limits: add the operating-window figure over two inputs.")
def report_command(case_file, output, force, overrides, since_path, with_limits, window):
    """Write the PDF screening summary of CASE_FILE (figures, inputs, methods, cautions).

    \f

    Parameters
    ----------
    case_file : str
        CASE_FILE argument: the TOML case file.
    output : str
        ``-o/--output``: PDF file to write.
    force : bool
        ``--force``: overwrite an existing output file.
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides (values with units).
    since_path : str or None
        ``--since``: earlier result or case file; adds a table of what changed.
    with_limits : bool
        ``--limits``: add the safe operating limits block.
    window : tuple of str or None
        ``--window KEY1 KEY2`` (with ``--limits``): add the operating-window figure.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        from screen.cli.common import run_check, timestamp
        from screen.progress import ProgressBar
        from screen.report import check_output_path, write_report

        inputs = [case_file] + ([since_path] if since_path else [])
        check_output_path(str(output), force, inputs)  # fail before the computation, not after
        if window and not with_limits:
            from screen.errors import CaseError

            raise CaseError("--window needs --limits", key="--window")
        steps = 3 if since_path else 2
        notes: list[str] = []
        with ProgressBar(steps, "Report", unit="steps") as bar:
            since = None
            if since_path:
                since = load_earlier_result(since_path)
                bar.advance()
            if with_limits:
                from screen.cli.limits import run_limits

                result = run_limits(case_file, overrides, 2, (), "50 K", window)
            else:
                result = run_check(case_file, overrides)
            bar.advance()
            pages = write_report(result, output, force=force, generated_at=timestamp(),
                                 since=since, inputs=inputs, notes=notes)
            bar.advance()
        klass = result.results.get("criticality_class")
        verdict = "no class: cannot conclude" if klass is None else f"criticality class {klass}"
        click.echo(f"PDF written to {output} ({pages} pages; {verdict}; "
                   f"screening aid only)")
        for note in notes:  # text the PDF fonts cannot draw as written
            click.echo(f"PDF note: {note}")

    run()
