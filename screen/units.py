"""The one pint registry and the parser that turns ``"250 kJ/kg"`` into an SI float.

Rules (why): every dimensional value in a case file is a quoted string with its unit, converted
to SI once, here. Offset temperatures are only accepted where an absolute temperature is meant:
a rise of ``"50 degC"`` would otherwise silently become 323.15 K. Decimal commas are rejected
because pint reads ``"1,5 kJ"`` as 15 kJ. A standard uncertainty may be written inside the
quantity (``"100 ± 8 kJ/mol"`` or ``"100 +/- 8 kJ/mol"``); it is returned separately in SI.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import UnitError

#: Kinds of quantity a case-file field can hold: name -> (pint dimensionality, SI unit string).
DIMENSIONS: dict[str, tuple[str, str]] = {
    "temperature": ("[temperature]", "K"),
    "temperature_difference": ("[temperature]", "K"),
    "mass": ("[mass]", "kg"),
    "specific_heat": ("[energy]/[mass]/[temperature]", "J/(kg*K)"),
    "specific_energy": ("[energy]/[mass]", "J/kg"),
    "molar_energy": ("[energy]/[substance]", "J/mol"),
    "amount_of_substance": ("[substance]", "mol"),
    "specific_power": ("[power]/[mass]", "W/kg"),
    "frequency": ("1/[time]", "1/s"),
    "time": ("[time]", "s"),
    "area": ("[area]", "m^2"),
    "volume": ("[volume]", "m^3"),
    "length": ("[length]", "m"),
    "density": ("[mass]/[volume]", "kg/m^3"),
    "heat_transfer_coefficient": ("[power]/[area]/[temperature]", "W/(m^2*K)"),
    "thermal_conductance": ("[power]/[temperature]", "W/K"),
    "power": ("[power]", "W"),
    "pressure": ("[pressure]", "Pa"),
    "specific_amount": ("[substance]/[mass]", "mol/kg"),
    "velocity": ("[length]/[time]", "m/s"),
    "mass_flow": ("[mass]/[time]", "kg/s"),
    "second_order_rate_constant": ("[volume]/[substance]/[time]", "m^3/(mol*s)"),
    "heating_rate": ("[temperature]/[time]", "K/s"),
}

#: Example strings used in error messages, one per kind.
EXAMPLES: dict[str, str] = {
    "temperature": '"85 degC" or "358.15 K"',
    "temperature_difference": '"60 K" (a difference: write it in K, not degC)',
    "mass": '"4500 kg"',
    "specific_heat": '"1.9 kJ/(kg K)"',
    "specific_energy": '"250 kJ/kg"',
    "molar_energy": '"-120 kJ/mol" or "95 kJ/mol"',
    "amount_of_substance": '"2400 mol" or "2.4 kmol"',
    "specific_power": '"12 W/kg"',
    "frequency": '"3.2e12 1/s"',
    "time": '"4 h" or "90 min"',
    "area": '"6.2 m^2"',
    "volume": '"6.3 m^3"',
    "length": '"1.8 m"',
    "density": '"1050 kg/m^3"',
    "heat_transfer_coefficient": '"300 W/(m^2 K)"',
    "thermal_conductance": '"25 W/K"',
    "power": '"150 kW"',
    "pressure": '"2.5 bar" (absolute)',
    "specific_amount": '"1.5 mol/kg"',
    "velocity": '"8 m/s"',
    "mass_flow": '"0.2 kg/s"',
    "second_order_rate_constant": '"1.2e-6 m^3/(mol s)"',
    "heating_rate": '"10 K/min"',
}

#: Smallest magnitude accepted other than 0 (design): far below any physical input, above the
#: subnormal doubles, whose products and quotients underflow to 0 or overflow.
SMALLEST_VALUE = 1e-250

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_QUANTITY_RE = re.compile(
    rf"^\s*(?P<value>{_NUMBER})\s*(?:(?:±|\+/-|\+-)\s*(?P<std>{_NUMBER}))?\s*(?P<unit>.*?)\s*$"
)
_OFFSET_UNITS = {"degc", "°c", "celsius", "degree_celsius", "degf", "°f", "fahrenheit",
                 "degree_fahrenheit", "degreec", "deg_c", "℃"}
_GAUGE_RE = re.compile(r"(barg|psig|kpag|mpag)\b", re.IGNORECASE)


def _shown(raw) -> str:
    """The value as received, shortened for a one-line message."""
    text = repr(raw)
    return text if len(text) <= 60 else text[:45] + "..." + text[-10:]


@dataclass(frozen=True)
class ParsedQuantity:
    """A value converted to SI, with its optional standard uncertainty (also SI)."""

    value: float
    std: float | None
    text: str
    si_unit: str


@lru_cache(maxsize=1)
def registry():
    """The project's single pint UnitRegistry (created on first use; pint is slow to import)."""
    import pint

    ureg = pint.UnitRegistry()
    return ureg


