"""Solvent vapour pressure and closed-vessel pressure after a runaway (engine feature).

Called by :mod:`screen.analyses.engine` when the case has ``[solvent]``. The MTT from the solvent's
boiling point is already set by ``screen.analyses.engine.maximum_technical_temperature``; this module adds
``result.results["pressure"]``:

- the vapour pressure of the solvent at the MTSR (the case figure and, when the simulation ran,
  the highest simulated MTSR) and at the final temperature of the runaway;
- for every vessel with a headspace (``headspace_volume``, or ``volume`` minus the fill): the
  pressure in the closed vessel at the final temperature from solvent vapour, the pad gas present
  when the vessel was closed at T_p and the operating pressure, and the permanent gas of the
  decomposition (``solvent.gas_yield`` x batch mass x conversion 1), compared with
  ``relief_set_pressure`` (absolute) by :func:`screen.models.pressure.relief_verdict`.

Fail closed (design): a vapour pressure outside the correlation's range is evaluated at the
nearest end of the range and marked; a pressure that is then a lower bound (above the range), or
that lacks the gas yield or the solvent name, never gives a "below" verdict: the verdict is then
"not assessed" unless even the lower bound reaches the set pressure. Nothing here reads files or
prints.
"""

from __future__ import annotations

from typing import Any

from screen.constants import STANDARD_ATMOSPHERE, ZERO_CELSIUS
from screen.errors import CaseError, ScreenError
from screen.units import to_celsius as _c

__all__ = ["add_pressure", "clipped_vapour_pressure", "closed_vessel_estimate"]

_BAR = 1e5

#: Status of a temperature at or above the solvent's critical temperature.
ABOVE_CRITICAL = "above critical temperature"


def clipped_vapour_pressure(solvent, temperature: float) -> tuple[float, float, str]:
    """Vapour pressure, evaluated at the nearest end of the correlation's range if outside.

    Parameters
    ----------
    solvent : screen.models.solvents.Solvent
        The solvent.
    temperature : float
        Temperature. [K]

    Returns
    -------
    pressure : float or None
        Vapour pressure at ``min(max(T, T_min), T_max)``; None at or above the critical
        temperature, where a vapour pressure does not exist. [Pa]
    evaluated_at : float
        Temperature at which it was evaluated (the critical temperature when above it). [K]
    status : str
        ``"in range"``, ``"above range"`` (the value is a lower bound: the real pressure of the
        heated solvent is higher), ``"below range"`` (an upper bound) or
        ``"above critical temperature"`` (no value).
    """
    from screen.models.solvents import vapour_pressure

    low, high = solvent.minimum_temperature, solvent.maximum_temperature
    if temperature >= solvent.critical_temperature:
        # No liquid, no vapour pressure: the value is not defined (issue 13 item 4).
        return None, float(solvent.critical_temperature), ABOVE_CRITICAL
    if temperature > high:
        return float(vapour_pressure(solvent, high)), high, "above range"
    if temperature < low:
        return float(vapour_pressure(solvent, low)), low, "below range"
    return float(vapour_pressure(solvent, temperature)), float(temperature), "in range"


