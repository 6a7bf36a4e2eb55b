"""Criticality classes of a cooling-failure scenario, and severity and probability levels.

The criticality classes compare four temperatures: the process temperature T_p, the maximum
temperature of the synthesis reaction MTSR, the maximum technical temperature MTT (boiling point
or relief temperature) and TD24 (the start temperature at which the decomposition's TMRad is
24 h). Reference: F. Stoessel, "What is your thermal risk?", Chem. Eng. Prog. 89(10) (1993)
68-75; F. Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 3. The ordering of
the classes below is from memory and internally consistent:

====== ===================================== ============================================
class  ordering                              meaning
====== ===================================== ============================================
1      MTSR < MTT < TD24                     no runaway; MTT is a second barrier
2      MTSR < TD24 < MTT                     no runaway unless the mass is held long at MTT
3      MTT < MTSR < TD24                     boiling is the barrier; decomposition not reached
4      MTT < TD24 < MTSR                     boiling is the barrier before the decomposition
5      TD24 < MTSR, TD24 < MTT               decomposition triggered; boiling is no barrier
====== ===================================== ============================================

Ties are not covered by the published strict inequalities; they are resolved to the more
critical class (design). TD24 at or below T_p is outside the scheme and reported as class 5, the
most critical outcome (design).

Severity and probability levels (bands from memory, same source): severity from the adiabatic
rise of the runaway (final temperature minus T_p), probability from TMRad at MTSR. A value on a
band limit goes to the more severe level (design).
"""

from __future__ import annotations

import numpy as np

from screen.errors import ModelDomainError

CLASS_MEANINGS = {
    1: "After a cooling failure the synthesis alone stays below the MTT and TD24: it does not "
       "reach the decomposition range, and boiling (MTT) would act as a further barrier.",
    2: "After a cooling failure the synthesis alone does not reach the decomposition range, but "
       "the mass must not be held near the MTT for long: TD24 lies below the MTT.",
    3: "The synthesis runaway reaches the MTT; evaporative cooling (or pressure relief) is the "
       "barrier that must be designed and checked. The decomposition is not reached.",
    4: "The synthesis runaway would reach the decomposition range; the barrier at the MTT "
       "(evaporative cooling or relief) must hold, so it must be designed and checked.",
    5: "A cooling failure triggers the decomposition before the MTT can act: no technical barrier "
       "from boiling. Redesign the process or provide qualified emergency measures.",
}

#: Severity band limits on the runaway's adiabatic rise [K] (Stoessel 2008 ch. 3, from memory).
SEVERITY_LIMITS = (50.0, 200.0, 400.0)
#: Probability band limits on TMRad at MTSR [h] (Stoessel 2008 ch. 3, from memory).
PROBABILITY_LIMITS = (1.0, 8.0, 24.0, 50.0, 100.0)
#: Three-level probability code for each six-level code: up to 8 h high, up to 24 h medium.
PROBABILITY_3_FROM_6 = (0, 0, 1, 2, 2, 2)

SEVERITY_4_LEVELS = ("negligible", "medium", "critical", "catastrophic")
SEVERITY_3_LEVELS = ("low", "medium", "high")
PROBABILITY_6_LEVELS = ("frequent", "probable", "occasional", "seldom", "remote",
                        "almost impossible")
PROBABILITY_3_LEVELS = ("high", "medium", "low")


def criticality_class(process_temperature, mtsr, mtt, td24):
    """Criticality class 1..5 of a cooling-failure scenario (vectorised).

    Parameters
    ----------
    process_temperature : float or array
        Process temperature T_p. [K]
    mtsr : float or array
        Maximum temperature of the synthesis reaction. [K]
    mtt : float or array
        Maximum technical temperature (boiling point or relief temperature). [K]
    td24 : float or array
        Temperature at which TMRad of the decomposition is 24 h. [K]

    Returns
    -------
    int or ndarray of int
        Class 1..5 (Stoessel 1993). Ties go to the more critical class; TD24 <= T_p gives 5. [-]

    References
    ----------
    F. Stoessel, "What is your thermal risk?", Chem. Eng. Prog. 89(10) (1993) 68-75 (the five
    classes from the order of T_p, MTSR, MTT and TD24; from memory, verify against the source).

    Examples
    --------
    >>> criticality_class(350.0, 380.0, 400.0, 420.0)
    1
    >>> criticality_class(350.0, 420.0, 400.0, 410.0)
    4
    """
    tp, ms, mt, td = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in
                                           (process_temperature, mtsr, mtt, td24)))
    unknown = ~(np.isfinite(tp) & np.isfinite(ms) & np.isfinite(mt) & np.isfinite(td))
    if unknown.ndim == 0 and bool(unknown):
        raise ModelDomainError("criticality class needs finite T_p, MTSR, MTT and TD24")
    decomposition_reached = ms >= td
    boiling_reached = ms >= mt
    result = np.where(
        decomposition_reached,
        np.where(mt < td, 4, 5),
        np.where(boiling_reached, 3, np.where(mt < td, 1, 2)),
    )
    result = np.where(td <= tp, 5, result)
    # Fail closed in arrays: an unknown temperature counts as the most critical class.
    result = np.where(unknown, 5, result)
    if result.ndim == 0:
        return int(result)
    return result.astype(int)


