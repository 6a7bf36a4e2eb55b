"""Evaporative cooling as the barrier of a cooling failure: one verdict per vessel.

When the synthesis runaway reaches the MTT (criticality classes 3 and 4), boiling of the solvent
is the barrier. This module composes :mod:`screen.models.evaporation` for every vessel of a case:
the heat release rate at the MTT (accumulated synthesis and decomposition), the vapour load, the
condenser duty needed against the capacity, the vapour velocity in the vapour line against the
flooding limit, the level swell, and the solvent evaporated until the accumulated heat is spent
(with the temperature course when it boils dry). See ``docs/scenarios.md`` (integration) and
``docs/evaporation.md`` (models and sources).

Fail closed: a missing input never gives "holds". Without a ``[solvent]`` section, a condenser
capacity, a vapour-line diameter, a solvent amount or data for the heat release rate at the MTT,
the vessel's verdict is "fails" with the reason "cannot assess ..." (not demonstrated).

Hooks: :func:`check_case` (cross-field checks, called by :mod:`screen.io.case`) and
:func:`add_barrier` (called by :mod:`screen.analyses.engine` for every case). Nothing here prints.
"""

from __future__ import annotations

import math
import textwrap

from screen.constants import (
    GAS_CONSTANT,
    SECONDS_PER_HOUR,
    STANDARD_ATMOSPHERE,
    ZERO_CELSIUS,
)
from screen.errors import CaseError, ScreenError
from screen.io.barrier_inputs import check_case  # noqa: F401

#: Terminal width of the summary lines [characters].
WIDTH = 78

#: Verdicts from best to worst.
VERDICT_ORDER = {"holds": 0, "doubtful": 1, "fails": 2}

#: Keys read from ``results["simulation"]`` when the cooling-failure simulation ran:
#: the highest MTSR over the failure times [degC] and the heat release rate of the desired
#: reaction when the feed-stopped continuation from that worst failure passes the MTT, per kg of
#: the mass present [W/kg]. Both optional; missing keys fall back to the stated estimates.
SIMULATION_MTSR_KEY = "mtsr_feed_stopped_degC"
SIMULATION_RATE_KEY = "synthesis_heat_release_rate_at_mtt_W_per_kg"

METHOD_TEXT = (
    "Evaporative cooling at the MTT (boiling at a fixed pressure): vapour load = heat release "
    "rate / latent heat (energy balance); condenser duty needed = heat release rate against a "
    "rated duty or U A (T_b - T_coolant); vapour-line flooding = lower of Wallis (1969) and "
    "Kutateladze (Pushkina & Sorokin 1969) limits (verify the constants against the sources); "
    "level swell by the DIERS drift-flux model (verify against the source); solvent evaporated "
    "= (accumulated heat - sensible heat to the MTT) / latent heat, no condensate returned; "
    "20 % margin to a limit = doubtful "
    "(design). Missing data never give 'holds'. See docs/evaporation.md and docs/scenarios.md.")



def _worst(verdicts) -> str:
    verdicts = list(verdicts)
    return max(verdicts, key=VERDICT_ORDER.__getitem__) if verdicts else "fails"


# --------------------------------------------------------------------------------------------
# Case checks




# --------------------------------------------------------------------------------------------
# Figures the barrier needs


def governing_mtsr(results) -> tuple[float, str]:
    """MTSR that governs the cooling-failure scenario, and where it comes from.

    Reads the governing MTSR decided once by :mod:`screen.analyses.governing`
    (``results["mtsr_governing_degC"]`` and ``results["mtsr_governing_source"]``).

    Parameters
    ----------
    results : dict
        ``ScreeningResult.results``.

    Returns
    -------
    (float, str)
        MTSR [K] and ``"case"`` (stated accumulation), ``"simulation"`` (simulated, feed
        stopped), ``"simulation-feed-continuing"`` or ``"feed-continuing-bound"``.
    """
    value = results.get("mtsr_governing_degC")
    source = results.get("mtsr_governing_source", "stated")
    if value is None:
        return float(results["mtsr_degC"]) + ZERO_CELSIUS, "case"
    label = {"stated": "case", "simulation-feed-stopped": "simulation"}.get(source, source)
    return float(value) + ZERO_CELSIUS, label


