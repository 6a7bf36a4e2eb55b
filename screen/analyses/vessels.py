"""Vessel heat balance: composes geometry and Semenov models into one result per vessel.

For each vessel: fill and wetted area, U A, time constant, the Semenov critical point of the
decomposition (tangency temperature, critical coolant temperature), the temperature of no return
at the actual coolant temperature, TMRad there, and the normal-operation check of the synthesis
where kinetics data are given. Decomposition heat release is taken as zero order at the
fresh-mass rate (the screening convention). Nothing here reads files or prints.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError, ScreenError
from screen.units import to_celsius as _c

#: Fill fraction below which a warning is raised (stirrer and jacket coverage) [-] (design).
LOW_FILL_FRACTION = 0.15



@functools.lru_cache(maxsize=256)
def _wetted_geometry(fill_volume, diameter, bottom, jacket_height, vessel_volume):
    """(wetted area [m^2], liquid level [m], head depth [m]) of a fill, cached: sweeps of a
    coolant or U leave the geometry unchanged, and the level needs a root search."""
    from screen.models import vessel as geometry

    area = float(geometry.wetted_area(fill_volume, diameter, bottom, jacket_height=jacket_height,
                                      vessel_volume=vessel_volume))
    level = float(geometry.liquid_height(fill_volume, diameter, bottom))
    return area, level, float(geometry.head_depth(diameter, bottom))


def vessel_geometry(case, vessel, prefix):
    """Fill volume [m^3], wetted area [m^2], fill fraction, warnings for one vessel.

    Parameters
    ----------
    case : Case
        Loaded case; reads ``mass`` (amount [kg], density [kg/m^3]).
    vessel : Vessel
        The vessel section of the case (geometry in SI units).
    prefix : str
        Case-file key path of the vessel, for warnings (``vessel`` or ``vessel.0``).
    """

    warnings = []
    mass = vessel.batch_mass or case.sections["mass"].amount
    density = case.sections["mass"].density
    fill_volume = mass / density if density else None
    fill_fraction = None
    if vessel.volume is not None and fill_volume is not None:
        fill_fraction = fill_volume / vessel.volume
        if fill_fraction > 1.0 + 1e-9:
            raise CaseError(
                f"the reaction mass ({mass:.4g} kg, {fill_volume:.4g} m^3 at the given density) "
                f"exceeds the vessel volume ({vessel.volume:.4g} m^3): reduce batch_mass or check "
                f"volume and density", f"{prefix}.batch_mass", case.path)
        if fill_fraction < LOW_FILL_FRACTION:
            warnings.append(f"{vessel.name}: fill only {100 * fill_fraction:.0f} % of the nominal "
                            f"volume; check that the stirrer and the jacket reach the mass.")
    if vessel.heat_transfer_area is not None:
        area = float(vessel.heat_transfer_area)
    else:
        try:
            area, level, depth = _wetted_geometry(fill_volume, vessel.diameter, vessel.bottom,
                                                  vessel.jacket_height, vessel.volume)
        except ScreenError as exc:
            raise CaseError(exc.message, prefix, case.path) from None
        if vessel.jacket_height is not None and level > vessel.jacket_height:
            warnings.append(f"{vessel.name}: liquid level {level:.2f} m is above the jacket top "
                            f"({vessel.jacket_height:.2f} m); only the jacketed wall is counted.")
        if depth > 0 and level < depth:
            warnings.append(f"{vessel.name}: the fill stays inside the bottom head (level "
                            f"{level:.2f} m): small cooled area, check the jacket coverage.")
    return mass, fill_volume, area, fill_fraction, warnings


def vessel_results(case, kinetics, mtsr, tmrad_mtsr_h=None):
    """Heat-balance results for every vessel of the case.

    Parameters
    ----------
    case : screen.io.case.Case
        Loaded case (SI quantities).
    kinetics : screen.models.decomposition.DecompositionKinetics
        Decomposition kinetics built once per screening.
    mtsr : float
        MTSR of the case. [K]
    tmrad_mtsr_h : float, optional
        TMRad at MTSR, if already known (computed otherwise). [h]

    Returns
    -------
    (list of dict, list of dict, list of str)
        JSON-ready entries, curve data for the Semenov diagrams, warnings.
    """
    from screen.analyses.inputs import (
        characteristic_temperatures,
        synthesis_specific_energy,
    )
    from screen.models import decomposition as dm
    from screen.models import semenov

    process = case.sections["process"]
    cp = float(case.sections["mass"].specific_heat)
    t_p = float(process.temperature)
    q_syn = synthesis_specific_energy(case)
    rise_syn = q_syn / cp
    e_dec = float(np.asarray(kinetics.activation_energy))
    # Zero-order heat release, anchored where it is well inside floating-point range. For an
    # autocatalytic decomposition the fresh-mass rate (at a0) is far below the rate the mass
    # reaches, so the rate at the maximum of f(a) = a^m (1-a)^n, a* = m/(m+n), is used instead
    # (conservative; derived).
    t_ref = characteristic_temperatures(kinetics, cp)[0]
    conversion_basis = None
    warnings: list[str] = []
    if kinetics.model == "autocatalytic":
        a_star = float(dm.conversion_of_maximum_rate_factor(
            kinetics.order, kinetics.autocatalytic_order, kinetics.initial_conversion))
        q_ref = float(kinetics.heat_release_rate(t_ref, conversion=a_star))
        conversion_basis = a_star
        warnings.append(
            f"Vessel heat balance of the autocatalytic decomposition uses the heat release rate "
            f"at the conversion of maximum f(a) (a = {a_star:.3g}), not the fresh-mass rate, which "
            f"would overstate the margins.")
    else:
        q_ref = float(kinetics.heat_release_rate(t_ref))
    crude = result_basis_is_crude(case)
    if crude:
        warnings.append("Vessel heat balance rests on the crude onset estimate of the "
                        "decomposition: T_NR and the critical coolant temperature are shown for "
                        "information only; no vessel is declared stable.")

    entries, curves = [], []
    multiple = len(case.vessels) > 1
    if tmrad_mtsr_h is None:
        tmrad_mtsr_h = float(dm.tmrad(kinetics, mtsr, cp)) / SECONDS_PER_HOUR
    for index, vessel in enumerate(case.vessels, start=1):
        prefix = f"vessel.{index}" if multiple else "vessel"
        mass, fill_volume, area, fill_fraction, geo_warnings = vessel_geometry(case, vessel,
                                                                                prefix)
        warnings.extend(geo_warnings)
        u = float(vessel.heat_transfer_coefficient)
        ua = u * area
        t_c = float(vessel.coolant_temperature)
        losses = float(vessel.heat_losses or 0.0)
        t_amb = vessel.ambient_temperature
        if losses > 0.0:
            # Losses act as extra conductance to ambient: combine into one equivalent line.
            ua_eff, t_c_eff = semenov.effective_cooling(ua, t_c, losses, float(t_amb))
        else:
            ua_eff, t_c_eff = ua, t_c
        tau = float(semenov.cooling_time_constant(mass, cp, ua_eff))
        base = {
            "name": vessel.name,
            "batch_mass_kg": mass,
            "fill_volume_m3": fill_volume,
            "fill_fraction": fill_fraction,
            "heat_transfer_area_m2": area,
            "area_from_geometry": vessel.heat_transfer_area is None,
            "area_to_volume_per_m": (area / fill_volume) if fill_volume else None,
            "heat_transfer_coefficient_W_per_m2K": u,
            "ua_W_per_K": ua,
            "heat_losses_W_per_K": losses,
            "coolant_temperature_degC": _c(t_c),
            "specific_cooling_capacity_W_per_kg": ua * (t_p - t_c) / mass,
            "time_constant_h": tau / SECONDS_PER_HOUR,
            "semenov_number_critical": 1.0 / math.e,
            "decomposition_rate_conversion_basis": conversion_basis,
        }
        ua_synthesis, check_mass, area_note = _ua_at_smallest_fill(case, vessel, mass, ua, u)
        synthesis_part = _synthesis_check(case, vessel, mass, ua_synthesis, t_p, t_c, q_syn,
                                          rise_syn, cp, semenov)
        synthesis_part["synthesis_check_fill_mass_kg"] = check_mass
        synthesis_part["synthesis_check_ua_W_per_K"] = ua_synthesis
        if area_note:
            synthesis_part["synthesis_check_area_note"] = area_note
        t_nr = None
        try:
            critical = semenov.critical_point(mass, ua_eff, q_ref, t_ref, e_dec)
            t_nr = semenov.no_return_temperature(mass, ua_eff, t_c_eff, q_ref, t_ref, e_dec)
            t_stable = semenov.stable_operating_temperature(mass, ua_eff, t_c_eff, q_ref, t_ref,
                                                            e_dec)
            psi = float(semenov.semenov_number(mass, ua_eff, t_c_eff, q_ref, t_ref, e_dec))
        except ScreenError as exc:
            # The heat balance has no Semenov structure here (e.g. no tangency): fail closed for
            # this vessel and keep the rest of the screening.
            entry = {**base, **_UNDETERMINED, **synthesis_part,
                     "verdict": (f"CANNOT CONCLUDE: the Semenov heat balance is not defined for "
                                 f"this vessel ({exc.message}); no temperature is declared safe.")}
        else:
            t_star = float(critical.tangency_temperature)
            t_c_crit_eff = float(critical.critical_coolant_temperature)
            # With losses the balance uses an equivalent sink; report the coolant-side value.
            t_c_crit = ((ua_eff * t_c_crit_eff - losses * float(t_amb)) / ua if losses > 0.0
                        else t_c_crit_eff)
            if t_nr is not None and not math.isfinite(t_nr):
                t_nr = None
            tmr_nr = float(dm.tmrad(kinetics, t_nr, cp)) / SECONDS_PER_HOUR if t_nr else None
            entry = {
                **base,
                "critical_coolant_temperature_degC": _c(t_c_crit),
                "coolant_margin_K": t_c_crit - t_c,
                "tangency_temperature_degC": _c(t_star),
                "critical_temperature_difference_K": t_star - t_c_crit_eff,
                "critical_temperature_difference_linearised_K": float(
                    semenov.linearised_critical_temperature_difference(t_c_crit_eff, e_dec)),
                "stable_temperature_degC": _c(t_stable) if t_stable is not None else None,
                "no_return_temperature_degC": _c(t_nr) if t_nr is not None else None,
                "tmrad_at_no_return_h": tmr_nr,
                "semenov_number": psi,
                "mtsr_above_no_return": True if t_nr is None else bool(mtsr >= t_nr),
                **synthesis_part,
            }
            entry["stability"], entry["verdict"] = _vessel_verdict(entry, t_nr, mtsr, crude,
                                                                   tmrad_mtsr_h)
            curves.append(_semenov_curve(vessel.name, mass, ua_eff, t_c_eff, t_c_crit_eff, t_nr,
                                         t_star, q_ref, t_ref, e_dec, mtsr, t_p))
        if t_c >= t_p:
            warnings.append(f"{vessel.name}: the coolant ({t_c - ZERO_CELSIUS:.1f} degC) is not "
                            f"colder than the process ({t_p - ZERO_CELSIUS:.1f} degC): the jacket "
                            f"heats the mass in normal operation; check coolant_temperature.")
        if entry.get("synthesis_stability") == "not assessed":
            warnings.append(f"{vessel.name}: synthesis cooling check not assessed (give "
                            f"synthesis.activation_energy with peak_heat_release_rate, or "
                            f"dosing_time for semi-batch).")
        if entry["stability"] != "stable":
            warnings.append(f"{vessel.name}: {entry['verdict']}")
        if entry.get("synthesis_stability") == "unstable" or (
                entry.get("synthesis_cooling_ratio") is not None
                and entry["synthesis_cooling_ratio"] < 1.0):
            warnings.append(f"{vessel.name}: {entry['synthesis_verdict']}")
        entry["decomposition_stability"] = DECOMPOSITION_STABILITY_WORDS[entry["stability"]]
        entry["synthesis_cooling"] = SYNTHESIS_COOLING_WORDS.get(
            entry.get("synthesis_stability"), "cannot conclude")
        entries.append(entry)
    return entries, curves, warnings


#: The one word per vessel for the decomposition (JSON ``decomposition_stability``), decided
#: here once from the Semenov outcome; every surface prints it (issue 13).
DECOMPOSITION_STABILITY_WORDS = {"stable": "recoverable", "mtsr-above-no-return": "not recoverable",
                                 "no-stable-point": "not recoverable",
                                 "cannot-conclude": "cannot conclude"}
#: The one word per vessel for the synthesis cooling (JSON ``synthesis_cooling``): a computed
#: failure is "insufficient"; missing data or the dosing-average estimate (not an upper bound of
#: the peak) is "cannot conclude", never "adequate" (fail closed).
SYNTHESIS_COOLING_WORDS = {"stable": "adequate", "unstable": "insufficient",
                           "stable-estimate": "cannot conclude", "not assessed": "cannot conclude"}


#: Safety figures of a vessel whose Semenov analysis is not defined: all null, and no
#: temperature is declared safe (fail closed).
_UNDETERMINED = {
    "critical_coolant_temperature_degC": None,
    "coolant_margin_K": None,
    "tangency_temperature_degC": None,
    "critical_temperature_difference_K": None,
    "critical_temperature_difference_linearised_K": None,
    "stable_temperature_degC": None,
    "no_return_temperature_degC": None,
    "tmrad_at_no_return_h": None,
    "semenov_number": None,
    "mtsr_above_no_return": True,
    "stability": "cannot-conclude",
}


def _ua_at_smallest_fill(case, vessel, mass, ua, u):
    """U A for the synthesis check: in semi-batch the wetted area is smallest at the start of
    dosing, while a dosing-controlled heat release is already at its level (conservative)."""
    from screen.models import vessel as geometry

    process = case.sections["process"]
    if process.mode != "semi-batch":
        return ua, mass, None
    kinetics = case.sections.get("synthesis_kinetics")
    scale = mass / case.sections["mass"].amount
    if kinetics is not None and kinetics.initial_mass is not None:
        initial = float(kinetics.initial_mass) * scale
    elif process.accumulation_mass_ratio is not None:
        initial = float(process.accumulation_mass_ratio) * mass
    else:
        initial = None
    if vessel.heat_transfer_area is not None:
        return ua, mass, ("heat_transfer_area is given: taken as valid during the whole dosing "
                          "(the wetted area is smaller at the start of dosing)")
    if initial is None:
        return ua, mass, ("initial charge unknown: cooling check at the final fill; give "
                          "process.accumulation_mass_ratio or synthesis_kinetics.initial_mass")
    density = case.sections["mass"].density
    area = float(geometry.wetted_area(initial / density, vessel.diameter, vessel.bottom,
                                      jacket_height=vessel.jacket_height,
                                      vessel_volume=vessel.volume))
    return u * area, initial, None


def _synthesis_check(case, vessel, mass, ua, t_p, t_c, q_syn, rise_syn, cp, semenov):
    """Normal-operation check of the synthesis in this vessel (needs synthesis kinetics)."""
    synthesis = case.sections["synthesis"]
    process = case.sections["process"]
    capacity = float(semenov.cooling_capacity(ua, t_p, t_c))
    out = {
        "cooling_capacity_at_process_temperature_kW": capacity / 1000.0,
        "synthesis_peak_heat_release_rate_W_per_kg": None,
        "synthesis_peak_basis": None,
        "synthesis_cooling_ratio": None,
        "synthesis_stability": "not assessed",
        "synthesis_max_stable_coolant_temperature_degC": None,
        "shortest_coolable_dosing_time_h": None,
        "synthesis_verdict": "not assessed: give synthesis.activation_energy with "
                             "peak_heat_release_rate (or dosing_time for semi-batch)",
    }
    peak = synthesis.peak_heat_release_rate
    basis = "measured peak heat release rate at T_p"
    if peak is None and process.mode == "semi-batch" and synthesis.dosing_time is not None:
        peak = float(semenov.dosing_controlled_peak_rate(rise_syn, cp, mass,
                                                         synthesis.dosing_time)) / mass
        basis = "dosing-controlled estimate: all heat released evenly over the dosing time"
    if process.mode == "semi-batch" and synthesis.dosing_time is not None and capacity > 0:
        out["shortest_coolable_dosing_time_h"] = float(
            semenov.shortest_coolable_dosing_time(mass * q_syn, capacity)) / SECONDS_PER_HOUR
    if peak is None:
        return out
    out["synthesis_peak_heat_release_rate_W_per_kg"] = peak
    out["synthesis_peak_basis"] = basis
    ratio = capacity / (mass * peak) if capacity > 0 else 0.0
    out["synthesis_cooling_ratio"] = ratio
    if capacity <= 0:
        out["synthesis_stability"] = "unstable"
        out["synthesis_verdict"] = ("coolant is not colder than the process: no cooling capacity "
                                    "at T_p")
        return out
    if synthesis.activation_energy is None:
        out["synthesis_verdict"] = (f"cooling capacity / peak heat release = {ratio:.2f}"
                                    + ("" if ratio >= 1 else " (< 1: cooling cannot carry the peak)")
                                    + "; Semenov slope check needs synthesis.activation_energy")
        return out
    stability = semenov.operating_point_stability(mass, ua, t_p, peak,
                                                  synthesis.activation_energy)
    try:
        t_max = float(semenov.max_stable_coolant_temperature(mass, ua, t_p, peak,
                                                             synthesis.activation_energy))
    except ScreenError:
        t_max = None  # no tangency of the synthesis curve: the slope check below still holds
    out["synthesis_slope_ratio"] = float(stability.slope_ratio)
    stable = stability.stable and ratio >= 1.0
    if stable and basis.startswith("dosing-controlled"):
        # The dosing average is not an upper bound of the peak (design: never called plainly
        # "stable"; a measured peak or the simulation is needed for that).
        out["synthesis_stability"] = "stable-estimate"
    else:
        out["synthesis_stability"] = "stable" if stable else "unstable"
    out["synthesis_max_stable_coolant_temperature_degC"] = None if t_max is None else _c(t_max)
    parts = [f"cooling capacity / peak heat release = {ratio:.2f}"]
    if ratio < 1.0:
        parts.append("cooling cannot carry the peak heat release at T_p")
    parts.append(f"generation/removal slope ratio {stability.slope_ratio:.2f}"
                 + (" (Semenov-stable)" if stability.stable else " (Semenov-UNSTABLE)"))
    if out["synthesis_stability"] == "stable-estimate":
        parts.append("based on the dosing-average release, which is not an upper bound of the "
                     "peak: confirm with a measured peak or the simulation")
    out["synthesis_verdict"] = "; ".join(parts)
    return out


def result_basis_is_crude(case) -> bool:
    """True when the decomposition rests on the onset-only estimate (no kinetics).

    Parameters
    ----------
    case : Case
        Loaded case; reads ``decomposition.model``.
    """
    return case.sections["decomposition"].model is None


def _vessel_verdict(entry, t_nr, mtsr, crude=False, tmrad_mtsr_h=None):
    if crude:
        return ("cannot-conclude",
                "CANNOT CONCLUDE: decomposition kinetics missing (crude onset estimate); the "
                "heat-balance figures are for information only.")
    if t_nr is None:
        return ("no-stable-point",
                f"NO STABLE POINT: the coolant ({entry['coolant_temperature_degC']:.1f} degC) is at "
                f"or above the critical coolant temperature "
                f"({entry['critical_coolant_temperature_degC']:.1f} degC): the cooling cannot "
                f"hold the decomposition at any temperature; no temperature is safe.")
    if mtsr >= t_nr:
        return ("mtsr-above-no-return",
                f"MTSR ({mtsr - ZERO_CELSIUS:.1f} degC) is at or above the temperature of no "
                f"return ({entry['no_return_temperature_degC']:.1f} degC): once the mass reaches "
                f"MTSR, restored cooling cannot bring it back.")
    margin = t_nr - mtsr
    hurry = ""
    if tmrad_mtsr_h is not None:
        shown = (f"{tmrad_mtsr_h * 60:.0f} min" if tmrad_mtsr_h < 1 else f"{tmrad_mtsr_h:.3g} h")
        hurry = f", but only if cooling is back well within TMRad at MTSR ({shown})"
    return ("stable",
            f"recoverable: if cooling is restored at MTSR the mass can be brought back (T_NR "
            f"{entry['no_return_temperature_degC']:.1f} degC lies {margin:.0f} K above MTSR)"
            f"{hurry}; coolant {entry['coolant_margin_K']:.0f} K below its critical "
            f"temperature.")


def _semenov_curve(name, mass, ua, t_c, t_c_crit, t_nr, t_star, q_ref, t_ref, e, mtsr, t_p):
    """Arrays for the Semenov diagram of one vessel (generation and two removal lines) [K, W]."""
    low = min(t_c, t_c_crit) - 5.0
    top_candidates = [t_star + 40.0, mtsr + 20.0]
    if t_nr is not None:
        top_candidates.append(t_nr + 15.0)
    high = max(top_candidates)
    temperature = np.linspace(low, high, 300)
    with np.errstate(over="ignore"):
        generation = mass * q_ref * np.exp(-(e / GAS_CONSTANT) * (1.0 / temperature - 1.0 / t_ref))
    return {
        "name": name,
        "temperature_K": temperature,
        "generation_W": generation,
        "removal_actual_W": ua * (temperature - t_c),
        "removal_critical_W": ua * (temperature - t_c_crit),
        "coolant_temperature_K": t_c,
        "critical_coolant_temperature_K": t_c_crit,
        "tangency_temperature_K": t_star,
        "no_return_temperature_K": t_nr,
        "mtsr_K": mtsr,
        "process_temperature_K": t_p,
    }
