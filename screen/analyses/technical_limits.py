"""Technical limits that can only make a verdict more critical, applied after the core screening.

Composed by :mod:`screen.analyses.engine` as its last step, after the vessels, the simulation
(and the MTSR that governs) and the pressure check:

- the MTT of each vessel: a vessel declared ``closed`` reaches its technical limit when the
  pressure of solvent vapour and pad gas reaches the relief set pressure (Stoessel 2008, Thermal
  Safety of Chemical Processes, ch. 3: "MTT ... for a closed reactor, the temperature at which the
  pressure reaches the set pressure of the relief system", from memory); each vessel gets its
  ``mtt_degC`` and ``criticality_class``, and the case's class is the most critical vessel's;
- the TMRad of an nth-order decomposition with reactant consumption against the zero-order
  Townsend-Tou value: both are shown and the more critical one governs the class and the
  probability wherever they differ in band or class, unless ``decomposition.validated_range``
  declares that the kinetics were validated over that range;
- the severity: never the lowest level when the runaway raises the pressure (gas yield given, or
  final temperature above the boiling point at the operating pressure; Stoessel 2008 ch. 3,
  severity table, from memory).

Nothing here reads files or prints.
"""

from __future__ import annotations

import math
from typing import Any

from screen.constants import STANDARD_ATMOSPHERE, ZERO_CELSIUS
from screen.errors import CaseError, ScreenError
from screen.models import criticality as crit
from screen.units import to_celsius as _c
from screen.units import to_hours

__all__ = ["apply_technical_limits", "vessel_mtt", "worst_class_over_mtt_range"]


def worst_class_over_mtt_range(t_p, mtsr, td24, mtt_low, mtt_high) -> int:
    """The most critical class for an MTT known only to lie in [mtt_low, mtt_high] [K].

    The class is piecewise constant in the MTT with steps at MTSR and TD24 (Stoessel 1993
    table), so its maximum over the interval is among the ends and those two points (derived).
    ``mtt_high`` may be ``inf`` (no technical limit).

    Parameters
    ----------
    t_p : float
        Process temperature. [K]
    mtsr : float
        Maximum temperature of the synthesis reaction. [K]
    td24 : float
        Temperature at which TMRad is 24 h. [K]
    mtt_low : float
        Lowest possible maximum technical temperature. [K]
    mtt_high : float
        Highest possible maximum technical temperature; ``inf`` when no limit is known. [K]

    Returns
    -------
    int
        Criticality class 1..5. [-]
    """
    candidates = [mtt_low, mtt_high] + [t for t in (mtsr, td24) if mtt_low <= t <= mtt_high]
    return max(int(crit.criticality_class(t_p, mtsr, _finite_mtt(t), td24)) for t in candidates)


def _finite_mtt(mtt):
    # "No technical limit": an MTT above any temperature the class compares it with.
    return mtt if math.isfinite(mtt) else 1e12


