"""Heat-flow trace of an isothermal batch or semi-batch run -> heat of reaction, thermal
accumulation and MTSR over time, and the ``[synthesis]`` / ``[process]`` case-file sections.

Composes :mod:`screen.models.heat_flow` on a trace read by :mod:`screen.io.traces`. Knows no
command line; :mod:`screen.cli` presents the result. See docs/heat-flow.md.
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError, DataFileError, ModelDomainError

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


def _sha256(path):
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


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
    sigma = noise_level(q_corr) / math.sqrt(window)

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
    accumulation = hf.thermal_accumulation(fraction, conversion)
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
        path=str(path), sha256=_sha256(path), mode=mode, baseline_method=method, time=t,
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


def _f(value, scale=1.0):
    if value is None:
        return None
    value = float(value) / scale
    if not math.isfinite(value):
        raise ModelDomainError("a result is not finite; the trace cannot be analysed as given")
    return value


def result_to_dict(result, curve_points=CURVE_POINTS):
    """The analysis as a JSON-ready dictionary (units in the key names).

    Parameters
    ----------
    result : HeatFlowResult
    curve_points : int
        Points per curve (decimated evenly in time, keeping the maximum of the accumulation).

    Returns
    -------
    dict
    """
    from screen.cautions import CAUTIONS
    from screen.models.heat_flow import decimate_indices

    r = result
    h = SECONDS_PER_HOUR
    reference = r.dosing_start if r.dosing_start is not None else r.reaction_start
    idx = decimate_indices(r.time.size, curve_points,
                           keep=(r.max_accumulation_index, int(np.argmax(r.mtsr))))
    out = {
        "tool": "runaway-screen heat-flow",
        "input": {"file": r.path, "sha256": r.sha256, "initial_mass_kg": r.initial_mass,
                  "specific_heat_kJ_per_kg_K": r.specific_heat / 1e3,
                  "limiting_amount_mol": r.limiting_amount, "baseline": r.baseline_method,
                  "rows": int(r.time.size)},
        "mode": r.mode,
        "reaction_heat_kJ": _f(r.reaction_heat, 1e3),
        "synthesis_energy_kJ_per_kg": _f(r.synthesis_energy, 1e3),
        "molar_enthalpy_kJ_per_mol": _f(r.molar_enthalpy, 1e3),
        "synthesis_adiabatic_rise_K": _f(r.adiabatic_rise),
        "max_accumulation": _f(r.max_accumulation),
        "time_of_max_accumulation_h": _f((r.time[r.max_accumulation_index] - reference) / h),
        "time_of_max_accumulation_basis": ("from the start of dosing" if r.dosing_start is not None
                                           else "from the start of the reaction"),
        "accumulation_mass_ratio": _f(r.mass_ratio),
        "mtsr_max_degC": _f(float(np.max(r.mtsr)) - ZERO_CELSIUS),
        "time_of_mtsr_max_h": _f((r.time[int(np.argmax(r.mtsr))] - reference) / h),
        "process_temperature_degC": _f(r.process_temperature - ZERO_CELSIUS),
        "temperature_drift_K": _f(r.temperature_drift),
        "peak_heat_release_rate_W_per_kg": _f(r.peak_heat_release_rate),
        "dosing_heat_kJ": _f(r.dosing_heat, 1e3),
        "sensible_heat_kJ": _f(r.sensible_heat, 1e3),
        "final_mass_kg": _f(r.final_mass),
        "dosing_start_h": None if r.dosing_start is None else _f(r.dosing_start / h),
        "dosing_time_h": (None if r.dosing_start is None
                          else _f((r.dosing_end - r.dosing_start) / h)),
        "reaction_start_h": _f(r.reaction_start / h),
        "reaction_end_h": _f(r.reaction_end / h),
        "baseline_before_W": _f(r.segments["before"][1]),
        "baseline_after_W": _f(r.segments["after"][1]),
        "curves": {
            "time_h": [round(float(v), 5) for v in r.time[idx] / h],
            "reactor_temperature_degC": [round(float(v), 3) for v in r.temperature[idx] - ZERO_CELSIUS],
            "heat_flow_W": [round(float(v), 4) for v in r.heat_flow[idx]],
            "baseline_W": [round(float(v), 4) for v in r.baseline[idx]],
            "reaction_power_W": [round(float(v), 4) for v in r.reaction_power[idx]],
            "dosed_fraction": [round(float(v), 5) for v in r.dosed_fraction[idx]],
            "thermal_conversion": [round(float(v), 5) for v in r.conversion[idx]],
            "accumulation": [round(float(v), 5) for v in r.accumulation[idx]],
            "mtsr_degC": [round(float(v), 3) for v in r.mtsr[idx] - ZERO_CELSIUS],
        },
        "methods": {
            "baseline": r.baseline_method,
            "heat_balance": "q_rx = q_meas - baseline + m_dot c'p,feed (T_r - T_feed) + m c'p dT_r/dt",
            "accumulation": "X_ac = dosed fraction - X_th (Gygax 1988)",
            "mtsr": "MTSR(t) = T_r + X_ac Q_total/(m(t) c'p) (Stoessel 1993)",
        },
        "notes": list(r.notes),
        "warnings": list(r.warnings),
        "cautions": list(CAUTIONS) + list(CAUTIONS_EXTRA),
    }
    return out


def format_summary(result):
    """Human-readable summary of a :class:`HeatFlowResult` (reads :func:`result_to_dict`).

    Parameters
    ----------
    result : HeatFlowResult

    Returns
    -------
    str
    """
    d = result_to_dict(result, curve_points=2)
    lines = [f"Heat-flow trace {Path(result.path).name} ({d['mode']}; screening aid)", ""]
    lines.append(f"  reaction heat              {d['reaction_heat_kJ']:.4g} kJ")
    lines.append(f"  per kg of final mass       {d['synthesis_energy_kJ_per_kg']:.4g} kJ/kg "
                 f"({d['final_mass_kg']:.4g} kg)")
    if d["molar_enthalpy_kJ_per_mol"] is not None:
        lines.append(f"  molar enthalpy             {d['molar_enthalpy_kJ_per_mol']:.4g} kJ/mol")
    lines.append(f"  adiabatic rise (synthesis) {d['synthesis_adiabatic_rise_K']:.1f} K")
    lines.append(f"  max. accumulation          {d['max_accumulation']:.3f} at "
                 f"{d['time_of_max_accumulation_h']:.2f} h {d['time_of_max_accumulation_basis']}")
    lines.append(f"  mass then / final mass     {d['accumulation_mass_ratio']:.3f}")
    lines.append(f"  MTSR max                   {d['mtsr_max_degC']:.1f} degC "
                 f"(process {d['process_temperature_degC']:.1f} degC)")
    lines.append(f"  peak heat release rate     {d['peak_heat_release_rate_W_per_kg']:.3g} W/kg")
    if d["dosing_time_h"] is not None:
        lines.append(f"  dosing                     {d['dosing_time_h']:.2f} h from "
                     f"{d['dosing_start_h']:.2f} h; dosing heat {d['dosing_heat_kJ']:.3g} kJ")
    lines.append(f"  baseline: {d['input']['baseline']}")
    for note in d["notes"]:
        lines.append(f"  note: {note}")
    if d["warnings"]:
        lines.append("")
        lines.append("Warnings")
        lines.extend(f"  ! {w}" for w in d["warnings"])
    lines.append("")
    lines.append("Cautions")
    lines.extend(f"  - {c}" for c in d["cautions"])
    return "\n".join(lines)


def _q(text):
    import json

    return json.dumps(str(text), ensure_ascii=False)


def case_fragment(result):
    """``[synthesis]`` and ``[process]`` case-file sections from the analysis.

    Parameters
    ----------
    result : HeatFlowResult

    Returns
    -------
    str
        TOML text (validated by parsing before it is returned).
    """
    import tomllib

    from screen.cautions import SHORT_CAUTION

    r = result
    d = result_to_dict(r, curve_points=2)
    lines = [
        "# Written by `runaway-screen heat-flow` (screening aid; review before use).",
        f"# {SHORT_CAUTION}",
        f"# Source: {Path(r.path).name}, SHA-256 {r.sha256}",
        f"# Baseline: {r.baseline_method}.",
        f"# Run at {d['process_temperature_degC']:.1f} degC; reaction heat {d['reaction_heat_kJ']:.4g} kJ "
        f"over {d['final_mass_kg']:.4g} kg final mass; MTSR max of the run "
        f"{d['mtsr_max_degC']:.1f} degC.",
        "# Merge these keys into the [synthesis] and [process] sections of the case; [process]",
        "# also needs temperature and max_technical_temperature (or a [solvent]).",
    ]
    for w in r.warnings:
        lines.append("# Warning: " + " ".join(w.split()))
    lines.append("[synthesis]")
    if r.limiting_amount is not None:
        lines.append(f"molar_enthalpy = {_q('%.5g kJ/mol' % (r.molar_enthalpy / 1e3))}")
        lines.append(f"limiting_amount = {_q('%.5g mol' % r.limiting_amount)}")
        lines.append(f"# energy = {_q('%.5g kJ/kg' % (r.synthesis_energy / 1e3))}   "
                     "(same heat per kg of final mass; give one form only)")
    else:
        lines.append(f"energy = {_q('%.5g kJ/kg' % (r.synthesis_energy / 1e3))}")
    if r.peak_heat_release_rate > 0:
        lines.append(f"peak_heat_release_rate = {_q('%.4g W/kg' % r.peak_heat_release_rate)}")
    if r.dosing_start is not None and r.dosing_end > r.dosing_start:
        lines.append(f"dosing_time = {_q('%.4g h' % ((r.dosing_end - r.dosing_start) / SECONDS_PER_HOUR))}")
    lines.append("[process]")
    lines.append(f"mode = {_q(r.mode)}")
    accumulation = min(max(r.max_accumulation, 0.0), 1.0)
    lines.append(f"accumulation = {accumulation:.4f}")
    ratio = min(max(r.mass_ratio, 1e-6), 1.0)
    lines.append(f"accumulation_mass_ratio = {ratio:.4f}")
    text = "\n".join(lines) + "\n"
    tomllib.loads(text)
    return text


def figures(result):
    """Matplotlib figures: heat flow with baseline and dosing; accumulation and MTSR over time.

    Parameters
    ----------
    result : HeatFlowResult

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"heat_flow"`` and ``"accumulation"``.
    """
    from matplotlib.figure import Figure

    r = result
    h = SECONDS_PER_HOUR
    idx = np.unique(np.linspace(0, r.time.size - 1, min(r.time.size, 4000)).astype(int))
    t = r.time[idx] / h
    out = {}
    fig = Figure(figsize=(6.4, 4.2))
    ax = fig.add_subplot()
    ax.plot(t, r.heat_flow[idx], lw=0.8, color="0.35", label="measured heat flow")
    ax.plot(t, r.baseline[idx], ":", color="k", label="baseline")
    ax.plot(t, r.reaction_power[idx], lw=1.2, label="reaction power (corrected)")
    ax.axvspan(r.reaction_start / h, r.reaction_end / h, color="0.93", zorder=0,
               label="integrated range")
    ax.set_xlabel("time  [h]")
    ax.set_ylabel("heat flow  [W]")
    if r.mode == "semi-batch":
        ax2 = ax.twinx()
        ax2.plot(t, r.dosed_fraction[idx], "--", color="tab:green", lw=1, label="dosed fraction")
        ax2.set_ylabel("dosed fraction  [-]")
        ax2.set_ylim(0, 1.05)
        ax2.legend(loc="center right", fontsize="small")
    ax.legend(loc="upper right", fontsize="small")
    ax.set_title("Heat flow, baseline and dosing (screening aid)")
    fig.tight_layout()
    out["heat_flow"] = fig

    fig = Figure(figsize=(6.4, 4.2))
    ax = fig.add_subplot()
    ax.plot(t, r.dosed_fraction[idx], "--", label="dosed fraction")
    ax.plot(t, r.conversion[idx], label="thermal conversion X_th")
    ax.plot(t, r.accumulation[idx], lw=1.6, label="accumulation X_ac")
    i = r.max_accumulation_index
    ax.plot([r.time[i] / h], [r.accumulation[i]], "o", color="tab:red")
    ax.set_xlabel("time  [h]")
    ax.set_ylabel("fraction  [-]")
    ax.set_ylim(-0.05, 1.05)
    ax2 = ax.twinx()
    ax2.plot(t, r.mtsr[idx] - ZERO_CELSIUS, color="tab:red", lw=1.2, label="MTSR(t)")
    ax2.plot(t, r.temperature[idx] - ZERO_CELSIUS, color="0.5", lw=0.8, label="T_r")
    ax2.set_ylabel("temperature  [°C]")
    ax.legend(loc="center left", fontsize="small")
    ax2.legend(loc="center right", fontsize="small")
    ax.set_title("Thermal accumulation and MTSR over time (screening aid)")
    fig.tight_layout()
    out["accumulation"] = fig
    return out
