"""Adiabatic heat-wait-search run -> phi-corrected onset, adiabatic rise, TMRad and
decomposition kinetics, and a ``[decomposition]`` case-file section.

Composes :mod:`screen.models.adiabatic` (Townsend & Tou 1980; Fisher et al. 1992) on a trace
read by :mod:`screen.io.traces`; the phi = 1 TMRad comes from
:func:`screen.models.decomposition.tmrad`. Knows no command line. See docs/kinetics.md.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError, DataFileError, ModelDomainError

#: phi above which the corrections are flagged as large (design; test cells are usually
#: built for phi below about 2).
PHI_WARNING = 3.0

#: Smallest measured rise accepted as an exotherm [K] (design).
MIN_RISE = 2.0

#: R^2 of the Arrhenius fit below which a warning is given (design).
R_SQUARED_WARNING = 0.98

#: Points of the uniform temperature grid of the fit (design).
FIT_POINTS = 300

#: The run counts as cooled down when it ends this far below the onset [K] (design).
COOLED_MARGIN = 20.0

CAUTIONS_EXTRA = (
    "The phi correction assumes one reaction with the same mechanism in the cell and in the "
    "plant and a cell that follows the sample temperature (Townsend & Tou 1980).",
)


@dataclass
class AdiabaticResult:
    """Everything computed from one adiabatic run (SI; see :func:`result_to_dict`)."""

    path: str
    sha256: str
    phi: float
    phi_basis: str
    threshold: float
    time: np.ndarray
    temperature: np.ndarray
    rate: np.ndarray
    pressure: np.ndarray | None
    exotherm: object
    onset: float
    onset_corrected: float
    maximum_temperature: float
    rise_measured: float
    rise: float
    conversion_at_onset: float
    fit: object
    tmrad_measured: float
    tmrad_corrected: float
    tmrad_at_measured_onset_phi_one: float
    specific_heat: float | None
    fit_temperature: np.ndarray
    fit_rate: np.ndarray
    corrected_temperature: np.ndarray
    corrected_rate: np.ndarray
    max_pressure: float | None = None
    noncondensable_pressure: float | None = None
    noncondensable_basis: str | None = None
    notes: list = field(default_factory=list)
    warnings: list = field(default_factory=list)

    @property
    def energy(self):
        """Decomposition energy per kg of sample, phi-corrected rise times c'p; None without
        the sample c'p. [J/kg]"""
        return None if self.specific_heat is None else self.rise * self.specific_heat