def vessel_mtt(case, vessel, prefix, case_mtt) -> dict[str, Any]:
    """MTT of one vessel: the case MTT, or for a closed vessel the set-pressure temperature.

    Parameters
    ----------
    case : Case
        Loaded case (SI quantities).
    vessel : Vessel
        The vessel section of the case (closed flag, relief set pressure).
    prefix : str
        Case-file key path of the vessel, for messages (``vessel`` or ``vessel.0``).
    case_mtt : float
        MTT of the case (given or boiling point). [K]

    Returns
    -------
    dict
        ``low``, ``high`` [K] (equal when the MTT is known; ``high`` = inf: no limit known
        above ``low``), ``basis`` (text) and ``closed`` (bool).
    """
    if not vessel.closed:
        return {"low": case_mtt, "high": case_mtt, "closed": False,
                "basis": "case MTT (vessel open to a condenser or vent)"}
    t_p = float(case.sections["process"].temperature)
    set_pressure = vessel.relief_set_pressure
    if set_pressure is None:
        return {"low": math.inf, "high": math.inf, "closed": True,
                "basis": ("closed vessel without relief_set_pressure: no technical limit below "
                          "the decomposition")}
    from screen.models import solvents
    from screen.models.pressure import pressure_limit_temperature

    section = case.sections.get("solvent")
    closing = (float(section.pressure) if section is not None and section.pressure is not None
               else STANDARD_ATMOSPHERE)
    solvent = None
    if section is not None and section.name is not None:
        try:
            solvent = solvents.lookup_solvent(section.name, key="solvent.name")
        except ScreenError as exc:
            raise CaseError(exc.message, exc.key or "solvent.name", case.path) from None
    try:
        temperature, status = pressure_limit_temperature(float(set_pressure), solvent, closing,
                                                         t_p)
    except ScreenError as exc:
        raise CaseError(exc.message, f"{prefix}.relief_set_pressure", case.path) from None
    text = (f"closed vessel: vapour + pad gas reach the set pressure "
            f"{float(set_pressure) / 1e5:.4g} bar(a)")
    if solvent is None:
        # Without vapour the pad gas alone reaches the set pressure later: the MTT lies between
        # T_p and this temperature.
        return {"low": t_p, "high": temperature, "closed": True,
                "basis": text + " (no solvent name: pad gas only, an upper bound; the class is "
                                "the most critical over T_p .. that temperature)"}
    if status == "beyond data":
        return {"low": temperature, "high": math.inf, "closed": True,
                "basis": text + (f" above {_c(temperature):.1f} degC, the end of the "
                                 f"vapour-pressure data of {solvent.name} (MTT not known above "
                                 f"it; the most critical class is taken)")}
    return {"low": temperature, "high": temperature, "closed": True, "basis": text}


def apply_technical_limits(case, result, verdict_text) -> None:
    """Apply the limits of this module to ``result`` in place (engine's last step).

    Parameters
    ----------
    case : screen.io.case.Case
        Loaded case (SI quantities).
    result : screen.analyses.engine.ScreeningResult
        Result of the engine, updated in place.
    verdict_text : callable
        ``verdict_text(klass, severity_4, probability_6, status)``, the engine's wording.
    """
    _tmrad_comparison(case, result, verdict_text)
    _vessel_limits(case, result, verdict_text)
    _severity_with_pressure(case, result, verdict_text)


def _mtsr_governing(r) -> float:
    value = r.get("mtsr_governing_degC")
    return float(r["mtsr_degC"] if value is None else value) + ZERO_CELSIUS


def _raise_class(r, new_class, reason, verdict_text, warnings) -> None:
    """Raise the case's class (never lower it) and say why."""
    if new_class <= int(r["criticality_class_computed"]):
        return
    old = r["criticality_class_computed"]
    r["criticality_class_computed"] = int(new_class)
    if r.get("criticality_class") is not None:
        r["criticality_class"] = int(new_class)
    onset = r.get("onset_estimate") or {}
    if r.get("verdict_status") == "cannot-conclude" and (
            new_class >= 5 or (new_class >= 4 and onset.get("declared", True))):
        # A crude estimate may confirm a high class (the engine's rule).
        r["verdict_status"] = "crude-estimate"
        r["criticality_class"] = int(new_class)
        tmr = float(r.get("tmrad_at_mtsr_governing_h") or r["tmrad_at_mtsr_h"])
        r["probability_6"] = crit.probability_level(tmr, 6)
        r["probability"] = crit.probability_level(tmr, 3)
    if r.get("criticality_class") is not None:
        r["criticality_meaning"] = crit.CLASS_MEANINGS[int(new_class)]
        r["verdict"] = verdict_text(int(new_class), r["severity_4"], r["probability_6"],
                                    r["verdict_status"]) + " " + reason
    warnings.append(f"The class is raised from {old} to {new_class}: {reason}")


# --------------------------------------------------------------------------------------------
# Item: MTT per vessel


