"""Command-line interface ``runaway-screen``. Presents results; computes nothing itself.

Every user error (a :class:`screen.errors.ScreenError`) is printed as one line on stderr and
ends the command with exit status 2, never with a traceback. Heavy modules are imported inside
the commands so that ``--help`` stays instant.
"""

from __future__ import annotations

import functools
import json
import os
import sys

import click

from screen import __version__

EXIT_INPUT_ERROR = 2
EXIT_INTERNAL_ERROR = 3


def _fail(message: str, code: int = EXIT_INPUT_ERROR):
    click.echo(f"error: {' '.join(str(message).split())}", err=True)
    sys.exit(code)


def handle_errors(func):
    """Turn ScreenError into one line and exit status 2; other errors into one line, status 3."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        import warnings

        from screen.errors import ScreenError

        try:
            with warnings.catch_warnings():
                # Numerical warnings (overflow in a discarded branch ...) are not for the user:
                # results are checked for finiteness, and stderr carries one line per error.
                if not os.environ.get("RUNAWAY_SCREEN_DEBUG"):
                    warnings.simplefilter("ignore")
                return func(*args, **kwargs)
        except ScreenError as exc:
            _fail(exc.one_line())
        except (click.exceptions.Exit, click.ClickException, SystemExit, KeyboardInterrupt):
            raise
        except Exception as exc:  # never a traceback for the user; debug switch for developers
            if os.environ.get("RUNAWAY_SCREEN_DEBUG"):
                raise
            _fail(f"internal error ({type(exc).__name__}: {exc}); this is a bug, please report "
                  f"it with the case file (set RUNAWAY_SCREEN_DEBUG=1 for details)",
                  EXIT_INTERNAL_ERROR)

    return wrapper


class _OneLineUsageError(click.UsageError):
    """A usage error (bad option, missing argument) shown as one line on stderr, exit status 2."""

    def show(self, file=None):
        command = self.ctx.command_path if self.ctx is not None else "runaway-screen"
        click.echo(f"error: {' '.join(self.format_message().split())} (see '{command} --help')",
                   err=True)


class _Group(click.Group):
    """Command group whose usage errors are one line, like every other error of the tool."""

    @staticmethod
    def _one_line(exc: click.UsageError) -> click.UsageError:
        if isinstance(exc, _OneLineUsageError):
            return exc
        converted = _OneLineUsageError(exc.format_message(), exc.ctx)
        converted.exit_code = exc.exit_code
        return converted

    def parse_args(self, ctx, args):
        try:
            return super().parse_args(ctx, args)
        except click.UsageError as exc:
            raise self._one_line(exc) from None

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except click.UsageError as exc:
            raise self._one_line(exc) from None


@click.group(cls=_Group, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="runaway-screen")
def main():
    """Thermal-runaway screening of exothermic reactions from a TOML case file.

    A screening aid: results depend on input data quality; a qualified process-safety review,
    local codes and regulations, and licensed practice decide.
    """


def run_check(case_path, overrides=()):
    """Load and screen one case; returns the ScreeningResult."""
    from screen.case import load_case
    from screen.engine import screen_case

    case = load_case(case_path, overrides=overrides)
    return screen_case(case)


def timestamp() -> str:
    from datetime import datetime, timezone

    fixed = os.environ.get("RUNAWAY_SCREEN_TIMESTAMP")
    if fixed:
        return fixed
    return datetime.now(timezone.utc).replace(microsecond=0).isoformat()


@main.command("check")
@click.argument("case_file", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
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
@handle_errors
def check_command(case_file, as_json, overrides, pdf_path, force, samples, seed):
    """Screen CASE_FILE and print the figures, the class and the warnings."""
    if pdf_path:
        from screen.report import check_output_path

        check_output_path(str(pdf_path), force)  # fail before the computation, not after it
    result = run_check(case_file, overrides)
    if samples is not None:
        from screen.uncertainty import add_uncertainty

        add_uncertainty(result, samples=samples, seed=seed, progress=not as_json)
    data = result.to_json_dict(generated_at=timestamp())
    if pdf_path:
        from screen.report import write_report

        write_report(result, pdf_path, force=force, generated_at=data["generated_at"])
    if as_json:
        click.echo(json.dumps(data, indent=2, ensure_ascii=False))
    else:
        from screen.terminal import format_check

        click.echo(format_check(data))
        if pdf_path:
            click.echo(f"\nPDF written to {pdf_path}")


def _register_commands():
    """Attach the commands that live in their own modules (their heavy imports stay lazy)."""
    from screen.hooks import resolve

    for target in ("screen.cli_report:report_command", "screen.cli_compare:compare_command",
                   "screen.cli_compare:sweep_command", "screen.cli_kinetics:kinetics_command",
                   "screen.cli_batch:batch_command"):
        main.add_command(resolve(target))


_register_commands()

if __name__ == "__main__":  # pragma: no cover
    main()
