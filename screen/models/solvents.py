"""Pure-solvent properties: vapour pressure, boiling temperature, latent heat.

The data come from ``screen/data/solvents.csv``, a small table generated once from the
``chemicals`` package (Caleb Bell, Chemical Engineering Design Library) by
``docs/tools/generate_solvent_table.py``; every row names the source of each property. This module
never imports ``chemicals``: it reads the CSV with the standard ``csv`` module, once per process.

Reading the packaged table is the one file access in ``screen.models``; it is read-only package
data, like a table of constants, and never a user file.

Names are matched without regard to case, spaces, hyphens and underscores ("2-MeTHF", "2 methf").
CAS numbers are accepted with their check digit verified. Ambiguous names ("xylene", "butanol",
"ether", "hexanes") are rejected with the list of candidates; nothing is guessed.

Examples
--------
Water against the IAPWS-95 saturation values (W. Wagner, A. Pruss, "The IAPWS formulation 1995
for the thermodynamic properties of ordinary water substance", J. Phys. Chem. Ref. Data 31
(2002) 387-535; table values from memory): normal boiling point 373.124 K (99.974 degC),
vapour pressure 3.1699 kPa at 25 degC, latent heat 2256.4 kJ/kg at 100 degC.

>>> water = lookup_solvent("Water")
>>> abs(boiling_temperature(water, 101325.0) - 373.124) < 0.1
True
>>> abs(vapour_pressure(water, 298.15) - 3169.9) < 5.0
True
>>> abs(latent_heat(water, 373.15) - 2256.4e3) < 1.0e3
True
>>> lookup_solvent("7732-18-5") is water
True
"""

from __future__ import annotations

import csv
import functools
import math
import re
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from screen.errors import CaseError, DataFileError, ModelDomainError

#: Exponent of the Watson correlation (Watson 1943).
WATSON_EXPONENT = 0.38

_CAS_PATTERN = re.compile(r"^(\d{2,7})-(\d{2})-(\d)$")

_XYLENES = "o-xylene (95-47-6), m-xylene (108-38-3) or p-xylene (106-42-3)"
_XYLENE_MESSAGE = (
    f"is ambiguous: name one isomer, {_XYLENES}. For a technical xylene mixture (CAS 1330-20-7), "
    "which boils over a range, give the boiling temperature and latent heat in the case instead"
)

#: Names that match more than one compound, or a mixture. Keys are normalised names.
_AMBIGUOUS_NAMES = {
    "xylene": _XYLENE_MESSAGE,
    "xylenes": _XYLENE_MESSAGE,
    "mixedxylenes": _XYLENE_MESSAGE,
    "dimethylbenzene": _XYLENE_MESSAGE,
    "1330207": _XYLENE_MESSAGE,
    "butanol": "is ambiguous: the table holds 1-butanol (71-36-3) only; 2-butanol, isobutanol and "
    "tert-butanol are not in it",
    "butylalcohol": "is ambiguous: the table holds 1-butanol (71-36-3) only",
    "propanol": "is ambiguous: the table holds 2-propanol (67-63-0) only; 1-propanol is not in it",
    "ether": "is ambiguous: name diethyl ether (60-29-7), methyl tert-butyl ether (1634-04-4), "
    "tetrahydrofuran (109-99-9) or 2-methyltetrahydrofuran (96-47-9)",
    "hexanes": "names a mixture: the table holds n-hexane (110-54-3); for a technical hexane cut "
    "give the boiling temperature and latent heat in the case",
    "heptanes": "names a mixture: the table holds n-heptane (142-82-5); for a technical heptane cut "
    "give the boiling temperature and latent heat in the case",
    "petroleumether": "names a mixture that boils over a range: give the boiling temperature and "
    "latent heat in the case",
}