def solvent_properties(case, temperature) -> dict:
    """Solvent data for the barrier at the boiling temperature (the MTT).

    Latent heat from ``[solvent] latent_heat`` when given, else from the solvent table
    (:func:`screen.models.solvents.latent_heat`, Watson scaling to ``temperature``).

    Parameters
    ----------
    case : screen.io.case.Case
        The case; its ``[solvent]`` section is read.
    temperature : float
        Boiling temperature at which the mass is held (the MTT). [K]

    Returns
    -------
    dict
        ``name``, ``latent_heat`` [J/kg] or None, ``latent_heat_source``, ``molar_mass``
        [kg/mol] or None, ``liquid_density`` [kg/m^3] or None, ``pressure`` [Pa],
        ``pressure_given`` (bool), ``table_boiling_temperature`` [K] or None.

    Raises
    ------
    CaseError
        Unknown solvent name, or the temperature outside the range of the solvent data.
    """
    from screen.models import solvents

    section = case.sections["solvent"]
    pressure = float(section.pressure) if section.pressure is not None else STANDARD_ATMOSPHERE
    out = {"name": None, "latent_heat": None, "latent_heat_source": None, "molar_mass": None,
           "liquid_density": None, "fill_expansion": None, "pressure": pressure,
           "pressure_given": section.pressure is not None, "table_boiling_temperature": None}
    if section.name is not None:
        try:
            data = solvents.lookup_solvent(section.name, key="solvent.name")
            latent = float(solvents.latent_heat(data, temperature))
            boiling = float(solvents.boiling_temperature(data, pressure))
        except ScreenError as exc:
            raise CaseError(exc.message, exc.key or "solvent.name", case.path) from None
        # Liquid density at the MTT (issue 18 item 7), and the expansion from 25 degC, the
        # temperature taken for mass.density (the larger expansion: conservative).
        density_mtt = float(solvents.liquid_density(data, temperature))
        out["fill_expansion"] = data.liquid_density_25c / density_mtt
        out.update(name=data.name, molar_mass=data.molar_mass,
                   liquid_density=density_mtt,
                   table_boiling_temperature=boiling, latent_heat=latent,
                   latent_heat_source=(f"solvent table: {data.latent_heat_source}; "
                                       + ("Watson-scaled" if data.latent_heat_model == "watson"
                                          else "kept constant")
                                       + f" to {temperature - ZERO_CELSIUS:.1f} degC"))
    if section.latent_heat is not None:
        out["latent_heat"] = float(section.latent_heat)
        out["latent_heat_source"] = "given in the case (solvent.latent_heat)"
        if out["name"] is None:
            out["name"] = "solvent (unnamed)"
    return out


def _synthesis_rate_at_mtt(case, results, mtsr, mtsr_basis, mtt, mass_final, mass_failure):
    """Heat release rate of the accumulated synthesis at the MTT [W], with its basis.

    Returns (rate or None, basis text). Rate 0 when the synthesis alone does not reach the MTT.
    """
    process = case.sections["process"]
    synthesis = case.sections["synthesis"]
    t_p = float(process.temperature)
    cp = float(case.sections["mass"].specific_heat)
    if mtsr <= mtt:
        return 0.0, "the synthesis alone does not reach the MTT (MTSR below it): no synthesis heat"
    remaining_heat = mass_failure * cp * (mtsr - mtt)
    simulation = results.get("simulation")
    if mtsr_basis == "simulation" and isinstance(simulation, dict):
        value = simulation.get(SIMULATION_RATE_KEY)
        if isinstance(value, (int, float)) and math.isfinite(value) and value >= 0.0:
            return float(value) * mass_failure, (
                "cooling-failure simulation: rate of the desired reaction when the worst-case "
                "continuation passes the MTT")
    bound = _kinetic_rate_bound(case, mtt, remaining_heat, mass_final, mass_failure)
    if bound is not None:
        return bound
    peak = synthesis.peak_heat_release_rate
    energy = synthesis.activation_energy
    if peak is not None and energy is not None:
        factor = math.exp(energy / GAS_CONSTANT * (1.0 / t_p - 1.0 / mtt))
        return float(peak) * factor * mass_final, (
            f"estimate: peak heat release rate at T_p ({peak:.4g} W/kg) scaled by Arrhenius to "
            f"the MTT with E = {energy / 1000:.4g} kJ/mol (x{factor:.3g}), times the final mass; "
            f"assumes the peak was measured with at least the reagent accumulated at the failure")
    if peak is not None:
        return None, ("cannot assess the heat release rate at the MTT: peak_heat_release_rate "
                      "needs synthesis.activation_energy to be scaled from T_p to the MTT")
    return None, ("cannot assess the heat release rate at the MTT: give "
                  "synthesis.peak_heat_release_rate with activation_energy, or "
                  "[synthesis_kinetics]")