def _vessel_limits(case, result, verdict_text) -> None:
    r = result.results
    vessels = r.get("vessels") or []
    if not case.vessels or not vessels:
        return
    t_p = float(case.sections["process"].temperature)
    case_mtt = float(r["mtt_degC"]) + ZERO_CELSIUS
    td24 = float(r.get("td24_governing_degC", r["td24_degC"])) + ZERO_CELSIUS
    mtsr = _mtsr_governing(r)
    status = r.get("verdict_status")
    worst, worst_name = None, None
    multiple = len(case.vessels) > 1
    for index, (vessel, entry) in enumerate(zip(case.vessels, vessels), start=1):
        prefix = f"vessel.{index}" if multiple else "vessel"
        limit = vessel_mtt(case, vessel, prefix, case_mtt)
        klass = worst_class_over_mtt_range(t_p, mtsr, td24, limit["low"], limit["high"])
        known = limit["low"] == limit["high"] and math.isfinite(limit["low"])
        entry["closed"] = bool(limit["closed"])
        entry["mtt_degC"] = _c(limit["low"]) if known else None
        entry["mtt_lower_bound_degC"] = (_c(limit["low"]) if not known
                                        and math.isfinite(limit["low"]) else None)
        entry["mtt_basis"] = limit["basis"]
        entry["criticality_class_computed"] = klass
        declared = (r.get("onset_estimate") or {}).get("declared", True)
        reported = (klass if status == "screened" or klass >= 5 or (klass >= 4 and declared)
                    else None)
        entry["criticality_class"] = reported
        if limit["closed"]:
            result.warnings.append(f"{vessel.name}: {limit['basis']}"
                                   + (f" ({_c(limit['low']):.1f} degC)" if known else "")
                                   + f"; class {klass} for this vessel.")
        if worst is None or klass > worst:
            worst, worst_name = klass, vessel.name
    if worst is not None and worst > int(r["criticality_class_computed"]):
        r["criticality_class_basis"] = f"most critical vessel: {worst_name}"
        _raise_class(r, worst, f"The class is that of the most critical vessel, {worst_name} "
                               f"(its own MTT).", verdict_text, result.warnings)
    elif worst is not None:
        r.setdefault("criticality_class_basis", "case MTT (no vessel more critical)")


# --------------------------------------------------------------------------------------------
# Item: severity and pressure


def _severity_with_pressure(case, result, verdict_text) -> None:
    r = result.results
    reasons = []
    section = case.sections.get("solvent")
    if section is not None and section.gas_yield:
        reasons.append(f"gas yield {float(section.gas_yield):.3g} mol/kg given")
    boiling = None
    pressure = r.get("pressure")
    if isinstance(pressure, dict) and pressure.get("boiling_temperature_degC") is not None:
        boiling = float(pressure["boiling_temperature_degC"])
    elif case.sections["process"].max_technical_temperature is None:
        boiling = float(r["mtt_degC"])  # MTT computed as the boiling point
    final = float(r["final_temperature_degC"])
    if boiling is not None and final >= boiling:
        reasons.append(f"final temperature {final:.1f} degC at or above the boiling point "
                       f"{boiling:.1f} degC at the operating pressure")
    elif boiling is None and final >= float(r["mtt_degC"]):
        reasons.append(f"final temperature {final:.1f} degC at or above the MTT "
                       f"{float(r['mtt_degC']):.1f} degC (boiling point or relief temperature)")
    r["pressure_increase"] = bool(reasons)
    r["pressure_increase_reasons"] = reasons
    if not reasons:
        return
    rise = float(r["runaway_adiabatic_rise_K"])
    new4 = crit.severity_with_pressure(rise, 4, True)
    new3 = crit.severity_with_pressure(rise, 3, True)
    if (new4, new3) == (r["severity_4"], r["severity"]):
        return
    r["severity_4"], r["severity"] = new4, new3
    text = ("Severity raised to medium: the lowest level needs no pressure increase "
            "(Stoessel 2008 ch. 3), but " + "; ".join(reasons) + ".")
    result.warnings.append(text)
    if r.get("criticality_class") is not None:
        r["verdict"] = verdict_text(int(r["criticality_class"]), new4, r["probability_6"],
                                    r["verdict_status"])