@dataclass(frozen=True)
class Solvent:
    """One row of the solvent table, in SI units.

    Attributes
    ----------
    cas : str
        CAS registry number.
    name : str
        Preferred name.
    aliases : tuple of str
        Other accepted names.
    molar_mass : float
        Molar mass. [kg/mol]
    normal_boiling_temperature : float
        Tabulated normal boiling point (101.325 kPa), for information; the boiling temperature
        used in calculations comes from the vapour-pressure curve. [K]
    normal_boiling_temperature_source : str
        Where the boiling point comes from.
    critical_temperature : float
        Critical temperature, the upper end of the Watson scaling. [K]
    critical_temperature_source : str
        Where the critical temperature comes from.
    vapour_pressure_equation : str
        ``"DIPPR101"``, ``"ANTOINE10"`` or ``"ANTOINE_E"``.
    vapour_pressure_coefficients : tuple of float
        A, B, C, D, E of DIPPR101, or A, B, C of the Antoine forms (p in Pa, T in K).
    minimum_temperature, maximum_temperature : float
        Validity range of the vapour-pressure correlation. [K]
    vapour_pressure_source : str
        Where the coefficients come from.
    latent_heat_reference : float
        Latent heat of vaporisation at the reference temperature. [J/kg]
    latent_heat_reference_temperature : float
        Temperature of that value. [K]
    latent_heat_model : str
        ``"watson"`` (scaled with the Watson correlation) or ``"constant"``.
    latent_heat_source : str
        Where the latent heat comes from.
    liquid_density_25c : float
        Liquid density at 25 degC. [kg/m^3]
    liquid_density_at_boiling_point : float
        Liquid density at the tabulated normal boiling point. [kg/m^3]
    liquid_density_source : str
        Where the densities come from.
    note : str
        Remarks (empty when none).
    """

    cas: str
    name: str
    aliases: tuple[str, ...]
    molar_mass: float
    normal_boiling_temperature: float
    normal_boiling_temperature_source: str
    critical_temperature: float
    critical_temperature_source: str
    vapour_pressure_equation: str
    vapour_pressure_coefficients: tuple[float, ...]
    minimum_temperature: float
    maximum_temperature: float
    vapour_pressure_source: str
    latent_heat_reference: float
    latent_heat_reference_temperature: float
    latent_heat_model: str
    latent_heat_source: str
    liquid_density_25c: float
    liquid_density_at_boiling_point: float
    liquid_density_source: str
    note: str


def _normalise_name(text: str) -> str:
    """Lower case without spaces, hyphens (any dash), underscores and dots."""
    return re.sub(r"[\s\-\u2010-\u2015_.]+", "", text.strip().lower())


def _cas_check_digit_ok(cas: str) -> bool:
    match = _CAS_PATTERN.match(cas)
    if match is None:
        return False
    digits = (match.group(1) + match.group(2))[::-1]
    return sum((index + 1) * int(digit) for index, digit in enumerate(digits)) % 10 == int(match.group(3))


def _parse_row(row: dict[str, str]) -> Solvent:
    equation = row["vapour_pressure_equation"]
    names = ("A", "B", "C", "D", "E") if equation == "DIPPR101" else ("A", "B", "C")
    if equation not in ("DIPPR101", "ANTOINE10", "ANTOINE_E"):
        raise DataFileError(f"unknown vapour-pressure equation {equation!r} for {row['cas']}")
    molar_mass = float(row["molar_mass_g_per_mol"]) / 1000.0  # g/mol -> kg/mol
    return Solvent(
        cas=row["cas"],
        name=row["name"],
        aliases=tuple(alias for alias in row["aliases"].split(";") if alias),
        molar_mass=molar_mass,
        normal_boiling_temperature=float(row["normal_boiling_point_K"]),
        normal_boiling_temperature_source=row["normal_boiling_point_source"],
        critical_temperature=float(row["critical_temperature_K"]),
        critical_temperature_source=row["critical_temperature_source"],
        vapour_pressure_equation=equation,
        vapour_pressure_coefficients=tuple(float(row[name]) for name in names),
        minimum_temperature=float(row["Tmin_K"]),
        maximum_temperature=float(row["Tmax_K"]),
        vapour_pressure_source=row["vapour_pressure_source"],
        latent_heat_reference=float(row["latent_heat_J_per_mol"]) / molar_mass,  # J/mol -> J/kg
        latent_heat_reference_temperature=float(row["latent_heat_reference_temperature_K"]),
        latent_heat_model=row["latent_heat_model"],
        latent_heat_source=row["latent_heat_source"],
        liquid_density_25c=float(row["liquid_density_25C_kg_per_m3"]),
        liquid_density_at_boiling_point=float(row["liquid_density_at_boiling_point_kg_per_m3"]),
        liquid_density_source=row["liquid_density_source"],
        note=row["note"],
    )


