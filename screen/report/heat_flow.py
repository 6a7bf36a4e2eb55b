"""Presentation of a heat-flow analysis: JSON dictionary, text summary, the ``[synthesis]`` /
``[process]`` case-file fragment and the figures. Reads :class:`HeatFlowResult`; computes no
physics (see :mod:`screen.analyses.heat_flow`).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from screen.analyses.heat_flow import CAUTIONS_EXTRA, CURVE_POINTS
from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.report.kinetics import _f, _toml_string, closing_lines


def result_to_dict(result, curve_points=CURVE_POINTS):
    """The analysis as a JSON-ready dictionary (units in the key names).

    Parameters
    ----------
    result : HeatFlowResult
        Analysis of the heat-flow trace (SI).
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
        Analysis of the heat-flow trace (SI).

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
    return "\n".join(lines + closing_lines(d))


def case_fragment(result):
    """``[synthesis]`` and ``[process]`` case-file sections from the analysis.

    Parameters
    ----------
    result : HeatFlowResult
        Analysis of the heat-flow trace (SI).

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
        lines.append(f"molar_enthalpy = {_toml_string('%.5g kJ/mol' % (r.molar_enthalpy / 1e3))}")
        lines.append(f"limiting_amount = {_toml_string('%.5g mol' % r.limiting_amount)}")
        lines.append(f"# energy = {_toml_string('%.5g kJ/kg' % (r.synthesis_energy / 1e3))}   "
                     "(same heat per kg of final mass; give one form only)")
    else:
        lines.append(f"energy = {_toml_string('%.5g kJ/kg' % (r.synthesis_energy / 1e3))}")
    if r.peak_heat_release_rate > 0:
        lines.append(f"peak_heat_release_rate = {_toml_string('%.4g W/kg' % r.peak_heat_release_rate)}")
    if r.dosing_start is not None and r.dosing_end > r.dosing_start:
        lines.append(f"dosing_time = {_toml_string('%.4g h' % ((r.dosing_end - r.dosing_start) / SECONDS_PER_HOUR))}")
    lines.append("[process]")
    lines.append(f"mode = {_toml_string(r.mode)}")
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
        Analysis of the heat-flow trace (SI).

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"heat_flow"`` and ``"accumulation"``.
    """
    from screen.report.mpl import require_matplotlib

    require_matplotlib("the heat-flow figures")
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


def write_pngs(result, directory):
    """Save :func:`figures` as PNG files in ``directory`` (created if needed).

    Parameters
    ----------
    result : HeatFlowResult
        Analysis of the heat-flow trace (SI).
    directory : str or pathlib.Path
        Folder for the PNG files.

    Returns
    -------
    list of pathlib.Path
    """
    from screen.report.kinetics import save_pngs

    return save_pngs(figures(result), directory, "the heat-flow figures (--png-dir)")
