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
    "barrier_verdict", "decomposition_triggered", "decomposition_stability",
    "synthesis_cooling", "mtsr_feed_mode",
)

#: Unit suffixes of the result keys (JSON keys carry their unit), longest first, with the unit
#: as printed.
UNIT_SUFFIXES = (
    ("_kJ_per_kg", "kJ/kg"), ("_W_per_kg", "W/kg"), ("_W_per_K", "W/K"), ("_W_per_m2K", "W/(m2 K)"),
    ("_kg_per_h", "kg/h"), ("_m_per_s", "m/s"), ("_kJ_per_mol", "kJ/mol"),
    ("_mol_per_kg", "mol/kg"), ("_kg_per_m3", "kg/m3"), ("_per_m", "1/m"), ("_degC", "degC"),
    ("_kW", "kW"), ("_MJ", "MJ"), ("_bar", "bar"), ("_m3", "m3"), ("_m2", "m2"), ("_kg", "kg"),
    ("_h", "h"), ("_K", "K"),
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


def split_unit(key: str) -> tuple[str, str]:
    """``"vessels[R-1].no_return_temperature_degC"`` -> (``"vessels[R-1].no_return_temperature"``,
    ``"degC"``); the unit is ``""`` for a dimensionless or unknown key.

    Parameters
    ----------
    key : str
        A flattened result key (:func:`flatten_results`); result keys carry their unit.

    Returns
    -------
    tuple of str
        (key without the unit suffix, unit as printed).
    """
    for suffix, unit in UNIT_SUFFIXES:
        if key.endswith(suffix):
            return key[:-len(suffix)], unit
    return key, ""


def printed(value, unit: str = "") -> str:
    """A figure as the comparison prints it: temperatures and differences in K with 1 decimal,
    other numbers with 4 significant digits; a difference that vanishes at this precision is
    not shown as a change.

    Parameters
    ----------
    value : object
        The figure (number, bool, text, list or None).
    unit : str
        Its unit as printed (:func:`split_unit`); ``"degC"`` and ``"K"`` print 1 decimal.

    Returns
    -------
    str
        The printed text.
    """
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        if isinstance(value, int):
            return str(value)
        if not math.isfinite(value):
            return str(value)
        if unit in ("degC", "K"):
            text = f"{value:.1f}"
            return "0.0" if text == "-0.0" else text
        return f"{value:.4g}"
    if isinstance(value, (tuple, list)):
        return f"[{len(value)} items]"
    return str(value)


def shows_a_difference(change: "Change") -> bool:
    """True unless the change vanishes at the printed precision (:func:`printed`).

    Parameters
    ----------
    change : Change
        A changed result figure.

    Returns
    -------
    bool
    """
    unit = split_unit(change.key)[1]
    return printed(change.old, unit) != printed(change.new, unit)


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
