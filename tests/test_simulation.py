"""Tests of screen.analyses.simulation (the cooling-failure simulation wired into the case and the engine).

The physics of the reactor model is tested in tests/test_reactor.py; here the case keys, the
engine hook, the JSON members and the command line are checked. The cases below are invented
parameter sets (the example case file included); none of their outputs is a check value. Expected
values come from named outside sources:

- adiabatic temperature rise dT_ad = n (-dH_r) / (m c'p) and batch MTSR = T_p + dT_ad
  (Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 2; Stoessel, Chem. Eng.
  Prog. 89(10) (1993) 68-75);
- the first-law energy balance of adiabatic mixing and reaction with constant c'p (derived from
  the same definition) for a feed that runs on after the failure;
- scipy.integrate.solve_ivp (a general-purpose reference library) for an independent
  integration of the adiabatic batch.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from screen.io.case import build_case, load_case
from screen.cli import main
from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.runs.screening import screen_case
from screen.errors import CaseError
from screen.analyses.simulation import (
    FULL_SCAN_POINTS,
    QUICK_SCAN_POINTS,
    DecompositionSource,
    parse_feed_profile,
)

REPOSITORY = Path(__file__).resolve().parents[1]
EXAMPLE = REPOSITORY / "cases" / "acylation_semibatch_kinetics.toml"
HOUR = SECONDS_PER_HOUR

# Keys whose value may be null in the JSON: "not reached within the simulated 24 h" and figures
# that do not exist for the case (documented in screen.analyses.simulation.add_simulation).
NULLABLE = {"time_to_mtt_h", "time_to_mtt_feed_continuing_h", "shortest_time_to_mtt_h",
            "accumulation_stated", "accumulation_stated_lower", "damkoehler_number",
            "synthesis_heat_release_rate_at_mtt_W_per_kg"}


def batch_case_text(scheme="second-order", batch_mass=None, extra_kinetics=""):
    """An invented batch case (inputs only; expectations are computed from the formulas)."""
    if scheme == "second-order":
        kinetics = ('scheme = "second-order"\nrate_constant = "1e-3 L/(mol s)"\n'
                    'initial_amount_b = "1200 mol"\n')
    else:
        kinetics = 'scheme = "first-order"\nrate_constant = "2e-4 1/s"\n'
    vessel_mass = "" if batch_mass is None else f'batch_mass = "{batch_mass}"\n'
    return f"""
