"""Adiabatic (heat-wait-search) runs: screen/models/adiabatic.py,
screen/analyses/adiabatic_run.py and ``kinetics --adiabatic``.

Check values come from outside the tool: the published phi-correction equations evaluated by
hand (Townsend & Tou 1980, Thermochim. Acta 37, 1-30; Fisher et al. 1992, AIChE DIERS
manual, onset correction, from memory), and an independent ``scipy.integrate.solve_ivp`` model
of the cell and of the phi = 1 system (tests/calorimetry_simulation.py).
"""

from __future__ import annotations

import json
import math
import tomllib

import numpy as np
import pytest
from click.testing import CliRunner
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from calorimetry_simulation import R, heat_wait_search_run, write_csv
from screen.analyses.adiabatic_run import analyse_adiabatic
from screen.cli.main import main
from screen.models import adiabatic as ad
from screen.report.adiabatic_run import decomposition_toml, result_to_dict

COLUMNS = ["time_s", "temperature_degC", "pressure_bar"]


@pytest.fixture(scope="module")
def first_order(tmp_path_factory):
    truth = heat_wait_search_run()
    path = tmp_path_factory.mktemp("arc") / "run.csv"
    write_csv(path, truth, COLUMNS, fmt="%.5f")
    return path, truth


@pytest.fixture(scope="module")
def second_order(tmp_path_factory):
    truth = heat_wait_search_run(activation_energy=90e3, order=2.0, rise=180.0, phi=2.1,
                                 onset_target=393.15, first_step=343.15, seed=7)
    path = tmp_path_factory.mktemp("arc2") / "run.csv"
    write_csv(path, truth, ["time_s", "temperature_degC"], fmt="%.5f")
    return path, truth


# ---- published equations, by hand -------------------------------------------------------------

def test_phi_factor_townsend_tou():
    # Townsend & Tou 1980: phi = 1 + m_c c_c/(m_s c_s); by hand 1 + 9.5*0.525/(3.5*1.9)
    # = 1 + 4.9875/6.65 = 1.75.
    assert ad.phi_factor(3.5e-3, 1900.0, 9.5e-3, 525.0) == pytest.approx(1.75, rel=1e-12)
    assert ad.phi_factor(1e-3, 2000.0, 0.0, 500.0) == 1.0


def test_fisher_onset_correction_by_hand():
    # Fisher et al. 1992: 1/T0c = 1/T0 + (R/E) ln(phi). By hand for T0 = 450 K, phi = 1.8,
    # E = 120 kJ/mol: 1/450 + 8.314462618 * 0.5877866649 / 120000 = 0.0022222222 + 0.0000407268
    # = 0.0022629490 -> T0c = 441.90 K.
    assert ad.corrected_onset_temperature(450.0, 1.8, 120e3) == pytest.approx(441.90, abs=0.01)
    assert ad.corrected_onset_temperature(450.0, 1.0, 120e3) == 450.0


def test_townsend_tou_temperature_rate_and_time_by_hand():
    # Townsend & Tou 1980: dT_ad = phi dT_m; T_c = T0c + phi (T - T0); m_c = phi m
    # exp[E/R (1/T - 1/T_c)]; theta_c = theta/phi. By hand: phi 1.5, T0 400, T0c 392, T 420:
    # T_c = 392 + 1.5 * 20 = 422 K; m_c = 1.5 * 0.1 * exp(1e5/8.314462618 (1/420 - 1/422))
    # = 0.15 * exp(0.135721) = 0.171803 K/s.
    assert ad.corrected_adiabatic_rise(100.0, 1.5) == 150.0
    tc = ad.corrected_temperature(420.0, 400.0, 392.0, 1.5)
    assert tc == pytest.approx(422.0)
    assert ad.corrected_self_heat_rate(0.1, 420.0, tc, 1.5, 1e5) == pytest.approx(0.171803,
                                                                                   rel=1e-5)
    assert ad.time_to_maximum_rate_phi_one(3600.0, 1.5) == 2400.0