def closed_vessel_estimate(temperature: float, solvent, headspace_volume: float,
                           gas_moles: float, closing_pressure: float,
                           closing_temperature: float) -> dict[str, Any]:
    """Pressure in a closed vessel, with the vapour term clipped to the correlation's range.

    .. math:: p = p_{sat}(T) + (p_0 - p_{sat}(T_0))\\,T/T_0 + n R T / V_{head}

    the model of :func:`screen.models.pressure.closed_vessel_pressure_components` (Raoult with a
    pure solvent, ideal gases, constant headspace), except that :math:`p_{sat}` is taken at the
    nearest end of the correlation's range when T or T_0 lies outside it (see
    :func:`clipped_vapour_pressure`). Without a solvent (``solvent=None``) the vapour term is 0
    and the pad gas is the whole closing pressure.

    Parameters
    ----------
    temperature : float
        Temperature of the vessel contents. [K]
    solvent : screen.models.solvents.Solvent or None
        The volatile solvent.
    headspace_volume : float
        Gas volume above the liquid. [m^3]
    gas_moles : float
        Permanent gas formed by the decomposition. [mol]
    closing_pressure : float
        Absolute pressure when the vessel was closed (the operating pressure). [Pa]
    closing_temperature : float
        Temperature when it was closed (T_p). [K]

    Returns
    -------
    dict
        ``vapour``, ``pad_gas``, ``decomposition_gas``, ``total`` [Pa] and ``vapour_status``.
    """
    from screen.models.pressure import ideal_gas_pressure

    if solvent is None:
        vapour, status, vapour_closing = 0.0, "no solvent name", 0.0
    else:
        vapour, _, status = clipped_vapour_pressure(solvent, temperature)
        vapour_closing, _, _ = clipped_vapour_pressure(solvent, closing_temperature)
        vapour_closing = vapour_closing or 0.0
    # The liquid cannot be below its boiling point at closing (the engine checks T_p <= MTT), so
    # a negative pad gas only comes from the clipping; count no pad gas then.
    pad_gas = max(closing_pressure - vapour_closing, 0.0) * temperature / closing_temperature
    gas = ideal_gas_pressure(gas_moles, temperature, headspace_volume)
    # Above the critical temperature the vapour term is unknown (None); the total is then the
    # pad gas and decomposition gas alone, a lower bound.
    return {"vapour": vapour, "pad_gas": pad_gas, "decomposition_gas": gas,
            "total": (vapour or 0.0) + pad_gas + gas, "vapour_status": status}



def _headspace(case, vessel):
    """(headspace [m^3] or None, basis text)."""
    if vessel.headspace_volume is not None:
        return float(vessel.headspace_volume), "given"
    density = case.sections["mass"].density
    if vessel.volume is not None and density:
        mass = vessel.batch_mass or case.sections["mass"].amount
        free = float(vessel.volume) - float(mass) / float(density)
        if free > 0.0:
            return free, "vessel volume minus fill volume"
    return None, "not given"


def _liquid_expansion(case, vessel, headspace, solvent, t_p, final_temperature):
    """Liquid volume at the final temperature against the vessel volume (issue 18 item 8).

    The reaction mass is taken to expand like its solvent: V(T) = V(T_p) rho_s(T_p)/rho_s(T)
    with :func:`screen.models.solvents.liquid_density` (Rackett form; at or above T_c the
    critical density). V(T_p) = batch mass / mass.density (mass.density read at T_p), else
    vessel volume - headspace. Returns None without a solvent name or without a liquid volume.
    """
    from screen.models.solvents import liquid_density

    if solvent is None:
        return None
    mass = float(vessel.batch_mass or case.sections["mass"].amount)
    density = case.sections["mass"].density
    if density:
        liquid = mass / float(density)
    elif vessel.volume is not None:
        liquid = float(vessel.volume) - headspace
    else:
        return None
    if liquid <= 0.0:
        return None
    temperature = min(final_temperature, solvent.critical_temperature)
    ratio = float(liquid_density(solvent, t_p)) / float(liquid_density(solvent, temperature))
    final = liquid * ratio
    total = liquid + headspace
    return {"temperature_K": temperature, "liquid_volume_m3": liquid,
            "liquid_volume_final_m3": final, "vessel_volume_m3": total,
            "expansion_ratio": ratio, "liquid_full": bool(final >= total),
            "basis": (f"liquid density of {solvent.name}, Rackett form fitted to the table "
                      f"values; x{ratio:.3g} in volume")}


