"""Pressure in a closed vessel from solvent vapour, pad gas and decomposition gas.

Model (all pressures absolute):

.. math:: p(T) = x\\,p_{sat}(T) + p_{pad,0}\\,\\frac{T}{T_0} + \\frac{n_{gas} R T}{V_{head}}

with :math:`p_{pad,0} = p_0 - x\\,p_{sat}(T_0)` the partial pressure of the inert pad gas when the
vessel was closed at :math:`T_0` and total pressure :math:`p_0`.

Assumptions (each is stated in ``docs/evaporation.md``):

- the vapour follows Raoult's law; by default the liquid is pure solvent (mole fraction 1), the
  conservative choice when the solvent is the most volatile component;
- pad gas and decomposition gas are ideal gases, not dissolved in the liquid (no solubility: more
  gas in the headspace, higher pressure: conservative);
- the headspace volume is constant (thermal expansion of the liquid, which shrinks the headspace,
  and the volume of gas-forming solids are neglected: not conservative for nearly full vessels);
- gas and liquid are at one temperature; no relief, no leak.
"""

from __future__ import annotations

from dataclasses import dataclass

from screen.constants import GAS_CONSTANT
from screen.errors import CaseError, ModelDomainError
from screen.models.domain import require_positive
from screen.models.solvents import Solvent, vapour_pressure

#: Default margin below the relief set pressure inside which the verdict is "near" (design).
RELIEF_MARGIN = 0.10




@dataclass(frozen=True)
class ClosedVesselPressure:
    """The parts of the closed-vessel pressure.

    Attributes
    ----------
    vapour : float
        Partial pressure of the solvent vapour. [Pa]
    pad_gas : float
        Partial pressure of the pad gas present at closing. [Pa]
    decomposition_gas : float
        Partial pressure of the non-condensable gas formed since. [Pa]
    total : float
        Sum of the three, absolute. [Pa]
    """

    vapour: float
    pad_gas: float
    decomposition_gas: float
    total: float


def ideal_gas_pressure(gas_moles: float, temperature: float, volume: float) -> float:
    """Pressure of an ideal gas.

    .. math:: p = n R T / V

    Parameters
    ----------
    gas_moles : float
        Amount of gas. [mol]
    temperature : float
        Temperature. [K]
    volume : float
        Gas volume. [m^3]

    Returns
    -------
    float
        Pressure. [Pa]

    Raises
    ------
    ModelDomainError
        Negative amount, non-positive temperature or volume.

    Examples
    --------
    One mole in the molar volume of an ideal gas at 273.15 K and 101.325 kPa, 22.413969 L
    (CODATA 2018 recommended value): 8.314462618 * 273.15 / 0.022413969 = 101325.0 Pa.

    >>> round(ideal_gas_pressure(1.0, 273.15, 0.022413969), 1)
    101325.0
    """
    gas_moles = require_positive(gas_moles, "gas amount", "mol", allow_zero=True)
    temperature = require_positive(temperature, "temperature", "K")
    volume = require_positive(volume, "headspace volume", "m^3")
    return gas_moles * GAS_CONSTANT * temperature / volume


def decomposition_gas_moles(mass: float, specific_gas_yield: float, conversion: float = 1.0) -> float:
    """Non-condensable gas formed by a decomposition.

    .. math:: n = m \\, y \\, X

    Parameters
    ----------
    mass : float
        Mass of the decomposing material (or of the reaction mass the yield refers to). [kg]
    specific_gas_yield : float
        Gas formed per kg at full conversion, as measured (e.g. in a closed-cell test). [mol/kg]
    conversion : float, optional
        Conversion of the decomposition, 0 to 1; 1 (complete) by default. [-]

    Returns
    -------
    float
        Amount of gas. [mol]

    Raises
    ------
    ModelDomainError
        Negative mass or yield, or a conversion outside 0 to 1.
    """
    mass = require_positive(mass, "mass", "kg", allow_zero=True)
    specific_gas_yield = require_positive(specific_gas_yield, "specific gas yield", "mol/kg", allow_zero=True)
    conversion = float(conversion)
    if not 0.0 <= conversion <= 1.0:
        raise ModelDomainError(f"conversion must lie between 0 and 1, got {conversion}")
    return mass * specific_gas_yield * conversion


