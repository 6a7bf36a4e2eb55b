"""Decomposition kinetics from DSC runs: compose the DSC models into one :class:`KineticsResult`.

:func:`analyse_kinetics` runs the whole analysis (thermograms or a peak table, baselines,
Kissinger / isoconversional methods, fitted model, onset, TD24). Presentation lives in
:mod:`screen.report.kinetics`, the case-file fragment in :mod:`screen.io.fragments`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

from screen.cautions import CAUTIONS as _CAUTIONS
from screen.cautions import KINETICS_CAUTIONS
from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.errors import CaseError, DataFileError

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

#: The cautions of every output, then those of the DSC evaluation (screen.cautions, one text).
CAUTIONS = _CAUTIONS + KINETICS_CAUTIONS


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
    from screen.io.thermograms import parse_quantity

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
        Two-sided confidence level of all intervals. [-]

    Returns
    -------
    KineticsResult

    Raises
    ------
    screen.errors.ScreenError
        For unreadable files, inconsistent options or data the methods cannot use.
    """
    from screen.io.thermograms import parse_quantity, read_peak_table, read_thermogram

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
            "explosive properties above 500 J/g (verify against the source; 500-800 J/g is "
            "common practice)"
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
                    "after Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41 (verify against "
                    "the source)"
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
    lowest = lowest_measured_temperature(result)
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
                "al. 1997; verify against the source); no kinetic data were given"
            ],
        }
        result.warnings.append(
            "no kinetic data: the case-file section is marked basis = \"onset-estimate\" "
            "(the case engine treats it as a crude estimate); replace it by measured kinetics"
        )


# --------------------------------------------------------------------------------------------
# Output: dictionary / JSON
# --------------------------------------------------------------------------------------------


def lowest_measured_temperature(result):
    """Lowest temperature with measured heat release [K]: first exceedance of the detection
    limit or extrapolated onset of any run; without them the lowest peak temperature.

    Parameters
    ----------
    result : KineticsAnalysis
        Result of :func:`analyse_kinetics` (temperatures in K).
    """
    measured = [t for r in result.runs for t in (r.detection_temperature, r.onset_temperature)
                if t is not None]
    if not measured:
        measured = [r.peak_temperature for r in result.runs]
    return min(measured) if measured else None
