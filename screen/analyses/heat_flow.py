"""Heat-flow trace of an isothermal batch or semi-batch run -> heat of reaction, thermal
accumulation and MTSR over time, and the ``[synthesis]`` / ``[process]`` case-file sections.

Composes :mod:`screen.models.heat_flow` on a trace read by :mod:`screen.io.traces`. Knows no
command line; :mod:`screen.report.heat_flow` presents the result. See docs/heat-flow.md.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from screen.errors import CaseError, DataFileError

#: Temperature drift from isothermal that is flagged [K] ("a few kelvin"; design).
DRIFT_WARNING = 3.0

#: Share of the reaction heat taken by the feed above which dosing and reaction heat are
#: not reliably separated [-] (design).
DOSING_HEAT_WARNING = 0.25

#: Shortest steady segment after the reaction, as a share of the reaction time [-] (design).
MIN_TAIL_FRACTION = 0.05

#: Points per curve in the JSON output (design).
CURVE_POINTS = 600

CAUTIONS_EXTRA = (
    "The heat of reaction and the accumulation hold for the recipe, temperature and dosing "
    "profile of this run; a different dosing rate, temperature or scale changes the accumulation.",
)


@dataclass
class HeatFlowResult:
    """Everything computed from one heat-flow trace (SI; see :func:`result_to_dict`)."""

    path: str
    sha256: str
    mode: str
    baseline_method: str
    time: np.ndarray
    temperature: np.ndarray
    heat_flow: np.ndarray
    baseline: np.ndarray
    reaction_power: np.ndarray
    dosed_fraction: np.ndarray
    conversion: np.ndarray
    accumulation: np.ndarray
    mtsr: np.ndarray
    mass: np.ndarray
    reaction_start: float
    reaction_end: float
    reaction_heat: float
    dosing_heat: float
    sensible_heat: float
    initial_mass: float
    final_mass: float
    specific_heat: float
    limiting_amount: float | None
    dosing_start: float | None
    dosing_end: float | None
    max_accumulation: float
    max_accumulation_index: int
    mass_ratio: float
    peak_heat_release_rate: float
    process_temperature: float
    temperature_drift: float
    segments: dict
    notes: list = field(default_factory=list)
    warnings: list = field(default_factory=list)

    @property
    def synthesis_energy(self):
        """Heat of reaction per kg of final mass. [J/kg]"""
        return self.reaction_heat / self.final_mass

    @property
    def adiabatic_rise(self):
        """Adiabatic rise of the synthesis for the final mass. [K]"""
        return self.synthesis_energy / self.specific_heat

    @property
    def molar_enthalpy(self):
        """Molar reaction enthalpy (negative), or None. [J/mol]"""
        return None if self.limiting_amount is None else -self.reaction_heat / self.limiting_amount


def analyse_heat_flow(path, initial_mass, specific_heat, limiting_amount=None,
                      feed_temperature=None, feed_specific_heat=None, baseline="linear"):
    """Analyse a heat-flow trace.

    Parameters
    ----------
    path : str
        CSV with time, reactor temperature, heat flow (positive exothermic) and, for a
        semi-batch run, the cumulative dosed mass.
    initial_mass : float
        Reaction mass before dosing. [kg]
    specific_heat : float
        c'p of the reaction mass. [J/(kg K)]
    limiting_amount : float, optional
        Limiting reagent in the run. [mol]
    feed_temperature : float, optional
        [K] Without it the feed is taken as entering at the reactor temperature.
    feed_specific_heat : float, optional
        [J/(kg K)] Default: ``specific_heat``.
    baseline : {"linear", "dosing", "conversion"}
        Baseline construction between the steady segments before and after the reaction.

    Returns
    -------
    HeatFlowResult

    Raises
    ------
    screen.errors.ScreenError
        Unreadable file, a trace without steady segments, or no exotherm.
    """
    from screen.io.traces import read_trace
    from screen.models import heat_flow as hf
    from screen.models.dsc import noise_level, smooth

    if baseline not in hf.BASELINES:
        raise CaseError(f"{baseline!r} unknown; use one of {', '.join(hf.BASELINES)}",
                        key="--baseline")
    trace = read_trace(path, ("time", "temperature", "heat_flow", "dosed_mass"),
                       ("time", "temperature", "heat_flow"))
    t, temp, q = trace.time, trace.temperature, trace.heat_flow
    n = t.size
    notes = list(trace.notes)
    warnings = []
    name = Path(path).name
    dosed = np.zeros(n) if trace.dosed_mass is None else trace.dosed_mass - trace.dosed_mass[0]
    interval = hf.dosing_interval(dosed)
    corrections = np.zeros(n)
    dosing_heat = 0.0
    if interval is not None:
        if feed_temperature is None:
            notes.append("feed temperature not given: the feed is taken to enter at the reactor "
                         "temperature (no dosing heat correction)")
            warnings.append(
                f"{name}: dosing heat not corrected (no --feed-temperature): a feed colder than "
                "the mass makes the reaction heat look smaller; dosing and reaction heat cannot "
                "be separated without it")
        else:
            cp_feed = feed_specific_heat if feed_specific_heat is not None else specific_heat
            if feed_specific_heat is None:
                notes.append("feed specific heat taken equal to that of the reaction mass")
            q_dos = hf.dosing_heat_flow(t, dosed, temp, feed_temperature, cp_feed)
            corrections += q_dos
            dosing_heat = float(hf.cumulative_integral(t, q_dos)[-1])
    q_sens = hf.sensible_heat_flow(t, initial_mass + dosed, temp, specific_heat)
    corrections += q_sens
    q_corr = q + corrections

    window = max(5, min(1001, int(0.01 * n)))
    smoothed = smooth(q_corr, window)
    sigma = max(noise_level(q_corr) / math.sqrt(window),
                1e-6 * float(np.max(np.abs(q_corr))) + 1e-12)  # floor: noise-free data

    if interval is not None:
        mode = "semi-batch"
        i_start, i_end = interval
        before = slice(0, max(i_start - 1, 0))
        total_dosed = float(dosed[-1])
        fraction = dosed / total_dosed
    else:
        mode = "batch"
        notes.append("no dosing in the trace: analysed as a batch run")
        level0 = float(np.median(smoothed[: max(5, n // 50)]))
        height = float(np.max(np.abs(smoothed - level0)))
        departs = np.abs(smoothed - level0) > max(5 * sigma, 0.02 * height)
        if not departs.any() or not height > 10 * sigma:
            raise DataFileError("no exotherm found: the heat flow stays at its starting level "
                                "within the noise; check the file and the sign (exothermic "
                                "must be positive)", path=path)
        i_start = int(np.argmax(departs))
        i_start = max(i_start - window // 2, 0)
        i_end = i_start
        before = slice(0, max(i_start - 1, 0))
        total_dosed = 0.0
        fraction = np.ones(n)
    if before.stop < 5:
        raise DataFileError(
            f"no steady heat flow before the {'dosing' if mode == 'semi-batch' else 'reaction'} "
            "starts; record at least a few minutes of baseline first", path=path)
    t_before = t[before]
    level_before = float(np.mean(q_corr[before]))
    height = float(np.max(smoothed[i_start:] - level_before)) if i_start < n else 0.0
    if not height > 10 * sigma:
        raise DataFileError("no exotherm found: the heat flow does not rise above its noise "
                            "after the start; check the sign (exothermic must be positive)",
                            path=path)
    tail, level_after = hf.steady_tail_start(smoothed, max(5 * sigma, 0.01 * height))
    tail = max(tail, i_end + 1)
    duration = t[-1] - t[i_start]
    if tail >= n - 5 or (t[-1] - t[tail]) < MIN_TAIL_FRACTION * duration:
        tail = max(n - max(5, int(MIN_TAIL_FRACTION * n)), i_end + 1)
        warnings.append(
            f"{name}: the heat flow has not returned to a steady baseline at the end of the "
            "record: the reaction is not complete, the reaction heat is too low and the "
            "accumulation is a lower bound; record longer after dosing")
    after = slice(tail, n)
    if after.stop - after.start < 5:
        raise DataFileError("no steady heat flow after the reaction; record until the heat "
                            "flow is flat again", path=path)
    slope = np.polyfit(t[after] - t[after].mean(), q_corr[after], 1)[0] if after.stop - after.start > 2 else 0.0
    if abs(slope) * (t[-1] - t[tail]) > max(5 * sigma, 0.02 * height):
        warnings.append(
            f"{name}: the heat flow still drifts at the end of the record (by "
            f"{slope * (t[-1] - t[tail]):.3g} W over the final steady part): the reaction may not "
            "be complete; the accumulation is then a lower bound")
    level_after = float(np.mean(q_corr[after]))
    # Refine the end of the reaction on the signal above a first linear baseline, so that a
    # drifting baseline is not taken for reaction heat and a slow tail is not cut off.
    fine = max(5 * sigma, 0.002 * height)
    for _ in range(2):
        first = hf.linear_baseline(t, (float(t_before.mean()), level_before),
                                   (float(t[after].mean()), level_after))
        above = np.nonzero(smoothed[i_end:] - first[i_end:] > fine)[0]
        refined = i_end + int(above[-1]) + 1 if above.size else i_end + 1
        if (t[-1] - t[min(refined, n - 1)]) < MIN_TAIL_FRACTION * duration or refined == tail:
            break
        tail = refined
        after = slice(tail, n)
        level_after = float(np.mean(q_corr[after]))
    mass = initial_mass + dosed
    final_mass = initial_mass + total_dosed

    def released(base):
        power = q_corr - base
        power[:i_start] = 0.0
        power[tail:] = 0.0
        return power, hf.cumulative_integral(t, power)

    segments = {"before": (float(t_before.mean()), level_before),
                "after": (float(t[after].mean()), level_after)}
    if baseline == "linear":
        base = hf.linear_baseline(t, segments["before"], segments["after"])
        power, cumulative = released(base)
        method = ("linear in time through the mean levels before the reaction and after the heat "
                  "flow returned to steady state")
    elif baseline == "dosing":
        if mode == "batch":
            raise CaseError("a batch run has no dosing; use --baseline linear or conversion",
                            key="--baseline")
        base = hf.proportional_baseline(fraction, level_before, level_after)
        power, cumulative = released(base)
        method = "moving from the level before to the level after in proportion to the dosed mass"
    else:
        base = np.full(n, level_before)
        power, cumulative = released(base)
        for _ in range(6):
            if not cumulative[-1] > 0:
                break
            x = np.clip(cumulative / cumulative[-1], 0.0, 1.0)
            base = hf.proportional_baseline(x, level_before, level_after)
            power, cumulative = released(base)
        method = ("moving from the level before to the level after in proportion to the thermal "
                  "conversion (iterated)")
    total = float(cumulative[-1])
    if not total > 0:
        raise DataFileError("the integrated heat of reaction is not positive; check the sign of "
                            "the heat flow (exothermic must be positive) and the baseline",
                            path=path)
    conversion = hf.thermal_conversion(cumulative, total)
    if mode == "batch":
        fraction = np.ones(n)
    # noise can make the running integral dip below zero at the start: no conversion then
    accumulation = hf.thermal_accumulation(fraction, np.clip(conversion, 0.0, None))
    if mode == "batch":
        accumulation[:i_start] = 1.0
    i_max = int(np.argmax(accumulation))
    x_max = float(accumulation[i_max])
    mtsr = hf.mtsr_course(temp, accumulation, total, mass, specific_heat)
    mass_ratio = float(mass[i_max] / final_mass)
    specific_power = smooth(power, window) / mass
    peak_rate = float(np.max(specific_power[i_start:tail])) if tail > i_start else 0.0
    process_temperature = float(np.median(temp[i_start:tail]))
    drift = float(np.max(np.abs(temp[i_start:tail] - process_temperature)))
    if drift > DRIFT_WARNING:
        warnings.append(
            f"{name}: the reactor temperature departs from isothermal by up to {drift:.1f} K "
            f"(design limit {DRIFT_WARNING:.0f} K): the heat of reaction and accumulation hold "
            "for a drifting temperature, not for the process temperature")
    if dosing_heat and abs(dosing_heat) > DOSING_HEAT_WARNING * total:
        warnings.append(
            f"{name}: the sensible heat of the feed is {abs(dosing_heat) / total * 100:.0f} % of "
            f"the reaction heat (design limit {DOSING_HEAT_WARNING * 100:.0f} %): dosing and "
            "reaction heat cannot be separated reliably; check the feed temperature and c'p")
    if mode == "semi-batch" and feed_temperature is not None:
        notes.append(f"dosing heat correction {dosing_heat / 1e3:.4g} kJ")
    if total_dosed > initial_mass * 10:
        warnings.append(f"{name}: the dosed mass is more than ten times the initial mass; check "
                        "--initial-mass and the unit of the dosed-mass column")
    return HeatFlowResult(
        path=str(path), sha256=trace.sha256, mode=mode, baseline_method=method, time=t,
        temperature=temp, heat_flow=q, baseline=base, reaction_power=power,
        dosed_fraction=fraction, conversion=conversion, accumulation=accumulation, mtsr=mtsr,
        mass=mass, reaction_start=float(t[i_start]), reaction_end=float(t[tail]),
        reaction_heat=total, dosing_heat=dosing_heat,
        sensible_heat=float(hf.cumulative_integral(t, np.where(power != 0, q_sens, 0.0))[-1]),
        initial_mass=initial_mass, final_mass=final_mass, specific_heat=specific_heat,
        limiting_amount=limiting_amount,
        dosing_start=float(t[i_start]) if mode == "semi-batch" else None,
        dosing_end=float(t[i_end]) if mode == "semi-batch" else None,
        max_accumulation=x_max, max_accumulation_index=i_max, mass_ratio=mass_ratio,
        peak_heat_release_rate=peak_rate, process_temperature=process_temperature,
        temperature_drift=drift, segments=segments, notes=notes, warnings=warnings)
