"""The case-file schema: TOML text -> validated, read-only sections of SI floats.

A case file is TOML. Every dimensional value is a quoted string with its unit (``"85 degC"``),
converted to SI here, once. Unknown sections and keys are errors, because a silently ignored typo
is a safety risk. The schema is declarative (:data:`SCHEMA`): to add a key, add a :class:`Field`.

Nothing here computes a screening figure; :mod:`screen.analyses.engine` does that.
"""

from __future__ import annotations

import copy
import difflib
import hashlib
import math
import os
from dataclasses import dataclass, field
from typing import Any

from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.errors import CaseError, CaseFileNotFoundError
from screen.io.schema import (  # noqa: F401
    FREE_FORM_SECTIONS,
    MAX_ARRHENIUS_EXPONENT,
    MAX_CASE_BYTES,
    PLAUSIBLE_LIMITS,
    REQUIRED_SECTIONS,
    SCHEMA,
    TEMPERATURE_RANGE_K,
    Field,
)
from screen.units import ParsedQuantity, parse_dimensionless, parse_quantity


class Section:
    """Read-only view of one validated section: attribute access, ``None`` for absent keys."""

    def __init__(self, name: str, values: dict[str, Any], declared: dict[str, Field]):
        object.__setattr__(self, "_name", name)
        object.__setattr__(self, "_values", dict(values))
        object.__setattr__(self, "_declared", declared)

    def __getattr__(self, key):
        declared = object.__getattribute__(self, "_declared")
        if key in declared or not declared:
            return object.__getattribute__(self, "_values").get(key)
        raise AttributeError(f"section [{object.__getattribute__(self, '_name')}] has no key {key!r}")

    def __setattr__(self, key, value):  # pragma: no cover - guard
        raise AttributeError("case sections are read-only")

    def get(self, key, default=None):
        """Value of ``key`` in SI units, or ``default`` when absent or None.

        Parameters
        ----------
        key : str
            Field name within the section.
        default : object, optional
            Returned when the key is absent or None.
        """
        value = self._values.get(key)
        return default if value is None else value

    def given(self, key) -> bool:
        """True when the key was present in the file (or set by an override).

        Parameters
        ----------
        key : str
            Field name within the section.
        """
        return key in self._values

    def as_dict(self) -> dict[str, Any]:
        return dict(self._values)

    def __repr__(self):  # pragma: no cover - debugging aid
        return f"Section({self._name!r}, {self._values!r})"


@dataclass(frozen=True)
class InputRecord:
    """One input as read: key path, text as written, SI value and unit (for the report)."""

    key: str
    text: str
    value: Any
    unit: str


@dataclass(frozen=True)
class Case:
    """A validated case: sections of SI floats plus provenance."""

    path: str
    sha256: str
    raw: dict
    sections: dict[str, Section]
    vessels: tuple[Section, ...]
    inputs: tuple[InputRecord, ...]
    overrides: tuple[str, ...] = ()
    uncertainties: dict[str, ParsedQuantity] = field(default_factory=dict)
    warnings: tuple[str, ...] = ()
    extras: dict[str, Any] = field(default_factory=dict)

    @property
    def title(self) -> str:
        return self.sections["case"].title

    def __getattr__(self, name):
        sections = object.__getattribute__(self, "sections")
        if name in sections:
            return sections[name]
        if name in SCHEMA:
            return Section(name, {}, SCHEMA[name])
        raise AttributeError(name)


# --------------------------------------------------------------------------------------------
# Reading