def test_phi_correction_maps_cell_onto_phi_one_trajectory():
    # Independent solve_ivp of the same first-order kinetics in a cell (phi = 1.8) and alone
    # (phi = 1), the latter started at the Fisher-corrected onset: at equal conversion the
    # Townsend & Tou corrected temperature and rate equal those of the phi = 1 trajectory.
    e, a, n, rise, phi, t0 = 100e3, 1e9, 1.0, 200.0, 1.8, 400.0
    t0c = ad.corrected_onset_temperature(t0, phi, e)

    def simulate(start, dtad):
        def rhs(t, y):
            rate = a * math.exp(-e / (R * y[0])) * max(1 - y[1], 0.0) ** n
            return [dtad * rate, rate]
        return solve_ivp(rhs, (0, 1e7), [start, 0.0], method="LSODA", rtol=1e-11,
                         atol=[1e-11, 1e-14], dense_output=True,
                         events=[lambda t, y: 0.95 - y[1]])

    cell, alone = simulate(t0, rise / phi), simulate(t0c, rise)
    for alpha in (0.05, 0.3, 0.6, 0.9):
        tm = brentq(lambda t: cell.sol(t)[1] - alpha, 0, cell.t[-1])
        tp = brentq(lambda t: alone.sol(t)[1] - alpha, 0, alone.t[-1])
        temp_m, temp_1 = cell.sol(tm)[0], alone.sol(tp)[0]
        rate_m = rise / phi * a * math.exp(-e / (R * temp_m)) * (1 - alpha) ** n
        rate_1 = rise * a * math.exp(-e / (R * temp_1)) * (1 - alpha) ** n
        tc = ad.corrected_temperature(temp_m, t0, t0c, phi)
        assert tc == pytest.approx(temp_1, abs=1e-5)
        assert ad.corrected_self_heat_rate(rate_m, temp_m, tc, phi, e) == pytest.approx(
            rate_1, rel=1e-6)


def test_self_heat_rate_exact_for_a_quadratic():
    # Central differences over symmetric spans are exact for T = a + b t + c t^2 (derived).
    t = np.arange(0.0, 4000.0, 5.0)
    temp = 400.0 + 1e-3 * t + 2e-7 * t**2
    rate = ad.self_heat_rate(t, temp)
    inner = slice(200, 600)
    assert np.allclose(rate[inner], 1e-3 + 4e-7 * t[inner], rtol=1e-9)


# ---- analysis against the independent simulation ---------------------------------------------

def _true_tmr(truth, onset_measured):
    """phi = 1 TMRad of the true kinetics from the temperature at which the phi = 1 system
    self-heats as fast as the cell did at the detected onset (solve_ivp)."""
    k = truth["rate_constant"]
    m_cell = truth["rise"] / truth["phi"] * k(onset_measured)
    t0c = brentq(lambda temp: truth["rise"] * k(temp) - m_cell, 250.0, onset_measured)
    return t0c, truth["tmr_phi_one"](t0c)


@pytest.mark.parametrize("case", ["first_order", "second_order"])
def test_recovers_simulated_run(case, request):
    # Tolerances of issue 16: E 3 %, corrected rise 1 %, corrected TMRad 5 %.
    path, truth = request.getfixturevalue(case)
    r = analyse_adiabatic(path, phi=truth["phi"], specific_heat=1900.0)
    d = result_to_dict(r)
    assert d["activation_energy_kJ_per_mol"] * 1e3 == pytest.approx(truth["activation_energy"],
                                                                     rel=0.03)
    assert d["adiabatic_rise_K"] == pytest.approx(truth["rise"], rel=0.01)
    assert d["order"] == pytest.approx(truth["order"], abs=0.1)
    assert d["ln_pre_exponential_factor"] == pytest.approx(
        math.log(truth["pre_exponential_factor"]), abs=0.3)
    t0c, tmr = _true_tmr(truth, r.onset)
    assert d["onset_temperature_corrected_degC"] + 273.15 == pytest.approx(t0c, abs=0.2)
    assert d["tmrad_corrected_h"] * 3600 == pytest.approx(tmr, rel=0.05)
    # the detected onset is the search step at which the simulated instrument switched to
    # exotherm mode, or within one 5 K step of it
    assert abs(r.onset - truth["detected_at_K"]) < 5.5
    assert d["adiabatic_rise_measured_K"] == pytest.approx(
        float(truth["true_temperature"].max()) - r.onset, abs=0.1)


