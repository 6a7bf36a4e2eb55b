"""Tests of screen.analyses.pressure (vapour and closed-vessel pressure in the screening result).

The cases are invented parameter sets; expected values come from outside the project:

- IAPWS-IF97 region 4 (IAPWS R7-97) as implemented in ``chemicals.iapws`` / ``Tsat_IAPWS``:
  water boils at 373.124 K (99.974 degC) at 101.325 kPa;
- vapour pressures from the ``chemicals`` package (DIPPR EQ101 with Perry's 8th ed. Table 2-8
  coefficients, chemicals.dippr.EQ101), a general-purpose reference library;
- the ideal-gas law p = n R T / V with R from scipy.constants (CODATA), and Dalton's law of
  partial pressures for the sum;
- the relief verdict bands of screen.models.pressure.relief_verdict (10 % margin, design).
"""

from __future__ import annotations

import pytest
from click.testing import CliRunner
from scipy.constants import R as CODATA_GAS_CONSTANT

from screen.io.case import load_case
from screen.cli import main
from screen.constants import ZERO_CELSIUS
from screen.runs.screening import screen_case
from screen.analyses.pressure import clipped_vapour_pressure, closed_vessel_estimate

chemicals = pytest.importorskip("chemicals")


def case_text(solvent='name = "toluene"\npressure = "1.013 bar"\ngas_yield = "0.2 mol/kg"',
              vessel_extra='headspace_volume = "0.8 m^3"\nrelief_set_pressure = "100 bar"',
              mtt="", decomposition_energy="150 kJ/kg", kinetics=""):
    """An invented batch case with [solvent]; the first argument is the section body."""
    return f"""
[case]
title = "invented case for a pressure test"
[mass]
amount = "1000 kg"
specific_heat = "2.0 kJ/(kg K)"
density = "900 kg/m^3"
[process]
temperature = "60 degC"
mode = "batch"
{mtt}
[synthesis]
energy = "100 kJ/kg"
[solvent]
{solvent}
[decomposition]
energy = "{decomposition_energy}"
model = "nth-order"
order = 1
activation_energy = "150 kJ/mol"
reference_rate = "0.1 W/kg"
reference_temperature = "200 degC"
{kinetics}
[[vessel]]
name = "R1"
heat_transfer_area = "4 m^2"
heat_transfer_coefficient = "300 W/(m^2 K)"
coolant_temperature = "20 degC"
volume = "2.0 m^3"
{vessel_extra}
"""


def screen_text(tmp_path, text, curves=False):
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    return screen_case(load_case(path), curves=curves)


def toluene_reference(temperature):
    """Vapour pressure of toluene from chemicals' Perry's Table 2-8 coefficients. [Pa]"""
    from chemicals import dippr, vapor_pressure

    row = vapor_pressure.Psat_data_Perrys2_8.loc["108-88-3"]
    return dippr.EQ101(temperature, row.C1, row.C2, row.C3, row.C4, row.C5)


def test_water_boiling_point_sets_the_mtt(tmp_path):
    # IAPWS-IF97 region 4: T_sat(101.325 kPa) = 373.124 K = 99.974 degC; within 0.3 K.
    from chemicals.vapor_pressure import Tsat_IAPWS

    text = case_text(solvent='name = "water"\npressure = "101.325 kPa"')
    result = screen_text(tmp_path, text)
    reference = Tsat_IAPWS(101325.0) - ZERO_CELSIUS
    assert reference == pytest.approx(99.974, abs=1e-3)
    assert result.results["mtt_degC"] == pytest.approx(reference, abs=0.3)
    assert result.results["pressure"]["boiling_temperature_degC"] == pytest.approx(reference,
                                                                                  abs=0.3)