def _normalise_unit(unit: str) -> str:
    """Rewrite common spellings pint does not read: m2 -> m^2, °C -> degC, W/m2K."""
    text = unit.strip()
    text = text.replace("℃", "degC").replace("°C", "degC").replace("°F", "degF")
    text = text.replace("°", "deg").replace("·", "*").replace("×", "*").replace("²", "^2")
    text = text.replace("³", "^3").replace("−", "-")
    # A trailing digit after letters is a power ("m2" -> "m^2"); leave "1/s" and "e-3" alone.
    text = re.sub(r"(?<=[A-Za-z])(\d)", r"^\1", text)
    if text == "%":
        return "percent"
    return text


def _is_offset_temperature(unit: str) -> bool:
    return unit.strip().lower() in _OFFSET_UNITS


def parse_quantity(raw, kind: str, key: str, path: str | None = None) -> ParsedQuantity:
    """Parse a case-file quantity string into SI.

    Parameters
    ----------
    raw : str
        The value as written, e.g. ``"250 kJ/kg"`` or ``"100 ± 8 kJ/mol"``.
    kind : str
        One of :data:`DIMENSIONS`; ``"temperature"`` is absolute (degC, degF, K, degR accepted),
        ``"temperature_difference"`` accepts only K or delta units.
    key, path : str
        Key path and file, for the error message.

    Returns
    -------
    ParsedQuantity
        Value and standard uncertainty in the SI unit of ``kind``.

    Raises
    ------
    UnitError
        Not a string, decimal comma, no unit, unknown unit, wrong dimension, non-finite value,
        offset unit where a difference is expected.
    """
    expected_dim, si_unit = DIMENSIONS[kind]
    example = EXAMPLES[kind]
    if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
        raise UnitError(f"got {_shown(raw)}; expected a quoted value with unit, e.g. {example}", key, path)
    if isinstance(raw, (int, float)):
        raise UnitError(
            f"got the bare number {raw!r}; a dimensional value needs its unit as a quoted string, "
            f"e.g. {example}", key, path)
    text = raw.strip()
    if re.search(r"\d,\d", text):
        raise UnitError(f"got {_shown(raw)}; decimal commas are not accepted (pint would read '1,5' as 15): "
                        f"write a decimal point, e.g. {example}", key, path)
    if re.search(r"\b(nan|inf|infinity)\b", text, re.IGNORECASE):
        raise UnitError(f"got {_shown(raw)}; the value must be a finite number, e.g. {example}", key, path)
    match = _QUANTITY_RE.match(text)
    if not match:
        raise UnitError(f"got {_shown(raw)}; expected a number followed by a unit, e.g. {example}", key, path)
    value = float(match["value"])
    std = float(match["std"]) if match["std"] is not None else None
    unit_text = match["unit"]
    if not math.isfinite(value) or (std is not None and not math.isfinite(std)):
        raise UnitError(f"got {_shown(raw)}; the value must be a finite number", key, path)
    if std is not None and std < 0:
        raise UnitError(f"got {_shown(raw)}; an uncertainty after ± must be positive", key, path)
    if not unit_text:
        raise UnitError(f"got {_shown(raw)} without a unit; write e.g. {example}", key, path)
    gauge = _GAUGE_RE.fullmatch(unit_text.strip())
    if _GAUGE_RE.search(unit_text) and (kind != "pressure" or gauge is None):
        raise UnitError(f"got {_shown(raw)}; a gauge unit (barg, psig, kPag, MPag) is accepted alone "
                        f"and only for a pressure: write e.g. \"3.5 barg\" or the absolute "
                        f"\"4.5 bar\"", key, path)
    if gauge is not None:
        return _parse_gauge_pressure(raw, value, std, gauge.group(1), key, path)
    unit_text = _normalise_unit(unit_text)
    ureg = registry()
    try:
        unit = ureg.Unit(unit_text)
    except Exception:  # pint raises many types (UndefinedUnitError, AttributeError, TokenError...)
        raise UnitError(f"got {_shown(raw)}; the unit {match['unit']!r} is not known; write e.g. {example}",
                        key, path) from None
    try:
        dims_ok = unit.dimensionality == ureg.get_dimensionality(expected_dim)
    except Exception:
        dims_ok = False
    if not dims_ok:
        raise UnitError(f"got {_shown(raw)}, which is not a {kind.replace('_', ' ')}; write e.g. {example}",
                        key, path)
    offset = _is_offset_temperature(unit_text)
    try:
        if kind == "temperature_difference":
            if offset:
                raise UnitError(
                    f"got {_shown(raw)}; this is a temperature difference, and degC/degF are absolute "
                    f"temperatures here: write the difference in K, e.g. \"60 K\"", key, path)
            q_value = ureg.Quantity(value, unit).to(si_unit).magnitude
            q_std = None if std is None else ureg.Quantity(std, unit).to(si_unit).magnitude
        elif kind == "temperature":
            if "delta" in unit_text.lower():
                raise UnitError(f"got {_shown(raw)}; a temperature difference unit where an absolute "
                                f"temperature is expected: write e.g. \"85 degC\"", key, path)
            q_value = ureg.Quantity(value, unit).to("K").magnitude
            # An uncertainty is a difference: convert it by the scale of the unit only.
            if std is None:
                q_std = None
            else:
                scale = (ureg.Quantity(1.0, unit).to("K").magnitude
                         - ureg.Quantity(0.0, unit).to("K").magnitude)
                q_std = std * scale
        else:
            q_value = ureg.Quantity(value, unit).to(si_unit).magnitude
            q_std = None if std is None else ureg.Quantity(std, unit).to(si_unit).magnitude
    except UnitError:
        raise
    except Exception:
        raise UnitError(f"got {_shown(raw)}; cannot convert it to {si_unit}; write e.g. {example}",
                        key, path) from None
    q_value = float(q_value)
    if not math.isfinite(q_value):
        raise UnitError(f"got {_shown(raw)}; the value is not finite after conversion to {si_unit}", key, path)
    if 0.0 < abs(q_value) < SMALLEST_VALUE:
        raise UnitError(f"got {_shown(raw)} = {q_value:.3g} {si_unit}; a value this close to zero is a "
                        f"typing error (write 0 or check the exponent)", key, path)
    if q_std is not None and not math.isfinite(float(q_std)):
        raise UnitError(f"got {_shown(raw)}; the uncertainty is not finite after conversion to "
                        f"{si_unit}", key, path)
    if kind == "temperature" and q_value <= 0.0:
        raise UnitError(f"got {_shown(raw)} = {q_value:.6g} K; an absolute temperature must be above 0 K",
                        key, path)
    return ParsedQuantity(q_value, None if q_std is None else float(q_std), raw, si_unit)


