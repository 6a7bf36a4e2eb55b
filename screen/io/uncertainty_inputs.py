"""The ``[uncertainty]`` section: distributions of uncertain inputs, parsed and checked at load time.

The Monte Carlo propagation itself is :mod:`screen.runs.uncertainty`.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from typing import Any

import numpy as np

from screen.errors import CaseError

#: Key of the [uncertainty] section that correlates E with ln A.
CORRELATION_KEY = "arrhenius_correlation"


#: Inputs outside [vessel] that the Monte Carlo propagates.
PROPAGATED_KEYS = (
    "mass.amount",
    "mass.specific_heat",
    "process.temperature",
    "process.accumulation",
    "process.accumulation_mass_ratio",
    "process.max_technical_temperature",
    "synthesis.energy",
    "synthesis.molar_enthalpy",
    "synthesis.limiting_amount",
    "decomposition.energy",
    "decomposition.activation_energy",
    "decomposition.reference_rate",
    "decomposition.reference_temperature",
    "decomposition.pre_exponential_factor",
    "decomposition.order",
    "decomposition.autocatalytic_order",
    "decomposition.initial_conversion",
    "decomposition.onset_temperature",
)


#: Vessel inputs the Monte Carlo propagates (as vessel.KEY or vessel.N.KEY).
VESSEL_KEYS = ("batch_mass", "heat_transfer_area", "heat_transfer_coefficient",
               "coolant_temperature", "heat_losses", "ambient_temperature")


def _field_spec(section: str, name: str):
    from screen.io.schema import SCHEMA

    return SCHEMA[section][name]


def _flatten(table: dict, prefix: str = "") -> list[tuple[str, Any]]:
    """Key paths of a (possibly nested, from unquoted dotted TOML keys) table."""
    items = []
    for name, value in table.items():
        path = f"{prefix}.{name}" if prefix else str(name)
        if isinstance(value, dict):
            items.extend(_flatten(value, path))
        else:
            items.append((path, value))
    return items


def _supported_list() -> str:
    return ", ".join(PROPAGATED_KEYS) + ", vessel[.N]." + ", vessel[.N].".join(VESSEL_KEYS)


def _resolve(key: str, sections, vessels, path, error_key: str):
    """(section, name, targets, nominal values) of a key path; CaseError if not usable."""
    parts = key.split(".")
    if parts[0] == "vessel":
        if not vessels:
            raise CaseError("the case has no [vessel]; remove this entry or add the vessel",
                            error_key, path)
        if len(parts) == 2:
            indices = list(range(len(vessels)))
            name = parts[1]
        elif len(parts) == 3:
            try:
                number = int(parts[1])
            except ValueError:
                number = 0
            if not 1 <= number <= len(vessels):
                raise CaseError(f"vessel number {parts[1]!r} does not exist (the case has "
                                f"{len(vessels)}); write vessel.KEY (every vessel) or vessel.N.KEY "
                                f"with N = 1 .. {len(vessels)} in file order", error_key, path)
            indices = [number - 1]
            name = parts[2]
        else:
            raise CaseError("a vessel key path is vessel.KEY (every vessel) or vessel.N.KEY",
                            error_key, path)
        if name not in VESSEL_KEYS:
            hint = difflib.get_close_matches(name, VESSEL_KEYS, n=1, cutoff=0.6)
            hint_text = f" (did you mean {hint[0]!r}?)" if hint else ""
            raise CaseError(f"vessel input {name!r} is not propagated by the Monte Carlo"
                            f"{hint_text}; uncertain vessel inputs can be: "
                            f"{', '.join(VESSEL_KEYS)}", error_key, path)
        nominal = []
        for index in indices:
            value = vessels[index].get(name)
            if value is None:
                raise CaseError(f"{name} is not given for vessel {index + 1} "
                                f"({vessels[index].name}); give its value in [vessel] first (the "
                                f"distribution describes the uncertainty of a given value)",
                                error_key, path)
            nominal.append(float(value))
        targets = tuple(f"vessel.{index + 1}.{name}" for index in indices)
        return "vessel", name, targets, tuple(nominal)
    if len(parts) != 2 or key not in PROPAGATED_KEYS:
        hint = difflib.get_close_matches(key, list(PROPAGATED_KEYS), n=1, cutoff=0.6)
        hint_text = f" (did you mean {hint[0]!r}?)" if hint else ""
        raise CaseError(f"unknown or not propagated key path {key!r}{hint_text}; uncertain "
                        f"inputs can be: {_supported_list()}, and {CORRELATION_KEY}; quote the "
                        f"key, e.g. \"decomposition.activation_energy\" = \"normal 8 kJ/mol\"",
                        error_key, path)
    section, name = parts
    table = sections.get(section)
    if table is None or not table.given(name):
        raise CaseError(f"{key} is not given in the case; give its value in [{section}] first "
                        f"(the distribution describes the uncertainty of a given value)",
                        error_key, path)
    if key == "decomposition.onset_temperature" and table.model is not None:
        raise CaseError("onset_temperature is information only when kinetics are given: its "
                        "uncertainty changes no figure; remove this entry", error_key, path)
    return section, name, (key,), (float(table.get(name)),)


def _section_entries(sections, vessels, path):
    """Parsed ``[uncertainty]`` entries: (list of UncertainInput, correlation or None)."""
    table = sections.get("uncertainty")
    if table is None:
        return [], None
    entries, correlation = [], None
    seen: dict[str, str] = {}
    for key, value in _flatten(table.as_dict()):
        error_key = f"uncertainty.{key}"
        if key == CORRELATION_KEY:
            if isinstance(value, bool) or not isinstance(value, (int, float)) or \
                    not math.isfinite(float(value)) or not -1.0 <= float(value) <= 1.0:
                raise CaseError(f"got {value!r}; {CORRELATION_KEY} is the correlation "
                                f"coefficient of E and ln A, a number in [-1, 1] (fitted values "
                                f"are typically +0.9 to +0.999)", error_key, path)
            correlation = float(value)
            continue
        section, name, targets, nominals = _resolve(key, sections, vessels, path, error_key)
        for target in targets:
            if target in seen:
                raise CaseError(f"{target} is already made uncertain by {seen[target]!r}; give "
                                f"each input one distribution", error_key, path)
            seen[target] = key
        marginals = tuple(parse_distribution(value, section, name, nominal, error_key, path)
                          for nominal in nominals)
        unit = _unit_of(section, name)
        entries.append(UncertainInput(key, str(value), "[uncertainty]", targets, marginals,
                                      unit))
    if correlation is not None:
        dec = sections.get("decomposition")
        if dec is None or not dec.given("pre_exponential_factor"):
            raise CaseError(
                f"{CORRELATION_KEY} correlates E with ln A and needs pre_exponential_factor in "
                f"[decomposition]; with reference_rate and reference_temperature the rate at "
                f"the reference temperature is held when E varies, which already expresses the "
                f"strong E - ln A correlation of a fit: remove {CORRELATION_KEY}",
                f"uncertainty.{CORRELATION_KEY}", path)
    return entries, correlation


def _unit_of(section: str, name: str) -> str:
    from screen.units import DIMENSIONS

    kind = _field_spec(section, name).kind
    return DIMENSIONS[kind][1] if kind in DIMENSIONS else "1"


def check_case(sections, vessels, path, warnings) -> None:
    """Validate the ``[uncertainty]`` section of a case (called by :mod:`screen.io.case`).

    Parameters
    ----------
    sections : dict of screen.io.case.Section
        Validated sections of the case (SI values).
    vessels : sequence of screen.io.case.Section
        Validated vessels.
    path : str
        Case file, for error messages.
    warnings : list of str
        Warnings of the case (appended to).

    Raises
    ------
    CaseError
        Unknown or unsupported key path, an input not given in the case, bad distribution
        words or units, a range not containing the case value, a distribution largely outside
        the input's domain, or a misplaced ``arrhenius_correlation``; the message names the key
        path and the fix.
    """
    _, correlation = _section_entries(sections, vessels, path)
    if correlation is not None and correlation < 0.0:
        warnings.append(
            f"uncertainty.{CORRELATION_KEY} = {correlation:g} is negative: activation energies "
            f"and ln A fitted to the same data are normally positively correlated (compensation "
            f"effect); check the sign (the intercept and the slope -E/R of an Arrhenius plot are "
            f"negatively correlated).")


DISTRIBUTIONS = ("normal", "lognormal", "uniform", "triangular")


#: Largest share of a normal or lognormal distribution allowed outside the domain of the input;
#: the rest is cut off (truncated distribution). Above it the distribution does not describe
#: the input (design).
MAX_OUTSIDE_FRACTION = 0.01


_EXAMPLES = ('"normal 8 kJ/mol" (standard deviation about the case value), "normal 5 %" '
             '(relative), "lognormal factor 2", "uniform 120 .. 150 kJ/mol", '
             '"triangular 120 .. 135 .. 150 kJ/mol"')


@dataclass(frozen=True)
class UncertainInput:
    """One uncertain input as written: a key path, its marginal per target, its source.

    ``targets`` are internal key paths (``"vessel.2.coolant_temperature"``); a ``vessel.KEY``
    written for several vessels has one target per vessel, all driven by the same draw.
    """

    key: str
    text: str
    source: str
    targets: tuple[str, ...]
    marginals: tuple[Marginal, ...]
    unit: str


def _domain(section: str, name: str):
    """(lower, upper, lower_exclusive, upper_exclusive) of an input from the case schema."""
    spec = _field_spec(section, name)
    lower, upper = spec.minimum, spec.maximum
    lower_exclusive, upper_exclusive = spec.exclusive_minimum, spec.exclusive_maximum
    if spec.kind == "temperature":
        lower, lower_exclusive = 0.0, True
    if section == "synthesis" and name == "molar_enthalpy":
        upper, upper_exclusive = 0.0, True  # exothermic: dH_r < 0
    return lower, upper, lower_exclusive, upper_exclusive


def _parse_value(text: str, kind: str, key: str, path):
    """A quantity of the input's kind in SI (dimensionless: number or percent)."""
    from screen.units import parse_dimensionless, parse_quantity

    if kind == "number":
        return parse_dimensionless(text, key, path).value
    return parse_quantity(text, kind, key, path).value


