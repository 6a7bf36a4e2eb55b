"""Technical limits that only make a verdict more critical (issue 18 items 4, 5, 11).

Sources named beside each check. The bundled cases are invented demo data: they are used as
inputs only; check values come from independent computations (the `chemicals` package's DIPPR
coefficients with scipy's brentq, the ideal gas law, the Townsend-Tou formula) or from the
published definitions (Stoessel 2008, Thermal Safety of Chemical Processes, Wiley-VCH, ch. 3:
MTT of a closed reactor, severity table; from memory).
"""

from __future__ import annotations

import copy
import math
import pathlib

import pytest

from screen.analyses.engine import screen_case
from screen.constants import GAS_CONSTANT, STANDARD_ATMOSPHERE, ZERO_CELSIUS
from screen.io.case import build_case, load_case

CASES = pathlib.Path(__file__).parent.parent / "cases"


def _raw(name):
    return copy.deepcopy(load_case(str(CASES / name)).raw)


def _screen(data):
    return screen_case(build_case(data, path="<test>"), curves=False)


# --------------------------------------------------------------------------------------------
# Item 4: MTT of a closed vessel


def _toluene_limit_independent(set_pressure, closing_pressure, t0):
    """p_sat(T) + (p0 - p_sat(T0)) T/T0 = p_set with the DIPPR 101 coefficients of toluene from
    the chemicals package (Perry's 8th ed. Table 2-8) and the ideal gas law for the pad gas."""
    from chemicals.dippr import EQ101
    from chemicals.vapor_pressure import Psat_data_Perrys2_8
    from scipy.optimize import brentq

    row = Psat_data_Perrys2_8.loc["108-88-3"]
    coeffs = [float(row[f"C{i}"]) for i in range(1, 6)]

    def psat(t):
        return EQ101(t, *coeffs)

    pad0 = closing_pressure - psat(t0)
    return brentq(lambda t: psat(t) + pad0 * t / t0 - set_pressure, t0, 590.0, xtol=1e-10)


def test_pressure_limit_temperature_toluene_matches_independent_solution():
    from screen.models.pressure import pressure_limit_temperature
    from screen.models.solvents import lookup_solvent

    t0 = 60.0 + ZERO_CELSIUS
    temperature, status = pressure_limit_temperature(4.5e5, lookup_solvent("toluene"),
                                                     STANDARD_ATMOSPHERE, t0)
    assert status == "reached"
    assert temperature == pytest.approx(_toluene_limit_independent(4.5e5, STANDARD_ATMOSPHERE, t0),
                                        abs=0.05)


def test_pressure_limit_temperature_pad_gas_only_is_gay_lussac():
    # Ideal gas at constant volume: T = T0 p_set / p0 (gas laws).
    from screen.models.pressure import pressure_limit_temperature

    temperature, status = pressure_limit_temperature(3e5, None, 1e5, 300.0)
    assert (temperature, status) == (pytest.approx(900.0, rel=1e-12), "reached")


def test_closed_vessel_mtt_per_vessel_and_class_from_the_most_critical_vessel():
    # Issue 18 item 4 demo: the acylation vessel's 4.5 bar(a) rupture disc gives an MTT of about
    # 158 degC, above TD24 (154 degC): class 2, not 1 (Stoessel 2008 ch. 3: MTT of a closed
    # reactor = temperature at the relief set pressure).
    data = _raw("acylation_semibatch_kinetics.toml")
    data["process"]["feed_interlock"] = True  # the demo of item 4 is on the feed-stopped MTSR
    open_result = _screen(copy.deepcopy(data))
    data["vessel"][0]["closed"] = True
    result = _screen(data)
    r = result.results
    vessel = r["vessels"][0]
    t0 = float(load_case(str(CASES / "acylation_semibatch_kinetics.toml"))
               .sections["process"].temperature)
    expected = _toluene_limit_independent(4.5e5, STANDARD_ATMOSPHERE, t0) - ZERO_CELSIUS
    assert vessel["mtt_degC"] == pytest.approx(expected, abs=0.05)
    assert vessel["mtt_degC"] > r["td24_degC"]
    assert open_result.results["criticality_class"] == 1
    assert vessel["criticality_class"] == 2
    assert r["criticality_class"] == 2
    assert open_result.results["vessels"][0]["mtt_degC"] == pytest.approx(r["mtt_degC"])


