"""Deviation scenarios: variant cases derived from the base case, each screened in full.

A ``[scenarios]`` section selects deviations a review team asks about: a double charge of the
limiting reagent, dosing faster, dosing into a too-cold mass, loss of agitation during dosing, a
wrong coolant temperature and a contaminated (faster) decomposition. Each deviation becomes a
variant case (values replaced in SI, cross-checked again), runs through
:func:`screen.analyses.engine.screen_case` without curves, and gives one row of a table: MTSR, TMRad at
MTSR, criticality class, barrier verdict, and the change of each against the base case.

The deviation models and their provenance are in ``docs/scenarios.md``; each row carries its own
``basis`` text. Where synthesis kinetics exist, the variant is re-simulated (MTSR = the higher of
the case accumulation and the simulated worst case); where they do not, a stated conservative
estimate replaces the accumulation.

Scenarios run with the full check (``curves=True``); sweeps and Monte Carlo samples
(``curves=False``) skip them, because every row costs a full screening.
"""

from __future__ import annotations

import dataclasses
import math
import textwrap

from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.errors import ScreenError
from screen.io.scenario_inputs import DEVIATIONS, _selected, check_case  # noqa: F401

WIDTH = 78


#: Vessel stability outcomes from best to worst (screen.analyses.vessels).
STABILITY_ORDER = {"stable": 0, "mtsr-above-no-return": 1, "no-stable-point": 2}
BARRIER_ORDER = {"not assessed": -1, "holds": 0, "doubtful": 1, "fails": 2}

METHOD_TEXT = (
    "Deviation scenarios: each variant case is screened in full. Double charge: synthesis "
    "energy (or limiting amount) x2, mass unchanged (adiabatic rise doubles; Stoessel 2008 ch. 2 "
    "definition). Dosing faster by F: kinetics re-simulated with dosing_time/F, else "
    "X_ac -> min(1, F X_ac) (design). Dosing at T_D < T_p: kinetics re-simulated, else "
    "X_ac -> min(1, X_ac k(T_p)/k(T_D)) with synthesis.activation_energy, X_ac = 1 without it "
    "(design). Agitation lost: everything dosed accumulates, X_ac = 1 with the final mass "
    "(derived). Wrong coolant: every vessel's coolant temperature replaced; colder without "
    "kinetics: X_ac = 1 bound. Contamination: decomposition rate x factor (A or reference rate), "
    "and a lowered E (E' = E - R T_ref ln f), the more critical kept; an onset-only estimate "
    "shifts the onset accordingly (derived). See docs/scenarios.md.")


# --------------------------------------------------------------------------------------------
# Case checks






# --------------------------------------------------------------------------------------------
# Variant cases


@dataclasses.dataclass(frozen=True)
class Attempt:
    """One way to build a deviation: the variant case and how it models the deviation."""

    case: object
    basis: str
    needs_simulation: bool = False
    #: One of several models of the same deviation: all are screened, the most critical kept.
    alternative: bool = False


def make_variant(case, label, changes=None, vessel_changes=None, drop=()):
    """A copy of ``case`` with section values replaced (SI) and cross-checked again.

    Parameters
    ----------
    case : screen.io.case.Case
        Base case.
    label : str
        Name of the deviation (recorded in ``overrides`` and ``extras``).
    changes : dict of str to dict, optional
        ``{section: {key: value}}``; a value of None removes the key.
    vessel_changes : callable, optional
        ``f(values_dict) -> values_dict`` applied to every vessel.
    drop : iterable of str
        Sections to remove.

    Returns
    -------
    screen.io.case.Case
        The variant. Its ``[scenarios]`` keeps only ``evaporation_check`` and its ``extras``
        carry ``scenario_variant``, so it never runs scenarios itself.
    """
    from screen.io.case import case_with_changes

    changes = dict(changes or {})
    scenarios = case.sections.get("scenarios")
    drop = tuple(drop) + ("scenarios",)
    if scenarios is not None and scenarios.evaporation_check:
        # The variant keeps only the evaporation check of [scenarios]: it never runs scenarios.
        drop = tuple(d for d in drop if d != "scenarios")
        changes["scenarios"] = {k: None for k in scenarios.as_dict() if k != "evaporation_check"}
    return case_with_changes(case, changes, vessel_changes, drop, f"scenario: {label}",
                             extras={"scenario_variant": label})