def _parse_spread(text: str, kind: str, nominal: float, key: str, path) -> float:
    """Standard deviation from 'SD unit' (absolute) or 'P %' (relative to the case value)."""
    from screen.units import parse_dimensionless, parse_quantity

    stripped = text.strip()
    if stripped.endswith("%"):
        number = stripped[:-1].strip()
        try:
            fraction = float(number) / 100.0
        except ValueError:
            raise CaseError(f"got {text!r}; a relative spread is a number and %, e.g. \"5 %\"",
                            key, path) from None
        if not math.isfinite(fraction) or fraction <= 0.0:
            raise CaseError(f"got {text!r}; the spread must be > 0 %", key, path)
        if nominal == 0.0:
            raise CaseError("a relative spread (%) needs a case value other than 0; give the "
                            "standard deviation with its unit", key, path)
        return fraction * abs(nominal)
    if kind == "number":
        sd = parse_dimensionless(stripped, key, path).value
    elif kind == "temperature":
        # A spread of a temperature is a difference: parse it as the ± part of a dummy value so
        # that "2 degC" and "2 K" both mean 2 K (scale only, no offset).
        parsed = parse_quantity(f"1000 ± {stripped}", kind, key, path)
        sd = parsed.std
    else:
        sd = parse_quantity(stripped, kind, key, path).value
    if sd is None or not math.isfinite(sd) or sd <= 0.0:
        raise CaseError(f"got {text!r}; the standard deviation must be > 0", key, path)
    return float(sd)


