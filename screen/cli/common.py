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
#: An interrupted run exits with 128 + the signal number (shell convention): 130 for SIGINT
#: (Ctrl-C), 143 for SIGTERM, 129 for SIGHUP.
EXIT_SIGNAL_BASE = 128
EXIT_INTERRUPTED = EXIT_SIGNAL_BASE + 2

#: errno values of a write to standard output that cannot complete (full disk, file-size
#: limit, closed pipe, quota, I/O error): bad output, reported in one line with status 2.
_OUTPUT_ERRNOS = {"EPIPE", "ENOSPC", "EFBIG", "EDQUOT", "EIO", "EBADF"}


def _fail(message: str, code: int = EXIT_INPUT_ERROR):
    click.echo(f"error: {' '.join(str(message).split())}", err=True)
    sys.exit(code)


def _is_output_error(exc: OSError) -> bool:
    import errno

    return any(exc.errno == getattr(errno, name, None) for name in _OUTPUT_ERRNOS)


def _silence_stdout() -> None:
    """Point standard output at /dev/null, so the interpreter's last flush cannot fail again."""
    try:
        descriptor = os.open(os.devnull, os.O_WRONLY)
        os.dup2(descriptor, sys.stdout.fileno())
        os.close(descriptor)
    except (OSError, ValueError, AttributeError):  # no real file descriptor (a test runner)
        pass


def _stdout_failed(exc: OSError):
    _silence_stdout()
    reason = exc.strerror or type(exc).__name__
    _fail(f"standard output: the result could not be written whole ({reason}); free some "
          f"space, lift the file-size limit or send the output elsewhere")


class _WholeStdout:
    """Standard output written with os.write until every byte is out, or an OSError.

    Python's buffered stdout can lose the rest of the text silently when the operating system
    accepts only part of a write (a file-size limit), so the command writes through this.
    """

    def __init__(self, stream):
        self._stream = stream
        self._descriptor = stream.fileno()
        self.encoding = "utf-8"
        self.errors = "strict"

    def write(self, text) -> int:
        data = text.encode("utf-8") if isinstance(text, str) else bytes(text)
        view = memoryview(data)
        while view:
            written = os.write(self._descriptor, view)
            view = view[written:]
        return len(text)

    def flush(self) -> None:
        pass

    def fileno(self) -> int:
        return self._descriptor

    def isatty(self) -> bool:
        return self._stream.isatty()

    def writable(self) -> bool:
        return True

    def readable(self) -> bool:
        return False

    def seekable(self) -> bool:
        return False

    @property
    def closed(self) -> bool:
        return self._stream.closed

    @property
    def buffer(self):
        return self  # click writes bytes here when it sees a binary-capable stream


def _strict_stdout():
    """Swap in :class:`_WholeStdout` for the real stdout; returns the stream to restore."""
    original = sys.stdout
    if original is None or original is not sys.__stdout__:
        return None  # a test runner's capture: leave it alone
    try:
        original.flush()
        sys.stdout = _WholeStdout(original)
    except (OSError, ValueError, AttributeError):
        return None
    return original