def _accumulation(case):
    process = case.sections["process"]
    if process.mode == "semi-batch":
        return float(process.accumulation)
    return float(process.get("accumulation", 1.0))


def _scaled_peak(case, factor):
    """synthesis.peak_heat_release_rate times factor (None removes it when factor is unknown)."""
    peak = case.sections["synthesis"].peak_heat_release_rate
    if peak is None:
        return {}
    if factor is None or not math.isfinite(factor):
        return {"peak_heat_release_rate": None}
    return {"peak_heat_release_rate": peak * factor}


def _double_charge(case, value):
    synthesis = case.sections["synthesis"]
    changes = {"synthesis": {}}
    if synthesis.energy is not None:
        changes["synthesis"]["energy"] = 2.0 * synthesis.energy
        what = (f"synthesis energy {synthesis.energy / 1e3:.4g} -> "
                f"{2 * synthesis.energy / 1e3:.4g} kJ/kg")
    else:
        changes["synthesis"]["limiting_amount"] = 2.0 * synthesis.limiting_amount
        what = (f"limiting amount {synthesis.limiting_amount:.4g} -> "
                f"{2 * synthesis.limiting_amount:.4g} mol")
    # The rate at the MTT is proportional to the accumulated reagent, which doubles.
    changes["synthesis"].update(_scaled_peak(case, 2.0))
    basis = (f"{what}, mass unchanged: the adiabatic rise doubles (co-reagent taken in excess; "
             f"conservative)")
    kinetics = case.sections.get("synthesis_kinetics")
    if kinetics is not None and kinetics.initial_amount_a is not None:
        total_a = float(kinetics.initial_amount_a)
        total_b = float(kinetics.initial_amount_b or 0.0) + float(kinetics.feed_amount or 0.0)
        if total_a <= total_b:
            changes["synthesis_kinetics"] = {"initial_amount_a": 2.0 * total_a}
            basis += "; kinetics: initial_amount_a x2"
        else:
            changes["synthesis_kinetics"] = {
                key: 2.0 * kinetics.get(key) for key in ("initial_amount_b", "feed_amount")
                if kinetics.get(key)}
            basis += "; kinetics: B charged and dosed x2 in the same dosing time"
        if kinetics.molar_enthalpy is None and synthesis.molar_enthalpy is None:
            # The molar reaction enthalpy is a property of the reaction: keep the base case's
            # value (derived there from synthesis.energy), instead of re-deriving it from the
            # doubled energy and the extent the double charge can reach (issue 13 item 4).
            from screen.io.simulation_inputs import resolve_inputs

            enthalpy = resolve_inputs(case.sections, case.vessels, case.path, []).molar_enthalpy
            changes["synthesis_kinetics"]["molar_enthalpy"] = float(enthalpy)
            basis += f"; molar enthalpy kept at {float(enthalpy) / 1e3:.4g} kJ/mol"
        return [Attempt(make_variant(case, "double charge", changes), basis + " (simulated)")]
    return [Attempt(make_variant(case, "double charge", changes), basis)]


def _dosing_faster(case, factor):
    synthesis = case.sections["synthesis"]
    accumulation = _accumulation(case)
    estimate = min(1.0, accumulation * factor)
    common = {}
    if synthesis.dosing_time is not None:
        common["dosing_time"] = synthesis.dosing_time / factor
    attempts = []
    kinetics = case.sections.get("synthesis_kinetics")
    if kinetics is not None and kinetics.dosing_time is not None:
        attempts.append(Attempt(
            make_variant(case, "dosing faster", {
                "synthesis": dict(common),
                "synthesis_kinetics": {"dosing_time": kinetics.dosing_time / factor}}),
            f"re-simulated with dosing time {kinetics.dosing_time / 3600:.3g} h / {factor:g}; "
            f"MTSR = higher of the case accumulation and the simulated worst case",
            needs_simulation=True))
    ratio = estimate / accumulation if accumulation > 0 else None
    # The dosing-controlled heat release follows the feed rate: the peak scales by the dosing
    # factor, or by the accumulation ratio where that is larger (issue 18 item 10).
    peak_factor = None if ratio is None else max(ratio, factor)
    changes = {"process": {"accumulation": estimate},
               "synthesis": {**common, **_scaled_peak(case, peak_factor)}}
    attempts.append(Attempt(
        make_variant(case, "dosing faster", changes),
        f"estimate (design): accumulation scales with the feed rate, X_ac = min(1, "
        f"{accumulation:.3g} x {factor:g}) = {estimate:.3g}; peak heat release x "
        f"{(peak_factor or float('nan')):.3g} (the larger of the dosing factor and the "
        f"accumulation ratio)"))
    return attempts