def _kinetic_rate_bound(case, mtt, remaining_heat, mass_final, mass_failure):
    """Upper bound of the synthesis heat release rate at the MTT from [synthesis_kinetics].

    The reagent still accumulated at the MTT carries the heat m c'p (MTSR - MTT) (adiabatic
    energy balance, derived); the other reagent cannot exceed its total amount. Second order:
    Q = k(MTT) Q_rem c_other with c_other <= max(n_A,tot, n_B,tot)/V at the failure; first order in
    X: Q = k(MTT) n_X (-dH) <= k(MTT) n_X,tot (-dH). Returns (W, basis) or None.
    """
    kinetics = case.sections.get("synthesis_kinetics")
    if kinetics is None:
        return None
    synthesis = case.sections["synthesis"]
    energy = kinetics.activation_energy or synthesis.activation_energy
    scheme = kinetics.scheme
    if energy is None or scheme is None or kinetics.initial_amount_a is None:
        return None
    if kinetics.rate_constant is not None and kinetics.reference_temperature is not None:
        k_mtt = kinetics.rate_constant * math.exp(
            -energy / GAS_CONSTANT * (1.0 / mtt - 1.0 / kinetics.reference_temperature))
    elif kinetics.pre_exponential_factor is not None:
        k_mtt = kinetics.pre_exponential_factor * math.exp(-energy / (GAS_CONSTANT * mtt))
    else:
        return None
    total_mass = float(case.sections["mass"].amount)
    scale = mass_final / total_mass  # amounts are those of the case batch
    total_a = float(kinetics.initial_amount_a)
    total_b = float(kinetics.initial_amount_b or 0.0) + float(kinetics.feed_amount or 0.0)
    if scheme == "second-order":
        density = case.sections["mass"].density
        if density is None:
            return None
        volume = mass_failure / float(density)
        concentration = max(total_a, total_b) * scale / volume
        return k_mtt * remaining_heat * concentration, (
            f"upper bound from [synthesis_kinetics]: k(MTT) = {k_mtt:.3g} m^3/(mol s) times the "
            f"heat still accumulated at the MTT times the largest possible co-reagent "
            f"concentration ({concentration:.4g} mol/m^3)")
    enthalpy = kinetics.molar_enthalpy or synthesis.molar_enthalpy
    if enthalpy is None:
        return None
    reagent = kinetics.first_order_reagent or "A"
    total_x = (total_a if reagent == "A" else total_b) * scale
    rate = k_mtt * max(remaining_heat, -enthalpy * total_x)
    return rate, (f"upper bound from [synthesis_kinetics]: k(MTT) = {k_mtt:.3g} 1/s times the "
                  f"heat of all {reagent} ({total_x:.4g} mol)")


def _decomposition_at_mtt(case, mtt):
    """(kinetics, basis, rate of the mass as fed at MTT [W/kg], highest isothermal rate [W/kg])."""
    from screen.analyses.inputs import decomposition_kinetics

    kinetics, basis = decomposition_kinetics(case)
    fresh = float(kinetics.heat_release_rate(mtt))
    peak = fresh
    if kinetics.model == "autocatalytic":
        # f = a^m (1-a)^n peaks at a* = m/(m+n) (derived); isothermal rate at MTT there.
        from screen.models.decomposition import conversion_of_maximum_rate_factor

        star = conversion_of_maximum_rate_factor(kinetics.order, kinetics.autocatalytic_order,
                                                 kinetics.initial_conversion)
        peak = max(fresh, float(kinetics.heat_release_rate(mtt, star)))
    return kinetics, basis, fresh, peak


# --------------------------------------------------------------------------------------------
# Per-vessel assessment


def _grade(value, limit, margin):
    if not (math.isfinite(value) and math.isfinite(limit)):
        return "fails"  # an undefined figure never lets the barrier hold (fail closed)
    if value >= limit:
        return "fails"
    if value >= (1.0 - margin) * limit:
        return "doubtful"
    return "holds"


def _condenser_capacity(vessel, mtt):
    from screen.models import evaporation

    if vessel.condenser_duty is not None:
        return float(vessel.condenser_duty), "rated condenser duty"
    if vessel.condenser_ua is not None:
        outlet = vessel.condenser_coolant_outlet_temperature
        capacity = float(evaporation.condenser_capacity(
            overall_conductance=vessel.condenser_ua,
            coolant_temperature=vessel.condenser_coolant_temperature, boiling_temperature=mtt,
            coolant_outlet_temperature=outlet))
        if outlet is not None:
            return capacity, (f"U A {vessel.condenser_ua:.4g} W/K x log-mean temperature "
                              f"difference (coolant {vessel.condenser_coolant_temperature - ZERO_CELSIUS:.1f}"
                              f" -> {outlet - ZERO_CELSIUS:.1f} degC)")
        return capacity, (f"U A {vessel.condenser_ua:.4g} W/K x (MTT - "
                          f"{vessel.condenser_coolant_temperature - ZERO_CELSIUS:.1f} degC); "
                          f"inlet temperature, no outlet given: an upper bound (a log-mean "
                          f"difference would be lower; give condenser_coolant_outlet_temperature)")
    return None, None


