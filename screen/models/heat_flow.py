"""Heat-flow calorimetry of an isothermal batch or semi-batch run: baseline, heat of reaction,
thermal conversion, thermal accumulation and MTSR over time.

Pure functions on SI floats and numpy arrays (s, K, W, J, kg). They know nothing of files or
the command line; :mod:`screen.analyses.heat_flow` composes them.

Heat balance of the reaction mass (the usual reaction-calorimetry balance; e.g.
R. N. Landau, D. G. Blackmond, H.-H. Tung, "Calorimetric investigation of an exothermic
reaction: kinetic and heat flow modeling", Ind. Eng. Chem. Res. 33 (1994) 814-820; from
memory)::

    q_rx(t) = q_meas(t) - q_base(t) + q_dos(t) + m(t) c'p dT_r/dt
    q_dos(t) = m_dot_feed(t) c'p,feed (T_r(t) - T_feed)

q_meas is the heat flow the calorimeter reports (heat leaving the mass through the wall, positive
exothermic), q_base the baseline (stirrer power, losses, drift), q_dos the sensible heat taken
up by the feed, and m c'p dT_r/dt the heat stored by a mass whose temperature drifts. The thermal
conversion, accumulation and MTSR follow R. Gygax, "Chemical reaction engineering for safety",
Chem. Eng. Sci. 43 (1988) 1759-1771, and F. Stoessel, "What is your thermal risk?", Chem. Eng.
Prog. 89 (1993) 68-75 (published; equations as used throughout the trade)::

    X_th(t) = int_0^t q_rx dt / Q_total
    X_ac(t) = X_dosed(t) - X_th(t)
    MTSR(t) = T_r(t) + X_ac(t) Q_total / (m(t) c'p)
"""

from __future__ import annotations

import numpy as np

from screen.errors import ModelDomainError
from screen.models.domain import require_positive

#: Baseline constructions offered by :func:`baseline`.
BASELINES = ("linear", "dosing", "conversion")


def _array(values, name, unit):
    array = np.asarray(values, dtype=float)
    if array.ndim != 1 or array.size < 2:
        raise ModelDomainError(f"{name} must be a 1-D array of at least two values [{unit}]")
    if not np.all(np.isfinite(array)):
        raise ModelDomainError(f"{name} contains a non-finite value [{unit}]")
    return array


def cumulative_integral(time, power):
    """Running trapezoidal integral of a power over time.

    Parameters
    ----------
    time : array_like
        Strictly increasing times. [s]
    power : array_like
        Power at those times. [W]

    Returns
    -------
    numpy.ndarray
        Energy released from ``time[0]`` to each time, starting at 0. [J]

    Examples
    --------
    >>> float(cumulative_integral([0.0, 1.0, 3.0], [2.0, 2.0, 4.0])[-1])
    8.0
    """
    t = _array(time, "time", "s")
    p = _array(power, "power", "W")
    if p.size != t.size:
        raise ModelDomainError("time and power must have the same length")
    out = np.empty_like(p)
    out[0] = 0.0
    np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(t), out=out[1:])
    return out


def linear_baseline(time, before, after):
    """Straight line in time through the mean levels of two steady segments.

    The mean of a straight line over a segment equals its value at the mean time of the
    segment, so a linear drift is reproduced exactly (derived).

    Parameters
    ----------
    time : array_like
        Times at which the baseline is wanted. [s]
    before, after : tuple of (float, float)
        (mean time [s], mean level [W]) of the steady segment before the reaction and after it.

    Returns
    -------
    numpy.ndarray
        Baseline. [W]
    """
    t = np.asarray(time, dtype=float)
    (t0, q0), (t1, q1) = before, after
    if not t1 > t0:
        raise ModelDomainError("the steady segment after the reaction must follow the one before it")
    return q0 + (q1 - q0) * (t - t0) / (t1 - t0)


def proportional_baseline(fraction, level_before, level_after):
    """Baseline moving from one steady level to the other in proportion to a fraction.

    With the dosed fraction it follows the change of fill level and heat-transfer area during
    dosing; with the thermal conversion it is the reaction-calorimetry analogue of the
    sigmoidal DSC baseline (common practice, no source).

    Parameters
    ----------
    fraction : array_like
        Dosed fraction or thermal conversion, 0 before and 1 after. [-]
    level_before, level_after : float
        Steady heat-flow levels before and after the reaction. [W]

    Returns
    -------
    numpy.ndarray
        Baseline. [W]
    """
    f = np.clip(np.asarray(fraction, dtype=float), 0.0, 1.0)
    return level_before + (level_after - level_before) * f


def dosing_heat_flow(time, dosed_mass, reactor_temperature, feed_temperature,
                     feed_specific_heat):
    """Sensible heat flow taken up by the feed, q_dos = m_dot c'p,feed (T_r - T_feed).

    Parameters
    ----------
    time : array_like
        [s]
    dosed_mass : array_like
        Cumulative dosed mass. [kg]
    reactor_temperature : array_like
        [K]
    feed_temperature : float
        Temperature of the feed as it enters. [K]
    feed_specific_heat : float
        Specific heat capacity of the feed. [J/(kg K)]

    Returns
    -------
    numpy.ndarray
        Heat flow to be added to the measured one (positive when the feed is colder than the
        mass). [W]
    """
    t = _array(time, "time", "s")
    m = _array(dosed_mass, "dosed_mass", "kg")
    temperature = _array(reactor_temperature, "reactor_temperature", "K")
    cp = require_positive(feed_specific_heat, "feed_specific_heat", "J/(kg K)")
    feed = require_positive(feed_temperature, "feed_temperature", "K")
    return np.gradient(m, t) * cp * (temperature - feed)