@lru_cache(maxsize=1)
def _table() -> tuple[tuple[Solvent, ...], dict[str, Solvent]]:
    """The solvents in table order and an index by CAS and normalised name (read once)."""
    from importlib import resources

    try:
        text = resources.files("screen.data").joinpath("solvents.csv").read_text(encoding="utf-8")
        lines = [line for line in text.splitlines() if line and not line.startswith("#")]
        solvents = tuple(_parse_row(row) for row in csv.DictReader(lines))
    except (OSError, KeyError, ValueError) as error:
        raise DataFileError(f"the packaged solvent table cannot be read: {error}", path="screen/data/solvents.csv") from error
    index: dict[str, Solvent] = {}
    for solvent in solvents:
        for key in (solvent.cas, _normalise_name(solvent.name), *map(_normalise_name, solvent.aliases)):
            if key in index and index[key] is not solvent:
                raise DataFileError(f"name {key!r} is given to two solvents", path="screen/data/solvents.csv")
            index[key] = solvent
    return solvents, index


def available_solvents() -> tuple[Solvent, ...]:
    """All solvents of the table, in table order.

    Returns
    -------
    tuple of Solvent
        The solvents; each carries its CAS number, name, aliases and sources. [object]
    """
    return _table()[0]


def accepted_names() -> str:
    """The accepted names as one line per solvent, ``"name (CAS): alias, alias"``.

    Returns
    -------
    str
        Text for error messages and ``--help`` style listings. [text]
    """
    return "\n".join(
        f"{solvent.name} ({solvent.cas})" + (f": {', '.join(solvent.aliases)}" if solvent.aliases else "")
        for solvent in available_solvents()
    )


def lookup_solvent(name_or_cas: str, key: str | None = None) -> Solvent:
    """Find a solvent by CAS number, name or alias.

    Parameters
    ----------
    name_or_cas : str
        A CAS number ("109-99-9") or a name or alias ("THF", "tetrahydrofuran"); matched without
        regard to case, spaces, hyphens and underscores. [text]
    key : str, optional
        Case-file key path for the error message. [text]

    Returns
    -------
    Solvent
        The table row (properties in SI units). [object]

    Raises
    ------
    CaseError
        Unknown, ambiguous or mixture names, and CAS numbers with a wrong check digit or not in the
        table; the message lists what is accepted.
    """
    if not isinstance(name_or_cas, str) or not name_or_cas.strip():
        raise CaseError(f"a solvent name or CAS number is required, got {name_or_cas!r}", key=key)
    text = name_or_cas.strip()
    solvents, index = _table()
    listing = "; ".join(f"{solvent.name} ({solvent.cas})" for solvent in solvents)
    if _CAS_PATTERN.match(text):
        if not _cas_check_digit_ok(text):
            raise CaseError(f"{text!r} is not a valid CAS number (wrong check digit)", key=key)
        if text in index:
            return index[text]
        if text.replace("-", "") in _AMBIGUOUS_NAMES:
            raise CaseError(f"{text!r} {_AMBIGUOUS_NAMES[text.replace('-', '')]}", key=key)
        raise CaseError(
            f"CAS {text} is not in the solvent table; give the boiling temperature and latent heat in the "
            f"case, or use one of: {listing}",
            key=key,
        )
    normalised = _normalise_name(text)
    if normalised in _AMBIGUOUS_NAMES:
        raise CaseError(f"solvent {text!r} {_AMBIGUOUS_NAMES[normalised]}", key=key)
    if normalised in index:
        return index[normalised]
    raise CaseError(
        f"unknown solvent {text!r}. Accepted are CAS numbers and these names (aliases such as THF, "
        f"DCM, MEK, IPA, DMF, DMSO, NMP, MTBE, 2-MeTHF also work): {listing}",
        key=key,
    )