def test_vapour_pressures_against_chemicals(tmp_path):
    result = screen_text(tmp_path, case_text())
    pressure = result.results["pressure"]
    by_point = {entry["point"]: entry for entry in pressure["vapour_pressures"]}
    mtsr = result.results["mtsr_degC"] + ZERO_CELSIUS
    final = result.results["final_temperature_degC"] + ZERO_CELSIUS
    entry = by_point["MTSR, from [process]"]
    assert entry["temperature_degC"] == pytest.approx(mtsr - ZERO_CELSIUS)
    assert entry["vapour_pressure_bar"] * 1e5 == pytest.approx(toluene_reference(mtsr), rel=1e-6)
    entry = by_point["final temperature"]
    assert entry["range"] == "in range"
    assert entry["vapour_pressure_bar"] * 1e5 == pytest.approx(toluene_reference(final), rel=1e-6)


def test_closed_vessel_pressure_against_dalton_and_ideal_gas(tmp_path):
    # p = p_sat(T) + (p0 - p_sat(T_p)) T/T_p + n R T/V (Dalton; ideal gas with CODATA R;
    # p_sat from chemicals), n = gas yield x batch mass.
    result = screen_text(tmp_path, case_text())
    vessel = result.results["pressure"]["vessels"][0]
    t_final = result.results["final_temperature_degC"] + ZERO_CELSIUS
    t_p = 60.0 + ZERO_CELSIUS
    moles = 0.2 * 1000.0
    expected = (toluene_reference(t_final)
                + (1.013e5 - toluene_reference(t_p)) * t_final / t_p
                + moles * CODATA_GAS_CONSTANT * t_final / 0.8)
    assert vessel["gas_moles"] == pytest.approx(moles)
    assert vessel["total_bar"] * 1e5 == pytest.approx(expected, rel=1e-6)
    assert vessel["headspace_basis"] == "given"
    assert vessel["is_lower_bound"] is False
    assert vessel["verdict"] == ("below" if expected < 0.9 * 100e5 else "near")


@pytest.mark.parametrize("set_pressure, verdict", [("1000 bar", "below"), ("2 bar", "exceeds")])
def test_relief_verdict(tmp_path, set_pressure, verdict):
    extra = f'headspace_volume = "0.8 m^3"\nrelief_set_pressure = "{set_pressure}"'
    result = screen_text(tmp_path, case_text(vessel_extra=extra))
    vessel = result.results["pressure"]["vessels"][0]
    assert vessel["verdict"] == verdict
    flagged = any("closed-vessel pressure" in text for text in result.warnings)
    assert flagged == (verdict == "exceeds")


def test_above_correlation_range_is_a_lower_bound_and_never_below(tmp_path):
    # Dichloromethane's correlation ends at its critical temperature (510 K); a 500 kJ/kg
    # decomposition takes the mass far above it. Fail closed: no "below" verdict.
    solvent = 'name = "dichloromethane"\npressure = "3 bar"\ngas_yield = "0.1 mol/kg"'
    extra = 'headspace_volume = "0.8 m^3"\nrelief_set_pressure = "10000 bar"'
    result = screen_text(tmp_path, case_text(solvent=solvent, vessel_extra=extra,
                                             decomposition_energy="500 kJ/kg"))
    pressure = result.results["pressure"]
    final = next(e for e in pressure["vapour_pressures"] if e["point"] == "final temperature")
    # Issue 13 item 4: above the critical temperature (dichloromethane 510 K: CRC Handbook of
    # Chemistry and Physics, critical constants table, from memory; the bundled table's value)
    # no vapour pressure is printed: null with above_critical_temperature true.
    assert final["range"] == "above critical temperature"
    assert final["above_critical_temperature"] is True
    assert final["vapour_pressure_bar"] is None
    vessel = pressure["vessels"][0]
    assert vessel["is_lower_bound"] is True
    assert vessel["vapour_bar"] is None and vessel["total_bar"] is None
    assert vessel["total_lower_bound_bar"] == pytest.approx(
        vessel["pad_gas_bar"] + vessel["decomposition_gas_bar"], rel=1e-9)
    assert vessel["verdict"] == "not assessed"
    assert any("NOT ASSESSED" in text for text in result.warnings)


def test_missing_gas_yield_is_not_assessed(tmp_path):
    solvent = 'name = "toluene"\npressure = "1.013 bar"'
    result = screen_text(tmp_path, case_text(solvent=solvent))
    vessel = result.results["pressure"]["vessels"][0]
    assert vessel["decomposition_gas_bar"] == 0.0
    assert vessel["verdict"] == "not assessed"
    assert "gas_yield" in vessel["reason"]