def sensible_heat_flow(time, mass, reactor_temperature, specific_heat):
    """Heat stored in the reaction mass while its temperature changes, m(t) c'p dT_r/dt.

    Parameters
    ----------
    time : array_like
        [s]
    mass : array_like
        Reaction mass present. [kg]
    reactor_temperature : array_like
        [K]
    specific_heat : float
        Specific heat capacity of the reaction mass, c'p. [J/(kg K)]

    Returns
    -------
    numpy.ndarray
        [W]
    """
    t = _array(time, "time", "s")
    temperature = _array(reactor_temperature, "reactor_temperature", "K")
    cp = require_positive(specific_heat, "specific_heat", "J/(kg K)")
    return np.asarray(mass, dtype=float) * cp * np.gradient(temperature, t)


def thermal_conversion(cumulative_heat, total_heat):
    """X_th = Q(t)/Q_total (Gygax 1988).

    Parameters
    ----------
    cumulative_heat : array_like
        Heat released up to each time. [J]
    total_heat : float
        Total heat of reaction. [J]

    Returns
    -------
    numpy.ndarray
        Thermal conversion. [-]
    """
    total = require_positive(total_heat, "total_heat", "J")
    return np.asarray(cumulative_heat, dtype=float) / total


def thermal_accumulation(dosed_fraction, conversion):
    """X_ac = X_dosed - X_th (Gygax 1988; Stoessel 1993).

    Parameters
    ----------
    dosed_fraction : array_like
        Fraction of the feed dosed (1 throughout for a batch). [-]
    conversion : array_like
        Thermal conversion X_th. [-]

    Returns
    -------
    numpy.ndarray
        Thermal accumulation. [-] Small negative values are noise or baseline error.
    """
    return np.asarray(dosed_fraction, dtype=float) - np.asarray(conversion, dtype=float)


def mtsr_course(reactor_temperature, accumulation, total_heat, mass, specific_heat):
    """MTSR(t) = T_r(t) + X_ac(t) Q_total/(m(t) c'p) (Stoessel 1993, with the mass present).

    Negative accumulation (noise) is taken as zero.

    Parameters
    ----------
    reactor_temperature : array_like
        [K]
    accumulation : array_like
        Thermal accumulation X_ac. [-]
    total_heat : float
        Total heat of reaction. [J]
    mass : array_like
        Reaction mass present. [kg]
    specific_heat : float
        c'p of the reaction mass. [J/(kg K)]

    Returns
    -------
    numpy.ndarray
        MTSR. [K]

    Examples
    --------
    >>> float(mtsr_course([323.15], [0.3], 300e3, [1.5], 2000.0)[0])
    353.15
    """
    total = require_positive(total_heat, "total_heat", "J")
    cp = require_positive(specific_heat, "specific_heat", "J/(kg K)")
    x = np.clip(np.asarray(accumulation, dtype=float), 0.0, None)
    return np.asarray(reactor_temperature, dtype=float) + x * total / (
        np.asarray(mass, dtype=float) * cp)


def dosing_interval(dosed_mass, fraction=2e-3):
    """Indices of the start and the end of dosing.

    Parameters
    ----------
    dosed_mass : array_like
        Cumulative dosed mass. [kg]
    fraction : float
        Share of the total taken as the start and end thresholds (design). [-]

    Returns
    -------
    tuple of int or None
        (first index above ``fraction`` of the total, first index within ``fraction`` of the
        total); None when nothing is dosed. [-]
    """
    m = np.asarray(dosed_mass, dtype=float) - float(dosed_mass[0])
    total = float(m[-1])
    if not total > 0.0:
        return None
    start = int(np.argmax(m > fraction * total))
    end = int(np.argmax(m >= (1.0 - fraction) * total))
    return start, max(end, start)


def steady_tail_start(signal, tolerance, tail_fraction=0.05):
    """First index from which a smoothed signal stays within ``tolerance`` of its final level.

    Parameters
    ----------
    signal : array_like
        Smoothed heat flow. [W]
    tolerance : float
        Half-width of the band around the final level. [W]
    tail_fraction : float
        Share of the record whose median defines the final level (design). [-]

    Returns
    -------
    tuple of (int, float)
        (index, final level [W]).
    """
    s = np.asarray(signal, dtype=float)
    n_tail = max(5, int(tail_fraction * s.size))
    level = float(np.median(s[-n_tail:]))
    outside = np.nonzero(np.abs(s - level) > tolerance)[0]
    start = int(outside[-1]) + 1 if outside.size else 0
    return min(start, s.size - 1), level


def decimate_indices(size, count, keep=()):
    """At most about ``count`` indices spread evenly over ``size`` samples, plus ``keep``.

    Parameters
    ----------
    size : int
        Number of samples. [-]
    count : int
        Wanted number of indices. [-]
    keep : sequence of int
        Indices that must be included (extremes, events). [-]

    Returns
    -------
    numpy.ndarray
        Sorted unique indices including the first and the last. [-]
    """
    base = np.unique(np.linspace(0, size - 1, min(size, count)).round().astype(int))
    return np.unique(np.concatenate([base, np.asarray(list(keep), dtype=int)]))