def test_pressure_and_permanent_gas(first_order):
    path, truth = first_order
    d = result_to_dict(analyse_adiabatic(path, phi=truth["phi"]))
    assert d["noncondensable_pressure_bar"] == pytest.approx(truth["gas_pressure_bar"], rel=0.02)
    assert d["max_pressure_bar"] >= d["noncondensable_pressure_bar"]
    assert d["energy_J_per_g"] is None  # no sample c'p given


def test_permanent_gas_amount(first_order):
    # Simulation: 0.2 mol of permanent gas per kg of sample at full conversion, 5 mL free volume.
    path, truth = first_order
    result = CliRunner().invoke(main, ["kinetics", "--adiabatic", str(path), "--phi", "1.6",
                                       "--sample-mass", "4 g", "--cell-free-volume", "5 mL",
                                       "--json"])
    assert result.exit_code == 0, result.output
    gas = json.loads(result.output)["noncondensable_gas_mol_per_kg"]
    assert gas == pytest.approx(0.2 * float(truth["conversion"][-1]), rel=0.02)
    result = CliRunner().invoke(main, ["kinetics", "--adiabatic", str(path), "--phi", "1.6",
                                       "--cell-free-volume", "5 mL"])
    assert result.exit_code == 2 and "--cell-free-volume" in result.output


def test_phi_from_masses_equals_given_phi(first_order):
    path, truth = first_order
    # 4 g sample at 2.0 J/(g K) in a 9.6 g cell at 0.5 J/(g K): phi = 1 + 4.8/8 = 1.6
    a = analyse_adiabatic(path, sample_mass=4e-3, specific_heat=2000.0, cell_mass=9.6e-3,
                          cell_specific_heat=500.0)
    b = analyse_adiabatic(path, phi=1.6, specific_heat=2000.0)
    assert a.phi == pytest.approx(1.6, rel=1e-12)
    assert a.rise == pytest.approx(b.rise, rel=1e-12)


# ---- command line -----------------------------------------------------------------------------

KEYS = ("phi", "onset_temperature_degC", "onset_temperature_corrected_degC",
        "adiabatic_rise_measured_K", "adiabatic_rise_K", "activation_energy_kJ_per_mol",
        "pre_exponential_factor_per_s", "order", "tmrad_measured_h", "tmrad_corrected_h",
        "max_pressure_bar", "noncondensable_pressure_bar", "warnings", "cautions")


def test_cli_json_toml_and_png(first_order, tmp_path):
    path, truth = first_order
    runner = CliRunner()
    out = tmp_path / "dec.toml"
    result = runner.invoke(main, ["kinetics", "--adiabatic", str(path), "--phi", "1.6",
                                  "--specific-heat", "1.9 J/(g K)", "--json", "-o", str(out),
                                  "--png-dir", str(tmp_path / "png")])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    for key in KEYS:
        assert key in data
    assert data["tmrad_corrected_h"] != pytest.approx(data["tmrad_measured_h"] / data["phi"],
                                                      rel=0.01)
    section = tomllib.loads(out.read_text(encoding="utf-8"))["decomposition"]
    assert section["model"] == "nth-order" and section["order"] == pytest.approx(1.0)
    assert "SHA-256" in out.read_text(encoding="utf-8")
    assert sorted(p.name for p in (tmp_path / "png").iterdir()) == ["self_heat_rate.png",
                                                                    "temperature.png"]
    again = runner.invoke(main, ["kinetics", "--adiabatic", str(path), "--phi", "1.6",
                                 "--specific-heat", "1.9 J/(g K)", "-o", str(out)])
    assert again.exit_code == 2 and "--force" in again.output


