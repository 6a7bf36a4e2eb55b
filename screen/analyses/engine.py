"""The screening engine: composes the physical models into one traceable result.

Input: a validated :class:`screen.io.case.Case` (SI floats). Output: a :class:`ScreeningResult`
whose ``results`` mapping holds JSON-ready figures in the units named by each key, plus curves
for figures, warnings, the method behind each figure and the cautions. Nothing here reads files
or prints.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from screen import __version__
from screen.analyses import barrier, pressure, simulation, technical_limits
from screen.analyses.courses import AdiabaticCourse
from screen.analyses.inputs import (
    ONSET_ESTIMATE_ACTIVATION_ENERGY,
    ONSET_ESTIMATE_DETECTION_LIMIT,
    accumulation_mass_ratio,
    characteristic_temperatures,
    decomposition_kinetics,
    onset_estimate_reference,
    synthesis_specific_energy,
    tmrad_at,
)
from screen.analyses.governing import add_assumptions, govern_mtsr, governing_warnings
from screen.analyses.vessels import vessel_results
from screen.cautions import CAUTIONS
from screen.constants import ZERO_CELSIUS
from screen.errors import ModelDomainError, ScreenError, SolverError
from screen.models import criticality as crit
from screen.models import thermal
from screen.units import to_celsius, to_hours

#: Extrapolation of decomposition kinetics below the lowest measured temperature that triggers
#: a warning [K] (design).
EXTRAPOLATION_WARNING_K = 50.0

TOOL_NAME = "runaway-screen"


@dataclass
class ScreeningResult:
    """Everything a presenter needs: figures, curves, warnings, methods, provenance."""

    case: Any
    results: dict[str, Any]
    warnings: list[str]
    methods: dict[str, str]
    curves: dict[str, Any] = field(default_factory=dict)
    cautions: tuple[str, ...] = CAUTIONS

    def to_json_dict(self, generated_at: str | None = None) -> dict[str, Any]:
        """JSON-ready dict. Only ``generated_at`` varies between identical runs.

        Parameters
        ----------
        generated_at : str or None
            ISO 8601 time stamp written as ``generated_at``; None omits it (reproducible output).
        """
        case = self.case
        header = case.sections["case"]
        return {
            "tool": {"name": TOOL_NAME, "version": __version__},
            "case": {
                "title": header.title,
                "revision": header.revision,
                "author": header.author,
                "path": case.path,
                "sha256": case.sha256,
            },
            "generated_at": generated_at,
            "overrides": list(case.overrides),
            "inputs": [
                {"key": rec.key, "as_read": rec.text, "value_si": _json_value(rec.value),
                 "unit_si": rec.unit}
                for rec in case.inputs
            ],
            "results": _json_clean(self.results),
            "methods": dict(self.methods),
            "warnings": list(self.warnings),
            "cautions": list(self.cautions),
        }


def _json_value(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _json_clean(obj):
    """Round floats to 10 significant digits (stable across platforms) and map non-finite to None."""
    if isinstance(obj, dict):
        return {k: _json_clean(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_json_clean(v) for v in obj]
    if isinstance(obj, (np.bool_,)):
        return bool(obj)
    if isinstance(obj, (np.integer,)):
        return int(obj)
    if isinstance(obj, (float, np.floating)):
        value = float(obj)
        if not math.isfinite(value):
            return None
        return float(f"{value:.10g}")
    return obj


# --------------------------------------------------------------------------------------------


def _plausibility_warnings(case, synthesis_rise, decomposition_rise, warnings):
    # Plausibility bands below: common practice, no source.
    cp = case.sections["mass"].specific_heat
    if not 800.0 <= cp <= 5000.0:
        warnings.append(f"mass.specific_heat = {cp / 1000:.3g} kJ/(kg K) is outside the usual "
                        f"0.8-5 kJ/(kg K) of liquid reaction masses: check the value and unit.")
    dec = case.sections["decomposition"]
    if dec.activation_energy is not None and not 30e3 <= dec.activation_energy <= 400e3:
        warnings.append(f"decomposition.activation_energy = {dec.activation_energy / 1000:.4g} "
                        f"kJ/mol is outside the usual 30-400 kJ/mol: check the value and unit.")
    syn = case.sections["synthesis"]
    if syn.activation_energy is not None and not 30e3 <= syn.activation_energy <= 400e3:
        warnings.append(f"synthesis.activation_energy = {syn.activation_energy / 1000:.4g} kJ/mol "
                        f"is outside the usual 30-400 kJ/mol: check the value and unit.")
    for name, rise in (("synthesis", synthesis_rise), ("decomposition", decomposition_rise)):
        if rise > 1000.0:
            warnings.append(f"{name} adiabatic rise {rise:.0f} K exceeds 1000 K: implausible for "
                            f"a liquid mass; check the energy, mass and c'p.")


def screen_case(case, curves: bool = True) -> ScreeningResult:
    """Run the screening of one case.

    The steps, in order: synthesis (stated MTSR), decomposition (kinetics, TD24), the
    cooling-failure simulation (with ``[synthesis_kinetics]``), the governing MTSR
    (:mod:`screen.analyses.governing`), every figure derived from it (final temperature,
    severity, TMRad at MTSR, probability, onset margin, class), the vessels, the pressure, the
    barrier, the technical limits (:mod:`screen.analyses.technical_limits`) and last the
    assumptions the verdict rests on.

    Parameters
    ----------
    case : screen.io.case.Case
        A validated case (SI values).
    curves : bool
        Also compute the curves for figures (off for sweeps and Monte Carlo).

    Returns
    -------
    ScreeningResult
        ``results`` holds the figures named in the JSON contract (degC, K, h).

    Raises
    ------
    ScreenError
        A model was outside its domain or a numerical method failed; the message says which.
    """
    warnings: list[str] = list(case.warnings)
    methods: dict[str, str] = {}
    mtt = maximum_technical_temperature(case, methods, warnings)
    synthesis = _synthesis_step(case, methods, warnings)
    decomposition = _decomposition_step(case, methods, warnings)
    _plausibility_warnings(case, synthesis["rise"], decomposition["rise"], warnings)
    results = _stated_results(case, synthesis, decomposition, mtt)
    curve_data = {
        "temperatures_K": {"T_p": synthesis["t_p"], "MTSR": synthesis["mtsr"], "MTT": mtt,
                           "TD24": decomposition["td24"], "TD8": decomposition["td8"]},
        "kinetics": decomposition["kinetics"],
        "specific_heat": synthesis["cp"],
    }
    result = ScreeningResult(case=case, results=results, warnings=warnings, methods=methods,
                             curves=curve_data)
    if "synthesis_kinetics" in case.sections:
        simulation.add_simulation(case, result, curves=curves)
    governing = govern_mtsr(case, synthesis["mtsr"], synthesis["rise"], results.get("simulation"))
    _mtsr_figures(case, result, synthesis, decomposition, mtt, governing)
    if curves:
        _tmrad_curve(result, synthesis, decomposition)
    _add_vessels(case, result, decomposition["kinetics"], governing.temperature)
    _add_analyses(case, result, curves)
    technical_limits.apply_technical_limits(case, result, _verdict_text)
    add_assumptions(case, result, governing)
    return result


def _synthesis_step(case, methods, warnings) -> dict:
    """Synthesis heat, adiabatic rise and the MTSR from the stated accumulation (SI)."""
    process = case.sections["process"]
    cp = float(case.sections["mass"].specific_heat)
    t_p = float(process.temperature)
    q_syn = synthesis_specific_energy(case)
    rise_syn = float(thermal.adiabatic_temperature_rise(q_syn, cp))
    if process.mode == "semi-batch":
        accumulation = float(process.accumulation)
        mass_ratio, _ = accumulation_mass_ratio(case)
    else:
        accumulation = float(process.get("accumulation", 1.0))
        mass_ratio = 1.0
        if process.accumulation_mass_ratio is not None:
            warnings.append("process.accumulation_mass_ratio is ignored in batch mode (the mass "
                            "does not change during the step).")
        if process.feed_interlock is not None:
            warnings.append("process.feed_interlock is ignored in batch mode (nothing is fed "
                            "during the step).")
    mtsr = float(thermal.maximum_temperature_synthesis_reaction(t_p, rise_syn, accumulation,
                                                                 mass_ratio))
    methods["mtsr"] = ("MTSR = T_p + X_ac dT_ad / (m(t_acc)/m_final) (Stoessel, Chem. Eng. Prog. "
                       "89(10) 1993; mass correction derived). The governing MTSR is the highest "
                       "of this value, the simulated feed-stopped MTSR and, in semi-batch "
                       "without a declared feed interlock, the temperature reached with the feed "
                       "continuing (simulated, or the bound T_p + dT_ad of the full charge); "
                       "every figure derived from MTSR uses the governing value.")
    return {"cp": cp, "t_p": t_p, "q": q_syn, "rise": rise_syn, "accumulation": accumulation,
            "mass_ratio": mass_ratio, "mtsr": mtsr}


def _decomposition_step(case, methods, warnings) -> dict:
    """Decomposition kinetics, its adiabatic rise, TMRad at T_p, TD24 and TD8 (SI)."""
    from screen.models import decomposition as dm

    dec = case.sections["decomposition"]
    cp = float(case.sections["mass"].specific_heat)
    t_p = float(case.sections["process"].temperature)
    try:
        kinetics, basis = decomposition_kinetics(case)
        dm.validate_kinetics(kinetics)
    except ModelDomainError as exc:
        raise ModelDomainError(exc.message, exc.key or "decomposition", case.path) from None
    try:
        tmrad_tp = tmrad_at(kinetics, t_p, cp)
        td24, td8 = characteristic_temperatures(kinetics, cp)
    except ScreenError as exc:
        raise type(exc)(exc.message, exc.key or "decomposition", case.path) from None
    for name, value in (("TMRad at T_p", tmrad_tp), ("TD24", td24), ("TD8", td8)):
        if not math.isfinite(value):
            raise SolverError(f"{name} is not a finite number for these kinetics; check the "
                              f"decomposition data", "decomposition", case.path)
    onset_reference = onset_estimate_reference(case) if basis == "onset-estimate" else None
    _decomposition_methods(kinetics.model, basis, methods)
    _decomposition_warnings(dec, basis, td24, onset_reference, warnings)
    return {"kinetics": kinetics, "basis": basis, "model": kinetics.model,
            "onset_reference": onset_reference,
            "rise": float(thermal.adiabatic_temperature_rise(dec.energy, cp)),
            "tmrad_tp": tmrad_tp, "td24": td24, "td8": td8}


def _decomposition_methods(model_name, basis, methods) -> None:
    if model_name == "zero-order":
        methods["tmrad"] = ("Zero order: TMRad = c'p R T0^2 / (q(T0) E) (Townsend & Tou, "
                            "Thermochim. Acta 37 (1980) 1-30)")
    else:
        methods["tmrad"] = (f"{model_name}: adiabatic time to maximum rate with reactant "
                            f"consumption, integrated numerically (phi = 1); zero-order "
                            f"Townsend & Tou (1980) value shown for comparison")
    methods["td24"] = "Start temperature at which TMRad = 24 h (TD8: 8 h), same model, root finding"
    methods["criticality_class"] = "Criticality classes (Stoessel, Chem. Eng. Prog. 89(10) 1993)"
    methods["severity"] = ("Severity from the runaway's adiabatic rise (final temperature - T_p, "
                           "final temperature = governing MTSR + dT_ad of the decomposition); "
                           "probability from TMRad at the governing MTSR (Stoessel 2008 ch. 3; "
                           "verify the bands against the source)")
    if basis == "onset-estimate":
        methods["tmrad"] = ("Crude estimate from the DSC onset (zero order, low activation "
                            "energy, onset as detection limit; Keller et al., J. Loss Prev. "
                            "Process Ind. 10 (1997) 31-41; verify against the source)")


def _decomposition_warnings(dec, basis, td24, onset_reference, warnings) -> None:
    if basis == "onset-estimate":
        warnings.append(
            "Decomposition kinetics missing: TMRad and TD24 are a CRUDE estimate from the DSC "
            f"onset alone (zero order, E = {ONSET_ESTIMATE_ACTIVATION_ENERGY / 1000:.0f} kJ/mol, "
            f"{onset_reference['text']}; Keller et al. 1997, "
            f"verify against the source). Measure the decomposition kinetics before relying on "
            f"the class.")
        if not onset_reference["declared"]:
            warnings.append(
                "decomposition.onset_type is not declared: an extrapolated (tangent) onset lies "
                "tens of kelvin above the detection point, so the crude estimate grants no class "
                "below 5. Declare onset_type = \"detection-point\" with onset_detection_limit, "
                "or \"extrapolated\" with onset_scan_rate.")
        if dec.model is not None:
            warnings.append("decomposition.basis = \"onset-estimate\": the model keys of the "
                            "section are not used; the section is a crude onset estimate.")
    lowest_measured = dec.lowest_measured_temperature or dec.reference_temperature
    if basis == "kinetics" and lowest_measured is None:
        warnings.append(
            f"The temperature range in which the decomposition kinetics were measured is not "
            f"given (decomposition.lowest_measured_temperature): TD24 "
            f"({to_celsius(td24):.1f} degC) may rest on an extrapolation far below the data.")
    if basis == "kinetics" and lowest_measured is not None:
        gap = lowest_measured - td24
        if gap > EXTRAPOLATION_WARNING_K:
            warnings.append(
                f"TD24 ({to_celsius(td24):.1f} degC) lies {gap:.0f} K below the lowest temperature "
                f"at which the decomposition was measured ({to_celsius(lowest_measured):.1f} degC): "
                f"the kinetics are extrapolated far outside the measured range.")


def _stated_results(case, synthesis, decomposition, mtt) -> dict[str, Any]:
    """The figures that do not depend on which MTSR governs (JSON-ready)."""
    process = case.sections["process"]
    dec = case.sections["decomposition"]
    t_p = synthesis["t_p"]
    results: dict[str, Any] = {
        "process_temperature_degC": to_celsius(t_p),
        "mode": process.mode,
        "accumulation": synthesis["accumulation"],
        "accumulation_mass_ratio": synthesis["mass_ratio"],
        "synthesis_energy_kJ_per_kg": synthesis["q"] / 1000.0,
        "synthesis_adiabatic_rise_K": synthesis["rise"],
        "mtsr_degC": to_celsius(synthesis["mtsr"]),
        "mtt_degC": to_celsius(mtt),
        "decomposition_energy_kJ_per_kg": dec.energy / 1000.0,
        "decomposition_adiabatic_rise_K": decomposition["rise"],
        "decomposition_model": decomposition["model"],
        "decomposition_basis": decomposition["basis"],
        "tmrad_at_process_temperature_h": to_hours(decomposition["tmrad_tp"]),
        "td24_degC": to_celsius(decomposition["td24"]),
        "td8_degC": to_celsius(decomposition["td8"]),
    }
    return results


def _mtsr_figures(case, result, synthesis, decomposition, mtt, governing) -> None:
    """Every figure derived from MTSR, at the governing MTSR: final temperature, runaway rise,
    severity, TMRad at MTSR, probability, onset margin, class and verdict."""
    from screen.models import decomposition as dm

    r, warnings = result.results, result.warnings
    kinetics, cp, basis = decomposition["kinetics"], synthesis["cp"], decomposition["basis"]
    t_p, td24, rise_dec = synthesis["t_p"], decomposition["td24"], decomposition["rise"]
    mtsr = governing.temperature
    try:
        tmrad_mtsr = tmrad_at(kinetics, mtsr, cp)
        tmrad_mtsr_zero = float(dm.tmrad_townsend_tou_for(kinetics, mtsr, cp))
        tmrad_stated = (tmrad_mtsr if governing.source == "stated"
                        else tmrad_at(kinetics, synthesis["mtsr"], cp))
    except ScreenError as exc:
        raise type(exc)(exc.message, exc.key or "decomposition", case.path) from None
    if not math.isfinite(tmrad_mtsr):
        raise SolverError("TMRad at MTSR is not a finite number for these kinetics; check the "
                          "decomposition data", "decomposition", case.path)
    _tmrad_model_warnings(kinetics, basis, mtsr, rise_dec, cp, tmrad_mtsr, tmrad_mtsr_zero,
                          warnings)
    final_temperature = mtsr + rise_dec
    runaway_rise = final_temperature - t_p
    tmr_h = to_hours(tmrad_mtsr)
    klass = int(crit.criticality_class(t_p, mtsr, mtt, td24))
    stated_class = int(crit.criticality_class(t_p, synthesis["mtsr"], mtt, td24))
    if td24 <= t_p:
        warnings.append(f"TD24 ({to_celsius(td24):.1f} degC) is at or below the process "
                        f"temperature ({to_celsius(t_p):.1f} degC): outside the class scheme; "
                        f"reported as class 5, the most critical outcome. The mass is not stable "
                        f"for 24 h even under normal conditions.")
    severity_4 = crit.severity_level(runaway_rise, 4)
    probability_6, probability_3 = crit.probability_level(tmr_h, 6), crit.probability_level(tmr_h, 3)
    reported_class: int | None = klass
    verdict_status = "screened"
    if basis == "onset-estimate":
        # Fail closed: a crude estimate may confirm a high class but never grant a low one.
        onset_reference = decomposition["onset_reference"]
        if klass >= 4 and (onset_reference["declared"] or klass >= 5):
            verdict_status = "crude-estimate"
        else:
            verdict_status = "cannot-conclude"
            reported_class = None
            probability_6 = probability_3 = None
    verdict = _verdict_text(klass, severity_4, probability_6, verdict_status)
    r.update({
        "mtsr_governing_degC": to_celsius(mtsr),
        "mtsr_governing_basis": governing.basis,
        "mtsr_governing_source": governing.source,
        "mtsr_feed_mode": governing.feed_mode,
        "mtsr_candidates_degC": {name: to_celsius(value)
                                 for name, value in governing.candidates.items()},
        "final_temperature_degC": to_celsius(final_temperature),
        "runaway_adiabatic_rise_K": runaway_rise,
        "tmrad_at_mtsr_h": tmr_h,
        "tmrad_at_mtsr_governing_h": tmr_h,
        "tmrad_at_mtsr_stated_h": to_hours(tmrad_stated),
        "tmrad_at_mtsr_zero_order_h": to_hours(tmrad_mtsr_zero),
        "onset_margin_K": td24 - mtsr,
        "onset_margin_governing_K": td24 - mtsr,
        "criticality_class": reported_class,
        "criticality_class_computed": klass,
        "criticality_class_stated_mtsr": stated_class,
        "criticality_meaning": (crit.CLASS_MEANINGS[klass] if reported_class is not None
                                else "Cannot conclude: no decomposition kinetics."),
        "severity": crit.severity_level(runaway_rise, 3),
        "severity_4": severity_4,
        "probability": probability_3,
        "probability_6": probability_6,
        "verdict_status": verdict_status,
        "verdict": verdict,
    })
    onset_reference = decomposition["onset_reference"]
    if onset_reference is not None:
        r["onset_estimate"] = {
            "onset_type": onset_reference["onset_type"],
            "declared": onset_reference["declared"],
            "reference_temperature_degC": to_celsius(onset_reference["temperature"]),
            "reference_rate_W_per_kg": onset_reference["rate"],
            "basis": onset_reference["text"],
        }
    _dsc_onset_figures(case, r, t_p, mtsr)
    result.curves["temperatures_K"].update({"MTSR_governing": mtsr, "final": final_temperature})
    warnings.extend(governing_warnings(governing, stated_class if reported_class is not None
                                       else None, reported_class))


def _tmrad_model_warnings(kinetics, basis, mtsr, rise_dec, cp, tmrad_mtsr, tmrad_mtsr_zero,
                          warnings) -> None:
    from screen.models import decomposition as dm

    model_name = kinetics.model
    conservative, reasons = dm.zero_order_is_conservative(kinetics, mtsr, cp)
    if model_name != "zero-order" and not bool(np.all(conservative)):
        reason = reasons if isinstance(reasons, str) else "; ".join(map(str, np.atleast_1d(reasons)))
        warnings.append(
            f"The zero-order (Townsend & Tou) TMRad at MTSR ({to_hours(tmrad_mtsr_zero):.3g} h) is "
            f"NOT conservative for this {model_name} decomposition ({reason}); the verdict uses "
            f"the {model_name} value ({to_hours(tmrad_mtsr):.3g} h).")
    if model_name == "zero-order" and basis == "kinetics":
        b_number = float(dm.semenov_b_number(mtsr, rise_dec, kinetics.activation_energy))
        if b_number < 10.0:
            warnings.append(
                f"B = E dT_ad/(R T0^2) = {b_number:.3g} at MTSR is small: reactant consumption "
                f"matters and the zero-order TMRad is only a rough estimate.")


def _dsc_onset_figures(case, r, t_p, mtsr) -> None:
    dec = case.sections["decomposition"]
    if dec.onset_temperature is None:
        return
    onset = float(dec.onset_temperature)
    r["dsc_onset_degC"] = to_celsius(onset)
    r["dsc_onset_minus_process_temperature_K"] = onset - t_p
    r["dsc_onset_minus_mtsr_K"] = onset - mtsr
    r["dsc_onset_note"] = (
        "For information only: the '100 K below the DSC onset' margin is a rule of thumb with "
        "no published basis (common practice, no source) and is not used for the verdict.")


def _tmrad_curve(result, synthesis, decomposition) -> None:
    from screen.models import decomposition as dm

    temps = result.curves["temperatures_K"]
    t_p, td24, td8 = synthesis["t_p"], decomposition["td24"], decomposition["td8"]
    kinetics, cp = decomposition["kinetics"], synthesis["cp"]
    low = min(t_p, td24) - 30.0
    high = max(temps["final"], td8, temps["MTSR_governing"]) + 30.0
    grid = np.linspace(max(low, 150.0), high, 160)
    with np.errstate(all="ignore"):
        tmr_grid = np.asarray(dm.tmrad(kinetics, grid, cp), dtype=float)
    result.curves["tmrad_curve"] = (grid, tmr_grid)
    # The unmitigated course from the governing MTSR (figure 3 of the PDF); integrated on first use.
    result.curves["adiabatic_course"] = AdiabaticCourse(kinetics, temps["MTSR_governing"], cp)


def _add_analyses(case, result, curves: bool) -> None:
    """The analyses composed after the core figures and the vessels, in order: the closed-vessel
    pressure (with ``[solvent]``) and the evaporative-cooling barrier. Each adds its own
    ``results`` member. (The cooling-failure simulation runs before the governing MTSR.)"""
    if "solvent" in case.sections:
        pressure.add_pressure(case, result, curves=curves)
    barrier.add_barrier(case, result, curves=curves)


def maximum_technical_temperature(case, methods, warnings) -> float:
    """MTT [K]: as given, or the boiling point of the named solvent at the operating pressure.

    Parameters
    ----------
    case : Case
        Loaded case (SI quantities).
    methods : list of str
        Method notes of the result; the basis of the MTT is appended.
    warnings : list of str
        Warnings of the result; appended to when the MTT is not demonstrated.
    """
    from screen.constants import STANDARD_ATMOSPHERE
    from screen.errors import CaseError

    process = case.sections["process"]
    solvent = case.sections.get("solvent")
    given = process.max_technical_temperature
    if solvent is None or solvent.name is None:
        methods["mtt"] = "MTT as given in the case" + (
            f" ({process.mtt_basis})" if process.mtt_basis else "")
        return float(given)
    from screen.models import solvents

    try:
        data = solvents.lookup_solvent(solvent.name, key="solvent.name")
        pressure = float(solvent.pressure) if solvent.pressure else STANDARD_ATMOSPHERE
        boiling = float(solvents.boiling_temperature(data, pressure))
    except ScreenError as exc:
        raise CaseError(exc.message, exc.key or "solvent", case.path) from None
    if solvent.pressure is None:
        warnings.append(f"solvent.pressure not given: the boiling point of {data.name} is taken "
                        f"at 1.01325 bar.")
    methods["mtt_solvent"] = (f"Boiling point of {data.name} at {pressure / 1e5:.4g} bar from "
                              f"DIPPR/Perry's vapour-pressure coefficients (chemicals package "
                              f"data, bundled table)")
    if given is None:
        mtt = boiling
        methods["mtt"] = methods["mtt_solvent"]
    else:
        mtt = float(given)
        methods["mtt"] = "MTT as given in the case" + (
            f" ({process.mtt_basis})" if process.mtt_basis else "")
        if abs(given - boiling) > 5.0:
            warnings.append(f"The given MTT ({given - ZERO_CELSIUS:.1f} degC) differs from the "
                            f"boiling point of {data.name} at {pressure / 1e5:.4g} bar "
                            f"({boiling - ZERO_CELSIUS:.1f} degC) by more than 5 K: check both.")
    if process.temperature > mtt + 1e-9:
        raise CaseError(f"process temperature {process.temperature - ZERO_CELSIUS:.1f} degC is "
                        f"above the MTT {mtt - ZERO_CELSIUS:.1f} degC (boiling point of "
                        f"{data.name} at {pressure / 1e5:.4g} bar): impossible at that pressure",
                        "process.temperature", case.path)
    return mtt


def _verdict_text(klass, severity_4, probability_6, status):
    if status == "cannot-conclude":
        return (f"CANNOT CONCLUDE: decomposition kinetics are missing. A crude estimate from the "
                f"DSC onset alone gives class {klass}, which is not enough to grant a class below "
                f"4. Measure the decomposition kinetics (DSC at several heating rates, or "
                f"adiabatic calorimetry) and rerun. Severity {severity_4}.")
    text = f"Criticality class {klass}: {crit.CLASS_MEANINGS[klass]} "
    if klass <= 2:
        # The class says the decomposition is not reached; the severity says what happens if it
        # is triggered all the same (mass held hot, a second fault): never "no runaway".
        text += (f"Severity {severity_4} should the decomposition be triggered all the same; "
                 f"probability {probability_6}.")
    else:
        text += f"Severity {severity_4}, probability {probability_6}."
    if status == "crude-estimate":
        text = ("Crude estimate from the DSC onset only (decomposition kinetics missing); it "
                "already gives a high class. " + text)
    return text


def _add_vessels(case, result: ScreeningResult, kinetics, mtsr) -> None:
    """Vessel heat balance (Semenov) results, one entry per vessel."""
    if not case.vessels:
        result.results["vessels"] = []
        result.warnings.append("No [vessel] given: the heat balance of the vessel (Semenov "
                               "stability, temperature of no return, cooling capacity) is not "
                               "checked.")
        return

    entries, curves, warnings = vessel_results(case, kinetics, mtsr,
                                               result.results.get("tmrad_at_mtsr_h"))
    result.results["vessels"] = entries
    result.curves["vessels"] = curves
    result.warnings.extend(warnings)