def _dosing_cold(case, dosing_temperature):
    process = case.sections["process"]
    synthesis = case.sections["synthesis"]
    t_p = float(process.temperature)
    shift = dosing_temperature - t_p
    accumulation = _accumulation(case)
    energy = synthesis.activation_energy
    kinetics = case.sections.get("synthesis_kinetics")
    if kinetics is not None and kinetics.activation_energy is not None:
        energy = kinetics.activation_energy

    def shifted(values):
        values = dict(values)
        values["coolant_temperature"] = values["coolant_temperature"] + shift
        if values.get("min_coolant_temperature") is not None \
                and values["min_coolant_temperature"] > values["coolant_temperature"]:
            values.pop("min_coolant_temperature")
        return values

    slow_down = None
    if energy is not None:
        slow_down = math.exp(energy / GAS_CONSTANT * (1.0 / dosing_temperature - 1.0 / t_p))
    where = (f"mass at {dosing_temperature - ZERO_CELSIUS:.1f} degC (coolant lowered by "
             f"{-shift:.1f} K in every vessel)")
    attempts = []
    if kinetics is not None:
        kinetic_changes = {"initial_temperature": dosing_temperature}
        if kinetics.feed_temperature is None:
            kinetic_changes["feed_temperature"] = t_p
        attempts.append(Attempt(
            make_variant(case, "dosing too cold", {
                "process": {"temperature": dosing_temperature},
                "synthesis_kinetics": kinetic_changes}, shifted),
            f"re-simulated with the {where}; MTSR = higher of the case accumulation and the "
            f"simulated worst case", needs_simulation=True))
    if slow_down is not None:
        estimate = min(1.0, accumulation * slow_down)
        basis = (f"estimate (design): {where}; the reaction is slower by k(T_p)/k(T_D) = "
                 f"{slow_down:.3g} (E = {energy / 1e3:.4g} kJ/mol), X_ac = min(1, "
                 f"{accumulation:.3g} x {slow_down:.3g}) = {estimate:.3g}")
        # Rate at the MTT ~ accumulated reagent: peak x k(T_D)/k(T_p) x X_ac'/X_ac at T_D.
        factor = (estimate / accumulation / slow_down) if accumulation > 0 else None
    else:
        estimate = 1.0
        basis = (f"needs kinetics: {where}; without synthesis.activation_energy the slow-down is "
                 f"unknown, X_ac = 1 (conservative)")
        factor = None
    changes = {"process": {"temperature": dosing_temperature, "accumulation": estimate},
               "synthesis": _scaled_peak(case, factor)}
    attempts.append(Attempt(make_variant(case, "dosing too cold", changes, shifted), basis))
    return attempts


def _agitation_loss(case, value):
    accumulation = _accumulation(case)
    factor = 1.0 / accumulation if accumulation > 0 else None
    changes = {"process": {"accumulation": 1.0, "accumulation_mass_ratio": 1.0},
               "synthesis": _scaled_peak(case, factor)}
    basis = ("derived: the unmixed feed does not react and accumulates; at the restart all that "
             "was dosed reacts. Worst case: agitation lost at the start and noticed at the end of "
             "dosing, X_ac = 1 with the final mass (mass ratio 1)")
    if "synthesis_kinetics" in case.sections:
        basis += ("; the well-mixed simulation cannot represent unmixed feed: it runs as in the "
                  "base case and counts only if its MTSR is higher")
    return [Attempt(make_variant(case, "agitation lost", changes), basis)]


