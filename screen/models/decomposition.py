"""Adiabatic decomposition of a reaction mass: heat release rate, TMRad, TD24 and TD8.

Kinetic model (SI: K, s, J/kg, J/mol)
-------------------------------------
The decomposition is one reaction with conversion ``a`` (0 = fresh, 1 = fully decomposed):

    da/dt = A exp(-E/(R T)) f(a)

    f(a) = 1                       zero-order
    f(a) = (1 - a)^n               nth-order
    f(a) = a^m (1 - a)^n           autocatalytic (extended Prout-Tompkins)

The mass as fed is at conversion ``a0`` (``initial_conversion``: 0 for zero order, usually 0
for nth order, > 0 for autocatalytic, which cannot start from a = 0) and ``energy`` Q is the
heat it still releases from a0 to 1. Hence

    q = Q/(1 - a0) da/dt                                   specific heat release rate [W/kg]
    dT_ad = Q/c'p                                          adiabatic rise [K]
    T = T0 + dT_ad (a - a0)/(1 - a0)                       adiabatic course, phi = 1

Zero order keeps the screening convention q(T) = Q A exp(-E/(R T)): the rate of the fresh mass,
no consumption (``order`` is ignored for it, ``initial_conversion`` must be 0).

All exponentials are formed in log space (ln A is carried next to A), so E/(R T) up to a few
thousand neither overflows nor silently underflows on the way; only a final result beyond the
float range (a time above ~1.8e308 s, a rate below ~1e-308 W/kg) saturates, as documented per
function. Every function broadcasts its array arguments (numpy rules) so that a Monte Carlo can
pass 100,000 samples at once.

References
----------
D. I. Townsend, J. C. Tou, "Thermal hazard evaluation by an accelerating rate calorimeter",
Thermochim. Acta 37 (1980) 1-30 (TMRad = c'p R T0^2/(q(T0) E)).
E. G. Prout, F. C. Tompkins, "The thermal decomposition of potassium permanganate",
Trans. Faraday Soc. 40 (1944) 488-498 (f = a(1 - a)).
J. Sestak, G. Berggren, "Study of the kinetics of the mechanism of solid-state reactions at
increasing temperatures", Thermochim. Acta 3 (1971) 1-12 (f = a^m (1 - a)^n).
N. N. Semenov, Z. Phys. 48 (1928) 571 (the B number of thermal explosion theory).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import ModelDomainError, SolverError
from screen.models.domain import require_fraction, require_positive, scalar_or_array

__all__ = [
    "MODELS",
    "DecompositionKinetics",
    "validate_kinetics",
    "log_townsend_tou_tmrad",
    "townsend_tou_tmrad",
    "semenov_b_number",
    "log_tmrad",
    "tmrad",
    "tmrad_townsend_tou_for",
    "temperature_for_tmrad",
    "td24",
    "td8",
    "zero_order_is_conservative",
    "adiabatic_course",
]

#: Kinetic models understood by this module.
MODELS = ("zero-order", "nth-order", "autocatalytic")

#: Default search range of temperature_for_tmrad. [K]
DEFAULT_LOWER_TEMPERATURE = 150.0
DEFAULT_UPPER_TEMPERATURE = 1500.0

# Quadrature of the adiabatic time integral: Gauss-Legendre nodes per panel and the widest panel
# in the logit variable w (see tmrad). Chosen from scans of random cases (B 1-2000, n 0-5,
# m 0-3, a0 1e-12-0.9) against 30-digit mpmath quadrature: worst error 2e-14 relative.
_GAUSS_NODES = 12
_MAX_PANEL_WIDTH = 1.75
# The range where the integrand exp(-(g(T) - g(T0))) is below e^-60 is dropped: it is at most
# e^-60 (T_m - T0)/s / (1 - 1/e) of the integral, with s the scale of the start (see
# tmrad) and (T_m - T0)/s < B + (m + 1)/a0 (< 1e-17 relative even for a0 = 1e-8).
_NEGLIGIBLE_LOG_RATIO = 60.0
# Nodes x samples per block of the quadrature: small enough for the temporaries to stay in cache.
_BLOCK_ELEMENTS = 24_000
# Root finding for the temperature of maximum rate: bisection steps, then Newton steps.
_MAX_RATE_BISECTIONS = 10
_MAX_RATE_NEWTON_STEPS = 6
# temperature_for_tmrad: convergence on ln(TMRad) and the iteration cap.
_LOG_TIME_TOLERANCE = 1e-12
_MAX_ROOT_ITERATIONS = 200
_CONVERGED, _NOT_CONVERGED, _NO_ROOT, _FAILED = 0, 1, 2, 3


# ----------------------------------------------------------------------------------------------
# Kinetics object and validation
# ----------------------------------------------------------------------------------------------

def _as_number(value, name):
    """Float for a scalar, read-only float64 array otherwise."""
    try:
        array = np.array(value, dtype=float)
    except (TypeError, ValueError):
        raise ModelDomainError(f"{name} must be a number or an array of numbers, got {value!r}",
                               f"decomposition.{name}") from None
    if array.ndim == 0:
        return float(array)
    array.setflags(write=False)
    return array


@dataclass(frozen=True)
class DecompositionKinetics:
    """Kinetics of a decomposition (see the module docstring for the model).

    Every numeric field may be a float or a numpy array (samples of a Monte Carlo); arrays
    broadcast against each other and against the arguments of the functions of this module.
    The object is validated on construction (:func:`validate_kinetics`).

    Parameters
    ----------
    model : str
        One of :data:`MODELS`.
    energy : float or array
        Heat the mass as fed still releases when it decomposes completely, Q. [J/kg]
    activation_energy : float or array
        Activation energy E. [J/mol]
    pre_exponential_factor : float or array
        Pre-exponential factor A of da/dt. [1/s] May be ``inf`` when ``exp(ln A)`` exceeds the
        float range and ``log_pre_exponential_factor`` is given; the calculations use ln A.
    order : float or array
        Reaction order n in (1 - a)^n. [-] Ignored for zero-order.
    autocatalytic_order : float or array
        Exponent m in a^m (autocatalytic only; must be 0 otherwise). [-]
    initial_conversion : float or array
        Conversion a0 of the mass as fed. [-] 0 for zero-order, in [0, 1) for nth-order, in
        (0, 1) for autocatalytic.
    log_pre_exponential_factor : float or array, optional
        ln(A / (1/s)). [-] Computed from A when omitted; must agree with A when both are given.
    """

    model: str
    energy: float
    activation_energy: float
    pre_exponential_factor: float
    order: float = 1.0
    autocatalytic_order: float = 0.0
    initial_conversion: float = 0.0
    log_pre_exponential_factor: float | None = None

    def __post_init__(self):
        for name in ("energy", "activation_energy", "pre_exponential_factor", "order",
                     "autocatalytic_order", "initial_conversion"):
            object.__setattr__(self, name, _as_number(getattr(self, name), name))
        factor = np.asarray(self.pre_exponential_factor)
        if self.log_pre_exponential_factor is None:
            if np.any(~(factor > 0.0)) or np.any(~np.isfinite(factor)):
                raise ModelDomainError(
                    f"pre_exponential_factor must be finite and > 0 1/s, got "
                    f"{_first_bad(factor, ~((factor > 0.0) & np.isfinite(factor)))}",
                    "decomposition.pre_exponential_factor")
            object.__setattr__(self, "log_pre_exponential_factor",
                               _as_number(np.log(factor), "log_pre_exponential_factor"))
        else:
            log_factor = _as_number(self.log_pre_exponential_factor, "log_pre_exponential_factor")
            object.__setattr__(self, "log_pre_exponential_factor", log_factor)
            log_factor = np.asarray(log_factor)
            if np.any(~np.isfinite(log_factor)):
                raise ModelDomainError(
                    f"log_pre_exponential_factor must be finite, got "
                    f"{_first_bad(log_factor, ~np.isfinite(log_factor))}",
                    "decomposition.log_pre_exponential_factor")
            factor_b, log_b = np.broadcast_arrays(factor, log_factor)
            comparable = np.isfinite(factor_b) & (factor_b > 0.0)
            with np.errstate(divide="ignore", invalid="ignore"):
                mismatch = comparable & ~np.isclose(np.log(np.where(comparable, factor_b, 1.0)),
                                                    log_b, rtol=1e-12, atol=1e-12)
            # inf is accepted only as the overflow of exp(ln A) for ln A above the float range.
            bad_overflow = np.isinf(factor_b) & (log_b < 709.0)
            if np.any(mismatch | bad_overflow | ~(factor_b > 0.0)):
                raise ModelDomainError(
                    "pre_exponential_factor and log_pre_exponential_factor disagree (pass "
                    "log_pre_exponential_factor=None to recompute it from the factor)",
                    "decomposition.pre_exponential_factor")
        validate_kinetics(self)

    @classmethod
    def from_reference_rate(cls, model, energy, activation_energy, reference_rate,
                            reference_temperature, order=1.0, autocatalytic_order=0.0,
                            initial_conversion=0.0):
        """Kinetics from the heat release rate of the fresh mass at one temperature.

        Solves q(T_ref, a0) = q_ref for A in log space:
        ln A = ln q_ref - ln(Q/(1 - a0)) + E/(R T_ref) - ln f(a0).

        Parameters
        ----------
        model : str
            One of :data:`MODELS`. [text]
        energy : float or array
            Heat released from a0 to complete decomposition, Q. [J/kg]
        activation_energy : float or array
            Activation energy E. [J/mol]
        reference_rate : float or array
            Heat release rate of the mass as fed (at a0) at the reference temperature. [W/kg]
        reference_temperature : float or array
            Temperature at which ``reference_rate`` applies. [K]
        order : float or array
            Reaction order n. [-]
        autocatalytic_order : float or array
            Exponent m (autocatalytic only). [-]
        initial_conversion : float or array
            Conversion a0 of the mass as fed. [-]

        Returns
        -------
        DecompositionKinetics
            The kinetics (SI fields). [object]

        Raises
        ------
        ModelDomainError
            Non-positive or non-finite reference rate or temperature, or invalid kinetics.

        Examples
        --------
        >>> k = DecompositionKinetics.from_reference_rate("zero-order", 500e3, 100e3, 0.1, 400.0)
        >>> round(float(k.heat_release_rate(400.0)), 12)
        0.1
        """
        reference_rate = np.asarray(reference_rate, dtype=float)
        reference_temperature = np.asarray(reference_temperature, dtype=float)
        require_positive(reference_rate, "reference_rate", "W/kg", key="decomposition.reference_rate")
        require_positive(reference_temperature, "reference_temperature", "K", key="decomposition.reference_temperature")
        probe = cls(model, energy, activation_energy, 1.0, order, autocatalytic_order,
                    initial_conversion)
        log_rate_at_unit_factor = probe.log_heat_release_rate(reference_temperature)
        log_factor = np.log(reference_rate) - log_rate_at_unit_factor
        with np.errstate(over="ignore"):
            factor = np.exp(log_factor)
        return cls(model, energy, activation_energy, scalar_or_array(factor), order,
                   autocatalytic_order, initial_conversion,
                   log_pre_exponential_factor=scalar_or_array(log_factor))

    # -- rates --------------------------------------------------------------------------------

    def conversion_function(self, conversion):
        """Conversion function f(a) of the model.

        f = 1 (zero-order), (1 - a)^n (nth-order), a^m (1 - a)^n (autocatalytic).

        Parameters
        ----------
        conversion : float or array
            Conversion a, in [0, 1]. [-]

        Returns
        -------
        float or array
            f(a). [-]

        Raises
        ------
        ModelDomainError
            A conversion outside [0, 1].
        """
        conversion = _check_conversion(conversion)
        with np.errstate(divide="ignore"):
            return scalar_or_array(np.exp(self._log_conversion_function(conversion)))

    def _log_conversion_function(self, conversion):
        """ln f(a); -inf where f = 0. Never 0 * log(0)."""
        conversion = np.asarray(conversion, dtype=float)
        n = np.asarray(self.order, dtype=float)
        m = np.asarray(self.autocatalytic_order, dtype=float)
        if self.model == "zero-order":
            return np.zeros(np.broadcast_shapes(conversion.shape, n.shape, m.shape))
        with np.errstate(divide="ignore"):
            consumption = np.where(n > 0.0, n * np.log1p(-np.where(n > 0.0, conversion, 0.0)), 0.0)
            if self.model == "nth-order":
                return consumption + 0.0 * m
            growth = np.where(m > 0.0, m * np.log(np.where(m > 0.0, conversion, 1.0)), 0.0)
        return consumption + growth

    def log_heat_release_rate(self, temperature, conversion=None):
        """Natural log of the specific heat release rate.

        ln q = ln(Q/(1 - a0)) + ln A - E/(R T) + ln f(a)   (zero order: ln Q + ln A - E/(R T))

        Parameters
        ----------
        temperature : float or array
            Temperature. [K]
        conversion : float or array, optional
            Conversion a. [-] None: the mass as fed (a = a0).

        Returns
        -------
        float or array
            ln(q / (W/kg)); -inf where f(a) = 0. [-]

        Raises
        ------
        ModelDomainError
            A non-positive temperature or a conversion outside [0, 1].
        """
        temperature = np.asarray(temperature, dtype=float)
        require_positive(temperature, "temperature", "K")
        conversion = (np.asarray(self.initial_conversion, dtype=float) if conversion is None
                      else _check_conversion(conversion))
        log_rate = (np.log(self.energy) + np.asarray(self.log_pre_exponential_factor)
                    - np.asarray(self.activation_energy) / (GAS_CONSTANT * temperature)
                    + self._log_conversion_function(conversion))
        if self.model != "zero-order":
            log_rate = log_rate - np.log1p(-np.asarray(self.initial_conversion))
        return scalar_or_array(log_rate)

    def heat_release_rate(self, temperature, conversion=None):
        """Specific heat release rate q = Q/(1 - a0) A exp(-E/(R T)) f(a).

        Parameters
        ----------
        temperature : float or array
            Temperature. [K]
        conversion : float or array, optional
            Conversion a. [-] None: the mass as fed (a = a0).

        Returns
        -------
        float or array
            Heat release rate per kg of reaction mass. [W/kg] Computed as exp(ln q), so it is
            exact up to the float range: it is 0 only below ~1e-308 W/kg (use
            :meth:`log_heat_release_rate` there) and inf above ~1e308 W/kg.

        Raises
        ------
        ModelDomainError
            A non-positive temperature or a conversion outside [0, 1].
        """
        with np.errstate(over="ignore", under="ignore"):
            return scalar_or_array(np.exp(self.log_heat_release_rate(temperature, conversion)))

    def with_rate_factor(self, factor):
        """The same kinetics with A multiplied by ``factor`` (e.g. a contamination scenario).

        Parameters
        ----------
        factor : float or array
            Multiplier of the pre-exponential factor, > 0. [-]

        Returns
        -------
        DecompositionKinetics
            The kinetics (SI fields). [object]

        Raises
        ------
        ModelDomainError
            A non-positive or non-finite factor.
        """
        factor = np.asarray(factor, dtype=float)
        require_positive(factor, "rate factor", "-")
        log_factor = np.asarray(self.log_pre_exponential_factor) + np.log(factor)
        with np.errstate(over="ignore"):
            new_factor = np.exp(log_factor)
        return dataclasses.replace(self, pre_exponential_factor=scalar_or_array(new_factor),
                                   log_pre_exponential_factor=scalar_or_array(log_factor))


def _first_bad(values, bad_mask):
    """The first offending value and how many there are, for an error message."""
    values, bad_mask = np.broadcast_arrays(np.asarray(values), np.asarray(bad_mask))
    bad_values = values[bad_mask]
    if bad_values.size == 0:
        return "no value"
    if values.size == 1:
        return f"{bad_values[0]!r}"
    return f"{bad_values[0]!r} ({bad_values.size} of {values.size} samples)"




def _check_conversion(conversion) -> np.ndarray:
    return np.asarray(require_fraction(conversion, "conversion"), dtype=float)




def conversion_of_maximum_rate_factor(order, autocatalytic_order, initial_conversion=0.0):
    """Conversion at which the rate factor f(a) = a^m (1 - a)^n of an autocatalytic reaction
    peaks, a* = m/(m + n), not below the initial conversion (derived: d ln f/da = 0).

    Isothermal balances that freeze the rate at one conversion (the vessel heat balance, the
    barrier's heat release at the MTT) use it for autocatalytic kinetics: the fresh-mass rate
    at a0 is far below the rate the mass reaches.

    Parameters
    ----------
    order : float or array_like
        Reaction order n. [-]
    autocatalytic_order : float or array_like
        Autocatalytic order m. [-]
    initial_conversion : float or array_like
        Initial conversion a0. [-]

    Returns
    -------
    float or numpy.ndarray
        a* (1 - 1e-9 for n = 0, where f grows to the end). [-]

    Examples
    --------
    m = 1, n = 1: f = a (1 - a) peaks at a = 1/2.

    >>> conversion_of_maximum_rate_factor(1.0, 1.0, 0.01)
    0.5
    """
    n = np.asarray(order, dtype=float)
    m = np.asarray(autocatalytic_order, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        peak = np.where(n == 0.0, 1.0 - 1e-9, m / (m + n))
    return scalar_or_array(np.maximum(np.asarray(initial_conversion, dtype=float), peak))


def validate_kinetics(kinetics, key_prefix="decomposition"):
    """Check that decomposition kinetics make physical sense.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Kinetics to check (arrays: every sample is checked). [object]
    key_prefix : str or None
        Prefix of the key path carried by the error (``"decomposition"`` gives
        ``"decomposition.activation_energy"``). [text]

    Raises
    ------
    ModelDomainError
        Unknown model; energy <= 0 J/kg; E <= 0 J/mol; A <= 0 1/s; n < 0; m < 0; m != 0 for a
        zero- or nth-order model; a0 != 0 for zero order, outside [0, 1) for nth order or
        outside (0, 1) for autocatalytic; any value not finite.
    """
    def key(name):
        return f"{key_prefix}.{name}" if key_prefix else name

    if kinetics.model not in MODELS:
        raise ModelDomainError(f"model must be one of {', '.join(MODELS)}, got "
                               f"{kinetics.model!r}", key("model"))

    def check(name, values, ok, accepted):
        values = np.asarray(values, dtype=float)
        bad = ~(np.isfinite(values) & ok(values))
        if np.any(bad):
            raise ModelDomainError(f"{name} must be {accepted}, got {_first_bad(values, bad)}",
                                   key(name))

    check("energy", kinetics.energy, lambda v: v > 0.0,
          "> 0 J/kg (a decomposition that releases no heat needs no kinetics)")
    check("activation_energy", kinetics.activation_energy, lambda v: v > 0.0, "> 0 J/mol")
    check("log_pre_exponential_factor", kinetics.log_pre_exponential_factor,
          lambda v: np.ones_like(v, dtype=bool), "finite (A > 0 1/s)")
    check("order", kinetics.order, lambda v: v >= 0.0, ">= 0")
    check("autocatalytic_order", kinetics.autocatalytic_order, lambda v: v >= 0.0, ">= 0")
    if kinetics.model == "zero-order":
        check("autocatalytic_order", kinetics.autocatalytic_order, lambda v: v == 0.0,
              "0 for a zero-order model")
        check("initial_conversion", kinetics.initial_conversion, lambda v: v == 0.0,
              "0 for a zero-order model (its rate is that of the fresh mass)")
    elif kinetics.model == "nth-order":
        check("autocatalytic_order", kinetics.autocatalytic_order, lambda v: v == 0.0,
              "0 for an nth-order model (use model = autocatalytic)")
        check("initial_conversion", kinetics.initial_conversion,
              lambda v: (v >= 0.0) & (v < 1.0), "in [0, 1) for an nth-order model")
    else:
        check("initial_conversion", kinetics.initial_conversion,
              lambda v: (v > 0.0) & (v < 1.0),
              "in (0, 1) for an autocatalytic model (a^m vanishes at a = 0: an autocatalytic "
              "mass needs an initial conversion to start)")


# ----------------------------------------------------------------------------------------------
# Closed forms
# ----------------------------------------------------------------------------------------------

def townsend_tou_tmrad(start_temperature, specific_heat, heat_release_rate, activation_energy):
    """Time to maximum rate under adiabatic conditions, zero-order approximation.

    TMRad = c'p R T0^2 / (q(T0) E)

    This is the large-B asymptote of the adiabatic induction time of a zero-order reaction
    (B = E dT_ad/(R T0^2)); the exact time to a high temperature is longer by the factor
    1 + 2 R T0/E + O((R T0/E)^2) (derived by expanding E/R (1/T0 - 1/T) about T0).

    Parameters
    ----------
    start_temperature : float or array
        Temperature at which cooling fails, T0. [K]
    specific_heat : float or array
        Specific heat capacity of the reaction mass, c'p. [J/(kg K)]
    heat_release_rate : float or array
        Specific heat release rate at T0, q(T0). [W/kg]
    activation_energy : float or array
        Activation energy E. [J/mol]

    Returns
    -------
    float or array
        TMRad. [s]

    Raises
    ------
    ModelDomainError
        A non-positive or non-finite argument.

    References
    ----------
    D. I. Townsend, J. C. Tou, "Thermal hazard evaluation by an accelerating rate calorimeter",
    Thermochim. Acta 37 (1980) 1-30.

    Examples
    --------
    c'p = 1800 J/(kg K), T0 = 400 K, q = 0.1 W/kg, E = 100 kJ/mol:
    1800 * 8.314462618 * 400**2 / (0.1 * 100000) = 2.394565234e9 / 1e4 = 239456.5234 s (66.5 h).

    >>> round(townsend_tou_tmrad(400.0, 1800.0, 0.1, 100e3), 4)
    239456.5234
    >>> round(townsend_tou_tmrad(400.0, 1800.0, 0.1, 100e3) / 3600.0, 2)
    66.52
    """
    start_temperature = np.asarray(start_temperature, dtype=float)
    specific_heat = np.asarray(specific_heat, dtype=float)
    heat_release_rate = np.asarray(heat_release_rate, dtype=float)
    activation_energy = np.asarray(activation_energy, dtype=float)
    require_positive(start_temperature, "start_temperature", "K")
    require_positive(specific_heat, "specific_heat", "J/(kg K)")
    require_positive(heat_release_rate, "heat_release_rate", "W/kg")
    require_positive(activation_energy, "activation_energy", "J/mol")
    return scalar_or_array(np.exp(log_townsend_tou_tmrad(
        start_temperature, specific_heat, np.log(heat_release_rate), activation_energy)))


def semenov_b_number(start_temperature, adiabatic_rise, activation_energy):
    """Dimensionless adiabatic rise of thermal explosion theory, B = E dT_ad/(R T0^2).

    Parameters
    ----------
    start_temperature : float or array
        Start temperature T0. [K]
    adiabatic_rise : float or array
        Adiabatic temperature rise dT_ad. [K]
    activation_energy : float or array
        Activation energy E. [J/mol]

    Returns
    -------
    float or array
        B. [-]

    References
    ----------
    N. N. Semenov, Z. Phys. 48 (1928) 571; F. A. Williams, Combustion Theory, 2nd ed.,
    Benjamin/Cummings 1985 (dimensionless heat release of adiabatic explosion; chapter
    from memory).

    Examples
    --------
    100000 * 300 / (8.314462618 * 400**2) = 3e7 / 1330314.019 = 22.5511:

    >>> round(semenov_b_number(400.0, 300.0, 100e3), 4)
    22.5511
    """
    start_temperature = np.asarray(start_temperature, dtype=float)
    require_positive(start_temperature, "start_temperature", "K")
    return scalar_or_array(np.asarray(activation_energy, dtype=float)
                            * np.asarray(adiabatic_rise, dtype=float)
                            / (GAS_CONSTANT * start_temperature ** 2))


# ----------------------------------------------------------------------------------------------
# TMRad
# ----------------------------------------------------------------------------------------------

def _flatten(kinetics, *arrays):
    """Broadcast the kinetics fields with extra arrays; return shape and flat float64 copies.

    Order: energy, activation_energy, ln A, order, autocatalytic_order, initial_conversion,
    then the extra arrays.
    """
    fields = (kinetics.energy, kinetics.activation_energy, kinetics.log_pre_exponential_factor,
              kinetics.order, kinetics.autocatalytic_order, kinetics.initial_conversion)
    broadcast = np.broadcast_arrays(*[np.asarray(x, dtype=float) for x in fields + arrays])
    shape = broadcast[0].shape
    return shape, [np.array(x, dtype=float).ravel() for x in broadcast]


@lru_cache(maxsize=4)
def _gauss_legendre(nodes):
    return np.polynomial.legendre.leggauss(nodes)


def log_townsend_tou_tmrad(start_temperature, specific_heat, log_heat_release_rate,
                           activation_energy):
    """Natural log of the Townsend-Tou TMRad, ln(c'p R T0^2 / (q(T0) E)), free of overflow.

    The one implementation of the formula: :func:`townsend_tou_tmrad`, the zero-order
    :func:`tmrad`, :func:`tmrad_townsend_tou_for` and the DSC module all call it.

    Parameters
    ----------
    start_temperature : float or array
        Start temperature T0. [K]
    specific_heat : float or array
        Specific heat capacity c'p. [J/(kg K)]
    log_heat_release_rate : float or array
        ln(q(T0) / (W/kg)), the specific heat release rate at T0. [-]
    activation_energy : float or array
        Activation energy E. [J/mol]

    Returns
    -------
    float or array
        ln(TMRad / s). [-]

    References
    ----------
    D. I. Townsend, J. C. Tou, "Thermal hazard evaluation by an accelerating rate calorimeter",
    Thermochim. Acta 37 (1980) 1-30.

    Examples
    --------
    >>> import math
    >>> round(math.exp(log_townsend_tou_tmrad(400.0, 1800.0, math.log(0.1), 100e3)), 4)
    239456.5234
    """
    return scalar_or_array(np.log(specific_heat * GAS_CONSTANT / activation_energy)
                           + 2.0 * np.log(start_temperature) - log_heat_release_rate)


def _log_zero_order_tmrad(energy, activation_energy, log_factor, start_temperature,
                          specific_heat):
    """ln TMRad of the Townsend-Tou formula with q = Q A exp(-E/(R T0)) (log space)."""
    log_rate = np.log(energy) + log_factor - activation_energy / (GAS_CONSTANT * start_temperature)
    return np.asarray(log_townsend_tou_tmrad(start_temperature, specific_heat, log_rate,
                                             activation_energy))


def _log_consumption_tmrad(energy, activation_energy, log_factor, order, autocatalytic_order,
                           initial_conversion, start_temperature, specific_heat):
    """ln TMRad with consumption (nth-order and autocatalytic), flat arrays; see tmrad."""
    e_over_r = activation_energy / GAS_CONSTANT
    t0 = start_temperature
    n = order
    m = autocatalytic_order
    a0 = initial_conversion
    rise = energy / specific_heat
    # Distance from T0 down to the temperature at which a would be 0 (T0 - T_a); inf for a0 = 0.
    with np.errstate(divide="ignore"):
        growth_gap = np.where(a0 > 0.0, a0 * rise / (1.0 - a0), np.inf)
    with np.errstate(divide="ignore", invalid="ignore"):
        log_a0_term = np.where(m > 0.0, m * np.log(np.where(m > 0.0, a0, 1.0)), 0.0)
    # ln(dT/dt) at T0: ln(dT_ad/(1 - a0)) + ln A - E/(R T0) + m ln a0 + n ln(1 - a0).
    log_heating_rate0 = (np.log(rise) - np.log1p(-a0) + log_factor - e_over_r / t0
                         + log_a0_term + n * np.log1p(-a0))
    # d ln(dT/dt)/dT at T0 (1/K).
    slope0 = e_over_r / t0 ** 2 + m / growth_gap - n / rise

    result = np.full(t0.shape, -np.inf)
    accelerating = slope0 > 0.0
    if not np.any(accelerating):
        return result
    index = np.nonzero(accelerating)[0]
    (e_over_r, t0, n, m, rise, growth_gap, log_heating_rate0, slope0) = (
        x[index] for x in (e_over_r, t0, n, m, rise, growth_gap, log_heating_rate0, slope0))

    # Temperature of maximum rate, as delta = T_m - T0. The slope of ln(dT/dt) is
    # P(delta) - n/(dT_ad - delta) with P = E/(R T^2) + m/(T - T_a) > 0, convex and decreasing;
    # h(delta) = (dT_ad - delta) P(delta) - n has the same root, no pole, and is convex and
    # decreasing, so Newton steps from the left end of a bisection bracket approach the root
    # from below without overshooting. n = 0 gives the root delta = dT_ad (rate grows to the end).
    def h_and_derivative(delta):
        temperature = t0 + delta
        remaining = rise - delta
        p = e_over_r / temperature ** 2 + m / (growth_gap + delta)
        dp = -2.0 * e_over_r / temperature ** 3 - m / (growth_gap + delta) ** 2
        return remaining * p - n, remaining * dp - p

    low = np.zeros_like(t0)
    high = rise.copy()
    for _ in range(_MAX_RATE_BISECTIONS):
        middle = 0.5 * (low + high)
        positive = h_and_derivative(middle)[0] > 0.0
        low = np.where(positive, middle, low)
        high = np.where(positive, high, middle)
    delta = low
    for _ in range(_MAX_RATE_NEWTON_STEPS):
        value, derivative = h_and_derivative(delta)
        step = np.where(value > 0.0, -value / derivative, 0.0)
        delta = np.clip(delta + step, low, high)
    delta_max = np.where(n > 0.0, delta, rise)

    # Drop the range beyond which exp(-Delta g) < e^-60: by concavity Delta g lies above its
    # chord, Delta g(delta) >= delta/delta_m Delta g(delta_m).
    gain_max = _log_rate_gain(delta_max, rise - delta_max, e_over_r, t0, n, m, rise, growth_gap)
    with np.errstate(divide="ignore", invalid="ignore"):
        delta_end = np.where(gain_max > _NEGLIGIBLE_LOG_RATIO,
                             delta_max * (_NEGLIGIBLE_LOG_RATIO / gain_max), delta_max)

    # Logit variable w: T - T0 + s = D/(1 + e^-w), T_f + sigma - T = D/(1 + e^w) with
    # s = 1/slope0 (e-folding scale of 1/rate at T0) and D = dT_ad + sigma + s. The integrand is
    # analytic in a strip of fixed width around the real w axis, so a uniform composite
    # Gauss-Legendre rule converges geometrically whatever the scales; sigma = 0 puts the
    # (1 - a)^-n singularity at w = +inf, sigma is needed only for n = 0.
    # s <= T0 - T_a also sends the branch point of a^m at T_a (a = 0) to w = -inf or beyond;
    # this matters for m < 1, where 1/slope0 can exceed T0 - T_a.
    scale = np.minimum(1.0 / slope0, growth_gap)
    sigma = np.where(n > 0.0, 0.0, rise + scale)
    total = rise + sigma + scale
    w_start = np.log(scale / (rise + sigma))
    with np.errstate(divide="ignore"):
        w_end = np.log((delta_end + scale) / (rise + sigma - delta_end))
    panels = np.maximum(1, np.ceil((w_end - w_start) / _MAX_PANEL_WIDTH)).astype(int)

    nodes, weights = _gauss_legendre(_GAUSS_NODES)
    log_integral = np.empty_like(t0)
    for panel_count in np.unique(panels):
        group = np.nonzero(panels == panel_count)[0]
        # Node positions as a fraction of [w_start, w_end] and matching weights.
        fraction = ((np.arange(panel_count)[:, None] + 0.5 * (nodes + 1.0)) / panel_count).ravel()
        fraction_weight = np.tile(weights, panel_count) / (2.0 * panel_count)
        block = max(1, _BLOCK_ELEMENTS // fraction.size)
        for start in range(0, group.size, block):
            rows = group[start:start + block]
            width = (w_end[rows] - w_start[rows])[:, None]
            d = total[rows, None]
            # In-place arithmetic on cache-sized blocks: this loop is the cost of tmrad.
            buffer = np.multiply(width, -fraction)
            buffer -= w_start[rows, None]
            exp_minus_w = np.exp(buffer, out=buffer)
            shifted = exp_minus_w + 1.0
            np.divide(d, shifted, out=shifted)                       # T - T0 + s
            remaining_plus = np.multiply(shifted, exp_minus_w, out=exp_minus_w)  # T_f + sigma - T
            delta = shifted - scale[rows, None]
            np.maximum(delta, 0.0, out=delta)      # rounding near T0 must not go below it
            remaining = remaining_plus - sigma[rows, None]
            gain = _log_rate_gain(delta, remaining, e_over_r[rows, None], t0[rows, None],
                                  n[rows, None], m[rows, None], rise[rows, None],
                                  growth_gap[rows, None])
            integrand = np.exp(np.negative(gain, out=gain), out=gain)
            integrand *= shifted
            integrand *= remaining_plus                              # exp(-Delta g) D dT/dw
            integral = (integrand @ fraction_weight) * (width[:, 0] / d[:, 0])
            with np.errstate(divide="ignore"):
                log_integral[rows] = np.log(integral)
    result[index] = log_integral - log_heating_rate0
    return result


def _log_rate_gain(delta, remaining, e_over_r, t0, n, m, rise, growth_gap):
    """Rise of ln(dT/dt) from T0 to T = T0 + delta (arrays broadcast).

    Delta g = E/R delta/(T0 T) + m ln(1 + delta/(T0 - T_a)) + n ln((T_f - T)/dT_ad), with
    ``remaining`` = T_f - T passed separately to keep its precision near T_f. Concave in delta,
    Delta g(0) = 0. Returns a new array; ``remaining`` may be overwritten.
    """
    gain = delta + t0
    np.divide(delta, gain, out=gain)
    gain *= e_over_r / t0
    if np.any(m > 0.0):
        gain += m * np.log1p(delta / growth_gap)
    if np.all(n > 0.0):
        remaining *= 1.0 / rise
        gain += n * np.log(remaining, out=remaining)
    elif np.any(n > 0.0):
        with np.errstate(divide="ignore", invalid="ignore"):
            gain += np.where(n > 0.0, n * np.log(remaining / rise), 0.0)
    return gain


def _log_tmrad_flat(model, energy, activation_energy, log_factor, order, autocatalytic_order,
                    initial_conversion, start_temperature, specific_heat):
    if model == "zero-order":
        return _log_zero_order_tmrad(energy, activation_energy, log_factor, start_temperature,
                                     specific_heat)
    return _log_consumption_tmrad(energy, activation_energy, log_factor, order,
                                  autocatalytic_order, initial_conversion, start_temperature,
                                  specific_heat)


#: Smallest non-zero reaction order accepted [-] (design): below it the quadrature's panel
#: count is not representable and the order is physically meaningless.
MINIMUM_NONZERO_ORDER = 1e-6
#: Lowest start temperature accepted [K] (design).
MINIMUM_START_TEMPERATURE = 1.0


def _check_start(start_temperature, specific_heat, orders=()):
    require_positive(start_temperature, "start_temperature", "K")
    require_positive(specific_heat, "specific_heat", "J/(kg K)")
    if np.any(np.asarray(start_temperature) < MINIMUM_START_TEMPERATURE):
        raise ModelDomainError(f"start_temperature must be at least {MINIMUM_START_TEMPERATURE} K")
    for name, order in orders:
        values = np.asarray(order, dtype=float)
        if np.any((values > 0.0) & (values < MINIMUM_NONZERO_ORDER)):
            raise ModelDomainError(f"{name} must be 0 or at least {MINIMUM_NONZERO_ORDER:g}",
                                   key=f"decomposition.{name}")


def log_tmrad(kinetics, start_temperature, specific_heat):
    """Natural log of :func:`tmrad`, free of overflow (for root finding and very long times).

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics. [object]
    start_temperature : float or array
        Temperature at which cooling fails, T0. [K]
    specific_heat : float or array
        Specific heat capacity of the reaction mass, c'p. [J/(kg K)]

    Returns
    -------
    float or array
        ln(TMRad / s); -inf where the maximum rate is at t = 0. [-]

    Raises
    ------
    ModelDomainError
        A non-positive start temperature or specific heat.
    """
    shape, flat = _flatten(kinetics, start_temperature, specific_heat)
    _check_start(flat[6], flat[7], (("order", kinetics.order),
                                    ("autocatalytic_order", kinetics.autocatalytic_order)))
    return scalar_or_array(_log_tmrad_flat(kinetics.model, *flat).reshape(shape))


def tmrad(kinetics, start_temperature, specific_heat):
    """Time to maximum rate under adiabatic conditions (phi = 1) from a start temperature.

    zero-order
        Townsend-Tou, TMRad = c'p R T0^2/(q(T0) E) with q of the fresh mass.
    nth-order, autocatalytic
        Exact adiabatic time from T0 to the temperature of maximum rate, with consumption.

    Method (derived). Under adiabatic conditions T and a are tied,
    a = a0 + (1 - a0)(T - T0)/dT_ad, so the heating rate is a function of T alone,

        dT/dt = r(T) = dT_ad/(1 - a0) A exp(-E/(R T)) a^m (1 - a)^n,

    and the time to reach T_m is the one-dimensional integral t = int_{T0}^{T_m} dT / r(T).
    With T_a = T0 - a0 dT_ad/(1 - a0) (where a = 0) and T_f = T0 + dT_ad (where a = 1),

        ln r(T) = const - E/(R T) + m ln(T - T_a) + n ln(T_f - T),

    a sum of concave functions of T; so ln r is concave and its derivative

        g'(T) = E/(R T^2) + m/(T - T_a) - n/(T_f - T)

    decreases monotonically. The maximum rate is at its single root T_m in (T0, T_f) (found by
    bisection with a checked bracket, then Newton; n = 0 gives T_m = T_f). If g'(T0) <= 0
    the rate only falls: the maximum rate is at t = 0 and the function returns 0 (for nth
    order with a0 = 0 this is B = E dT_ad/(R T0^2) <= n; Townsend-Tou is then meaningless).

    The integrand 1/r falls on the scale 1/g'(T0) next to T0 (about R T0^2/E, or the scale
    a0 dT_ad/(m (1 - a0)) over which a grows from a0 if that is shorter), has a branch point
    at T_a (a = 0) below T0 and a pole or branch point at T_f just beyond T_m. With
    s = min(1/g'(T0), T0 - T_a) the substitution w = ln((T - T0 + s)/(T_f - T)) stretches
    both ends geometrically (sub-intervals of geometrically growing width near T0 and near
    T_f), pushes both singularities to |w| = inf and makes the integrand analytic in a strip
    of fixed width, so composite Gauss-Legendre on uniform w panels (12 nodes, width <= 1.75)
    converges to ~1e-14 relative with about 30-100 nodes per sample. The range where
    1/r < e^-60 of its start value is dropped (chord bound from concavity).

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics. [object]
    start_temperature : float or array
        Temperature at which cooling fails, T0. [K]
    specific_heat : float or array
        Specific heat capacity of the reaction mass, c'p. [J/(kg K)]

    Returns
    -------
    float or array
        TMRad. [s] 0 where the maximum rate is at the start (see above); inf where the time
        exceeds the float range (~1.8e308 s; :func:`log_tmrad` gives its log).

    Raises
    ------
    ModelDomainError
        A non-positive start temperature or specific heat.

    References
    ----------
    D. I. Townsend, J. C. Tou, Thermochim. Acta 37 (1980) 1-30 (zero order).

    Examples
    --------
    >>> k = DecompositionKinetics.from_reference_rate("zero-order", 500e3, 100e3, 0.1, 400.0)
    >>> round(tmrad(k, 400.0, 1800.0), 3)
    239456.523
    """
    with np.errstate(over="ignore"):
        return scalar_or_array(np.exp(log_tmrad(kinetics, start_temperature, specific_heat)))


def tmrad_townsend_tou_for(kinetics, start_temperature, specific_heat):
    """Townsend-Tou TMRad with the heat release rate of the fresh mass, for any model.

    TMRad = c'p R T0^2/(q(T0, a0) E), for comparison with :func:`tmrad`.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics. [object]
    start_temperature : float or array
        Start temperature T0. [K]
    specific_heat : float or array
        Specific heat capacity c'p. [J/(kg K)]

    Returns
    -------
    float or array
        TMRad of the zero-order approximation. [s] inf beyond the float range.

    Raises
    ------
    ModelDomainError
        A non-positive start temperature or specific heat.

    References
    ----------
    D. I. Townsend, J. C. Tou, Thermochim. Acta 37 (1980) 1-30.
    """
    start_temperature = np.asarray(start_temperature, dtype=float)
    specific_heat = np.asarray(specific_heat, dtype=float)
    _check_start(start_temperature, specific_heat)
    log_time = log_townsend_tou_tmrad(start_temperature, specific_heat,
                                      np.asarray(kinetics.log_heat_release_rate(start_temperature)),
                                      np.asarray(kinetics.activation_energy))
    with np.errstate(over="ignore"):
        return scalar_or_array(np.exp(log_time))


def townsend_tou_equivalent(kinetics):
    """Zero-order kinetics with the heat release rate of the fresh mass of ``kinetics``.

    ln A' = ln A + ln f(a0) - ln(1 - a0), so that q'(T) = q(T, a0) at every temperature; its
    TMRad is the Townsend-Tou value (:func:`tmrad_townsend_tou_for`) and its TD24 the zero-order
    TD24 (Townsend & Tou, Thermochim. Acta 37 (1980) 1-30; derived).

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Scalar decomposition kinetics. [object]

    Returns
    -------
    DecompositionKinetics
        Zero-order kinetics, same energy and activation energy. [SI]
    """
    if kinetics.model == "zero-order":
        return kinetics
    a0 = np.asarray(kinetics.initial_conversion, dtype=float)
    log_factor = (np.asarray(kinetics.log_pre_exponential_factor, dtype=float)
                  + np.asarray(kinetics._log_conversion_function(a0)) - np.log1p(-a0))
    with np.errstate(over="ignore"):
        factor = np.exp(log_factor)
    return DecompositionKinetics(model="zero-order", energy=kinetics.energy,
                                 activation_energy=kinetics.activation_energy,
                                 pre_exponential_factor=scalar_or_array(factor), order=0.0,
                                 log_pre_exponential_factor=scalar_or_array(log_factor))


# ----------------------------------------------------------------------------------------------
# TD24 / TD8
# ----------------------------------------------------------------------------------------------

def _zero_order_guess(energy, activation_energy, log_factor, specific_heat, log_target):
    """1/T at which the Townsend-Tou TMRad of the fresh mass equals the target; nan if none.

    With x = E/(2 R T) the condition c'p R T^2 exp(E/(R T))/(Q A E) = t reads
    x - ln x = k, k = (ln(Q A E t/(c'p R)))/2 - ln(E/(2 R)). x - ln x >= 1 with its minimum at
    x = 1 (T = E/(2 R)), so a root on the branch x > 1 (the branch where TMRad falls with T)
    exists iff k > 1. Newton from x = k + ln k + 1, which lies right of the root, converges
    monotonically because x - ln x is convex and increasing there.
    """
    k = (0.5 * (np.log(energy * activation_energy / (specific_heat * GAS_CONSTANT)) + log_factor
                + log_target) - np.log(activation_energy / (2.0 * GAS_CONSTANT)))
    has_root = k > 1.0
    k_safe = np.where(has_root, k, 2.0)
    x = k_safe + np.log(k_safe) + 1.0
    for _ in range(40):  # fixed count: every sample's result is independent of the others
        x = x - (x - np.log(x) - k_safe) / (1.0 - 1.0 / x)
    return np.where(has_root, 2.0 * GAS_CONSTANT * x / activation_energy, np.nan)


def _solve_temperature_for_tmrad(model, flat, lower, upper):
    """Safeguarded secant on F(y) = ln TMRad(1/y) - ln t_target, y = 1/T; flat arrays."""
    (energy, activation_energy, log_factor, order, autocatalytic_order, initial_conversion,
     specific_heat, target_time) = flat
    size = energy.size
    log_target = np.log(target_time)
    if model == "zero-order":
        # Only the branch where Townsend-Tou TMRad falls with T (T < E/(2R)) is physical.
        upper = np.minimum(upper, activation_energy / (2.0 * GAS_CONSTANT))
    y_low = 1.0 / upper    # high temperature end: F < 0 expected
    y_high = 1.0 / lower   # low temperature end: F > 0 expected

    def residual(rows, y):
        return _log_tmrad_flat(model, energy[rows], activation_energy[rows], log_factor[rows],
                               order[rows], autocatalytic_order[rows],
                               initial_conversion[rows], 1.0 / y, specific_heat[rows]) \
            - log_target[rows]

    guess = _zero_order_guess(energy, activation_energy, log_factor, specific_heat, log_target)
    guess = np.where(np.isfinite(guess), guess, 0.5 * (y_low + y_high))
    guess = np.clip(guess, y_low, y_high)

    root = np.full(size, np.nan)
    status = np.where(y_low < y_high, _NOT_CONVERGED, _NO_ROOT)
    # Bracket [a, b] in y: F(a) < 0 once a_known (else a is the unevaluated end y_low),
    # F(b) > 0 once b_known (else the unevaluated end y_high).
    a, b = y_low.copy(), y_high.copy()
    f_a, f_b = np.full(size, -np.inf), np.full(size, np.inf)
    a_known = np.zeros(size, dtype=bool)
    b_known = np.zeros(size, dtype=bool)
    y = guess
    y_prev = np.full(size, np.nan)
    f_prev = np.full(size, np.nan)
    active = status == _NOT_CONVERGED
    for _ in range(_MAX_ROOT_ITERATIONS):
        rows = np.nonzero(active)[0]
        if rows.size == 0:
            break
        yr = y[rows]
        fr = residual(rows, yr)
        negative = fr < 0.0
        positive = fr > 0.0
        a[rows] = np.where(negative, yr, a[rows])
        f_a[rows] = np.where(negative, fr, f_a[rows])
        a_known[rows] |= negative
        b[rows] = np.where(positive, yr, b[rows])
        f_b[rows] = np.where(positive, fr, f_b[rows])
        b_known[rows] |= positive
        ar, br = a[rows], b[rows]
        # No root in the range: still too slow at the hot end or already too fast at the cold.
        no_root = (positive & (yr <= y_low[rows])) | (negative & (yr >= y_high[rows]))
        close = np.abs(fr) <= _LOG_TIME_TOLERANCE
        # Bracket down to rounding: take the end with the smaller |F| (F may jump, e.g. from
        # -inf where B <= n to a finite value, within one ulp of T).
        collapsed = ~close & a_known[rows] & b_known[rows] & (br - ar <= 4e-16 * br)
        converged = ~no_root & (close | collapsed)
        failed = np.isnan(fr)
        best_end = np.where(np.abs(f_a[rows]) < np.abs(f_b[rows]), ar, br)
        root[rows] = np.where(close & ~no_root, yr, np.where(collapsed & ~no_root, best_end,
                                                              root[rows]))
        status[rows] = np.select([converged, no_root, failed], [_CONVERGED, _NO_ROOT, _FAILED],
                                 _NOT_CONVERGED)
        # Next point: the secant through the last two points (the Townsend-Tou slope E/R - 2/y
        # on the first step) if it falls strictly inside the bracket; an unevaluated end of
        # the range if the step heads beyond it; otherwise bisection.
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            slope = np.where(np.isfinite(f_prev[rows]) & np.isfinite(fr),
                             (fr - f_prev[rows]) / (yr - y_prev[rows]),
                             activation_energy[rows] / GAS_CONSTANT - 2.0 / yr)
            candidate = yr - fr / slope
        inside = np.isfinite(candidate) & (candidate > ar) & (candidate < br)
        next_y = np.where(inside, candidate, 0.5 * (ar + br))
        next_y = np.where(~inside & positive & ~a_known[rows], ar, next_y)
        next_y = np.where(~inside & negative & ~b_known[rows], br, next_y)
        y_prev[rows], f_prev[rows] = yr, fr
        y[rows] = next_y
        active[rows] = status[rows] == _NOT_CONVERGED
    return root, status


def temperature_for_tmrad(kinetics, specific_heat, target_time, lower=DEFAULT_LOWER_TEMPERATURE,
                          upper=DEFAULT_UPPER_TEMPERATURE):
    """Start temperature at which :func:`tmrad` equals a target time (TD24: 24 h, TD8: 8 h).

    Solves ln TMRad(T) = ln t_target in the variable 1/T, where ln TMRad is nearly linear
    (slope about E/R): a safeguarded secant (steps that leave the current sign-change bracket
    are replaced by bisection; an end of [lower, upper] is evaluated only when the iteration
    heads there), started from the Townsend-Tou root of the fresh mass (closed form via
    x - ln x = k with x = E/(2 R T)). Converged when |ln TMRad - ln t_target| <= 1e-12.

    For zero order TMRad = c'p R T^2/(q E) falls with T only while E > 2 R T (its minimum is
    at T = E/(2 R)); only that branch is searched, i.e. ``upper`` is lowered to E/(2 R). For
    nth-order and autocatalytic kinetics TMRad is taken to fall with T in [lower, upper]
    (true for B well above n); if it does not, the root found is one of several. Where the
    slope of ln(dT/dt) at T0 reaches 0 (B = n for nth order) TMRad drops to 0; if it drops
    from above the target to 0 within the float resolution of T (tiny energies or very slow
    rates), that temperature is returned.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics. [object]
    specific_heat : float or array
        Specific heat capacity c'p. [J/(kg K)]
    target_time : float or array
        Target TMRad. [s]
    lower : float or array
        Lowest start temperature searched. [K]
    upper : float or array
        Highest start temperature searched. [K]

    Returns
    -------
    float or array
        Start temperature. [K] NaN where no start temperature in [lower, upper] gives the target
        (TMRad at ``lower`` already shorter, or at ``upper`` still longer than the target; for
        zero order also when the minimum of TMRad at E/(2 R) exceeds the target). Use
        :func:`td24`/:func:`td8` for a scalar that raises instead.

    Raises
    ------
    ModelDomainError
        Non-positive specific heat, target time or bounds.

    Examples
    --------
    >>> k = DecompositionKinetics.from_reference_rate("zero-order", 500e3, 100e3, 0.1, 400.0)
    >>> t = temperature_for_tmrad(k, 1800.0, 86400.0)
    >>> round(tmrad(k, t, 1800.0) / 3600.0, 9)
    24.0
    """
    require_positive(specific_heat, "specific_heat", "J/(kg K)")
    require_positive(target_time, "target_time", "s")
    require_positive(lower, "lower", "K")
    require_positive(upper, "upper", "K")
    shape, flat = _flatten(kinetics, specific_heat, target_time, lower, upper)
    lower_flat, upper_flat = flat[8], flat[9]
    root, _ = _solve_temperature_for_tmrad(kinetics.model, flat[:8], lower_flat, upper_flat)
    return scalar_or_array((1.0 / root).reshape(shape))


def _scalar_temperature_for(kinetics, specific_heat, target_time, label, lower, upper):
    for name in ("energy", "activation_energy", "log_pre_exponential_factor", "order",
                 "autocatalytic_order", "initial_conversion"):
        if np.size(getattr(kinetics, name)) != 1:
            raise ModelDomainError(f"{label} needs scalar kinetics; {name} is an array "
                                   f"(use temperature_for_tmrad for arrays)")
    if np.size(specific_heat) != 1:
        raise ModelDomainError(f"{label} needs a scalar specific heat")
    require_positive(specific_heat, "specific_heat", "J/(kg K)")
    require_positive(target_time, "target_time", "s")
    require_positive(lower, "lower", "K")
    require_positive(upper, "upper", "K")
    _, flat = _flatten(kinetics, specific_heat, target_time, lower, upper)
    root, status = _solve_temperature_for_tmrad(kinetics.model, flat[:8], flat[8], flat[9])
    if status[0] == _CONVERGED:
        return float(1.0 / root[0])
    lower, upper = float(lower), float(upper)
    upper_used = upper
    if kinetics.model == "zero-order":
        upper_used = min(upper, float(kinetics.activation_energy) / (2.0 * GAS_CONSTANT))
    hours = float(target_time) / SECONDS_PER_HOUR
    tried = ("safeguarded secant/bisection on ln TMRad against 1/T, started from the "
             "Townsend-Tou root of the fresh mass")
    if status[0] == _NO_ROOT and upper_used <= lower:
        raise SolverError(
            f"{label}: no start temperature gives TMRad = {hours:g} h for the zero-order kinetics: "
            f"TMRad = c'p R T^2/(q E) falls with T only below E/(2R) = {upper_used:.4g} K, which "
            f"is not above the lowest temperature searched ({lower:g} K)", "decomposition")
    with np.errstate(all="ignore"):
        at_lower = float(tmrad(kinetics, lower, specific_heat)) / SECONDS_PER_HOUR
        at_upper = float(tmrad(kinetics, upper_used, specific_heat)) / SECONDS_PER_HOUR
    if status[0] == _NO_ROOT:
        reason = (f"no start temperature between {lower:g} K and {upper_used:g} K gives TMRad = "
                  f"{hours:g} h: TMRad({lower:g} K) = {at_lower:.4g} h, TMRad({upper_used:g} K) "
                  f"= {at_upper:.4g} h")
        if kinetics.model == "zero-order" and upper_used < upper:
            reason += (" (zero order is searched only below E/(2R), where TMRad falls with T; "
                       "its minimum is there)")
    else:
        reason = (f"the root finding did not converge in {_MAX_ROOT_ITERATIONS} steps between "
                  f"{lower:g} K and {upper_used:g} K")
    raise SolverError(f"{label} for the {kinetics.model} kinetics: {reason} (tried: {tried})",
                      "decomposition")


def temperature_for_time_to_maximum_rate(kinetics, specific_heat, target_time,
                                        lower=DEFAULT_LOWER_TEMPERATURE,
                                        upper=DEFAULT_UPPER_TEMPERATURE):
    """Start temperature at which TMRad equals ``target_time`` (scalar; TD24 for 24 h).

    The one root search for T_D: :func:`td24`, :func:`td8` and the DSC module's zero-order
    TD call it.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics (scalar fields). [object]
    specific_heat : float
        Specific heat capacity c'p. [J/(kg K)]
    target_time : float
        TMRad sought. [s]
    lower : float
        Lowest temperature searched. [K]
    upper : float
        Highest temperature searched. [K]

    Returns
    -------
    float
        T_D. [K]

    Raises
    ------
    SolverError
        No root in [lower, upper]; the message gives TMRad at both ends.

    References
    ----------
    TD24 as the temperature limit of the criticality classes: F. Stoessel, "Thermal Safety of
    Chemical Processes: Risk Assessment and Process Design", Wiley-VCH 2008, ch. 3 (from memory,
    verify against the source). A. Keller et al., "Estimation of the time to maximum rate using
    dynamic DSC experiments", J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory, verify
    against the source).
    """
    hours = float(target_time) / SECONDS_PER_HOUR
    return _scalar_temperature_for(kinetics, specific_heat, target_time, f"TD{hours:g}",
                                   lower, upper)


def td24(kinetics, specific_heat, lower=DEFAULT_LOWER_TEMPERATURE,
         upper=DEFAULT_UPPER_TEMPERATURE):
    """TD24: start temperature at which TMRad = 24 h (scalar).

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics (scalar fields). [object]
    specific_heat : float
        Specific heat capacity c'p. [J/(kg K)]
    lower : float
        Lowest temperature searched. [K]
    upper : float
        Highest temperature searched. [K]

    Returns
    -------
    float
        TD24. [K]

    Raises
    ------
    SolverError
        No root in [lower, upper]; the message gives TMRad at both ends.
    ModelDomainError
        Array kinetics or invalid arguments.

    References
    ----------
    TD24 as the temperature limit of the criticality classes: F. Stoessel, "Thermal Safety of
    Chemical Processes: Risk Assessment and Process Design", Wiley-VCH 2008, ch. 3 (from memory,
    verify against the source). A. Keller et al., "Estimation of the time to maximum rate using
    dynamic DSC experiments", J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory, verify
    against the source).
    """
    return _scalar_temperature_for(kinetics, specific_heat, 24.0 * SECONDS_PER_HOUR, "td24",
                                   lower, upper)


def td8(kinetics, specific_heat, lower=DEFAULT_LOWER_TEMPERATURE,
        upper=DEFAULT_UPPER_TEMPERATURE):
    """TD8: start temperature at which TMRad = 8 h (scalar).

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics (scalar fields). [object]
    specific_heat : float
        Specific heat capacity c'p. [J/(kg K)]
    lower : float
        Lowest temperature searched. [K]
    upper : float
        Highest temperature searched. [K]

    Returns
    -------
    float
        TD8. [K]

    Raises
    ------
    SolverError
        No root in [lower, upper]; the message gives TMRad at both ends.
    ModelDomainError
        Array kinetics or invalid arguments.

    References
    ----------
    TD24 as the temperature limit of the criticality classes: F. Stoessel, "Thermal Safety of
    Chemical Processes: Risk Assessment and Process Design", Wiley-VCH 2008, ch. 3 (from memory,
    verify against the source). A. Keller et al., "Estimation of the time to maximum rate using
    dynamic DSC experiments", J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory, verify
    against the source).
    """
    return _scalar_temperature_for(kinetics, specific_heat, 8.0 * SECONDS_PER_HOUR, "td8",
                                   lower, upper)


# ----------------------------------------------------------------------------------------------
# Is the zero-order estimate conservative?
# ----------------------------------------------------------------------------------------------

def zero_order_is_conservative(kinetics, start_temperature, specific_heat):
    """Whether the Townsend-Tou TMRad (fresh-mass rate) is safely no longer than the real one.

    Criterion (design, with a derived basis):

    - autocatalytic: never. The rate grows with conversion, so with the same initial heat
      release rate the time to maximum rate is shorter than the zero-order estimate (often
      several times).
    - nth order (and zero order, taken as n = 0 with the time to complete conversion):
      conservative where B = E dT_ad/(R T0^2) > 3 n + 5 AND the Townsend-Tou time does not
      exceed the time with consumption computed by :func:`tmrad` (n = 0: time to T0 + dT_ad).

    Basis. For B >> n, expanding the adiabatic time integral about T0 gives (derived)
    TMR_n/TMR_TT = 1 + n/B + 2 R T0/E + O(1/B^2, (R T0/E)^2): consumption and the curvature
    of 1/T lengthen the real time, so Townsend-Tou is conservative. As B falls to n the
    maximum rate moves to t = 0 and TMR_n -> 0, so it is not. The crossover computed with this
    module's exact integral lies at B = n + 1.2 ... n + 2.2 for n = 0.25 ... 4 and
    E/(R T0) = 10 ... 100; for n = 0 (finite energy) at B ~ ln(E/(2 R T0)) (about 2.5 to 4.2
    over that range). The threshold 3 n + 5 is a design margin of about twice the crossover so
    that a moderate error in n, E or dT_ad does not reverse the conclusion; the explicit
    comparison with the exact time covers cases outside the ranges scanned.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics. [object]
    start_temperature : float or array
        Start temperature T0 (typically the MTSR). [K]
    specific_heat : float or array
        Specific heat capacity c'p. [J/(kg K)]

    Returns
    -------
    conservative : bool or numpy.ndarray of bool
        True where the zero-order estimate is conservative (broadcast shape; bool for
        scalars). [bool]
    reason : str or list
        Why, one sentence per sample: a str for scalar input, else a nested list of str with
        the broadcast shape (``numpy.ndarray.tolist`` layout). [text]

    Raises
    ------
    ModelDomainError
        A non-positive start temperature or specific heat.
    """
    shape, flat = _flatten(kinetics, start_temperature, specific_heat)
    energy, activation_energy, log_factor, order, m, a0, t0, cp = flat
    _check_start(t0, cp)
    if kinetics.model == "autocatalytic":
        conservative = np.zeros(t0.shape, dtype=bool)
        reasons = [("autocatalytic decomposition: the rate grows with conversion, so the "
                    "zero-order (Townsend-Tou) TMRad from the initial rate overestimates the "
                    "time to maximum rate")] * t0.size
    else:
        n = order if kinetics.model == "nth-order" else np.zeros_like(order)
        rise = energy / cp
        b_number = activation_energy * rise / (GAS_CONSTANT * t0 ** 2)
        threshold = 3.0 * n + 5.0
        log_exact = _log_consumption_tmrad(energy, activation_energy, log_factor, n, m, a0, t0,
                                           cp)
        log_zero = (np.log(cp * GAS_CONSTANT / activation_energy) + 2.0 * np.log(t0)
                    - (np.log(energy) + log_factor - activation_energy / (GAS_CONSTANT * t0)
                       + n * np.log1p(-a0) - np.log1p(-a0)))
        shorter = log_zero <= log_exact
        conservative = (b_number > threshold) & shorter
        what = ("release of the whole energy (finite energy)" if kinetics.model == "zero-order"
                else "maximum rate with consumption")
        reasons = []
        for b, limit, ok_b, ok_t, lz, le in zip(b_number, threshold, b_number > threshold,
                                                 shorter, log_zero, log_exact):
            with np.errstate(over="ignore"):
                hours_zero = math.exp(min(lz, 700.0)) / SECONDS_PER_HOUR
                hours_exact = math.exp(min(le, 700.0)) / SECONDS_PER_HOUR if le > -np.inf else 0.0
            if not ok_b:
                reasons.append(f"B = E dT_ad/(R T0^2) = {b:.3g} is not above 3n + 5 = {limit:.3g}: "
                               f"reactant consumption shortens or removes the acceleration")
            elif not ok_t:
                reasons.append(f"the zero-order TMRad ({hours_zero:.3g} h) exceeds the time to "
                               f"{what} ({hours_exact:.3g} h)")
            else:
                reasons.append(f"B = {b:.3g} > 3n + 5 = {limit:.3g} and the zero-order TMRad "
                               f"({hours_zero:.3g} h) does not exceed the time to {what} "
                               f"({hours_exact:.3g} h)")
    conservative = conservative.reshape(shape)
    if shape == ():
        return bool(conservative), reasons[0]
    return conservative, np.array(reasons, dtype=object).reshape(shape).tolist()


# ----------------------------------------------------------------------------------------------
# Temperature-time course
# ----------------------------------------------------------------------------------------------

def adiabatic_course(kinetics, start_temperature, specific_heat, t_end=None, n_points=400):
    """Temperature against time of the mass after cooling failure (adiabatic, phi = 1).

    Integrates dT/dt = q(T, a(T))/c'p with a = a0 + (1 - a0)(T - T0)/dT_ad (the adiabatic tie,
    see :func:`tmrad`) by scipy.integrate.solve_ivp (Radau, rtol 1e-10, analytic Jacobian
    dr/dT = r g'(T)). Zero order keeps the rate of the fresh mass, q = Q A exp(-E/(R T)), up to
    the moment its whole energy is released (T = T0 + dT_ad) and stays there afterwards. The
    other models stop at 99.9 % of the remaining conversion (T = T0 + 0.999 dT_ad) unless
    ``t_end`` asks for more, in which case they run to ``t_end``.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Decomposition kinetics (scalar fields). [object]
    start_temperature : float
        Temperature at which cooling fails, T0. [K]
    specific_heat : float
        Specific heat capacity c'p. [J/(kg K)]
    t_end : float, optional
        End of the course. [s] None: the end point above (if the reaction is so slow that it
        is not reached within 1e13 s, the course ends there).
    n_points : int
        Number of points returned, >= 4: half evenly spaced in time, half evenly spaced in
        temperature (so the steep runaway is resolved in a plot). [-]

    Returns
    -------
    time : numpy.ndarray
        Time since cooling failure, increasing, starting at 0. [s]
    temperature : numpy.ndarray
        Temperature of the mass. [K]

    Raises
    ------
    ModelDomainError
        Array kinetics or arguments, non-positive values, n_points < 4.
    SolverError
        solve_ivp failed; the message gives its status.
    """
    from scipy.integrate import solve_ivp

    for name in ("energy", "activation_energy", "log_pre_exponential_factor", "order",
                 "autocatalytic_order", "initial_conversion"):
        if np.size(getattr(kinetics, name)) != 1:
            raise ModelDomainError(f"adiabatic_course needs scalar kinetics; {name} is an array")
    if np.size(start_temperature) != 1 or np.size(specific_heat) != 1:
        raise ModelDomainError("adiabatic_course needs a scalar start temperature and specific "
                               "heat")
    _check_start(start_temperature, specific_heat)
    if t_end is not None:
        require_positive(t_end, "t_end", "s")
        t_end = float(t_end)
    if int(n_points) < 4:
        raise ModelDomainError(f"n_points must be at least 4, got {n_points!r}")
    n_points = int(n_points)
    t0 = float(np.asarray(start_temperature))
    cp = float(np.asarray(specific_heat))
    energy = float(kinetics.energy)
    e_over_r = float(kinetics.activation_energy) / GAS_CONSTANT
    log_factor = float(kinetics.log_pre_exponential_factor)
    zero_order = kinetics.model == "zero-order"
    n = 0.0 if zero_order else float(kinetics.order)
    m = float(kinetics.autocatalytic_order) if kinetics.model == "autocatalytic" else 0.0
    a0 = float(kinetics.initial_conversion)
    rise = energy / cp

    def log_heating_rate(temperature):
        # ln(dT/dt); conversion clipped to [a0, 1] against tiny overshoots of the solver.
        base = math.log(rise) + log_factor - e_over_r / temperature
        if zero_order:
            return base, e_over_r / temperature ** 2
        conversion = min(max(a0 + (1.0 - a0) * (temperature - t0) / rise, a0), 1.0)
        remaining = 1.0 - conversion
        if n > 0.0 and remaining <= 0.0:
            return -math.inf, 0.0
        value = base - math.log1p(-a0) + n * math.log(remaining) if n > 0.0 else \
            base - math.log1p(-a0)
        slope = e_over_r / temperature ** 2
        c = (1.0 - a0) / rise
        if m > 0.0:
            value += m * math.log(conversion)
            slope += m * c / conversion
        if n > 0.0:
            slope -= n * c / remaining
        return value, slope

    def rhs(_time, state):
        value, _ = log_heating_rate(state[0])
        return [math.exp(min(value, 700.0))]

    def jacobian(_time, state):
        value, slope = log_heating_rate(state[0])
        return [[math.exp(min(value, 700.0)) * slope]]

    stop_temperature = t0 + (rise if zero_order else 0.999 * rise)

    def reached_end(_time, state):
        return state[0] - stop_temperature
    reached_end.terminal = zero_order or t_end is None
    reached_end.direction = 1.0

    t_bound = t_end if t_end is not None else 1e13
    solution = solve_ivp(rhs, (0.0, t_bound), [t0], method="Radau", rtol=1e-10, atol=1e-9,
                         jac=jacobian, dense_output=True, events=reached_end)
    if solution.status < 0:
        raise SolverError(f"adiabatic course: solve_ivp (Radau) failed: {solution.message}")
    t_stop = float(solution.t[-1])
    steps_t = solution.t
    steps_temperature = solution.y[0]
    half = n_points // 2
    uniform_time = np.linspace(0.0, t_stop, half)
    levels = np.linspace(t0, float(steps_temperature[-1]), n_points - half)
    # T(t) increases monotonically: invert the solver's own steps for the temperature levels.
    level_time = np.interp(levels, np.maximum.accumulate(steps_temperature), steps_t)
    time = np.unique(np.concatenate([uniform_time, level_time, [0.0, t_stop]]))
    time = time[(time >= 0.0) & (time <= t_stop)]
    temperature = solution.sol(time)[0]
    temperature = np.minimum(np.maximum.accumulate(temperature), t0 + rise)
    if t_end is not None and t_end > t_stop:
        # Zero order after complete release: no heat source, the temperature stays.
        tail = np.linspace(t_stop, t_end, max(2, n_points // 10))[1:]
        time = np.concatenate([time, tail])
        temperature = np.concatenate([temperature, np.full(tail.size, temperature[-1])])
    return time, temperature
