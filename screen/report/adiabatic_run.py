"""Presentation of an adiabatic-run analysis: JSON dictionary, text summary, the
``[decomposition]`` case-file section and the figures. Reads :class:`AdiabaticResult`; computes
no physics (see :mod:`screen.analyses.adiabatic_run`).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from screen.analyses.adiabatic_run import CAUTIONS_EXTRA
from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError
from screen.report.kinetics import _f, _toml_string, closing_lines


def result_to_dict(result):
    """The analysis as a JSON-ready dictionary (units in the key names).

    Parameters
    ----------
    result : AdiabaticResult
        Analysis of the adiabatic run (SI).

    Returns
    -------
    dict
    """
    from screen.cautions import CAUTIONS

    r = result
    h = SECONDS_PER_HOUR
    fit = r.fit
    candidates = {label: {"order": n, "rms_residual_ln_k": rms,
                          "activation_energy_kJ_per_mol": e / 1e3}
                  for label, (n, rms, e, _) in fit.candidates.items()}
    return {
        "tool": "runaway-screen kinetics --adiabatic",
        "input": {"file": r.path, "sha256": r.sha256, "phi_basis": r.phi_basis,
                  "threshold_K_per_min": r.threshold * 60, "rows": int(r.time.size),
                  "specific_heat_kJ_per_kg_K": (None if r.specific_heat is None
                                                else r.specific_heat / 1e3)},
        "phi": _f(r.phi),
        "onset_temperature_degC": _f(r.onset - ZERO_CELSIUS),
        "onset_temperature_corrected_degC": _f(r.onset_corrected - ZERO_CELSIUS),
        "onset_after_heat_step": bool(r.exotherm.after_heat_step),
        "maximum_temperature_degC": _f(r.maximum_temperature - ZERO_CELSIUS),
        "final_temperature_corrected_degC": _f(r.onset_corrected + r.rise - ZERO_CELSIUS),
        "adiabatic_rise_measured_K": _f(r.rise_measured),
        "adiabatic_rise_K": _f(r.rise),
        "conversion_at_onset": _f(r.conversion_at_onset),
        "energy_J_per_g": _f(r.energy, 1e3),
        "model": fit.model,
        "activation_energy_kJ_per_mol": _f(fit.activation_energy, 1e3),
        "pre_exponential_factor_per_s": _f(math.exp(fit.ln_pre_exponential_factor)),
        "ln_pre_exponential_factor": _f(fit.ln_pre_exponential_factor),
        "order": _f(fit.order),
        "order_reason": fit.reason,
        "fit": {"points": fit.points, "r_squared": _f(fit.r_squared),
                "rms_residual_ln_k": _f(fit.rms_residual), "best_order": _f(fit.best_order),
                "candidates": candidates},
        "max_self_heat_rate_K_per_min": _f(r.rate[r.exotherm.maximum_rate_index] * 60),
        "max_self_heat_rate_corrected_K_per_min": _f(float(np.max(r.corrected_rate)) * 60),
        "tmrad_measured_h": _f(r.tmrad_measured / h),
        "tmrad_corrected_h": _f(r.tmrad_corrected / h),
        "tmrad_at_measured_onset_phi1_h": _f(r.tmrad_at_measured_onset_phi_one / h),
        "max_pressure_bar": _f(r.max_pressure, 1e5),
        "noncondensable_pressure_bar": _f(r.noncondensable_pressure, 1e5),
        "noncondensable_basis": r.noncondensable_basis,
        "noncondensable_gas_mol_per_kg": _f(r.noncondensable_gas),
        "curves": {
            "temperature_degC": [round(float(v), 3) for v in r.fit_temperature - ZERO_CELSIUS],
            "self_heat_rate_K_per_min": [float("%.5g" % v) for v in r.fit_rate * 60],
            "corrected_temperature_degC": [round(float(v), 3)
                                           for v in r.corrected_temperature - ZERO_CELSIUS],
            "corrected_self_heat_rate_K_per_min": [float("%.5g" % v)
                                                   for v in r.corrected_rate * 60],
        },
        "methods": {
            "phi": "phi = 1 + m_cell c'p,cell/(m_sample c'p,sample) (Townsend & Tou 1980)",
            "rise": "dT_ad = phi (T_max - T_0)/(1 - a0) (Townsend & Tou 1980)",
            "onset": "1/T_0,phi=1 = 1/T_0 + (R/E) ln(phi) (Fisher et al. 1992)",
            "temperature": "T_phi=1 = T_0,phi=1 + phi (T - T_0) (Townsend & Tou 1980)",
            "rate": "m_phi=1 = phi m exp[E/R (1/T - 1/T_phi=1)] (Townsend & Tou 1980)",
            "kinetics": "ln k* = ln[m/(dT_ad,m (1 - a)^n)] against 1/T, slope -E/R "
                        "(Townsend & Tou 1980)",
            "tmrad_corrected": "adiabatic time to maximum rate of the fitted kinetics (phi = 1) "
                               "from the corrected onset (screen.models.decomposition.tmrad)",
            "tmrad_at_measured_onset_phi1": "measured time / phi (Townsend & Tou 1980); the "
                                            "phi = 1 time at the measured onset, not at the "
                                            "corrected one",
        },
        "notes": list(r.notes),
        "warnings": list(r.warnings),
        "cautions": list(CAUTIONS) + list(CAUTIONS_EXTRA),
    }


def format_summary(result):
    """Human-readable summary of an :class:`AdiabaticResult` (reads :func:`result_to_dict`).

    Parameters
    ----------
    result : AdiabaticResult
        Analysis of the adiabatic run (SI).

    Returns
    -------
    str
    """
    d = result_to_dict(result)
    lines = [f"Adiabatic run {Path(result.path).name} (phi-corrected; screening aid)", ""]
    lines.append(f"  phi                      {d['phi']:.3f} ({d['input']['phi_basis']})")
    lines.append(f"  onset (> {d['input']['threshold_K_per_min']:g} K/min)     "
                 f"{d['onset_temperature_degC']:.1f} degC measured, "
                 f"{d['onset_temperature_corrected_degC']:.1f} degC corrected (Fisher et al. 1992)")
    lines.append(f"  adiabatic rise           {d['adiabatic_rise_measured_K']:.1f} K measured, "
                 f"{d['adiabatic_rise_K']:.1f} K corrected")
    lines.append(f"  final temperature        {d['maximum_temperature_degC']:.1f} degC measured, "
                 f"{d['final_temperature_corrected_degC']:.1f} degC corrected")
    if d["energy_J_per_g"] is not None:
        lines.append(f"  energy                   {d['energy_J_per_g']:.4g} J/g")
    lines.append(f"  kinetics                 {d['model']}, n = {d['order']:.2f}, E = "
                 f"{d['activation_energy_kJ_per_mol']:.1f} kJ/mol, A = "
                 f"{d['pre_exponential_factor_per_s']:.4g} 1/s (R^2 {d['fit']['r_squared']:.4f})")
    lines.append(f"    {d['order_reason']}")
    lines.append(f"  TMRad                    {d['tmrad_measured_h']:.2f} h measured; "
                 f"{d['tmrad_corrected_h']:.2f} h corrected (phi = 1 from the corrected onset); "
                 f"{d['tmrad_at_measured_onset_phi1_h']:.2f} h = measured/phi")
    if d["max_pressure_bar"] is not None:
        lines.append(f"  max. pressure            {d['max_pressure_bar']:.3g} bar")
        if d["noncondensable_pressure_bar"] is not None:
            lines.append(f"  permanent gas            {d['noncondensable_pressure_bar']:.3g} bar "
                         f"({d['noncondensable_basis']})")
            if d["noncondensable_gas_mol_per_kg"] is not None:
                lines.append(f"                           {d['noncondensable_gas_mol_per_kg']:.3g} "
                             "mol per kg of sample (ideal gas in the free volume)")
        else:
            lines.append(f"  permanent gas            {d['noncondensable_basis']}")
    for note in d["notes"][:-1] if d["notes"] and d["notes"][-1] == d["order_reason"] else d["notes"]:
        if note != d["order_reason"]:
            lines.append(f"  note: {note}")
    return "\n".join(lines + closing_lines(d))


def decomposition_toml(result):
    """A ``[decomposition]`` case-file section from the phi-corrected analysis.

    Parameters
    ----------
    result : AdiabaticResult
        Analysis of the adiabatic run (SI).

    Returns
    -------
    str

    Raises
    ------
    screen.errors.CaseError
        Without the sample c'p (the energy cannot be given).
    """
    import tomllib

    from screen.cautions import SHORT_CAUTION

    r = result
    if r.energy is None:
        raise CaseError("the [decomposition] section needs the energy: give the sample's "
                        "--specific-heat (e.g. '1.9 kJ/(kg K)') so that energy = c'p x corrected "
                        "rise", key="--output")

    fit = r.fit
    name = Path(r.path).name
    lines = [
        "# Written by `runaway-screen kinetics --adiabatic` (screening aid; review before use).",
        f"# {SHORT_CAUTION}",
        f"# Source: {name}, SHA-256 {r.sha256}",
        f"# phi = {r.phi:.4g} ({r.phi_basis}); corrections Townsend & Tou 1980, onset Fisher et al. 1992.",
        f"# Measured onset {r.onset - ZERO_CELSIUS:.1f} degC, rise {r.rise_measured:.1f} K, "
        f"TMRad {r.tmrad_measured / 3600:.3g} h in the cell.",
        f"# {fit.reason}",
    ]
    for w in r.warnings:
        lines.append("# Warning: " + " ".join(w.split()))
    lines.append("[decomposition]")
    lines.append(f"energy = {_toml_string('%.4g kJ/kg' % (r.energy / 1e3))}")
    lines.append(f"model = {_toml_string(fit.model)}")
    lines.append(f"activation_energy = {_toml_string('%.4g kJ/mol' % (fit.activation_energy / 1e3))}")
    lines.append(f"pre_exponential_factor = {_toml_string('%.5g 1/s' % math.exp(fit.ln_pre_exponential_factor))}")
    if fit.model == "nth-order":
        lines.append(f"order = {fit.order:.4g}")
    lines.append(f"onset_temperature = {_toml_string('%.1f degC' % (r.onset_corrected - ZERO_CELSIUS))}")
    lines.append(f"onset_method = {_toml_string(f'adiabatic heat-wait-search run {name}, threshold {r.threshold * 60:g} K/min, measured {r.onset - ZERO_CELSIUS:.1f} degC, phi-corrected (Fisher et al. 1992)')}")
    lines.append(f"lowest_measured_temperature = {_toml_string('%.1f degC' % (r.onset - ZERO_CELSIUS))}")
    lines.append(f"source = {_toml_string(f'{name} (sha256 {r.sha256[:16]}...)')}")
    if r.noncondensable_gas is not None:
        lines.append(f"# Permanent gas after cool-down: for [solvent] gas_yield = "
                     f"\"{r.noncondensable_gas:.3g} mol/kg\" (ideal gas in the cell's free volume).")
    text = "\n".join(lines) + "\n"
    tomllib.loads(text)
    return text


def figures(result):
    """Matplotlib figure: self-heat rate against -1000/T, measured and corrected, with the fit.

    Parameters
    ----------
    result : AdiabaticResult
        Analysis of the adiabatic run (SI).

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"self_heat_rate"`` and ``"temperature"`` (the record over time).
    """
    from screen.report.mpl import require_matplotlib

    require_matplotlib("the adiabatic-run figures")
    from matplotlib.figure import Figure

    from screen.constants import GAS_CONSTANT

    r = result
    fit = r.fit
    out = {}
    fig = Figure(figsize=(6.4, 4.4))
    ax = fig.add_subplot()
    x_m = -1000.0 / r.fit_temperature
    x_c = -1000.0 / r.corrected_temperature
    ax.semilogy(x_m, r.fit_rate * 60, ".", ms=3, label=f"measured (phi = {r.phi:.2f})")
    ax.semilogy(x_c, r.corrected_rate * 60, ".", ms=3, label="corrected to phi = 1")
    a = r.conversion_at_onset + (r.fit_temperature - r.onset) / (r.rise_measured / (1 - r.conversion_at_onset))
    model_rate = (r.rise_measured / (1 - r.conversion_at_onset)) * np.exp(
        fit.ln_pre_exponential_factor - fit.activation_energy / (GAS_CONSTANT * r.fit_temperature)
    ) * np.clip(1 - a, 1e-12, None) ** fit.order
    ax.semilogy(x_m, model_rate * 60, "-", color="k", lw=1,
                label=f"fit: {fit.model}, n = {fit.order:.2f}, E = {fit.activation_energy / 1e3:.0f} kJ/mol")
    ax.axhline(r.threshold * 60, color="0.6", ls=":", lw=1, label="detection threshold")
    ax.set_ylim(bottom=r.threshold * 60 / 5)
    ticks = ax.get_xticks()
    ax.set_xticks(ticks)
    ax.set_xticklabels([f"{-1000.0 / v - ZERO_CELSIUS:.0f}" if v < 0 else "" for v in ticks])
    ax.set_xlabel("temperature  [°C]  (axis linear in -1000/T)")
    ax.set_ylabel("self-heat rate  [K/min]")
    ax.set_title("Self-heat rate, measured and phi-corrected (screening aid)")
    ax.legend(fontsize="small")
    fig.tight_layout()
    out["self_heat_rate"] = fig

    fig = Figure(figsize=(6.4, 4.2))
    ax = fig.add_subplot()
    h = SECONDS_PER_HOUR
    ax.plot(r.time / h, r.temperature - ZERO_CELSIUS, lw=1, label="temperature")
    ax.axvline(r.time[r.exotherm.onset_index] / h, color="tab:orange", lw=0.8, label="onset")
    ax.axvline(r.time[r.exotherm.maximum_rate_index] / h, color="tab:red", lw=0.8,
               label="maximum rate")
    ax.set_xlabel("time  [h]")
    ax.set_ylabel("temperature  [°C]")
    if r.pressure is not None:
        ax2 = ax.twinx()
        ax2.plot(r.time / h, r.pressure / 1e5, color="tab:green", lw=0.8, label="pressure")
        ax2.set_ylabel("pressure  [bar]")
        ax2.legend(loc="center right", fontsize="small")
    ax.legend(loc="upper left", fontsize="small")
    ax.set_title("Heat-wait-search record (screening aid)")
    fig.tight_layout()
    out["temperature"] = fig
    return out


def write_pngs(result, directory):
    """Save :func:`figures` as PNG files in ``directory`` (created if needed).

    Parameters
    ----------
    result : AdiabaticResult
        Analysis of the adiabatic run (SI).
    directory : str or pathlib.Path
        Folder for the PNG files.

    Returns
    -------
    list of pathlib.Path
    """
    from screen.report.kinetics import save_pngs

    return save_pngs(figures(result), directory, "the adiabatic-run figures (--png-dir)")