def parse_distribution(text, section: str, name: str, nominal: float, key: str,
                       path=None) -> Marginal:
    """Parse the words of one ``[uncertainty]`` entry into a :class:`Marginal`.

    Grammar (case-insensitive; see docs/uncertainty.md):

    ``normal SD`` or ``normal P %``
        Normal about the case value; standard deviation with the unit of the input, or P % of
        the case value.
    ``lognormal factor F``
        Lognormal with the case value as median and geometric standard deviation F > 1
        (ln x has standard deviation ln F).
    ``uniform LOW .. HIGH``
        Rectangular between two bounds; the unit may be written once, after the last bound.
    ``triangular LOW .. MODE .. HIGH``
        Triangular with the given mode.

    Parameters
    ----------
    text : str
        The distribution as written.
    section, name : str
        Section and field of the input (its kind comes from :data:`screen.io.schema.SCHEMA`).
    nominal : float
        Case value of the input. [SI]
    key : str
        Key path for error messages.
    path : str, optional
        Case file for error messages.

    Returns
    -------
    Marginal

    Raises
    ------
    CaseError
        Unknown distribution word, unparsable bound, wrong unit, a range that does not contain
        the case value, or a distribution that lies largely outside the input's domain.
    """
    if not isinstance(text, str):
        raise CaseError(f"got {text!r}; expected a quoted distribution such as {_EXAMPLES}",
                        key, path)
    kind = _field_spec(section, name).kind
    words = text.strip().split(None, 1)
    if not words:
        raise CaseError(f"empty distribution; write e.g. {_EXAMPLES}", key, path)
    word = words[0].lower()
    rest = words[1].strip() if len(words) > 1 else ""
    if word not in DISTRIBUTIONS:
        hint = difflib.get_close_matches(word, DISTRIBUTIONS, n=1, cutoff=0.6)
        hint_text = f" (did you mean {hint[0]!r}?)" if hint else ""
        raise CaseError(f"got {text!r}: unknown distribution {words[0]!r}{hint_text}; accepted: "
                        f"{', '.join(DISTRIBUTIONS)}, e.g. {_EXAMPLES}", key, path)
    lower, upper, lower_exclusive, upper_exclusive = _domain(section, name)
    bounds = dict(lower=lower, upper=upper, lower_exclusive=lower_exclusive,
                  upper_exclusive=upper_exclusive)
    if word == "normal":
        if not rest or ".." in rest:
            raise CaseError(f"got {text!r}; write normal SD (standard deviation about the case "
                            f"value, e.g. \"normal 8 kJ/mol\" or \"normal 5 %\")", key, path)
        sd = _parse_spread(rest, kind, nominal, key, path)
        marginal = Marginal("normal", (float(nominal), sd), float(nominal), **bounds)
    elif word == "lognormal":
        match = re.fullmatch(r"factor\s+(\S+)", rest, re.IGNORECASE)
        try:
            factor = float(match.group(1)) if match else float("nan")
        except ValueError:
            factor = float("nan")
        if not (factor > 1.0 and math.isfinite(factor)):
            raise CaseError(f"got {text!r}; write lognormal factor F with F > 1, e.g. "
                            f"\"lognormal factor 2\" (the case value is the median)", key, path)
        if not nominal > 0.0:
            raise CaseError(f"a lognormal distribution needs a positive case value, got "
                            f"{nominal:.6g}", key, path)
        marginal = Marginal("lognormal", (float(nominal), math.log(factor)), float(nominal),
                            **bounds)
    else:
        parts = [p.strip() for p in rest.split("..")]
        expected = 2 if word == "uniform" else 3
        if len(parts) != expected or not all(parts):
            form = "LOW .. HIGH" if word == "uniform" else "LOW .. MODE .. HIGH"
            example = ("uniform 120 .. 150 kJ/mol" if expected == 2
                       else "triangular 120 .. 135 .. 150 kJ/mol")
            raise CaseError(f"got {text!r}; write {word} {form}, e.g. {example}", key, path)
        unit_match = re.match(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*(.*)$", parts[-1])
        unit = unit_match.group(1).strip() if unit_match else ""
        values = []
        for part in parts:
            bare = re.fullmatch(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?", part)
            written = f"{part} {unit}" if bare and unit else part
            values.append(_parse_value(written, kind, key, path))
        if word == "uniform":
            low, high = values
            if not low < high:
                raise CaseError(f"got {text!r}; LOW must be below HIGH", key, path)
            params = (low, high)
        else:
            low, mode, high = values
            if not (low <= mode <= high and low < high):
                raise CaseError(f"got {text!r}; need LOW <= MODE <= HIGH and LOW < HIGH",
                                key, path)
            params = (low, mode, high)
        if not low <= nominal <= high:
            raise CaseError(f"got {text!r}; the range must contain the case value "
                            f"({nominal:.6g} in SI), which the nominal screening uses", key, path)
        if lower is not None and (low < lower or (lower_exclusive and low == lower)):
            raise CaseError(f"got {text!r}; the range reaches below the smallest allowed value "
                            f"{lower:g} (SI) of this input", key, path)
        if upper is not None and (high > upper or (upper_exclusive and high == upper)):
            raise CaseError(f"got {text!r}; the range reaches above the largest allowed value "
                            f"{upper:g} (SI) of this input", key, path)
        marginal = Marginal(word, params, float(nominal), **bounds)
    _check_tails(marginal, text, key, path)
    return marginal


def _check_tails(marginal: Marginal, text: str, key: str, path) -> None:
    below, above = marginal.tail_fractions()
    if below + above > MAX_OUTSIDE_FRACTION:
        raise CaseError(
            f"got {text!r}: {100 * (below + above):.1f} % of this distribution lies outside the "
            f"allowed range of the input (more than {100 * MAX_OUTSIDE_FRACTION:g} % would be cut "
            f"off); give a smaller spread, a lognormal or a uniform range", key, path)


def _normal_cdf(x: float) -> float:
    """Standard normal CDF, :func:`scipy.special.ndtr`."""
    from scipy.special import ndtr

    return float(ndtr(x))


@dataclass(frozen=True)
class Marginal:
    """Distribution of one input value (SI).

    ``kind`` and ``parameters``: normal (mean, standard deviation), lognormal (median, standard
    deviation of ln x), uniform (low, high), triangular (low, mode, high). ``lower``/``upper``
    is the domain of the input (None: unbounded); normal and lognormal draws are truncated to it.
    """

    kind: str
    parameters: tuple[float, ...]
    nominal: float
    lower: float | None = None
    upper: float | None = None
    lower_exclusive: bool = False
    upper_exclusive: bool = False

    def _normal_space(self):
        """(location, scale, lower, upper) of the underlying normal, bounds in that space."""
        if self.kind == "normal":
            mean, sd = self.parameters
            return mean, sd, self.lower, self.upper
        median, sigma = self.parameters
        low = None if self.lower is None or self.lower <= 0.0 else math.log(self.lower)
        high = None
        if self.upper is not None:
            high = -math.inf if self.upper <= 0.0 else math.log(self.upper)
        return math.log(median), sigma, low, high

    def tail_fractions(self) -> tuple[float, float]:
        """Probability below the lower and above the upper domain bound."""
        if self.kind in ("uniform", "triangular"):
            return 0.0, 0.0
        location, scale, low, high = self._normal_space()
        below = 0.0 if low is None else _normal_cdf((low - location) / scale)
        above = 0.0 if high is None else 1.0 - _normal_cdf((high - location) / scale)
        return below, above

    def transform(self, standard_normal):
        """Values with this distribution from standard normal draws (monotone increasing).

        Parameters
        ----------
        standard_normal : numpy.ndarray
            Independent or correlated N(0, 1) draws. [-]

        Returns
        -------
        numpy.ndarray
            Samples of the input. [SI unit of the input]
        """
        from scipy.special import ndtr, ndtri

        z = np.asarray(standard_normal, dtype=float)
        if self.kind in ("normal", "lognormal"):
            location, scale, _, _ = self._normal_space()
            below, above = self.tail_fractions()
            if below > 1e-15 or above > 1e-15:
                # Truncated: map the uniform of z into [F(low), 1 - above] (inverse CDF method).
                u = below + (1.0 - below - above) * ndtr(z)
                x = location + scale * ndtri(u)
            else:
                x = location + scale * z
            values = np.exp(x) if self.kind == "lognormal" else x
        elif self.kind == "uniform":
            low, high = self.parameters
            values = low + (high - low) * ndtr(z)
        else:
            low, mode, high = self.parameters
            u = ndtr(z)
            split = (mode - low) / (high - low)
            values = np.where(u < split,
                              low + np.sqrt(u * (high - low) * (mode - low)),
                              high - np.sqrt((1.0 - u) * (high - low) * (high - mode)))
        # Keep rounding at a bound inside the domain (exclusive bounds stay excluded).
        if self.lower is not None:
            floor = np.nextafter(self.lower, np.inf) if self.lower_exclusive else self.lower
            values = np.maximum(values, floor)
        if self.upper is not None:
            ceiling = np.nextafter(self.upper, -np.inf) if self.upper_exclusive else self.upper
            values = np.minimum(values, ceiling)
        return values

    def describe(self, unit: str) -> str:
        """One-line description of the distribution for reports.

        Parameters
        ----------
        unit : str
            Display unit appended to the parameters (they are shown as stored, SI).

        Returns
        -------
        str
            E.g. ``"normal, mean 1.2e+05 J/mol, standard deviation 5000 J/mol"``.
        """
        p = self.parameters
        if self.kind == "normal":
            return f"normal, mean {p[0]:.6g} {unit}, standard deviation {p[1]:.4g} {unit}"
        if self.kind == "lognormal":
            return f"lognormal, median {p[0]:.6g} {unit}, geometric sd factor {math.exp(p[1]):.4g}"
        if self.kind == "uniform":
            return f"uniform {p[0]:.6g} .. {p[1]:.6g} {unit}"
        return f"triangular {p[0]:.6g} .. {p[1]:.6g} .. {p[2]:.6g} {unit}"
