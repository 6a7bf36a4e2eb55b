"""End-to-end tests of `runaway-screen check`, `compare` and `sweep` on the bundled cases.

The bundled cases are invented demo data: these tests check consistency and invariants (the JSON
contract, MTSR >= T_p, the class table applied to the printed figures, exit statuses), never
invented values as truth. Physics checks against published values live in the model tests.
"""

import json
import pathlib
import subprocess
import sys

import pytest
from click.testing import CliRunner

from screen.cli import main
from screen.models.criticality import criticality_class

ROOT = pathlib.Path(__file__).parent.parent
CASES = sorted(ROOT.joinpath("cases").glob("*.toml"))
REQUIRED_RESULT_KEYS = (
    "process_temperature_degC", "synthesis_adiabatic_rise_K", "mtsr_degC", "mtt_degC",
    "decomposition_adiabatic_rise_K", "final_temperature_degC", "tmrad_at_process_temperature_h",
    "tmrad_at_mtsr_h", "tmrad_at_mtsr_zero_order_h", "td24_degC", "td8_degC", "onset_margin_K",
    "criticality_class", "severity", "severity_4", "probability", "probability_6",
)
VESSEL_KEYS = ("name", "heat_transfer_area_m2", "ua_W_per_K", "time_constant_h",
               "critical_coolant_temperature_degC", "tangency_temperature_degC",
               "critical_temperature_difference_K", "no_return_temperature_degC",
               "tmrad_at_no_return_h", "mtsr_above_no_return")