def assess_vessel(case, results, vessel, vessel_entry, context) -> dict:
    """Barrier of one vessel: figures, verdict and reasons (JSON-ready).

    Parameters
    ----------
    case : screen.io.case.Case
        Loaded case (SI quantities).
    results : dict
        ``ScreeningResult.results`` with the core figures and ``vessels``.
    vessel : screen.io.case.Section
        The vessel.
    vessel_entry : dict
        Its entry of ``results["vessels"]`` (fill fraction).
    context : dict
        Case-wide inputs from :func:`add_barrier` (MTT, MTSR, solvent, decomposition).

    Returns
    -------
    dict
        Entry of ``results["barrier"]["vessels"]``.
    """
    from screen.models import evaporation

    cp = float(case.sections["mass"].specific_heat)
    t_p = float(case.sections["process"].temperature)
    mtt, mtsr = context["mtt"], context["mtsr"]
    mass_total = float(case.sections["mass"].amount)
    mass_final = float(vessel.batch_mass or mass_total)
    mass_failure = context["mass_ratio"] * mass_final
    entry = {"name": vessel.name, "barrier_verdict": "fails", "status": "assessed",
             "reasons": [], "batch_mass_kg": mass_final, "mass_at_failure_kg": mass_failure}
    solvent = context["solvent"]
    if solvent is None:
        entry["status"] = "not assessed"
        entry["reasons"] = ["cannot assess: no [solvent] section (name, amount, pressure): "
                            "evaporative cooling is not demonstrated (fails)"]
        return entry

    margin = evaporation.DEFAULT_MARGIN
    findings: list[tuple[str, str]] = []
    missing = False

    synthesis_rate, rate_basis = _synthesis_rate_at_mtt(
        case, results, mtsr, context["mtsr_basis"], mtt, mass_final, mass_failure)
    decomposition_rate = context["decomposition_rate"] * mass_failure
    rate = None if synthesis_rate is None else synthesis_rate + decomposition_rate
    entry.update({
        "heat_release_rate_basis": rate_basis,
        "synthesis_heat_release_rate_at_mtt_kW": None if synthesis_rate is None
        else synthesis_rate / 1e3,
        "decomposition_heat_release_rate_at_mtt_kW": decomposition_rate / 1e3,
        "heat_release_rate_at_mtt_kW": None if rate is None else rate / 1e3,
    })
    if rate is None:
        findings.append(("fails", rate_basis))
        missing = True

    latent = solvent["latent_heat"]
    solvent_mass = None
    if context["solvent_amount"] is not None:
        solvent_mass = context["solvent_amount"] * mass_final / mass_total
    heat_synthesis = mass_failure * cp * max(mtsr - t_p, 0.0)
    heat_decomposition = context["decomposition_energy"] * mass_failure \
        if context["decomposition_counted"] else 0.0
    accumulated = heat_synthesis + heat_decomposition
    sensible = mass_failure * cp * (mtt - t_p)
    entry.update({"accumulated_heat_MJ": accumulated / 1e6,
                  "accumulated_decomposition_heat_MJ": heat_decomposition / 1e6,
                  "sensible_heat_to_mtt_MJ": sensible / 1e6,
                  "solvent_present_kg": solvent_mass})

    capacity, capacity_basis = _condenser_capacity(vessel, mtt)
    entry["condenser_capacity_kW"] = None if capacity is None else capacity / 1e3
    entry["condenser_capacity_basis"] = capacity_basis
    if capacity is None:
        findings.append(("fails", "cannot assess the condenser: give condenser_duty, or "
                                  "condenser_ua with condenser_coolant_temperature, for the "
                                  "vessel"))
        missing = True
    if latent is None:
        findings.append(("fails", "cannot assess the vapour load: give solvent.name or "
                                  "solvent.latent_heat"))
        missing = True
    line_data = (vessel.vapour_line_diameter is not None and solvent["molar_mass"] is not None)
    if not line_data:
        needed = []
        if vessel.vapour_line_diameter is None:
            needed.append("vapour_line_diameter for the vessel")
        if solvent["molar_mass"] is None:
            needed.append("solvent.name (vapour density)")
        findings.append(("fails", "cannot assess the vapour line: give " + " and ".join(needed)))
        missing = True
    if solvent_mass is None:
        findings.append(("fails", "cannot assess the solvent inventory: give solvent.amount "
                                  "(solvent present in the batch)"))
        missing = True

    fill = vessel_entry.get("fill_fraction") if vessel_entry else None
    if fill is not None and solvent.get("fill_expansion"):
        # The fill at the MTT: mass.density (taken at 25 degC) expanded like the solvent.
        entry["fill_fraction_at_mtt"] = min(float(fill) * solvent["fill_expansion"], 1.0)
        fill = entry["fill_fraction_at_mtt"]
    fill = None if fill is None else min(float(fill), 1.0)
    assessment = None
    if not missing:
        assessment = evaporation.evaluate_barrier(
            heat_release_rate=rate, accumulated_heat=accumulated,
            sensible_heat_to_boiling=sensible, solvent_mass=solvent_mass,
            residual_heat_capacity=(mass_failure - solvent_mass) * cp, latent_heat=latent,
            boiling_temperature=mtt, boiling_pressure=solvent["pressure"],
            vapour_molar_mass=solvent["molar_mass"], liquid_density=solvent["liquid_density"],
            condenser_capacity=capacity, vapour_line_diameter=vessel.vapour_line_diameter,
            vessel_diameter=vessel.diameter, fill_fraction=fill)
        findings.extend(_split_reason(text) for text in assessment.reasons)
        entry.update({
            "vapour_mass_flow_kg_per_h": assessment.vapour_mass_flow * SECONDS_PER_HOUR,
            "condenser_duty_needed_kW": assessment.condenser_duty_needed / 1e3,
            "vapour_density_kg_per_m3": assessment.vapour_density,
            "vapour_line_velocity_m_per_s": assessment.line_velocity,
            "flooding_velocity_m_per_s": assessment.flooding_velocity,
            "surface_velocity_m_per_s": _finite_or_none(assessment.surface_velocity),
            "swelling_onset_velocity_m_per_s": _finite_or_none(
                assessment.swelling_onset_velocity),
            "heat_release_rate_limit_kW": assessment.heat_release_rate_limit / 1e3,
            "solvent_evaporated_kg": assessment.solvent_evaporated,
        })
    else:
        entry.update(_partial_figures(rate, latent, capacity, accumulated, sensible,
                                      solvent_mass, solvent, vessel, mtt, margin, findings))

    if latent is not None and solvent_mass is not None:
        entry.update(_temperature_course(entry, t_p, mtt, sensible, accumulated, solvent_mass,
                                         latent, (mass_failure - solvent_mass) * cp))
        remaining_solvent = solvent_mass - entry["solvent_evaporated_kg"]
        if decomposition_rate > 0.0 and remaining_solvent > 0.0 \
                and not context["decomposition_counted"]:
            entry["decomposition_dry_out_time_h"] = (
                remaining_solvent * latent / decomposition_rate / SECONDS_PER_HOUR)

    findings.extend(_decomposition_findings(context, mass_failure, entry))
    verdict = _worst(grade for grade, _ in findings)
    ranked = sorted(findings, key=lambda item: -VERDICT_ORDER[item[0]])
    entry["barrier_verdict"] = verdict
    entry["status"] = "incomplete" if missing else "assessed"
    entry["reasons"] = [f"{sentence} ({grade})" for grade, sentence in ranked]
    entry["latent_heat_kJ_per_kg"] = None if latent is None else latent / 1e3
    return entry