def add_pressure(case, result, curves: bool = True) -> None:
    """Vapour pressures and closed-vessel pressures against the relief set pressure (engine hook).

    Adds ``result.results["pressure"]`` (pressures in bar absolute, temperatures in degC),
    warnings and the method text. The figures are the same with or without ``curves``; without
    (sweeps, samples) the terminal lines are skipped.

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case with ``[solvent]``.
    result : screen.analyses.engine.ScreeningResult
        Result of the core screening (and of the simulation, which runs first), extended in
        place.
    curves : bool
        False in sweeps and Monte Carlo samples: no terminal lines.

    Raises
    ------
    CaseError
        Unknown solvent name or a value the pressure model rejects, naming the key.
    """
    from screen.models import solvents
    from screen.models.pressure import decomposition_gas_moles, relief_verdict

    show_text = curves  # terminal lines only where they are shown (a check)
    path = case.path
    solvent_section = case.sections["solvent"]
    temps = result.curves["temperatures_K"]
    t_p = float(case.sections["process"].temperature)
    mtsr_case = float(temps["MTSR"])
    final_case = float(temps["final"])
    closing_pressure = (float(solvent_section.pressure) if solvent_section.pressure is not None
                        else STANDARD_ATMOSPHERE)

    solvent = None
    if solvent_section.name is not None:
        try:
            solvent = solvents.lookup_solvent(solvent_section.name, key="solvent.name")
        except ScreenError as exc:
            raise CaseError(exc.message, exc.key or "solvent.name", path) from None

    points = [("MTSR, from [process]", mtsr_case)]
    # The final temperature of the result follows the governing MTSR (screen.analyses.governing).
    final_temperature = final_case
    final_basis = (result.results.get("mtsr_governing_basis", "MTSR from [process]")
                   + " + decomposition rise")
    simulation = result.results.get("simulation")
    if isinstance(simulation, dict):
        for label, name in (("MTSR, sim. feed stopped", "mtsr_feed_stopped_degC"),
                            ("MTSR, sim. feed continuing", "mtsr_feed_continuing_degC")):
            if simulation.get(name) is not None:
                points.append((label, simulation[name] + ZERO_CELSIUS))
    points.append(("final temperature", final_temperature))

    warnings = result.warnings
    entries: list[dict[str, Any]] = []
    if solvent is not None:
        for label, temperature in points:
            pressure, at, status = clipped_vapour_pressure(solvent, temperature)
            if status == ABOVE_CRITICAL:
                entries.append({"point": label, "temperature_degC": _c(temperature),
                                 "vapour_pressure_bar": None, "above_critical_temperature": True,
                                 "evaluated_at_degC": None, "range": status,
                                 "note": (f"above the critical temperature of {solvent.name} "
                                          f"({_c(solvent.critical_temperature):.1f} degC): no "
                                          f"liquid, no vapour pressure; the pressure of the "
                                          f"supercritical solvent is not computed")})
                continue
            note = {"in range": "",
                    "above range": f"above the correlation range (to "
                                   f"{solvent.maximum_temperature:g} K): value at its end, a "
                                   f"LOWER bound",
                    "below range": f"below the correlation range (from "
                                   f"{solvent.minimum_temperature:g} K): value at its end, an "
                                   f"upper bound"}[status]
            entries.append({"point": label, "temperature_degC": _c(temperature),
                            "vapour_pressure_bar": pressure / _BAR,
                            "above_critical_temperature": False,
                            "evaluated_at_degC": _c(at), "range": status, "note": note})

    gas_yield = solvent_section.gas_yield
    vessels: list[dict[str, Any]] = []
    multiple = len(case.vessels) > 1
    for index, vessel in enumerate(case.vessels, start=1):
        prefix = f"vessel.{index}" if multiple else "vessel"
        headspace, headspace_basis = _headspace(case, vessel)
        set_pressure = vessel.relief_set_pressure
        if headspace is None:
            if set_pressure is not None:
                warnings.append(f"{vessel.name}: relief_set_pressure is given but the "
                                f"closed-vessel pressure needs the headspace: give "
                                f"{prefix}.headspace_volume (or volume with mass.density).")
            continue
        mass = float(vessel.batch_mass or case.sections["mass"].amount)
        gas_moles = decomposition_gas_moles(mass, float(gas_yield or 0.0), 1.0)
        try:
            estimate = closed_vessel_estimate(final_temperature, solvent, headspace, gas_moles,
                                              closing_pressure, t_p)
        except ScreenError as exc:
            raise CaseError(exc.message, f"{prefix}.headspace_volume", path) from None
        lower_bound_reasons = []
        if solvent is None:
            lower_bound_reasons.append("no solvent name, vapour not counted")
        elif estimate["vapour_status"] == "above range":
            lower_bound_reasons.append("vapour pressure above the correlation range")
        elif estimate["vapour_status"] == ABOVE_CRITICAL:
            lower_bound_reasons.append(
                f"above the critical temperature of {solvent.name} "
                f"({_c(solvent.critical_temperature):.1f} degC): the supercritical solvent's "
                f"pressure is not computed, only pad gas and decomposition gas are counted")
        if gas_yield is None:
            lower_bound_reasons.append("solvent.gas_yield not given, decomposition gas not "
                                       "counted")
        expansion = _liquid_expansion(case, vessel, headspace, solvent, t_p, final_temperature)
        if expansion is not None and expansion["liquid_full"]:
            lower_bound_reasons.append(
                f"the liquid expands to {expansion['liquid_volume_final_m3']:.3g} m3, filling the "
                f"vessel ({expansion['vessel_volume_m3']:.3g} m3): liquid-full, hydraulic "
                f"overpressure; the constant-headspace pressure is a lower bound")
        total = estimate["total"]
        supercritical = estimate["vapour_status"] == ABOVE_CRITICAL
        if set_pressure is None and (supercritical or (expansion or {}).get("liquid_full")):
            verdict, reason = "not assessed", (
                f"at least {total / _BAR:.4g} bar(a) ({'; '.join(lower_bound_reasons)}); no "
                f"relief_set_pressure given: the pressure is not bounded by this screening")
        elif set_pressure is None:
            verdict, reason = "no set pressure", (
                f"{total / _BAR:.4g} bar(a); no relief_set_pressure given to compare with")
        else:
            verdict, reason = relief_verdict(total, float(set_pressure))
            if lower_bound_reasons and verdict != "exceeds":
                verdict = "not assessed"
                reason = (f"at least {total / _BAR:.4g} bar(a) ({'; '.join(lower_bound_reasons)}): "
                          f"cannot show that the set pressure "
                          f"{float(set_pressure) / _BAR:.4g} bar(a) is not reached")
        entry = {
            "vessel": vessel.name,
            "headspace_m3": headspace,
            "headspace_basis": headspace_basis,
            "batch_mass_kg": mass,
            "temperature_degC": _c(final_temperature),
            "gas_moles": gas_moles,
            "vapour_bar": None if estimate["vapour"] is None else estimate["vapour"] / _BAR,
            "above_critical_temperature": supercritical,
            "pad_gas_bar": estimate["pad_gas"] / _BAR,
            "decomposition_gas_bar": estimate["decomposition_gas"] / _BAR,
            "total_bar": None if supercritical else total / _BAR,
            "total_lower_bound_bar": total / _BAR,
            "liquid_expansion": expansion,
            "is_lower_bound": bool(lower_bound_reasons),
            "relief_set_pressure_bar": None if set_pressure is None else float(set_pressure) / _BAR,
            "verdict": verdict,
            "reason": reason,
        }
        vessels.append(entry)
        if expansion is not None and expansion["liquid_full"]:
            warnings.append(
                f"{vessel.name}: thermal expansion of the liquid up to "
                f"{_c(expansion['temperature_K']):.0f} degC ({expansion['basis']}) fills the "
                f"vessel: it may become liquid-full (hydraulic overpressure); the closed-vessel "
                f"pressure, computed with a constant headspace, is a lower bound.")
        if verdict in ("exceeds", "near", "not assessed"):
            warnings.append(f"{vessel.name}: closed-vessel pressure after the runaway "
                            f"({_c(final_temperature):.0f} degC): {verdict.upper()}: {reason}.")

    method = (
        "Vapour pressure of the pure solvent from the DIPPR/Perry's (or Antoine) coefficients of "
        "the bundled table (chemicals package data), at the nearest end of the correlation's "
        "range when outside it. Closed vessel at the final temperature: p = p_sat(T) + "
        "(p_0 - p_sat(T_p)) T/T_p + n_gas R T/V_head (Raoult with pure solvent, ideal gases, "
        "constant headspace, no relief, no leak; p_0 the operating pressure at closing), n_gas = "
        "gas yield x batch mass (complete decomposition). Verdict against the relief set pressure "
        "with a 10 % 'near' margin (design); a lower-bound pressure never gives 'below'.")
    result.methods["pressure"] = method
    results: dict[str, Any] = {
        "solvent": None if solvent is None else solvent.name,
        "cas": None if solvent is None else solvent.cas,
        "operating_pressure_bar": closing_pressure / _BAR,
        "operating_pressure_basis": ("given" if solvent_section.pressure is not None
                                     else "not given: 1.01325 bar assumed"),
        "boiling_temperature_degC": None,
        "final_temperature_degC": _c(final_temperature),
        "final_temperature_basis": final_basis,
        "gas_yield_mol_per_kg": None if gas_yield is None else float(gas_yield),
        "vapour_pressures": entries,
        "vessels": vessels,
        "method": method,
    }
    if solvent is not None:
        try:
            results["boiling_temperature_degC"] = _c(
                solvents.boiling_temperature(solvent, closing_pressure))
        except ScreenError as exc:
            raise CaseError(exc.message, "solvent.pressure", path) from None
    else:
        warnings.append("[solvent] has no name: vapour pressures are not assessed and any "
                        "closed-vessel pressure is a lower bound.")
    results["summary_lines"] = _summary_lines(results) if show_text else []
    result.results["pressure"] = results