def parse_dimensionless(raw, key: str, path: str | None = None) -> ParsedQuantity:
    """Parse a dimensionless value: a bare number, ``"0.35"``, ``"35 %"`` or ``"0.35 ± 0.05"``.

    Parameters
    ----------
    raw : str or float
        Value as read from the case file or an override.
    key : str
        Case-file key path, for the error message.
    path : str or None
        Case-file path, for the error message.

    Raises
    ------
    UnitError
        Booleans, non-numbers, non-finite values, or a string with a dimensional unit.
    """
    if isinstance(raw, bool):
        raise UnitError(f"got {_shown(raw)}; expected a number such as 0.35", key, path)
    if isinstance(raw, (int, float)):
        try:
            number = float(raw)
        except OverflowError:  # a TOML integer beyond the float range
            number = math.inf
        if not math.isfinite(number):
            raise UnitError(f"got {_shown(raw)}; the value must be a finite number", key, path)
        if 0.0 < abs(number) < SMALLEST_VALUE:
            raise UnitError(f"got {_shown(raw)}; a value this close to zero is a typing error (write 0 "
                            f"or check the exponent)", key, path)
        return ParsedQuantity(number, None, str(raw), "1")
    if not isinstance(raw, str):
        raise UnitError(f"got {_shown(raw)}; expected a number such as 0.35", key, path)
    text = raw.strip()
    if re.search(r"\d,\d", text):
        raise UnitError(f"got {_shown(raw)}; decimal commas are not accepted: write a decimal point",
                        key, path)
    if re.search(r"\b(nan|inf|infinity)\b", text, re.IGNORECASE):
        raise UnitError(f"got {_shown(raw)}; the value must be a finite number", key, path)
    match = _QUANTITY_RE.match(text)
    if not match:
        raise UnitError(f"got {_shown(raw)}; expected a number such as 0.35 or \"35 %\"", key, path)
    value = float(match["value"])
    std = float(match["std"]) if match["std"] is not None else None
    unit = match["unit"].strip()
    if unit in ("%", "percent"):
        value, std = value / 100.0, (None if std is None else std / 100.0)
    elif unit:
        raise UnitError(f"got {_shown(raw)}; this value is dimensionless: write a plain number or a "
                        f"percentage such as \"35 %\"", key, path)
    if not math.isfinite(value) or (std is not None and (not math.isfinite(std) or std < 0)):
        raise UnitError(f"got {_shown(raw)}; the value must be a finite number", key, path)
    if 0.0 < abs(value) < SMALLEST_VALUE:
        raise UnitError(f"got {_shown(raw)}; a value this close to zero is a typing error (write 0 or "
                        f"check the exponent)", key, path)
    return ParsedQuantity(value, std, raw, "1")


