"""Adiabatic temperature rise and MTSR.

References: F. Stoessel, "What is your thermal risk?", Chem. Eng. Prog. 89(10) (1993) 68-75;
F. Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 2; CCPS, Guidelines for
Chemical Reactivity Evaluation and Application to Process Design, AIChE 1995.
"""

from __future__ import annotations

import numpy as np

from screen.errors import ModelDomainError


def _checked(name, value, low=None, high=None, low_open=False, unit=""):
    """Array of ``value`` after a domain check (raises ModelDomainError, never returns NaN)."""
    array = np.asarray(value, dtype=float)
    bad = ~np.isfinite(array)
    if low is not None:
        bad |= (array <= low) if low_open else (array < low)
    if high is not None:
        bad |= array > high
    if np.any(bad):
        first = array[bad].flat[0] if array.ndim else float(array)
        bounds = []
        if low is not None:
            bounds.append(("> " if low_open else ">= ") + f"{low:g}")
        if high is not None:
            bounds.append(f"<= {high:g}")
        raise ModelDomainError(f"{name} must be finite and {' and '.join(bounds) or 'finite'}"
                               f"{' ' + unit if unit else ''}, got {first!r}")
    return array


def adiabatic_temperature_rise(specific_energy, specific_heat):
    """Adiabatic temperature rise dT_ad = Q'/c'p.

    Parameters
    ----------
    specific_energy : float or array
        Heat released per kg of reaction mass. [J/kg]
    specific_heat : float or array
        Specific heat capacity of the reaction mass. [J/(kg K)]

    Returns
    -------
    float or array
        Adiabatic temperature rise. [K]

    Examples
    --------
    >>> round(adiabatic_temperature_rise(180e3, 1800.0), 6)
    100.0
    """
    energy = _checked("specific_energy", specific_energy, unit="J/kg")
    heat = _checked("specific_heat", specific_heat, 0.0, low_open=True, unit="J/(kg K)")
    return energy / heat


def specific_energy_from_molar(molar_enthalpy, limiting_amount, mass):
    """Heat released per kg of final reaction mass, Q' = n (-dH_r)/m.

    Parameters
    ----------
    molar_enthalpy : float
        Molar reaction enthalpy, negative for exothermic. [J/mol]
    limiting_amount : float
        Amount of limiting reagent. [mol]
    mass : float
        Final reaction mass. [kg]

    Returns
    -------
    float
        [J/kg]
    """
    enthalpy = _checked("molar_enthalpy", molar_enthalpy, unit="J/mol")
    amount = _checked("limiting_amount", limiting_amount, 0.0, unit="mol")
    final_mass = _checked("mass", mass, 0.0, low_open=True, unit="kg")
    return -enthalpy * amount / final_mass


def maximum_temperature_synthesis_reaction(process_temperature, adiabatic_rise, accumulation,
                                           mass_ratio=1.0):
    """MTSR = T_p + X_ac dT_ad m_final/m(t_acc).

    The accumulated heat is released into the mass present at the moment of maximum accumulation,
    so for semi-batch the rise is divided by ``mass_ratio`` = m(t_acc)/m_final (derived; leaving it
    out underestimates MTSR). Stoessel (1993) for MTSR = T_p + X_ac dT_ad.

    Parameters
    ----------
    process_temperature : float or array
        [K]
    adiabatic_rise : float or array
        Adiabatic rise of the synthesis for the final mass. [K]
    accumulation : float or array
        Maximum thermal accumulation X_ac (0..1). [-]
    mass_ratio : float or array
        Mass present at maximum accumulation over final mass (0..1]. [-]

    Returns
    -------
    float or array
        MTSR. [K]

    Examples
    --------
    >>> float(maximum_temperature_synthesis_reaction(350.0, 100.0, 0.3, 0.75))
    390.0
    """
    temperature = _checked("process_temperature", process_temperature, 0.0, low_open=True,
                           unit="K")
    rise = _checked("adiabatic_rise", adiabatic_rise, 0.0, unit="K")
    fraction = _checked("accumulation", accumulation, 0.0, 1.0)
    ratio = _checked("mass_ratio", mass_ratio, 0.0, 1.0, low_open=True)
    return temperature + fraction * rise / ratio
