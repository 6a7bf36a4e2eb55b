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
        try:
            return super().parse_args(ctx, args)
        except click.UsageError as exc:
            raise self._one_line(exc) from None

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except click.UsageError as exc:
            raise self._one_line(exc) from None



def run_check(case_path, overrides=()):
    """Load and screen one case; returns the ScreeningResult."""
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


