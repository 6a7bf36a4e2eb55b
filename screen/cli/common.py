"""Shared pieces of the command modules: one-line errors and exit statuses, the run of one case.

Only click is imported at module level, so that ``runaway-screen --help`` stays instant.
"""

from __future__ import annotations

import functools
import os
import sys

import click

EXIT_INPUT_ERROR = 2
EXIT_INTERNAL_ERROR = 3

def _fail(message: str, code: int = EXIT_INPUT_ERROR):
    click.echo(f"error: {' '.join(str(message).split())}", err=True)
    sys.exit(code)


def handle_errors(func):
    """Turn ScreenError into one line and exit status 2; other errors into one line, status 3.

    Parameters
    ----------
    func : callable
        Command callback to wrap.
    """

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


class OneLineGroup(click.Group):
    """Command group whose usage errors are one line, like every other error of the tool."""

    @staticmethod
    def _one_line(exc: click.UsageError) -> click.UsageError:
        if isinstance(exc, _OneLineUsageError):
            return exc
        converted = _OneLineUsageError(exc.format_message(), exc.ctx)
        converted.exit_code = exc.exit_code
        return converted

    def parse_args(self, ctx, args):
        """Parse the command line; a usage error becomes one line (exit status 2).

        Parameters
        ----------
        ctx : click.Context
            Context of the group.
        args : list of str
            Remaining command-line arguments.
        """
        try:
            return super().parse_args(ctx, args)
        except click.UsageError as exc:
            raise self._one_line(exc) from None

    def invoke(self, ctx):
        """Run the chosen command; a usage error becomes one line (exit status 2).

        Parameters
        ----------
        ctx : click.Context
            Context of the group.
        """
        try:
            return super().invoke(ctx)
        except click.UsageError as exc:
            raise self._one_line(exc) from None



def run_check(case_path, overrides=()):
    """Load and screen one case; returns the ScreeningResult.

    Parameters
    ----------
    case_path : str
        TOML case file.
    overrides : iterable of str
        ``KEY=VALUE`` what-if overrides (values with units).
    """
    from screen.io.case import load_case
    from screen.runs.screening import screen_case

    case = load_case(case_path, overrides=overrides)
    return screen_case(case)


def timestamp() -> str:
    from datetime import datetime, timezone

    fixed = os.environ.get("RUNAWAY_SCREEN_TIMESTAMP")
    if fixed:
        return fixed
    return datetime.now(timezone.utc).replace(microsecond=0).isoformat()


def deliver(result, *, to_dict, summary, fragment, write_pngs, output, force, png_dir, as_json,
            written_what):
    """Shared tail of the analysis commands (kinetics, heat-flow): check the ``-o`` target
    before any figure is written, write the PNGs, write the case-file fragment through the one
    atomic writer, then print the JSON object or the text summary.

    Parameters
    ----------
    result : object
        The analysis result.
    to_dict, summary, fragment, write_pngs : callable
        Presenters taking the result (``write_pngs`` also the folder).
    output : str or None
        Fragment file (``-o``); never overwritten without ``force``.
    force : bool
    png_dir : str or None
    as_json : bool
    written_what : str
        What the fragment holds, for the text message ("[decomposition] section").
    """
    import json

    from screen.io.fileio import check_writable, write_atomic

    text = fragment(result) if output else None
    if output:
        check_writable(output, force)  # before any figure is written: no partial output
    written = write_pngs(result, png_dir) if png_dir else []
    if output:
        write_atomic(output, text.encode("utf-8"), force=force)
    if as_json:
        payload = to_dict(result)
        if output:
            payload["output"] = str(output)
        if written:
            payload["figures"] = [str(p) for p in written]
        click.echo(json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False))
    else:
        click.echo(summary(result))
        if output:
            click.echo(f"\n{written_what} written to {output}")
        for path in written:
            click.echo(f"figure written: {path}")