# --------------------------------------------------------------------------------------------
# Item: nth-order TMRad against Townsend-Tou


def _tmrad_comparison(case, result, verdict_text) -> None:
    """Show the zero-order (Townsend-Tou) figures beside the integrated nth-order ones; the
    more critical governs where the band or class differs, unless the range is validated."""
    r = result.results
    kinetics = result.curves.get("kinetics")
    cp = result.curves.get("specific_heat")
    if kinetics is None or cp is None or r.get("decomposition_model") != "nth-order":
        return
    from screen.analyses.inputs import characteristic_temperatures
    from screen.models import decomposition as dm

    zero = dm.townsend_tou_equivalent(kinetics)
    t_p = float(case.sections["process"].temperature)
    mtsr = _mtsr_governing(r)
    mtt = float(r["mtt_degC"]) + ZERO_CELSIUS
    try:
        td24_zero, _ = characteristic_temperatures(zero, cp)
        tmr_zero = to_hours(float(dm.tmrad(zero, mtsr, cp)))
    except ScreenError as exc:
        raise type(exc)(exc.message, exc.key or "decomposition", case.path) from None
    td24 = float(r["td24_degC"]) + ZERO_CELSIUS
    tmr_exact = float(r.get("tmrad_at_mtsr_governing_h") or r["tmrad_at_mtsr_h"])
    class_exact = int(crit.criticality_class(t_p, mtsr, mtt, td24))
    class_zero = int(crit.criticality_class(t_p, mtsr, mtt, td24_zero))
    band_exact = crit.probability_level(tmr_exact, 6)
    band_zero = crit.probability_level(tmr_zero, 6)
    r["td24_townsend_tou_degC"] = _c(td24_zero)
    r["tmrad_at_mtsr_townsend_tou_h"] = tmr_zero
    validated = bool(case.sections["decomposition"].validated_range)
    differs = class_zero != class_exact or band_zero != band_exact
    if not differs:
        r["tmrad_governing"] = "nth-order (same class and probability band as Townsend-Tou)"
        return
    if validated:
        r["tmrad_governing"] = ("nth-order: the kinetics are declared validated over the range "
                                "(decomposition.validated_range)")
        return
    more_critical_zero = (class_zero > class_exact
                          or crit.PROBABILITY_6_LEVELS.index(band_zero)
                          < crit.PROBABILITY_6_LEVELS.index(band_exact))
    if not more_critical_zero:
        r["tmrad_governing"] = "nth-order (more critical than Townsend-Tou)"
        return
    r["tmrad_governing"] = ("Townsend-Tou (zero order): it changes the class or the probability "
                            "band and the kinetics are not declared validated over the range "
                            "(decomposition.validated_range); the more critical value governs")
    r["td24_governing_degC"] = _c(min(td24, td24_zero))
    if crit.PROBABILITY_6_LEVELS.index(band_zero) < crit.PROBABILITY_6_LEVELS.index(
            crit.probability_level(float(r["tmrad_at_mtsr_h"]), 6)) and r.get(
            "probability_6") is not None:
        r["probability_6"] = crit.probability_level(tmr_zero, 6)
        r["probability"] = crit.probability_level(tmr_zero, 3)
    result.warnings.append(
        f"nth-order TMRad at MTSR {tmr_exact:.3g} h and TD24 {_c(td24):.1f} degC; the zero-order "
        f"Townsend-Tou values ({tmr_zero:.3g} h, {_c(td24_zero):.1f} degC) give a more critical "
        f"class or probability band and govern, because decomposition.validated_range does not "
        f"declare the kinetics validated over this range.")
    if class_zero > class_exact:
        _raise_class(r, class_zero, "Townsend-Tou TD24 governs (kinetics not declared "
                                    "validated over the range).", verdict_text, result.warnings)
    elif r.get("criticality_class") is not None:
        r["verdict"] = verdict_text(int(r["criticality_class"]), r["severity_4"],
                                    r["probability_6"], r["verdict_status"])