def analyse_adiabatic(path, phi=None, sample_mass=None, specific_heat=None, cell_mass=None,
                      cell_specific_heat=None, threshold=None, order=None):
    """Analyse an adiabatic (heat-wait-search) run.

    Parameters
    ----------
    path : str
        CSV with time and sample temperature (optional absolute pressure).
    phi : float, optional
        Thermal inertia of the run. [-] Either this or all four masses and heat capacities.
    sample_mass, cell_mass : float, optional
        [kg]
    specific_heat : float, optional
        c'p of the sample; also turns the corrected rise into an energy. [J/(kg K)]
    cell_specific_heat : float, optional
        [J/(kg K)]
    threshold : float, optional
        Self-heat rate that marks the exotherm. [K/s] Default 0.02 K/min (common practice).
    order : float, optional
        Impose a reaction order instead of choosing it by fit quality. [-]

    Returns
    -------
    AdiabaticResult

    Raises
    ------
    screen.errors.ScreenError
        Unreadable file, missing phi data, no exotherm.
    """
    from screen.analyses.heat_flow import _sha256
    from screen.io.traces import read_trace
    from screen.models import adiabatic as ad
    from screen.models.decomposition import DecompositionKinetics, tmrad

    threshold = ad.DEFAULT_THRESHOLD if threshold is None else threshold
    cell_given = [v is not None for v in (sample_mass, cell_mass, cell_specific_heat)]
    if phi is not None and any(cell_given):
        raise CaseError("give either --phi or the masses and heat capacities of sample and cell, "
                        "not both", key="--phi")
    if phi is None:
        if not all(cell_given) or specific_heat is None:
            raise CaseError("an adiabatic run needs its thermal inertia: --phi 1.6, or "
                            "--sample-mass, --specific-heat (of the sample), --cell-mass and "
                            "--cell-specific-heat", key="--phi")
        phi = ad.phi_factor(sample_mass, specific_heat, cell_mass, cell_specific_heat)
        basis = (f"1 + m_cell c'p,cell/(m_sample c'p,sample) = 1 + {cell_mass * 1e3:.4g} g x "
                 f"{cell_specific_heat / 1e3:.4g} J/(g K) / ({sample_mass * 1e3:.4g} g x "
                 f"{specific_heat / 1e3:.4g} J/(g K)) (Townsend & Tou 1980)")
    else:
        if not (phi >= 1.0 and math.isfinite(phi)):
            raise CaseError(f"{phi} must be at least 1 (phi = 1 + cell heat capacity / sample "
                            "heat capacity)", key="--phi")
        basis = "given with --phi"
    trace = read_trace(path, ("time", "temperature", "pressure"), ("time", "temperature"))
    name = Path(path).name
    notes = list(trace.notes)
    warnings = []
    t, temp = trace.time, trace.temperature
    rate = ad.self_heat_rate(t, temp)
    try:
        exo = ad.find_exotherm(temp, rate, threshold)
    except ModelDomainError as exc:
        raise DataFileError(f"{exc.message}; check the file, or lower --rate-threshold",
                            path=path) from None
    i0, i_rate, i_top = exo.onset_index, exo.maximum_rate_index, exo.maximum_temperature_index
    onset = float(temp[i0])
    top = float(temp[i_top])
    rise_measured = top - onset
    if rise_measured < MIN_RISE:
        raise DataFileError(f"the exotherm rises only {rise_measured:.2f} K (at least {MIN_RISE:g} "
                            "K needed); no adiabatic rise can be measured", path=path)
    if i_top >= t.size - 3:
        warnings.append(f"{name}: the record ends at its highest temperature: the exotherm may "
                        "not be complete; the adiabatic rise is then a lower bound")
    # uniform temperature grid over the rising exotherm
    seg_t = temp[i0:i_top + 1]
    seg_r = rate[i0:i_top + 1]
    order_idx = np.argsort(seg_t, kind="stable")
    seg_t, seg_r = seg_t[order_idx], seg_r[order_idx]
    keep = seg_r > 0
    seg_t, seg_r = seg_t[keep], seg_r[keep]
    grid = np.linspace(onset + 0.02 * rise_measured, top, FIT_POINTS)
    grid_rate = np.exp(np.interp(grid, seg_t, np.log(seg_r)))
    alpha0 = 0.0
    fit = None
    for _ in range(4):
        total_rise = rise_measured / (1.0 - alpha0)
        try:
            fit = ad.fit_self_heat_rate(grid, grid_rate, onset, total_rise, alpha0, order=order)
        except ModelDomainError as exc:
            raise DataFileError(f"{exc.message}; the run cannot be fitted", path=path) from None
        new = ad.conversion_before_onset(t[:i0 + 1], temp[:i0 + 1], fit.activation_energy,
                                         fit.ln_pre_exponential_factor)
        if abs(new - alpha0) < 1e-5:
            alpha0 = new
            break
        alpha0 = new
    rise = ad.corrected_adiabatic_rise(rise_measured / (1.0 - alpha0), phi)
    onset_c = ad.corrected_onset_temperature(onset, phi, fit.activation_energy)
    tmr_measured = float(t[i_rate] - t[i0])
    cp_calc = specific_heat if specific_heat is not None else 1000.0  # cancels in TMRad
    if not fit.ln_pre_exponential_factor < 700.0:
        raise DataFileError(f"fitted ln A = {fit.ln_pre_exponential_factor:.4g} is beyond the "
                            "range of floating-point numbers; check the run", path=path)
    kinetics = DecompositionKinetics(
        fit.model, rise * cp_calc, fit.activation_energy, math.exp(fit.ln_pre_exponential_factor),
        order=fit.order if fit.model == "nth-order" else 1.0)
    tmr_corrected = float(tmrad(kinetics, onset_c, cp_calc))
    corrected_t = ad.corrected_temperature(grid, onset, onset_c, phi)
    corrected_r = ad.corrected_self_heat_rate(grid_rate, grid, corrected_t, phi,
                                              fit.activation_energy)
    notes.append(fit.reason)
    if alpha0 > 0.0:
        notes.append(f"conversion before the detected onset {alpha0 * 100:.2g} % (fitted kinetics "
                     "integrated over the record before it); the rise is scaled by 1/(1 - a0)")
    if phi > PHI_WARNING:
        warnings.append(f"{name}: phi = {phi:.2f} is above {PHI_WARNING:g} (design): the "
                        "corrections are large and the cell may lag the sample; prefer a "
                        "lower-phi test")
    if fit.r_squared < R_SQUARED_WARNING:
        warnings.append(f"{name}: the Arrhenius fit of the self-heat rate is poor (R^2 "
                        f"{fit.r_squared:.3f} < {R_SQUARED_WARNING}): several reactions or a "
                        "lagging cell; the kinetics are uncertain")
    if not exo.after_heat_step and i0 == 0:
        warnings.append(f"{name}: the self-heating starts at the first point of the record: the "
                        "onset may lie below the temperature range searched")
    result = AdiabaticResult(
        path=str(path), sha256=_sha256(path), phi=phi, phi_basis=basis, threshold=threshold,
        time=t, temperature=temp, rate=rate, pressure=trace.pressure, exotherm=exo, onset=onset,
        onset_corrected=onset_c, maximum_temperature=top, rise_measured=rise_measured,
        rise=rise, conversion_at_onset=alpha0, fit=fit, tmrad_measured=tmr_measured,
        tmrad_corrected=tmr_corrected,
        tmrad_at_measured_onset_phi_one=ad.time_to_maximum_rate_phi_one(tmr_measured, phi),
        specific_heat=specific_heat, fit_temperature=grid, fit_rate=grid_rate,
        corrected_temperature=corrected_t, corrected_rate=corrected_r, notes=notes,
        warnings=warnings)
    if trace.pressure is not None:
        _pressure(result, i0)
    return result