def closed_vessel_pressure_components(
    temperature: float,
    solvent: Solvent,
    headspace_volume: float,
    gas_moles: float = 0.0,
    initial_pressure: float = 0.0,
    initial_temperature: float | None = None,
    liquid_mole_fraction: float = 1.0,
) -> ClosedVesselPressure:
    """Vapour, pad-gas and decomposition-gas pressure in a closed vessel.

    .. math:: p = x\\,p_{sat}(T) + (p_0 - x\\,p_{sat}(T_0))\\,T/T_0 + n R T / V_{head}

    Raoult's law for the vapour, ideal gas for the rest (see the module docstring for the
    assumptions).

    Parameters
    ----------
    temperature : float
        Temperature of the vessel contents. [K]
    solvent : Solvent
        The volatile solvent (from :func:`screen.models.solvents.lookup_solvent`). [object]
    headspace_volume : float
        Gas volume above the liquid, taken as constant. [m^3]
    gas_moles : float, optional
        Non-condensable gas formed since closing, e.g. from :func:`decomposition_gas_moles`. [mol]
    initial_pressure : float, optional
        Total absolute pressure when the vessel was closed (0: no pad gas, a conservative choice
        only if the vessel was really evacuated). [Pa]
    initial_temperature : float, optional
        Temperature when the vessel was closed; required when ``initial_pressure`` is given. [K]
    liquid_mole_fraction : float, optional
        Mole fraction of the solvent in the liquid; 1 (pure solvent) by default. [-]

    Returns
    -------
    ClosedVesselPressure
        The partial pressures and the total. [Pa]

    Raises
    ------
    CaseError
        ``initial_pressure`` given without ``initial_temperature``.
    ModelDomainError
        Non-physical input, a temperature outside the vapour-pressure correlation, or an initial
        pressure below the solvent's partial pressure at closing (the liquid would have boiled).
    """
    temperature = require_positive(temperature, "temperature", "K")
    headspace_volume = require_positive(headspace_volume, "headspace volume", "m^3")
    initial_pressure = require_positive(initial_pressure, "initial pressure", "Pa", allow_zero=True)
    liquid_mole_fraction = float(liquid_mole_fraction)
    if not 0.0 < liquid_mole_fraction <= 1.0:
        raise ModelDomainError(f"liquid mole fraction must lie in (0, 1], got {liquid_mole_fraction}")
    vapour = liquid_mole_fraction * vapour_pressure(solvent, temperature)
    pad_gas = 0.0
    if initial_pressure > 0.0:
        if initial_temperature is None:
            raise CaseError("the temperature at which the vessel was closed is required with an initial pressure")
        initial_temperature = require_positive(initial_temperature, "initial temperature", "K")
        pad_gas_at_closing = initial_pressure - liquid_mole_fraction * vapour_pressure(solvent, initial_temperature)
        if pad_gas_at_closing < 0.0:
            raise ModelDomainError(
                f"initial pressure {initial_pressure:.6g} Pa is below the vapour pressure of {solvent.name} at "
                f"{initial_temperature:.6g} K: the liquid would boil at closing"
            )
        pad_gas = pad_gas_at_closing * temperature / initial_temperature
    decomposition_gas = ideal_gas_pressure(gas_moles, temperature, headspace_volume)
    return ClosedVesselPressure(
        vapour=vapour,
        pad_gas=pad_gas,
        decomposition_gas=decomposition_gas,
        total=vapour + pad_gas + decomposition_gas,
    )


def closed_vessel_pressure(
    temperature: float,
    solvent: Solvent,
    headspace_volume: float,
    gas_moles: float = 0.0,
    initial_pressure: float = 0.0,
    initial_temperature: float | None = None,
    liquid_mole_fraction: float = 1.0,
) -> float:
    """Total absolute pressure in a closed vessel.

    The total of :func:`closed_vessel_pressure_components`; same parameters and equation:

    .. math:: p = x\\,p_{sat}(T) + (p_0 - x\\,p_{sat}(T_0))\\,T/T_0 + n R T / V_{head}

    Parameters
    ----------
    temperature : float
        Temperature of the vessel contents. [K]
    solvent : Solvent
        The volatile solvent. [object]
    headspace_volume : float
        Gas volume above the liquid, taken as constant. [m^3]
    gas_moles : float, optional
        Non-condensable gas formed since closing. [mol]
    initial_pressure : float, optional
        Total absolute pressure when the vessel was closed. [Pa]
    initial_temperature : float, optional
        Temperature when the vessel was closed. [K]
    liquid_mole_fraction : float, optional
        Mole fraction of the solvent in the liquid (Raoult). [-]

    Returns
    -------
    float
        Total absolute pressure. [Pa]
    """
    return closed_vessel_pressure_components(
        temperature,
        solvent,
        headspace_volume,
        gas_moles=gas_moles,
        initial_pressure=initial_pressure,
        initial_temperature=initial_temperature,
        liquid_mole_fraction=liquid_mole_fraction,
    ).total


