"""The project's own exception types.

Every error carries the file and the key path it concerns, so that the CLI can print one line
naming the file, the field and the fix. Out-of-domain input raises; it never becomes NaN or None
in a safety result.
"""

from __future__ import annotations


class ScreenError(Exception):
    """Base class of all errors the tool reports to a user (CLI exit status 2).

    Parameters
    ----------
    message : str
        What is wrong and what is accepted.
    key : str, optional
        Dotted key path in the case file (``"decomposition.activation_energy"``).
    path : str, optional
        File the error concerns.
    """

    def __init__(self, message: str, key: str | None = None, path: str | None = None):
        super().__init__(message)
        self.message = message
        self.key = key
        self.path = path

    def one_line(self) -> str:
        """The error as a single line: ``file: key: message``."""
        parts = []
        if self.path:
            parts.append(str(self.path))
        if self.key:
            parts.append(self.key)
        parts.append(" ".join(self.message.split()))
        return ": ".join(parts)

    def __str__(self) -> str:  # pragma: no cover - trivial
        return self.one_line()


class CaseError(ScreenError, ValueError):
    """Invalid, missing or implausible input in a case file or on the command line."""


class UnitError(CaseError):
    """A quantity string that cannot be parsed or has the wrong dimension."""


class DataFileError(ScreenError, ValueError):
    """A data file (CSV thermogram, peak table, earlier JSON result) that cannot be used."""


class ModelDomainError(ScreenError, ValueError):
    """A model was called outside the domain where it is defined (e.g. E/RT overflow)."""


class SolverError(ScreenError, RuntimeError):
    """A numerical method did not converge; the message says what was tried."""


class OutputError(ScreenError, OSError):
    """An output file cannot be written (exists without --force, or not writable)."""


class CaseFileNotFoundError(CaseError, FileNotFoundError):
    """A case file that does not exist: a :class:`CaseError` (CLI exit status 2) that Python
    code can also catch as the built-in :class:`FileNotFoundError`."""


class MissingDependencyError(ScreenError, ImportError):
    """An optional package needed for the requested output is not installed (e.g. matplotlib
    for figures in a notebook); the message names the extra to install."""