def _wrong_coolant(case, temperature):
    def replaced(values):
        values = dict(values)
        values["coolant_temperature"] = temperature
        if values.get("min_coolant_temperature") is not None \
                and values["min_coolant_temperature"] > temperature:
            values.pop("min_coolant_temperature")
        return values

    basis = (f"coolant at {temperature - ZERO_CELSIUS:.1f} degC in every vessel (condensers "
             f"unchanged)")
    process = case.sections["process"]
    colder = any(temperature < float(v.coolant_temperature) for v in case.vessels)
    changes = None
    if "synthesis_kinetics" in case.sections:
        basis += "; re-simulated"
    elif process.mode == "semi-batch" and colder:
        # A colder mass reacts more slowly and accumulates more; without kinetics the amount is
        # unknown: bounded by everything dosed accumulating (issue 18 item 10; conservative).
        accumulation = _accumulation(case)
        changes = {"process": {"accumulation": 1.0, "accumulation_mass_ratio": 1.0},
                   "synthesis": _scaled_peak(case, 1.0 / accumulation if accumulation > 0
                                             else None)}
        basis += ("; colder coolant without synthesis kinetics: the extra accumulation is "
                  "unknown, bounded by X_ac = 1 with the final mass (everything dosed "
                  "accumulates; conservative)")
    elif process.mode == "semi-batch":
        basis += ("; a warmer coolant does not raise the accumulation: MTSR and class as in the "
                  "base case, only the vessel heat balance changes (stated)")
    else:
        basis += ("; batch: the accumulation is already that of the whole charge, only the "
                  "vessel heat balance changes")
    return [Attempt(make_variant(case, "wrong coolant", changes, vessel_changes=replaced),
                    basis)]


def _contamination(case, factor):
    from screen.analyses.inputs import ONSET_ESTIMATE_ACTIVATION_ENERGY

    dec = case.sections["decomposition"]
    if dec.reference_rate is not None:
        changes = {"reference_rate": dec.reference_rate * factor}
        basis = f"decomposition reference rate x{factor:g} (pre-exponential factor x{factor:g})"
    elif dec.pre_exponential_factor is not None:
        changes = {"pre_exponential_factor": dec.pre_exponential_factor * factor}
        basis = f"decomposition pre-exponential factor x{factor:g}"
    else:
        onset = float(dec.onset_temperature)
        shifted = 1.0 / (1.0 / onset + GAS_CONSTANT * math.log(factor)
                         / ONSET_ESTIMATE_ACTIVATION_ENERGY)
        changes = {"onset_temperature": shifted}
        basis = (f"onset-only estimate: rate x{factor:g} moves the onset from "
                 f"{onset - ZERO_CELSIUS:.1f} to {shifted - ZERO_CELSIUS:.1f} degC "
                 f"(1/T' = 1/T + R ln f / E, derived)")
        return [Attempt(make_variant(case, "contamination", {"decomposition": changes}), basis)]
    attempts = [Attempt(make_variant(case, "contamination", {"decomposition": changes}),
                        basis, alternative=True)]
    lowered = _contamination_lower_activation_energy(case, factor)
    if lowered is not None:
        attempts.append(lowered)
    return attempts


def _contamination_lower_activation_energy(case, factor):
    """Catalysis usually lowers E: E' = E - R T_ref ln f gives the same factor f at T_ref (the
    measured reference temperature) and a larger one below it (derived; issue 18 item 10)."""
    dec = case.sections["decomposition"]
    t_ref = dec.reference_temperature or dec.lowest_measured_temperature
    if t_ref is None or dec.activation_energy is None or factor <= 1.0:
        return None
    energy = float(dec.activation_energy)
    lowered = energy - GAS_CONSTANT * float(t_ref) * math.log(factor)
    if lowered < 0.25 * energy:
        return None  # beyond any plausible catalysis: the A x f variant alone
    changes = {"activation_energy": lowered}
    if dec.reference_rate is not None:
        changes["reference_rate"] = dec.reference_rate * factor
    basis = (f"catalysis with a lower activation energy: E {energy / 1e3:.4g} -> "
             f"{lowered / 1e3:.4g} kJ/mol (E' = E - R T_ref ln f, T_ref "
             f"{float(t_ref) - ZERO_CELSIUS:.1f} degC: rate x{factor:g} there, more below; "
             f"derived)")
    return Attempt(make_variant(case, "contamination", {"decomposition": changes}), basis,
                   alternative=True)