def _log_vapour_pressure(solvent: Solvent, temperature):
    """ln(p/Pa) of the stored correlation, no range check."""
    coefficients = solvent.vapour_pressure_coefficients
    if solvent.vapour_pressure_equation == "DIPPR101":
        a, b, c, d, e = coefficients
        return a + b / temperature + c * np.log(temperature) + d * temperature**e
    a, b, c = coefficients
    if solvent.vapour_pressure_equation == "ANTOINE10":
        return math.log(10.0) * (a - b / (temperature + c))
    return a - b / (temperature + c)


def _check_temperature_range(solvent: Solvent, temperature: np.ndarray, what: str) -> None:
    if not np.all(np.isfinite(temperature)):
        raise ModelDomainError(f"{what} of {solvent.name}: temperature must be finite, got {temperature}")
    low, high = solvent.minimum_temperature, solvent.maximum_temperature
    outside = (temperature < low) | (temperature > high)
    if np.any(outside):
        bad = temperature[outside] if temperature.ndim else temperature
        raise ModelDomainError(
            f"{what} of {solvent.name}: temperature {np.min(bad):.6g} K is outside the range of the "
            f"vapour-pressure correlation, {low:g} K to {high:g} K ({solvent.vapour_pressure_source})"
        )


def vapour_pressure(solvent: Solvent, temperature):
    """Vapour pressure of the pure solvent.

    DIPPR equation 101 (Perry's Chemical Engineers' Handbook, 8th ed., Green & Perry 2008,
    Table 2-8):

    .. math:: \\ln p = A + B/T + C \\ln T + D T^E

    or, where the table names it, the Antoine form ``log10 p = A - B/(T + C)`` (Poling, Prausnitz &
    O'Connell, The Properties of Gases and Liquids, 5th ed., 2001, Appendix A) or
    ``ln p = A - B/(T + C)`` (Landolt-Boernstein compilations); p in Pa, T in K.

    Parameters
    ----------
    solvent : Solvent
        The solvent. [object]
    temperature : float or array_like
        Temperature. [K]

    Returns
    -------
    float or numpy.ndarray
        Vapour pressure, same shape as ``temperature``. [Pa]

    Raises
    ------
    ModelDomainError
        A temperature outside the validity range of the correlation or not finite.
    """
    temperature_array = np.asarray(temperature, dtype=float)
    _check_temperature_range(solvent, temperature_array, "vapour pressure")
    pressure = np.exp(_log_vapour_pressure(solvent, temperature_array))
    return float(pressure) if pressure.ndim == 0 else pressure


@functools.lru_cache(maxsize=256)
def boiling_temperature(solvent: Solvent, pressure: float) -> float:
    """Boiling temperature of the pure solvent at a given pressure.

    Solves ``p_sat(T) = p`` on the vapour-pressure curve of :func:`vapour_pressure` with Brent's
    method, bracketed by the validity range of the correlation (checked before solving).

    Parameters
    ----------
    solvent : Solvent
        The solvent. [object]
    pressure : float
        Absolute pressure. [Pa]

    Returns
    -------
    float
        Boiling temperature. [K]

    Raises
    ------
    ModelDomainError
        A pressure that is not positive and finite, or outside the vapour-pressure range covered by
        the correlation.
    """
    from scipy.optimize import brentq

    pressure = float(pressure)
    if not math.isfinite(pressure) or pressure <= 0.0:
        raise ModelDomainError(f"boiling temperature of {solvent.name}: pressure must be positive, got {pressure} Pa")
    low, high = solvent.minimum_temperature, solvent.maximum_temperature
    target = math.log(pressure)
    residual_low = float(_log_vapour_pressure(solvent, low)) - target
    residual_high = float(_log_vapour_pressure(solvent, high)) - target
    if residual_low > 0.0 or residual_high < 0.0:
        raise ModelDomainError(
            f"boiling temperature of {solvent.name}: {pressure:.6g} Pa is outside the range of the "
            f"vapour-pressure correlation, {math.exp(residual_low + target):.4g} Pa to "
            f"{math.exp(residual_high + target):.4g} Pa ({low:g} K to {high:g} K)"
        )
    if residual_low == 0.0:
        return low
    if residual_high == 0.0:
        return high
    return float(
        brentq(lambda t: float(_log_vapour_pressure(solvent, t)) - target, low, high, xtol=1e-9, rtol=1e-14)
    )


