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

from screen.constants import ZERO_CELSIUS
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
    noncondensable_gas: float | None = None
    sample_mass: float | None = None
    free_volume: float | None = None
    notes: list = field(default_factory=list)
    warnings: list = field(default_factory=list)

    @property
    def energy(self):
        """Decomposition energy per kg of sample, phi-corrected rise times c'p; None without
        the sample c'p. [J/kg]"""
        return None if self.specific_heat is None else self.rise * self.specific_heat


def analyse_adiabatic(path, phi=None, sample_mass=None, specific_heat=None, cell_mass=None,
                      cell_specific_heat=None, threshold=None, order=None, free_volume=None):
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
    free_volume : float, optional
        Gas volume of the closed cell; with ``sample_mass`` it turns the permanent-gas pressure
        into mol per kg of sample. [m^3]

    Returns
    -------
    AdiabaticResult

    Raises
    ------
    screen.errors.ScreenError
        Unreadable file, missing phi data, no exotherm.
    """
    from screen.io.traces import read_trace
    from screen.models import adiabatic as ad
    from screen.models.decomposition import DecompositionKinetics, tmrad

    threshold = ad.DEFAULT_THRESHOLD if threshold is None else threshold
    if free_volume is not None and sample_mass is None:
        raise CaseError("the permanent gas per kg needs the sample mass: give --sample-mass "
                        "with --cell-free-volume", key="--cell-free-volume")
    cell_given = [v is not None for v in (cell_mass, cell_specific_heat)]
    if phi is not None and any(cell_given):
        raise CaseError("give either --phi or the masses and heat capacities of sample and cell, "
                        "not both", key="--phi")
    if phi is None:
        if not all(cell_given) or specific_heat is None or sample_mass is None:
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
        path=str(path), sha256=trace.sha256, phi=phi, phi_basis=basis, threshold=threshold,
        time=t, temperature=temp, rate=rate, pressure=trace.pressure, exotherm=exo, onset=onset,
        onset_corrected=onset_c, maximum_temperature=top, rise_measured=rise_measured,
        rise=rise, conversion_at_onset=alpha0, fit=fit, tmrad_measured=tmr_measured,
        tmrad_corrected=tmr_corrected,
        tmrad_at_measured_onset_phi_one=ad.time_to_maximum_rate_phi_one(tmr_measured, phi),
        specific_heat=specific_heat, fit_temperature=grid, fit_rate=grid_rate,
        corrected_temperature=corrected_t, corrected_rate=corrected_r, notes=notes,
        warnings=warnings, sample_mass=sample_mass, free_volume=free_volume)
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
    if result.free_volume is not None and result.sample_mass is not None:
        from screen.constants import GAS_CONSTANT

        # ideal gas in the free volume at the end temperature (design)
        result.noncondensable_gas = (result.noncondensable_pressure * result.free_volume
                                     / (GAS_CONSTANT * t_end) / result.sample_mass)
    result.noncondensable_basis = (
        f"pressure after cool-down at {t_end - ZERO_CELSIUS:.1f} degC minus the pressure "
        "recorded at the same temperature before the exotherm (permanent gas; design)")
    if result.noncondensable_pressure > 0.05 * max(p_ref, 1e5):
        result.warnings.append(
            f"{Path(result.path).name}: the decomposition leaves "
            f"{result.noncondensable_pressure / 1e5:.3g} bar of permanent gas after cool-down: "
            "a closed vessel stays pressurised; size relief for gas generation")