BUILDERS = {
    "double_charge": _double_charge,
    "dosing_rate_factor": _dosing_faster,
    "dosing_temperature": _dosing_cold,
    "agitation_loss": _agitation_loss,
    "coolant_temperature": _wrong_coolant,
    "decomposition_rate_factor": _contamination,
}


# --------------------------------------------------------------------------------------------
# Rows


#: Short words for the MTSR basis of a row (screen.analyses.barrier.governing_mtsr).
MTSR_BASIS_WORDS = {"simulation": "simulated, feed stopped",
                    "simulation-feed-continuing": "simulated, feed continuing",
                    "feed-continuing-bound": "feed-continuing bound"}


def row_figures(case, result) -> dict:
    """The figures of one table row from a screening result.

    Parameters
    ----------
    case : screen.io.case.Case
        The (variant) case screened.
    result : screen.analyses.engine.ScreeningResult
        Result of the engine for one scenario.

    Returns
    -------
    dict
        ``mtsr_degC``, ``tmrad_at_mtsr_h``, ``criticality_class``, ``barrier_verdict``,
        ``vessel_stability``, ``synthesis_adiabatic_rise_K``, ``accumulation``,
        ``accumulation_mass_ratio``, ``process_temperature_degC``, ``td24_degC``,
        ``mtsr_basis``.
    """
    from screen.analyses.barrier import governing_mtsr

    r = result.results
    # Every figure of the result already follows the governing MTSR (screen.analyses.governing).
    mtsr, basis = governing_mtsr(r)
    tmrad, klass = float(r["tmrad_at_mtsr_h"]), r["criticality_class"]
    klass = None if klass is None else int(klass)
    barrier = r.get("barrier") or {}
    verdict = barrier.get("verdict", "fails") if barrier.get("assessed") else "not assessed"
    reason = barrier.get("reason")
    worst_vessels = [v for v in barrier.get("vessels") or [] if v["barrier_verdict"] == verdict]
    if barrier.get("assessed") and worst_vessels and worst_vessels[0]["reasons"]:
        reason = f"{worst_vessels[0]['name']}: {worst_vessels[0]['reasons'][0]}"
    stabilities = [v.get("stability") for v in r.get("vessels") or [] if v.get("stability")]
    stability = max(stabilities, key=lambda s: STABILITY_ORDER.get(s, 3)) if stabilities else None
    return {
        "mtsr_degC": mtsr - ZERO_CELSIUS,
        "tmrad_at_mtsr_h": tmrad,
        "criticality_class": klass,
        "barrier_verdict": verdict,
        "barrier_reason": reason,
        "vessel_stability": stability,
        "synthesis_adiabatic_rise_K": float(r["synthesis_adiabatic_rise_K"]),
        "accumulation": float(r["accumulation"]),
        "accumulation_mass_ratio": float(r["accumulation_mass_ratio"]),
        "process_temperature_degC": float(r["process_temperature_degC"]),
        "td24_degC": float(r["td24_degC"]),
        "mtsr_basis": basis,
    }


def _has_simulated_mtsr(result) -> bool:
    from screen.analyses.barrier import SIMULATION_MTSR_KEY

    simulation = result.results.get("simulation")
    return isinstance(simulation, dict) and isinstance(simulation.get(SIMULATION_MTSR_KEY),
                                                       (int, float))


def _run(key, label, value, case):
    """Screen one deviation; a row dict (an input or model error is recorded, not raised)."""
    from screen.analyses.engine import screen_case

    try:
        attempts = BUILDERS[key](case, value)
        chosen = None
        if len(attempts) > 1 and all(a.alternative for a in attempts):
            screened = [(a, screen_case(a.case, curves=False)) for a in attempts]
            chosen = max(screened, key=lambda item: (
                _class_rank(item[1].results.get("criticality_class_computed")),
                -float(item[1].results["td24_degC"]),
                -float(item[1].results["tmrad_at_mtsr_h"])))
            attempts = []
        for attempt in attempts:
            variant_result = screen_case(attempt.case, curves=False)
            chosen = (attempt, variant_result)
            if not attempt.needs_simulation or _has_simulated_mtsr(variant_result):
                break
        attempt, variant_result = chosen
        row = row_figures(attempt.case, variant_result)
        row["basis"] = attempt.basis
        if attempt.alternative:
            row["basis"] += " (the more critical of the variants screened)"
        row["error"] = None
    except ScreenError as exc:
        row = {"basis": None, "error": exc.one_line()}
    row["key"] = key
    row["name"] = label
    return row


