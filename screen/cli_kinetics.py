"""``runaway-screen kinetics``: decomposition kinetics from DSC runs.

Library entry points (used by the command and, later, by the PDF report):

- :func:`analyse_kinetics` -- run the whole analysis, returns a :class:`KineticsResult`.
- :func:`result_to_dict` -- the JSON object printed by ``--json``.
- :func:`format_summary` -- the human-readable summary.
- :func:`decomposition_toml` / :func:`write_toml` -- the ``[decomposition]`` case-file section.
- :func:`figures` -- matplotlib figures (Kissinger plot, Ea against conversion, fitted against
  measured curves, baselines).

Heavy imports (scipy, matplotlib) happen inside functions so that ``--help`` stays fast.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path

import click

from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.errors import CaseError, DataFileError, OutputError, ScreenError

#: Conversion levels reported for the isoconversional methods.
CONVERSION_LEVELS = tuple(round(0.05 * k, 2) for k in range(1, 20))

#: Decomposition energy above which explosive properties must be considered (UN Manual of
#: Tests and Criteria, appendix 6 screening procedure, 500 J/g; from memory). Values of about
#: 500-800 J/g are quoted in practice (common practice, no source).
ENERGY_EXPLOSIVE_SCREENING = 500.0e3  # [J/kg]

#: TD24 more than this below the lowest measured onset is flagged as far extrapolation (design).
EXTRAPOLATION_WARNING = 50.0  # [K]

#: Relative difference between nominal and measured heating rate that is flagged (design).
HEATING_RATE_MISMATCH = 0.05

#: Relative spread of the energy over runs that is flagged (design).
ENERGY_SPREAD_WARNING = 0.15

#: Smallest ratio of highest to lowest heating rate considered adequate (design).
HEATING_RATE_SPAN = 4.0

#: Fraction of the dominant area that makes the exotherm direction ambiguous (design).
AMBIGUOUS_DIRECTION = 0.2

CAUTIONS = (
    "Screening aid only: the kinetic parameters are fitted to the DSC data given and depend on "
    "their quality (calibration, sample representativeness, closed crucibles, baseline choice).",
    "Extrapolation to storage or process temperatures assumes the same single mechanism; "
    "confirm with isothermal or adiabatic calorimetry before relying on it.",
    "A qualified process-safety review, local codes and regulations, and licensed practice "
    "decide on safe operating conditions; this output does not.",
)


@dataclass
class RunSummary:
    """Key figures of one run (one thermogram or one row of a peak table)."""

    label: str
    heating_rate: float  # [K/s]
    peak_temperature: float  # [K]
    onset_temperature: float | None = None  # [K]
    detection_temperature: float | None = None  # [K]
    energy: float | None = None  # [J/kg]
    exotherm_direction: str | None = None
    baseline: str | None = None
    notes: list = field(default_factory=list)


@dataclass
class KineticsResult:
    """Everything the kinetics command computed; see :func:`result_to_dict` for the fields."""

    source: str
    files: list
    runs: list
    settings: dict
    kissinger: object = None
    astm_e698: object = None
    friedman: object = None
    ozawa: object = None
    model: object = None
    model_summary: dict | None = None
    energy: dict | None = None
    td24: dict = field(default_factory=dict)
    onset: dict | None = None
    analyses: list = field(default_factory=list)
    unavailable: dict = field(default_factory=dict)
    warnings: list = field(default_factory=list)
    cautions: list = field(default_factory=lambda: list(CAUTIONS))


# --------------------------------------------------------------------------------------------
# Analysis
# --------------------------------------------------------------------------------------------


def _per_file(values, count, option, kind):
    from screen.thermograms import parse_quantity

    parsed = [parse_quantity(v, kind, option) for v in values]
    if not parsed:
        return [None] * count
    if len(parsed) == 1:
        return parsed * count
    if len(parsed) != count:
        raise CaseError(
            f"given {len(parsed)} times for {count} files; give it once for all files or once "
            "per file in the same order",
            key=option,
        )
    return parsed


def analyse_kinetics(thermogram_paths=(), peaks_path=None, sample_masses=(), heating_rates=(),
                     exo_up=None, baseline="linear", integration_range=None, model="auto",
                     onset=None, energy=None, detection_limit="20 W/kg",
                     specific_heat="1.5 kJ/(kg K)", confidence_level=0.95):
    """Run the complete DSC kinetics analysis.

    Parameters
    ----------
    thermogram_paths : sequence of str
        Thermogram CSV files (one per heating rate).
    peaks_path : str, optional
        Peak-table CSV instead of thermograms.
    sample_masses, heating_rates : sequence of str
        ``"2.35 mg"``, ``"4 K/min"``: once for all files or once per file.
    exo_up : bool or None
        Exotherm direction; None detects it from the file or the integral sign.
    baseline : {"linear", "sigmoidal"}
        Baseline construction.
    integration_range : tuple of float, optional
        Integration limits in degC for all thermograms.
    model : {"auto", "nth-order", "autocatalytic"}
        Reaction model for extrapolation.
    onset : str, optional
        A DSC onset (``"185 degC"``) for the crude TD24 estimate.
    energy : str, optional
        Decomposition energy (``"650 J/g"``) when no thermograms are given.
    detection_limit : str
        Heat release rate taken as the DSC detection limit (``"20 W/kg"``).
    specific_heat : str
        c'p for the TD24 estimates (``"1.5 kJ/(kg K)"``).
    confidence_level : float
        Two-sided confidence level of all intervals.

    Returns
    -------
    KineticsResult

    Raises
    ------
    screen.errors.ScreenError
        For unreadable files, inconsistent options or data the methods cannot use.
    """
    from screen.thermograms import parse_quantity, read_peak_table, read_thermogram

    thermogram_paths = list(thermogram_paths)
    if thermogram_paths and peaks_path:
        raise CaseError("give either thermogram files or --peaks, not both", key="--peaks")
    if not thermogram_paths and not peaks_path and onset is None:
        raise CaseError("nothing to analyse: give thermogram CSV files, --peaks FILE or --onset "
                        "'T degC'", key="kinetics")
    if energy is not None and thermogram_paths:
        raise CaseError("--energy is for peak tables or a single onset; thermograms give their "
                        "own energy", key="--energy")
    if not thermogram_paths:
        # Options that act on thermograms only: silently ignoring them would hide a mistake.
        for option, given in (("--sample-mass", sample_masses), ("--heating-rate", heating_rates),
                              ("--range", integration_range), ("--exo-up/--exo-down", exo_up)):
            if given not in (None, (), []):
                raise CaseError("applies to thermogram files only (a peak table or an onset has "
                                "no curve); leave it out or give the thermograms", key=option)
    if not 0.5 <= confidence_level < 1:
        raise CaseError(f"{confidence_level} must lie between 0.5 and 1", key="--confidence")
    q_det = parse_quantity(detection_limit, "specific_power", "--detection-limit")
    cp = parse_quantity(specific_heat, "specific_heat", "--specific-heat")
    given_onset = parse_quantity(onset, "temperature", "--onset") if onset is not None else None
    given_energy = parse_quantity(energy, "energy", "--energy") if energy is not None else None
    window = None
    if integration_range is not None:
        low, high = integration_range
        if not high > low:
            raise CaseError(f"{low} {high}: the upper limit must exceed the lower", key="--range")
        window = (low + ZERO_CELSIUS, high + ZERO_CELSIUS)

    settings = {
        "confidence_level": confidence_level, "detection_limit": q_det, "specific_heat": cp,
        "baseline": baseline, "model_choice": model,
    }
    warnings = []
    runs = []
    analyses = []
    if thermogram_paths:
        source = "thermograms"
        masses = _per_file(sample_masses, len(thermogram_paths), "--sample-mass", "mass")
        rates = _per_file(heating_rates, len(thermogram_paths), "--heating-rate", "heating_rate")
        for path, mass, rate in zip(thermogram_paths, masses, rates):
            thermogram = read_thermogram(path, sample_mass=mass, heating_rate=rate)
            analysis, run = _analyse_thermogram(thermogram, exo_up, baseline, window, q_det,
                                                warnings)
            analyses.append(analysis)
            runs.append(run)
        files = list(thermogram_paths)
    elif peaks_path:
        source = "peaks"
        table = read_peak_table(peaks_path)
        files = [peaks_path]
        for k, label in enumerate(table.labels):
            runs.append(RunSummary(
                label=label, heating_rate=float(table.heating_rates[k]),
                peak_temperature=float(table.peak_temperatures[k]),
                onset_temperature=(float(table.onset_temperatures[k])
                                   if table.onset_temperatures is not None else None),
                energy=float(table.energies[k]) if table.energies is not None else None,
            ))
        if table.energies is not None and given_energy is not None:
            raise CaseError("the peak table has an energy column; leave out --energy",
                            key="--energy")
    else:
        source = "onset"
        files = []

    result = KineticsResult(source=source, files=files, runs=runs, settings=settings,
                            analyses=analyses, warnings=warnings)
    if runs:
        _kinetics_from_runs(result, confidence_level, model)
    else:
        for name in ("kissinger", "friedman", "ozawa"):
            result.unavailable[name] = "no DSC runs given (single onset only)"

    _energy(result, given_energy)
    _onset_and_td24(result, given_onset, q_det, cp)
    _model_summary(result)
    return result


def _analyse_thermogram(thermogram, exo_up, baseline, window, q_det, warnings):
    from screen.errors import ModelDomainError
    from screen.models import dsc

    name = Path(thermogram.path).name
    notes = list(thermogram.notes)
    if exo_up is not None:
        sign = 1.0 if exo_up else -1.0
        direction = "up" if exo_up else "down"
        if thermogram.exotherm_direction and thermogram.exotherm_direction != direction:
            raise DataFileError(
                f"the file says exotherm {thermogram.exotherm_direction} but the command line "
                f"says {direction}; remove one of them",
                path=thermogram.path,
            )
        notes.append(f"exotherm {direction} (command line)")
    elif thermogram.exotherm_direction:
        direction = thermogram.exotherm_direction
        sign = 1.0 if direction == "up" else -1.0
        notes.append(f"exotherm {direction} (from the file)")
    else:
        try:
            sign, minor = dsc.exotherm_sign(thermogram.time, thermogram.heat_flow)
        except ModelDomainError as exc:
            raise DataFileError(exc.message, path=thermogram.path) from None
        direction = "up" if sign > 0 else "down"
        if minor > AMBIGUOUS_DIRECTION:
            raise DataFileError(
                f"the exotherm direction is ambiguous (events of both signs, minor/major area "
                f"{minor:.2f}); give --exo-up or --exo-down",
                path=thermogram.path,
            )
        notes.append(f"exotherm {direction} (detected from the integral sign)")
    try:
        analysis = dsc.analyse_peak(thermogram.time, thermogram.temperature,
                                    sign * thermogram.heat_flow, baseline=baseline,
                                    temperature_window=window, detection_limit=q_det)
    except ModelDomainError as exc:
        raise DataFileError(f"{exc.message}", path=thermogram.path) from None
    if analysis.truncated_start or analysis.truncated_end:
        where = "start" if analysis.truncated_start else "end"
        warnings.append(
            f"{name}: the exotherm has not returned to the baseline at the {where} of the record; "
            "energy and conversion are underestimated, extend the temperature range"
        )
    if thermogram.heating_rate is not None:
        mismatch = abs(analysis.heating_rate / thermogram.heating_rate - 1.0)
        if mismatch > HEATING_RATE_MISMATCH:
            warnings.append(
                f"{name}: measured heating rate {analysis.heating_rate * 60:.3g} K/min differs by "
                f"{mismatch * 100:.0f} % from the nominal {thermogram.heating_rate * 60:.3g} K/min; "
                "the measured rate is used"
            )
    run = RunSummary(
        label=name, heating_rate=analysis.heating_rate,
        peak_temperature=analysis.peak_temperature,
        onset_temperature=analysis.onset_temperature,
        detection_temperature=analysis.detection_temperature,
        energy=analysis.energy, exotherm_direction=direction, baseline=baseline, notes=notes,
    )
    return analysis, run


def _kinetics_from_runs(result, confidence_level, model_choice):
    import numpy as np

    from screen.errors import ModelDomainError
    from screen.models import dsc

    beta = np.array([r.heating_rate for r in result.runs])
    tp = np.array([r.peak_temperature for r in result.runs])
    distinct = np.unique(np.round(beta * 60, 6)).size
    if distinct < 3:
        result.warnings.append(
            f"only {distinct} different heating rate(s): ASTM E698 and the ICTAC recommendations "
            "ask for at least three; the activation energy is poorly defined"
            + (" and has no confidence interval" if len(beta) < 3 else "")
        )
    if distinct >= 2 and beta.max() / beta.min() < HEATING_RATE_SPAN:
        result.warnings.append(
            f"heating rates span only a factor {beta.max() / beta.min():.1f} (design minimum "
            f"{HEATING_RATE_SPAN:.0f}); the Kissinger slope is poorly defined"
        )
    if np.any(beta * 60 > 20.0):
        result.warnings.append(
            "heating rates above 20 K/min: thermal lag in the sample shifts peak temperatures "
            "(design limit)"
        )
    if distinct < 2:
        for name in ("kissinger", "friedman", "ozawa"):
            result.unavailable[name] = "needs at least two different heating rates"
    else:
        result.kissinger = dsc.kissinger(beta, tp, confidence_level)
        result.astm_e698 = dsc.astm_e698(beta, tp, confidence_level)
        if result.kissinger.r_squared < 0.98 and len(beta) >= 3:
            result.warnings.append(
                f"Kissinger plot not straight (R^2 = {result.kissinger.r_squared:.3f} < 0.98, "
                "design): several processes or inconsistent runs"
            )
    if result.source != "thermograms":
        for name in ("friedman", "ozawa"):
            result.unavailable.setdefault(name, "needs thermograms (a peak table has no curves)")
        result.unavailable["model"] = (
            "needs thermograms; the Kissinger parameters (first order) are used for the case file"
        )
        return
    if distinct >= 2:
        levels = np.array(CONVERSION_LEVELS)
        temps, rates = dsc.isoconversional_points(result.analyses, levels)
        result.friedman = dsc.friedman(levels, temps, rates, confidence_level)
        try:
            result.ozawa = dsc.flynn_wall_ozawa(levels, temps, beta, confidence_level)
        except ModelDomainError as exc:
            result.unavailable["ozawa"] = exc.message
        spread = result.friedman.spread()
        if spread > dsc.SPREAD_THRESHOLD:
            low, high = dsc.SPREAD_CONVERSION_RANGE
            result.warnings.append(
                f"Friedman activation energy varies by {spread * 100:.0f} % over conversion "
                f"{low}-{high} (threshold {dsc.SPREAD_THRESHOLD * 100:.0f} %, design): a complex or "
                "multi-step mechanism; a single-model extrapolation is unreliable"
            )
    if len(result.runs) < 2 or distinct < 2:
        result.unavailable["model"] = (
            "a single heating rate cannot separate activation energy and reaction model (ICTAC "
            "recommendations); only the crude single-onset estimate is given"
        )
        return
    result.model = dsc.fit_reaction_model(result.analyses, beta, choice=model_choice,
                                          confidence_level=confidence_level)
    if result.model.rms_temperature_residual > 2.0:
        result.warnings.append(
            f"the fitted {result.model.name} model reproduces the measured curves only within "
            f"{result.model.rms_temperature_residual:.1f} K RMS (design limit 2 K)"
        )
    if result.kissinger is not None:
        deviates = result.model.name != "nth-order" or abs(result.model.order - 1.0) > 0.2
        if deviates:
            result.warnings.append(
                "the Kissinger pre-exponential factor assumes first order, which the curves do "
                f"not follow ({result.model.name}, n = {result.model.order:.2f}); the fitted "
                "model is used for the case file"
            )


def _energy(result, given_energy):
    import numpy as np

    values = [r.energy for r in result.runs if r.energy is not None]
    if values:
        arr = np.array(values)
        result.energy = {
            "mean": float(arr.mean()),
            "std": float(arr.std(ddof=1)) if arr.size > 1 else None,
            "values": [float(v) for v in arr],
            "source": "integrated thermograms" if result.source == "thermograms" else "peak table",
        }
        if arr.size > 1 and arr.std(ddof=1) > ENERGY_SPREAD_WARNING * arr.mean():
            result.warnings.append(
                f"decomposition energy varies by {arr.std(ddof=1) / arr.mean() * 100:.0f} % "
                f"between runs (design limit {ENERGY_SPREAD_WARNING * 100:.0f} %): check sample "
                "masses, baselines and crucible tightness"
            )
    elif given_energy is not None:
        result.energy = {"mean": given_energy, "std": None, "values": [given_energy],
                         "source": "--energy"}
    else:
        result.unavailable["energy"] = (
            "no energy in the input; give --energy '650 J/g' or an energy_J_per_g column"
        )
    if result.energy is not None and result.energy["mean"] > ENERGY_EXPLOSIVE_SCREENING:
        result.warnings.append(
            f"decomposition energy {result.energy['mean'] / 1e3:.4g} J/g exceeds 500 J/g: "
            "potentially explosive; the UN Manual of Tests and Criteria (appendix 6) screens for "
            "explosive properties above 500 J/g (from memory; 500-800 J/g is common practice)"
        )


def _onset_and_td24(result, given_onset, q_det, cp):
    from screen.errors import ModelDomainError
    from screen.models import dsc

    candidates = []
    for r in result.runs:
        if r.detection_temperature is not None:
            candidates.append((r.detection_temperature,
                               f"first exceedance of {q_det:g} W/kg, {r.heating_rate * 60:.3g} K/min"))
        if r.onset_temperature is not None:
            candidates.append((r.onset_temperature,
                               f"extrapolated onset, {r.heating_rate * 60:.3g} K/min"))
    if given_onset is not None:
        candidates.append((given_onset, "onset given with --onset"))
    extrapolated = [(r.onset_temperature, r.heating_rate) for r in result.runs
                    if r.onset_temperature is not None]
    if extrapolated:
        t_on, rate = min(extrapolated)
        method = (f"DSC extrapolated onset (tangent at the inflection point on the baseline), "
                  f"lowest of {len(extrapolated)} run(s), {rate * 60:.3g} K/min")
        if result.source == "peaks":
            method = f"DSC onset from the peak table, lowest of {len(extrapolated)} run(s)"
        result.onset = {"temperature": t_on, "method": method}
    elif given_onset is not None:
        result.onset = {"temperature": given_onset, "method": "DSC onset given with --onset"}

    if candidates:
        t_low, basis = min(candidates)
        try:
            td = dsc.crude_td24_from_onset(t_low, detection_limit=q_det, specific_heat=cp)
        except ModelDomainError as exc:
            result.unavailable["td24_crude"] = exc.message
        else:
            result.td24["crude"] = {
                "temperature": td, "onset_used": t_low, "onset_basis": basis,
                "assumptions": (
                    f"zero order, E = {dsc.CRUDE_ACTIVATION_ENERGY / 1e3:.0f} kJ/mol, heat release "
                    f"rate at the onset = detection limit {q_det:g} W/kg, c'p = {cp / 1e3:g} kJ/(kg K); "
                    "after Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory)"
                ),
                "label": "crude screening estimate",
                "onset_minus_100K": t_low - 100.0,
            }
    else:
        result.unavailable["td24_crude"] = "no onset available; give --onset or onset data"

    params = _extrapolation_parameters(result)
    if params is None:
        result.unavailable.setdefault("td24_kinetics", "needs measured kinetics (Kissinger or a "
                                      "fitted model) and a decomposition energy")
        return
    energy, ln_a, f_max, basis = params
    q_total = result.energy["mean"]
    ln_q_inf = math.log(q_total) + ln_a + math.log(f_max)
    try:
        td = dsc.zero_order_td(ln_q_inf, energy, cp)
    except ModelDomainError as exc:
        result.unavailable["td24_kinetics"] = exc.message
        result.warnings.append(f"TD24 from the kinetics could not be found: {exc.message}")
        return
    result.td24["kinetics"] = {
        "temperature": td, "basis": basis,
        "assumptions": (
            "Townsend-Tou zero-order TMRad = c'p R T^2/(q(T) E) with q(T) = Q A f_max "
            f"exp(-E/RT), f_max = {f_max:.3g} the largest value of f(alpha) (a conservative bound "
            f"for the fitted model), c'p = {cp / 1e3:g} kJ/(kg K)"
        ),
    }
    # Only temperatures measured in the runs count (an --onset typed by the user does not).
    lowest = _lowest_measured_temperature(result)
    what = ("onset" if any(r.detection_temperature is not None or r.onset_temperature is not None
                           for r in result.runs) else "peak temperature")
    if lowest is not None and td < lowest - EXTRAPOLATION_WARNING:
        result.warnings.append(
            f"TD24 from the kinetics ({td - ZERO_CELSIUS:.0f} degC) lies "
            f"{lowest - td:.0f} K below the lowest measured {what} "
            f"({lowest - ZERO_CELSIUS:.0f} degC; design limit {EXTRAPOLATION_WARNING:.0f} K): "
            "far extrapolation, confirm with isothermal or adiabatic tests"
        )
    if result.model is not None and result.model.name == "autocatalytic":
        result.warnings.append(
            "autocatalytic decomposition: a zero-order or nth-order TMRad from the initial rate is "
            "not conservative; TD24 here uses the maximum of f(alpha), and the case-file engine "
            "must integrate the autocatalytic model"
        )


def _extrapolation_parameters(result):
    """(E, ln A, f_max, basis) for the TD24 from kinetics, or None."""
    from screen.models import dsc

    if result.energy is None:
        return None
    if result.model is not None:
        m = result.model
        return (m.activation_energy, m.ln_pre_exponential_factor,
                dsc.maximum_of_reaction_model(m.order, m.autocatalytic_order),
                f"fitted {m.name} model")
    if result.kissinger is not None:
        k = result.kissinger
        return (k.activation_energy, k.ln_pre_exponential_factor, 1.0,
                "Kissinger parameters (first order)")
    return None


def _model_summary(result):
    """The model written to the case file, with its basis, or None."""
    from screen.models import dsc

    if result.model is not None:
        m = result.model
        result.model_summary = {
            "name": m.name, "activation_energy": m.activation_energy,
            "ln_pre_exponential_factor": m.ln_pre_exponential_factor, "order": m.order,
            "autocatalytic_order": m.autocatalytic_order if m.name == "autocatalytic" else None,
            "initial_conversion": m.initial_conversion if m.name == "autocatalytic" else None,
            "basis": "multivariate regression of ln(d alpha/dt) on all thermograms",
            "explanation": list(m.explanation),
        }
    elif result.kissinger is not None:
        k = result.kissinger
        result.model_summary = {
            "name": "nth-order", "activation_energy": k.activation_energy,
            "ln_pre_exponential_factor": k.ln_pre_exponential_factor, "order": 1.0,
            "autocatalytic_order": None, "initial_conversion": None,
            "basis": "Kissinger parameters",
            "explanation": ["first order assumed: the Kissinger pre-exponential factor is derived "
                            "for first-order kinetics and peak temperatures carry no shape "
                            "information"],
        }
    elif "crude" in result.td24 and result.energy is not None:
        crude = result.td24["crude"]
        e = dsc.CRUDE_ACTIVATION_ENERGY
        ln_a = (math.log(result.settings["detection_limit"]) - math.log(result.energy["mean"])
                + e / (GAS_CONSTANT * crude["onset_used"]))
        result.model_summary = {
            "name": "zero-order", "activation_energy": e, "ln_pre_exponential_factor": ln_a,
            "order": 0.0, "autocatalytic_order": None, "initial_conversion": None,
            "basis": "worst-case single-onset assumptions",
            "explanation": [
                "zero order with E = 50 kJ/mol and A chosen so that the heat release rate at the "
                "onset equals the detection limit (crude worst-case assumptions, after Keller et "
                "al. 1997, from memory); no kinetic data were given"
            ],
        }
        result.warnings.append(
            "no kinetic data: the case-file section carries the crude worst-case zero-order "
            "model; replace it by measured kinetics"
        )


# --------------------------------------------------------------------------------------------
# Output: dictionary / JSON
# --------------------------------------------------------------------------------------------


def _f(value, scale=1.0, digits=None):
    """Finite float (scaled) or None for a missing value; non-finite values raise."""
    if value is None:
        return None
    value = float(value) / scale
    if not math.isfinite(value):
        from screen.errors import SolverError

        raise SolverError("a result is not finite; the data cannot be analysed as given")
    return round(value, digits) if digits is not None else value


def _c(temperature):
    return None if temperature is None else _f(temperature - ZERO_CELSIUS)


def _interval(pair, scale=1.0):
    return None if pair is None else [_f(pair[0], scale), _f(pair[1], scale)]


def _isoconversional_dict(iso, name, result):
    if iso is None:
        return {"available": False, "reason": result.unavailable.get(name, "not computed")}
    from screen.models import dsc

    return {
        "available": True,
        "method": iso.method,
        "conversion": [_f(a) for a in iso.conversion],
        "activation_energy_kJ_per_mol": [_f(e, 1e3) for e in iso.activation_energy],
        "activation_energy_ci_low_kJ_per_mol": (None if iso.lower is None
                                                else [_f(e, 1e3) for e in iso.lower]),
        "activation_energy_ci_high_kJ_per_mol": (None if iso.upper is None
                                                 else [_f(e, 1e3) for e in iso.upper]),
        "confidence_level": iso.confidence_level,
        "r_squared": [_f(r) for r in iso.r_squared],
        "mean_activation_energy_kJ_per_mol": _f(iso.mean(), 1e3),
        "spread_percent": _f(iso.spread() * 100),
        "spread_conversion_range": list(dsc.SPREAD_CONVERSION_RANGE),
        "spread_threshold_percent": dsc.SPREAD_THRESHOLD * 100,
    }


def result_to_dict(result):
    """The analysis as a JSON-ready dictionary (SI-derived units in the key names).

    Parameters
    ----------
    result : KineticsResult

    Returns
    -------
    dict
        Members ``input``, ``runs``, ``kissinger``, ``friedman``, ``ozawa``, ``energy``,
        ``model``, ``onset``, ``td24``, ``warnings``, ``cautions``. Missing parts are objects
        with ``"available": false`` and a ``reason``.
    """
    out = {
        "tool": "runaway-screen kinetics",
        "input": {"source": result.source, "files": list(result.files),
                  "confidence_level": result.settings["confidence_level"],
                  "baseline": result.settings["baseline"],
                  "detection_limit_W_per_kg": result.settings["detection_limit"],
                  "specific_heat_kJ_per_kg_K": result.settings["specific_heat"] / 1e3},
        "runs": [
            {"label": r.label, "heating_rate_K_per_min": _f(r.heating_rate * 60),
             "peak_temperature_degC": _c(r.peak_temperature),
             "onset_temperature_degC": _c(r.onset_temperature),
             "detection_temperature_degC": _c(r.detection_temperature),
             "energy_J_per_g": _f(r.energy, 1e3), "exotherm_direction": r.exotherm_direction,
             "baseline": r.baseline, "notes": list(r.notes)}
            for r in result.runs
        ],
    }
    k = result.kissinger
    if k is None:
        out["kissinger"] = {"available": False,
                            "reason": result.unavailable.get("kissinger", "not computed")}
    else:
        a = result.astm_e698
        out["kissinger"] = {
            "available": True,
            "method": "Kissinger: ln(beta/Tp^2) against 1/Tp, slope -E/R (Kissinger 1957; ASTM E2890)",
            "activation_energy_kJ_per_mol": _f(k.activation_energy, 1e3),
            "activation_energy_ci_kJ_per_mol": _interval(k.activation_energy_interval, 1e3),
            "activation_energy_standard_error_kJ_per_mol": _f(k.activation_energy_standard_error, 1e3),
            "pre_exponential_factor_per_s": _f(k.pre_exponential_factor),
            "ln_pre_exponential_factor": _f(k.ln_pre_exponential_factor),
            "ln_pre_exponential_factor_ci": _interval(k.ln_pre_exponential_factor_interval),
            "pre_exponential_factor_ci_per_s": (
                None if k.ln_pre_exponential_factor_interval is None
                else [_f(math.exp(v)) for v in k.ln_pre_exponential_factor_interval]),
            "pre_exponential_factor_assumption": "first-order kinetics (Kissinger relation)",
            "confidence_level": k.fit.confidence_level,
            "r_squared": _f(k.r_squared),
            "number_of_runs": k.number_of_runs,
            "astm_e698": {
                "method": "log10(beta) against 1/Tp, E = -2.19 R slope refined with D(E/RT) "
                          "from the exact temperature integral until stationary (ASTM E698 "
                          "procedure as reconstructed from memory)",
                "first_approximation_kJ_per_mol": _f(a.first_approximation, 1e3),
                "activation_energy_kJ_per_mol": _f(a.activation_energy, 1e3),
                "activation_energy_ci_kJ_per_mol": _interval(a.activation_energy_interval, 1e3),
                "iterations": a.iterations,
                "pre_exponential_factor_per_s": _f(a.pre_exponential_factor),
            },
        }
    out["friedman"] = _isoconversional_dict(result.friedman, "friedman", result)
    out["ozawa"] = _isoconversional_dict(result.ozawa, "ozawa", result)
    if result.energy is None:
        out["energy"] = {"available": False, "reason": result.unavailable.get("energy")}
    else:
        out["energy"] = {
            "available": True,
            "mean_J_per_g": _f(result.energy["mean"], 1e3),
            "std_J_per_g": _f(result.energy["std"], 1e3),
            "per_run_J_per_g": [_f(v, 1e3) for v in result.energy["values"]],
            "number_of_runs": len(result.energy["values"]),
            "source": result.energy["source"],
        }
    ms = result.model_summary
    if ms is None:
        out["model"] = {"available": False, "reason": result.unavailable.get(
            "model", "needs kinetic data and an energy")}
    else:
        model = {
            "available": True, "name": ms["name"],
            "activation_energy_kJ_per_mol": _f(ms["activation_energy"], 1e3),
            "pre_exponential_factor_per_s": _f(math.exp(ms["ln_pre_exponential_factor"])),
            "ln_pre_exponential_factor": _f(ms["ln_pre_exponential_factor"]),
            "order": _f(ms["order"]),
            "autocatalytic_order": _f(ms["autocatalytic_order"]),
            "initial_conversion": _f(ms["initial_conversion"]),
            "basis": ms["basis"], "explanation": ms["explanation"],
        }
        if result.model is not None:
            m = result.model
            model["activation_energy_ci_kJ_per_mol"] = _interval(m.activation_energy_interval, 1e3)
            model["standard_errors"] = {key: _f(v) for key, v in m.standard_errors.items()}
            model["rms_temperature_residual_K"] = _f(m.rms_temperature_residual)
            model["alternatives"] = {
                name: {key: _f(v / 1e3 if key == "activation_energy" else v)
                       for key, v in values.items()}
                for name, values in m.alternatives.items()
            }
        out["model"] = model
    out["onset"] = (None if result.onset is None else
                    {"temperature_degC": _c(result.onset["temperature"]),
                     "method": result.onset["method"]})
    td = {}
    for key, value in result.td24.items():
        entry = {"temperature_degC": _c(value["temperature"]), "assumptions": value["assumptions"]}
        if key == "crude":
            entry.update({"label": value["label"], "onset_used_degC": _c(value["onset_used"]),
                          "onset_basis": value["onset_basis"],
                          "onset_minus_100K_degC_information_only": _c(value["onset_minus_100K"])})
        else:
            entry["basis"] = value["basis"]
        td[key] = entry
    for key in ("kinetics", "crude"):
        if key not in td:
            td[key] = {"available": False,
                       "reason": result.unavailable.get(f"td24_{key}", "not computed")}
    out["td24"] = td
    out["warnings"] = list(result.warnings)
    out["cautions"] = list(result.cautions)
    return out


# --------------------------------------------------------------------------------------------
# Output: text
# --------------------------------------------------------------------------------------------


def _fmt(value, spec):
    if value is None:
        width = "".join(ch for ch in spec.split(".")[0] if ch.isdigit())
        return format("n/a", f">{width}") if width else "n/a"
    return format(value, spec)


def format_summary(result):
    """Human-readable multi-line summary of a :class:`KineticsResult`.

    Parameters
    ----------
    result : KineticsResult

    Returns
    -------
    str
    """
    d = result_to_dict(result)
    lines = ["DSC decomposition kinetics (screening aid)", ""]
    if d["runs"]:
        lines.append(f"{'run':<28} {'K/min':>7} {'peak °C':>8} {'onset °C':>9} "
                     f"{'>q_det °C':>9} {'J/g':>7}")
        for r in d["runs"]:
            lines.append(
                f"{r['label'][:28]:<28} {_fmt(r['heating_rate_K_per_min'], '7.3g')} "
                f"{_fmt(r['peak_temperature_degC'], '8.1f')} "
                f"{_fmt(r['onset_temperature_degC'], '9.1f')} "
                f"{_fmt(r['detection_temperature_degC'], '9.1f')} "
                f"{_fmt(r['energy_J_per_g'], '7.0f')}"
            )
        lines.append("")
    k = d["kissinger"]
    cl = int(round(result.settings["confidence_level"] * 100))
    if k["available"]:
        ci = k["activation_energy_ci_kJ_per_mol"]
        ci_text = f"{cl} % CI {ci[0]:.1f} .. {ci[1]:.1f}" if ci else "no CI (two runs)"
        lines.append(f"Kissinger ({k['number_of_runs']} runs, R^2 {k['r_squared']:.4f})")
        lines.append(f"  E = {k['activation_energy_kJ_per_mol']:.1f} kJ/mol   {ci_text}")
        lci = k["ln_pre_exponential_factor_ci"]
        lci_text = f"   ln A {cl} % CI {lci[0]:.2f} .. {lci[1]:.2f}" if lci else ""
        lines.append(f"  A = {k['pre_exponential_factor_per_s']:.3e} 1/s (first order){lci_text}")
        a = k["astm_e698"]
        lines.append(f"  ASTM E698 form (log beta vs 1/Tp, refined in {a['iterations']} steps): "
                     f"E = {a['activation_energy_kJ_per_mol']:.1f} kJ/mol "
                     f"(first approximation {a['first_approximation_kJ_per_mol']:.1f})")
    else:
        lines.append(f"Kissinger: not available ({k['reason']})")
    for key, title in (("friedman", "Friedman"), ("ozawa", "Flynn-Wall-Ozawa")):
        iso = d[key]
        if not iso["available"]:
            lines.append(f"{title}: not available ({iso['reason']})")
            continue
        picks = [i for i, a in enumerate(iso["conversion"]) if round(a * 100) % 20 == 10]
        values = ", ".join(f"{iso['conversion'][i]:.1f}: {iso['activation_energy_kJ_per_mol'][i]:.1f}"
                           for i in picks)
        lines.append(f"{title} Ea(alpha) kJ/mol  {values}")
        lines.append(f"  mean {iso['mean_activation_energy_kJ_per_mol']:.1f} kJ/mol, spread "
                     f"{iso['spread_percent']:.0f} % over alpha 0.1-0.9 (threshold "
                     f"{iso['spread_threshold_percent']:.0f} %)")
    e = d["energy"]
    if e["available"]:
        std = f" ± {e['std_J_per_g']:.0f} (1 s.d.)" if e["std_J_per_g"] is not None else ""
        lines.append(f"Energy: {e['mean_J_per_g']:.0f}{std} J/g over {e['number_of_runs']} "
                     f"run(s) ({e['source']})")
    else:
        lines.append(f"Energy: not available ({e['reason']})")
    m = d["model"]
    if m["available"]:
        extra = ""
        if m["name"] == "autocatalytic":
            extra = f", m = {m['autocatalytic_order']:.2f}, alpha0 = {m['initial_conversion']:.2g}"
        lines.append(f"Model for extrapolation: {m['name']}, E = "
                     f"{m['activation_energy_kJ_per_mol']:.1f} kJ/mol, A = "
                     f"{m['pre_exponential_factor_per_s']:.3e} 1/s, n = {m['order']:.2f}{extra}")
        for text in m["explanation"]:
            lines.append(f"  {text}")
        if "rms_temperature_residual_K" in m:
            lines.append(f"  fitted curves reproduce the measured ones within "
                         f"{m['rms_temperature_residual_K']:.2f} K RMS (alpha 0.1-0.9)")
    else:
        lines.append(f"Model: not available ({m['reason']})")
    if d["onset"]:
        lines.append(f"Onset: {d['onset']['temperature_degC']:.1f} degC ({d['onset']['method']})")
    td = d["td24"]
    if td["kinetics"].get("temperature_degC") is not None:
        lines.append(f"TD24 from kinetics: {td['kinetics']['temperature_degC']:.0f} degC "
                     f"({td['kinetics']['basis']}; zero-order Townsend-Tou with max f(alpha))")
    else:
        lines.append(f"TD24 from kinetics: not available ({td['kinetics']['reason']})")
    if td["crude"].get("temperature_degC") is not None:
        c = td["crude"]
        lines.append(f"TD24 crude screening estimate: {c['temperature_degC']:.0f} degC from onset "
                     f"{c['onset_used_degC']:.1f} degC ({c['onset_basis']})")
        lines.append(f"  assumptions: {c['assumptions']}")
        lines.append(f"  for information only: onset - 100 K = "
                     f"{c['onset_minus_100K_degC_information_only']:.0f} degC (common practice, "
                     "no published basis; not a safety limit)")
    else:
        lines.append(f"TD24 crude screening estimate: not available ({td['crude']['reason']})")
    if d["warnings"]:
        lines.append("")
        lines.append("Warnings")
        lines.extend(f"  ! {w}" for w in d["warnings"])
    lines.append("")
    lines.append("Cautions")
    lines.extend(f"  - {c}" for c in d["cautions"])
    return "\n".join(lines)


# --------------------------------------------------------------------------------------------
# Output: case-file section
# --------------------------------------------------------------------------------------------


def _toml_string(text):
    return json.dumps(str(text), ensure_ascii=False)


def decomposition_toml(result):
    """A ``[decomposition]`` case-file section from the analysis.

    Parameters
    ----------
    result : KineticsResult

    Returns
    -------
    str
        TOML text with quantities as ``"value unit"`` strings.

    Raises
    ------
    screen.errors.CaseError
        When no model or no energy is available (a section without them would be unusable).
    """
    import tomllib

    ms = result.model_summary
    if ms is None:
        raise CaseError(
            "no model for the case file: " + result.unavailable.get(
                "model", "give thermograms, a peak table or --onset with --energy"),
            key="--output",
        )
    if result.energy is None:
        raise CaseError("the case file needs the decomposition energy: give --energy '650 J/g' "
                        "or an energy_J_per_g column", key="--output")
    lines = [
        "# Written by `runaway-screen kinetics` (screening aid; review before use).",
        f"# Source: {result.source}: " + (", ".join(Path(f).name for f in result.files) or "--onset"),
        f"# Model basis: {ms['basis']}.",
    ]
    if result.energy.get("std") is not None:
        lines.append(f"# Energy: mean of {len(result.energy['values'])} runs, standard deviation "
                     f"{result.energy['std'] / 1e3:.0f} J/g.")
    if result.kissinger is not None and result.kissinger.activation_energy_interval is not None:
        lo, hi = result.kissinger.activation_energy_interval
        lines.append(f"# Kissinger E {result.kissinger.activation_energy / 1e3:.1f} kJ/mol, "
                     f"{int(round(result.settings['confidence_level'] * 100))} % CI "
                     f"{lo / 1e3:.1f} .. {hi / 1e3:.1f} kJ/mol.")
    for w in result.warnings:
        lines.append("# Warning: " + " ".join(w.split()))
    lines.append("[decomposition]")
    energy_text = "%.4g kJ/kg" % (result.energy["mean"] / 1e3)
    lines.append(f"energy = {_toml_string(energy_text)}")
    lines.append(f"model = {_toml_string(ms['name'])}")
    ea_text = "%.4g kJ/mol" % (ms["activation_energy"] / 1e3)
    lines.append(f"activation_energy = {_toml_string(ea_text)}")
    if not ms["ln_pre_exponential_factor"] < 700.0:
        raise CaseError(f"ln A = {ms['ln_pre_exponential_factor']:.4g} is beyond the range of "
                        f"floating-point numbers; check the DSC data", key="--output")
    a_text = "%.5g 1/s" % math.exp(ms["ln_pre_exponential_factor"])
    lines.append(f"pre_exponential_factor = {_toml_string(a_text)}")
    lines.append(f"order = {ms['order']:.4g}")
    if ms["name"] == "autocatalytic":
        lines.append(f"autocatalytic_order = {ms['autocatalytic_order']:.4g}")
        lines.append(f"initial_conversion = {ms['initial_conversion']:.4g}")
    lowest = _lowest_measured_temperature(result)
    if lowest is not None:
        # Lets the case engine warn when its TD24 is extrapolated far below the data.
        lowest_text = "%.1f degC" % (lowest - ZERO_CELSIUS)
        lines.append(f"lowest_measured_temperature = {_toml_string(lowest_text)}")
    if result.onset is not None:
        onset_text = "%.1f degC" % (result.onset["temperature"] - ZERO_CELSIUS)
        lines.append(f"onset_temperature = {_toml_string(onset_text)}")
        lines.append(f"onset_method = {_toml_string(result.onset['method'])}")
    text = "\n".join(lines) + "\n"
    tomllib.loads(text)  # validate before anything is written
    return text


def _lowest_measured_temperature(result):
    """Lowest temperature with measured heat release [K]: first exceedance of the detection
    limit or extrapolated onset of any run; without them the lowest peak temperature."""
    measured = [t for r in result.runs for t in (r.detection_temperature, r.onset_temperature)
                if t is not None]
    if not measured:
        measured = [r.peak_temperature for r in result.runs]
    return min(measured) if measured else None


def _check_toml_target(path, force):
    """Raise OutputError if ``path`` cannot be written (see :func:`write_toml`)."""
    from screen.fileio import check_writable

    check_writable(path, force)


def write_toml(text, path, force=False):
    """Write text atomically; refuse to overwrite an existing file unless ``force``.

    Parameters
    ----------
    text : str
        File content.
    path : str or pathlib.Path
        Target file.
    force : bool
        Overwrite an existing file.

    Raises
    ------
    screen.errors.OutputError
        If the file exists without ``force`` or cannot be written.
    """
    from screen.fileio import write_atomic

    write_atomic(path, text.encode("utf-8"), force=force)


# --------------------------------------------------------------------------------------------
# Figures
# --------------------------------------------------------------------------------------------


def figures(result):
    """Matplotlib figures of the analysis (no pyplot state; Agg-compatible).

    Parameters
    ----------
    result : KineticsResult

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"kissinger"`` (ln(beta/Tp^2) against 1000/Tp with the fit), ``"activation_energy"``
        (Friedman and Flynn-Wall-Ozawa Ea against conversion, Kissinger E), ``"fit"`` (measured
        and fitted d alpha/dt against temperature) and ``"baselines"`` (signals with baselines
        and onsets); only those the data allow.
    """
    import numpy as np
    from matplotlib.figure import Figure

    from screen.models import dsc

    out = {}
    k = result.kissinger
    if k is not None:
        fig = Figure(figsize=(6.0, 4.2))
        ax = fig.add_subplot()
        x = 1e3 / k.peak_temperatures
        y = np.log(k.heating_rates / k.peak_temperatures**2)
        ax.plot(x, y, "o", label="runs")
        xs = np.linspace(x.min(), x.max(), 50)
        ax.plot(xs, k.fit.intercept + k.fit.slope * xs / 1e3, "-",
                label=f"fit: E = {k.activation_energy / 1e3:.1f} kJ/mol")
        ax.set_xlabel("1000 / Tp  [1/K]")
        ax.set_ylabel("ln(beta / Tp²)  [beta in K/s, Tp in K]")
        ax.set_title("Kissinger plot")
        ax.legend()
        fig.tight_layout()
        out["kissinger"] = fig
    if result.friedman is not None:
        fig = Figure(figsize=(6.0, 4.2))
        ax = fig.add_subplot()
        f = result.friedman
        ax.plot(f.conversion, f.activation_energy / 1e3, "o-", label="Friedman")
        if f.lower is not None:
            ax.fill_between(f.conversion, f.lower / 1e3, f.upper / 1e3, alpha=0.2,
                            label=f"Friedman {int(round(f.confidence_level * 100))} % CI")
        if result.ozawa is not None:
            ax.plot(result.ozawa.conversion, result.ozawa.activation_energy / 1e3, "s--",
                    label="Flynn-Wall-Ozawa")
        if k is not None:
            ax.axhline(k.activation_energy / 1e3, color="k", lw=1, ls=":", label="Kissinger")
        low, high = dsc.SPREAD_CONVERSION_RANGE
        ax.axvspan(low, high, color="0.9", zorder=0)
        ax.set_xlabel("conversion alpha  [-]")
        ax.set_ylabel("activation energy  [kJ/mol]")
        ax.set_title("Activation energy against conversion")
        ax.legend()
        fig.tight_layout()
        out["activation_energy"] = fig
    if result.model is not None and result.analyses:
        fig = Figure(figsize=(6.0, 4.2))
        ax = fig.add_subplot()
        m = result.model
        for run, a in zip(result.runs, result.analyses):
            sel = slice(a.start_index, a.end_index + 1)
            temp = a.temperature[sel]
            line, = ax.plot(temp - ZERO_CELSIUS, a.rate[sel] * 60, "-", lw=3, alpha=0.35,
                            label=f"{run.heating_rate * 60:.3g} K/min")
            grid = np.linspace(a.temperature[0], a.temperature[-1], 800)
            _, rate = dsc.simulate_linear_heating(grid, run.heating_rate, m.activation_energy,
                                                  m.ln_pre_exponential_factor, m.order,
                                                  m.autocatalytic_order, m.initial_conversion)
            ax.plot(grid - ZERO_CELSIUS, rate * 60, "--", color=line.get_color(), lw=1.2)
        low = min(a.temperature[a.start_index] for a in result.analyses) - ZERO_CELSIUS
        high = max(a.temperature[a.end_index] for a in result.analyses) - ZERO_CELSIUS
        ax.set_xlim(low, high)
        ax.set_xlabel("temperature  [°C]")
        ax.set_ylabel("d alpha/dt  [1/min]")
        ax.set_title(f"Measured (wide) and fitted {m.name} model (dashed)")
        ax.legend(fontsize="small")
        fig.tight_layout()
        out["fit"] = fig
    if result.analyses:
        fig = Figure(figsize=(6.0, 4.2))
        ax = fig.add_subplot()
        for run, a in zip(result.runs, result.analyses):
            line, = ax.plot(a.temperature - ZERO_CELSIUS, a.signal / 1e3, lw=1,
                            label=run.label)
            sel = slice(a.start_index, a.end_index + 1)
            ax.plot(a.temperature[sel] - ZERO_CELSIUS, a.baseline[sel] / 1e3, ":",
                    color=line.get_color())
            ax.axvline(a.onset_temperature - ZERO_CELSIUS, color=line.get_color(), lw=0.5)
        ax.set_xlabel("temperature  [°C]")
        ax.set_ylabel("heat flow, exotherm up  [W/g]")
        ax.set_title("Signals, baselines (dotted) and extrapolated onsets")
        ax.legend(fontsize="small")
        fig.tight_layout()
        out["baselines"] = fig
    return out


def write_pngs(result, directory):
    """Save :func:`figures` as PNG files in ``directory`` (created if needed).

    Parameters
    ----------
    result : KineticsResult
    directory : str or pathlib.Path

    Returns
    -------
    list of pathlib.Path
        Files written (existing figures of the same name are replaced).
    """
    import matplotlib

    matplotlib.use("Agg")
    target = Path(directory)
    try:
        target.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"cannot create the folder ({exc.strerror})", path=str(target)) from None
    written = []
    for name, fig in figures(result).items():
        path = target / f"{name}.png"
        try:
            fig.savefig(path, dpi=120)
        except OSError as exc:
            raise OutputError(f"cannot be written ({exc.strerror})", path=str(path)) from None
        written.append(path)
    return written


# --------------------------------------------------------------------------------------------
# Command
# --------------------------------------------------------------------------------------------


@click.command("kinetics")
@click.argument("thermograms", nargs=-1, metavar="[THERMOGRAM.csv]...")
@click.option("--peaks", metavar="FILE.csv",
              help="Peak table with columns heating_rate_K_per_min, peak_temperature_degC "
                   "(optional onset_temperature_degC, energy_J_per_g).")
@click.option("--sample-mass", multiple=True, metavar="'2.35 mg'",
              help="Sample mass, once for all thermograms or once per file in order.")
@click.option("--heating-rate", multiple=True, metavar="'4 K/min'",
              help="Nominal heating rate, once for all thermograms or once per file.")
@click.option("--exo-up/--exo-down", "exo_up", default=None,
              help="Direction of exotherms in the thermograms [default: from the file, else "
                   "detected from the integral sign].")
@click.option("--baseline", type=click.Choice(["linear", "sigmoidal"]), default="linear",
              show_default=True, help="Baseline between the integration limits.")
@click.option("--range", "integration_range", nargs=2, type=float, default=None,
              metavar="LOW HIGH", help="Integration limits in degC for all thermograms "
                                       "[default: found automatically].")
@click.option("--model", type=click.Choice(["auto", "nth-order", "autocatalytic"]),
              default="auto", show_default=True, help="Reaction model for extrapolation.")
@click.option("--onset", metavar="'185 degC'",
              help="A DSC onset for the crude TD24 estimate (alone when nothing else exists).")
@click.option("--energy", metavar="'650 J/g'",
              help="Decomposition energy for a peak table or a single onset.")
@click.option("--detection-limit", default="20 W/kg", show_default=True,
              help="Heat release rate taken as the DSC detection limit.")
@click.option("--specific-heat", default="1.5 kJ/(kg K)", show_default=True,
              help="c'p of the reaction mass for the TD24 estimates.")
@click.option("--confidence", type=float, default=0.95, show_default=True,
              help="Two-sided confidence level of the intervals.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("-o", "--output", metavar="FILE.toml",
              help="Write a [decomposition] case-file section (never overwrites without --force).")
@click.option("--force", is_flag=True, help="Allow -o to replace an existing file.")
@click.option("--png-dir", metavar="DIR", help="Write the figures as PNG files into DIR.")
def kinetics_command(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                     integration_range, model, onset, energy, detection_limit, specific_heat,
                     confidence, as_json, output, force, png_dir):
    """Decomposition kinetics from DSC runs: Kissinger (ASTM E698), Friedman and
    Flynn-Wall-Ozawa activation energies, decomposition energy, a fitted model for
    extrapolation and TD24 estimates.

    \b
    Examples:
      runaway-screen kinetics --peaks peaks.csv
      runaway-screen kinetics run_2K.csv run_4K.csv run_8K.csv --sample-mass '2.1 mg'
      runaway-screen kinetics run_*.csv --json -o decomposition.toml --png-dir figures
      runaway-screen kinetics --onset '185 degC' --energy '650 J/g'
    """
    from screen.cli import handle_errors

    @handle_errors
    def run():
        try:
            _run_kinetics(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                          integration_range, model, onset, energy, detection_limit,
                          specific_heat, confidence, as_json, output, force, png_dir)
        except ScreenError as exc:
            if exc.path is None and not (exc.key or "").startswith("--") and (peaks or
                                                                                thermograms):
                # A method failed on the data as a whole: name the data files.
                exc.path = peaks or ", ".join(thermograms)
            raise

    run()


def _run_kinetics(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                  integration_range, model, onset, energy, detection_limit, specific_heat,
                  confidence, as_json, output, force, png_dir):
    """Body of the kinetics command (errors are reported by kinetics_command)."""
    result = analyse_kinetics(
        thermograms, peaks, sample_mass, heating_rate, exo_up, baseline, integration_range,
        model, onset, energy, detection_limit, specific_heat, confidence,
    )
    text = decomposition_toml(result) if output else None
    if output:
        _check_toml_target(output, force)  # before any figure is written: no partial output
    written = write_pngs(result, png_dir) if png_dir else []
    if output:
        write_toml(text, output, force=force)
    if as_json:
        payload = result_to_dict(result)
        if output:
            payload["output"] = str(output)
        if written:
            payload["figures"] = [str(p) for p in written]
        click.echo(json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False))
    else:
        click.echo(format_summary(result))
        if output:
            click.echo(f"\n[decomposition] section written to {output}")
        for path in written:
            click.echo(f"figure written: {path}")
