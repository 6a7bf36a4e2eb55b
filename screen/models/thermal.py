"""Adiabatic temperature rise and MTSR.

References: F. Stoessel, "What is your thermal risk?", Chem. Eng. Prog. 89(10) (1993) 68-75;
F. Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 2; CCPS, Guidelines for
Chemical Reactivity Evaluation and Application to Process Design, AIChE 1995.
"""

from __future__ import annotations

from screen.models.domain import (
    require_finite,
    require_fraction,
    require_non_negative,
    require_positive,
)


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
    energy = require_finite(specific_energy, "specific_energy", "J/kg")
    heat = require_positive(specific_heat, "specific_heat", "J/(kg K)")
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
    enthalpy = require_finite(molar_enthalpy, "molar_enthalpy", "J/mol")
    amount = require_non_negative(limiting_amount, "limiting_amount", "mol")
    final_mass = require_positive(mass, "mass", "kg")
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
    temperature = require_positive(process_temperature, "process_temperature", "K")
    rise = require_non_negative(adiabatic_rise, "adiabatic_rise", "K")
    fraction = require_fraction(accumulation, "accumulation")
    ratio = require_positive(require_fraction(mass_ratio, "mass_ratio"), "mass_ratio")
    return temperature + fraction * rise / ratio