def read_case_text(path: str) -> tuple[dict, str]:
    """Read and TOML-decode a case file. Returns (data, sha256 of the bytes).

    Parameters
    ----------
    path : str
        Path of the TOML case file.
    """
    import tomllib

    if not os.path.exists(path):
        raise CaseFileNotFoundError("file not found; give the path of a TOML case file (see "
                                    "cases/)", path=str(path))
    if os.path.isdir(path):
        raise CaseError("is a directory; give the path of a TOML case file", path=str(path))
    from screen.io.fileio import require_regular_file

    require_regular_file(path, CaseError, "TOML case file")  # a FIFO would block for ever
    try:
        size = os.path.getsize(path)
        if size > MAX_CASE_BYTES:
            raise CaseError(f"file is {size} bytes; a case file is at most {MAX_CASE_BYTES} bytes "
                            f"(is this the right file?)", path=str(path))
        # Bounded read: a device or pipe reports size 0 but may never end (/dev/zero).
        with open(path, "rb") as handle:
            data = handle.read(MAX_CASE_BYTES + 1)
        if len(data) > MAX_CASE_BYTES:
            raise CaseError(f"more than {MAX_CASE_BYTES} bytes; a case file is a small TOML text "
                            f"file (is this the right file?)", path=str(path))
    except OSError as exc:
        raise CaseError(f"cannot read the file ({exc.strerror}); check the path and permissions",
                        path=str(path)) from None
    digest = hashlib.sha256(data).hexdigest()
    if not data.strip():
        raise CaseError("file is empty; a case needs at least [case], [mass], [process], "
                        "[synthesis] and [decomposition] (copy one from cases/)", path=str(path))
    try:
        text = data.decode("utf-8-sig")  # a byte-order mark (Windows editors) is harmless
    except UnicodeDecodeError:
        raise CaseError("file is not UTF-8 text (a binary file?); save the case as UTF-8 TOML",
                        path=str(path)) from None
    if "\x00" in text:
        raise CaseError("file contains NUL bytes (a binary file?); give a TOML text file",
                        path=str(path))
    try:
        parsed = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseError(f"TOML syntax error: {exc}; values with units must be quoted strings, "
                        f"e.g. energy = \"180 kJ/kg\"", path=str(path)) from None
    except RecursionError:
        parsed = None
    if parsed is None or _nesting_depth(parsed) > MAX_NESTING_DEPTH:
        raise CaseError(f"tables or arrays nested more than {MAX_NESTING_DEPTH} levels deep; a "
                        f"case file has [section] tables of key = value lines (see cases/)",
                        path=str(path))
    return parsed, digest


#: Deepest nesting of tables and arrays accepted in a case file (a case needs 3) (design).
MAX_NESTING_DEPTH = 8


def _nesting_depth(value) -> int:
    """Depth of nested dicts and lists, without recursion (deep input must not crash)."""
    deepest = 0
    stack = [(value, 0)]
    while stack:
        item, depth = stack.pop()
        if isinstance(item, dict):
            children = item.values()
        elif isinstance(item, list):
            children = item
        else:
            continue
        deepest = max(deepest, depth + 1)
        if deepest > MAX_NESTING_DEPTH:
            return deepest
        stack.extend((child, depth + 1) for child in children)
    return deepest