def test_headspace_from_vessel_volume(tmp_path):
    # Headspace = vessel volume - batch mass / density (no headspace_volume given).
    result = screen_text(tmp_path, case_text(vessel_extra='relief_set_pressure = "100 bar"'))
    vessel = result.results["pressure"]["vessels"][0]
    assert vessel["headspace_m3"] == pytest.approx(2.0 - 1000.0 / 900.0)
    assert vessel["headspace_basis"] == "vessel volume minus fill volume"


def test_solvent_without_name(tmp_path):
    solvent = 'latent_heat = "360 kJ/kg"\ngas_yield = "0.2 mol/kg"'
    result = screen_text(tmp_path, case_text(solvent=solvent,
                                             mtt='max_technical_temperature = "110 degC"'))
    pressure = result.results["pressure"]
    assert pressure["solvent"] is None
    assert pressure["vapour_pressures"] == []
    vessel = pressure["vessels"][0]
    assert vessel["is_lower_bound"] is True
    assert vessel["verdict"] in ("not assessed", "exceeds")
    # Without vapour the pad gas is the whole operating pressure (1 atm assumed) scaled by T.
    t_final = result.results["final_temperature_degC"] + ZERO_CELSIUS
    assert vessel["pad_gas_bar"] == pytest.approx(1.01325 * t_final / (60.0 + ZERO_CELSIUS))


def test_simulated_mtsr_points_are_reported(tmp_path):
    kinetics = """
[synthesis_kinetics]
scheme = "second-order"
rate_constant = "1e-3 L/(mol s)"
reference_temperature = "60 degC"
activation_energy = "70 kJ/mol"
molar_enthalpy = "-120 kJ/mol"
initial_amount_a = "1000 mol"
initial_amount_b = "1000 mol"
"""
    result = screen_text(tmp_path, case_text(kinetics=kinetics))
    points = [entry["point"] for entry in result.results["pressure"]["vapour_pressures"]]
    assert "MTSR, sim. feed stopped" in points
    # Batch: adiabatic rise 1000 mol x 120 kJ/mol / (1000 kg x 2 kJ/(kg K)) = 60 K
    # (Stoessel 2008 ch. 2), above the 50 K of [synthesis] energy, so the final temperature
    # follows the simulated 120 degC MTSR.
    assert result.results["mtsr_degC"] == pytest.approx(110.0, abs=1e-9)
    assert result.results["simulation"]["mtsr_feed_stopped_degC"] == pytest.approx(120.0, abs=1e-6)
    rise = result.results["decomposition_adiabatic_rise_K"]
    assert result.results["pressure"]["final_temperature_degC"] == pytest.approx(120.0 + rise,
                                                                                abs=1e-6)
    assert result.results["pressure"]["final_temperature_basis"].startswith("simulated")


def test_clipping_helpers_match_the_model_in_range():
    # Inside the range the estimate equals the model's own closed-vessel pressure.
    from screen.models.pressure import closed_vessel_pressure
    from screen.models.solvents import lookup_solvent

    toluene = lookup_solvent("toluene")
    estimate = closed_vessel_estimate(450.0, toluene, 1.5, 300.0, 1.2e5, 330.0)
    model = closed_vessel_pressure(450.0, toluene, 1.5, gas_moles=300.0, initial_pressure=1.2e5,
                                   initial_temperature=330.0)
    assert estimate["total"] == pytest.approx(model, rel=1e-12)
    pressure, at, status = clipped_vapour_pressure(toluene, 100.0)
    assert status == "below range" and at == toluene.minimum_temperature
    assert pressure == pytest.approx(toluene_reference(toluene.minimum_temperature), rel=1e-6)


def test_unknown_solvent_exit_2(tmp_path):
    path = tmp_path / "case.toml"
    path.write_text(case_text(solvent='name = "unobtainium"'), encoding="utf-8")
    result = CliRunner().invoke(main, ["check", str(path)])
    assert result.exit_code == 2
    err = result.stderr.strip()
    assert "\n" not in err and "solvent.name" in err