def _split_reason(text: str) -> tuple[str, str]:
    """Reason of evaluate_barrier 'sentence (grade)' -> (grade, sentence)."""
    for grade in VERDICT_ORDER:
        suffix = f" ({grade})"
        if text.endswith(suffix):
            return grade, text[: -len(suffix)]
    return "fails", text  # unknown grade: fail closed


def _finite_or_none(value):
    return float(value) if value is not None and math.isfinite(value) else None


def _partial_figures(rate, latent, capacity, accumulated, sensible, solvent_mass, solvent,
                     vessel, mtt, margin, findings) -> dict:
    """Figures that can be computed although some inputs are missing; grades appended."""
    from screen.models import evaporation

    out = {}
    if rate is not None and capacity is not None:
        findings.append((_grade(rate, capacity, margin) if capacity > 0 else "fails",
                         f"condenser: {rate / 1e3:.4g} kW needed, capacity "
                         f"{capacity / 1e3:.4g} kW"))
        out["condenser_duty_needed_kW"] = rate / 1e3
    if rate is not None and latent is not None:
        flow = evaporation.vapour_mass_flow(rate, latent)
        out["vapour_mass_flow_kg_per_h"] = flow * SECONDS_PER_HOUR
        if vessel.vapour_line_diameter is not None and solvent["molar_mass"] is not None:
            density = evaporation.vapour_density_ideal_gas(solvent["molar_mass"],
                                                           solvent["pressure"], mtt)
            velocity = evaporation.vapour_velocity(flow, density, vessel.vapour_line_diameter)
            limit = evaporation.flooding_velocity_limit(solvent["liquid_density"], density,
                                                        vessel.vapour_line_diameter)
            findings.append((_grade(velocity, limit, margin),
                             f"vapour line: {velocity:.3g} m/s, flooding limit {limit:.3g} m/s"))
            out.update(vapour_density_kg_per_m3=density, vapour_line_velocity_m_per_s=velocity,
                       flooding_velocity_m_per_s=limit)
    if latent is not None and solvent_mass is not None:
        evaporated = evaporation.solvent_evaporated(accumulated, sensible, latent)
        out["solvent_evaporated_kg"] = evaporated
        if solvent_mass > 0:
            findings.append((_grade(evaporated, solvent_mass, margin),
                             f"solvent: {evaporated:.4g} kg would evaporate of "
                             f"{solvent_mass:.4g} kg present"))
        else:
            findings.append(("fails", "no solvent present to evaporate"))
    return out