def _pressure(result, i0):
    """Maximum pressure and, after a cool-down, the permanent-gas pressure (design): the
    pressure at the end minus the pressure recorded before the exotherm at the same
    temperature."""
    p, temp = result.pressure, result.temperature
    result.max_pressure = float(np.max(p))
    n_end = max(3, min(20, p.size // 50))
    t_end = float(np.mean(temp[-n_end:]))
    p_end = float(np.mean(p[-n_end:]))
    if t_end > result.onset - COOLED_MARGIN:
        result.noncondensable_basis = ("not shown: the record does not cool down below the onset "
                                       f"- {COOLED_MARGIN:g} K")
        return
    before_t, before_p = temp[:i0 + 1], p[:i0 + 1]
    if before_t.size < 5 or not before_t.min() - 2.0 <= t_end <= before_t.max():
        result.noncondensable_basis = ("not shown: the end temperature lies outside the range "
                                       "recorded before the exotherm")
        return
    order = np.argsort(before_t, kind="stable")
    p_ref = float(np.interp(t_end, before_t[order], before_p[order]))
    result.noncondensable_pressure = p_end - p_ref
    result.noncondensable_basis = (
        f"pressure after cool-down at {t_end - ZERO_CELSIUS:.1f} degC minus the pressure "
        "recorded at the same temperature before the exotherm (permanent gas; design)")
    if result.noncondensable_pressure > 0.05 * max(p_ref, 1e5):
        result.warnings.append(
            f"{Path(result.path).name}: the decomposition leaves "
            f"{result.noncondensable_pressure / 1e5:.3g} bar of permanent gas after cool-down: "
            "a closed vessel stays pressurised; size relief for gas generation")


def _f(value, scale=1.0):
    if value is None:
        return None
    value = float(value) / scale
    if not math.isfinite(value):
        raise ModelDomainError("a result is not finite; the run cannot be analysed as given")
    return value


def result_to_dict(result):
    """The analysis as a JSON-ready dictionary (units in the key names).

    Parameters
    ----------
    result : AdiabaticResult

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
        else:
            lines.append(f"  permanent gas            {d['noncondensable_basis']}")
    for note in d["notes"][:-1] if d["notes"] and d["notes"][-1] == d["order_reason"] else d["notes"]:
        if note != d["order_reason"]:
            lines.append(f"  note: {note}")
    if d["warnings"]:
        lines.append("")
        lines.append("Warnings")
        lines.extend(f"  ! {w}" for w in d["warnings"])
    lines.append("")
    lines.append("Cautions")
    lines.extend(f"  - {c}" for c in d["cautions"])
    return "\n".join(lines)


def decomposition_toml(result):
    """A ``[decomposition]`` case-file section from the phi-corrected analysis.

    Parameters
    ----------
    result : AdiabaticResult

    Returns
    -------
    str

    Raises
    ------
    screen.errors.CaseError
        Without the sample c'p (the energy cannot be given).
    """
    import json
    import tomllib

    from screen.cautions import SHORT_CAUTION

    r = result
    if r.energy is None:
        raise CaseError("the [decomposition] section needs the energy: give the sample's "
                        "--specific-heat (e.g. '1.9 kJ/(kg K)') so that energy = c'p x corrected "
                        "rise", key="--output")

    def q(text):
        return json.dumps(str(text), ensure_ascii=False)

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
    lines.append(f"energy = {q('%.4g kJ/kg' % (r.energy / 1e3))}")
    lines.append(f"model = {q(fit.model)}")
    lines.append(f"activation_energy = {q('%.4g kJ/mol' % (fit.activation_energy / 1e3))}")
    lines.append(f"pre_exponential_factor = {q('%.5g 1/s' % math.exp(fit.ln_pre_exponential_factor))}")
    if fit.model == "nth-order":
        lines.append(f"order = {fit.order:.4g}")
    lines.append(f"onset_temperature = {q('%.1f degC' % (r.onset_corrected - ZERO_CELSIUS))}")
    lines.append(f"onset_method = {q(f'adiabatic heat-wait-search run {name}, threshold {r.threshold * 60:g} K/min, measured {r.onset - ZERO_CELSIUS:.1f} degC, phi-corrected (Fisher et al. 1992)')}")
    lines.append(f"lowest_measured_temperature = {q('%.1f degC' % (r.onset - ZERO_CELSIUS))}")
    lines.append(f"source = {q(f'{name} (sha256 {r.sha256[:16]}...)')}")
    text = "\n".join(lines) + "\n"
    tomllib.loads(text)
    return text


def figures(result):
    """Matplotlib figure: self-heat rate against -1000/T, measured and corrected, with the fit.

    Parameters
    ----------
    result : AdiabaticResult

    Returns
    -------
    dict of str -> matplotlib.figure.Figure
        ``"self_heat_rate"`` and ``"temperature"`` (the record over time).
    """
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
