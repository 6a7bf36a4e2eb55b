"""Semenov heat balance of a well-mixed, cooled vessel.

Model (SI: K, W, kg, s, J/mol). A mass ``m`` releases heat at the specific rate

    q(T) = q_ref exp(-(E/R) (1/T - 1/T_ref))                                   [W/kg]

(zero order: the rate of the fresh mass, no consumption; the screening convention. It is
conservative for an nth-order reaction only when B = E dT_ad/(R T^2) is well above n, and NOT for
autocatalytic decompositions; see docs/heat-balance.md). The jacket removes
``U A (T - T_c)`` and, optionally, losses to ambient add ``L (T - T_amb)``. The contents are well
mixed (one temperature), U, A and c'p are constant.

Generation ``G(T) = m q(T)`` is convex and removal ``Q(T) = U A (T - T_c)`` a straight line. Below
a critical coolant temperature they cross twice: a lower, stable operating point and an upper,
unstable one, the temperature of no return. At the critical coolant temperature the line touches
the curve (tangency); above it no operating point exists and the contents run away.

References
----------
N. N. Semenov, "Zur Theorie des Verbrennungsprozesses", Z. Phys. 48 (1928) 571-582.
F. A. Williams, Combustion Theory, 2nd ed., Benjamin/Cummings 1985, appendix B (appendix
number from memory).
D. I. Townsend, "Hazard evaluation of self-accelerating reactions", IChemE Symp. Ser. 68 (1981)
(definition of the temperature of no return; from memory).
D. I. Townsend, J. C. Tou, "Thermal hazard evaluation by an accelerating rate calorimeter",
Thermochim. Acta 37 (1980) 1-30 (TMRad = c'p R T^2/(q E)).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from screen.constants import GAS_CONSTANT
from screen.errors import ModelDomainError
from screen.models.domain import require_non_negative, require_positive, scalar_or_array

__all__ = [
    "CriticalPoint",
    "OperatingPointStability",
    "CoolantSweep",
    "heat_generation",
    "heat_removal",
    "effective_cooling",
    "tangency_temperature_for_coolant",
    "critical_point",
    "linearised_critical_temperature_difference",
    "no_return_temperature",
    "stable_operating_temperature",
    "semenov_number",
    "cooling_time_constant",
    "cooling_capacity",
    "required_coolant_temperature",
    "operating_point_stability",
    "max_stable_coolant_temperature",
    "dosing_controlled_peak_rate",
    "shortest_coolable_dosing_time",
    "coolant_temperature_sweep",
]

# exp() overflows float64 just above 709.78; refuse exponents beyond this.
_MAX_EXPONENT = 700.0


class CriticalPoint(NamedTuple):
    """Tangency of heat generation and removal (the Semenov critical point)."""

    tangency_temperature: float
    """Temperature of the contents at tangency, T*. [K]"""
    critical_coolant_temperature: float
    """Highest coolant temperature with a stable operating point, T_c,crit = T* - R T*^2/E. [K]"""
    critical_temperature_difference: float
    """Critical rise of the contents above the coolant, T* - T_c,crit = R T*^2/E. [K]"""


class OperatingPointStability(NamedTuple):
    """Slope comparison at a synthesis operating point."""

    generation_slope: float
    """d(m q)/dT = m q E/(R T^2) at the process temperature. [W/K]"""
    removal_slope: float
    """d(U A (T - T_c))/dT = U A. [W/K]"""
    slope_ratio: float
    """generation_slope / removal_slope. [-]"""
    stable: bool
    """True only if slope_ratio < 1 (a tie counts as unstable)."""


class CoolantSweep(NamedTuple):
    """Heat-balance results over an array of coolant temperatures (NaN where a value does not exist)."""

    coolant_temperature: np.ndarray
    """Coolant temperatures evaluated. [K]"""
    semenov_number: np.ndarray
    """psi = (E/(R T_c^2)) m q(T_c)/(U A). [-]"""
    tangency_temperature: np.ndarray
    """Smaller root of E (T - T_c) = R T^2; NaN where E <= 4 R T_c. [K]"""
    stable_operating_temperature: np.ndarray
    """Lower (stable) intersection; NaN where none exists. [K]"""
    no_return_temperature: np.ndarray
    """Upper (unstable) intersection; NaN where none exists. [K]"""
    subcritical: np.ndarray
    """True where a stable operating point exists; False where not or undefined (fail closed)."""
    critical_coolant_temperature: float
    """Critical coolant temperature of this vessel and generation curve. [K]"""
    critical_tangency_temperature: float
    """Contents temperature at the critical point. [K]"""


# Input checks -----------------------------------------------------------------------------------








def _log_specific_rate(temperature, reference_rate, reference_temperature, activation_energy):
    """ln q(T) = ln q_ref - (E/R)(1/T - 1/T_ref), free of overflow."""
    return np.log(reference_rate) - activation_energy / GAS_CONSTANT * (1.0 / temperature - 1.0 / reference_temperature)


# Heat generation and removal --------------------------------------------------------------------


def heat_generation(temperature, mass, reference_rate, reference_temperature, activation_energy):
    """Heat released by the mass at a temperature (zero-order Arrhenius rate).

    Parameters
    ----------
    temperature : float or array_like
        Temperature of the contents. [K]
    mass : float or array_like
        Reaction mass. [kg]
    reference_rate : float
        Specific heat release rate at the reference temperature, q_ref. [W/kg]
    reference_temperature : float
        Temperature at which ``reference_rate`` holds, T_ref. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or numpy.ndarray
        ``G = m q_ref exp(-(E/R)(1/T - 1/T_ref))``. [W]

    Raises
    ------
    ModelDomainError
        For non-positive inputs or when the exponent would overflow.
    """
    t = require_positive(temperature, "temperature")
    m = require_positive(mass, "mass")
    q_ref = require_positive(reference_rate, "reference_rate")
    t_ref = require_positive(reference_temperature, "reference_temperature")
    e = require_positive(activation_energy, "activation_energy")
    exponent = -e / GAS_CONSTANT * (1.0 / t - 1.0 / t_ref)
    if np.any(exponent > _MAX_EXPONENT):
        raise ModelDomainError(
            f"Arrhenius exponent {np.max(exponent):.4g} overflows; temperature far above the reference "
            "temperature for this activation energy",
            key="temperature",
        )
    return scalar_or_array(m * q_ref * np.exp(exponent))


def heat_removal(temperature, ua, coolant_temperature, heat_losses=0.0, ambient_temperature=None):
    """Heat removed through the jacket plus losses to ambient.

    Parameters
    ----------
    temperature : float or array_like
        Temperature of the contents. [K]
    ua : float
        Overall heat-transfer coefficient times cooled area, U A. [W/K]
    coolant_temperature : float or array_like
        Coolant (jacket) temperature T_c. [K]
    heat_losses : float, optional
        Loss coefficient to ambient, L. [W/K]
    ambient_temperature : float, optional
        Ambient temperature T_amb; required when ``heat_losses`` > 0. [K]

    Returns
    -------
    float or numpy.ndarray
        ``Q = U A (T - T_c) + L (T - T_amb)``. [W] Negative when the jacket heats.
    """
    t = require_positive(temperature, "temperature")
    ua_ = require_positive(ua, "ua")
    t_c = require_positive(coolant_temperature, "coolant_temperature")
    losses = require_non_negative(heat_losses, "heat_losses")
    removed = ua_ * (t - t_c)
    if np.any(losses > 0.0):
        if ambient_temperature is None:
            raise ModelDomainError("heat_losses > 0 needs an ambient_temperature", key="ambient_temperature")
        removed = removed + losses * (t - require_positive(ambient_temperature, "ambient_temperature"))
    return scalar_or_array(removed)


def effective_cooling(ua, coolant_temperature, heat_losses, ambient_temperature):
    """Fold losses to ambient into one equivalent cooling line.

    Parameters
    ----------
    ua : float or array_like
        Jacket U A. [W/K]
    coolant_temperature : float or array_like
        Coolant temperature. [K]
    heat_losses : float or array_like
        Loss coefficient to ambient L. [W/K]
    ambient_temperature : float or array_like
        Ambient temperature. [K]

    Returns
    -------
    tuple of (float or numpy.ndarray, float or numpy.ndarray)
        ``(U A + L, (U A T_c + L T_amb)/(U A + L))`` [W/K, K]; derived from
        ``U A (T - T_c) + L (T - T_amb) = (U A + L)(T - T_eff)``. Pass them as ``ua`` and
        ``coolant_temperature`` to the functions of this module.
    """
    ua_ = require_positive(ua, "ua")
    t_c = require_positive(coolant_temperature, "coolant_temperature")
    losses = require_non_negative(heat_losses, "heat_losses")
    t_amb = require_positive(ambient_temperature, "ambient_temperature")
    total = ua_ + losses
    return scalar_or_array(total), scalar_or_array((ua_ * t_c + losses * t_amb) / total)


# Tangency and critical point --------------------------------------------------------------------


def tangency_temperature_for_coolant(coolant_temperature, activation_energy):
    """Contents temperature at which a cooling line from T_c can touch an Arrhenius curve.

    Parameters
    ----------
    coolant_temperature : float or array_like
        Coolant temperature T_c. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or numpy.ndarray
        Smaller root T* of ``E (T* - T_c) = R T*^2``:
        ``T* = (E - sqrt(E^2 - 4 E R T_c))/(2 R) = 2 T_c/(1 + sqrt(1 - 4 R T_c/E))``. [K]

    Raises
    ------
    ModelDomainError
        If ``E <= 4 R T_c``: the roots are complex or coincide and there is no sharp ignition.

    Notes
    -----
    Derivation. Tangency needs equal values and equal slopes:
    ``m q(T*) = U A (T* - T_c)`` and ``m q(T*) E/(R T*^2) = U A`` (since
    ``dq/dT = q E/(R T^2)``). Dividing the first by the second gives ``T* - T_c = R T*^2/E``,
    independent of m, U A and q_ref. The quadratic ``R T^2 - E T + E T_c = 0`` has real roots only
    for ``E >= 4 R T_c``; the smaller root is the ignition tangency (the larger one lies near
    E/R, far above any physical temperature, where the Arrhenius curve flattens). The second form
    avoids cancellation for large E/(R T_c).

    Examples
    --------
    T_c = 350 K, E = 100 kJ/mol, by hand: E/R = 12027.236 K, 4 R T_c/E = 1400/12027.236 =
    0.1164025, sqrt(1 - 0.1164025) = 0.9399987, T* = (E/(2 R)) (1 - 0.9399987) = 6013.618 *
    0.0600013 = 360.825 K. Check: R T*^2/E = 8.314462618 * 360.825^2 / 1e5 = 10.825 K = T* - T_c.

    >>> round(tangency_temperature_for_coolant(350.0, 100e3), 3)
    360.825
    """
    t_c = require_positive(coolant_temperature, "coolant_temperature")
    e = require_positive(activation_energy, "activation_energy")
    four_epsilon = 4.0 * GAS_CONSTANT * t_c / e
    if np.any(four_epsilon >= 1.0):
        raise ModelDomainError(
            "activation energy <= 4 R T_c: the heat balance has no sharp ignition (no tangency); "
            "accepted: E > 4 R T_c",
            key="activation_energy",
        )
    return scalar_or_array(2.0 * t_c / (1.0 + np.sqrt(1.0 - four_epsilon)))


def linearised_critical_temperature_difference(temperature, activation_energy):
    """Classical (linearised) critical temperature rise of a Semenov system.

    Parameters
    ----------
    temperature : float or array_like
        Temperature at which the Arrhenius exponent is linearised; the classical estimate uses
        the coolant temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or numpy.ndarray
        ``dT_crit = R T^2/E``. [K]

    Notes
    -----
    Semenov (1928); Williams (1985) app. B. Evaluated at T_c it underestimates the exact rise
    ``R T*^2/E`` because T* > T_c: with eps = R T_c/E, exact/linearised = 1 + 2 eps + O(eps^2)
    (derived from the series T*/T_c = 1 + eps + 2 eps^2 + ...).

    Examples
    --------
    T = 350 K, E = 100 kJ/mol: 8.314462618 * 350^2 / 1e5 = 8.314462618 * 1.225 = 10.185 K
    (against the exact 10.825 K of :func:`tangency_temperature_for_coolant`; 1 + 2 eps =
    1 + 2 * 0.0291 = 1.058 predicts 10.78 K).

    >>> round(linearised_critical_temperature_difference(350.0, 100e3), 3)
    10.185
    """
    t = require_positive(temperature, "temperature")
    e = require_positive(activation_energy, "activation_energy")
    return scalar_or_array(GAS_CONSTANT * t**2 / e)


def critical_point(mass, ua, reference_rate, reference_temperature, activation_energy) -> CriticalPoint:
    """Exact Semenov critical point of a vessel (tangency of generation and removal).

    Parameters
    ----------
    mass : float
        Reaction mass. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    reference_rate : float
        Specific heat release rate at the reference temperature. [W/kg]
    reference_temperature : float
        Reference temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    CriticalPoint
        ``(T*, T_c,crit, R T*^2/E)`` in [K, K, K].

    Raises
    ------
    ModelDomainError
        If no tangency exists below E/(2 R) (no sharp ignition) or the mass self-heats faster than
        it can be cooled at any positive temperature the solver can bracket.

    Notes
    -----
    With the slope condition of :func:`tangency_temperature_for_coolant`, the tangency solves
    ``m q(T*) = U A R T*^2/E``, i.e. the root of
    ``g(T) = ln q(T) - 2 ln T - ln(U A R/(m E))``, which is strictly increasing for
    ``T < E/(2 R)`` (``g' = (E - 2 R T)/(R T^2)``). Then ``T_c,crit = T* - R T*^2/E`` (derived;
    Semenov 1928, Williams 1985 app. B for the construction).
    """
    from scipy.optimize import brentq

    m = float(require_positive(mass, "mass"))
    ua_ = float(require_positive(ua, "ua"))
    q_ref = float(require_positive(reference_rate, "reference_rate"))
    t_ref = float(require_positive(reference_temperature, "reference_temperature"))
    e = float(require_positive(activation_energy, "activation_energy"))
    target = math.log(ua_ * GAS_CONSTANT / (m * e))

    def g(t: float) -> float:
        return float(_log_specific_rate(t, q_ref, t_ref, e)) - 2.0 * math.log(t) - target

    upper = e / (2.0 * GAS_CONSTANT)
    lower = upper * 1e-3
    g_low, g_high = g(lower), g(upper)
    if not g_high > 0.0:
        raise ModelDomainError(
            "heat generation never reaches the tangency condition below E/(2R): no sharp ignition "
            "for this cooling (activation energy too low for the temperature range)",
            key="activation_energy",
        )
    if not g_low < 0.0:
        raise ModelDomainError(
            f"heat generation exceeds the cooling slope even at {lower:.4g} K: the vessel is "
            "supercritical at any realistic coolant temperature",
            key="reference_rate",
        )
    t_star = brentq(g, lower, upper, xtol=1e-12, rtol=4.0 * np.finfo(float).eps, maxiter=200)
    difference = GAS_CONSTANT * t_star**2 / e
    return CriticalPoint(t_star, t_star - difference, difference)


# Intersections ----------------------------------------------------------------------------------


def _tangency_roots(coolant_temperature: float, activation_energy: float) -> tuple[float, float]:
    low = float(tangency_temperature_for_coolant(coolant_temperature, activation_energy))
    return low, activation_energy / GAS_CONSTANT - low  # the roots sum to E/R


def _intersections(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy):
    """(stable, no-return) intersections for one coolant temperature; (None, None) if supercritical."""
    from scipy.optimize import brentq

    m = float(require_positive(mass, "mass"))
    ua_ = float(require_positive(ua, "ua"))
    t_c = float(require_positive(coolant_temperature, "coolant_temperature"))
    q_ref = float(require_positive(reference_rate, "reference_rate"))
    t_ref = float(require_positive(reference_temperature, "reference_temperature"))
    e = float(require_positive(activation_energy, "activation_energy"))
    t_low, t_high = _tangency_roots(t_c, e)
    log_m = math.log(m)

    def log_balance(t: float) -> float:
        # ln(generation) - ln(removal); defined for T > T_c, minimal at t_low.
        return log_m + float(_log_specific_rate(t, q_ref, t_ref, e)) - math.log(ua_ * (t - t_c))

    at_minimum = log_balance(t_low)
    if at_minimum >= 0.0:
        return None, None  # coolant at or above its critical temperature: no operating point
    if not log_balance(t_high) > 0.0:
        raise ModelDomainError(
            "the Arrhenius generation never overtakes the cooling line above the stable point; "
            "no temperature of no return exists in the model's domain",
            key="reference_rate",
        )
    tol = dict(xtol=1e-12, rtol=4.0 * np.finfo(float).eps, maxiter=200)
    no_return = brentq(log_balance, t_low, t_high, **tol)

    def balance(t: float) -> float:
        return m * math.exp(float(_log_specific_rate(t, q_ref, t_ref, e))) - ua_ * (t - t_c)

    at_coolant = balance(t_c)
    if at_coolant <= 0.0:  # generation underflows at T_c: the stable point is T_c itself
        stable = t_c
    else:
        stable = brentq(balance, t_c, t_low, **tol)
    return stable, no_return


def no_return_temperature(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy):
    """Temperature of no return: the upper, unstable intersection of generation and removal.

    Parameters
    ----------
    mass : float
        Reaction mass. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    coolant_temperature : float
        Coolant temperature T_c. [K]
    reference_rate : float
        Specific heat release rate at the reference temperature. [W/kg]
    reference_temperature : float
        Reference temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or None
        T_NR [K], the root of ``m q(T) = U A (T - T_c)`` between the two tangency roots of
        ``E (T - T_c) = R T^2``. None means the coolant is at or above its critical temperature:
        there is no operating point at all and the contents run away from any temperature; a
        caller must treat None as the most critical outcome, never as "no hazard".

    Raises
    ------
    ModelDomainError
        If E <= 4 R T_c (no sharp ignition) or inputs are out of range.

    Notes
    -----
    Definition: the temperature at which, for the available cooling, heat generation equals
    removal and beyond which control cannot be regained (Townsend, IChemE Symp. Ser. 68 (1981),
    from memory). Solved on ``ln G - ln Q``, which falls to its minimum at the lower tangency root
    and rises up to the upper one, so the bracket is exact and checked.
    """
    return _intersections(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy)[1]


def stable_operating_temperature(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy):
    """Lower, stable intersection of generation and removal.

    Parameters
    ----------
    mass : float
        Reaction mass. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    coolant_temperature : float
        Coolant temperature T_c. [K]
    reference_rate : float
        Specific heat release rate at the reference temperature. [W/kg]
    reference_temperature : float
        Reference temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or None
        Steady temperature [K] of the cooled contents, the root of ``m q(T) = U A (T - T_c)``
        between T_c and the lower tangency root. None: no stable operating point exists (the
        coolant is at or above its critical temperature); treat as runaway.
    """
    return _intersections(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy)[0]


def semenov_number(mass, ua, coolant_temperature, reference_rate, reference_temperature, activation_energy):
    """Semenov number of a cooled vessel.

    Parameters
    ----------
    mass : float
        Reaction mass. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    coolant_temperature : float or array_like
        Coolant temperature T_c. [K]
    reference_rate : float
        Specific heat release rate at the reference temperature. [W/kg]
    reference_temperature : float
        Reference temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    float or numpy.ndarray
        ``psi = (E/(R T_c^2)) m q(T_c)/(U A)``. [-] Critical value 1/e in the linearised
        (large E/(R T_c)) theory (Semenov, Z. Phys. 48 (1928) 571; Williams, Combustion Theory,
        2nd ed. 1985, app. B). With the exact tangency the critical value is
        ``x^2 exp(-x)``, ``x = T*/T_c``, i.e. 1/e (1 + R T_c/E + ...) (derived).
    """
    t_c = require_positive(coolant_temperature, "coolant_temperature")
    e = require_positive(activation_energy, "activation_energy")
    generation = np.asarray(heat_generation(t_c, mass, reference_rate, reference_temperature, e))
    return scalar_or_array(e / (GAS_CONSTANT * t_c**2) * generation / require_positive(ua, "ua"))


def cooling_time_constant(mass, specific_heat, ua):
    """Thermal time constant of the cooled vessel.

    Parameters
    ----------
    mass : float or array_like
        Reaction mass. [kg]
    specific_heat : float or array_like
        Specific heat capacity c'p of the contents. [J/(kg K)]
    ua : float or array_like
        Overall heat-transfer coefficient times cooled area. [W/K]

    Returns
    -------
    float or numpy.ndarray
        ``tau = m c'p/(U A)``. [s] At the exact tangency temperature it equals the Townsend-Tou
        TMRad, ``c'p R T*^2/(q(T*) E)`` (derived from the tangency condition).

    Examples
    --------
    5000 kg at 2000 J/(kg K) with U A = 2000 W/K: 5000 * 2000 / 2000 = 5000 s.

    >>> cooling_time_constant(5000.0, 2000.0, 2000.0)
    5000.0
    """
    return scalar_or_array(require_positive(mass, "mass") * require_positive(specific_heat, "specific_heat") / require_positive(ua, "ua"))


# Synthesis (normal operation) checks ------------------------------------------------------------


def cooling_capacity(ua, process_temperature, coolant_temperature):
    """Heat the jacket removes at the process temperature.

    Parameters
    ----------
    ua : float or array_like
        Overall heat-transfer coefficient times cooled area. [W/K]
    process_temperature : float or array_like
        Temperature of the contents T_p. [K]
    coolant_temperature : float or array_like
        Coolant temperature T_c. [K]

    Returns
    -------
    float or numpy.ndarray
        ``Q_cool = U A (T_p - T_c)``. [W] Zero or negative when the coolant is not colder.
    """
    return scalar_or_array(require_positive(ua, "ua") * (require_positive(process_temperature, "process_temperature") - require_positive(coolant_temperature, "coolant_temperature")))


def required_coolant_temperature(mass, ua, process_temperature, peak_heat_release_rate):
    """Coolant temperature that holds the process temperature at the peak heat release.

    Parameters
    ----------
    mass : float
        Reaction mass at the peak. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    process_temperature : float
        Process temperature T_p. [K]
    peak_heat_release_rate : float
        Specific heat release rate at the peak, q_p. [W/kg]

    Returns
    -------
    float
        ``T_c = T_p - m q_p/(U A)`` (heat balance at steady state). [K]

    Raises
    ------
    ModelDomainError
        If the result is not above 0 K (the cooling is far too small for the release).
    """
    m = float(require_positive(mass, "mass"))
    ua_ = float(require_positive(ua, "ua"))
    t_p = float(require_positive(process_temperature, "process_temperature"))
    q_p = float(require_positive(peak_heat_release_rate, "peak_heat_release_rate"))
    t_c = t_p - m * q_p / ua_
    if t_c <= 0.0:
        raise ModelDomainError(
            f"holding {t_p:.2f} K would need a coolant at {t_c:.4g} K: cooling is insufficient",
            key="peak_heat_release_rate",
        )
    return t_c


def operating_point_stability(mass, ua, process_temperature, peak_heat_release_rate, activation_energy) -> OperatingPointStability:
    """Semenov slope criterion at a synthesis operating point.

    Parameters
    ----------
    mass : float
        Reaction mass at the peak. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    process_temperature : float
        Process temperature T_p. [K]
    peak_heat_release_rate : float
        Specific heat release rate of the synthesis at the peak, q_p. [W/kg]
    activation_energy : float
        Activation energy of the synthesis E. [J/mol]

    Returns
    -------
    OperatingPointStability
        ``dG/dT = m q_p E/(R T_p^2)`` [W/K] against ``dQ/dT = U A`` [W/K]; stable only if
        ``dG/dT < U A`` (Semenov 1928; Williams 1985 app. B: an intersection is stable where the
        removal line is steeper than the generation curve).
    """
    m = float(require_positive(mass, "mass"))
    ua_ = float(require_positive(ua, "ua"))
    t_p = float(require_positive(process_temperature, "process_temperature"))
    q_p = float(require_positive(peak_heat_release_rate, "peak_heat_release_rate"))
    e = float(require_positive(activation_energy, "activation_energy"))
    slope = m * q_p * e / (GAS_CONSTANT * t_p**2)
    ratio = slope / ua_
    return OperatingPointStability(slope, ua_, ratio, bool(ratio < 1.0))


def max_stable_coolant_temperature(mass, ua, process_temperature, peak_heat_release_rate, activation_energy):
    """Highest coolant temperature at which the synthesis still has a stable operating point.

    Parameters
    ----------
    mass : float
        Reaction mass at the peak. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    process_temperature : float
        Process temperature T_p at which the peak rate holds. [K]
    peak_heat_release_rate : float
        Specific heat release rate at the peak, q_p. [W/kg]
    activation_energy : float
        Activation energy of the synthesis E. [J/mol]

    Returns
    -------
    float
        Critical coolant temperature [K] of the generation curve
        ``q(T) = q_p exp(-(E/R)(1/T - 1/T_p))``, i.e.
        ``critical_point(m, U A, q_p, T_p, E).critical_coolant_temperature``.

    Notes
    -----
    Assumes the synthesis rate follows Arrhenius around the peak with its rate frozen at the
    peak value (no consumption): conservative for the synthesis, a design convention of this
    tool. If the operating point at T_p passes the slope criterion
    (:func:`operating_point_stability`), the coolant temperature that holds T_p
    (:func:`required_coolant_temperature`) lies below this value (derived). The converse does not
    hold: with the holding coolant below this value, T_p can still be the upper, unstable crossing,
    so the slope criterion must be checked as well.
    """
    return critical_point(mass, ua, peak_heat_release_rate, process_temperature, activation_energy).critical_coolant_temperature


def dosing_controlled_peak_rate(adiabatic_rise, specific_heat, final_mass, dosing_time):
    """Heat release rate of a dosing-controlled semi-batch reaction.

    Parameters
    ----------
    adiabatic_rise : float
        Adiabatic temperature rise of the reaction referred to the final mass, dT_ad. [K]
    specific_heat : float
        Specific heat capacity of the final mass c'p. [J/(kg K)]
    final_mass : float
        Reaction mass at the end of dosing. [kg]
    dosing_time : float
        Dosing time t_dose. [s]

    Returns
    -------
    float
        ``q_dose = m_final c'p dT_ad / t_dose``. [W]

    Notes
    -----
    Derived estimate: in the dosing-controlled limit the feed reacts as it enters, so the total
    heat ``m_final c'p dT_ad`` is released evenly over the dosing time. A slower reaction
    accumulates and releases less during dosing but more afterwards; this rate is then not an
    upper bound of the instantaneous release.
    """
    return float(
        require_positive(final_mass, "final_mass")
        * require_positive(specific_heat, "specific_heat")
        * require_positive(adiabatic_rise, "adiabatic_rise")
        / require_positive(dosing_time, "dosing_time")
    )


def shortest_coolable_dosing_time(total_heat, cooling_capacity):
    """Shortest dosing time whose (dosing-controlled) heat release the jacket can remove.

    Parameters
    ----------
    total_heat : float
        Heat released by the whole dosed reaction, ``m_final c'p dT_ad``. [J]
    cooling_capacity : float
        Cooling capacity at the process temperature, ``U A (T_p - T_c)``. [W]

    Returns
    -------
    float
        ``t_dose,min = Q_total / Q_cool``. [s] (derived from :func:`dosing_controlled_peak_rate`)

    Raises
    ------
    ModelDomainError
        If the cooling capacity is not positive (no dosing time is coolable).
    """
    return float(require_positive(total_heat, "total_heat") / require_positive(cooling_capacity, "cooling_capacity"))


# Sweeps -----------------------------------------------------------------------------------------


def coolant_temperature_sweep(mass, ua, coolant_temperatures, reference_rate, reference_temperature, activation_energy) -> CoolantSweep:
    """Evaluate the heat balance of one vessel over an array of coolant temperatures.

    Parameters
    ----------
    mass : float
        Reaction mass. [kg]
    ua : float
        Overall heat-transfer coefficient times cooled area. [W/K]
    coolant_temperatures : array_like
        Coolant temperatures to evaluate. [K]
    reference_rate : float
        Specific heat release rate at the reference temperature. [W/kg]
    reference_temperature : float
        Reference temperature. [K]
    activation_energy : float
        Activation energy E. [J/mol]

    Returns
    -------
    CoolantSweep
        Arrays over the coolant temperatures (see :class:`CoolantSweep`). This array API marks a
        value that does not exist with NaN (no stable point, no T_NR, no tangency) and sets
        ``subcritical`` False there; the scalar functions raise or return None instead. [object]
    """
    t_c = np.atleast_1d(require_positive(coolant_temperatures, "coolant_temperatures")).astype(float)
    critical = critical_point(mass, ua, reference_rate, reference_temperature, activation_energy)
    e = float(activation_energy)
    psi = np.atleast_1d(semenov_number(mass, ua, t_c, reference_rate, reference_temperature, e))
    has_tangency = 4.0 * GAS_CONSTANT * t_c < e
    tangency = np.full_like(t_c, np.nan)
    tangency[has_tangency] = np.atleast_1d(tangency_temperature_for_coolant(t_c[has_tangency], e))
    stable = np.full_like(t_c, np.nan)
    no_return = np.full_like(t_c, np.nan)
    for index in np.flatnonzero(has_tangency):
        low, high = _intersections(mass, ua, t_c[index], reference_rate, reference_temperature, e)
        if low is not None:
            stable[index], no_return[index] = low, high
    return CoolantSweep(
        coolant_temperature=t_c,
        semenov_number=psi,
        tangency_temperature=tangency,
        stable_operating_temperature=stable,
        no_return_temperature=no_return,
        subcritical=np.isfinite(stable),
        critical_coolant_temperature=critical.critical_coolant_temperature,
        critical_tangency_temperature=critical.tangency_temperature,
    )
