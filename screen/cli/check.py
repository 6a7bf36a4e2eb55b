"""``runaway-screen check``: screen one case and print (or write) the result."""

from __future__ import annotations

import json

import click

from screen.cli.common import handle_errors, run_check, timestamp


@click.command("check")
@click.argument("case_file", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("--detail", is_flag=True,
              help="Print every figure, table, reason and warning (default: the first screen, "
                   "about 60 lines).")
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="What-if override of a case value, e.g. --set 'process.temperature=70 degC'. "
                   "Repeatable. Vessels: vessel.KEY (all) or vessel.N.KEY.")
@click.option("--pdf", "pdf_path", type=click.Path(dir_okay=False), default=None,
              help="Also write the PDF screening summary to this file.")
@click.option("--force", is_flag=True, help="Overwrite an existing output file.")
@click.option("--uncertainty", "samples", type=int, default=None, metavar="N",
              help="Monte Carlo propagation of the uncertainties given in the case (N samples).")
@click.option("--seed", type=int, default=20261201, show_default=True,
              help="Random seed of the Monte Carlo propagation.")
@click.option("--limits", "with_limits", is_flag=True,
              help="Also find the safe operating limits (as the 'limits' command, defaults).")
@handle_errors
def check_command(case_file, as_json, detail, overrides, pdf_path, force, samples, seed,
                  with_limits):
    """Screen CASE_FILE and print the figures, the class and the warnings.

    \f

    Parameters
    ----------
    case_file : str
        CASE_FILE argument: the TOML case file.
    as_json : bool
        ``--json``: print one JSON object instead of text.
    detail : bool
        ``--detail``: print everything instead of the first screen of about 60 lines.
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides (values with units).
    pdf_path : str or None
        ``--pdf``: also write the PDF summary there.
    force : bool
        ``--force``: overwrite an existing output file.
    samples : int or None
        ``--uncertainty N``: Monte Carlo samples; None skips it.
    seed : int
        ``--seed``: random seed of the Monte Carlo propagation.
    with_limits : bool
        ``--limits``: also find the safe operating limits (defaults of ``limits``).
    """
    if pdf_path:
        from screen.report import check_output_path

        check_output_path(str(pdf_path), force, inputs=[case_file])  # fail before computing
    result = run_check(case_file, overrides)
    if samples is not None:
        from screen.runs.uncertainty import add_uncertainty

        add_uncertainty(result, samples=samples, seed=seed, progress=not as_json)
    if with_limits:
        from screen.runs.limits import add_limits

        add_limits(result.case, result)
    data = result.to_json_dict(generated_at=timestamp())
    pdf_notes: list[str] = []
    if pdf_path:
        from screen.report import write_report

        write_report(result, pdf_path, force=force, generated_at=data["generated_at"],
                     inputs=[case_file], notes=pdf_notes)
    if as_json:
        click.echo(json.dumps(data, indent=2, ensure_ascii=False))
    else:
        from screen.report.terminal import format_check

        extra = []
        if with_limits:
            from screen.report.limits import limit_lines

            extra = limit_lines(data)
        click.echo(format_check(data, detail=detail, extra_lines=extra))
        if pdf_path:
            click.echo(f"\nPDF written to {pdf_path}")
            for note in pdf_notes:  # text the PDF fonts cannot draw as written
                click.echo(f"PDF note: {note}")

