"""An extrapolated DSC onset converted to a detection point (issue 18 item 3).

The conversion (screen.models.dsc.detection_point_from_extrapolated_onset, derived) is checked
against an independent simulated dynamic DSC run: a first-order reaction integrated with scipy's
solve_ivp under linear heating, its tangent onset found numerically (tangent at the steepest point
of the leading edge on the zero baseline) and the first crossing of the detection limit
interpolated. The crude estimate's E and detection limit (50 kJ/mol, 20 W/kg) are those of
Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41 (from memory).
"""

from __future__ import annotations

import copy
import math
import pathlib

import numpy as np
import pytest

from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.errors import CaseError
from screen.models import dsc

CASES = pathlib.Path(__file__).parent.parent / "cases"


def simulated_run(log_a, activation_energy, heating_rate, energy, detection_limit=20.0):
    """(tangent onset, detection point) [K] of a simulated first-order DSC run (solve_ivp)."""
    from scipy.integrate import solve_ivp

    a = math.exp(log_a)

    def rhs(t, y):
        return [a / heating_rate * math.exp(-activation_energy / (GAS_CONSTANT * t)) * (1 - y[0])]

    grid = np.arange(250.0, 900.0, 0.01)
    sol = solve_ivp(rhs, (grid[0], grid[-1]), [0.0], t_eval=grid, method="LSODA",
                    rtol=1e-10, atol=1e-14)
    alpha = sol.y[0]
    q = energy * a * np.exp(-activation_energy / (GAS_CONSTANT * grid)) * (1 - alpha)
    peak = int(np.argmax(q))
    slope = np.gradient(q, grid)
    steepest = int(np.argmax(slope[:peak]))
    onset = grid[steepest] - q[steepest] / slope[steepest]
    first = int(np.argmax(q >= detection_limit))
    t_det = np.interp(detection_limit, q[first - 1:first + 1], grid[first - 1:first + 1])
    return float(onset), float(t_det)


def _log_a_for_peak(peak, activation_energy, heating_rate):
    # Kissinger's peak condition (ASTM E698): E beta/(R Tm^2) = A exp(-E/(R Tm)).
    return (math.log(activation_energy * heating_rate / (GAS_CONSTANT * peak ** 2))
            + activation_energy / (GAS_CONSTANT * peak))


@pytest.mark.parametrize("activation_energy, rate_k_per_min", [(80e3, 10.0), (120e3, 10.0),
                                                                (200e3, 2.0)])
def test_conversion_reproduces_a_simulated_run(activation_energy, rate_k_per_min):
    beta = rate_k_per_min / 60.0
    log_a = _log_a_for_peak(300.0 + ZERO_CELSIUS, activation_energy, beta)
    onset_sim, detection_sim = simulated_run(log_a, activation_energy, beta, 450e3)
    assert dsc.first_order_scan_onset(log_a, activation_energy, beta) == pytest.approx(
        onset_sim, abs=0.05)
    converted = dsc.detection_point_from_extrapolated_onset(onset_sim, beta, 450e3, 20.0,
                                                            activation_energy)
    assert converted == pytest.approx(detection_sim, abs=0.1)
    assert detection_sim < onset_sim


@pytest.mark.parametrize("activation_energy, rate_k_per_min, energy", [
    (80e3, 10.0, 450e3), (120e3, 10.0, 450e3), (200e3, 2.0, 450e3), (150e3, 4.0, 1500e3),
    (250e3, 20.0, 300e3)])
def test_conservative_detection_point_is_not_above_the_simulated_one(activation_energy,
                                                                     rate_k_per_min, energy):
    # The real E is unknown: the conversion scans 50-300 kJ/mol and takes the lowest point, so
    # it lies at or below the detection point of any first-order run in that range.
    beta = rate_k_per_min / 60.0
    log_a = _log_a_for_peak(280.0 + ZERO_CELSIUS, activation_energy, beta)
    onset_sim, detection_sim = simulated_run(log_a, activation_energy, beta, energy)
    conservative, _ = dsc.conservative_detection_point(onset_sim, beta, energy)
    assert conservative <= detection_sim + 0.1
    assert conservative <= onset_sim


