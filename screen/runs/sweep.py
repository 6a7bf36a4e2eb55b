"""Run one case over a range of one or two inputs and locate where verdicts flip.

The case is parsed once; each point replaces the varied value in SI and reruns the engine
without figure curves, so a 200-point sweep costs little more than one ``check``. Where a
verdict (class, vessel stability, ...) changes between neighbouring points, the flip is located
by bisection on the input to a relative tolerance of 1e-9 of the range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError, ScreenError
from screen.io.case import (
    SCHEMA,
    Case,
    case_with_changes,
    check_temperature_range,
    parse_field_quantity,
)
from screen.units import parse_dimensionless

#: Result keys followed along a sweep (flattened names, see screen.runs.compare.flatten_results).
SWEEP_FIGURES = ("mtsr_degC", "td24_degC", "tmrad_at_mtsr_h", "onset_margin_K",
                 "final_temperature_degC", "criticality_class")
VESSEL_FIGURES = ("critical_coolant_temperature_degC", "no_return_temperature_degC",
                  "synthesis_cooling_ratio", "stability", "synthesis_stability")
VERDICTS = ("criticality_class", "stability", "synthesis_stability", "barrier_verdict")


@dataclass(frozen=True)
class Variation:
    """One varied input: key path, SI grid and the text of the bounds."""

    key: str
    values: np.ndarray
    unit: str
    text: str
    kind: str


def parse_vary(spec: str, case: Case, option: str = "--vary") -> Variation:
    """Parse ``KEY=START:STOP:STEPS`` (e.g. ``vessel.coolant_temperature=0 degC:40 degC:41``).

    Parameters
    ----------
    spec : str
        ``KEY=START:STOP:STEPS``; START and STOP with their unit, STEPS a count.
    case : Case
        The validated case; the key must name one of its numeric inputs.
    option : str
        Names the source in error messages (``--vary`` on the command line, ``vary`` in
        Python).
    """
    if "=" not in spec:
        raise CaseError(f"{option} {spec!r}: expected KEY=START:STOP:STEPS", key=option)
    key, rng = (p.strip() for p in spec.split("=", 1))
    parts = [p.strip() for p in rng.split(":")]
    if len(parts) != 3:
        raise CaseError(f"{option} {spec!r}: expected START:STOP:STEPS, e.g. "
                        f"'vessel.coolant_temperature=0 degC:40 degC:41'", key=option)
    section, field_name = _split_key(key, option)
    declared = SCHEMA[section][field_name]
    _check_key_in_case(key, section, case, option)
    try:
        steps = int(parts[2])
    except ValueError:
        raise CaseError(f"{option} {spec!r}: STEPS must be an integer", key=option) from None
    if not 2 <= steps <= 5000:
        raise CaseError(f"{option} {spec!r}: STEPS must be 2..5000", key=option)
    if declared.kind == "number":
        start = parse_dimensionless(parts[0], key).value
        stop = parse_dimensionless(parts[1], key).value
        unit = ""
    elif declared.kind in ("text", "choice", "bool"):
        raise CaseError(f"{option} {spec!r}: {key} is not numeric", key=option)
    else:
        start_q = parse_field_quantity(declared, parts[0], key)
        stop_q = parse_field_quantity(declared, parts[1], key)
        if start_q.si_unit != stop_q.si_unit:
            raise CaseError(f"{option} {spec!r}: START and STOP have different dimensions "
                            f"({start_q.si_unit} and {stop_q.si_unit})", key=option)
        start, stop, unit = start_q.value, stop_q.value, start_q.si_unit
    return Variation(key, np.linspace(start, stop, steps), unit, rng, declared.kind)


def _check_key_in_case(key: str, section: str, case: Case, option: str = "--vary") -> None:
    """The varied key must act on the case: its section exists, a vessel number exists."""
    parts = key.split(".")
    if section == "vessel":
        if not case.vessels:
            raise CaseError(f"{option} {key!r}: the case has no [vessel]; add one before sweeping "
                            f"a vessel input", key=option)
        if len(parts) == 3:
            try:
                index = int(parts[1])
            except ValueError:
                raise CaseError(f"{option} {key!r}: use vessel.KEY (all vessels) or vessel.N.KEY "
                                f"(N = 1, 2, ... in file order)", key=option) from None
            if not 1 <= index <= len(case.vessels):
                raise CaseError(f"{option} {key!r}: vessel number {index} does not exist (the "
                                f"case has {len(case.vessels)})", key=option)
    elif section not in case.sections:
        # A value in a section the case does not have would change nothing (or half a feature).
        raise CaseError(f"{option} {key!r}: the case has no [{section}] section; add it with the "
                        f"keys it needs before sweeping {key}", key=option)


def _split_key(key: str, option: str = "--vary"):
    parts = key.split(".")
    if parts[0] == "vessel" and len(parts) in (2, 3):
        name = parts[-1]
    elif len(parts) == 2:
        name = parts[1]
    else:
        raise CaseError(f"{option} {key!r}: use SECTION.KEY, vessel.KEY or vessel.N.KEY", key=option)
    if parts[0] not in SCHEMA or name not in SCHEMA[parts[0]]:
        raise CaseError(f"{option} {key!r}: no such key in the case schema", key=option)
    return parts[0], name


def case_with_value(case: Case, key: str, value: float) -> Case:
    """A copy of ``case`` with one value replaced (SI), range-checked and cross-checked again.

    ``key`` is ``SECTION.KEY``, ``vessel.KEY`` (every vessel) or ``vessel.N.KEY`` (1-based).

    Parameters
    ----------
    case : Case
        The validated case (SI values).
    key : str
        ``SECTION.KEY``, ``vessel.KEY`` or ``vessel.N.KEY``.
    value : float
        New value in the SI unit of the key (e.g. [K] for a temperature).
    """
    parts = key.split(".")
    section, name = parts[0], parts[-1]
    spec = SCHEMA[section][name]
    if not math.isfinite(value):
        raise CaseError(f"value {value!r} is not a finite number", key, case.path)
    if spec.kind == "temperature":
        check_temperature_range(value, f"{value:.6g} K", key, case.path)
    if spec.minimum is not None and (value < spec.minimum or (spec.exclusive_minimum
                                                              and value == spec.minimum)):
        raise CaseError(f"value {value:g} below the allowed minimum {spec.minimum:g}", key,
                        case.path)
    if spec.maximum is not None and (value > spec.maximum or (spec.exclusive_maximum
                                                              and value == spec.maximum)):
        raise CaseError(f"value {value:g} above the allowed maximum {spec.maximum:g}", key,
                        case.path)
    label = f"{key}={value!r} (SI)"
    if section == "vessel":
        indices = range(len(case.vessels)) if len(parts) == 2 else [int(parts[1]) - 1]
        return case_with_changes(case, vessel_changes={i: {name: value} for i in indices},
                                 label=label)
    return case_with_changes(case, {section: {name: value}}, label=label)


def evaluate_point(case: Case, assignments) -> dict:
    """Screen the case with ``assignments`` [(key, SI value)]; a flat row of figures.

    An input error at a point (e.g. T_p above MTT) is recorded in the row, not raised.

    Parameters
    ----------
    case : Case
        The validated case (SI values).
    assignments : list of (str, float)
        Key paths and new values in the SI unit of each key.
    """
    from screen.analyses.engine import screen_case

    row: dict = {}
    try:
        current = case
        for key, value in assignments:
            current = case_with_value(current, key, value)
        result = screen_case(current, curves=False)
    except ScreenError as exc:
        row["error"] = exc.message
        return row
    r = result.results
    for name in SWEEP_FIGURES:
        row[name] = r.get(name)
    for vessel in r.get("vessels", []):
        for name in VESSEL_FIGURES:
            row[f"{vessel['name']}:{name}"] = vessel.get(name)
    barrier = r.get("barrier") or {}
    for vessel in barrier.get("vessels", []) or []:
        if "barrier_verdict" in vessel:
            row[f"{vessel['name']}:barrier_verdict"] = vessel["barrier_verdict"]
    row["warnings"] = len(result.warnings)
    return row


def _verdict_signature(row: dict):
    if "error" in row:
        return ("error",)
    keys = sorted(k for k in row if k.split(":")[-1] in VERDICTS)
    return tuple((k, row[k]) for k in keys)


@dataclass
class Flip:
    """A verdict change located between two grid points by bisection."""

    key: str
    value: float
    unit: str
    before: dict
    after: dict
    fixed: tuple = ()

    def changed(self) -> list[tuple[str, object, object]]:
        names = sorted(set(self.before) | set(self.after))
        return [(n, self.before.get(n), self.after.get(n)) for n in names
                if self.before.get(n) != self.after.get(n)]

    def as_record(self) -> dict:
        """The flip as in ``sweep --json``: key, value_si, unit_si, fixed, changes."""
        return {"key": self.key, "value_si": self.value, "unit_si": self.unit,
                "fixed": [list(x) for x in self.fixed],
                "changes": [list(c) for c in self.changed()]}


def bisect_change(evaluate, signature, low, high, tolerance, row_low=None, row_high=None,
                  max_iter=80, split=None):
    """Bisection on an input: the narrowest bracket around the first change of ``signature``.

    Parameters
    ----------
    evaluate : callable
        ``evaluate(x) -> row`` (one screening at input value ``x``, SI).
    signature : callable
        ``signature(row) -> hashable``: what must change (the verdicts).
    low, high : float
        Bracket ends, SI; the signature is taken to differ between them.
    tolerance : float
        Stop when the bracket is at most this wide. [unit of the input]
    row_low, row_high : dict, optional
        Rows already evaluated at the ends.
    max_iter : int
        Largest number of evaluations.
    split : callable, optional
        ``split(low, high, row_low, row_high) -> x`` strictly inside the bracket (e.g. a secant
        step on a continuous figure); default the midpoint.

    Returns
    -------
    (float, float, dict, dict)
        ``(low, high, row_low, row_high)`` with ``high - low <= tolerance`` unless ``max_iter``
        ran out.
    """
    row_low = evaluate(low) if row_low is None else row_low
    row_high = evaluate(high) if row_high is None else row_high
    sig_low = signature(row_low)
    for _ in range(max_iter):
        if abs(high - low) <= tolerance:
            break
        mid = 0.5 * (low + high)
        if split is not None:
            trial = split(low, high, row_low, row_high)
            if trial is not None and min(low, high) < trial < max(low, high):
                mid = trial
        row_mid = evaluate(mid)
        if signature(row_mid) == sig_low:
            low, row_low = mid, row_mid
        else:
            high, row_high = mid, row_mid
    return low, high, row_low, row_high


def _bracket_flip(case, key, low, high, fixed, rel_tol, max_iter):
    """Bisection: the narrowest (low, high, row_low, row_high) around the first verdict change."""
    return bisect_change(lambda x: evaluate_point(case, list(fixed) + [(key, x)]),
                         _verdict_signature, low, high,
                         rel_tol * max(abs(high - low), 1e-300), max_iter=max_iter)


def _verdicts(row):
    if "error" in row:
        return {"error": row.get("error")}
    return dict(_verdict_signature(row))


def locate_flips(case, key, low, high, fixed=(), rel_tol=1e-9, max_iter=80, max_flips=8):
    """All verdict changes between two grid points (several can fall between neighbours).

    Parameters
    ----------
    case : Case
        The validated case (SI values).
    key : str
        Varied key path.
    low : float
        Lower grid value, SI unit of the key.
    high : float
        Upper grid value, SI unit of the key.
    fixed : sequence of (str, float)
        Other assignments held fixed (SI).
    rel_tol : float
        Relative width of the bracket that ends a bisection. [-]
    max_iter : int
        Largest number of bisection steps per flip. [-]
    max_flips : int
        Largest number of flips searched between the two points. [-]

    Returns
    -------
    list of (float, dict, dict)
        Per flip: the value (SI) and the verdicts below and above it.
    """
    target = _verdict_signature(evaluate_point(case, list(fixed) + [(key, high)]))
    found = []
    start = low
    for _ in range(max_flips):
        a, b, row_a, row_b = _bracket_flip(case, key, start, high, fixed, rel_tol, max_iter)
        found.append((0.5 * (a + b), _verdicts(row_a), _verdicts(row_b)))
        if _verdict_signature(row_b) == target or b >= high:
            break
        start = b
    return found


def run_sweep(case: Case, variations: list[Variation], progress=None):
    """Evaluate the grid and locate verdict flips along the first varied key.

    Parameters
    ----------
    case : Case
        The validated case (SI values).
    variations : list of Variation
        One or two varied inputs (:func:`parse_vary`); the first is swept fastest.
    progress : callable, optional
        Called as ``progress(points done, points)`` after each grid point.

    Returns
    -------
    (list of dict, list of Flip)
        Rows (one per grid point, with the varied values in SI) and the flips found.
    """
    if not 1 <= len(variations) <= 2:
        raise CaseError("sweep takes one or two --vary options", key="--vary")
    first = variations[0]
    outer = variations[1].values if len(variations) == 2 else [None]
    rows, flips = [], []
    total = len(first.values) * len(outer)
    for outer_value in outer:
        fixed = [] if outer_value is None else [(variations[1].key, float(outer_value))]
        previous = None
        for value in first.values:
            row = evaluate_point(case, fixed + [(first.key, float(value))])
            row = {first.key: float(value), **({} if outer_value is None
                                               else {variations[1].key: float(outer_value)}),
                   **row}
            rows.append(row)
            if progress is not None:
                progress(len(rows), total)
            if previous is not None and _verdict_signature(previous[1]) != _verdict_signature(row):
                for at, before, after in locate_flips(case, first.key, previous[0],
                                                      float(value), fixed):
                    flips.append(Flip(first.key, at, first.unit, before, after, tuple(fixed)))
            previous = (float(value), row)
    return rows, flips


def to_display(value: float, unit: str, kind: str):
    """SI value to the display unit used in tables (degC for temperatures, h for times).

    Parameters
    ----------
    value : float
        Value in SI (K for a temperature, s for a time).
    unit : str
        SI unit of the value, returned unchanged for other kinds.
    kind : str
        Schema kind of the key (``"temperature"``, ``"time"``, ...).

    Returns
    -------
    tuple of (float, str)
        Display value and its unit (degC, h or ``unit``).
    """
    if kind == "temperature":
        return value - ZERO_CELSIUS, "degC"
    if kind == "time":
        return value / SECONDS_PER_HOUR, "h"
    return value, unit


def display_rows(rows, variations) -> list[dict]:
    """Sweep rows with each varied input named with its unit: ``KEY [SI unit]`` and, where it
    differs, ``KEY [display unit]`` (degC, h) next to it; other columns unchanged.

    Parameters
    ----------
    rows : list of dict
        :func:`run_sweep` rows (varied inputs in SI).
    variations : sequence of Variation
        The varied inputs.
    """
    renamed = []
    for row in rows:
        out = {}
        for key, value in row.items():
            variation = next((v for v in variations if v.key == key), None)
            if variation is None:
                out[key] = value
                continue
            shown, unit = to_display(value, variation.unit, variation.kind)
            out[f"{key} [{variation.unit or '-'}]"] = value
            if unit != variation.unit:
                out[f"{key} [{unit}]"] = shown
        renamed.append(out)
    return renamed