def _ordered_row(row, base) -> dict:
    """Row with the change against the base, keys in table order (the PDF shows the first 7)."""
    out = {"name": row["name"]}
    error = row.get("error")
    if error is None:
        tmrad, base_tmrad = row["tmrad_at_mtsr_h"], base["tmrad_at_mtsr_h"]
        out.update({
            "mtsr_degC": row["mtsr_degC"],
            "mtsr_change_K": row["mtsr_degC"] - base["mtsr_degC"],
            "tmrad_at_mtsr_h": tmrad,
            "criticality_class": row["criticality_class"],
            "barrier_verdict": row["barrier_verdict"],
            "class_change": _class_change(row["criticality_class"], base["criticality_class"]),
            "tmrad_change_h": tmrad - base_tmrad,
            "tmrad_ratio": tmrad / base_tmrad if base_tmrad > 0 else None,
            "barrier_change": (f"{base['barrier_verdict']} to {row['barrier_verdict']}"
                               if row["barrier_verdict"] != base["barrier_verdict"] else
                               "unchanged"),
        })
        for name in ("barrier_reason", "vessel_stability", "synthesis_adiabatic_rise_K",
                     "accumulation", "accumulation_mass_ratio", "process_temperature_degC",
                     "td24_degC", "mtsr_basis"):
            out[name] = row[name]
    else:
        out.update({"mtsr_degC": None, "mtsr_change_K": None, "tmrad_at_mtsr_h": None,
                    "criticality_class": None, "barrier_verdict": None})
    out["basis"] = row.get("basis")
    out["key"] = row.get("key", "base")
    out["error"] = error
    return out


def _class_change(klass, base_class):
    """Change of class; None when either cannot be concluded."""
    if klass is None or base_class is None:
        return None
    return klass - base_class


def _class_rank(klass) -> int:
    """Class for ordering; 'cannot conclude' ranks with the worst (fail closed)."""
    return 6 if klass is None else klass


def _worse(row, base) -> str | None:
    """Why a row is worse than the base (None when it is not)."""
    if row.get("error"):
        return f"{row['name']} (could not be screened)"
    parts = []
    if _class_rank(row["criticality_class"]) > _class_rank(base["criticality_class"]):
        parts.append(f"class {_class_text(base['criticality_class'])} -> "
                     f"{_class_text(row['criticality_class'])}")
    if BARRIER_ORDER[row["barrier_verdict"]] > BARRIER_ORDER[base["barrier_verdict"]] and \
            row["barrier_verdict"] != "holds":
        parts.append(f"barrier {base['barrier_verdict']} -> {row['barrier_verdict']}")
    if STABILITY_ORDER.get(row.get("vessel_stability"), 0) > \
            STABILITY_ORDER.get(base.get("vessel_stability"), 0):
        parts.append(f"vessel {row['vessel_stability']}")
    return f"{row['name']} ({', '.join(parts)})" if parts else None