def _temperature_course(entry, t_p, mtt, sensible, accumulated, solvent_mass, latent,
                        residual_heat_capacity) -> dict:
    """Break points of T(Q) from the failure until the accumulated heat is spent."""
    from screen.models import evaporation

    dry_out = sensible + solvent_mass * latent
    stops = sorted({0.0, min(sensible, accumulated), min(dry_out, accumulated), accumulated})
    temperatures = evaporation.temperature_course(stops, t_p, mtt, sensible, solvent_mass, latent,
                                                  residual_heat_capacity)
    points = [{"heat_released_MJ": q / 1e6, "temperature_degC": float(t) - ZERO_CELSIUS}
              for q, t in zip(stops, temperatures)]
    final = float(temperatures[-1])
    evaporated = entry.get("solvent_evaporated_kg")
    if evaporated is None:
        evaporated = evaporation.solvent_evaporated(accumulated, sensible, latent)
    return {"solvent_evaporated_kg": evaporated,
            "boils_dry": bool(accumulated > dry_out),
            "final_temperature_degC": final - ZERO_CELSIUS,
            "temperature_course": points}


def _decomposition_findings(context, mass_failure, entry):
    findings = []
    if context["criticality_class"] == 5:
        findings.append(("fails", f"class 5: TD24 ({context['td24'] - ZERO_CELSIUS:.1f} degC) "
                                  f"lies below the MTT, the decomposition is triggered before "
                                  f"boiling can act"))
    if context["decomposition_basis"] == "onset-estimate":
        findings.append(("doubtful", "decomposition rate at the MTT from the crude onset estimate "
                                     "(kinetics missing)"))
    limit = entry.get("heat_release_rate_limit_kW")
    if context["decomposition_model"] == "autocatalytic" and limit is not None:
        peak = context["decomposition_peak_rate"] * mass_failure / 1e3
        grade = "doubtful" if peak >= limit else "holds"
        findings.append((grade, f"autocatalytic decomposition: held at the MTT its rate rises to "
                                f"{peak:.4g} kW, the condenser and vapour line take "
                                f"{limit:.4g} kW"))
        entry["decomposition_peak_rate_at_mtt_kW"] = peak
    return findings


# --------------------------------------------------------------------------------------------
# Engine hook


