"""Adiabatic (heat-wait-search) calorimetry: thermal-inertia (phi) correction, self-heat rate,
exotherm detection and kinetics from the self-heat rate.

Pure functions on SI floats and numpy arrays (s, K, K/s, J/mol, J/(kg K)). They know nothing of
files or the command line; :mod:`screen.analyses.adiabatic_run` composes them.

Model (published). A closed test cell holds a sample of mass m_s (c'p,s) in a cell of mass
m_c (c'p,c) that follows the sample temperature. The thermal inertia

    phi = 1 + m_c c'p,c / (m_s c'p,s)                                            (T&T 1)

makes the measured adiabatic rise phi times smaller than that of the sample alone. With one
reaction da/dt = A exp(-E/(R T)) (1 - a)^n and the conversion read from the temperature,

    a = (T - T_0)/dT_ad,m ,   dT/dt = dT_ad,m A exp(-E/(R T)) (1 - a)^n          (T&T 2)

so the pseudo rate constant k*(T) = (dT/dt) / (dT_ad,m (1 - a)^n) follows Arrhenius, and
ln k* against 1/T is a straight line of slope -E/R for the right order n. Corrections to
phi = 1 (the plant) at the same conversion:

    dT_ad = phi dT_ad,m                                                          (T&T 3)
    T_phi=1 = T_0,phi=1 + phi (T - T_0)                                          (T&T 4)
    (dT/dt)_phi=1 = phi (dT/dt) exp[E/R (1/T - 1/T_phi=1)]                       (T&T 5)
    theta_phi=1 = theta / phi   (time to maximum rate at the same start temperature, T&T 6)

and the onset is moved to the temperature at which the phi = 1 system self-heats as fast as
the cell did at the detected onset (Fisher et al. 1992; it is T&T 5 solved for the onset):

    1/T_0,phi=1 = 1/T_0 + (R/E) ln(phi)                                          (Fisher)

References
----------
D. I. Townsend, J. C. Tou, "Thermal hazard evaluation by an accelerating rate calorimeter",
Thermochim. Acta 37 (1980) 1-30. The equation labels T&T 1-6 are ours, not the paper's.
H. G. Fisher, H. S. Forrest, S. S. Grossel, J. E. Huff, A. R. Muller, J. A. Noronha, D. A. Shaw,
B. J. Tilley, "Emergency Relief System Design Using DIERS Technology", AIChE, New York (1992)
(the phi correction of the onset temperature; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from screen.constants import GAS_CONSTANT
from screen.errors import ModelDomainError
from screen.models.domain import require_positive

#: Common-practice detection threshold of the heat-wait-search mode [K/s]: 0.02 K/min
#: (common practice, no source).
DEFAULT_THRESHOLD = 0.02 / 60.0

#: Highest conversion used in the self-heat-rate fit (design): beyond it (1 - a)^n amplifies
#: the noise of the temperature reading.
FIT_MAX_CONVERSION = 0.9

#: An integer order (or zero order) is preferred when its RMS residual is within this factor of
#: the best continuous order (design: parsimony).
ORDER_PREFERENCE = 1.05

#: Orders searched by the fit [-].
ORDER_GRID = np.round(np.arange(0.0, 3.0001, 0.01), 2)


def phi_factor(sample_mass, sample_specific_heat, cell_mass, cell_specific_heat):
    """Thermal inertia of a closed test cell, phi = 1 + m_c c'p,c/(m_s c'p,s) (Townsend & Tou 1980).

    Parameters
    ----------
    sample_mass : float
        [kg]
    sample_specific_heat : float
        [J/(kg K)]
    cell_mass : float
        Mass of the cell (bomb) that follows the sample temperature. [kg]
    cell_specific_heat : float
        [J/(kg K)]

    Returns
    -------
    float
        phi. [-]

    Examples
    --------
    5 g of sample (2.0 J/(g K)) in a 10 g titanium cell (0.52 J/(g K)):

    >>> round(phi_factor(5e-3, 2000.0, 10e-3, 520.0), 4)
    1.52
    """
    ms = require_positive(sample_mass, "sample_mass", "kg")
    cs = require_positive(sample_specific_heat, "sample_specific_heat", "J/(kg K)")
    mc = require_positive(cell_mass, "cell_mass", "kg", allow_zero=True)
    cc = require_positive(cell_specific_heat, "cell_specific_heat", "J/(kg K)")
    return 1.0 + mc * cc / (ms * cs)


def _phi(phi):
    phi = float(phi)
    if not (phi >= 1.0 and math.isfinite(phi)):
        raise ModelDomainError(f"phi must be finite and >= 1, got {phi!r}")
    return phi


def corrected_adiabatic_rise(measured_rise, phi):
    """dT_ad = phi dT_ad,m (Townsend & Tou 1980).

    Parameters
    ----------
    measured_rise : float or array
        Adiabatic rise measured in the cell. [K]
    phi : float
        Thermal inertia. [-]

    Returns
    -------
    float or array
        Adiabatic rise of the sample alone (phi = 1). [K]

    Examples
    --------
    >>> corrected_adiabatic_rise(120.0, 1.5)
    180.0
    """
    return _phi(phi) * measured_rise


def corrected_onset_temperature(measured_onset, phi, activation_energy):
    """Onset for phi = 1: 1/T_0,c = 1/T_0,m + (R/E) ln(phi) (Fisher et al. 1992).

    The phi = 1 system reaches the self-heat rate seen at the detected onset at this lower
    temperature (T&T 5 at a ~ 0 solved for the temperature).

    Parameters
    ----------
    measured_onset : float
        Onset detected in the cell. [K]
    phi : float
        Thermal inertia. [-]
    activation_energy : float
        [J/mol]

    Returns
    -------
    float
        Corrected onset. [K]

    Examples
    --------
    T_0 = 400 K, phi = 2, E = 100 kJ/mol: 1/T = 1/400 + 8.314462618 ln 2/1e5 = 0.002557631
    (hand calculation), T = 390.99 K.

    >>> round(corrected_onset_temperature(400.0, 2.0, 100e3), 2)
    390.99
    """
    t0 = require_positive(measured_onset, "measured_onset", "K")
    e = require_positive(activation_energy, "activation_energy", "J/mol")
    return 1.0 / (1.0 / t0 + GAS_CONSTANT * math.log(_phi(phi)) / e)


def corrected_temperature(measured_temperature, measured_onset, corrected_onset, phi):
    """Temperature of the phi = 1 system at the same conversion, T_c = T_0,c + phi (T - T_0,m)
    (Townsend & Tou 1980).

    Parameters
    ----------
    measured_temperature : float or array
        [K]
    measured_onset, corrected_onset : float
        [K]
    phi : float
        Thermal inertia of the test, phi = 1 + m_cell c'p,cell/(m_sample c'p,sample). [-]

    Returns
    -------
    float or array
        [K]
    """
    return corrected_onset + _phi(phi) * (np.asarray(measured_temperature, dtype=float)
                                          - measured_onset)


def corrected_self_heat_rate(measured_rate, measured_temperature, corrected_temperature_,
                             phi, activation_energy):
    """Self-heat rate of the phi = 1 system at the same conversion (Townsend & Tou 1980):
    m_c = phi m exp[E/R (1/T_m - 1/T_c)].

    Parameters
    ----------
    measured_rate : float or array
        dT/dt measured. [K/s]
    measured_temperature : float or array
        [K]
    corrected_temperature_ : float or array
        From :func:`corrected_temperature`. [K]
    phi : float
        Thermal inertia of the test, phi = 1 + m_cell c'p,cell/(m_sample c'p,sample). [-]
    activation_energy : float
        [J/mol]

    Returns
    -------
    float or array
        [K/s]
    """
    e = require_positive(activation_energy, "activation_energy", "J/mol")
    tm = np.asarray(measured_temperature, dtype=float)
    tc = np.asarray(corrected_temperature_, dtype=float)
    return _phi(phi) * np.asarray(measured_rate, dtype=float) * np.exp(
        e / GAS_CONSTANT * (1.0 / tm - 1.0 / tc))


def time_to_maximum_rate_phi_one(measured_time, phi):
    """theta_phi=1 = theta_m/phi at the same start temperature (Townsend & Tou 1980).

    Parameters
    ----------
    measured_time : float
        Time to maximum rate in the cell. [s]
    phi : float
        Thermal inertia of the test, phi = 1 + m_cell c'p,cell/(m_sample c'p,sample). [-]

    Returns
    -------
    float
        [s]
    """
    return float(measured_time) / _phi(phi)


def self_heat_rate(time, temperature, min_rise=0.2, max_span=600.0):
    """dT/dt by central differences over a span that covers about ``min_rise``: a first
    estimate over ``max_span`` sets the span of each point (min_rise / rate, between one sample
    and ``max_span``), so slow parts are averaged over minutes and fast ones over a few points,
    and the span does not depend on the noise of the point itself (design).

    Parameters
    ----------
    time : array_like
        Strictly increasing times. [s]
    temperature : array_like
        [K]
    min_rise : float
        Temperature change a span should cover. [K]
    max_span : float
        Longest span. [s]

    Returns
    -------
    numpy.ndarray
        Self-heat rate. [K/s]
    """
    t = np.asarray(time, dtype=float)
    temp = np.asarray(temperature, dtype=float)
    n = t.size
    if n < 3:
        raise ModelDomainError("a self-heat rate needs at least three points")

    def central(span):
        lo = np.searchsorted(t, t - span / 2.0, side="left")
        hi = np.searchsorted(t, t + span / 2.0, side="right") - 1
        index = np.arange(n)
        lo = np.minimum(lo, np.maximum(index - 1, 0))
        hi = np.maximum(hi, np.minimum(index + 1, n - 1))
        return (temp[hi] - temp[lo]) / (t[hi] - t[lo])

    rough = central(np.full(n, max_span))
    span = np.clip(min_rise / np.maximum(np.abs(rough), 1e-12), 0.0, max_span)
    return central(span)


@dataclass
class Exotherm:
    """Indices of the exotherm found in a heat-wait-search record.

    Attributes
    ----------
    onset_index : int
        First point of the self-heating (rate above the threshold, after the last heat step).
    maximum_rate_index : int
        Point of the highest self-heat rate.
    maximum_temperature_index : int
        Point of the highest temperature (end of the exotherm).
    after_heat_step : bool
        True when the onset was cut at a heat step (the rate rose again before it).
    """

    onset_index: int
    maximum_rate_index: int
    maximum_temperature_index: int
    after_heat_step: bool


def find_exotherm(temperature, rate, threshold=DEFAULT_THRESHOLD, rebound=1.5,
                  valley=3.0):
    """Locate the exotherm: walk back from the highest temperature (from where the rate is
    twice the threshold) over the maximum rate down to
    where the self-heat rate falls below ``threshold`` or rises again by ``rebound`` (a heat step
    of the heat-wait-search sequence) (design).

    Parameters
    ----------
    temperature : array_like
        [K]
    rate : array_like
        Self-heat rate. [K/s]
    threshold : float
        Detection threshold. [K/s]
    rebound : float
        Factor by which the rate must rise again, going back in time, to mark a heat step. [-]
    valley : float
        Factor by which the rate must rise after a valley to mark a later event. [-]

    Returns
    -------
    Exotherm
        Indices of onset, maximum rate and maximum temperature (see the class). [object]

    Raises
    ------
    ModelDomainError
        When no self-heating above the threshold precedes the highest temperature.
    """
    temp = np.asarray(temperature, dtype=float)
    r = np.asarray(rate, dtype=float)
    threshold = require_positive(threshold, "threshold", "K/s")
    i = int(np.argmax(temp))
    t_max_index = i
    # the slow end of an exotherm hovers around the threshold: start where the rate is clearly
    # (twice) above it
    while i > 0 and r[i] < 2.0 * threshold:
        i -= 1
    if r[i] < 2.0 * threshold:
        raise ModelDomainError(
            f"no self-heating above {threshold * 60:g} K/min before the highest temperature")
    first, cut = i, False
    while first > 0 and r[first - 1] >= threshold:
        first -= 1
    # Highest rate of the last event above the threshold: a heat step of the search sequence
    # may precede the exotherm inside the same region, separated by a valley.
    while True:
        i_max = first + int(np.argmax(r[first:i + 1]))
        after = r[i_max:i + 1]
        valley_floor = np.minimum.accumulate(after)
        rises = after > valley * valley_floor
        if not rises.any():
            break
        k = int(np.argmax(rises))
        first = i_max + int(np.argmin(after[:k + 1]))
        cut = True
    i = i_max
    r_min, i_min = r[i], i
    after_step = False
    while i > first:  # descend (back in time) to the onset
        value = r[i - 1]
        if value < threshold:
            break
        if value > rebound * r_min:
            after_step = True
            i = i_min
            break
        if value < r_min:
            r_min, i_min = value, i - 1
        i -= 1
    after_step = after_step or (cut and i == first)
    if i >= i_max:
        raise ModelDomainError("the exotherm has no rising part above the detection threshold")
    return Exotherm(int(i), int(i_max), t_max_index, after_step)


def pseudo_rate_constant(rate, temperature, onset_temperature, total_rise, order,
                         initial_conversion=0.0):
    """k* = (dT/dt) / (dT_ad (1 - a)^n) with a = a_0 + (T - T_0)/dT_ad (Townsend & Tou 1980).

    Parameters
    ----------
    rate : array_like
        Self-heat rate. [K/s]
    temperature : array_like
        [K]
    onset_temperature : float
        [K]
    total_rise : float
        Adiabatic rise of the complete reaction in the same system (from a = 0). [K]
    order : float
        n. [-]
    initial_conversion : float
        Conversion at the onset, a_0. [-]

    Returns
    -------
    numpy.ndarray
        k*, the rate constant of da/dt = k* (1 - a)^n. [1/s]
    """
    rise = require_positive(total_rise, "total_rise", "K")
    a = initial_conversion + (np.asarray(temperature, dtype=float) - onset_temperature) / rise
    return np.asarray(rate, dtype=float) / (rise * np.clip(1.0 - a, 1e-12, None) ** order)


@dataclass
class SelfHeatFit:
    """Arrhenius parameters fitted to ln k* against 1/T.

    Attributes
    ----------
    activation_energy : float
        [J/mol]
    ln_pre_exponential_factor : float
        ln(A/(1/s)). [-]
    order : float
        Chosen n. [-]
    model : str
        "zero-order" or "nth-order".
    rms_residual : float
        RMS residual of ln k* for the chosen order. [-]
    r_squared : float
        [-]
    best_order : float
        Order with the smallest residual. [-]
    candidates : dict
        Order label -> (n, RMS residual, E [J/mol], ln A).
    reason : str
        Why this order was chosen.
    points : int
        Number of points fitted.
    """

    activation_energy: float
    ln_pre_exponential_factor: float
    order: float
    model: str
    rms_residual: float
    r_squared: float
    best_order: float
    candidates: dict = field(default_factory=dict)
    reason: str = ""
    points: int = 0


def _line_fits(x, y0, w, orders):
    """OLS of y = y0 - n w on x for every n: slopes, intercepts, RSS (closed form)."""
    xm = x.mean()
    dx = x - xm
    sxx = float(dx @ dx)
    dy0 = y0 - y0.mean()
    dw = w - w.mean()
    sxy0, sxw = float(dx @ dy0), float(dx @ dw)
    syy0, syw, sww = float(dy0 @ dy0), float(dy0 @ dw), float(dw @ dw)
    n = np.asarray(orders, dtype=float)
    sxy = sxy0 - n * sxw
    syy = syy0 - 2.0 * n * syw + n * n * sww
    slope = sxy / sxx
    intercept = (y0.mean() - n * w.mean()) - slope * xm
    rss = np.clip(syy - slope * sxy, 0.0, None)
    return slope, intercept, rss, syy


def fit_self_heat_rate(temperature, rate, onset_temperature, total_rise, initial_conversion=0.0,
                       max_conversion=FIT_MAX_CONVERSION, order=None):
    """Fit E, A and n to the self-heat rate of the exotherm (Townsend & Tou 1980).

    For each order on :data:`ORDER_GRID` the straight line ln k* = ln A - E/(R T) is fitted by
    least squares (closed form). Zero order, first and second order are preferred, in that
    order, when their RMS residual is within :data:`ORDER_PREFERENCE` of the best order
    (design); otherwise the best order is used.

    Parameters
    ----------
    temperature : array_like
        Temperatures of the rising exotherm (onset to highest temperature). [K]
    rate : array_like
        Self-heat rates there. [K/s]
    onset_temperature : float
        [K]
    total_rise : float
        Adiabatic rise of the complete reaction in the cell (from a = 0). [K]
    initial_conversion : float
        Conversion at the onset. [-]
    max_conversion : float
        Highest conversion used. [-]
    order : float, optional
        Impose this order instead of choosing one. [-]

    Returns
    -------
    SelfHeatFit
        Fitted Arrhenius parameters and order (see the class). [object]

    Raises
    ------
    ModelDomainError
        Fewer than five usable points or a non-Arrhenius (rising with 1/T) result.
    """
    temp = np.asarray(temperature, dtype=float)
    r = np.asarray(rate, dtype=float)
    a = initial_conversion + (temp - onset_temperature) / total_rise
    use = (r > 0.0) & (a < max_conversion) & (temp > onset_temperature)
    if np.count_nonzero(use) < 5:
        raise ModelDomainError("fewer than five points of the exotherm can be fitted")
    x = 1.0 / temp[use]
    y0 = np.log(r[use] / total_rise)
    w = np.log(1.0 - a[use])
    orders = ORDER_GRID if order is None else np.array([float(order)])
    slope, intercept, rss, syy = _line_fits(x, y0, w, orders)
    rms = np.sqrt(rss / x.size)
    best = int(np.argmin(rms))
    candidates = {}
    for label, n in (("zero-order", 0.0), ("first-order", 1.0), ("second-order", 2.0)):
        if order is None:
            k = int(round(n / 0.01))
            candidates[label] = (n, float(rms[k]), float(-slope[k] * GAS_CONSTANT),
                                 float(intercept[k]))
    candidates["best"] = (float(orders[best]), float(rms[best]),
                          float(-slope[best] * GAS_CONSTANT), float(intercept[best]))
    if order is not None:
        chosen, reason = 0, f"order {float(order):g} imposed"
    else:
        chosen, reason = best, None
        for label in ("zero-order", "first-order", "second-order"):
            n, value, _, _ = candidates[label]
            if value <= ORDER_PREFERENCE * rms[best]:
                chosen = int(round(n / 0.01))
                reason = (f"{label} chosen: RMS residual of ln k* {value:.3g} is within "
                          f"{(ORDER_PREFERENCE - 1) * 100:.0f} % of the best order "
                          f"n = {orders[best]:.2f} ({rms[best]:.3g}; design rule: prefer the "
                          "simpler order)")
                break
        if reason is None:
            reason = (f"order n = {orders[best]:.2f} chosen: smallest RMS residual of ln k* "
                      f"({rms[best]:.3g}); zero order {candidates['zero-order'][1]:.3g}, first "
                      f"order {candidates['first-order'][1]:.3g}")
    energy = float(-slope[chosen] * GAS_CONSTANT)
    if not energy > 0.0:
        raise ModelDomainError("the self-heat rate does not rise with temperature as Arrhenius "
                               "kinetics do (fitted E <= 0)")
    n = float(orders[chosen])
    r2 = 1.0 - float(rss[chosen]) / float(syy[chosen]) if syy[chosen] > 0 else 1.0
    return SelfHeatFit(energy, float(intercept[chosen]), n,
                       "zero-order" if n == 0.0 else "nth-order", float(rms[chosen]), r2,
                       float(orders[best]), candidates, reason, int(x.size))


def conversion_before_onset(time, temperature, activation_energy, ln_pre_exponential_factor):
    """Conversion reached before the detected onset, a_0 = 1 - exp(-int A exp(-E/(R T(t))) dt)
    over the record before it (first-order form; for small a_0 every order gives the integral
    itself; derived).

    Parameters
    ----------
    time : array_like
        Times up to the onset. [s]
    temperature : array_like
        [K]
    activation_energy : float
        [J/mol]
    ln_pre_exponential_factor : float
        [-]

    Returns
    -------
    float
        a_0, capped at 0.5. [-]
    """
    t = np.asarray(time, dtype=float)
    temp = np.asarray(temperature, dtype=float)
    if t.size < 2:
        return 0.0
    k = np.exp(ln_pre_exponential_factor - activation_energy / (GAS_CONSTANT * temp))
    integral = float(np.sum(0.5 * (k[1:] + k[:-1]) * np.diff(t)))
    return min(1.0 - math.exp(-integral), 0.5)