def latent_heat(solvent: Solvent, temperature):
    """Latent heat of vaporisation of the pure solvent.

    Watson correlation from the stored reference value (Watson, K. M., "Thermodynamics of the
    liquid state", Ind. Eng. Chem. 35 (1943) 398-406; exponent 0.38; citation from memory):

    .. math:: \\Delta h_v(T) = \\Delta h_v(T_{ref}) \\left(\\frac{T_c - T}{T_c - T_{ref}}\\right)^{0.38}

    For solvents marked ``constant`` (acetic acid, whose vapour dimerises) the reference value is
    returned unchanged; see the table's note.

    Parameters
    ----------
    solvent : Solvent
        The solvent. [object]
    temperature : float or array_like
        Temperature, below the critical temperature. [K]

    Returns
    -------
    float or numpy.ndarray
        Latent heat of vaporisation, same shape as ``temperature``. [J/kg]

    Raises
    ------
    ModelDomainError
        A temperature that is not finite, not positive, or at or above the critical temperature.
    """
    temperature_array = np.asarray(temperature, dtype=float)
    critical = solvent.critical_temperature
    if not np.all(np.isfinite(temperature_array)) or np.any(temperature_array <= 0.0):
        raise ModelDomainError(f"latent heat of {solvent.name}: temperature must be positive and finite")
    if np.any(temperature_array >= critical):
        raise ModelDomainError(
            f"latent heat of {solvent.name}: temperature {np.max(temperature_array):.6g} K is at or above the "
            f"critical temperature {critical:g} K"
        )
    if solvent.latent_heat_model == "constant":
        result = np.full_like(temperature_array, solvent.latent_heat_reference)
    else:
        reduced = (critical - temperature_array) / (critical - solvent.latent_heat_reference_temperature)
        result = solvent.latent_heat_reference * reduced**WATSON_EXPONENT
    return float(result) if result.ndim == 0 else result


def liquid_density(solvent: Solvent, temperature):
    """Saturated liquid density of the pure solvent, Rackett form fitted to the two table values.

    .. math:: \\rho(T) = \\rho_{25}\\, Z^{(1 - T_{r,25})^{2/7} - (1 - T_r)^{2/7}}

    the temperature dependence of the Rackett equation, V = V_c Z^{1 + (1 - T_r)^{2/7}} (Rackett,
    J. Chem. Eng. Data 15 (1970) 514; Spencer & Danner, J. Chem. Eng. Data 17 (1972) 236, with Z
    the Rackett parameter), with Z fitted so that the curve passes through the table's densities
    at 25 degC and at the normal boiling point (derived). Above the critical temperature there is
    no liquid: the value at T_c (the fitted critical density) is returned, the smallest density
    of the curve.

    Parameters
    ----------
    solvent : Solvent
        The solvent (its table densities and critical temperature). [-]
    temperature : float or array_like
        Temperature. [K]

    Returns
    -------
    float or numpy.ndarray
        Liquid density. [kg/m^3]

    Raises
    ------
    ModelDomainError
        A temperature that is not finite and positive, or table densities that do not fall with
        temperature.
    """
    t = np.asarray(temperature, dtype=float)
    if not np.all(np.isfinite(t)) or np.any(t <= 0.0):
        raise ModelDomainError(f"liquid density of {solvent.name}: temperature must be finite and "
                               f"positive, got {temperature}")
    tc = solvent.critical_temperature
    t25, tb = 298.15, solvent.normal_boiling_temperature
    rho25, rhob = solvent.liquid_density_25c, solvent.liquid_density_at_boiling_point
    span = (1.0 - t25 / tc) ** (2.0 / 7.0) - (1.0 - tb / tc) ** (2.0 / 7.0)
    if not (rhob < rho25 and span > 0.0):
        raise ModelDomainError(f"liquid density of {solvent.name}: the table densities do not "
                               f"fall with temperature ({rho25:g} at 25 degC, {rhob:g} at {tb:g} K)")
    log_z = math.log(rhob / rho25) / span
    reduced = np.clip(1.0 - t / tc, 0.0, None)
    density = rho25 * np.exp(log_z * ((1.0 - t25 / tc) ** (2.0 / 7.0) - reduced ** (2.0 / 7.0)))
    return float(density) if density.ndim == 0 else density