def severity_level(adiabatic_rise, levels: int = 4):
    """Severity from the adiabatic temperature rise of the runaway (final temperature - T_p).

    Parameters
    ----------
    adiabatic_rise : float
        Final temperature minus process temperature. [K]
    levels : {3, 4}
        Four levels: >= 400 K catastrophic, >= 200 K critical, >= 50 K medium, else negligible.
        Three levels: >= 200 K high, >= 50 K medium, else low. (Stoessel 2008 ch. 3; bands from
        memory; a value on a limit goes to the more severe level, design.) [-]

    Returns
    -------
    str
        Severity word, one of SEVERITY_4_LEVELS or SEVERITY_3_LEVELS. [text]

    References
    ----------
    F. Stoessel, "Thermal Safety of Chemical Processes: Risk Assessment and Process Design",
    Wiley-VCH, Weinheim, 2008, ch. 3 (from memory, verify against the source).
    """
    rise = float(adiabatic_rise)
    if not np.isfinite(rise):
        raise ModelDomainError("adiabatic rise must be finite")
    if levels == 4:
        return SEVERITY_4_LEVELS[int(severity_codes(rise))]
    if levels == 3:
        # Three levels merge "critical" and "catastrophic" into "high".
        return SEVERITY_3_LEVELS[min(int(severity_codes(rise)), 2)]
    raise ValueError("levels must be 3 or 4")


def severity_with_pressure(adiabatic_rise, levels: int = 4, pressure_increase: bool = False):
    """Severity, never at the lowest level when the runaway raises the pressure.

    The lowest level of the published scheme ("negligible"; "low" of three) requires a small
    adiabatic rise AND no pressure increase (Stoessel 2008, Thermal Safety of Chemical
    Processes, ch. 3, severity table; from memory). A runaway that forms gas or takes the mass
    above its boiling point at the operating pressure is therefore graded at least "medium".

    Parameters
    ----------
    adiabatic_rise : float
        Final temperature minus process temperature. [K]
    levels : {3, 4}
        As :func:`severity_level`. [-]
    pressure_increase : bool
        The runaway raises the pressure (gas yield given, or final temperature above the boiling
        point at the operating pressure). [bool]

    Returns
    -------
    str
        Severity word, one of SEVERITY_4_LEVELS or SEVERITY_3_LEVELS. [text]

    Examples
    --------
    >>> severity_with_pressure(20.0, 4, pressure_increase=True)
    'medium'
    >>> severity_with_pressure(20.0, 3, pressure_increase=False)
    'low'
    """
    level = severity_level(adiabatic_rise, levels)
    if pressure_increase and level in (SEVERITY_4_LEVELS[0], SEVERITY_3_LEVELS[0]):
        return "medium"
    return level


def probability_level(tmrad_hours, levels: int = 6):
    """Probability of a runaway from TMRad at MTSR.

    Parameters
    ----------
    tmrad_hours : float
        TMRad of the decomposition started at MTSR. [h]
    levels : {3, 6}
        Six levels: <= 1 h frequent, <= 8 h probable, <= 24 h occasional, <= 50 h seldom,
        <= 100 h remote, else almost impossible. Three levels: <= 8 h high, <= 24 h medium,
        else low. (Stoessel 2008 ch. 3; bands from memory; a value on a limit goes to the more
        severe level, design.) [-]

    Returns
    -------
    str
        Probability word, one of PROBABILITY_6_LEVELS or PROBABILITY_3_LEVELS. [text]

    References
    ----------
    F. Stoessel, "Thermal Safety of Chemical Processes: Risk Assessment and Process Design",
    Wiley-VCH, Weinheim, 2008, ch. 3 (from memory, verify against the source).
    """
    tmr = float(tmrad_hours)
    if np.isnan(tmr) or tmr < 0:
        raise ModelDomainError("TMRad must be a non-negative number")
    if levels == 6:
        return PROBABILITY_6_LEVELS[int(probability_codes(tmr))]
    if levels == 3:
        return PROBABILITY_3_LEVELS[PROBABILITY_3_FROM_6[int(probability_codes(tmr))]]
    raise ValueError("levels must be 3 or 6")


def severity_codes(adiabatic_rise):
    """Vectorised 4-level severity as integer codes 0..3 (index into SEVERITY_4_LEVELS).

    Parameters
    ----------
    adiabatic_rise : float or array
        Final temperature minus process temperature; NaN (unknown) gives code 3. [K]

    Returns
    -------
    numpy.ndarray of int
        Code 0 negligible, 1 medium, 2 critical, 3 catastrophic. [-]

    Examples
    --------
    Limits 50, 200 and 400 K (see severity_level); a rise on a limit takes the higher code:

    >>> severity_codes([10.0, 50.0, 250.0, 400.0, float("nan")]).tolist()
    [0, 1, 2, 3, 3]
    """
    rise = np.asarray(adiabatic_rise, dtype=float)
    codes = np.searchsorted(np.array(SEVERITY_LIMITS), rise, side="right")
    return np.where(np.isnan(rise), 3, codes)  # unknown rise: "catastrophic" (fail closed)


def probability_codes(tmrad_hours):
    """Vectorised 6-level probability as integer codes 0..5 (index into PROBABILITY_6_LEVELS).

    Parameters
    ----------
    tmrad_hours : float or array
        TMRad of the decomposition started at MTSR; NaN (unknown) gives code 0. [h]

    Returns
    -------
    numpy.ndarray of int
        Code 0 frequent ... 5 almost impossible. [-]

    Examples
    --------
    Limits 1, 8, 24, 50 and 100 h (see probability_level); a TMRad on a limit takes the more
    severe (lower) code:

    >>> probability_codes([0.5, 8.0, 30.0, 100.0, 200.0, float("nan")]).tolist()
    [0, 1, 3, 4, 5, 0]
    """
    tmr = np.asarray(tmrad_hours, dtype=float)
    codes = np.searchsorted(np.array(PROBABILITY_LIMITS), tmr, side="left")
    return np.where(np.isnan(tmr), 0, codes)  # unknown TMRad: "frequent" (fail closed)