def test_closed_vessel_without_set_pressure_has_no_technical_limit():
    data = _raw("acylation_semibatch_kinetics.toml")
    data["vessel"][0]["closed"] = True
    del data["vessel"][0]["relief_set_pressure"]
    result = _screen(data)
    vessel = result.results["vessels"][0]
    assert vessel["mtt_degC"] is None
    assert "no technical limit" in vessel["mtt_basis"]
    assert vessel["criticality_class"] == 2  # MTSR < TD24 < MTT (= no limit)
    assert any("no technical limit" in w for w in result.warnings)


# --------------------------------------------------------------------------------------------
# Item 5: severity and pressure


def test_severity_never_negligible_with_gas_yield_or_above_boiling():
    # Stoessel 2008 ch. 3 (severity table, from memory): "negligible" needs a small rise AND no
    # pressure increase. Demo: alkylation with a weak decomposition and a gas yield.
    data = _raw("alkylation_reflux_class4.toml")
    data["decomposition"]["energy"] = "40 kJ/kg"
    data["synthesis"]["energy"] = "20 kJ/kg"
    data["solvent"]["gas_yield"] = "0.5 mol/kg"
    r = _screen(copy.deepcopy(data)).results
    assert r["runaway_adiabatic_rise_K"] < 50.0
    assert (r["severity_4"], r["severity"]) == ("medium", "medium")
    assert r["pressure_increase"] is True
    del data["solvent"]["gas_yield"]
    r = _screen(data).results
    assert r["final_temperature_degC"] < r["mtt_degC"]
    assert (r["severity_4"], r["severity"]) == ("negligible", "low")


def test_severity_with_pressure_model_function():
    from screen.models.criticality import severity_with_pressure

    assert severity_with_pressure(49.0, 4, True) == "medium"
    assert severity_with_pressure(49.0, 3, True) == "medium"
    assert severity_with_pressure(49.0, 4, False) == "negligible"
    assert severity_with_pressure(250.0, 4, True) == "critical"


# --------------------------------------------------------------------------------------------
# Item 11: nth-order TMRad against Townsend-Tou


def _tt_hours(t0, cp, q_ref, t_ref, e):
    """Townsend & Tou, Thermochim. Acta 37 (1980) 1-30: TMRad = c'p R T0^2 / (q(T0) E) [h]."""
    q = q_ref * math.exp(-e / GAS_CONSTANT * (1.0 / t0 - 1.0 / t_ref))
    return cp * GAS_CONSTANT * t0 ** 2 / (q * e) / 3600.0


def test_townsend_tou_shown_and_governs_when_it_changes_the_band():
    # Issue 18 item 11: the alkylation case with the reference rate scaled so that Townsend-Tou
    # gives 7.5 h (band "probable", <= 8 h) and the integrated first-order value about 8.5 h
    # ("occasional"): the more critical band governs unless the range is declared validated.
    data = _raw("alkylation_reflux_class4.toml")
    base = _screen(copy.deepcopy(data)).results
    scale = base["tmrad_at_mtsr_zero_order_h"] / 7.5
    data["decomposition"]["reference_rate"] = f"{1.5 * scale!r} W/kg"
    r = _screen(copy.deepcopy(data)).results
    t0 = r["mtsr_degC"] + ZERO_CELSIUS
    expected_tt = _tt_hours(t0, 1900.0, 1.5 * scale, 150.0 + ZERO_CELSIUS, 110e3)
    assert r["tmrad_at_mtsr_townsend_tou_h"] == pytest.approx(expected_tt, rel=1e-6)
    assert r["tmrad_at_mtsr_townsend_tou_h"] == pytest.approx(7.5, rel=1e-6)
    assert r["tmrad_at_mtsr_h"] > 8.0
    assert r["probability_6"] == "probable"
    assert "Townsend-Tou" in r["tmrad_governing"]
    data["decomposition"]["validated_range"] = True
    r = _screen(data).results
    assert r["probability_6"] == "occasional"
    assert "validated" in r["tmrad_governing"]


def test_townsend_tou_shown_when_it_changes_nothing():
    r = _screen(_raw("alkylation_reflux_class4.toml")).results
    assert r["tmrad_at_mtsr_townsend_tou_h"] == pytest.approx(r["tmrad_at_mtsr_zero_order_h"],
                                                              rel=1e-9)
    assert r["td24_townsend_tou_degC"] < r["td24_degC"]
    assert r["tmrad_governing"].startswith("nth-order")