def run_json(*args):
    result = CliRunner().invoke(main, ["check", *map(str, args), "--json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.output)


@pytest.mark.parametrize("path", CASES, ids=[p.name for p in CASES])
def test_check_json_contract_on_every_case(path):
    data = run_json(path)
    r = data["results"]
    for key in REQUIRED_RESULT_KEYS:
        assert key in r
    assert data["tool"]["name"] == "runaway-screen"
    assert len(data["case"]["sha256"]) == 64
    assert data["cautions"] and any("screening aid" in c.lower() for c in data["cautions"])
    assert isinstance(data["warnings"], list)
    assert r["mtsr_degC"] >= r["process_temperature_degC"]
    assert r["final_temperature_degC"] >= r["mtsr_degC"]
    assert r["tmrad_at_mtsr_h"] <= r["tmrad_at_process_temperature_h"]
    # The class and every figure derived from MTSR follow the governing MTSR (issue 18 item 2).
    assert r["mtsr_governing_degC"] >= r["mtsr_degC"]
    assert r["final_temperature_degC"] == pytest.approx(
        r["mtsr_governing_degC"] + r["decomposition_adiabatic_rise_K"], abs=1e-6)
    if r["criticality_class"] is not None:
        assert r["criticality_class"] == criticality_class(
            r["process_temperature_degC"], r["mtsr_governing_degC"], r["mtt_degC"],
            r["td24_degC"])
        assert r["severity"] in ("low", "medium", "high")
        assert r["probability_6"] in ("frequent", "probable", "occasional", "seldom", "remote",
                                      "almost impossible")
    else:
        assert r["verdict_status"] == "cannot-conclude"
    for vessel in r["vessels"]:
        for key in VESSEL_KEYS:
            assert key in vessel
        if vessel["no_return_temperature_degC"] is None:
            assert vessel["mtsr_above_no_return"] is True


@pytest.mark.parametrize("path", CASES[:2], ids=[p.name for p in CASES[:2]])
def test_check_text_has_class_and_cautions(path):
    result = CliRunner().invoke(main, ["check", str(path)])
    assert result.exit_code == 0
    assert "VERDICT:" in result.output
    assert "Screening aid only" in result.output
    assert "qualified process-safety review" in result.output


def test_set_override_is_applied_and_echoed():
    case = ROOT / "cases" / "esterification_batch.toml"
    base = run_json(case)
    data = CliRunner().invoke(main, ["check", str(case), "--json", "--set",
                                     "process.temperature=70 degC"])
    new = json.loads(data.output)
    assert new["overrides"] == ["process.temperature=70 degC"]
    assert new["results"]["process_temperature_degC"] == pytest.approx(70.0)
    # Batch MTSR = T_p + dT_ad (Stoessel 1993): MTSR moves with T_p one to one; the JSON holds
    # 10 significant digits, hence 1e-6 K.
    shift = 70.0 - base["results"]["process_temperature_degC"]
    assert new["results"]["mtsr_degC"] == pytest.approx(base["results"]["mtsr_degC"] + shift,
                                                        abs=1e-6)


def test_json_is_byte_identical_apart_from_timestamp(monkeypatch):
    monkeypatch.setenv("RUNAWAY_SCREEN_TIMESTAMP", "2026-01-01T00:00:00+00:00")
    case = ROOT / "cases" / "nitration_semibatch.toml"
    first = CliRunner().invoke(main, ["check", str(case), "--json"]).output
    second = CliRunner().invoke(main, ["check", str(case), "--json"]).output
    assert first == second


BAD = {
    "unknown_key": ('mode = "batch"', 'mode = "batch"\nspeed = 3', "process.speed"),
    "missing_required": ('amount = "2800 kg"', '# amount removed', "mass.amount"),
    "wrong_dimension": ('energy = "65 kJ/kg"', 'energy = "12 m"', "synthesis.energy"),
    "offset_unit_for_difference": ('energy = "65 kJ/kg"', 'energy = "60 degC"', "synthesis.energy"),
    "decimal_comma": ('energy = "65 kJ/kg"', 'energy = "65,5 kJ/kg"', "synthesis.energy"),
    "non_finite": ('energy = "65 kJ/kg"', 'energy = "inf kJ/kg"', "synthesis.energy"),
    "fraction_out_of_range": ('mode = "batch"', 'mode = "batch"\naccumulation = 1.5',
                              "process.accumulation"),
    "below_absolute_zero": ('temperature = "60 degC"', 'temperature = "-280 degC"',
                            "process.temperature"),
    "process_above_mtt": ('temperature = "60 degC"', 'temperature = "130 degC"',
                          "process.temperature"),
    "toml_syntax": ('energy = "65 kJ/kg"', "energy = 65 kJ/kg", "line"),
    "positive_molar_enthalpy": ('energy = "65 kJ/kg"',
                                'molar_enthalpy = "95 kJ/mol"\nlimiting_amount = "100 mol"',
                                "synthesis.molar_enthalpy"),
}


@pytest.mark.parametrize("name", sorted(BAD))
def test_bad_input_exit_2_one_line(tmp_path, name):
    old, new, fragment = BAD[name]
    text = (ROOT / "cases" / "esterification_batch.toml").read_text(encoding="utf-8")
    assert old in text
    path = tmp_path / f"{name}.toml"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    result = CliRunner().invoke(main, ["check", str(path)])
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ")
    assert str(path) in lines[0] and fragment in lines[0]
    assert "Traceback" not in result.output


def test_missing_file_through_real_subprocess(tmp_path):
    proc = subprocess.run([sys.executable, "-m", "screen", "check", str(tmp_path / "no.toml")],
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert proc.stderr.count("\n") == 1 and "not found" in proc.stderr
    assert "Traceback" not in proc.stderr


def test_compare_flags_verdict_change(tmp_path):
    case = ROOT / "cases" / "nitration_semibatch.toml"
    old_json = tmp_path / "old.json"
    old_json.write_text(json.dumps(run_json(case)), encoding="utf-8")
    new_case = tmp_path / "new.toml"
    new_case.write_text(case.read_text(encoding="utf-8").replace(
        "accumulation = 0.42", "accumulation = 0.20"), encoding="utf-8")
    result = CliRunner().invoke(main, ["compare", str(old_json), str(new_case)])
    assert result.exit_code == 0, result.output
    assert "VERDICT CHANGED" in result.output
    assert "process.accumulation" in result.output
    verdicts = result.output.split("Inputs that differ")[0]  # verdict changes come first
    assert "criticality class" in verdicts
    data = json.loads(CliRunner().invoke(main, ["compare", str(case), str(new_case),
                                                "--json"]).output)
    assert data["verdict_changed"] is True
    classes = [c for c in data["result_changes"] if c["key"] == "criticality_class"]
    assert classes and classes[0]["old"] > classes[0]["new"]
    same = CliRunner().invoke(main, ["compare", str(case), str(case), "--json"])
    assert json.loads(same.output)["result_changes"] == []


def test_sweep_flip_matches_independent_root():
    # Class flips 1 -> 3 where MTSR = MTT. MTSR = T_p + X_ac dT_ad (Stoessel 1993), so the flip
    # in T_p is MTT - dT_ad exactly (batch, X_ac = 1): an independent closed-form root.
    case = ROOT / "cases" / "esterification_batch.toml"
    base = run_json(case)["results"]
    expected = base["mtt_degC"] - base["synthesis_adiabatic_rise_K"]
    result = CliRunner().invoke(main, ["sweep", str(case), "--json", "--vary",
                                       "process.temperature=60 degC:100 degC:9"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert len(data["rows"]) == 9
    flips = [f for f in data["flips"] if any(c[0] == "criticality_class" for c in f["changes"])]
    assert flips
    assert flips[0]["value_si"] - 273.15 == pytest.approx(expected, abs=1e-6)


def test_sweep_coolant_stability_flip_matches_semenov_root(tmp_path):
    # Vessel stability flips where the coolant reaches the critical coolant temperature
    # (Semenov 1928 tangency). Independent root: scipy brentq on the tangency condition.
    import math

    from scipy.optimize import brentq

    from screen.io.case import load_case
    from screen.constants import GAS_CONSTANT as R
    from screen.runs.screening import screen_case

    case_path = ROOT / "cases" / "esterification_batch.toml"
    case = load_case(case_path)
    result = screen_case(case)
    kinetics = result.curves["kinetics"]
    vessel = case.vessels[0]
    m, ua = case.mass.amount, vessel.heat_transfer_coefficient * vessel.heat_transfer_area
    e = kinetics.activation_energy

    def tangency(t):  # m q(T) = UA R T^2/E
        return math.log(m * kinetics.heat_release_rate(t)) - math.log(ua * R * t * t / e)

    t_star = brentq(tangency, 300.0, 900.0, xtol=1e-12)
    t_c_crit = t_star - R * t_star**2 / e
    low, high = t_c_crit - 20.0 - 273.15, t_c_crit + 20.0 - 273.15
    out = CliRunner().invoke(main, ["sweep", str(case_path), "--json", "--vary",
                                    f"vessel.coolant_temperature={low} degC:{high} degC:5",
                                    "--set", "process.temperature=20 degC"])
    assert out.exit_code == 0, out.output
    flips = [f for f in json.loads(out.output)["flips"]
             if any(c[0].endswith(":stability") for c in f["changes"])]
    assert flips
    assert flips[0]["value_si"] == pytest.approx(t_c_crit, abs=1e-5)


def test_sweep_csv_not_overwritten_without_force(tmp_path):
    case = ROOT / "cases" / "esterification_batch.toml"
    out = tmp_path / "s.csv"
    args = ["sweep", str(case), "--vary", "vessel.coolant_temperature=0 degC:30 degC:4",
            "--csv", str(out)]
    assert CliRunner().invoke(main, args).exit_code == 0
    content = out.read_text()
    assert content.startswith("# Screening aid only")  # the cautions as a comment line
    assert content.count("\n") == 6
    again = CliRunner().invoke(main, args)
    assert again.exit_code == 2 and "--force" in again.output
    assert out.read_text() == content
    assert CliRunner().invoke(main, args + ["--force"]).exit_code == 0
