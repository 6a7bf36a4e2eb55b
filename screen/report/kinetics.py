"""Presentation of a :class:`screen.analyses.kinetics.KineticsResult`: JSON dict, text, figures."""
from __future__ import annotations

import json
import math
from pathlib import Path

from screen.analyses.kinetics import lowest_measured_temperature
from screen.cautions import CAUTIONS, caution_text
from screen.constants import ZERO_CELSIUS
from screen.errors import CaseError, OutputError


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
        Analysis of the DSC runs (SI).

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
                          "procedure; verify against the standard)",
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


def closing_lines(data):
    """The "Warnings" and "Cautions" blocks that end every text summary.

    Parameters
    ----------
    data : dict
        A result dictionary with ``warnings`` and ``cautions`` lists.

    Returns
    -------
    list of str
    """
    lines = []
    if data["warnings"]:
        lines += ["", "Warnings"] + [f"  ! {w}" for w in data["warnings"]]
    return lines + ["", "Cautions"] + [f"  - {c}" for c in data["cautions"]]


def format_summary(result):
    """Human-readable multi-line summary of a :class:`KineticsResult`.

    Parameters
    ----------
    result : KineticsResult
        Analysis of the DSC runs (SI).

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
    return "\n".join(lines + closing_lines(d))


# --------------------------------------------------------------------------------------------
# Output: case-file section
# --------------------------------------------------------------------------------------------


def figures(result):
    """Matplotlib figures of the analysis (no pyplot state; Agg-compatible).

    Parameters
    ----------
    result : KineticsResult
        Analysis of the DSC runs (SI).

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"kissinger"`` (ln(beta/Tp^2) against 1000/Tp with the fit), ``"activation_energy"``
        (Friedman and Flynn-Wall-Ozawa Ea against conversion, Kissinger E), ``"fit"`` (measured
        and fitted d alpha/dt against temperature) and ``"baselines"`` (signals with baselines
        and onsets); only those the data allow.
    """
    import numpy as np

    from screen.report.mpl import require_matplotlib

    require_matplotlib("the kinetics figures")
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


def add_caution(fig, cautions=CAUTIONS) -> None:
    """The cautions (screen.cautions, the same text as every output) under the axes.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure; its layout leaves room for the text at its foot.
    cautions : sequence of str
        The cautions (:data:`screen.cautions.CAUTIONS`, then those of the analysis).
    """
    import textwrap

    text = caution_text(cautions)
    lines = textwrap.wrap(text, 135)
    share = min(0.04 + 0.022 * len(lines), 0.3)
    fig.tight_layout(rect=(0.0, share, 1.0, 1.0))
    fig.text(0.01, 0.01, "\n".join(lines), fontsize=5.0, va="bottom", ha="left", color="0.25")


def write_pngs(result, directory):
    """Save :func:`figures` as PNG files in ``directory`` (created if needed).

    Parameters
    ----------
    result : KineticsResult
        Analysis of the DSC runs (SI).
    directory : str or pathlib.Path
        Folder for the PNG files.

    Returns
    -------
    list of pathlib.Path
        Files written (existing figures of the same name are replaced).
    """
    return save_pngs(figures(result), directory, "the kinetics figures (--png-dir)",
                     cautions=getattr(result, "cautions", None) or CAUTIONS)


def save_pngs(figures_by_name, directory, purpose="the figures (--png-dir)", cautions=CAUTIONS):
    """Save matplotlib figures as ``NAME.png`` in ``directory`` (created if needed), each with
    the cautions under its axes and in its PNG ``Description`` text chunk.

    Parameters
    ----------
    figures_by_name : dict of str -> matplotlib.figure.Figure
        Figures keyed by the file stem.
    directory : str or pathlib.Path
        Folder for the PNG files.
    purpose : str
        What needs matplotlib, for the message when it is missing.
    cautions : sequence of str
        The cautions (:data:`screen.cautions.CAUTIONS`, followed by those of the analysis).

    Returns
    -------
    list of pathlib.Path
        Files written (existing figures of the same name are replaced).
    """
    from screen.report.mpl import require_matplotlib

    require_matplotlib(purpose).use("Agg")
    target = Path(directory)
    try:
        target.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"cannot create the folder ({exc.strerror})", path=str(target)) from None
    import io

    from screen.io.fileio import write_atomic

    written = []
    for name, fig in figures_by_name.items():
        path = target / f"{name}.png"
        add_caution(fig, cautions)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png", dpi=120,
                    metadata={"Description": caution_text(cautions)})
        write_atomic(path, buffer.getvalue(), force=True)  # the one writer; figures are replaced
        written.append(path)
    return written


# --------------------------------------------------------------------------------------------
# Command
# --------------------------------------------------------------------------------------------


# --------------------------------------------------------------------------------------------
# The [decomposition] case-file section
# --------------------------------------------------------------------------------------------


def _toml_string(text):
    return json.dumps(str(text), ensure_ascii=False)


def decomposition_toml(result):
    """A ``[decomposition]`` case-file section from the analysis.

    Parameters
    ----------
    result : KineticsResult
        Analysis of the DSC runs (SI).

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
    if result.source == "onset":
        # A single onset gives no kinetics: the section stays a crude onset estimate in every
        # path (basis key honoured by the case engine); no model keys that could be read as
        # measured kinetics (issue 18 item 1).
        lines.append('basis = "onset-estimate"')
        onset_text = "%.1f degC" % (result.onset["temperature"] - ZERO_CELSIUS)
        lines.append(f"onset_temperature = {_toml_string(onset_text)}")
        lines.append(f"onset_method = {_toml_string(result.onset['method'])}")
        lines.append("# Declare which onset this is, else the case engine grants no class below 5:")
        lines.append('# onset_type = "extrapolated" with onset_scan_rate = "10 K/min", or')
        lines.append('# onset_type = "detection-point" with onset_detection_limit = "20 W/kg".')
        text = "\n".join(lines) + "\n"
        tomllib.loads(text)
        return text
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
    lowest = lowest_measured_temperature(result)
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