def test_above_critical_temperature_without_set_pressure_is_not_acceptable(tmp_path):
    # Issue 13 item 4: a closed-vessel verdict above the critical temperature must not read as
    # acceptable ("no set pressure" read as neutral before): "not assessed", value null.
    solvent = 'name = "dichloromethane"\npressure = "3 bar"\ngas_yield = "0.1 mol/kg"'
    extra = 'headspace_volume = "0.8 m^3"'
    result = screen_text(tmp_path, case_text(solvent=solvent, vessel_extra=extra,
                                             decomposition_energy="500 kJ/kg"), curves=True)
    vessel = result.results["pressure"]["vessels"][0]
    assert vessel["above_critical_temperature"] is True
    assert vessel["verdict"] == "not assessed"
    assert "critical temperature" in vessel["reason"]
    lines = "\n".join(result.results["pressure"]["summary_lines"])
    assert "above T_c" in lines


def _perry_density(cas, molar_mass, temperature):
    """Liquid density from the DIPPR 105 coefficients of Perry's 8th ed. (Table 2-32) in the
    chemicals package, an independent correlation. [kg/m^3]"""
    import chemicals.volume as volume
    from chemicals.dippr import EQ105

    volume._load_rho_data()
    row = volume.rho_data_Perry_8E_105_l.loc[cas]
    return EQ105(temperature, row["C1"], row["C2"], row["C3"], row["C4"]) * molar_mass


@pytest.mark.parametrize("name, cas", [("toluene", "108-88-3"), ("acetic acid", "64-19-7"),
                                       ("methanol", "67-56-1")])
@pytest.mark.parametrize("celsius", [25.0, 100.0, 150.0, 200.0])
def test_liquid_density_against_perry_dippr105(name, cas, celsius):
    # Rackett form fitted to the table's two densities (screen.models.solvents.liquid_density)
    # against DIPPR 105 (Perry's 8th ed., via chemicals): within 1.5 % up to 200 degC.
    from screen.models.solvents import liquid_density, lookup_solvent

    solvent = lookup_solvent(name)
    t = celsius + ZERO_CELSIUS
    assert liquid_density(solvent, t) == pytest.approx(
        _perry_density(cas, solvent.molar_mass, t), rel=0.015)


def test_liquid_expansion_that_fills_the_vessel_is_flagged():
    # Issue 18 item 8: the acylation runaway takes toluene from 50 to about 298 degC; the
    # liquid volume grows by rho(T_p)/rho(T_final) (about 1.7, DIPPR 105 via chemicals) and
    # fills the 6.3 m3 vessel: liquid-full warning, the pressure is a lower bound.
    import pathlib

    from screen.io.case import load_case

    case = load_case(pathlib.Path(__file__).parent.parent / "cases"
                     / "acylation_semibatch_kinetics.toml")
    result = screen_case(case, curves=False)
    vessel = result.results["pressure"]["vessels"][0]
    expansion = vessel["liquid_expansion"]
    t_p = float(case.sections["process"].temperature)
    t_f = expansion["temperature_K"]
    expected = (_perry_density("108-88-3", 0.09214, t_p)
                / _perry_density("108-88-3", 0.09214, t_f))
    assert expansion["expansion_ratio"] == pytest.approx(expected, rel=0.03)
    assert expansion["liquid_full"] is True
    assert vessel["is_lower_bound"] is True
    assert any("liquid-full" in w for w in result.warnings)


def test_small_expansion_is_not_flagged(tmp_path):
    extra = 'headspace_volume = "0.8 m^3"\nrelief_set_pressure = "1000 bar"'
    solvent = 'name = "toluene"\npressure = "1.013 bar"\ngas_yield = "0.1 mol/kg"'
    result = screen_text(tmp_path, case_text(solvent=solvent, vessel_extra=extra,
                                             decomposition_energy="60 kJ/kg"))
    vessel = result.results["pressure"]["vessels"][0]
    assert vessel["liquid_expansion"]["liquid_full"] is False
    assert not any("liquid-full" in w for w in result.warnings)
