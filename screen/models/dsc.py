"""Decomposition kinetics from dynamic DSC runs (pure numerics on SI arrays).

Contents
--------
- Temperature integral and its logarithmic derivative (exact, via the exponential integral).
- Kissinger regression, the ASTM E698 peak-temperature procedure with its iterative refinement,
  Friedman and Flynn-Wall-Ozawa isoconversional activation energies, with t-distribution
  confidence intervals from the linear regressions.
- Thermogram peak analysis: baseline (linear or sigmoidal), integration to the decomposition
  energy, peak temperature, extrapolated onset and the temperature at which the signal first
  exceeds a given detection limit; conversion and rate profiles.
- A reaction model fitted to all runs at once (nth order, or autocatalytic extended
  Prout-Tompkins ``alpha**m (1 - alpha)**n`` with an initial conversion), with the choice
  explained; simulation of the fitted model under linear heating.
- Zero-order time to maximum rate (Townsend & Tou) and TD24 by a bracketing root finder,
  including a crude single-onset estimate under stated worst-case assumptions.

Units: temperatures in K, times in s, heating rates in K/s, heat flows in W/kg (exotherm
positive), energies in J/kg, activation energies in J/mol, pre-exponential factors in 1/s.

Only numpy, scipy, :mod:`screen.constants` and :mod:`screen.errors` are imported here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import ModelDomainError, SolverError

#: Doyle's linear approximation of log10 p(x): log10 p(x) ~ -2.315 - 0.4567 x for 20 <= x <= 60
#: (C. D. Doyle, J. Appl. Polym. Sci. 6 (1962) 639; from memory). Starting value of the
#: Flynn-Wall-Ozawa / ASTM E698 iteration.
DOYLE_SLOPE = 0.4567

#: Conversion range over which the spread of the isoconversional activation energy is judged
#: (design; the ICTAC recommendations evaluate Ea over roughly 0.05-0.95, from memory).
SPREAD_CONVERSION_RANGE = (0.1, 0.9)

#: Relative spread (max - min) / mean of Ea(alpha) over SPREAD_CONVERSION_RANGE above which the
#: process is treated as multi-step (design threshold; no published number).
SPREAD_THRESHOLD = 0.20

#: Smallest autocatalytic exponent m for which the autocatalytic model is preferred (design).
AUTOCATALYTIC_EXPONENT_THRESHOLD = 0.2

#: Smallest m accepted when the user forces the autocatalytic model (design).
AUTOCATALYTIC_EXPONENT_MINIMUM = 0.05

#: Akaike-criterion improvement required to prefer the autocatalytic model (design).
AUTOCATALYTIC_AIC_GAIN = 10.0

#: Worst-case assumptions of the crude single-onset TD24 estimate (after Keller et al.,
#: J. Loss Prev. Process Ind. 10 (1997) 31-41, from memory): zero order, low activation energy.
CRUDE_ACTIVATION_ENERGY = 50.0e3  # [J/mol]

#: Assumed detection limit of a dynamic DSC [W/kg]: upper end of the 10-20 W/kg range usually
#: quoted for the instruments (design / from memory); the upper end gives the lower TD24.
CRUDE_DETECTION_LIMIT = 20.0  # [W/kg]

#: Default specific heat for TD24 estimates when none is given [J/(kg K)]: a low value for
#: organic reaction masses, which shortens the time to maximum rate (design).
DEFAULT_SPECIFIC_HEAT = 1500.0


# --------------------------------------------------------------------------------------------
# Temperature integral
# --------------------------------------------------------------------------------------------


def _one_minus_scaled_exp1(x):
    """1 - x e^x E1(x) for x > 0, i.e. x^2 e^x p(x) / x (helper; see temperature_integral)."""
    from scipy.special import exp1

    x = np.asarray(x, dtype=float)
    # e^x E1(x) stays O(1/x); the product is formed in the log domain to avoid overflow.
    with np.errstate(over="ignore", under="ignore"):
        scaled = np.exp(x + np.log(exp1(x)))
    return 1.0 - x * scaled


def temperature_integral(temperature, activation_energy):
    """Arrhenius temperature integral from absolute zero.

    Parameters
    ----------
    temperature : float or array_like
        Upper limit. [K]
    activation_energy : float
        Activation energy. [J/mol]

    Returns
    -------
    numpy.ndarray or float
        I(T) = integral_0^T exp(-E/(R T')) dT' = (E/R) p(x) = T exp(-x) (1 - x e^x E1(x)),
        with x = E/(R T) and E1 the exponential integral. [K]

    Notes
    -----
    Exact closed form of the temperature integral (derived: substitute u = E/(R T') and
    integrate e^-u / u^2 by parts; see e.g. Flynn, Thermochim. Acta 300 (1997) 83). Accurate for
    1 < x < 700; outside that range :class:`~screen.errors.ModelDomainError` is raised.
    """
    temperature = np.asarray(temperature, dtype=float)
    if activation_energy <= 0 or np.any(temperature <= 0):
        raise ModelDomainError(
            "temperature integral needs E > 0 and T > 0 K", key="activation_energy"
        )
    x = activation_energy / (GAS_CONSTANT * temperature)
    if np.any(x < 1.0) or np.any(x > 700.0):
        raise ModelDomainError(
            f"E/(R T) = {float(np.min(x)):.3g}..{float(np.max(x)):.3g} outside 1..700 "
            "where the temperature integral is evaluated",
            key="activation_energy",
        )
    result = temperature * np.exp(-x) * _one_minus_scaled_exp1(x)
    return result if result.ndim else float(result)


def temperature_integral_log_derivative(reduced_activation_energy):
    """Logarithmic derivative D(x) = -d ln p(x)/dx of the temperature integral p(x).

    Parameters
    ----------
    reduced_activation_energy : float or array_like
        x = E/(R T). [-]

    Returns
    -------
    numpy.ndarray or float
        D(x) = exp(-x) / (x^2 p(x)) = 1 / (x (1 - x e^x E1(x))). [-]
        D/ln(10) is the ``b`` of the Flynn-Wall-Ozawa method (Doyle: b ~ 0.4567).

    Notes
    -----
    For a constant conversion, log10(beta) = const + log10 p(E/(R T)), hence
    d log10(beta)/d(1/T) = -(E/R) D(x)/ln 10 and E = -(R ln10 / D) d log10(beta)/d(1/T).
    ASTM E698 and E1641 tabulate this factor against E/RT for the refinement of E; here it is
    computed from the exact integral instead of read from the table (derived).
    """
    x = np.asarray(reduced_activation_energy, dtype=float)
    if np.any(x < 1.0) or np.any(x > 700.0):
        raise ModelDomainError("E/(R T) outside 1..700 for the temperature-integral derivative")
    result = 1.0 / (x * _one_minus_scaled_exp1(x))
    return result if result.ndim else float(result)


# --------------------------------------------------------------------------------------------
# Linear regression with confidence intervals
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class LinearFit:
    """Ordinary least-squares straight line y = intercept + slope x.

    Attributes
    ----------
    slope, intercept : float
        Fitted coefficients. [units of y / units of x], [units of y]
    slope_standard_error, intercept_standard_error, covariance : float or None
        Standard errors and covariance of the coefficients; None when fewer than three points.
    residual_degrees_of_freedom : int
        n - 2.
    r_squared : float
        Coefficient of determination. [-]
    t_quantile : float or None
        Two-sided Student-t quantile for ``confidence_level``; None when n < 3.
    confidence_level : float
        Confidence level of the intervals. [-]
    """

    slope: float
    intercept: float
    slope_standard_error: float | None
    intercept_standard_error: float | None
    covariance: float | None
    residual_degrees_of_freedom: int
    r_squared: float
    t_quantile: float | None
    confidence_level: float


def linear_regression(x, y, confidence_level=0.95):
    """Straight-line least squares with Student-t confidence information.

    Parameters
    ----------
    x, y : array_like
        Abscissa and ordinate, at least two points with distinct x. [any]
    confidence_level : float
        Two-sided confidence level of the intervals. [-]

    Returns
    -------
    LinearFit
        Slope, intercept, their standard errors and covariance (textbook OLS formulas:
        s^2 = RSS/(n-2), var(slope) = s^2/Sxx, var(intercept) = s^2 (1/n + xbar^2/Sxx),
        cov = -xbar s^2/Sxx) and the t quantile t_{(1+cl)/2, n-2}. [object]
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    n = x.size
    if n < 2 or y.size != n:
        raise ModelDomainError("a straight-line fit needs at least two points")
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise ModelDomainError("non-finite value in regression data")
    if not 0.5 <= confidence_level < 1.0:
        raise ModelDomainError("confidence level must lie in [0.5, 1)")
    x_mean = x.mean()
    sxx = float(np.sum((x - x_mean) ** 2))
    if sxx <= 0.0 or sxx < 1e-24 * max(1.0, float(np.sum(x**2))):
        raise ModelDomainError("all abscissae equal: the slope is undefined")
    slope = float(np.sum((x - x_mean) * (y - y.mean())) / sxx)
    intercept = float(y.mean() - slope * x_mean)
    residuals = y - intercept - slope * x
    rss = float(np.sum(residuals**2))
    tss = float(np.sum((y - y.mean()) ** 2))
    r_squared = 1.0 - rss / tss if tss > 0 else 1.0
    dof = n - 2
    if dof < 1:
        return LinearFit(slope, intercept, None, None, None, dof, r_squared, None, confidence_level)
    from scipy.stats import t as student_t

    s2 = rss / dof
    return LinearFit(
        slope=slope,
        intercept=intercept,
        slope_standard_error=math.sqrt(s2 / sxx),
        intercept_standard_error=math.sqrt(s2 * (1.0 / n + x_mean**2 / sxx)),
        covariance=-x_mean * s2 / sxx,
        residual_degrees_of_freedom=dof,
        r_squared=r_squared,
        t_quantile=float(student_t.ppf(0.5 * (1.0 + confidence_level), dof)),
        confidence_level=confidence_level,
    )


def _check_runs(heating_rates, temperatures, what):
    beta = np.asarray(heating_rates, dtype=float)
    temp = np.asarray(temperatures, dtype=float)
    if beta.shape != temp.shape or beta.ndim != 1:
        raise ModelDomainError(f"{what}: one heating rate per temperature is required")
    if beta.size < 2:
        raise ModelDomainError(f"{what}: at least two runs are needed (three recommended)")
    if np.any(~np.isfinite(beta)) or np.any(beta <= 0):
        raise ModelDomainError(f"{what}: heating rates must be positive")
    if np.any(~np.isfinite(temp)) or np.any(temp <= 0):
        raise ModelDomainError(f"{what}: temperatures must be positive kelvin values")
    if np.unique(beta).size < 2:
        raise ModelDomainError(f"{what}: at least two different heating rates are needed")
    if np.unique(temp).size < 2:
        raise ModelDomainError(f"{what}: all runs have the same temperature, so the slope is "
                               f"undefined; check the temperatures of the runs")
    with np.errstate(all="ignore"):
        ordinate = np.log(beta / temp**2)
    if not np.all(np.isfinite(ordinate)):
        raise ModelDomainError(f"{what}: heating rates or temperatures outside the range of "
                               f"floating-point numbers; check their values and units")
    return beta, temp


#: Largest reduced activation energy E/(R Tp) accepted from a peak-temperature analysis [-]
#: (design): exp(E/(R Tp)) in the pre-exponential factor overflows near 709.
MAX_REDUCED_ACTIVATION_ENERGY = 700.0


def _check_reduced_activation_energy(energy, temperatures, what):
    """Raise ModelDomainError when E/(R T) at the lowest temperature exceeds the limit."""
    reduced = energy / (GAS_CONSTANT * float(np.min(temperatures)))
    if not math.isfinite(reduced) or reduced > MAX_REDUCED_ACTIVATION_ENERGY:
        raise ModelDomainError(
            f"{what}: E = {energy / 1e3:.4g} kJ/mol gives E/(R Tp) = {reduced:.4g}, above "
            f"{MAX_REDUCED_ACTIVATION_ENERGY:.0f}: the peak temperatures hardly move with the "
            f"heating rate; check the heating rates and peak temperatures")


# --------------------------------------------------------------------------------------------
# Kissinger and ASTM E698
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class KissingerResult:
    """Kissinger analysis of peak temperatures.

    Attributes
    ----------
    activation_energy : float
        E = -R slope. [J/mol]
    activation_energy_interval : tuple of float or None
        Confidence interval of E (t distribution, n - 2 degrees of freedom). [J/mol]
    activation_energy_standard_error : float or None
        [J/mol]
    ln_pre_exponential_factor : float
        ln A with A in 1/s, first-order assumption. [-]
    ln_pre_exponential_factor_interval : tuple of float or None
        Confidence interval of ln A (delta method with the slope-intercept covariance). [-]
    pre_exponential_factor : float
        A. [1/s]
    r_squared : float
        Of the Kissinger plot. [-]
    heating_rates, peak_temperatures : numpy.ndarray
        Input data. [K/s], [K]
    fit : LinearFit
        Regression of ln(beta/Tp^2) on 1/Tp.
    """

    activation_energy: float
    activation_energy_interval: tuple | None
    activation_energy_standard_error: float | None
    ln_pre_exponential_factor: float
    ln_pre_exponential_factor_interval: tuple | None
    pre_exponential_factor: float
    r_squared: float
    heating_rates: np.ndarray
    peak_temperatures: np.ndarray
    fit: LinearFit

    @property
    def number_of_runs(self):
        """Number of runs in the regression. [-]"""
        return int(self.heating_rates.size)


def kissinger(heating_rates, peak_temperatures, confidence_level=0.95):
    """Activation energy and pre-exponential factor by the Kissinger method.

    Parameters
    ----------
    heating_rates : array_like
        Linear heating rates beta of the runs. [K/s]
    peak_temperatures : array_like
        Temperatures of the maximum heat flow Tp of the same runs. [K]
    confidence_level : float
        Two-sided confidence level. [-]

    Returns
    -------
    KissingerResult
        E, ln A, their intervals and the regression. [object]

    Notes
    -----
    ln(beta/Tp^2) = ln(A R/E) - E/(R Tp): a straight line in 1/Tp with slope -E/R
    (H. E. Kissinger, Anal. Chem. 29 (1957) 1702-1706; standardised as ASTM E2890 and used for
    the pre-exponential factor in ASTM E698). The relation is exact at the rate maximum of a
    first-order reaction; for other models it holds approximately. The pre-exponential factor
    follows from the intercept, ln A = intercept + ln(E/R), which is the regression form of
    A = (beta E/(R Tp^2)) exp(E/(R Tp)) and assumes first order. The interval on ln A uses
    var(ln A) = var(c) + var(s)/s^2 + 2 cov(c, s)/s (delta method, derived).

    Examples
    --------
    Two runs, 5 K/min peaking at 500 K and 20 K/min peaking at 520 K. Through two points the
    Kissinger line gives, by hand,
    E = R ln[(beta2/T2^2)/(beta1/T1^2)] / (1/T1 - 1/T2)
      = 8.314462618 * ln(4 * (500/520)^2) / (1/500 - 1/520)
      = 8.314462618 * ln(3.698225) / 7.692308e-5 = 8.314462618 * 1.307853 / 7.692308e-5
      = 141363 J/mol,
    and ln A = ln(beta1 E/(R T1^2)) + E/(R T1) = ln(0.0833333 * 141363 / (8.314462618 * 500^2))
    + 141363/(8.314462618 * 500) = ln(5.6670e-3) + 34.0043 = -5.1731 + 34.0043 = 28.831.

    >>> result = kissinger([5.0 / 60.0, 20.0 / 60.0], [500.0, 520.0])
    >>> round(result.activation_energy)
    141363
    >>> round(result.ln_pre_exponential_factor, 2)
    28.83
    """
    beta, tp = _check_runs(heating_rates, peak_temperatures, "Kissinger")
    fit = linear_regression(1.0 / tp, np.log(beta / tp**2), confidence_level)
    if fit.slope >= 0:
        raise ModelDomainError(
            "Kissinger: peak temperature does not rise with heating rate, so no positive "
            "activation energy exists; check the heating rates and peak temperatures"
        )
    energy = -GAS_CONSTANT * fit.slope
    _check_reduced_activation_energy(energy, tp, "Kissinger")
    ln_a = fit.intercept + math.log(-fit.slope)
    energy_interval = ln_a_interval = energy_se = None
    if fit.t_quantile is not None:
        energy_se = GAS_CONSTANT * fit.slope_standard_error
        half = fit.t_quantile * energy_se
        energy_interval = (energy - half, energy + half)
        var_ln_a = (
            fit.intercept_standard_error**2
            + fit.slope_standard_error**2 / fit.slope**2
            + 2.0 * fit.covariance / fit.slope
        )
        half_a = fit.t_quantile * math.sqrt(max(var_ln_a, 0.0))
        ln_a_interval = (ln_a - half_a, ln_a + half_a)
    return KissingerResult(
        activation_energy=energy,
        activation_energy_interval=energy_interval,
        activation_energy_standard_error=energy_se,
        ln_pre_exponential_factor=ln_a,
        ln_pre_exponential_factor_interval=ln_a_interval,
        pre_exponential_factor=math.exp(ln_a),
        r_squared=fit.r_squared,
        heating_rates=beta,
        peak_temperatures=tp,
        fit=fit,
    )


def kissinger_pre_exponential_factor(heating_rate, peak_temperature, activation_energy):
    """Pre-exponential factor of one run from the Kissinger relation (first order).

    Parameters
    ----------
    heating_rate : float or array_like
        Heating rate beta. [K/s]
    peak_temperature : float or array_like
        Peak temperature Tp. [K]
    activation_energy : float
        E. [J/mol]

    Returns
    -------
    float or numpy.ndarray
        A = (beta E/(R Tp^2)) exp(E/(R Tp)). [1/s]

    Notes
    -----
    Kissinger (1957); the form used by ASTM E698 for the Arrhenius pre-exponential factor
    (from memory). Assumes first-order kinetics.
    """
    beta = np.asarray(heating_rate, dtype=float)
    tp = np.asarray(peak_temperature, dtype=float)
    if np.any(beta <= 0) or np.any(tp <= 0) or activation_energy <= 0:
        raise ModelDomainError("Kissinger A needs positive heating rate, temperature and E")
    x = activation_energy / (GAS_CONSTANT * tp)
    if np.any(x > 700):
        raise ModelDomainError("E/(R Tp) > 700: pre-exponential factor overflows")
    result = beta * activation_energy / (GAS_CONSTANT * tp**2) * np.exp(x)
    return result if result.ndim else float(result)


@dataclass(frozen=True)
class AstmE698Result:
    """Peak-temperature analysis in the form of ASTM E698 (log10 beta against 1/Tp).

    Attributes
    ----------
    activation_energy : float
        Refined activation energy. [J/mol]
    first_approximation : float
        E from Doyle's constant, E = -(R/0.4567) d log10(beta)/d(1/Tp). [J/mol]
    activation_energy_interval : tuple of float or None
        Confidence interval of the refined E (slope interval scaled by the final factor). [J/mol]
    iterations : int
        Refinement steps until the relative change fell below the tolerance.
    derivative_factor : float
        Final D(x) = -d ln p(x)/dx at x = E/(R Tp,mean). [-]
    pre_exponential_factor : float
        A from the Kissinger relation at the run closest to the middle of the heating-rate range
        (logarithmic). [1/s]
    fit : LinearFit
        Regression of log10(beta) on 1/Tp.
    """

    activation_energy: float
    first_approximation: float
    activation_energy_interval: tuple | None
    iterations: int
    derivative_factor: float
    pre_exponential_factor: float
    fit: LinearFit


def _refine_flynn_wall_ozawa(slope, mean_temperature, tolerance, max_iterations):
    """Iterate E = -(R ln10/D(x)) slope with x = E/(R T); slope of log10(beta) vs 1/T."""
    energy0 = -GAS_CONSTANT * slope / DOYLE_SLOPE
    energy = energy0
    factor = DOYLE_SLOPE * math.log(10.0)
    for iteration in range(1, max_iterations + 1):
        x = energy / (GAS_CONSTANT * mean_temperature)
        factor = float(temperature_integral_log_derivative(x))
        new_energy = -GAS_CONSTANT * math.log(10.0) * slope / factor
        converged = abs(new_energy - energy) <= tolerance * abs(new_energy)
        energy = new_energy
        if converged:
            return energy0, energy, factor, iteration
    raise SolverError(
        f"Flynn-Wall-Ozawa refinement did not converge in {max_iterations} steps "
        f"(last E = {energy / 1e3:.1f} kJ/mol)"
    )


def astm_e698(heating_rates, peak_temperatures, confidence_level=0.95, tolerance=1e-6,
              max_iterations=100):
    """Activation energy from peak temperatures by the ASTM E698 procedure, refined.

    Parameters
    ----------
    heating_rates : array_like
        Heating rates beta. [K/s]
    peak_temperatures : array_like
        Peak temperatures Tp. [K]
    confidence_level : float
        Two-sided confidence level. [-]
    tolerance : float
        Relative change of E that ends the iteration. [-]
    max_iterations : int
        Upper limit of refinement steps. [-]

    Returns
    -------
    AstmE698Result
        Refined E, ln A and their intervals (SI, see the class). [object]

    Notes
    -----
    As reconstructed from memory of ASTM E698 (Flynn-Wall-Ozawa form, not checked against the
    current edition): plot log10(beta) against 1/Tp; first approximation
    E = -2.19 R d log10(beta)/d(1/Tp) (2.19 = 1/0.4567, Doyle's constant); then refine
    E = -(2.303 R / D) d log10(beta)/d(1/Tp) with D looked up against E/(R Tp) and repeat
    until E no longer changes. The standard tabulates D; this function evaluates
    D(x) = -d ln p(x)/dx from the exact temperature integral at the mean peak temperature.
    A follows from the Kissinger relation A = (beta E/(R Tp^2)) exp(E/(R Tp)) for the middle
    run (first order).
    """
    beta, tp = _check_runs(heating_rates, peak_temperatures, "ASTM E698")
    fit = linear_regression(1.0 / tp, np.log10(beta), confidence_level)
    if fit.slope >= 0:
        raise ModelDomainError(
            "ASTM E698: peak temperature does not rise with heating rate; check the data"
        )
    _check_reduced_activation_energy(-GAS_CONSTANT * fit.slope / DOYLE_SLOPE, tp, "ASTM E698")
    first, energy, factor, iterations = _refine_flynn_wall_ozawa(
        fit.slope, float(np.mean(tp)), tolerance, max_iterations
    )
    _check_reduced_activation_energy(energy, tp, "ASTM E698")
    interval = None
    if fit.t_quantile is not None:
        scale = GAS_CONSTANT * math.log(10.0) / factor
        half = fit.t_quantile * fit.slope_standard_error * scale
        interval = (energy - half, energy + half)
    log_beta = np.log(beta)
    middle = int(np.argmin(np.abs(log_beta - 0.5 * (log_beta.min() + log_beta.max()))))
    a = kissinger_pre_exponential_factor(beta[middle], tp[middle], energy)
    return AstmE698Result(energy, first, interval, iterations, factor, a, fit)


# --------------------------------------------------------------------------------------------
# Isoconversional methods
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class IsoconversionalResult:
    """Activation energy against conversion.

    Attributes
    ----------
    method : str
        "friedman" or "flynn-wall-ozawa".
    conversion : numpy.ndarray
        Conversion levels alpha. [-]
    activation_energy : numpy.ndarray
        E_alpha. [J/mol]
    lower, upper : numpy.ndarray or None
        Confidence limits of E_alpha (t distribution, runs - 2 degrees of freedom); None with
        two runs. [J/mol]
    intercept : numpy.ndarray
        Regression intercepts: ln(A f(alpha)) [ln(1/s)] for Friedman, log10(beta) at 1/T = 0
        for Flynn-Wall-Ozawa. [-]
    r_squared : numpy.ndarray
        Per conversion level. [-]
    confidence_level : float
        Two-sided confidence level of the intervals. [-]
    """

    method: str
    conversion: np.ndarray
    activation_energy: np.ndarray
    lower: np.ndarray | None
    upper: np.ndarray | None
    intercept: np.ndarray
    r_squared: np.ndarray
    confidence_level: float

    def spread(self, conversion_range=SPREAD_CONVERSION_RANGE):
        """Relative spread (max - min)/mean of E_alpha inside ``conversion_range``.

        Parameters
        ----------
        conversion_range : tuple of float
            (low, high) conversion limits, inclusive. [-]

        Returns
        -------
        float
            (max - min)/mean of E_alpha over the levels inside the range. [-]
        """
        return activation_energy_spread(self.conversion, self.activation_energy, conversion_range)

    def mean(self, conversion_range=SPREAD_CONVERSION_RANGE):
        """Mean of E_alpha inside ``conversion_range``.

        Parameters
        ----------
        conversion_range : tuple of float
            (low, high) conversion limits, inclusive. [-]

        Returns
        -------
        float
            Arithmetic mean of E_alpha over the levels inside the range. [J/mol]
        """
        inside = _inside(self.conversion, conversion_range)
        return float(np.mean(self.activation_energy[inside]))


def _inside(conversion, conversion_range):
    low, high = conversion_range
    inside = (conversion >= low - 1e-12) & (conversion <= high + 1e-12)
    if not np.any(inside):
        raise ModelDomainError(f"no conversion level inside {low}..{high}")
    return inside


def activation_energy_spread(conversion, activation_energy, conversion_range=SPREAD_CONVERSION_RANGE):
    """Relative spread of an isoconversional activation energy.

    Parameters
    ----------
    conversion : array_like
        Conversion levels. [-]
    activation_energy : array_like
        E_alpha at those levels. [J/mol]
    conversion_range : tuple of float
        Range of alpha that is judged. [-]

    Returns
    -------
    float
        (max E - min E) / mean E over the range. [-]
    """
    conversion = np.asarray(conversion, dtype=float)
    energy = np.asarray(activation_energy, dtype=float)
    inside = _inside(conversion, conversion_range)
    values = energy[inside]
    return float((values.max() - values.min()) / values.mean())


def _check_isoconversional(conversion, temperatures, what):
    alpha = np.asarray(conversion, dtype=float)
    temp = np.asarray(temperatures, dtype=float)
    if alpha.ndim != 1 or temp.ndim != 2 or temp.shape[1] != alpha.size:
        raise ModelDomainError(f"{what}: temperatures must have shape (runs, conversion levels)")
    if temp.shape[0] < 2:
        raise ModelDomainError(f"{what}: at least two runs are needed (three recommended)")
    if np.any(alpha <= 0) or np.any(alpha >= 1):
        raise ModelDomainError(f"{what}: conversion levels must lie strictly between 0 and 1")
    if np.any(~np.isfinite(temp)) or np.any(temp <= 0):
        raise ModelDomainError(f"{what}: temperatures must be positive and finite")
    return alpha, temp


def friedman(conversion, temperatures, rates, confidence_level=0.95):
    """Friedman differential isoconversional activation energy.

    Parameters
    ----------
    conversion : array_like, shape (k,)
        Conversion levels alpha. [-]
    temperatures : array_like, shape (runs, k)
        Temperature at which each run reaches each level. [K]
    rates : array_like, shape (runs, k)
        Reaction rate d(alpha)/dt of each run at each level. [1/s]
    confidence_level : float
        Two-sided confidence level. [-]

    Returns
    -------
    IsoconversionalResult
        E_alpha per conversion level with intervals (SI, see the class). [object]

    Notes
    -----
    ln(d alpha/dt)_{alpha,i} = ln(A_alpha f(alpha)) - E_alpha/(R T_{alpha,i}), one regression
    per conversion level over the runs (H. L. Friedman, J. Polym. Sci. C 6 (1964) 183-195;
    recommended in Vyazovkin et al., Thermochim. Acta 520 (2011) 1-19). No approximation of the
    temperature integral is involved, so single-step data give the exact E.
    """
    alpha, temp = _check_isoconversional(conversion, temperatures, "Friedman")
    rate = np.asarray(rates, dtype=float)
    if rate.shape != temp.shape or np.any(~np.isfinite(rate)) or np.any(rate <= 0):
        raise ModelDomainError("Friedman: rates must be positive, finite, shaped like temperatures")
    energies, lower, upper, intercepts, r2 = [], [], [], [], []
    for j in range(alpha.size):
        fit = linear_regression(1.0 / temp[:, j], np.log(rate[:, j]), confidence_level)
        energy = -GAS_CONSTANT * fit.slope
        energies.append(energy)
        intercepts.append(fit.intercept)
        r2.append(fit.r_squared)
        if fit.t_quantile is not None:
            half = fit.t_quantile * GAS_CONSTANT * fit.slope_standard_error
            lower.append(energy - half)
            upper.append(energy + half)
    have_ci = len(lower) == alpha.size
    return IsoconversionalResult(
        "friedman", alpha, np.array(energies),
        np.array(lower) if have_ci else None, np.array(upper) if have_ci else None,
        np.array(intercepts), np.array(r2), confidence_level,
    )


def flynn_wall_ozawa(conversion, temperatures, heating_rates, confidence_level=0.95,
                     refine=True, tolerance=1e-6, max_iterations=100):
    """Flynn-Wall-Ozawa integral isoconversional activation energy.

    Parameters
    ----------
    conversion : array_like, shape (k,)
        Conversion levels alpha. [-]
    temperatures : array_like, shape (runs, k)
        Temperature at which each run reaches each level. [K]
    heating_rates : array_like, shape (runs,)
        Heating rates. [K/s]
    confidence_level : float
        Two-sided confidence level. [-]
    refine : bool
        Refine Doyle's constant iteratively with the exact D(x) (as in ASTM E1641/E698). [bool]
    tolerance : float
        Relative change of E that ends the refinement. [-]
    max_iterations : int
        Upper limit of refinement steps. [-]

    Returns
    -------
    IsoconversionalResult
        E_alpha per conversion level with intervals (SI, see the class). [object]

    Notes
    -----
    log10 beta_i = const - 0.4567 E_alpha/(R T_{alpha,i}) with Doyle's approximation
    (T. Ozawa, Bull. Chem. Soc. Jpn. 38 (1965) 1881; J. H. Flynn and L. A. Wall, J. Polym. Sci.
    B 4 (1966) 323), so E = -(R/0.4567) slope; refined by replacing 0.4567 with
    D(x)/ln 10 at x = E/(R T_alpha,mean) until E is stationary (procedure of ASTM E1641 with its
    table replaced by the exact derivative; from memory). The integral form assumes E constant
    from 0 to alpha, so it smooths and lags a varying E; it serves as a cross-check.
    """
    alpha, temp = _check_isoconversional(conversion, temperatures, "Flynn-Wall-Ozawa")
    beta = np.asarray(heating_rates, dtype=float)
    if beta.shape != (temp.shape[0],) or np.any(beta <= 0):
        raise ModelDomainError("Flynn-Wall-Ozawa: one positive heating rate per run")
    if np.unique(beta).size < 2:
        raise ModelDomainError("Flynn-Wall-Ozawa: at least two different heating rates")
    energies, lower, upper, intercepts, r2 = [], [], [], [], []
    for j in range(alpha.size):
        fit = linear_regression(1.0 / temp[:, j], np.log10(beta), confidence_level)
        if fit.slope >= 0:
            raise ModelDomainError(
                f"Flynn-Wall-Ozawa: at alpha = {alpha[j]:.2f} the temperature does not rise "
                "with heating rate"
            )
        if refine:
            _, energy, factor, _ = _refine_flynn_wall_ozawa(
                fit.slope, float(np.mean(temp[:, j])), tolerance, max_iterations
            )
        else:
            energy = -GAS_CONSTANT * fit.slope / DOYLE_SLOPE
            factor = DOYLE_SLOPE * math.log(10.0)
        energies.append(energy)
        intercepts.append(fit.intercept)
        r2.append(fit.r_squared)
        if fit.t_quantile is not None:
            half = fit.t_quantile * fit.slope_standard_error * GAS_CONSTANT * math.log(10.0) / factor
            lower.append(energy - half)
            upper.append(energy + half)
    have_ci = len(lower) == alpha.size
    return IsoconversionalResult(
        "flynn-wall-ozawa", alpha, np.array(energies),
        np.array(lower) if have_ci else None, np.array(upper) if have_ci else None,
        np.array(intercepts), np.array(r2), confidence_level,
    )


# --------------------------------------------------------------------------------------------
# Thermogram analysis
# --------------------------------------------------------------------------------------------


def noise_level(signal):
    """Robust standard deviation of the white noise on a sampled signal.

    Parameters
    ----------
    signal : array_like
        Equally or nearly equally sampled signal. [any]

    Returns
    -------
    float
        sigma = 1.4826 MAD(second differences) / sqrt(6); the second difference removes a
        smooth trend and has variance 6 sigma^2 for white noise (derived). [units of signal]
    """
    y = np.asarray(signal, dtype=float)
    if y.size < 5:
        return 0.0
    d2 = np.diff(y, 2)
    return float(1.4826 * np.median(np.abs(d2 - np.median(d2))) / math.sqrt(6.0))


def smooth(signal, window):
    """Savitzky-Golay smoothing (cubic) with an odd window, or a copy when too short.

    Parameters
    ----------
    signal : array_like
        Sampled signal. [any]
    window : int
        Window length in samples (made odd, at least 5). [-]

    Returns
    -------
    numpy.ndarray
        Smoothed signal: least-squares cubic through each window, evaluated at its centre; the
        first and last half-windows take the cubic fitted to the first and last window
        (A. Savitzky and M. J. E. Golay, Anal. Chem. 36 (1964) 1627). Plain numpy, because
        importing scipy.signal costs seconds. [any]
    """
    y = np.asarray(signal, dtype=float)
    window = int(window) | 1
    if window < 5 or y.size <= window:
        return y.copy()
    half = window // 2
    offsets = np.arange(-half, half + 1, dtype=float)
    vandermonde = np.vander(offsets, 4, increasing=True)
    projector = np.linalg.pinv(vandermonde)  # rows: polynomial coefficients from samples
    out = np.empty_like(y)
    out[half:-half] = np.convolve(y, projector[0][::-1], mode="valid")
    head = vandermonde[:half] @ (projector @ y[:window])
    tail = vandermonde[-half:] @ (projector @ y[-window:])
    out[:half] = head
    out[-half:] = tail
    return out


def exotherm_sign(time, heat_flow):
    """Direction of the dominant thermal event from the integral sign.

    Parameters
    ----------
    time : array_like
        Time. [s]
    heat_flow : array_like
        Heat-flow signal as recorded. [W/kg]

    Returns
    -------
    sign : float
        +1 when the dominant event points up, -1 when it points down. [-]
    minor_fraction : float
        Area of the opposite-signed lobes divided by the dominant area (0 for a clean single
        event; values near 1 mean the direction is ambiguous). [-]

    Notes
    -----
    A straight line through the medians of the first and last 5 % of the record approximates
    the baseline; the areas above and below it are compared (design). When the slopes of the
    first and last 5 % differ by more than 10 % of the largest excursion over such a stretch,
    the record starts or ends inside an event and ``minor_fraction`` is set to 1 (design).
    """
    t = np.asarray(time, dtype=float)
    y = np.asarray(heat_flow, dtype=float)
    n = y.size
    k = max(3, n // 20)
    t0, t1 = np.median(t[:k]), np.median(t[-k:])
    y0, y1 = np.median(y[:k]), np.median(y[-k:])
    dt = np.gradient(t)
    window = max(5, n // 200)

    def lobes(line):
        d = smooth(y - line, window)
        return (float(np.sum(np.clip(d, 0, None) * dt)), float(np.sum(np.clip(-d, 0, None) * dt)))

    positive, negative = lobes(y0 + (y1 - y0) * (t - t0) / (t1 - t0))
    if positive == 0 and negative == 0:
        raise ModelDomainError("flat signal: no thermal event found")
    sign = 1.0 if positive >= negative else -1.0
    minor = min(positive, negative) / max(positive, negative)
    # a record that starts or ends inside a peak fools the line through both ends; there the
    # slope differs from the baseline slope at the other end (a linear drift does not)
    slope_start = np.polyfit(t[:k], y[:k], 1)[0]
    slope_end = np.polyfit(t[-k:], y[-k:], 1)[0]
    change = abs(slope_end - slope_start) * max(t[k - 1] - t[0], t[-1] - t[-k])
    excursion = float(np.max(np.abs(smooth(y - (y0 + (y1 - y0) * (t - t0) / (t1 - t0)), window))))
    if change > max(0.1 * excursion, 20.0 * noise_level(y) / math.sqrt(k)):
        minor = 1.0
    return sign, minor


@dataclass
class PeakAnalysis:
    """Result of the analysis of one exothermic peak.

    Attributes
    ----------
    start_index, end_index : int
        Integration limits (inclusive indices).
    baseline : numpy.ndarray
        Baseline over the whole record. [W/kg]
    corrected : numpy.ndarray
        Signal minus baseline, zero outside the limits. [W/kg]
    energy : float
        Integral of the corrected signal over time. [J/kg]
    conversion : numpy.ndarray
        Cumulative fraction of the energy (0 before, 1 after the peak). [-]
    rate : numpy.ndarray
        corrected / energy = d alpha/dt. [1/s]
    peak_temperature : float
        Temperature of maximum corrected heat flow (quadratic refinement). [K]
    peak_height : float
        Maximum corrected heat flow. [W/kg]
    onset_temperature : float
        Extrapolated onset: tangent at the inflection point of the leading edge intersected
        with the baseline. [K]
    detection_temperature : float or None
        First temperature (walking down from the peak) at which the smoothed corrected signal
        reaches ``detection_limit``; None when the peak stays below it. [K]
    heating_rate : float
        Slope of temperature against time over the integration range. [K/s]
    baseline_kind : str
        "linear" or "sigmoidal".
    truncated_start, truncated_end : bool
        True when the peak had not returned to the baseline at the start/end of the record.
    noise : float
        Estimated noise standard deviation of the signal. [W/kg]
    """

    start_index: int
    end_index: int
    baseline: np.ndarray
    corrected: np.ndarray
    energy: float
    conversion: np.ndarray
    rate: np.ndarray
    peak_temperature: float
    peak_height: float
    onset_temperature: float
    detection_temperature: float | None
    heating_rate: float
    baseline_kind: str
    truncated_start: bool
    truncated_end: bool
    noise: float
    time: np.ndarray = field(repr=False)
    temperature: np.ndarray = field(repr=False)
    signal: np.ndarray = field(repr=False)


def _smoothing_gain(window):
    """Noise standard deviation after :func:`smooth` relative to before (centre coefficients)."""
    window = int(window) | 1
    if window < 5:
        return 1.0
    half = window // 2
    offsets = np.arange(-half, half + 1, dtype=float)
    centre = np.linalg.pinv(np.vander(offsets, 4, increasing=True))[0]
    return float(np.sqrt(np.sum(centre**2)))


def _edge_mean(values, index, half_width, lo, hi):
    a, b = max(lo, index - half_width), min(hi, index + half_width) + 1
    return float(np.mean(values[a:b]))


def _find_limits(s_smooth, peak, threshold, extension=0.5):
    """Walk outward from the peak to where the smoothed signal falls below threshold, then go on
    by ``extension`` times that distance into the baseline to take in the tails (design)."""
    n = s_smooth.size
    left = peak
    while left > 0 and s_smooth[left] > threshold:
        left -= 1
    left = max(0, left - int(round(extension * (peak - left))))
    right = peak
    while right < n - 1 and s_smooth[right] > threshold:
        right += 1
    right = min(n - 1, right + int(round(extension * (right - peak))))
    return left, right


def _onset_and_detection(temp, s_smooth, start, peak, height, detection_limit):
    """Extrapolated onset [K] (tangent at the steepest point of the leading edge, the usual
    extrapolated-onset construction; verify against ASTM E537) and the temperature where the
    corrected signal first reaches the detection limit [K] (None when the peak stays below it)."""
    # extrapolated onset: steepest point of the leading edge
    lead = slice(start, peak + 1)
    if peak - start >= 3:
        slope_edge = np.gradient(s_smooth[lead], temp[lead])
        i = start + int(np.argmax(slope_edge))
        slope_at = float(slope_edge[i - start])
    else:
        i, slope_at = peak, 0.0
    if slope_at > 0:
        onset = float(temp[i] - s_smooth[i] / slope_at)
    else:
        onset = float(temp[start])

    detection = None
    if height >= detection_limit:
        j = peak
        while j > start and s_smooth[j] >= detection_limit:
            j -= 1
        if s_smooth[j] < detection_limit:
            fraction = (detection_limit - s_smooth[j]) / (s_smooth[j + 1] - s_smooth[j])
            detection = float(temp[j] + fraction * (temp[j + 1] - temp[j]))
        else:
            detection = float(temp[start])

    return onset, detection


def _sigmoidal_baseline(t, y, base, s, sel, start, end, ya, yb, corrected_with):
    """Iterate the sigmoidal baseline (the baseline follows the conversion between the two
    anchors) to a fixed point; returns the baseline and the corrected signal."""
    from scipy.integrate import cumulative_trapezoid

    for _ in range(50):
        cum = cumulative_trapezoid(s[sel], t[sel], initial=0.0)
        if cum[-1] <= 0:
            break
        alpha = np.clip(cum / cum[-1], 0.0, 1.0)
        new_base = base.copy()
        new_base[sel] = ya + (yb - ya) * alpha
        new_base[:start] = ya
        new_base[end + 1:] = yb
        change = float(np.max(np.abs(new_base - base)))
        base = new_base
        s = corrected_with(base)
        if change <= 1e-9 * max(1.0, float(np.max(np.abs(y)))):
            break
    return base, s


def analyse_peak(time, temperature, heat_flow, baseline="linear", temperature_window=None,
                 detection_limit=CRUDE_DETECTION_LIMIT, threshold_fraction=0.005):
    """Baseline, energy, conversion, peak and onset temperatures of an exothermic DSC peak.

    Parameters
    ----------
    time : array_like
        Time, strictly increasing. [s]
    temperature : array_like
        Sample temperature. [K]
    heat_flow : array_like
        Specific heat flow with the exotherm positive. [W/kg]
    baseline : {"linear", "sigmoidal"}
        Baseline construction between the integration limits. [text]
    temperature_window : tuple of float, optional
        (low, high) integration limits; found automatically when omitted. [K]
    detection_limit : float
        Specific heat flow taken as the instrument's detection limit for the detection
        temperature. [W/kg]
    threshold_fraction : float
        Fraction of the peak height (or 4 noise standard deviations, if larger) below which the
        signal counts as back on the baseline when limits are found automatically. [-]

    Returns
    -------
    PeakAnalysis
        Baseline, energy and characteristic temperatures of the run (SI, see the class). [object]

    Notes
    -----
    Linear baseline: straight line between the signal (averaged over a few samples) at the two
    limits. Sigmoidal baseline: b(t) = (1 - alpha(t)) y_start + alpha(t) y_end, iterated with the
    conversion alpha from the corrected signal until it no longer changes (a common DSC
    practice for peaks with a heat-capacity step; design of the iteration). Energy by the
    trapezoidal rule over time. Extrapolated onset: tangent at the steepest point of the
    leading edge (smoothed) intersected with the baseline, as in ISO 11357-1 / ASTM E537
    (from memory).
    """
    t = np.asarray(time, dtype=float)
    temp = np.asarray(temperature, dtype=float)
    y = np.asarray(heat_flow, dtype=float)
    n = y.size
    if t.shape != (n,) or temp.shape != (n,) or n < 20:
        raise ModelDomainError("a thermogram needs at least 20 samples of time, T, heat flow")
    if np.any(~np.isfinite(t)) or np.any(~np.isfinite(temp)) or np.any(~np.isfinite(y)):
        raise ModelDomainError("non-finite value in the thermogram")
    if np.any(np.diff(t) <= 0):
        raise ModelDomainError("time must increase strictly")
    if baseline not in ("linear", "sigmoidal"):
        raise ModelDomainError(f"unknown baseline {baseline!r}; use 'linear' or 'sigmoidal'")
    noise = noise_level(y)

    if temperature_window is not None:
        low, high = temperature_window
        inside = np.nonzero((temp >= low) & (temp <= high))[0]
        if inside.size < 10:
            raise ModelDomainError(
                f"fewer than 10 samples between {low - 273.15:.1f} and {high - 273.15:.1f} degC"
            )
        start, end = int(inside[0]), int(inside[-1])
        window = max(5, (end - start) // 60)
        ys = smooth(y, window)
        line = np.interp(t, [t[start], t[end]], [ys[start], ys[end]])
        peak = start + int(np.argmax((ys - line)[start:end + 1]))
        truncated_start = truncated_end = False
    else:
        k = max(3, n // 20)
        t0, t1 = np.median(t[:k]), np.median(t[-k:])
        y0, y1 = np.median(y[:k]), np.median(y[-k:])
        window = max(5, n // 300)
        ys = smooth(y, window)
        # first guess: line through both ends; if the record ends inside the peak, that line
        # hides it, and a flat line at the starting level is used instead (design)
        line = y0 + (y1 - y0) * (t - t0) / (t1 - t0)
        height_ends = float(np.max(ys - line))
        height_flat = float(np.max(ys - y0))
        if height_flat > 2.0 * max(height_ends, 0.0):
            line = np.full(n, y0)
        for _ in range(3):
            s0 = ys - line
            peak = int(np.argmax(s0))
            height = s0[peak]
            if height <= 4 * noise or height <= 0:
                raise ModelDomainError(
                    "no exothermic peak above the noise; check the exotherm direction"
                )
            # 4 standard deviations of the noise left after smoothing
            threshold = max(threshold_fraction * height, 4.0 * noise * _smoothing_gain(window))
            start, end = _find_limits(s0, peak, threshold)
            # smoothing window from the peak width, then a straight line through the limits
            window = max(5, (end - start) // 60)
            ys = smooth(y, window)
            edge = max(3, (end - start) // 40)
            ya = _edge_mean(y, start, edge, 0, n - 1)
            yb = _edge_mean(y, end, edge, 0, n - 1)
            # a limit at the end of the record inside the peak is no baseline point: the
            # baseline is then held level from the other limit (design)
            truncated_start = start == 0 and s0[0] > threshold
            truncated_end = end == n - 1 and s0[-1] > threshold
            if truncated_end and not truncated_start:
                yb = ya
            elif truncated_start and not truncated_end:
                ya = yb
            line = ya + (yb - ya) * (t - t[start]) / (t[end] - t[start])

    # baseline anchors: mean of the raw signal over a band of 2.5 % of the range at each limit
    edge = max(3, (end - start) // 40)
    ya = _edge_mean(y, start, edge, start, end)
    yb = _edge_mean(y, end, edge, start, end)
    if truncated_end and not truncated_start:
        yb = ya
    elif truncated_start and not truncated_end:
        ya = yb
    base = ya + (yb - ya) * (t - t[start]) / (t[end] - t[start])
    sel = slice(start, end + 1)
    from scipy.integrate import cumulative_trapezoid

    def corrected_with(base_values):
        s = np.zeros(n)
        s[sel] = y[sel] - base_values[sel]
        return s

    s = corrected_with(base)
    if baseline == "sigmoidal":
        base, s = _sigmoidal_baseline(t, y, base, s, sel, start, end, ya, yb, corrected_with)

    cum = np.zeros(n)
    cum[sel] = cumulative_trapezoid(s[sel], t[sel], initial=0.0)
    cum[end + 1:] = cum[end]
    energy = float(cum[end])
    if energy <= 0:
        raise ModelDomainError("the integrated exotherm is not positive; check direction and limits")
    conversion = cum / energy
    rate = s / energy

    s_smooth = np.zeros(n)
    s_smooth[sel] = smooth(s[sel], window)
    peak = start + int(np.argmax(s_smooth[sel]))
    height = float(s_smooth[peak])
    peak_temperature = _refine_peak(temp, s_smooth, peak, start, end)

    onset, detection = _onset_and_detection(temp, s_smooth, start, peak, height,
                                            detection_limit)

    heating_rate = float(np.polyfit(t[sel], temp[sel], 1)[0])
    return PeakAnalysis(
        start_index=int(start), end_index=int(end), baseline=base, corrected=s, energy=energy,
        conversion=conversion, rate=rate, peak_temperature=peak_temperature, peak_height=height,
        onset_temperature=onset, detection_temperature=detection, heating_rate=heating_rate,
        baseline_kind=baseline, truncated_start=bool(truncated_start),
        truncated_end=bool(truncated_end), noise=noise, time=t, temperature=temp, signal=y,
    )


def _refine_peak(temp, s_smooth, peak, start, end):
    """Vertex of a quadratic through the samples above 90 % of the peak height."""
    height = s_smooth[peak]
    a = peak
    while a > start and s_smooth[a - 1] >= 0.9 * height:
        a -= 1
    b = peak
    while b < end and s_smooth[b + 1] >= 0.9 * height:
        b += 1
    if b - a < 4:
        a, b = max(start, peak - 2), min(end, peak + 2)
    if b - a < 2:
        return float(temp[peak])
    x = temp[a:b + 1] - temp[peak]
    c2, c1, _ = np.polyfit(x, s_smooth[a:b + 1], 2)
    if c2 >= 0:
        return float(temp[peak])
    vertex = -c1 / (2 * c2)
    return float(temp[peak] + np.clip(vertex, x[0], x[-1]))


def isoconversional_points(analyses, conversion_levels):
    """Temperatures and rates of several runs at common conversion levels.

    Parameters
    ----------
    analyses : sequence of PeakAnalysis
        One per run. [object]
    conversion_levels : array_like
        Levels alpha, strictly inside (0, 1). [-]

    Returns
    -------
    temperatures : numpy.ndarray, shape (runs, levels)
        [K]
    rates : numpy.ndarray, shape (runs, levels)
        d alpha/dt from the smoothed corrected signal. [1/s]

    Notes
    -----
    The first crossing of each level by the (non-decreasing envelope of the) conversion is
    interpolated linearly; rates come from the heat flow itself, not from differentiating alpha.
    """
    levels = np.asarray(conversion_levels, dtype=float)
    temps = np.empty((len(analyses), levels.size))
    rates = np.empty_like(temps)
    for i, a in enumerate(analyses):
        sel = slice(a.start_index, a.end_index + 1)
        alpha = np.maximum.accumulate(a.conversion[sel])
        window = max(5, (a.end_index - a.start_index) // 60)
        rate = smooth(a.rate[sel], window)
        temp = a.temperature[sel]
        idx = np.searchsorted(alpha, levels, side="left")
        idx = np.clip(idx, 1, alpha.size - 1)
        a0, a1 = alpha[idx - 1], alpha[idx]
        w = np.where(a1 > a0, (levels - a0) / np.where(a1 > a0, a1 - a0, 1.0), 0.0)
        temps[i] = temp[idx - 1] + w * (temp[idx] - temp[idx - 1])
        rates[i] = rate[idx - 1] + w * (rate[idx] - rate[idx - 1])
    if np.any(rates <= 0):
        raise ModelDomainError(
            "the rate is not positive at some conversion level (noisy or distorted peak); "
            "check the baseline or give the integration range"
        )
    return temps, rates


# --------------------------------------------------------------------------------------------
# Reaction models, fitting and simulation
# --------------------------------------------------------------------------------------------


def reaction_model(conversion, order, autocatalytic_order=0.0):
    """Conversion function f(alpha) of nth-order and extended Prout-Tompkins kinetics.

    Parameters
    ----------
    conversion : float or array_like
        alpha in [0, 1]. [-]
    order : float
        Reaction order n. [-]
    autocatalytic_order : float
        Autocatalytic exponent m (0 for nth order). [-]

    Returns
    -------
    float or numpy.ndarray
        f(alpha) = alpha^m (1 - alpha)^n (Prout & Tompkins, Trans. Faraday Soc. 40 (1944) 488
        for m = n = 1; extended form of Sestak & Berggren, Thermochim. Acta 3 (1971) 1). [-]
    """
    alpha = np.clip(np.asarray(conversion, dtype=float), 0.0, 1.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        value = np.power(1.0 - alpha, order)
        if autocatalytic_order != 0.0:
            value = value * np.power(alpha, autocatalytic_order)
    value = np.nan_to_num(value, nan=0.0, posinf=0.0)
    return value if value.ndim else float(value)


def maximum_of_reaction_model(order, autocatalytic_order=0.0):
    """Largest value of f(alpha) = alpha^m (1 - alpha)^n on [0, 1].

    Parameters
    ----------
    order : float
        n >= 0. [-]
    autocatalytic_order : float
        m >= 0. [-]

    Returns
    -------
    float
        1 for m = 0; m^m n^n / (m + n)^(m + n) at alpha = m/(m + n) otherwise (derived). [-]

    Examples
    --------
    Prout-Tompkins m = n = 1: maximum at alpha = 1/2, f = 1/2 * 1/2 = 0.25. With m = 1, n = 3:
    alpha = 1/4, f = (1/4) (3/4)^3 = 27/256 = 0.10546875.

    >>> maximum_of_reaction_model(1.0, 1.0)
    0.25
    >>> round(maximum_of_reaction_model(3.0, 1.0), 8)
    0.10546875
    """
    m, n = float(autocatalytic_order), float(order)
    if m < 0 or n < 0:
        raise ModelDomainError("reaction-model exponents must not be negative")
    if m == 0:
        return 1.0
    if n == 0:
        return 1.0
    return float(math.exp(m * math.log(m) + n * math.log(n) - (m + n) * math.log(m + n)))


@dataclass(frozen=True)
class FittedModel:
    """A reaction model fitted to all runs.

    Attributes
    ----------
    name : str
        "nth-order" or "autocatalytic".
    activation_energy : float
        [J/mol]
    ln_pre_exponential_factor : float
        ln A with A in 1/s. [-]
    order : float
        n. [-]
    autocatalytic_order : float
        m (0 for nth order). [-]
    initial_conversion : float
        alpha0 used to start integrations (0 for nth order). [-]
    standard_errors : dict
        Standard errors of "activation_energy" [J/mol], "ln_pre_exponential_factor",
        "order", "autocatalytic_order" from the regression (optimistic: residuals are
        correlated along a curve).
    activation_energy_interval : tuple of float
        Confidence interval of E (t distribution). [J/mol]
    rms_temperature_residual : float
        RMS difference between simulated and measured temperatures at alpha = 0.1 ... 0.9. [K]
    explanation : list of str
        Why this model was chosen, in words.
    alternatives : dict
        Regression coefficients and Akaike criteria of both candidate models.
    """

    name: str
    activation_energy: float
    ln_pre_exponential_factor: float
    order: float
    autocatalytic_order: float
    initial_conversion: float
    standard_errors: dict
    activation_energy_interval: tuple
    rms_temperature_residual: float
    explanation: list
    alternatives: dict

    @property
    def pre_exponential_factor(self):
        """A. [1/s]"""
        return math.exp(self.ln_pre_exponential_factor)


def _regress(columns, y, confidence_level):
    from scipy.stats import t as student_t

    design = np.column_stack(columns)
    coefficients, _, rank, _ = np.linalg.lstsq(design, y, rcond=None)
    if rank < design.shape[1]:
        raise ModelDomainError("model regression is singular (too few distinct data)")
    residual = y - design @ coefficients
    dof = max(1, y.size - design.shape[1])
    rss = float(residual @ residual)
    covariance = np.linalg.inv(design.T @ design) * rss / dof
    tq = float(student_t.ppf(0.5 * (1.0 + confidence_level), dof))
    aic = y.size * math.log(max(rss, 1e-300) / y.size) + 2 * design.shape[1]
    return coefficients, np.sqrt(np.diag(covariance)), tq, rss, aic


def _curve_samples(analyses, conversion_range, samples_per_run):
    temps, alphas, rates = [], [], []
    levels = np.linspace(conversion_range[0], conversion_range[1], samples_per_run)
    t_levels, r_levels = isoconversional_points(analyses, levels)
    for i in range(len(analyses)):
        temps.append(t_levels[i])
        rates.append(r_levels[i])
        alphas.append(levels)
    return np.concatenate(temps), np.concatenate(alphas), np.concatenate(rates), t_levels


def fit_reaction_model(analyses, heating_rates, choice="auto", conversion_range=(0.1, 0.9),
                       samples_per_run=41, confidence_level=0.95):
    """Fit nth-order or autocatalytic kinetics to all runs at once.

    Parameters
    ----------
    analyses : sequence of PeakAnalysis
        One per run (at least one; two or more heating rates make E and the model
        separable). [object]
    heating_rates : array_like
        Heating rate of each run. [K/s]
    choice : {"auto", "nth-order", "autocatalytic"}
        Model to fit; "auto" selects by the rule in the notes. [text]
    conversion_range : tuple of float
        Conversion range used in the regression. [-]
    samples_per_run : int
        Equally spaced conversion levels taken from each run (equal weight per run). [-]
    confidence_level : float
        Two-sided confidence level. [-]

    Returns
    -------
    FittedModel
        Fitted model, its parameters (SI) and the reason for the choice. [object]

    Notes
    -----
    Multivariate linear regression of the logarithmic rate equation on all runs:
    ln(d alpha/dt) = ln A - E/(R T) + n ln(1 - alpha) + m ln(alpha) (m = 0 for nth order).
    The autocatalytic model is chosen when m exceeds 0.2 and lowers the Akaike criterion by more
    than 10 (both design thresholds). The initial conversion alpha0, which the differential
    form cannot see, is then chosen so that simulated curves reach alpha = 0.1 ... 0.9 at the
    measured temperatures (least squares in log10 alpha0 over 1e-9 ... 1e-1). The quality of
    the fit is reported as the RMS temperature residual of the simulated curves.
    """
    if choice not in ("auto", "nth-order", "autocatalytic"):
        raise ModelDomainError(f"unknown model {choice!r}")
    beta = np.asarray(heating_rates, dtype=float)
    if len(analyses) < 1 or beta.shape != (len(analyses),):
        raise ModelDomainError("one heating rate per analysed run is required")
    temp, alpha, rate, measured_levels = _curve_samples(analyses, conversion_range, samples_per_run)
    y = np.log(rate)
    ones = np.ones_like(y)
    inv = -1.0 / (GAS_CONSTANT * temp)
    c_n, se_n, tq_n, rss_n, aic_n = _regress([ones, inv, np.log1p(-alpha)], y, confidence_level)
    c_a, se_a, tq_a, rss_a, aic_a = _regress(
        [ones, inv, np.log1p(-alpha), np.log(alpha)], y, confidence_level
    )
    alternatives = {
        "nth-order": {"activation_energy": float(c_n[1]), "ln_pre_exponential_factor": float(c_n[0]),
                      "order": float(c_n[2]), "akaike": aic_n},
        "autocatalytic": {"activation_energy": float(c_a[1]),
                          "ln_pre_exponential_factor": float(c_a[0]), "order": float(c_a[2]),
                          "autocatalytic_order": float(c_a[3]), "akaike": aic_a},
    }
    m_hat = float(c_a[3])
    explanation = []
    if choice == "auto":
        autocatalytic = m_hat > AUTOCATALYTIC_EXPONENT_THRESHOLD and aic_a < aic_n - AUTOCATALYTIC_AIC_GAIN
        if autocatalytic:
            explanation.append(
                f"autocatalytic model chosen: the rate rises with conversion (fitted exponent "
                f"m = {m_hat:.2f} > {AUTOCATALYTIC_EXPONENT_THRESHOLD}) and the fit improves "
                f"(Akaike criterion {aic_n:.0f} -> {aic_a:.0f}; thresholds are design choices)"
            )
        else:
            explanation.append(
                f"nth-order model chosen: the peak shape shows no autocatalysis (fitted exponent "
                f"m = {m_hat:.2f}, threshold {AUTOCATALYTIC_EXPONENT_THRESHOLD}; Akaike "
                f"criterion {aic_n:.0f} nth-order vs {aic_a:.0f} autocatalytic)"
            )
    else:
        autocatalytic = choice == "autocatalytic"
        explanation.append(f"{choice} model requested by the user (fitted m = {m_hat:.2f})")
        if autocatalytic and m_hat < AUTOCATALYTIC_EXPONENT_MINIMUM:
            raise ModelDomainError(
                f"the autocatalytic exponent fits to m = {m_hat:.3f} < "
                f"{AUTOCATALYTIC_EXPONENT_MINIMUM}: the data show no autocatalysis and the "
                "initial conversion cannot be determined; use the nth-order model"
            )
    if autocatalytic:
        coefficients, errors, tq = c_a, se_a, tq_a
        m = float(coefficients[3])
    else:
        coefficients, errors, tq = c_n, se_n, tq_n
        m = 0.0
    energy, ln_a, n = float(coefficients[1]), float(coefficients[0]), float(coefficients[2])
    if energy <= 0:
        raise ModelDomainError(
            f"the model regression gives E = {energy / 1e3:.1f} kJ/mol <= 0; the curves are not "
            "consistent with Arrhenius kinetics"
        )
    if n < 0:
        explanation.append(f"fitted reaction order n = {n:.2f} < 0 is unphysical; set to 0")
        n = 0.0
    standard_errors = {
        "activation_energy": float(errors[1]),
        "ln_pre_exponential_factor": float(errors[0]),
        "order": float(errors[2]),
        "autocatalytic_order": float(errors[3]) if autocatalytic else 0.0,
    }
    levels = np.linspace(conversion_range[0], conversion_range[1], samples_per_run)
    alpha0 = 0.0
    if autocatalytic:
        alpha0 = _fit_initial_conversion(analyses, beta, energy, ln_a, n, m, levels, measured_levels)
        explanation.append(
            f"initial conversion alpha0 = {alpha0:.2g} chosen so that the simulated curves "
            "reproduce the measured temperatures"
        )
    simulated = _simulated_level_temperatures(analyses, beta, energy, ln_a, n, m, alpha0, levels)
    rms = float(np.sqrt(np.nanmean((simulated - measured_levels) ** 2)))
    if not np.isfinite(rms):
        raise SolverError("the fitted model does not reproduce the measured conversion range")
    half = tq * standard_errors["activation_energy"]
    return FittedModel(
        name="autocatalytic" if autocatalytic else "nth-order",
        activation_energy=energy,
        ln_pre_exponential_factor=ln_a,
        order=n,
        autocatalytic_order=m,
        initial_conversion=alpha0,
        standard_errors=standard_errors,
        activation_energy_interval=(energy - half, energy + half),
        rms_temperature_residual=rms,
        explanation=explanation,
        alternatives=alternatives,
    )


def _conversion_of_generalised_time(order, autocatalytic_order, initial_conversion, theta_max):
    """alpha(theta) for d alpha/d theta = f(alpha), alpha(0) = alpha0 (dense, monotone)."""
    from scipy.integrate import solve_ivp

    def rhs(_, a):
        return [reaction_model(min(max(a[0], 0.0), 1.0), order, autocatalytic_order)]

    def finished(_, a):
        return 1.0 - 1e-7 - a[0]

    finished.terminal = True
    atol = max(1e-14, 1e-4 * initial_conversion) if initial_conversion > 0 else 1e-12
    solution = solve_ivp(rhs, (0.0, theta_max), [initial_conversion], method="LSODA",
                         rtol=1e-8, atol=atol, dense_output=True, events=finished)
    if solution.status < 0:
        raise SolverError(f"reaction-model integration failed: {solution.message}")
    t_end = float(solution.t[-1])

    def alpha_of(theta):
        theta = np.asarray(theta, dtype=float)
        out = np.empty_like(theta)
        inside = theta <= t_end
        if np.any(inside):
            out[inside] = solution.sol(np.clip(theta[inside], 0.0, t_end))[0]
        out[~inside] = 1.0
        return np.clip(out, 0.0, 1.0)

    return alpha_of


def _generalised_time(temperature, start_temperature, heating_rate, activation_energy, ln_a):
    """theta(T) = (A/beta) int_{T0}^{T} exp(-E/(R T')) dT' (closed form, derived)."""
    i_t = temperature_integral(temperature, activation_energy)
    i_0 = temperature_integral(start_temperature, activation_energy)
    return np.exp(ln_a) / heating_rate * np.clip(i_t - i_0, 0.0, None)


def simulate_linear_heating(temperature, heating_rate, activation_energy, ln_pre_exponential_factor,
                            order, autocatalytic_order=0.0, initial_conversion=0.0):
    """Conversion and rate of a single-step reaction under linear heating.

    Parameters
    ----------
    temperature : array_like
        Increasing temperatures; the first is the start of heating. [K]
    heating_rate : float
        beta. [K/s]
    activation_energy : float
        E. [J/mol]
    ln_pre_exponential_factor : float
        ln A with A in 1/s. [-]
    order : float
        n. [-]
    autocatalytic_order : float
        m. [-]
    initial_conversion : float
        alpha at the first temperature. [-]

    Returns
    -------
    conversion : numpy.ndarray
        alpha(T). [-]
    rate : numpy.ndarray
        d alpha/dt = A exp(-E/(R T)) f(alpha). [1/s]

    Notes
    -----
    With theta = integral A exp(-E/(R T)) dt the rate law d alpha/dt = A exp(-E/RT) f(alpha)
    becomes d alpha/d theta = f(alpha), which does not depend on E, A or beta; theta(T) follows
    in closed form from the temperature integral (derived). One ODE therefore serves all runs.
    """
    temp = np.asarray(temperature, dtype=float)
    if heating_rate <= 0:
        raise ModelDomainError("heating rate must be positive")
    theta = _generalised_time(temp, temp[0], heating_rate, activation_energy,
                              ln_pre_exponential_factor)
    if initial_conversion <= 0 and autocatalytic_order > 0:
        raise ModelDomainError("an autocatalytic model needs an initial conversion > 0")
    alpha_of = _conversion_of_generalised_time(order, autocatalytic_order, initial_conversion,
                                               max(float(theta[-1]), 1e-12) * 1.001 + 1e-12)
    alpha = alpha_of(theta)
    rate = np.exp(ln_pre_exponential_factor - activation_energy / (GAS_CONSTANT * temp)) * \
        reaction_model(alpha, order, autocatalytic_order)
    return alpha, rate


def _simulated_level_temperatures(analyses, beta, energy, ln_a, n, m, alpha0, levels):
    """Temperatures at which simulated curves reach the given conversion levels (NaN if never)."""
    result = np.full((len(analyses), levels.size), np.nan)
    thetas = []
    for a, b in zip(analyses, beta):
        temp = np.linspace(a.temperature[0], a.temperature[-1] + 0.3 * (a.temperature[-1] - a.temperature[0]), 1500)
        thetas.append((temp, _generalised_time(temp, temp[0], b, energy, ln_a)))
    theta_max = max(float(th[-1]) for _, th in thetas)
    alpha_of = _conversion_of_generalised_time(n, m, alpha0, theta_max * 1.001 + 1e-12)
    for i, (temp, theta) in enumerate(thetas):
        alpha = np.maximum.accumulate(alpha_of(theta))
        reach = levels <= alpha[-1]
        result[i, reach] = np.interp(levels[reach], alpha, temp)
    return result


def _fit_initial_conversion(analyses, beta, energy, ln_a, n, m, levels, measured):
    from scipy.optimize import minimize_scalar

    def cost(log_alpha0):
        sim = _simulated_level_temperatures(analyses, beta, energy, ln_a, n, m,
                                            10.0**log_alpha0, levels)
        diff = np.where(np.isfinite(sim), sim - measured, 200.0)
        return float(np.mean(diff**2))

    best = minimize_scalar(cost, bounds=(-9.0, -1.0), method="bounded",
                           options={"xatol": 1e-3})
    return float(10.0**best.x)


# --------------------------------------------------------------------------------------------
# Time to maximum rate and TD24 (zero order)
# --------------------------------------------------------------------------------------------


def townsend_tou_time_to_maximum_rate(temperature, ln_heat_release_coefficient, activation_energy,
                                      specific_heat):
    """Zero-order adiabatic time to maximum rate.

    Parameters
    ----------
    temperature : float or array_like
        Start temperature T. [K]
    ln_heat_release_coefficient : float
        ln q_inf with q(T) = q_inf exp(-E/(R T)) in W/kg. [-]
    activation_energy : float
        E. [J/mol]
    specific_heat : float
        c'p of the reaction mass. [J/(kg K)]

    Returns
    -------
    float or numpy.ndarray
        TMRad = c'p R T^2 / (q(T) E). [s]

    Notes
    -----
    Townsend & Tou, Thermochim. Acta 37 (1980) 1-30 (zero-order approximation). Evaluated in the
    log domain so that large E/RT cannot overflow.
    """
    temp = np.asarray(temperature, dtype=float)
    values = (activation_energy, specific_heat, ln_heat_release_coefficient)
    if not (np.all(np.isfinite(temp)) and all(np.isfinite(v) for v in values)):
        raise ModelDomainError("TMRad needs finite T, ln q_inf, E and c'p (got NaN or inf)")
    if activation_energy <= 0 or specific_heat <= 0 or np.any(temp <= 0):
        raise ModelDomainError("TMRad needs E > 0, c'p > 0 and T > 0 K")
    from screen.models.decomposition import log_townsend_tou_tmrad

    ln_q = ln_heat_release_coefficient - activation_energy / (GAS_CONSTANT * temp)
    ln_tmr = np.asarray(log_townsend_tou_tmrad(temp, specific_heat, ln_q, activation_energy))
    if np.any(ln_tmr > 700):
        raise ModelDomainError("TMRad beyond the floating-point range")
    result = np.exp(ln_tmr)
    return result if result.ndim else float(result)


def zero_order_td(ln_heat_release_coefficient, activation_energy, specific_heat,
                  time_to_maximum_rate=24.0 * SECONDS_PER_HOUR, bracket=(200.0, 1200.0)):
    """Temperature at which the zero-order TMRad equals a given time (TD24 for 24 h).

    Parameters
    ----------
    ln_heat_release_coefficient : float
        ln q_inf with q(T) = q_inf exp(-E/(R T)) in W/kg. [-]
    activation_energy : float
        E. [J/mol]
    specific_heat : float
        c'p. [J/(kg K)]
    time_to_maximum_rate : float
        Target TMRad (24 h for TD24). [s]
    bracket : tuple of float
        Search interval. [K]

    Returns
    -------
    float
        T_D with c'p R T^2/(q(T) E) = time_to_maximum_rate. [K]

    Notes
    -----
    ln TMR(T) = ln(c'p R T^2/E) - ln q_inf + E/(R T) falls monotonically with T while E > 2 R T
    (derived), so the root in the bracket is unique; the search (the one TD root search,
    :func:`screen.models.decomposition.temperature_for_time_to_maximum_rate`) stays below E/(2R).
    """
    from screen.models.decomposition import (
        DecompositionKinetics,
        temperature_for_time_to_maximum_rate,
    )

    values = (ln_heat_release_coefficient, activation_energy, specific_heat, time_to_maximum_rate)
    if not all(np.isfinite(v) for v in values):
        raise ModelDomainError("TD needs finite ln q_inf, E, c'p and target time (got NaN or inf)")
    if time_to_maximum_rate <= 0 or activation_energy <= 0 or specific_heat <= 0:
        raise ModelDomainError("target time, E and c'p must be positive")
    # q(T) = q_inf exp(-E/(R T)) is a zero-order model with Q = 1 J/kg and ln A = ln q_inf.
    with np.errstate(over="ignore"):
        factor = math.exp(min(ln_heat_release_coefficient, 709.0))
    kinetics = DecompositionKinetics("zero-order", 1.0, activation_energy,
                                     factor if ln_heat_release_coefficient < 709.0 else math.inf,
                                     order=0.0, log_pre_exponential_factor=ln_heat_release_coefficient)
    try:
        return temperature_for_time_to_maximum_rate(kinetics, specific_heat, time_to_maximum_rate,
                                                    *bracket)
    except SolverError as exc:
        raise ModelDomainError(exc.message) from None


def crude_td24_from_onset(onset_temperature, detection_limit=CRUDE_DETECTION_LIMIT,
                          activation_energy=CRUDE_ACTIVATION_ENERGY,
                          specific_heat=DEFAULT_SPECIFIC_HEAT,
                          time_to_maximum_rate=24.0 * SECONDS_PER_HOUR):
    """Crude TD24 from one dynamic-DSC onset under worst-case assumptions.

    Parameters
    ----------
    onset_temperature : float
        Onset of the exotherm in a dynamic DSC run. [K]
    detection_limit : float
        Heat release rate assumed at the onset (instrument detection limit). [W/kg]
    activation_energy : float
        Assumed (low) activation energy. [J/mol]
    specific_heat : float
        c'p. [J/(kg K)]
    time_to_maximum_rate : float
        Target TMRad. [s]

    Returns
    -------
    float
        Temperature at which the zero-order TMRad equals the target. [K]

    Notes
    -----
    After Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory): zero order,
    a low E (50 kJ/mol) so that the rate falls slowly on extrapolation to low temperature, and
    q(T_onset) = detection limit. Then q(T) = q_det exp(-(E/R)(1/T - 1/T_on)) and
    TD24 solves c'p R T^2/(q(T) E) = 24 h (Townsend & Tou 1980). A crude screening estimate.
    """
    if not (np.isfinite(onset_temperature) and np.isfinite(detection_limit)):
        raise ModelDomainError("onset temperature and detection limit must be finite numbers")
    if onset_temperature <= 0 or detection_limit <= 0:
        raise ModelDomainError("onset temperature and detection limit must be positive")
    ln_q_inf = math.log(detection_limit) + activation_energy / (GAS_CONSTANT * onset_temperature)
    return zero_order_td(ln_q_inf, activation_energy, specific_heat, time_to_maximum_rate,
                         bracket=(max(100.0, onset_temperature - 600.0), onset_temperature + 400.0))


def _first_order_scan(log_factor, activation_energy, heating_rate):
    """Helpers of a first-order reaction in a linear heating run (derived).

    With k(T) = A exp(-E/(R T)) and dT/dt = beta, ln(1 - a) = -(A/beta) T E_2(E/(R T))
    (the temperature integral int_0^T exp(-E/(R T')) dT' = T E_2(E/(R T)), exact), and the heat
    flow q = Q k (1 - a) has d ln q / dT = g(T) = E/(R T^2) - k/beta.
    """
    from scipy.special import expn

    e_over_r = activation_energy / GAS_CONSTANT

    def log_k(t):
        return log_factor - e_over_r / t

    def g(t):
        return e_over_r / t**2 - math.exp(log_k(t)) / heating_rate

    def g_prime(t):
        return -2.0 * e_over_r / t**3 - math.exp(log_k(t)) / heating_rate * e_over_r / t**2

    def log_remaining(t):
        return -math.exp(log_factor) / heating_rate * t * float(expn(2, e_over_r / t))

    return log_k, g, g_prime, log_remaining


def _scan_peak_and_inflection(log_factor, activation_energy, heating_rate):
    """(peak, leading inflection) temperatures [K] of a first-order dynamic run (derived:
    peak where g = 0, i.e. E beta/(R T^2) = k(T), Kissinger's condition; inflection where
    q'' = q (g^2 + g') = 0 below the peak)."""
    from scipy.optimize import brentq

    e_over_r = activation_energy / GAS_CONSTANT
    log_k, g, g_prime, _ = _first_order_scan(log_factor, activation_energy, heating_rate)

    def peak_residual(t):
        return math.log(e_over_r * heating_rate / t**2) - log_k(t)

    peak = brentq(peak_residual, 20.0, 1e5, xtol=1e-10)
    low = peak * 0.3
    inflection = brentq(lambda t: g(t) ** 2 + g_prime(t), low, peak, xtol=1e-10)
    return peak, inflection


def first_order_scan_onset(log_factor, activation_energy, heating_rate):
    """Extrapolated (tangent) onset of a first-order exotherm in a dynamic DSC run.

    The tangent at the leading inflection point T_i meets the baseline at
    T_on = T_i - q(T_i)/q'(T_i) = T_i - 1/g(T_i) (see :func:`_first_order_scan`; derived; the
    onset does not depend on the reaction energy).

    Parameters
    ----------
    log_factor : float
        ln(A / (1/s)). [-]
    activation_energy : float
        E. [J/mol]
    heating_rate : float
        Scan rate beta. [K/s]

    Returns
    -------
    float
        Extrapolated onset. [K]
    """
    _, inflection = _scan_peak_and_inflection(log_factor, activation_energy, heating_rate)
    _, g, _, _ = _first_order_scan(log_factor, activation_energy, heating_rate)
    return inflection - 1.0 / g(inflection)


def detection_point_from_extrapolated_onset(onset_temperature, heating_rate, energy,
                                            detection_limit=CRUDE_DETECTION_LIMIT,
                                            activation_energy=CRUDE_ACTIVATION_ENERGY):
    """Temperature at which a dynamic DSC run first releases ``detection_limit``, from the
    extrapolated onset of that run (a conservative conversion for the crude estimate).

    Derived (no published source): the exotherm is taken as a first-order reaction with the
    given energy and an assumed LOW activation energy (default 50 kJ/mol, the crude estimate's
    value after Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41, from memory). A low E
    gives a broad peak whose leading edge starts far below the tangent onset, so the detection
    point found is lower than that of a real, steeper exotherm with the same onset
    (conservative; checked against simulated runs in tests/test_onset_conversion.py). Steps:
    find ln A such that the tangent onset of the model run equals ``onset_temperature``
    (:func:`first_order_scan_onset`), then solve q(T) = Q k(T) (1 - a(T)) = q_det below the
    peak (q rises monotonically up to it).

    Parameters
    ----------
    onset_temperature : float
        Extrapolated (tangent) onset of the dynamic run. [K]
    heating_rate : float
        Scan rate of that run. [K/s]
    energy : float
        Decomposition energy Q per kg of sample. [J/kg]
    detection_limit : float, optional
        Heat release rate taken as detectable. [W/kg]
    activation_energy : float, optional
        Assumed activation energy (low is conservative). [J/mol]

    Returns
    -------
    float
        Detection-point temperature, below the onset. [K]

    Raises
    ------
    ModelDomainError
        Non-positive inputs, or an exotherm too small ever to reach the detection limit.
    """
    from scipy.optimize import brentq

    for value, name in ((onset_temperature, "onset temperature"), (heating_rate, "scan rate"),
                        (energy, "energy"), (detection_limit, "detection limit"),
                        (activation_energy, "activation energy")):
        if not (math.isfinite(value) and value > 0.0):
            raise ModelDomainError(f"{name} must be a finite positive number, got {value}")
    e_over_r = activation_energy / GAS_CONSTANT
    # Bracket ln A: the Kissinger peak condition at the onset and 300 K above bound it widely.
    def onset_residual(log_factor):
        return first_order_scan_onset(log_factor, activation_energy, heating_rate) \
            - onset_temperature

    # The onset falls as ln A grows; start at the Kissinger condition at the onset and widen.
    guess = math.log(e_over_r * heating_rate / onset_temperature**2) + e_over_r / onset_temperature
    for width in (2.0, 5.0, 10.0, 20.0):
        low, high = guess - width, guess + width
        try:
            if onset_residual(low) > 0.0 > onset_residual(high):
                break
        except ValueError:
            continue
    else:
        raise ModelDomainError(f"no first-order run with E = {activation_energy / 1e3:.0f} kJ/mol "
                               f"has its onset at {onset_temperature:.6g} K")
    log_factor = brentq(onset_residual, low, high, xtol=1e-12)
    log_k, _, _, log_remaining = _first_order_scan(log_factor, activation_energy, heating_rate)
    peak, _ = _scan_peak_and_inflection(log_factor, activation_energy, heating_rate)

    def log_rate_excess(t):
        return math.log(energy) + log_k(t) + log_remaining(t) - math.log(detection_limit)

    if log_rate_excess(peak) <= 0.0:
        raise ModelDomainError(
            f"an exotherm of {energy / 1e3:.4g} J/g with its onset at {onset_temperature:.6g} K "
            f"never reaches {detection_limit:g} W/kg in this model: check the energy and the "
            f"detection limit")
    bottom = max(onset_temperature - 600.0, 0.25 * onset_temperature)
    return float(brentq(log_rate_excess, bottom, peak, xtol=1e-9))


#: Activation energies scanned by :func:`conservative_detection_point` [J/mol]: 50-300 kJ/mol
#: in steps of 10 kJ/mol, the usual range of decomposition reactions (common practice, no
#: source).
ONSET_CONVERSION_ACTIVATION_ENERGIES = tuple(float(e) for e in np.arange(50e3, 300e3 + 1.0, 10e3))


def conservative_detection_point(onset_temperature, heating_rate, energy,
                                 detection_limit=CRUDE_DETECTION_LIMIT,
                                 activation_energies=ONSET_CONVERSION_ACTIVATION_ENERGIES):
    """Lowest detection point compatible with an extrapolated onset, over a range of E.

    :func:`detection_point_from_extrapolated_onset` for each assumed activation energy; the
    lowest result, and never above the onset itself, is returned (derived, fail closed: the
    real E is unknown when only an onset exists; a low E does not always give the lowest
    detection point: at slow scans and small energies a broad low-E peak first reaches the
    detection limit above the tangent onset). Activation energies at which the model run never
    reaches the detection limit are skipped.

    Parameters
    ----------
    onset_temperature : float
        Extrapolated (tangent) onset. [K]
    heating_rate : float
        Scan rate of the run. [K/s]
    energy : float
        Decomposition energy per kg. [J/kg]
    detection_limit : float, optional
        Heat release rate taken as detectable. [W/kg]
    activation_energies : sequence of float, optional
        Activation energies scanned. [J/mol]

    Returns
    -------
    tuple of (float, float)
        Detection-point temperature [K] and the activation energy that gave it [J/mol]
        (``nan`` when the onset itself is lower).

    Raises
    ------
    ModelDomainError
        No activation energy of the range gives a run that reaches the detection limit.
    """
    best, best_energy = float(onset_temperature), math.nan
    found = False
    for activation_energy in activation_energies:
        try:
            temperature = detection_point_from_extrapolated_onset(
                onset_temperature, heating_rate, energy, detection_limit, activation_energy)
        except ModelDomainError:
            continue
        found = True
        if temperature < best:
            best, best_energy = temperature, float(activation_energy)
    if not found:
        raise ModelDomainError(
            f"no first-order run with E in {activation_energies[0] / 1e3:.0f}-"
            f"{activation_energies[-1] / 1e3:.0f} kJ/mol, onset {onset_temperature:.6g} K and "
            f"{energy / 1e3:.4g} J/g reaches {detection_limit:g} W/kg: check the energy, the scan "
            f"rate and the detection limit")
    return best, best_energy