[case]
title = "invented batch for a test"
[mass]
amount = "1000 kg"
specific_heat = "2.0 kJ/(kg K)"
density = "1000 kg/m^3"
[process]
temperature = "40 degC"
mode = "batch"
max_technical_temperature = "150 degC"
[synthesis]
molar_enthalpy = "-100 kJ/mol"
limiting_amount = "1000 mol"
[synthesis_kinetics]
{kinetics}reference_temperature = "40 degC"
activation_energy = "70 kJ/mol"
initial_amount_a = "1000 mol"
{extra_kinetics}
[decomposition]
energy = "300 kJ/kg"
model = "nth-order"
order = 1
activation_energy = "150 kJ/mol"
reference_rate = "0.1 W/kg"
reference_temperature = "200 degC"
[[vessel]]
name = "R1"
heat_transfer_area = "4 m^2"
heat_transfer_coefficient = "300 W/(m^2 K)"
coolant_temperature = "20 degC"
{vessel_mass}"""


def load_text(tmp_path, text, name="case.toml", overrides=()):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return load_case(path, overrides=overrides)


@pytest.fixture(scope="module")
def example_json():
    """One full `check --json` of the example case through the command line (reused)."""
    result = CliRunner().invoke(main, ["check", str(EXAMPLE), "--json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


# ------------------------------------------------------------------------------------------------
# Published limits through the engine
# ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize("scheme, batch_mass", [("second-order", None),
                                                ("second-order", "250 kg"),
                                                ("first-order", None)])
def test_batch_adiabatic_limit_through_engine(tmp_path, scheme, batch_mass):
    # Source: dT_ad = n (-dH_r)/(m c'p) and, for a batch (X_ac = 1), MTSR = T_p + dT_ad
    # (Stoessel 2008 ch. 2; Stoessel 1993). The limit is scale-free, so a vessel holding a quarter
    # of the batch (amounts scaled with it) must give the same temperature.
    case = load_text(tmp_path, batch_case_text(scheme, batch_mass))
    result = screen_case(case, curves=False)
    sim = result.results["simulation"]
    extent = 1000.0  # mol: A is limiting (second order: B 1200 mol; first order: B = A)
    expected = 40.0 + extent * 100e3 / (1000.0 * 2000.0)
    assert expected == pytest.approx(90.0)
    # Analytic MTSR(t) on the dense solution, worst at the start of a batch.
    assert sim["mtsr_feed_stopped_degC"] == pytest.approx(expected, abs=1e-6)
    assert sim["worst_failure_time_h"] == pytest.approx(0.0, abs=1e-6)
    # The simulated adiabatic course after the failure ends at the same temperature.
    assert sim["mtsr_feed_stopped_reached_degC"] == pytest.approx(expected, abs=0.01)
    assert sim["mtsr_feed_continuing_degC"] == pytest.approx(expected, abs=0.01)
    # The engine's MTSR from [synthesis] (batch, X_ac = 1) agrees.
    assert result.results["mtsr_degC"] == pytest.approx(expected, abs=1e-9)
    assert sim["mode"] == "batch"
    assert sim["scan_points"] == QUICK_SCAN_POINTS
    assert "simulation" not in result.curves
    if batch_mass is None:
        assert sim["scale_factor"] == 1.0
    else:
        assert sim["scale_factor"] == pytest.approx(0.25)
        assert "scaled by 0.25" in result.methods["simulation"]


def test_batch_course_against_independent_solve_ivp(tmp_path):
    # Independent integration with scipy solve_ivp (general-purpose reference library) of the
    # adiabatic first-order batch: dX/dt = k(T)(1 - X), T = T0 + dT_ad X (no decomposition
    # heat in this window: its rate at <= 90 degC is below 1e-4 W/kg, < 0.01 K in 1 h). Time to
    # reach 80 degC after a failure at t = 0 must agree.
    from scipy.integrate import solve_ivp

    case = load_text(tmp_path, batch_case_text("first-order"))
    result = screen_case(case, curves=True)
    curve = result.curves["simulation"]
    assert curve["worst_failure_time_s"] == pytest.approx(0.0, abs=1e-6)
    k_ref, t_ref, energy = 2e-4, 313.15, 70e3
    rise = 1000.0 * 100e3 / (1000.0 * 2000.0)

    def rhs(_t, y):
        temperature = 313.15 + rise * y[0]
        k = k_ref * math.exp(-energy / GAS_CONSTANT * (1.0 / temperature - 1.0 / t_ref))
        return [k * (1.0 - y[0])]

    def reach_80(_t, y):
        return 313.15 + rise * y[0] - (80.0 + ZERO_CELSIUS)

    reach_80.terminal = True
    reference = solve_ivp(rhs, (0.0, 10 * HOUR), [0.0], method="Radau", rtol=1e-10,
                          atol=1e-12, events=reach_80)
    expected_time = float(reference.t_events[0][0])
    time = np.asarray(curve["time_after_failure_s"])
    temperature = np.asarray(curve["failure_temperature_K"])
    simulated_time = float(np.interp(80.0 + ZERO_CELSIUS, temperature, time))
    # Tolerance: the figure curve is sampled (300 even points plus solver steps), so the
    # interpolated crossing is good to a fraction of a solver step.
    assert simulated_time == pytest.approx(expected_time, rel=0.01)


def test_synthesis_rate_at_mtt_of_adiabatic_batch(tmp_path):
    # Adiabatic batch: T = T0 + dT_ad X (Stoessel 2008 ch. 2), so at T = MTT the conversion is
    # X = (MTT - T0)/dT_ad and the first-order heat release per kg is
    # (-dH_r) k(MTT) n_A0 (1 - X) / m. The decomposition adds < 1e-4 W/kg below 90 degC.
    text = batch_case_text("first-order").replace('max_technical_temperature = "150 degC"',
                                                  'max_technical_temperature = "70 degC"')
    result = screen_case(load_text(tmp_path, text), curves=False)
    sim = result.results["simulation"]
    rise = 1000.0 * 100e3 / (1000.0 * 2000.0)
    mtt = 70.0 + ZERO_CELSIUS
    conversion = (mtt - 313.15) / rise
    k = 2e-4 * math.exp(-70e3 / GAS_CONSTANT * (1.0 / mtt - 1.0 / 313.15))
    expected = 100e3 * k * 1000.0 * (1.0 - conversion) / 1000.0
    assert sim["synthesis_heat_release_rate_at_mtt_W_per_kg"] == pytest.approx(expected, rel=1e-3)
    # Time from the failure (worst at t = 0 in a batch) to the MTT: with T = T0 + dT_ad X the
    # first-order batch gives t = int_0^X_mtt dX / (k(T(X)) (1 - X)), here by scipy quad
    # (general-purpose reference library). 1e-5 relative (solver tolerance of the simulation).
    from scipy.integrate import quad

    def k_of(temperature):
        return 2e-4 * math.exp(-70e3 / GAS_CONSTANT * (1.0 / temperature - 1.0 / 313.15))

    time_to_mtt, _ = quad(lambda x: 1.0 / (k_of(313.15 + rise * x) * (1.0 - x)), 0.0,
                          conversion, epsabs=0.0, epsrel=1e-12)
    assert sim["worst_failure_time_h"] == pytest.approx(0.0, abs=1e-9)
    assert sim["time_to_mtt_h"] * HOUR == pytest.approx(time_to_mtt, rel=1e-5)


def test_feed_continuing_from_start_ends_at_mixing_temperature(example_json):
    # First-law energy balance with constant c'p (derived from Stoessel 2008 ch. 2 definitions):
    # a failure at t = 0 with the feed running on ends at
    # T = (m0 T0 + m_feed T_D + n (-dH_r)/c'p) / (m0 + m_feed). The example's inputs are read from
    # its JSON "inputs" block; the expectation is the formula, not a stored output.
    inputs = {item["key"]: item["value_si"] for item in example_json["inputs"]}
    m0 = inputs["synthesis_kinetics.initial_mass"]
    m_feed = inputs["synthesis_kinetics.feed_mass"]
    t0 = inputs["synthesis_kinetics.initial_temperature"]
    t_feed = inputs["synthesis_kinetics.feed_temperature"]
    extent = min(inputs["synthesis_kinetics.initial_amount_a"],
                 inputs["synthesis_kinetics.feed_amount"])
    heat = -inputs["synthesis.molar_enthalpy"]
    cp = inputs["mass.specific_heat"]
    expected = (m0 * t0 + m_feed * t_feed + extent * heat / cp) / (m0 + m_feed) - ZERO_CELSIUS
    sim = example_json["results"]["simulation"]
    assert sim["final_temperature_feed_continuing_max_degC"] == pytest.approx(expected, abs=1e-6)
    assert sim["worst_failure_time_feed_continuing_h"] == pytest.approx(0.0, abs=1e-6)
    assert sim["mtsr_feed_continuing_reached_degC"] == pytest.approx(expected, abs=0.05)


# ------------------------------------------------------------------------------------------------
# Accumulation stated in [process] against the simulation
# ------------------------------------------------------------------------------------------------


def test_stated_accumulation_lower_than_simulated_warns():
    case = load_case(EXAMPLE, overrides=["process.accumulation=0.01"])
    result = screen_case(case, curves=False)
    sim = result.results["simulation"]
    assert sim["accumulation_max"] > 0.01
    assert sim["accumulation_stated"] == pytest.approx(0.01)
    assert sim["accumulation_stated_lower"] is True
    assert "stated_accumulation_low" in {item["code"] for item in sim["dosing_warnings"]}
    assert any("lower than the simulated maximum" in text for text in result.warnings)


def test_stated_accumulation_higher_than_simulated_does_not_warn():
    case = load_case(EXAMPLE, overrides=["process.accumulation=0.95"])
    result = screen_case(case, curves=False)
    sim = result.results["simulation"]
    assert sim["accumulation_stated_lower"] is False
    assert not any("lower than the simulated maximum" in text for text in result.warnings)
    assert sim["scan_points"] == QUICK_SCAN_POINTS
    assert "simulation" not in result.curves


def test_accumulation_limit_warns(tmp_path):
    # Limit taken below the simulated maximum: the warning must appear (the limit is a design
    # value, common practice, no source).
    case = load_case(EXAMPLE, overrides=["synthesis_kinetics.accumulation_limit=0.01"])
    result = screen_case(case, curves=False)
    codes = {item["code"] for item in result.results["simulation"]["dosing_warnings"]}
    assert "accumulation" in codes


# ------------------------------------------------------------------------------------------------
# JSON and the command line
# ------------------------------------------------------------------------------------------------


def test_json_members_present_and_finite(example_json):
    sim = example_json["results"]["simulation"]
    required = [
        "accumulation_max", "accumulation_max_time_h", "worst_failure_time_h",
        "mtsr_feed_stopped_degC", "mtsr_feed_continuing_degC", "time_to_mtt_h",
        "time_to_mtt_feed_continuing_h", "time_to_max_rate_h",
        "time_to_max_rate_feed_continuing_h", "decomposition_triggered", "accumulation_stated",
        "accumulation_stated_lower", "dosing_warnings", "scan_points", "method", "summary_lines",
        "normal_operation", "vessel",
    ]
    for key in required:
        assert key in sim, key
    assert sim["scan_points"] == FULL_SCAN_POINTS >= 100
    assert sim["continuations"] >= 2 * FULL_SCAN_POINTS
    assert isinstance(sim["decomposition_triggered"], bool)

    def check(mapping):
        for key, value in mapping.items():
            if isinstance(value, dict):
                check(value)
            elif isinstance(value, float):
                assert math.isfinite(value), key
            elif value is None:
                assert key in NULLABLE, f"{key} is null"

    check(sim)
    assert 0.0 <= sim["accumulation_max"] <= 1.0
    assert sim["mtsr_feed_stopped_degC"] > example_json["results"]["process_temperature_degC"] - 20
    assert "simulation" in example_json["methods"]


def test_summary_lines_fit_the_terminal(example_json):
    from screen.report.terminal import format_check

    lines = example_json["results"]["simulation"]["summary_lines"]
    assert lines[0].startswith("Cooling-failure simulation")
    assert all(len(line) <= 78 for line in lines)
    assert all(line.startswith("  ") for line in lines[1:])
    text = format_check(example_json)
    assert "Cooling-failure simulation" in text


def test_pdf_curves_are_arrays_in_seconds_and_kelvin():
    result = screen_case(load_case(EXAMPLE), curves=True)
    curve = result.curves["simulation"]
    for name in ("time_s", "temperature_K", "accumulation", "mtsr_K", "time_after_failure_s",
                 "failure_temperature_K", "time_after_failure_feed_continuing_s",
                 "failure_temperature_feed_continuing_K"):
        assert np.all(np.isfinite(curve[name])), name
    assert len(curve["time_after_failure_s"]) == len(curve["failure_temperature_K"])
    assert curve["time_after_failure_s"][0] == 0.0
    assert curve["time_after_failure_s"][-1] == pytest.approx(24 * HOUR)
    # Mass-corrected MTSR never below the uncorrected one (m(t) <= m_final; Stoessel 2008 ch. 7).
    assert np.all(curve["mtsr_K"] >= curve["mtsr_without_mass_correction_K"] - 1e-9)
    assert np.min(curve["temperature_K"]) > 200.0  # kelvin, not degC


def _assert_one_line_error(result, fragment):
    assert result.exit_code == 2, result.output
    err = result.stderr.strip()
    assert err.startswith("error: "), err
    assert "\n" not in err
    assert "Traceback" not in err
    assert fragment in err, err


@pytest.mark.parametrize("override, key", [
    ("synthesis_kinetics.rate_constant=2e-4 1/s", "synthesis_kinetics.rate_constant"),
    ("synthesis_kinetics.vessel=R-999", "synthesis_kinetics.vessel"),
    ("synthesis_kinetics.feed_mass=3000 kg", "synthesis_kinetics.feed_mass"),
    ("synthesis_kinetics.molar_enthalpy=95 kJ/mol", "synthesis_kinetics.molar_enthalpy"),
    ("synthesis_kinetics.end_time=3 h", "synthesis_kinetics.end_time"),
    ("synthesis_kinetics.feed_profile=0-1 h: 1", "synthesis_kinetics.dosing_time"),
    ("synthesis_kinetics.first_order_reagent=A", "synthesis_kinetics.first_order_reagent"),
    ("synthesis_kinetics.feed_amount=0 mol", "synthesis_kinetics.dosing_time"),
])
def test_bad_input_gives_exit_2_and_one_line(override, key):
    result = CliRunner().invoke(main, ["check", str(EXAMPLE), "--json", "--set", override])
    _assert_one_line_error(result, key)


def test_malformed_feed_profile_exit_2(tmp_path):
    text = EXAMPLE.read_text(encoding="utf-8").replace(
        'dosing_time = "5 h"                   # constant',
        'feed_profile = "0-2 h 0.5; 2-5 h: 0.5"  # constant')
    text = text.replace('dosing_start = "0 h"', '# dosing_start')
    path = tmp_path / "bad_profile.toml"
    path.write_text(text, encoding="utf-8")
    result = CliRunner().invoke(main, ["check", str(path)])
    _assert_one_line_error(result, "synthesis_kinetics.feed_profile")


# ------------------------------------------------------------------------------------------------
# Case rules and parsing (no simulation)
# ------------------------------------------------------------------------------------------------


def _raw_batch(**changes):
    import tomllib

    raw = tomllib.loads(batch_case_text())
    for dotted, value in changes.items():
        section, name = dotted.split(".")
        if value is None:
            raw[section].pop(name, None)
        else:
            raw[section][name] = value
    return raw


@pytest.mark.parametrize("changes, key", [
    ({"mass.density": None}, "mass.density"),
    ({"synthesis_kinetics.feed_amount": "500 mol"}, "synthesis_kinetics.feed_amount"),
    ({"synthesis_kinetics.dosing_time": "1 h"}, "synthesis_kinetics.dosing_time"),
    ({"synthesis_kinetics.initial_amount_a": None}, "synthesis_kinetics.initial_amount_a"),
    ({"synthesis_kinetics.scheme": None}, "synthesis_kinetics.scheme"),
    ({"synthesis_kinetics.reference_temperature": None},
     "synthesis_kinetics.reference_temperature"),
    ({"synthesis_kinetics.pre_exponential_factor": "1e5 L/(mol s)"},
     "synthesis_kinetics.pre_exponential_factor"),
    ({"synthesis_kinetics.initial_mass": "900 kg"}, "synthesis_kinetics.initial_mass"),
    ({"synthesis_kinetics.initial_amount_b": "0 mol"}, "synthesis_kinetics.initial_amount_b"),
])
def test_contradictions_are_rejected_at_load_time(changes, key):
    with pytest.raises(CaseError) as info:
        build_case(_raw_batch(**changes))
    assert info.value.key == key


def test_first_order_in_a_needs_b_at_least_a():
    raw = _raw_batch(**{"synthesis_kinetics.scheme": "first-order",
                        "synthesis_kinetics.rate_constant": "2e-4 1/s",
                        "synthesis_kinetics.initial_amount_b": "500 mol"})
    with pytest.raises(CaseError) as info:
        build_case(raw)
    assert info.value.key == "synthesis_kinetics.initial_amount_b"


def test_parse_feed_profile():
    pieces = parse_feed_profile("0-1 h: 0.2; 1-3 h: 0.8")
    assert pieces == ((0.0, 3600.0, pytest.approx(0.2)), (3600.0, 10800.0, pytest.approx(0.8)))
    pieces = parse_feed_profile("0-30 min: 25 %; 30-90 min: 75 %")
    assert [piece[:2] for piece in pieces] == [(0.0, 1800.0), (1800.0, 5400.0)]
    assert sum(piece[2] for piece in pieces) == pytest.approx(1.0)


@pytest.mark.parametrize("text, fragment", [
    ("0-1 h: 0.5", "add up to 0.5"),
    ("2-1 h: 1", "end must be after the start"),
    ("0-1: 1", "not understood"),
    ("0-1 h: -0.5; 1-2 h: 1.5", "cannot be negative"),
    ("0-1 parsec: 1", "parsec"),
    ("", "expected"),
])
def test_parse_feed_profile_rejects(text, fragment):
    with pytest.raises(CaseError, match=fragment):
        parse_feed_profile(text)


# ------------------------------------------------------------------------------------------------
# Decomposition heat source (written-out rate law, and consistency with the kinetics object)
# ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize("model, extra", [
    ("nth-order", {"order": 1.5}),
    ("autocatalytic", {"order": 1.0, "autocatalytic_order": 0.7, "initial_conversion": 0.01}),
    ("zero-order", {"order": 0.0}),
])
def test_decomposition_source_equals_kinetics_rate(model, extra):
    # Expected side written out here: q(T, a) = Q/(1 - a0) A exp(-E/(R T)) a^m (1 - a)^n
    # (extended Prout-Tompkins form, Sestak & Berggren, Thermochim. Acta 3 (1971) 1), with A
    # fixed by the fresh-mass rate q_ref = 1 W/kg at 450 K, i.e.
    # q(T, a) = q_ref exp(-(E/R)(1/T - 1/T_ref)) f(a)/f(a0). Also consistent with
    # DecompositionKinetics.heat_release_rate (the fast scalar path must not change numbers).
    from screen.models.decomposition import DecompositionKinetics

    kinetics = DecompositionKinetics.from_reference_rate(model, 400e3, 120e3, 1.0, 450.0,
                                                         **extra)
    source = DecompositionSource(kinetics)
    n = extra.get("order", 0.0)
    m = extra.get("autocatalytic_order", 0.0)
    a0 = extra.get("initial_conversion", 0.0)

    def shape(a):
        return (a**m if m else 1.0) * (1.0 - a) ** n

    temperatures = np.array([300.0, 400.0, 450.0, 520.0])
    conversions = np.array([0.02, 0.1, 0.5, 0.9])
    for temperature in temperatures:
        for conversion in conversions:
            written_out = (1.0 * math.exp(-120e3 / GAS_CONSTANT * (1.0 / temperature - 1.0 / 450.0))
                           * shape(conversion) / shape(a0))
            got = source.heat_release_rate(float(temperature), float(conversion))
            assert got == pytest.approx(written_out, rel=1e-11)
            expected = float(kinetics.heat_release_rate(temperature, conversion))
            assert got == pytest.approx(expected, rel=1e-12)
    vector = source.heat_release_rate(temperatures, conversions)
    assert np.allclose(vector, kinetics.heat_release_rate(temperatures, conversions), rtol=1e-12)
    # Design: the heat release stops once the mass is fully decomposed (zero order included).
    assert source.heat_release_rate(500.0, 1.0) == 0.0
