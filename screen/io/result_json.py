"""Reading an earlier result: the JSON written by ``runaway-screen check --json``.

Used by ``compare``, ``report --since`` and :func:`screen.compare`. Imports nothing heavy.
"""

from __future__ import annotations

import json

#: Largest earlier JSON result read [bytes]; a result of ``check --json`` is some 10-100 kB.
MAX_RESULT_BYTES = 20_000_000


def _reject_constant(name):
    raise ValueError(f"{name} is not a JSON number")


def read_result_json(path) -> dict:
    """An earlier ``check --json`` output, checked for the members :mod:`screen.runs.compare` uses.

    Parameters
    ----------
    path : str or os.PathLike
        JSON file written by ``runaway-screen check --json``.

    Raises
    ------
    DataFileError
        Missing, unreadable, too large, not JSON (NaN and Infinity are not JSON), or without
        ``case`` (a table), ``results`` (a table) and ``inputs`` (rows with ``key``, ``as_read``
        and ``value_si``).
    """
    import os

    from screen.errors import DataFileError

    path = str(path)
    hint = "give a case file or the output of 'runaway-screen check --json'"
    if not os.path.exists(path):
        raise DataFileError("file not found; give a case file or an earlier --json result",
                            path=path)
    if os.path.isdir(path):
        raise DataFileError(f"is a directory; {hint}", path=path)
    from screen.io.fileio import require_regular_file

    require_regular_file(path, DataFileError, "case file or an earlier --json result")
    try:
        with open(path, "rb") as handle:  # bounded: a device such as /dev/zero never ends
            raw = handle.read(MAX_RESULT_BYTES + 1)
    except OSError as exc:
        raise DataFileError(f"cannot be read ({exc.strerror}); {hint}", path=path) from None
    if len(raw) > MAX_RESULT_BYTES:
        raise DataFileError(f"more than {MAX_RESULT_BYTES} bytes; {hint}", path=path)
    try:
        data = json.loads(raw.decode("utf-8"), parse_constant=_reject_constant)
    except (UnicodeDecodeError, ValueError, RecursionError) as exc:
        message = " ".join(str(exc).split())[:120]
        raise DataFileError(f"not a readable JSON result ({message}); {hint}",
                            path=path) from None
    if not isinstance(data, dict) or not isinstance(data.get("results"), dict) or not \
            isinstance(data.get("inputs"), list):
        raise DataFileError(f"JSON without the 'results' and 'inputs' members; {hint}",
                            path=path)
    if not isinstance(data.get("case"), dict):
        raise DataFileError(f"JSON without the 'case' member; {hint}", path=path)
    for number, row in enumerate(data["inputs"], start=1):
        if not (isinstance(row, dict) and isinstance(row.get("key"), str)
                and "as_read" in row and "value_si" in row):
            raise DataFileError(f"inputs[{number}] lacks key, as_read or value_si; {hint}",
                                path=path)
    data["case"].setdefault("path", path)
    return data