def add_barrier(case, result, curves: bool = False) -> None:
    """Assess evaporative cooling as the barrier and add ``results["barrier"]``.

    Assessed when the governing MTSR reaches the MTT, in classes 3 to 5, or when
    ``scenarios.evaporation_check`` is true; otherwise ``{"assessed": False, "reason": ...}``.

    Parameters
    ----------
    case : screen.io.case.Case
        Loaded case (SI quantities).
    result : screen.analyses.engine.ScreeningResult
        Core figures and vessels already computed; changed in place (results, warnings,
        methods, curves).
    curves : bool
        Also store the temperature course against the heat released for figures.
    """
    r = result.results
    mtt = float(r["mtt_degC"]) + ZERO_CELSIUS
    mtsr, mtsr_basis = governing_mtsr(r)
    reported = r.get("criticality_class")
    klass = int(reported if reported is not None else r["criticality_class_computed"])
    requested = bool(case.sections["scenarios"].evaporation_check) \
        if "scenarios" in case.sections else False
    triggers = []
    if mtsr >= mtt:
        triggers.append(f"MTSR {mtsr - ZERO_CELSIUS:.1f} degC reaches the MTT "
                        f"{mtt - ZERO_CELSIUS:.1f} degC")
    if reported is None:
        # Fail closed: a class that cannot be concluded does not exclude classes 3 to 5.
        triggers.append("criticality class cannot be concluded (crude decomposition estimate)")
    elif klass >= 3:
        triggers.append(f"criticality class {klass}")
    if requested:
        triggers.append("requested (scenarios.evaporation_check)")
    heading = f"Evaporative-cooling barrier at the MTT ({mtt - ZERO_CELSIUS:.1f} degC)"
    if not triggers:
        reason = (f"not assessed: MTSR {mtsr - ZERO_CELSIUS:.1f} degC stays below the MTT "
                  f"{mtt - ZERO_CELSIUS:.1f} degC (class {klass}), so boiling is not called upon; "
                  f"set scenarios.evaporation_check = true to check it anyway")
        r["barrier"] = {"assessed": False, "reason": reason,
                        "summary_lines": [heading] + _wrap(reason, "  ")}
        return

    context = _context(case, r, mtt, mtsr, mtsr_basis, klass)
    vessel_entries = r.get("vessels") or []
    entries = []
    for index, vessel in enumerate(case.vessels):
        try:
            entries.append(assess_vessel(case, r, vessel, vessel_entries[index]
                                         if index < len(vessel_entries) else None, context))
        except ScreenError as exc:
            prefix = f"vessel.{index + 1}" if len(case.vessels) > 1 else "vessel"
            raise type(exc)(f"evaporative-cooling barrier of {vessel.name}: {exc.message}",
                            exc.key or prefix, case.path) from None
    reason = "; ".join(triggers)
    verdict = _worst(e["barrier_verdict"] for e in entries) if entries else "fails"
    solvent = context["solvent"]
    block = {
        "assessed": True,
        "reason": reason,
        "verdict": verdict,
        "mtt_degC": mtt - ZERO_CELSIUS,
        "mtsr_degC": mtsr - ZERO_CELSIUS,
        "mtsr_basis": mtsr_basis,
        "mtsr_basis_text": r.get("mtsr_governing_basis", "MTSR from the stated accumulation"),
        "accumulation_mass_ratio": context["mass_ratio"],
        "solvent": None if solvent is None else solvent["name"],
        "boiling_pressure_bar": None if solvent is None else solvent["pressure"] / 1e5,
        "latent_heat_kJ_per_kg": None if solvent is None or solvent["latent_heat"] is None
        else solvent["latent_heat"] / 1e3,
        "latent_heat_source": None if solvent is None else solvent["latent_heat_source"],
        "decomposition_heat_release_rate_at_mtt_W_per_kg": context["decomposition_rate"],
        "decomposition_heat_counted_in_inventory": context["decomposition_counted"],
        "vessels": entries,
    }
    # Terminal text only where it is shown (a check); sweeps and samples read the figures.
    block["summary_lines"] = _summary_lines(heading, block) if curves else []
    r["barrier"] = block
    result.methods["barrier"] = METHOD_TEXT
    if solvent is None:
        result.warnings.append("Evaporative-cooling barrier not assessed: the case has no "
                               "[solvent] section, but the barrier is called upon ("
                               + reason + "), so it counts as failing.")
    if not entries:
        result.warnings.append("Evaporative-cooling barrier: the case has no [vessel], so the "
                               "condenser and the vapour line cannot be checked; it counts as "
                               "failing.")
    gas_yield = case.sections["solvent"].gas_yield if "solvent" in case.sections else None
    condensers = [e for e in entries if e.get("condenser_capacity_kW") is not None]
    if gas_yield and condensers:
        # Non-condensable gas blankets the condensing surface (issue 18 item 9).
        block["non_condensable_gas"] = True
        result.warnings.append(
            f"Evaporative-cooling barrier: the decomposition forms non-condensable gas "
            f"(solvent.gas_yield {float(gas_yield):.3g} mol/kg); non-condensables blanket the "
            f"condenser and lower its capacity, so the condenser capacity used is an upper bound "
            f"once the decomposition has started (pad gas is taken as swept out by the vapour).")
    for entry in entries:
        if entry["barrier_verdict"] != "holds" and solvent is not None:
            result.warnings.append(f"{entry['name']}: evaporative-cooling barrier "
                                   f"{entry['barrier_verdict'].upper()}: {entry['reasons'][0]}")
    if curves and entries:
        result.curves["barrier"] = _curves(case, entries, context)


def _context(case, results, mtt, mtsr, mtsr_basis, klass) -> dict:
    process = case.sections["process"]
    ratio = float(results.get("accumulation_mass_ratio") or 1.0)
    solvent = solvent_properties(case, mtt) if "solvent" in case.sections else None
    kinetics, basis, fresh, peak = _decomposition_at_mtt(case, mtt)
    td24 = float(results["td24_degC"]) + ZERO_CELSIUS
    solvent_section = case.sections.get("solvent")
    return {
        "mtt": mtt, "mtsr": mtsr, "mtsr_basis": mtsr_basis, "criticality_class": klass,
        # With the feed continuing the whole charge ends in the final mass.
        "mass_ratio": (ratio if process.mode == "semi-batch"
                       and results.get("mtsr_feed_mode") != "continuing" else 1.0),
        "solvent": solvent,
        "solvent_amount": None if solvent_section is None or solvent_section.amount is None
        else float(solvent_section.amount),
        "decomposition_rate": fresh, "decomposition_peak_rate": peak,
        "decomposition_model": kinetics.model, "decomposition_basis": basis,
        "decomposition_energy": float(case.sections["decomposition"].energy),
        # Within 24 h at the MTT the decomposition energy comes out as well (design).
        "decomposition_counted": bool(td24 <= mtt),
        "td24": td24,
    }