def relief_verdict(pressure: float, relief_set_pressure: float, margin: float = RELIEF_MARGIN) -> tuple[str, str]:
    """Compare a closed-vessel pressure with the relief set pressure.

    ``"exceeds"`` when ``p >= p_set`` (a tie counts as reaching it), ``"near"`` when
    ``p >= (1 - margin) p_set``, ``"below"`` otherwise. The 10 % default margin is a design choice
    (no published basis): set pressures, gas yields and vapour pressures all carry uncertainty.

    Parameters
    ----------
    pressure : float
        Absolute pressure in the vessel. [Pa]
    relief_set_pressure : float
        Set pressure of the relief device, absolute (convert a gauge set pressure first). [Pa]
    margin : float, optional
        Fraction of the set pressure below it that still counts as "near". [-]

    Returns
    -------
    tuple of (str, str)
        ``("exceeds" | "near" | "below", reason)``. [text]

    Examples
    --------
    Set pressure 10 bar(a), default margin 10 %: "near" from 0.9 * 10 = 9 bar(a) on.

    >>> relief_verdict(9.0e5, 10.0e5)[0], relief_verdict(8.9e5, 10.0e5)[0]
    ('near', 'below')
    >>> relief_verdict(10.0e5, 10.0e5)[0]
    'exceeds'

    Raises
    ------
    ModelDomainError
        Non-positive or non-finite pressures, or a margin outside [0, 1).
    """
    pressure = require_positive(pressure, "pressure", "Pa")
    relief_set_pressure = require_positive(relief_set_pressure, "relief set pressure", "Pa")
    margin = float(margin)
    if not 0.0 <= margin < 1.0:
        raise ModelDomainError(f"margin must lie in [0, 1), got {margin}")
    ratio = pressure / relief_set_pressure
    text = f"{pressure / 1e5:.4g} bar(a) against a set pressure of {relief_set_pressure / 1e5:.4g} bar(a)"
    if ratio >= 1.0:
        return "exceeds", f"{text}: the relief device opens"
    if ratio >= 1.0 - margin:
        return "near", f"{text}: within {margin:.0%} of the set pressure (design margin)"
    return "below", f"{text}: below the set pressure by more than {margin:.0%}"


def pressure_limit_temperature(
    set_pressure: float,
    solvent: Solvent | None,
    closing_pressure: float,
    closing_temperature: float,
) -> tuple[float, str]:
    """Temperature at which a closed vessel reaches the relief set pressure (its MTT).

    Solves, for T at or above the closing temperature T_0,

    .. math:: p_{sat}(T) + (p_0 - p_{sat}(T_0))\\,T/T_0 = p_{set}

    the vapour and pad-gas terms of :func:`closed_vessel_pressure_components` (pure solvent,
    ideal pad gas, no decomposition gas: the gas of the runaway comes after the MTT). Without a
    solvent the pad gas alone: :math:`T = T_0\\, p_{set} / p_0` (ideal gas law at constant
    volume). The maximum technical temperature of a closed vessel is the temperature at which
    the pressure reaches the set pressure of the relief system (Stoessel 2008, Thermal Safety of
    Chemical Processes, ch. 3, from memory).

    Parameters
    ----------
    set_pressure : float
        Relief set pressure, absolute. [Pa]
    solvent : Solvent or None
        The volatile solvent (None: no vapour counted). [object]
    closing_pressure : float
        Absolute pressure when the vessel was closed (the operating pressure). [Pa]
    closing_temperature : float
        Temperature when it was closed (T_p). [K]

    Returns
    -------
    tuple of (float, str)
        ``(T, "reached")``, or ``(T_end, "beyond data")`` when the set pressure is not reached
        up to the end of the vapour-pressure correlation or the critical temperature (the MTT
        is then above T_end, not known). [K]

    Raises
    ------
    ModelDomainError
        Non-physical input, or a set pressure already reached at the closing temperature.
    """
    from scipy.optimize import brentq

    set_pressure = require_positive(set_pressure, "set pressure", "Pa")
    closing_pressure = require_positive(closing_pressure, "closing pressure", "Pa")
    t0 = require_positive(closing_temperature, "closing temperature", "K")
    if solvent is None:
        if set_pressure <= closing_pressure:
            raise ModelDomainError(
                f"set pressure {set_pressure / 1e5:.4g} bar(a) is not above the operating "
                f"pressure {closing_pressure / 1e5:.4g} bar(a)")
        return t0 * set_pressure / closing_pressure, "reached"
    low, high = solvent.minimum_temperature, solvent.maximum_temperature
    high = min(high, solvent.critical_temperature)
    if not low <= t0 <= high:
        raise ModelDomainError(
            f"closing temperature {t0:.6g} K is outside the vapour-pressure data of "
            f"{solvent.name} ({low:g} K to {high:g} K)")
    pad0 = max(closing_pressure - vapour_pressure(solvent, t0), 0.0)

    def excess(t):
        return vapour_pressure(solvent, t) + pad0 * t / t0 - set_pressure

    if excess(t0) >= 0.0:
        raise ModelDomainError(
            f"set pressure {set_pressure / 1e5:.4g} bar(a) is already reached at the process "
            f"temperature ({excess(t0) + set_pressure:.6g} Pa of vapour and pad gas)")
    if excess(high) < 0.0:
        return float(high), "beyond data"
    return float(brentq(excess, t0, high, xtol=1e-9, rtol=1e-14)), "reached"