#: Gauge pressure units and their scale to Pa. A gauge pressure is converted to absolute by adding
#: the standard atmosphere, 101325 Pa (ISO 2533:1975, Standard Atmosphere, sea level), stated in
#: docs/case-format.md: at a site above sea level the real ambient pressure is lower, so the
#: absolute value is then slightly high (about 1 kPa per 100 m of altitude).
GAUGE_UNITS_PA = {"barg": 1e5, "psig": 6894.757293168361, "kpag": 1e3, "mpag": 1e6}


def _parse_gauge_pressure(raw, value, std, unit, key, path) -> ParsedQuantity:
    """A gauge pressure ("3.5 barg") as an absolute pressure [Pa]: value x scale + 101325 Pa."""
    from screen.constants import STANDARD_ATMOSPHERE

    scale = GAUGE_UNITS_PA[unit.lower()]
    absolute = value * scale + STANDARD_ATMOSPHERE
    if not absolute > 0.0:
        raise UnitError(f"got {_shown(raw)} = {absolute:.6g} Pa absolute (gauge + standard "
                        f"atmosphere 1.01325 bar); an absolute pressure must be above 0", key, path)
    return ParsedQuantity(float(absolute), None if std is None else float(std * scale), raw, "Pa")


def to_celsius(kelvin):
    """Kelvin to degC for presentation [K -> degC]; None for a missing or non-finite value.

    Parameters
    ----------
    kelvin : float or None
        Absolute temperature. [K]

    Returns
    -------
    float or None
        Temperature. [degC]
    """
    if kelvin is None or not math.isfinite(float(kelvin)):
        return None
    return float(kelvin) - ZERO_CELSIUS


def to_hours(seconds):
    """Seconds to hours for presentation [s -> h]; None stays None.

    Parameters
    ----------
    seconds : float or None
        Duration. [s]

    Returns
    -------
    float or None
        Duration. [h]
    """
    return None if seconds is None else float(seconds) / SECONDS_PER_HOUR


def from_si(value: float, si_unit: str, unit: str) -> float:
    """An SI value in another unit of the same dimension, for presentation (e.g. K -> degC).

    Parameters
    ----------
    value : float
        The value in ``si_unit``. [si_unit]
    si_unit : str
        Its SI unit (``"K"``, ``"kg"``, ``"W/(m^2*K)"``, ``"1"`` ...).
    unit : str
        The unit wanted, as a case file writes it (``"degC"``, ``"t"``, ``"W/(m2 K)"``); empty
        for a dimensionless value. Offset temperatures are converted as absolute temperatures.

    Returns
    -------
    float
        The value in ``unit``. [unit]
    """
    if not unit or unit == si_unit:
        return float(value)
    ureg = registry()
    return float(ureg.Quantity(float(value), _normalise_unit(si_unit)).to(
        _normalise_unit(unit)).magnitude)