def test_decomposition_section_loads_in_a_case(first_order, tmp_path):
    from screen.io.case import load_case

    path, truth = first_order
    section = decomposition_toml(analyse_adiabatic(path, phi=1.6, specific_heat=1900.0))
    case_text = open("cases/esterification_batch.toml", encoding="utf-8").read()
    start = case_text.index("[decomposition]")
    rest = case_text[start + len("[decomposition]"):]
    end = rest.find("\n[")
    new = case_text[:start] + section + (rest[end:] if end >= 0 else "")
    case_path = tmp_path / "case.toml"
    case_path.write_text(new, encoding="utf-8")
    result = CliRunner().invoke(main, ["check", str(case_path), "--json"])
    assert result.exit_code == 0, result.output
    assert load_case(str(case_path)).sections["decomposition"].model == "nth-order"


@pytest.mark.parametrize("args, expected", [
    (["--phi", "0.8"], "--phi"),
    (["--phi", "1.5", "--cell-mass", "9 g"], "--phi"),
    ([], "thermal inertia"),
    (["--phi", "1.5", "--heating-rate", "2 K/min"], "--heating-rate"),
    (["--phi", "1.5", "--rate-threshold", "0.02"], "--rate-threshold"),
])
def test_cli_bad_options(first_order, args, expected):
    path, _ = first_order
    result = CliRunner().invoke(main, ["kinetics", "--adiabatic", str(path), *args])
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and expected in lines[0] and "Traceback" not in result.output


def test_cli_rejects_adiabatic_options_without_a_run(tmp_path):
    result = CliRunner().invoke(main, ["kinetics", "--onset", "180 degC", "--phi", "1.5"])
    assert result.exit_code == 2 and "--phi" in result.output


@pytest.mark.parametrize("content, expected", [
    ("time_s,temperature_degC\n" + "".join(f"{i * 10},{100 + 0.0001 * i}\n" for i in range(60)),
     "no self-heating"),
    ("time_s,heat_flow_W\n" + "".join(f"{i},1\n" for i in range(30)), "no temperature column"),
    ("time_s,temperature_degC\n" + "".join(f"{i},{'x' if i == 5 else 100}\n" for i in range(30)),
     "row 7"),
])
def test_cli_bad_run_files(tmp_path, content, expected):
    path = tmp_path / "bad.csv"
    path.write_text(content, encoding="utf-8")
    result = CliRunner().invoke(main, ["kinetics", "--adiabatic", str(path), "--phi", "1.5"])
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and str(path) in lines[0] and expected in lines[0]


def test_demo_run_is_consistent():
    # Invented demo data: consistency only, never a check value.
    result = CliRunner().invoke(main, ["kinetics", "--adiabatic",
                                       "cases/calorimetry/hf233_adiabatic_run.csv", "--sample-mass",
                                       "3.5 g", "--specific-heat", "1.9 J/(g K)", "--cell-mass",
                                       "9.5 g", "--cell-specific-heat", "0.525 J/(g K)",
                                       "--json"])
    assert result.exit_code == 0, result.output
    d = json.loads(result.output)
    assert d["onset_temperature_corrected_degC"] < d["onset_temperature_degC"]
    assert d["adiabatic_rise_K"] == pytest.approx(
        d["phi"] * d["adiabatic_rise_measured_K"] / (1 - d["conversion_at_onset"]), rel=1e-9)
    assert d["tmrad_corrected_h"] > 0 and d["phi"] == pytest.approx(1.75)
