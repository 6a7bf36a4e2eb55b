"""Differences between two screening results (reruns after a change). Presentation-neutral.

Works on the JSON-ready dicts of :meth:`screen.analyses.engine.ScreeningResult.to_json_dict`, so an
earlier ``--json`` output can be compared with a fresh run of a case file.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: Result keys whose change is a change of verdict (shown first, impossible to miss).
VERDICT_KEYS = (
    "criticality_class", "severity", "severity_4", "probability", "probability_6",
    "verdict_status", "stability", "synthesis_stability", "mtsr_above_no_return",
    "barrier_verdict", "decomposition_triggered",
)
#: Relative change below which two numbers count as equal [-] (JSON keeps 10 digits).
RELATIVE_TOLERANCE = 1e-9


@dataclass(frozen=True)
class Change:
    """One changed input or figure."""

    key: str
    old: object
    new: object
    direction: str  # "up", "down", "changed", "added", "removed"
    is_verdict: bool = False

    @property
    def delta(self):
        if isinstance(self.old, (int, float)) and isinstance(self.new, (int, float)) and not (
                isinstance(self.old, bool) or isinstance(self.new, bool)):
            return self.new - self.old
        return None


def flatten_results(results: dict, prefix: str = "") -> dict[str, object]:
    """Flatten nested results; list items with a ``name`` are keyed by it (``vessels[R-301].x``).

    Parameters
    ----------
    results : dict
        Nested ``results`` table of a JSON-ready screening result.
    prefix : str
        Key path of ``results`` itself; '' at the top.
    """
    flat: dict[str, object] = {}
    for key, value in results.items():
        path = f"{prefix}.{key}" if prefix else key
        if isinstance(value, dict):
            flat.update(flatten_results(value, path))
        elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
            for index, item in enumerate(value):
                label = item.get("name", index + 1)
                flat.update(flatten_results(item, f"{path}[{label}]"))
        elif isinstance(value, list):
            flat[path] = tuple(value)
        else:
            flat[path] = value
    return flat


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _differs(old, new) -> bool:
    if _is_number(old) and _is_number(new):
        if math.isclose(old, new, rel_tol=RELATIVE_TOLERANCE, abs_tol=1e-12):
            return False
        return True
    return old != new


def _direction(old, new) -> str:
    if _is_number(old) and _is_number(new):
        return "up" if new > old else "down"
    return "changed"


def _is_verdict_key(key: str) -> bool:
    leaf = key.rsplit(".", 1)[-1]
    return leaf in VERDICT_KEYS or leaf.endswith("_verdict") and leaf != "synthesis_verdict"


_SKIP_RESULT_KEYS = ("verdict", "criticality_meaning", "summary_lines", "dsc_onset_note")


def diff_dicts(old: dict, new: dict, skip=()) -> list[Change]:
    """Changes between two flat or nested dicts, verdict changes first.

    Parameters
    ----------
    old : dict
        Earlier results (flat or nested).
    new : dict
        Later results (flat or nested).
    skip : iterable of str
        Keys (leaf names or path parts) left out of the comparison.
    """
    flat_old, flat_new = flatten_results(old), flatten_results(new)
    changes = []
    for key in list(flat_old) + [k for k in flat_new if k not in flat_old]:
        leaf = key.rsplit(".", 1)[-1]
        if leaf in skip or any(part in skip for part in key.split(".")):
            continue
        old_value = flat_old.get(key, None)
        new_value = flat_new.get(key, None)
        if key not in flat_new:
            changes.append(Change(key, old_value, None, "removed", _is_verdict_key(key)))
        elif key not in flat_old:
            changes.append(Change(key, None, new_value, "added", _is_verdict_key(key)))
        elif _differs(old_value, new_value):
            changes.append(Change(key, old_value, new_value, _direction(old_value, new_value),
                                  _is_verdict_key(key)))
    changes.sort(key=lambda c: not c.is_verdict)
    return changes


def diff_inputs(old: dict, new: dict) -> list[Change]:
    """Changed inputs between two JSON results (by key path, compared in SI).

    Parameters
    ----------
    old : dict
        Earlier JSON-ready result (its ``inputs`` rows, values in SI).
    new : dict
        Later JSON-ready result.
    """
    def table(data):
        return {row["key"]: row for row in data.get("inputs", [])}

    old_rows, new_rows = table(old), table(new)
    changes = []
    for key in list(old_rows) + [k for k in new_rows if k not in old_rows]:
        if key not in new_rows:
            changes.append(Change(key, old_rows[key]["as_read"], None, "removed"))
        elif key not in old_rows:
            changes.append(Change(key, None, new_rows[key]["as_read"], "added"))
        else:
            a, b = old_rows[key], new_rows[key]
            if _differs(a["value_si"], b["value_si"]):
                direction = _direction(a["value_si"], b["value_si"])
                changes.append(Change(key, a["as_read"], b["as_read"], direction))
    return changes


def diff_results(old: dict, new: dict) -> tuple[list[Change], list[Change]]:
    """(input changes, result changes) between two JSON-ready screening results.

    Parameters
    ----------
    old : dict
        Earlier JSON-ready screening result.
    new : dict
        Later JSON-ready screening result.
    """
    return diff_inputs(old, new), diff_dicts(old.get("results", {}), new.get("results", {}),
                                             skip=_SKIP_RESULT_KEYS)