def _summary_lines(r: dict) -> list[str]:
    """Terminal lines: a heading, then rows indented by 2 spaces (<= 78 characters)."""
    name = r["solvent"] or "unnamed solvent"
    lines = [f"Pressure ({name}, operating pressure {r['operating_pressure_bar']:.4g} bar(a))"]
    if r["boiling_temperature_degC"] is not None:
        lines.append(f"  boiling point at that pressure      "
                     f"{r['boiling_temperature_degC']:6.1f} degC")
    for entry in r["vapour_pressures"]:
        if entry["range"] == ABOVE_CRITICAL:
            lines.append(f"  p_sat at {entry['point'][:26]:<26} {entry['temperature_degC']:6.1f} degC "
                         f"   none (above T_c)")
            continue
        flag = {"in range": "", "above range": " (lower bound)",
                "below range": " (upper bound)"}[entry["range"]]
        lines.append(f"  p_sat at {entry['point'][:26]:<26} {entry['temperature_degC']:6.1f} degC "
                     f"{entry['vapour_pressure_bar']:8.3g} bar{flag}")
    for vessel in r["vessels"]:
        bound = " (at least: lower bound)" if vessel.get("is_lower_bound") else ""
        total = vessel["total_bar"]
        total = vessel["total_lower_bound_bar"] if total is None else total
        lines.append(f"  closed {vessel['vessel'][:30]}: {total:.3g} bar(a) at "
                     f"{vessel['temperature_degC']:.0f} degC{bound}")
        lines.append(f"    -> {vessel['verdict']}")
        gas = ("? (no gas_yield)" if vessel.get("gas_moles") in (None, 0, 0.0)
               and vessel.get("is_lower_bound") else f"{vessel['decomposition_gas_bar']:.3g} bar")
        vapour = ("? (supercritical)" if vessel["vapour_bar"] is None
                  else f"{vessel['vapour_bar']:.3g}")
        lines.append(f"    vapour {vapour} + pad gas {vessel['pad_gas_bar']:.3g}"
                     f" bar + decomposition gas {gas}")
        lines.append(f"    headspace {vessel['headspace_m3']:.3g} m3")
        if vessel["relief_set_pressure_bar"] is not None:
            lines.append(f"    relief set pressure {vessel['relief_set_pressure_bar']:.4g} bar(a)")
    if not r["vessels"]:
        lines.append("  closed-vessel pressure: no vessel with a headspace given")
    return [line[:78] for line in lines]