def handle_errors(func):
    """Turn ScreenError into one line and exit status 2; other errors into one line, status 3.

    Standard output that cannot be written whole (a full disk, a file-size limit, a closed
    pipe) is bad output: one line, exit status 2.

    Parameters
    ----------
    func : callable
        Command callback to wrap.
    """

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        import warnings

        from screen.errors import ScreenError

        original = _strict_stdout()
        try:
            with warnings.catch_warnings():
                # Numerical warnings (overflow in a discarded branch ...) are not for the user:
                # results are checked for finiteness, and stderr carries one line per error.
                if not os.environ.get("RUNAWAY_SCREEN_DEBUG"):
                    warnings.simplefilter("ignore")
                value = func(*args, **kwargs)
            sys.stdout.flush()  # a full disk shows here at the latest, not at interpreter exit
            return value
        except ScreenError as exc:
            _fail(exc.one_line())
        except (click.exceptions.Exit, click.ClickException, SystemExit, KeyboardInterrupt):
            raise
        except OSError as exc:
            if not _is_output_error(exc):
                if os.environ.get("RUNAWAY_SCREEN_DEBUG"):
                    raise
                _fail(f"internal error ({type(exc).__name__}: {exc}); this is a bug, please "
                      f"report it with the case file (set RUNAWAY_SCREEN_DEBUG=1 for details)",
                      EXIT_INTERNAL_ERROR)
            _stdout_failed(exc)
        except Exception as exc:  # never a traceback for the user; debug switch for developers
            if os.environ.get("RUNAWAY_SCREEN_DEBUG"):
                raise
            _fail(f"internal error ({type(exc).__name__}: {exc}); this is a bug, please report "
                  f"it with the case file (set RUNAWAY_SCREEN_DEBUG=1 for details)",
                  EXIT_INTERNAL_ERROR)
        finally:
            if original is not None:
                sys.stdout = original

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
        """Run the chosen command; a usage error becomes one line (exit status 2), an
        interruption (Ctrl-C, SIGTERM, SIGHUP) one line and exit status 128 + signal number.

        Parameters
        ----------
        ctx : click.Context
            Context of the group.
        """
        previous = _install_signal_handlers()
        try:
            return super().invoke(ctx)
        except click.UsageError as exc:
            raise self._one_line(exc) from None
        except KeyboardInterrupt:
            _interrupted(2)
        except BaseException as exc:
            from screen.io.fileio import Interrupted

            if isinstance(exc, Interrupted):
                _interrupted(exc.signum)
            raise
        finally:
            _restore_signal_handlers(previous)


def _raise_interrupted(signum, frame):
    from screen.io.fileio import Interrupted

    raise Interrupted(signum)


def _install_signal_handlers() -> dict:
    """SIGTERM and SIGHUP raise Interrupted, so that outputs and workers are cleaned up.

    Returns the previous handlers (empty outside the main thread, where Python cannot set one).
    """
    import signal
    import threading

    previous = {}
    if threading.current_thread() is not threading.main_thread():
        return previous
    for name in ("SIGTERM", "SIGHUP"):
        number = getattr(signal, name, None)
        if number is not None:
            previous[number] = signal.signal(number, _raise_interrupted)
    return previous


def _restore_signal_handlers(previous: dict) -> None:
    import signal

    for number, handler in previous.items():
        signal.signal(number, handler)


def _interrupted(signum: int):
    """One line and the exit status of an interrupted run (128 + signal number)."""
    import signal

    try:
        name = signal.Signals(signum).name
    except ValueError:  # pragma: no cover
        name = f"signal {signum}"
    try:
        sys.stdout.flush()
    except (OSError, ValueError):
        _silence_stdout()
    click.echo(f"error: interrupted by {name} (exit status {EXIT_SIGNAL_BASE + signum}); "
               f"outputs not finished were not written", err=True)
    raise click.exceptions.Exit(EXIT_SIGNAL_BASE + signum)



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
            written_what, inputs=()):
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
        ``--force``: allow the output file to be replaced.
    png_dir : str or None
        ``--png-dir``: folder for the PNG figures; None writes none.
    as_json : bool
        ``--json``: print one JSON object instead of text.
    written_what : str
        What the fragment holds, for the text message ("[decomposition] section").
    inputs : iterable of str
        Data files the command read; ``output`` is never one of them (even with ``force``).
    """
    import json

    from screen.io.fileio import check_writable, write_atomic

    text = fragment(result) if output else None
    if output:
        check_writable(output, force, inputs)  # before any figure: no partial output
    written = write_pngs(result, png_dir) if png_dir else []
    if output:
        write_atomic(output, text.encode("utf-8"), force=force, inputs=inputs)
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