def test_issue_demo_first_order_run_at_10_k_per_min():
    # Issue 18 item 3: a first-order run at 10 K/min with its tangent onset at 260 degC reaches
    # 20 W/kg tens of kelvin lower; the conversion finds a point at least 40 K lower.
    conservative, _ = dsc.conservative_detection_point(260.0 + ZERO_CELSIUS, 10.0 / 60.0, 450e3)
    assert 260.0 + ZERO_CELSIUS - conservative > 40.0


# --------------------------------------------------------------------------------------------
# The case engine


def _amidation(**decomposition):
    from screen.io.case import load_case

    raw = copy.deepcopy(load_case(str(CASES / "amidation_onset_only.toml")).raw)
    raw["decomposition"].update(decomposition)
    return raw


def _screen(raw):
    from screen.analyses.engine import screen_case
    from screen.io.case import build_case

    return screen_case(build_case(raw, path="<test>"), curves=False).results


def test_extrapolated_onset_lowers_the_crude_td24_and_gives_the_class():
    # The bundled onset-only example declared as an extrapolated onset at 10 K/min.
    from scipy.optimize import brentq

    undeclared = _screen(_amidation())
    r = _screen(_amidation(onset_type="extrapolated", onset_scan_rate="10 K/min"))
    reference = r["onset_estimate"]["reference_temperature_degC"] + ZERO_CELSIUS
    expected_ref, _ = dsc.conservative_detection_point(260.0 + ZERO_CELSIUS, 10.0 / 60.0, 450e3)
    assert reference == pytest.approx(expected_ref, abs=1e-6)
    # TD24 of the crude zero-order estimate from that point: Townsend & Tou (1980),
    # c'p R T^2 / (q(T) E) = 24 h with q(T) = 20 W/kg exp(-E/R (1/T - 1/T_ref)), E = 50 kJ/mol.
    cp, e = 2000.0, 50e3

    def tmr_minus_24h(t):
        q = 20.0 * math.exp(-e / GAS_CONSTANT * (1.0 / t - 1.0 / reference))
        return cp * GAS_CONSTANT * t ** 2 / (q * e) - 24 * 3600.0

    td24 = brentq(tmr_minus_24h, 250.0, reference, xtol=1e-10) - ZERO_CELSIUS
    assert r["td24_degC"] == pytest.approx(td24, abs=0.01)
    assert r["td24_degC"] < undeclared["td24_degC"] - 20.0
    assert (r["criticality_class"], r["verdict_status"]) == (5, "crude-estimate")
    assert undeclared["criticality_class"] is None


def test_detection_point_onset_uses_the_declared_limit():
    r = _screen(_amidation(onset_type="detection-point", onset_detection_limit="5 W/kg"))
    assert r["onset_estimate"]["reference_rate_W_per_kg"] == pytest.approx(5.0)
    assert r["onset_estimate"]["reference_temperature_degC"] == pytest.approx(260.0)


@pytest.mark.parametrize("decomposition, key", [
    ({"onset_type": "extrapolated"}, "decomposition.onset_scan_rate"),
    ({"onset_type": "detection-point"}, "decomposition.onset_detection_limit"),
    ({"onset_scan_rate": "10 K/min"}, "decomposition.onset_type"),
])
def test_onset_type_needs_its_figure(decomposition, key):
    with pytest.raises(CaseError) as info:
        _screen(_amidation(**decomposition))
    assert info.value.key == key


def test_undeclared_onset_grants_no_class_below_5():
    # Fail closed: with the onset type unknown even a crude class 4 is not granted.
    raw = _amidation()
    raw["process"]["max_technical_temperature"] = "120 degC"
    raw["synthesis"]["energy"] = "120 kJ/kg"  # MTSR 150 degC > crude TD24 135 degC > MTT
    r = _screen(raw)
    assert r["onset_estimate"]["declared"] is False
    assert r["criticality_class_computed"] == 4
    assert (r["criticality_class"], r["verdict_status"]) == (None, "cannot-conclude")
    raw["decomposition"].update(onset_type="detection-point", onset_detection_limit="20 W/kg")
    r = _screen(raw)
    assert (r["criticality_class"], r["verdict_status"]) == (4, "crude-estimate")
