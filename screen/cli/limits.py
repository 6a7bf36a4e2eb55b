"""``runaway-screen limits``: the safe operating limits of one case (what must change, by how
much, to reach an acceptable verdict)."""

from __future__ import annotations

import json

import click

from screen.cli.common import handle_errors, timestamp


def parse_margin(text: str) -> float:
    """``--margin`` as a temperature difference (``"50 K"``; a bare number is K).

    Parameters
    ----------
    text : str
        The option's value. [K]

    Returns
    -------
    float
        The margin. [K]
    """
    from screen.errors import CaseError
    from screen.units import parse_quantity

    text = str(text).strip()
    try:
        value = float(text)
    except ValueError:
        value = parse_quantity(text, "temperature_difference", "--margin").value
    if not value == value or abs(value) > 1000.0:
        raise CaseError(f"got {text!r}; give a temperature difference in K, e.g. 50 K",
                        key="--margin")
    return value


def parse_target_class(value) -> int:
    """``--target-class`` checked to lie in 1..5.

    Parameters
    ----------
    value : int
        The option's value. [-]

    Returns
    -------
    int
        The class. [-]
    """
    from screen.errors import CaseError

    if value is None or not 1 <= int(value) <= 5:
        raise CaseError(f"got {value!r}; the criticality class is 1 to 5", key="--target-class")
    return int(value)


def limit_options(func):
    """The options of the limit search (``--target-class``, ``--vary``, ``--margin``,
    ``--window``) added to a click command.

    Parameters
    ----------
    func : callable
        The command function.

    Returns
    -------
    callable
        The function with the options attached.
    """
    options = [
        click.option("--target-class", "target_class", type=int, default=2, show_default=True,
                     help="Criticality class to reach (1..5)."),
        click.option("--vary", "vary", multiple=True, metavar="KEY",
                     help="Input to vary (repeatable), e.g. process.temperature or "
                          "vessel.2.coolant_temperature; default every controllable input."),
        click.option("--margin", "margin", default="50 K", show_default=True,
                     help="Onset margin TD24 - MTSR to reach (common practice, no source)."),
        click.option("--window", "window", nargs=2, default=None, metavar="KEY1 KEY2",
                     help="Operating-window figure over two inputs (in the PDF; --figure for "
                          "a file of its own)."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def run_limits(case_file, overrides, target_class, vary, margin_text, window=None):
    """Screen the case and add its limits (and, with ``window``, the operating window).

    Parameters
    ----------
    case_file : str
        The TOML case file.
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides.
    target_class : int
        Class to reach, 1..5. [-]
    vary : tuple of str
        Keys to vary; empty for every controllable input.
    margin_text : str
        Onset margin as written (``"50 K"``). [K]
    window : tuple of str, optional
        Two keys for the operating window.

    Returns
    -------
    screen.analyses.engine.ScreeningResult
        The screening with ``results.limits`` (and the window).
    """
    from screen.io.case import load_case
    from screen.runs.limits import add_limits, add_window, check_window_keys
    from screen.runs.screening import screen_case

    target = parse_target_class(target_class)
    margin = parse_margin(margin_text)
    case = load_case(case_file, overrides=overrides)
    if window:
        check_window_keys(case, window)  # fail before the computation
    result = screen_case(case)
    add_limits(case, result, vary=list(vary) or None, target_class=target, margin=margin)
    if window:
        add_window(case, result, window[0], window[1], target_class=target)
    return result


@click.command("limits")
@click.argument("case_file", type=click.Path(dir_okay=False))
@limit_options
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False), default=None,
              help="Also write the limits as CSV.")
@click.option("--pdf", "pdf_path", type=click.Path(dir_okay=False), default=None,
              help="Also write the PDF screening summary with the limits block.")
@click.option("--figure", "figure_path", type=click.Path(dir_okay=False), default=None,
              help="Write the operating-window figure (needs --window) to an .svg or .pdf file.")
@click.option("--force", is_flag=True, help="Overwrite existing output files.")
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="What-if override of a case value before the limits are sought.")
@handle_errors
def limits_command(case_file, target_class, vary, margin, window, as_json, csv_path, pdf_path,
                   figure_path, force, overrides):
    """Safe operating limits of CASE_FILE: for each controllable input, the value at which each
    verdict changes (class, vessel stability, synthesis cooling, barrier, relief pressure,
    onset margin), with today's value and the margin.

    \f

    Parameters
    ----------
    case_file : str
        CASE_FILE argument: the TOML case file.
    target_class : int
        ``--target-class``: class to reach (1..5).
    vary : tuple of str
        ``--vary KEY`` (repeatable); empty for every controllable input.
    margin : str
        ``--margin``: onset margin TD24 - MTSR to reach, e.g. ``"50 K"``.
    window : tuple of str or None
        ``--window KEY1 KEY2``: operating-window figure over two inputs.
    as_json : bool
        ``--json``: print one JSON object instead of text.
    csv_path : str or None
        ``--csv``: also write the limits as CSV.
    pdf_path : str or None
        ``--pdf``: also write the PDF summary with the limits block.
    figure_path : str or None
        ``--figure``: write the window figure alone (.svg or .pdf).
    force : bool
        ``--force``: overwrite existing output files.
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides.
    """
    from screen.errors import CaseError
    from screen.io.fileio import check_writable

    if figure_path and not window:
        raise CaseError("--figure needs --window KEY1 KEY2", key="--figure")
    for path in (csv_path, pdf_path, figure_path):
        if path:
            check_writable(path, force)  # fail before the computation, not after it
    result = run_limits(case_file, overrides, target_class, vary, margin, window)
    data = result.to_json_dict(generated_at=timestamp())
    if csv_path:
        write_limits_csv(data, csv_path, force)
    if figure_path:
        from screen.report.limits import save_window_figure

        save_window_figure(result, figure_path, force=force)
    if pdf_path:
        from screen.report import write_report

        write_report(result, pdf_path, force=force, generated_at=data["generated_at"])
    if as_json:
        click.echo(json.dumps(data, indent=2, ensure_ascii=False))
        return
    from screen.report.limits import format_limits

    click.echo(format_limits(data))
    for path, what in ((csv_path, "CSV"), (figure_path, "Figure"), (pdf_path, "PDF")):
        if path:
            click.echo(f"{what} written to {path}")


def write_limits_csv(data: dict, path, force: bool) -> None:
    """The limits table as CSV through the one atomic writer; first line the caution comment.

    Parameters
    ----------
    data : dict
        The JSON result with ``results.limits``.
    path : str
        CSV file to write.
    force : bool
        Overwrite an existing file.
    """
    import csv
    import io

    from screen.cautions import csv_comment
    from screen.io.fileio import write_atomic
    from screen.report.limits import CSV_COLUMNS, csv_rows

    buffer = io.StringIO()
    buffer.write(csv_comment())
    writer = csv.DictWriter(buffer, fieldnames=CSV_COLUMNS, lineterminator="\n")
    writer.writeheader()
    for row in csv_rows(data):
        writer.writerow({k: ("" if v is None else v) for k, v in row.items()})
    write_atomic(path, buffer.getvalue().encode("utf-8"), force=force)
