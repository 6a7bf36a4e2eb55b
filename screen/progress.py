"""A progress bar for long runs, shown on a terminal only. Imports nothing heavy.

Sweeps, portfolios, Monte Carlo runs and reports can take seconds to minutes; on a terminal a bar
on stderr shows how far they are. When stderr is not a terminal (a pipe, a file, a CI log, a
notebook) the bar writes nothing at all, so that a successful piped run leaves stderr empty.

The time estimate appears only after a few completed items and is based on the pace since the
first completed item: the first item carries the start-up cost (imports, worker processes) and
would make an early estimate far too long.
"""

from __future__ import annotations

import os
import sys
import time

#: Completed items before a time estimate is shown [-] (design).
ETA_AFTER_ITEMS = 3
#: Seconds since the first completed item before a time estimate is shown [s] (design).
ETA_AFTER_SECONDS = 1.0
#: Shortest interval between two redraws [s] (design).
REDRAW_SECONDS = 0.1


def is_terminal(stream) -> bool:
    """True when ``stream`` is an interactive terminal (not a pipe, file or dumb terminal).

    Parameters
    ----------
    stream : file-like
        Output stream, e.g. ``sys.stderr``.
    """
    try:
        interactive = bool(stream.isatty())
    except (AttributeError, ValueError, OSError):
        return False
    return interactive and os.environ.get("TERM") != "dumb"


def _clock(seconds: float) -> str:
    seconds = int(round(seconds))
    hours, rest = divmod(seconds, 3600)
    minutes, seconds = divmod(rest, 60)
    return f"{hours}:{minutes:02d}:{seconds:02d}" if hours else f"{minutes}:{seconds:02d}"


class ProgressBar:
    """A one-line progress bar on a terminal; silent everywhere else.

    Use as a context manager; call :meth:`advance` after each completed item, or call the bar
    itself as ``bar(done, total, *details)`` (the ``progress`` callback of the runs).

    Parameters
    ----------
    total : int
        Number of items. [-]
    label : str
        Text before the bar ("Sweep", "Screening", "Monte Carlo", "Report").
    stream : file, optional
        Where to draw; default ``sys.stderr``.
    enabled : bool, optional
        False keeps the bar silent (e.g. with ``--json``); even when True, it draws only on a
        terminal.
    unit : str
        Name of the items in the count ("points", "cases", "samples").
    """

    def __init__(self, total: int, label: str, stream=None, enabled: bool = True,
                 unit: str = ""):
        self.total = max(int(total), 0)
        self.label = label
        self.stream = sys.stderr if stream is None else stream
        self.enabled = bool(enabled) and is_terminal(self.stream)
        self.unit = unit
        self.done = 0
        self._first_done_at = None
        self._first_done_count = 0
        self._drawn_at = 0.0
        self._width = 0

    # counting -------------------------------------------------------------------------------

    def advance(self, items: int = 1) -> None:
        """Count ``items`` more completed items.

        Parameters
        ----------
        items : int
            Items completed since the last call. [-]
        """
        self.update(self.done + items)

    def update(self, done: int) -> None:
        """Set the number of completed items.

        Parameters
        ----------
        done : int
            Items completed so far, clipped to 0..total. [-]
        """
        done = min(max(int(done), 0), self.total) if self.total else int(done)
        if done > 0 and self._first_done_at is None:
            self._first_done_at = time.monotonic()
            self._first_done_count = done
        self.done = done
        self._draw(force=done >= self.total)

    def __call__(self, done, total=None, *details) -> None:
        if total is not None and int(total) != self.total:
            self.total = int(total)
        self.update(done)

    # drawing --------------------------------------------------------------------------------

    def eta_seconds(self, now: float | None = None):
        """Estimated seconds left, or None while fewer than a few items are done.

        Parameters
        ----------
        now : float or None
            Monotonic clock reading; None reads the clock. [s]
        """
        if self._first_done_at is None or self.done >= self.total:
            return None
        now = time.monotonic() if now is None else now
        elapsed = now - self._first_done_at
        counted = self.done - self._first_done_count
        if self.done < ETA_AFTER_ITEMS or counted <= 0 or elapsed < ETA_AFTER_SECONDS:
            return None
        return (self.total - self.done) * elapsed / counted

    def line(self, now: float | None = None) -> str:
        """The text of the bar as drawn now.

        Parameters
        ----------
        now : float or None
            Monotonic clock reading, for the time estimate; None reads the clock. [s]
        """
        width = 24
        fraction = self.done / self.total if self.total else 1.0
        filled = int(round(width * fraction))
        unit = f" {self.unit}" if self.unit else ""
        text = (f"{self.label} [{'#' * filled}{'-' * (width - filled)}] "
                f"{self.done}/{self.total}{unit}")
        eta = self.eta_seconds(now)
        if eta is not None:
            text += f"  about {_clock(eta)} left"
        return text

    def _draw(self, force: bool = False) -> None:
        if not self.enabled:
            return
        now = time.monotonic()
        if not force and now - self._drawn_at < REDRAW_SECONDS:
            return
        self._drawn_at = now
        text = self.line(now)
        padding = " " * max(self._width - len(text), 0)
        self._width = len(text)
        try:
            self.stream.write("\r" + text + padding)
            self.stream.flush()
        except (OSError, ValueError):
            self.enabled = False

    def close(self) -> None:
        """Erase the bar, leaving the terminal line empty for the output that follows."""
        if self.enabled and self._width:
            try:
                self.stream.write("\r" + " " * self._width + "\r")
                self.stream.flush()
            except (OSError, ValueError):
                pass
        self._width = 0
        self.enabled = False

    def __enter__(self):
        self._draw(force=True)
        return self

    def __exit__(self, *exc_info):
        self.close()
        return False