def add_scenarios(case, result, curves: bool = False) -> None:
    """Screen every selected deviation and add ``results["scenarios"]``.

    Parameters
    ----------
    case : screen.io.case.Case
        Base case with a ``[scenarios]`` section.
    result : screen.analyses.engine.ScreeningResult
        Base result (barrier included); changed in place (results, warnings, methods).
    curves : bool
        False in sweeps and Monte Carlo samples: the scenarios are then skipped (each row costs
        a full screening) and the block says so.
    """
    if case.extras.get("scenario_variant"):
        return
    section = case.sections.get("scenarios")
    selected = _selected(section) if section is not None else []
    heading = "Deviation scenarios (each a full screening; change against the base case)"
    if not selected:
        return
    if not curves:
        result.results["scenarios"] = {
            "run": False,
            "reason": "skipped without curves (sweep or Monte Carlo sample); run check",
            "summary_lines": [],
        }
        return
    base_figures = {"name": "base case", **row_figures(case, result)}
    base_row = {"name": "base case", "mtsr_degC": base_figures["mtsr_degC"],
                "mtsr_change_K": 0.0, "tmrad_at_mtsr_h": base_figures["tmrad_at_mtsr_h"],
                "criticality_class": base_figures["criticality_class"],
                "barrier_verdict": base_figures["barrier_verdict"],
                "class_change": 0 if base_figures["criticality_class"] is not None else None,
                "tmrad_change_h": 0.0, "tmrad_ratio": 1.0, "barrier_change": "unchanged"}
    for name in ("barrier_reason", "vessel_stability", "synthesis_adiabatic_rise_K",
                 "accumulation", "accumulation_mass_ratio", "process_temperature_degC",
                 "td24_degC", "mtsr_basis"):
        base_row[name] = base_figures[name]
    base_row.update({"basis": "the case as given", "key": "base", "error": None})

    labels = dict(DEVIATIONS)
    rows = [base_row]
    for key in selected:
        raw = _run(key, labels[key], section.get(key), case)
        rows.append(_ordered_row(raw, base_figures))

    worse = [text for text in (_worse(row, base_row) for row in rows[1:]) if text]
    screened = [row for row in rows[1:] if row["error"] is None]
    worst = max(screened, key=lambda row: (_class_rank(row["criticality_class"]),
                                           row["mtsr_degC"]), default=None)
    block = {
        "run": True,
        "deviations": len(rows) - 1,
        "worst_scenario": None if worst is None else worst["name"],
        "worst_class": None if worst is None else worst["criticality_class"],
        "rows": rows,
    }
    block["summary_lines"] = _summary_lines(heading, rows)
    result.results["scenarios"] = block
    result.methods["scenarios"] = METHOD_TEXT
    if worse:
        result.warnings.append("Deviation scenarios worse than the base case: "
                               + "; ".join(worse) + ".")


# --------------------------------------------------------------------------------------------
# Terminal lines


def _class_text(klass) -> str:
    return "n/c" if klass is None else str(klass)


def _hours(hours):
    from screen.report.terminal import format_hours

    return format_hours(hours)


def _summary_lines(heading, rows) -> list[str]:
    lines = [heading,
             f"  {'scenario':<18}{'MTSR degC':>10}{'change':>7}{'TMRad MTSR':>11}{'ratio':>9}"
             f"{'class':>7}  barrier"]
    for row in rows:
        if row["error"] is not None:
            lines.append(f"  {row['name'][:17]:<18}{'screening failed, see below':>44}")
            continue
        change = "" if row["key"] == "base" else f"{row['mtsr_change_K']:+.1f}"
        ratio = "" if row["key"] == "base" or row["tmrad_ratio"] is None \
            else f"x{row['tmrad_ratio']:.3g}"
        klass = _class_text(row["criticality_class"])
        if row["key"] != "base" and row["class_change"]:
            klass += f"({row['class_change']:+d})"
        lines.append(f"  {row['name'][:17]:<18}{row['mtsr_degC']:>10.1f}{change:>7}"
                     f"{_hours(row['tmrad_at_mtsr_h']):>11}{ratio:>9}{klass:>7}  "
                     f"{row['barrier_verdict']}")
    lines.extend(textwrap.wrap("(change in K; ratio = TMRad at MTSR over the base value; n/c = "
                               "class cannot be concluded without decomposition kinetics)",
                               WIDTH, initial_indent="  ", subsequent_indent="  "))
    for row in rows[1:]:
        text = f"{row['name']}: " + (row["basis"] or "")
        if row["error"] is not None:
            text = f"{row['name']}: SCREENING FAILED, consequence unknown: {row['error']}"
        elif row.get("mtsr_basis") not in (None, "case"):
            text += f" (MTSR: {MTSR_BASIS_WORDS.get(row['mtsr_basis'], row['mtsr_basis'])})"
        lines.extend(textwrap.wrap(text, WIDTH, initial_indent="  - ",
                                   subsequent_indent="    "))
    return lines