def _curves(case, entries, context):
    import numpy as np

    from screen.models import evaporation

    cp = float(case.sections["mass"].specific_heat)
    t_p = float(case.sections["process"].temperature)
    out = []
    for entry in entries:
        if "temperature_course" not in entry or context["solvent"] is None:
            continue
        latent = context["solvent"]["latent_heat"]
        solvent_mass = entry["solvent_present_kg"]
        mass = entry["mass_at_failure_kg"]
        heat = np.linspace(0.0, entry["accumulated_heat_MJ"] * 1e6, 200)
        temperature = evaporation.temperature_course(
            heat, t_p, context["mtt"], entry["sensible_heat_to_mtt_MJ"] * 1e6, solvent_mass,
            latent, (mass - solvent_mass) * cp)
        out.append({"name": entry["name"], "heat_released_J": heat, "temperature_K": temperature})
    return out


# --------------------------------------------------------------------------------------------
# Terminal lines


def _wrap(text, indent="  ", subsequent=None):
    return textwrap.wrap(text, WIDTH, initial_indent=indent,
                         subsequent_indent=subsequent if subsequent is not None else indent)


def _number(value, fmt):
    if value is None:
        width = fmt.split(".")[0].rstrip("<>^") or "0"
        return f"{'n/a':>{int(width)}}" if width.isdigit() else "n/a"
    return format(value, fmt)


def _summary_lines(heading, block) -> list[str]:
    lines = [heading]
    lines.extend(_wrap(f"assessed because: {block['reason']}"))
    if block["solvent"] is not None:
        latent = block["latent_heat_kJ_per_kg"]
        lines.extend(_wrap(f"solvent {block['solvent']} at {block['boiling_pressure_bar']:.4g} "
                           f"bar, latent heat "
                           f"{'n/a' if latent is None else format(latent, '.4g')} kJ/kg "
                           f"({block['latent_heat_source'] or 'not given'})"))
    if block["mtsr_basis"] != "case":
        lines.extend(_wrap(f"MTSR {block['mtsr_degC']:.1f} degC: {block['mtsr_basis_text']}"))
    vessels = block["vessels"]
    if vessels and block["solvent"] is not None:
        lines.append(f"  {'vessel':<14}{'heat kW':>8}{'vap kg/h':>9}{'cond kW':>8}"
                     f"{'line m/s':>9}{'flood':>9}{'solv kg':>8}  verdict")
        for v in vessels:
            lines.append(
                f"  {v['name'][:13]:<14}{_number(v.get('heat_release_rate_at_mtt_kW'), '8.4g')}"
                f"{_number(v.get('vapour_mass_flow_kg_per_h'), '9.4g')}"
                f"{_number(v.get('condenser_capacity_kW'), '8.4g')}"
                f"{_number(v.get('vapour_line_velocity_m_per_s'), '9.3g')}"
                f"{_number(v.get('flooding_velocity_m_per_s'), '9.3g')}"
                f"{_number(v.get('solvent_evaporated_kg'), '8.4g')}  {v['barrier_verdict']}")
        lines.extend(_wrap("(heat = release rate at the MTT; cond = condenser capacity; "
                           "flood = flooding limit of the vapour line in m/s; solv = solvent "
                           "evaporated until the heat is spent)"))
    for v in vessels:
        lines.extend(_wrap(f"{v['name']}: barrier {v['barrier_verdict'].upper()}", "  - ",
                           "    "))
        if v.get("heat_release_rate_basis"):
            lines.extend(_wrap(f"heat at the MTT: {v['heat_release_rate_basis']}", "      ",
                               "      "))
        for reason in v["reasons"]:
            lines.extend(_wrap(reason, "      ", "      "))
        if v.get("boils_dry"):
            lines.extend(_wrap(f"boils dry: the rest of the heat takes the mass to "
                               f"{v['final_temperature_degC']:.1f} degC", "      ", "      "))
        if v.get("decomposition_dry_out_time_h") is not None:
            lines.extend(_wrap(f"held at the MTT, the decomposition alone would boil the rest "
                               f"of the solvent away in {v['decomposition_dry_out_time_h']:.3g} h",
                               "      ", "      "))
    if not vessels:
        lines.extend(_wrap(f"barrier {block['verdict'].upper()}: the case has no [vessel], so "
                           f"the condenser and the vapour line cannot be checked"))
    return lines