def _suggest(key: str, options) -> str:
    close = difflib.get_close_matches(key, list(options), n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


def _apply_override(raw: dict, text: str) -> None:
    """Apply one ``KEY=VALUE`` override (command line ``--set``) to the raw TOML dict."""
    if "=" not in text:
        raise CaseError(f"--set {text!r}: expected KEY=VALUE, e.g. --set 'process.temperature=70 degC'",
                        key="--set")
    key, value = (part.strip() for part in text.split("=", 1))
    _apply_key_value(raw, key, value, f"--set {text!r}", "--set")


def _apply_key_value(raw: dict, key: str, value, where: str, error_key: str | None) -> None:
    """Set ``key`` (SECTION.KEY, vessel.KEY or vessel.N.KEY) to ``value`` in the raw TOML dict.

    ``where`` opens every error message (``--set 'KEY=VALUE'`` on the command line,
    ``overrides['KEY']`` from Python) and ``error_key`` is the key the error names.
    """
    text = where
    if not isinstance(key, str):
        raise CaseError(f"{text}: the key must be a string SECTION.KEY", key=error_key)
    parts = key.split(".")
    if len(parts) < 2 or parts[0] not in SCHEMA:
        raise CaseError(f"{text}: the key must be SECTION.KEY with SECTION one of "
                        f"{', '.join(SCHEMA)}", key=error_key)
    section = parts[0]
    targets: list[dict]
    if section == "vessel":
        vessels = raw.get("vessel")
        if isinstance(vessels, dict):
            vessels = [vessels]
            raw["vessel"] = vessels
        if not vessels:
            raise CaseError(f"{text}: the case has no [vessel]", key=error_key)
        if not isinstance(vessels, list) or not all(isinstance(v, dict) for v in vessels):
            raise CaseError(f"{text}: vessel in the case is not a [vessel] table or "
                            f"[[vessel]] tables", key=error_key)
        if len(parts) == 3:
            try:
                index = int(parts[1])
            except ValueError:
                raise CaseError(f"{text}: use vessel.KEY (all vessels) or vessel.N.KEY "
                                f"(N = 1, 2, ... in file order)", key=error_key) from None
            if not 1 <= index <= len(vessels):
                raise CaseError(f"{text}: vessel number {index} does not exist "
                                f"(the case has {len(vessels)})", key=error_key)
            targets, name = [vessels[index - 1]], parts[2]
        elif len(parts) == 2:
            targets, name = list(vessels), parts[1]
        else:
            raise CaseError(f"{text}: use vessel.KEY or vessel.N.KEY", key=error_key)
    else:
        if len(parts) != 2:
            raise CaseError(f"{text}: the key must be SECTION.KEY", key=error_key)
        targets, name = [raw.setdefault(section, {})], parts[1]
        if not isinstance(targets[0], dict):
            raise CaseError(f"{text}: [{section}] is not a table in the case", key=error_key)
    declared = SCHEMA[section]
    if name not in declared:
        raise CaseError(f"{text}: [{section}] has no key {name!r}{_suggest(name, declared)}",
                        key=error_key)
    converted: Any = value
    kind = declared[name].kind
    if isinstance(value, bool) and kind != "bool":
        raise CaseError(f"{text}: {section}.{name} needs {_accepted_override(kind)}, got "
                        f"{value!r}", key=error_key)
    if kind == "number":
        if isinstance(value, str):
            try:
                converted = float(value)
            except ValueError:
                converted = value  # "35 %" or "0.3 ± 0.05" is parsed later
        elif not isinstance(value, (int, float)):
            raise CaseError(f"{text}: give a number or a string for {section}.{name}, got "
                            f"{type(value).__name__}", key=error_key)
    elif kind == "bool":
        # Strict: a typo such as "ture" must not silently become false.
        words = {"true": True, "yes": True, "1": True, "false": False, "no": False, "0": False}
        if isinstance(value, bool):
            converted = value
        elif str(value).lower() not in words:
            raise CaseError(f"{text}: {section}.{name} is true or false (yes/no, 1/0), "
                            f"got {value!r}", key=error_key)
        else:
            converted = words[str(value).lower()]
    elif not isinstance(value, str):
        raise CaseError(f"{text}: {section}.{name} needs {_accepted_override(kind)}, got "
                        f"{value!r}", key=error_key)
    for target in targets:
        target[name] = converted


def _accepted_override(kind: str) -> str:
    """What an override of a key of this kind accepts (for error messages)."""
    if kind == "number":
        return "a number"
    if kind == "bool":
        return "True or False"
    if kind in ("text", "choice"):
        return "a string"
    return "a string with a unit, e.g. '70 degC'"


def _override_items(overrides) -> list[tuple]:
    """(text recorded in the case, key, value, error prefix, error key) per override.

    ``overrides`` is a mapping ``{"process.temperature": "70 degC"}`` (Python) or an iterable of
    ``"KEY=VALUE"`` strings (command line ``--set``).
    """
    from collections.abc import Mapping

    if overrides is None:
        return []
    if isinstance(overrides, Mapping):
        return [(f"{key}={value}", key, value, f"overrides[{key!r}] = {value!r}", None)
                for key, value in overrides.items()]
    if isinstance(overrides, str):
        overrides = (overrides,)
    items = []
    for text in overrides:
        if not isinstance(text, str):
            raise CaseError(f"override {text!r}: give a mapping {{'SECTION.KEY': value}} or "
                            f"'KEY=VALUE' strings", key="overrides")
        items.append((text, None, None, None, None))
    return items


def parse_field_quantity(spec: Field, raw_value, key: str, path: str | None = None
                         ) -> ParsedQuantity:
    """Parse the value of a numeric field (kind ``"number"``, ``"rate_constant"`` or a quantity
    kind of :data:`screen.units.DIMENSIONS`) into SI; bounds are not checked here.

    Parameters
    ----------
    spec : Field
        Schema entry of the field (kind, accepted units).
    raw_value : str or float
        Value as read from the file or an override, with its unit.
    key : str
        Case-file key path, for the error message.
    path : str or None
        Case-file path, for the error message.
    """
    if spec.kind == "number":
        return parse_dimensionless(raw_value, key, path)
    if spec.kind == "rate_constant":
        errors = []
        for kind in ("frequency", "second_order_rate_constant"):
            try:
                return parse_quantity(raw_value, kind, key, path)
            except CaseError as exc:
                errors.append(exc)
        # Report the real problem (a non-finite value, a decimal comma ...) when the dimension
        # of one kind matched; the generic hint only when neither dimension fits.
        specific = [e for e in errors if "which is not a" not in e.message
                    and "is not known" not in e.message]
        if specific:
            raise specific[-1]
        raise CaseError(f"got {raw_value!r}; a rate constant is in 1/s (first order) or "
                        f"m^3/(mol s), L/(mol s) (second order)", key, path) from None
    return parse_quantity(raw_value, spec.kind, key, path)


def _validate_value(name: str, spec: Field, raw_value, key: str, path: str,
                    inputs: list, uncertainties: dict):
    if spec.kind == "text":
        if not isinstance(raw_value, str):
            raise CaseError(f"got {raw_value!r}; expected text in quotes", key, path)
        inputs.append(InputRecord(key, raw_value, raw_value, ""))
        return raw_value
    if spec.kind == "choice":
        if not isinstance(raw_value, str) or raw_value not in spec.choices:
            raise CaseError(f"got {raw_value!r}; expected one of "
                            f"{', '.join(repr(c) for c in spec.choices)}", key, path)
        inputs.append(InputRecord(key, raw_value, raw_value, ""))
        return raw_value
    if spec.kind == "bool":
        if not isinstance(raw_value, bool):
            raise CaseError(f"got {raw_value!r}; expected true or false", key, path)
        inputs.append(InputRecord(key, str(raw_value).lower(), raw_value, ""))
        return raw_value
    parsed = parse_field_quantity(spec, raw_value, key, path)
    value = parsed.value
    low, high = spec.minimum, spec.maximum
    shown = raw_value if isinstance(raw_value, str) else repr(raw_value)
    if spec.kind == "temperature":
        check_temperature_range(value, shown, key, path)
    unit = "" if parsed.si_unit in ("", "1") else f" {parsed.si_unit}"
    if low is not None and (value < low or (spec.exclusive_minimum and value == low)):
        relation = "above" if spec.exclusive_minimum else "at least"
        raise CaseError(f"got {shown}; must be {relation} {low:g}{unit} "
                        f"({spec.doc.lower() or name})", key, path)
    if high is not None and (value > high or (spec.exclusive_maximum and value == high)):
        relation = "below" if spec.exclusive_maximum else "at most"
        raise CaseError(f"got {shown}; must be {relation} {high:g}{unit} "
                        f"({spec.doc.lower() or name})", key, path)
    inputs.append(InputRecord(key, str(raw_value), value, parsed.si_unit))
    if parsed.std is not None:
        uncertainties[key] = parsed
    return value


def check_temperature_range(value: float, shown: str, key: str, path: str | None) -> None:
    """Raise CaseError unless an absolute temperature [K] lies in :data:`TEMPERATURE_RANGE_K`.

    Parameters
    ----------
    value : float
        Absolute temperature. [K]
    shown : str
        The value as written in the case, for the error message.
    key : str
        Case-file key path, for the error message.
    path : str or None
        Case-file path, for the error message.
    """
    low, high = TEMPERATURE_RANGE_K
    if not (math.isfinite(value) and low <= value <= high):
        raise CaseError(
            f"got {shown} ({value:.6g} K); a temperature in a case file must lie between "
            f"{low - ZERO_CELSIUS:.0f} degC and {high - ZERO_CELSIUS:.0f} degC: check the value "
            f"and its unit (degC, K)", key, path)


def _validate_table(section: str, table, key_prefix: str, path: str, inputs: list,
                    uncertainties: dict) -> dict[str, Any]:
    declared = SCHEMA[section]
    if not isinstance(table, dict):
        raise CaseError(f"expected a table [{section}], got {type(table).__name__}", key_prefix, path)
    if section in FREE_FORM_SECTIONS:
        for name, raw_value in table.items():
            inputs.append(InputRecord(f"{key_prefix}.{name}", str(raw_value), raw_value, ""))
        return dict(table)
    values: dict[str, Any] = {}
    for name, raw_value in table.items():
        key = f"{key_prefix}.{name}"
        if name not in declared:
            raise CaseError(f"unknown key{_suggest(name, declared)}; [{section}] accepts "
                            f"{', '.join(declared)}", key, path)
        values[name] = _validate_value(name, declared[name], raw_value, key, path, inputs,
                                       uncertainties)
    for name, spec in declared.items():
        if spec.required and name not in values:
            raise CaseError(f"missing required key ({spec.doc}); add it to [{section}]",
                            f"{key_prefix}.{name}", path)
    return values


def load_case(path, overrides=None) -> Case:
    """Load, validate and convert a case file to SI.

    Parameters
    ----------
    path : str or path-like
        TOML case file.
    overrides : mapping or iterable of str, optional
        What-if overrides applied before validation: a mapping such as
        ``{"process.temperature": "70 degC", "vessel.2.coolant_temperature": "5 degC"}``
        (strings with units; numbers for dimensionless keys; True/False for switches), or
        ``KEY=VALUE`` strings as given to ``--set`` (``"process.temperature=70 degC"``).

    Returns
    -------
    Case

    Raises
    ------
    CaseError
        With the file, key path, value received and what is accepted.
    CaseFileNotFoundError
        The file does not exist (also a :class:`FileNotFoundError`).
    """
    path = str(os.fspath(path))
    items = _override_items(overrides)
    raw, digest = read_case_text(path)
    raw = copy.deepcopy(raw)
    for text, key, value, where, error_key in items:
        try:
            if key is None:
                _apply_override(raw, text)
            else:
                _apply_key_value(raw, key, value, where, error_key)
        except CaseError as exc:
            raise CaseError(exc.message, exc.key, path) from None
    return build_case(raw, path=path, sha256=digest,
                      overrides=tuple(text for text, *_ in items))


def build_case(raw: dict, path: str = "<memory>", sha256: str = "", overrides=()) -> Case:
    """Validate an already decoded case dictionary (see :func:`load_case`).

    Parameters
    ----------
    raw : dict
        Decoded TOML tables of the case.
    path : str
        Case-file path (for messages and the result).
    sha256 : str
        SHA-256 of the file bytes, carried into the result.
    overrides : mapping or iterable of str
        What-if overrides, as in :func:`load_case`.
    """
    inputs: list[InputRecord] = []
    uncertainties: dict[str, ParsedQuantity] = {}
    warnings: list[str] = []
    for name in raw:
        if name not in SCHEMA:
            raise CaseError(f"unknown section [{name}]{_suggest(name, SCHEMA)}; accepted sections: "
                            f"{', '.join(SCHEMA)}", name, path)
    for name in REQUIRED_SECTIONS:
        if name not in raw:
            raise CaseError(f"missing section [{name}]; copy it from an example in cases/", name, path)
    sections: dict[str, Section] = {}
    for name in SCHEMA:
        if name == "vessel" or name not in raw:
            continue
        values = _validate_table(name, raw[name], name, path, inputs, uncertainties)
        sections[name] = Section(name, values, SCHEMA[name])
    vessels_raw = raw.get("vessel", [])
    if isinstance(vessels_raw, dict):
        vessels_raw = [vessels_raw]
    if not isinstance(vessels_raw, list):
        raise CaseError("expected [vessel] or [[vessel]] tables", "vessel", path)
    vessels = []
    for index, table in enumerate(vessels_raw, start=1):
        prefix = f"vessel.{index}" if len(vessels_raw) > 1 else "vessel"
        values = _validate_table("vessel", table, prefix, path, inputs, uncertainties)
        vessels.append(Section("vessel", values, SCHEMA["vessel"]))
    names = [v.name for v in vessels]
    if len(set(names)) != len(names):
        raise CaseError("vessel names must be unique", "vessel.name", path)

    _check_consistency(sections, vessels, path, warnings)
    warnings.extend(accumulation_override_warnings(raw, overrides))
    return Case(path=path, sha256=sha256, raw=raw, sections=sections, vessels=tuple(vessels),
                inputs=tuple(inputs), overrides=tuple(overrides), uncertainties=uncertainties,
                warnings=tuple(warnings))


def case_with_changes(case: Case, changes=None, vessel_changes=None, drop=(), label: str = "",
                      extras=None) -> Case:
    """A copy of ``case`` with new values (SI), cross-checked again; the one "what-if" copier.

    Sweeps, scenarios, limits and the Monte Carlo all derive their variants here, so every
    variant passes the same cross-field checks as a loaded case.

    Parameters
    ----------
    case : Case
        The base case (not changed).
    changes : dict, optional
        ``{section: {key: value}}`` with values in SI; a value of None removes the key; a section
        the case does not have is created.
    vessel_changes : dict or callable, optional
        ``{vessel index (0-based): {key: value}}``, or ``f(values) -> values`` applied to every
        vessel's dict of values.
    drop : iterable of str
        Sections to remove.
    label : str
        What the change is, appended to ``case.overrides`` for traceability.
    extras : dict, optional
        Entries merged into ``case.extras``.

    Returns
    -------
    Case
        The variant.

    Raises
    ------
    CaseError
        The changed values break a cross-field rule.
    """
    import dataclasses

    sections = dict(case.sections)
    for name, values in (changes or {}).items():
        current = sections[name].as_dict() if name in sections else {}
        for key, value in values.items():
            if value is None:
                current.pop(key, None)
            else:
                current[key] = value
        sections[name] = Section(name, current, SCHEMA[name])
    for name in drop:
        sections.pop(name, None)
    vessels = list(case.vessels)
    if callable(vessel_changes):
        vessels = [Section("vessel", vessel_changes(v.as_dict()), SCHEMA["vessel"])
                   for v in vessels]
    elif vessel_changes:
        for index, values in vessel_changes.items():
            current = vessels[index].as_dict()
            current.update(values)
            vessels[index] = Section("vessel", current, SCHEMA["vessel"])
    warnings: list[str] = []
    _check_consistency(sections, vessels, case.path, warnings)
    return dataclasses.replace(case, sections=sections, vessels=tuple(vessels),
                               warnings=tuple(warnings), extras={**case.extras, **(extras or {})},
                               overrides=case.overrides + ((label,) if label else ()))


#: Message when a semi-batch case gives neither the mass ratio nor the initial charge.
MASS_RATIO_MISSING = (
    "semi-batch needs accumulation_mass_ratio (mass present at the maximum accumulation over "
    "the final mass, 0..1], e.g. 0.8), or synthesis_kinetics.initial_mass so that the smallest "
    "possible ratio (initial charge / final mass) can be taken; 1 would give the lowest MTSR")


#: Inputs whose change changes the thermal accumulation of the run (a stated accumulation was
#: measured at the written values): process temperature, dosing time, feed rate or profile.
ACCUMULATION_CONDITIONS = (
    "process.temperature", "synthesis.dosing_time", "synthesis_kinetics.dosing_time",
    "synthesis_kinetics.feed_profile", "synthesis_kinetics.feed_amount",
    "synthesis_kinetics.feed_mass", "synthesis_kinetics.feed_temperature",
)


def accumulation_override_warnings(raw: dict, overrides=()) -> list[str]:
    """Warnings for ``--set`` overrides of an input that the stated accumulation depends on.

    The accumulation in ``[process]`` was established (measured) at the process temperature and
    feed written in the case; a what-if that changes them keeps that accumulation unless the
    accumulation is overridden as well.

    Parameters
    ----------
    raw : dict
        The decoded case (after the overrides).
    overrides : iterable of str
        The ``KEY=VALUE`` overrides applied.

    Returns
    -------
    list of str
        One warning naming the overridden keys, or none.
    """
    process = raw.get("process") if isinstance(raw.get("process"), dict) else {}
    if "accumulation" not in process:
        return []
    keys = [str(text).split("=", 1)[0].strip() for text in overrides if "=" in str(text)]
    if "process.accumulation" in keys:
        return []
    changed = [key for key in keys if key in ACCUMULATION_CONDITIONS]
    if not changed:
        return []
    return [f"--set {', '.join(changed)}: the stated accumulation (process.accumulation = "
            f"{process['accumulation']}) was measured under other conditions (those written in "
            f"the case) and is kept unchanged; the MTSR and the class rest on it. Measure the "
            f"accumulation under the new conditions and set process.accumulation as well."]


def _check_consistency(sections, vessels, path, warnings) -> None:
    """Cross-field rules: sign conventions, required combinations, impossible orderings."""
    process = sections["process"]
    synthesis = sections["synthesis"]
    raw_synth = synthesis.as_dict()
    if "molar_enthalpy" in raw_synth:
        if raw_synth["molar_enthalpy"] >= 0:
            raise CaseError(
                "molar_enthalpy must be negative for an exothermic reaction (sign convention: "
                "dH_r < 0 releases heat); `energy` values are positive heats released",
                "synthesis.molar_enthalpy", path)
        if "limiting_amount" not in raw_synth:
            raise CaseError("molar_enthalpy needs limiting_amount (mol of limiting reagent in the "
                            "batch), e.g. limiting_amount = \"2400 mol\"",
                            "synthesis.limiting_amount", path)
        if "energy" in raw_synth:
            raise CaseError("give either energy or molar_enthalpy with limiting_amount, not both",
                            "synthesis.energy", path)
    elif "energy" not in raw_synth:
        raise CaseError("missing the heat of reaction: give energy (e.g. \"180 kJ/kg\", positive) "
                        "or molar_enthalpy (negative) with limiting_amount",
                        "synthesis.energy", path)

    mode = process.mode
    if mode == "semi-batch":
        if not process.given("accumulation"):
            raise CaseError("semi-batch needs the maximum thermal accumulation (0..1) from "
                            "reaction calorimetry, e.g. accumulation = 0.35",
                            "process.accumulation", path)
        if not process.given("accumulation_mass_ratio"):
            # Fail closed (issue 18 item 6): never 1 by default, the ratio of the lowest MTSR.
            kinetics = sections.get("synthesis_kinetics")
            initial = None if kinetics is None else kinetics.initial_mass
            if initial is None:
                raise CaseError(MASS_RATIO_MISSING, "process.accumulation_mass_ratio", path)
            ratio = min(float(initial) / float(sections["mass"].amount), 1.0)
            warnings.append(
                f"process.accumulation_mass_ratio not given: taken as the smallest possible "
                f"ratio, initial charge / final mass = {ratio:.3g} (synthesis_kinetics."
                f"initial_mass / mass.amount; the highest MTSR). Give the measured ratio.")
    else:
        if process.given("accumulation") and process.accumulation < 1.0 and not process.given(
                "accumulation_basis"):
            raise CaseError("a batch accumulation below 1 needs accumulation_basis stating the "
                            "measured conversion at the moment of failure (otherwise use 1)",
                            "process.accumulation_basis", path)

    mtt = process.max_technical_temperature
    solvent = sections.get("solvent")
    if mtt is None and (solvent is None or solvent.name is None):
        raise CaseError("missing max_technical_temperature (MTT: boiling point at operating "
                        "pressure or the temperature at the relief set pressure), e.g. "
                        "max_technical_temperature = \"111 degC\", or give [solvent] name and "
                        "pressure to compute the boiling point",
                        "process.max_technical_temperature", path)
    if mtt is not None and process.temperature > mtt + 1e-9:
        raise CaseError(
            f"process temperature {process.temperature - ZERO_CELSIUS:.1f} degC is above the MTT "
            f"{mtt - ZERO_CELSIUS:.1f} degC, impossible at the stated pressure (a process at reflux "
            f"sits at the MTT); check both values", "process.temperature", path)

    decomposition = sections.get("decomposition")
    if decomposition is None:
        raise CaseError("missing section [decomposition]: without data on the secondary "
                        "reaction no class can be assigned; give at least energy and "
                        "onset_temperature, better energy, model and kinetics",
                        "decomposition", path)
    _check_decomposition(decomposition, path)
    _check_arrhenius_range(sections, path)

    _run_extra_checks(sections, vessels, path, warnings)

    for index, vessel in enumerate(vessels, start=1):
        prefix = f"vessel.{index}" if len(vessels) > 1 else "vessel"
        if vessel.heat_transfer_coefficient is None:
            raise CaseError("missing heat_transfer_coefficient (overall U), e.g. \"250 W/(m^2 K)\"",
                            f"{prefix}.heat_transfer_coefficient", path)
        if vessel.coolant_temperature is None:
            raise CaseError("missing coolant_temperature, e.g. \"20 degC\"",
                            f"{prefix}.coolant_temperature", path)
        has_geometry = vessel.volume is not None or vessel.diameter is not None
        if vessel.heat_transfer_area is None and not has_geometry:
            raise CaseError("give heat_transfer_area, or volume, diameter and bottom so that the "
                            "wetted area can be computed", f"{prefix}.heat_transfer_area", path)
        if vessel.heat_transfer_area is None:
            for needed in ("volume", "diameter", "bottom"):
                if vessel.get(needed) is None:
                    raise CaseError(f"computing the wetted area needs {needed} as well",
                                    f"{prefix}.{needed}", path)
            if sections["mass"].density is None:
                raise CaseError("computing the fill of a vessel needs the density of the "
                                "reaction mass, e.g. density = \"1050 kg/m^3\"", "mass.density", path)
        if (vessel.min_coolant_temperature is not None
                and vessel.min_coolant_temperature > vessel.coolant_temperature):
            raise CaseError("min_coolant_temperature is above coolant_temperature",
                            f"{prefix}.min_coolant_temperature", path)
        if vessel.heat_losses and vessel.ambient_temperature is None:
            raise CaseError("heat_losses need ambient_temperature", f"{prefix}.ambient_temperature",
                            path)


def _run_extra_checks(sections, vessels, path, warnings) -> None:
    """Cross-field checks of the optional sections, each in the input module of its feature;
    each raises CaseError or appends to ``warnings``."""
    from screen.io import (
        barrier_inputs,
        scenario_inputs,
        simulation_inputs,
        uncertainty_inputs,
    )

    for module in (simulation_inputs, barrier_inputs, scenario_inputs, uncertainty_inputs):
        module.check_case(sections, vessels, path, warnings)


def _check_arrhenius_range(sections, path) -> None:
    """E/(R T) at the process and reference temperatures must stay in floating-point range."""
    process = sections["process"]
    for section_name in ("decomposition", "synthesis", "synthesis_kinetics"):
        section = sections.get(section_name)
        if section is None or section.get("activation_energy") is None:
            continue
        energy = float(section.get("activation_energy"))
        temperatures = [("process.temperature", process.temperature)]
        if section.get("reference_temperature") is not None:
            temperatures.append((f"{section_name}.reference_temperature",
                                 section.get("reference_temperature")))
        for label, temperature in temperatures:
            exponent = energy / (GAS_CONSTANT * float(temperature))
            if exponent > MAX_ARRHENIUS_EXPONENT:
                raise CaseError(
                    f"E = {energy / 1000:.6g} kJ/mol gives E/(R T) = {exponent:.0f} at "
                    f"{label} ({float(temperature) - ZERO_CELSIUS:.1f} degC), above "
                    f"{MAX_ARRHENIUS_EXPONENT:.0f}: exp(-E/RT) leaves floating-point range. "
                    f"Real activation energies are about 30-400 kJ/mol: check the value and its "
                    f"unit (J/mol or kJ/mol)", f"{section_name}.activation_energy", path)


def _check_onset(data: dict, path: str) -> None:
    """The onset type and the figure it needs go together (issue 18 item 3)."""
    kind = data.get("onset_type")
    needs = {"detection-point": "onset_detection_limit", "extrapolated": "onset_scan_rate"}
    if kind is not None and "onset_temperature" not in data:
        raise CaseError("onset_type describes onset_temperature; give it as well",
                        "decomposition.onset_temperature", path)
    if kind is not None and needs[kind] not in data:
        example = {"onset_detection_limit": '"20 W/kg"', "onset_scan_rate": '"10 K/min"'}
        raise CaseError(f"onset_type = \"{kind}\" needs {needs[kind]}, e.g. "
                        f"{needs[kind]} = {example[needs[kind]]}",
                        f"decomposition.{needs[kind]}", path)
    for key, wanted in (("onset_detection_limit", "detection-point"),
                        ("onset_scan_rate", "extrapolated")):
        if key in data and kind != wanted:
            raise CaseError(f"{key} belongs to onset_type = \"{wanted}\"; declare onset_type",
                            "decomposition.onset_type", path)


def _check_decomposition(decomposition: Section, path: str) -> None:
    data = decomposition.as_dict()
    if "energy" not in data:
        raise CaseError("missing energy (heat released by the decomposition per kg of reaction "
                        "mass, positive, e.g. \"650 kJ/kg\")", "decomposition.energy", path)
    model = data.get("model")
    kinetic_keys = ("activation_energy", "reference_rate", "reference_temperature",
                    "pre_exponential_factor")
    _check_onset(data, path)
    if data.get("basis") == "onset-estimate":
        # Written from a single onset: the model keys, if any, are not used (issue 18 item 1).
        if "onset_temperature" not in data:
            raise CaseError("basis = \"onset-estimate\" needs onset_temperature",
                            "decomposition.onset_temperature", path)
        return
    if model is None:
        if any(k in data for k in kinetic_keys):
            raise CaseError("kinetic data given without model; add model = \"zero-order\", "
                            "\"nth-order\" or \"autocatalytic\"", "decomposition.model", path)
        if "onset_temperature" not in data:
            raise CaseError("give kinetics (model, activation_energy, reference_rate with "
                            "reference_temperature or pre_exponential_factor) or at least an "
                            "onset_temperature for a crude estimate", "decomposition.model", path)
        return
    if "activation_energy" not in data:
        raise CaseError("missing activation_energy, e.g. \"120 kJ/mol\"",
                        "decomposition.activation_energy", path)
    has_ref = "reference_rate" in data or "reference_temperature" in data
    if has_ref and "pre_exponential_factor" in data:
        raise CaseError("give either reference_rate with reference_temperature, or "
                        "pre_exponential_factor, not both", "decomposition.pre_exponential_factor",
                        path)
    if has_ref:
        for needed in ("reference_rate", "reference_temperature"):
            if needed not in data:
                raise CaseError(f"reference_rate and reference_temperature go together; add "
                                f"{needed}", f"decomposition.{needed}", path)
    elif "pre_exponential_factor" not in data:
        raise CaseError("missing the rate: give reference_rate (W/kg of the fresh mass) with "
                        "reference_temperature, or pre_exponential_factor (1/s)",
                        "decomposition.reference_rate", path)
    if model == "nth-order" and "order" not in data:
        raise CaseError("nth-order needs order (n), e.g. order = 1", "decomposition.order", path)
    if model == "autocatalytic":
        for needed in ("order", "autocatalytic_order", "initial_conversion"):
            if needed not in data:
                raise CaseError(f"autocatalytic (f = a^m (1-a)^n) needs {needed}",
                                f"decomposition.{needed}", path)
    if model == "zero-order" and ("order" in data or "autocatalytic_order" in data):
        raise CaseError("order is not used by the zero-order model; remove it or choose "
                        "model = \"nth-order\"", "decomposition.order", path)
