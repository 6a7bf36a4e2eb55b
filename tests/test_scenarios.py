"""Tests of screen.runs.scenarios: deviation scenarios, each screened in full.

Sources of the check values (named beside each test):

- adiabatic temperature rise dT_ad = Q'/c'p and MTSR = T_p + X_ac dT_ad (m_final/m(t_acc))
  (Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 2; Stoessel, Chem. Eng.
  Prog. 89(10) (1993) 68-75; the mass correction is derived);
- the zero-order time to maximum rate TMRad = c'p R T0^2 / (q(T0) E) (Townsend & Tou,
  Thermochim. Acta 37 (1980) 1-30): TMRad is inversely proportional to the rate, so a rate factor
  f divides it by f;
- Arrhenius, k(T) = A exp(-E/(R T)) (definition);
- the deviation models marked "design" in docs/scenarios.md are checked for being what they say
  (formula restated here), not against a published value.

The case data written here are arbitrary test inputs; expected values are computed in the test
from them by the formulas above. The end-to-end CLI test runs the invented demo case
cases/alkylation_reflux_class4.toml and checks only structure and consistency, never its numbers.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from screen.io.case import build_case, load_case
from screen.constants import GAS_CONSTANT, ZERO_CELSIUS
from screen.runs.screening import screen_case
from screen.errors import CaseError, ModelDomainError

REPOSITORY = Path(__file__).resolve().parents[1]
EXAMPLE = REPOSITORY / "cases" / "alkylation_reflux_class4.toml"

T_P = 60.0 + ZERO_CELSIUS
CP = 1800.0  # J/(kg K)
ENERGY = 180e3  # J/kg -> dT_ad = 100 K
RISE = ENERGY / CP
ACCUMULATION = 0.3
MASS_RATIO = 0.8
E_SYNTHESIS = 70e3  # J/mol


def raw_case(mode="semi-batch", scenarios=None, **changes):
    """A case as a decoded TOML dict; ``changes`` = {"section.key": value or None}."""
    raw = {
        "case": {"title": "scenario test case"},
        "mass": {"amount": "2000 kg", "specific_heat": "1.8 kJ/(kg K)", "density": "1000 kg/m^3"},
        "process": {"temperature": "60 degC", "mode": mode,
                    "max_technical_temperature": "110 degC"},
        "synthesis": {"energy": "180 kJ/kg", "activation_energy": "70 kJ/mol",
                      "peak_heat_release_rate": "8 W/kg"},
        "decomposition": {"energy": "400 kJ/kg", "model": "zero-order",
                          "activation_energy": "110 kJ/mol", "reference_rate": "0.5 W/kg",
                          "reference_temperature": "200 degC"},
        "vessel": {"name": "R1", "heat_transfer_area": "6 m^2",
                   "heat_transfer_coefficient": "300 W/(m^2 K)", "coolant_temperature": "20 degC",
                   "min_coolant_temperature": "10 degC"},
        "scenarios": dict(scenarios or {}),
    }
    if mode == "semi-batch":
        # Declared interlock: the estimates below are checked on the feed-stopped MTSR.
        raw["process"].update(accumulation=ACCUMULATION, accumulation_mass_ratio=MASS_RATIO,
                              feed_interlock=True)
    for key, value in changes.items():
        section, name = key.split(".")
        if value is None:
            raw[section].pop(name, None)
        else:
            raw.setdefault(section, {})[name] = value
    return raw


def run(raw):
    case = build_case(raw, path="test.toml")
    result = screen_case(case)
    return case, result


def row(result, key):
    rows = [item for item in result.results["scenarios"]["rows"] if item["key"] == key]
    assert len(rows) == 1
    assert rows[0]["error"] is None, rows[0]["error"]
    return rows[0]


# --- double charge -----------------------------------------------------------------------------


def test_double_charge_doubles_the_batch_adiabatic_rise():
    """Batch: dT_ad = Q'/c'p doubles with a double charge, MTSR = T_p + 2 dT_ad (definition,
    Stoessel 2008 ch. 2), independent of how the heat of reaction is given."""
    _, result = run(raw_case(mode="batch", scenarios={"double_charge": True}))
    base, double = row(result, "base"), row(result, "double_charge")
    assert base["synthesis_adiabatic_rise_K"] == pytest.approx(RISE, rel=1e-12)
    assert double["synthesis_adiabatic_rise_K"] == pytest.approx(2.0 * RISE, rel=1e-12)
    assert double["mtsr_degC"] + ZERO_CELSIUS == pytest.approx(T_P + 2.0 * RISE, rel=1e-12)
    assert double["mtsr_change_K"] == pytest.approx(RISE, rel=1e-12)


def test_double_charge_with_molar_enthalpy():
    """dT_ad = n (-dH_r) / (m c'p): doubling the limiting amount doubles it (definition)."""
    raw = raw_case(mode="batch", scenarios={"double_charge": True},
                   **{"synthesis.energy": None, "synthesis.molar_enthalpy": "-120 kJ/mol",
                      "synthesis.limiting_amount": "1500 mol"})
    _, result = run(raw)
    expected = 2.0 * 1500.0 * 120e3 / (2000.0 * CP)
    assert row(result, "double_charge")["synthesis_adiabatic_rise_K"] == pytest.approx(expected,
                                                                                     rel=1e-12)


# --- loss of agitation -------------------------------------------------------------------------


def test_agitation_loss_is_full_accumulation_of_what_was_dosed(tmp_path):
    """Unmixed feed accumulates; at the restart all that was dosed reacts: MTSR = T_p + dT_ad with
    X_ac = 1 and the final mass (Stoessel 1993 with X_ac = 1). The same as the base case with
    accumulation = 1 and mass ratio = 1 set on the command-line path (--set)."""
    _, result = run(raw_case(scenarios={"agitation_loss": True}))
    agitation = row(result, "agitation_loss")
    assert agitation["mtsr_degC"] + ZERO_CELSIUS == pytest.approx(T_P + RISE, rel=1e-12)
    assert agitation["accumulation"] == 1.0 and agitation["accumulation_mass_ratio"] == 1.0
    path = tmp_path / "base.toml"
    path.write_text(_toml(raw_case()), encoding="utf-8")
    full = screen_case(load_case(path, overrides=["process.accumulation=1",
                                                  "process.accumulation_mass_ratio=1"]),
                       curves=False).results
    assert agitation["mtsr_degC"] == pytest.approx(full["mtsr_degC"], rel=1e-12)
    assert agitation["tmrad_at_mtsr_h"] == pytest.approx(full["tmrad_at_mtsr_h"], rel=1e-12)
    assert agitation["criticality_class"] == full["criticality_class"]


def _toml(raw) -> str:
    """Minimal TOML writer for the test dicts (strings, numbers, booleans, tables)."""
    lines = []
    for section, table in raw.items():
        lines.append(f"[{section}]")
        for key, value in table.items():
            if isinstance(value, bool):
                lines.append(f"{key} = {'true' if value else 'false'}")
            elif isinstance(value, (int, float)):
                lines.append(f"{key} = {value!r}")
            else:
                lines.append(f"{key} = {json.dumps(value)}")
    return "\n".join(lines) + "\n"


# --- dosing deviations without kinetics (stated estimates) -------------------------------------


@pytest.mark.parametrize("factor", [1.5, 2.0, 5.0])
def test_dosing_faster_estimate(factor):
    """Design estimate: X_ac -> min(1, F X_ac); MTSR = T_p + X_ac' dT_ad / mass ratio (Stoessel
    1993, mass correction derived)."""
    _, result = run(raw_case(scenarios={"dosing_rate_factor": factor}))
    faster = row(result, "dosing_rate_factor")
    accumulation = min(1.0, ACCUMULATION * factor)
    assert faster["accumulation"] == pytest.approx(accumulation, rel=1e-12)
    assert faster["mtsr_degC"] + ZERO_CELSIUS == pytest.approx(
        T_P + accumulation * RISE / MASS_RATIO, rel=1e-12)
    assert "design" in faster["basis"]


def test_dosing_too_cold_estimate_uses_the_arrhenius_slow_down():
    """Design estimate: X_ac -> min(1, X_ac k(T_p)/k(T_D)), k Arrhenius with synthesis E;
    MTSR = T_D + X_ac' dT_ad / mass ratio."""
    dosing = 50.0 + ZERO_CELSIUS
    _, result = run(raw_case(scenarios={"dosing_temperature": "50 degC"}))
    cold = row(result, "dosing_temperature")
    slow_down = math.exp(E_SYNTHESIS / GAS_CONSTANT * (1.0 / dosing - 1.0 / T_P))
    accumulation = min(1.0, ACCUMULATION * slow_down)
    assert accumulation < 1.0  # the test exercises the uncapped branch
    assert cold["accumulation"] == pytest.approx(accumulation, rel=1e-12)
    assert cold["process_temperature_degC"] == pytest.approx(50.0, rel=1e-12)
    assert cold["mtsr_degC"] + ZERO_CELSIUS == pytest.approx(
        dosing + accumulation * RISE / MASS_RATIO, rel=1e-12)


def test_dosing_too_cold_without_activation_energy_takes_full_accumulation():
    """Without kinetics or E the slow-down is unknown: X_ac = 1 (conservative, stated)."""
    raw = raw_case(scenarios={"dosing_temperature": "50 degC"},
                   **{"synthesis.activation_energy": None})
    _, result = run(raw)
    cold = row(result, "dosing_temperature")
    assert cold["accumulation"] == 1.0
    assert "needs kinetics" in cold["basis"]


# --- contamination, coolant --------------------------------------------------------------------


@pytest.mark.parametrize("decomposition", ["kinetics", "onset-only"])
def test_contamination_divides_the_zero_order_tmrad_by_the_factor(decomposition):
    """Zero order: TMRad = c'p R T0^2/(q(T0) E) (Townsend & Tou 1980) is proportional to 1/q, so a
    rate factor f divides TMRad at an unchanged MTSR by f. For an onset-only decomposition the
    onset is moved by 1/T' = 1/T + R ln f / E (derived), which must give the same factor."""
    changes = {}
    if decomposition == "onset-only":
        changes = {"decomposition.model": None, "decomposition.activation_energy": None,
                   "decomposition.reference_rate": None,
                   "decomposition.reference_temperature": None,
                   "decomposition.onset_temperature": "230 degC"}
    case, result = run(raw_case(scenarios={"decomposition_rate_factor": 8.0}, **changes))
    base, contaminated = row(result, "base"), row(result, "decomposition_rate_factor")
    assert contaminated["mtsr_degC"] == pytest.approx(base["mtsr_degC"], rel=1e-12)
    if decomposition == "kinetics":
        # Issue 18 item 10: the A x f variant and the lowered-E variant are both screened and
        # the more critical is kept; the A x f variant itself divides TMRad by f.
        from screen.analyses.engine import screen_case
        from screen.runs.scenarios import _contamination

        times_f, lowered = _contamination(case, 8.0)
        r = screen_case(times_f.case, curves=False).results
        assert r["tmrad_at_mtsr_h"] == pytest.approx(base["tmrad_at_mtsr_h"] / 8.0, rel=1e-9)
        r_low = screen_case(lowered.case, curves=False).results
        assert contaminated["td24_degC"] == pytest.approx(min(r["td24_degC"], r_low["td24_degC"]))
        assert "more critical" in contaminated["basis"]
        return
    assert contaminated["tmrad_at_mtsr_h"] == pytest.approx(base["tmrad_at_mtsr_h"] / 8.0,
                                                            rel=1e-9)
    assert contaminated["tmrad_ratio"] == pytest.approx(1.0 / 8.0, rel=1e-9)
    assert contaminated["td24_degC"] < base["td24_degC"]


def test_contamination_lowered_activation_energy_keeps_f_at_the_reference_temperature():
    # E' = E - R T_ref ln f (derived): k'(T_ref)/k(T_ref) = f, and below T_ref the factor
    # f^(T_ref/T) is larger (Arrhenius).
    import math

    from screen.constants import GAS_CONSTANT
    from screen.runs.scenarios import _contamination

    case, _ = run(raw_case(scenarios={"decomposition_rate_factor": 8.0}))
    dec = case.sections["decomposition"]
    _, lowered = _contamination(case, 8.0)
    new = lowered.case.sections["decomposition"]
    t_ref = float(dec.reference_temperature)
    assert new.activation_energy == pytest.approx(
        dec.activation_energy - GAS_CONSTANT * t_ref * math.log(8.0), rel=1e-12)
    assert new.reference_rate == pytest.approx(8.0 * dec.reference_rate, rel=1e-12)


def test_faster_dosing_scales_the_peak_by_the_larger_factor():
    # Issue 18 item 10: a dosing-controlled heat release follows the feed rate (Stoessel 2008
    # ch. 7, from memory): dosing 3x faster triples the peak even when the accumulation can
    # only rise from 0.5 to 1 (ratio 2).
    from screen.runs.scenarios import _dosing_faster

    raw = raw_case(scenarios={"dosing_rate_factor": 3.0})
    raw["synthesis"]["peak_heat_release_rate"] = "10 W/kg"
    raw["process"]["accumulation"] = 0.5
    case, _ = run(raw)
    estimate = _dosing_faster(case, 3.0)[-1]
    assert estimate.case.sections["process"].accumulation == pytest.approx(1.0)
    assert estimate.case.sections["synthesis"].peak_heat_release_rate == pytest.approx(30.0)


def test_colder_wrong_coolant_without_kinetics_bounds_the_accumulation():
    # Issue 18 item 10: a colder mass accumulates more; without kinetics the bound X_ac = 1
    # (everything dosed accumulates, final mass) is taken and stated.
    raw = raw_case(scenarios={"coolant_temperature": "-10 degC"})
    case, result = run(raw)
    assert case.sections["process"].mode == "semi-batch"
    wrong = row(result, "coolant_temperature")
    assert wrong["accumulation"] == pytest.approx(1.0)
    assert "bounded by X_ac = 1" in wrong["basis"]


def test_wrong_coolant_replaces_every_vessel_coolant():
    from screen.runs import scenarios

    raw = raw_case(scenarios={"coolant_temperature": "45 degC"})
    raw["vessel"] = [dict(raw["vessel"]), dict(raw["vessel"], name="R2")]
    case, result = run(raw)
    [attempt] = scenarios.BUILDERS["coolant_temperature"](case, 45.0 + ZERO_CELSIUS)
    assert [v.coolant_temperature for v in attempt.case.vessels] == [45.0 + ZERO_CELSIUS] * 2
    assert all(v.min_coolant_temperature == 10.0 + ZERO_CELSIUS for v in attempt.case.vessels)
    coolant = row(result, "coolant_temperature")
    assert coolant["mtsr_degC"] == row(result, "base")["mtsr_degC"]  # no kinetics: MTSR kept


# --- the table, recursion, failure handling ----------------------------------------------------


def test_table_has_base_and_every_selected_deviation():
    selected = {"double_charge": True, "dosing_rate_factor": 2.0,
                "dosing_temperature": "45 degC", "agitation_loss": True,
                "coolant_temperature": "30 degC", "decomposition_rate_factor": 5.0}
    case, result = run(raw_case(scenarios=selected))
    block = result.results["scenarios"]
    assert [item["key"] for item in block["rows"]] == ["base", *selected]
    base = block["rows"][0]
    for item in block["rows"]:
        assert item["mtsr_change_K"] == pytest.approx(item["mtsr_degC"] - base["mtsr_degC"])
        assert item["class_change"] == item["criticality_class"] - base["criticality_class"]
        assert item["tmrad_change_h"] == pytest.approx(item["tmrad_at_mtsr_h"]
                                                       - base["tmrad_at_mtsr_h"])
    assert block["rows"][0]["mtsr_degC"] == pytest.approx(result.results["mtsr_degC"])
    lines = block["summary_lines"]
    assert lines[0].startswith("Deviation scenarios")
    assert all(len(line) <= 78 for line in lines)
    assert all(line.startswith("  ") for line in lines[1:])
    assert "scenarios" in result.methods
    # base case unchanged by the variants (no shared state)
    assert case.sections["process"].accumulation == ACCUMULATION


def test_variants_do_not_run_scenarios_and_keep_the_evaporation_check():
    from screen.runs import scenarios

    case = build_case(raw_case(scenarios={"double_charge": True, "evaporation_check": True}),
                      path="t.toml")
    [attempt] = scenarios.BUILDERS["double_charge"](case, True)
    variant = attempt.case
    assert variant.sections["scenarios"].as_dict() == {"evaporation_check": True}
    assert variant.extras["scenario_variant"] == "double charge"
    result = screen_case(variant)
    assert "scenarios" not in result.results
    assert result.results["barrier"]["assessed"] is True


def test_a_variant_that_cannot_be_screened_is_reported_not_hidden(monkeypatch):
    """Fail closed: an error in one deviation becomes a row with the error and a warning."""
    from screen.runs import scenarios

    def broken(case, value):
        raise ModelDomainError("test: model outside its domain", "decomposition")

    monkeypatch.setitem(scenarios.BUILDERS, "agitation_loss", broken)
    _, result = run(raw_case(scenarios={"agitation_loss": True, "double_charge": True}))
    failed = next(item for item in result.results["scenarios"]["rows"]
                  if item["key"] == "agitation_loss")
    assert failed["error"] and "outside its domain" in failed["error"]
    assert failed["mtsr_degC"] is None
    assert any("could not be screened" in text for text in result.warnings)
    assert any("SCREENING FAILED" in line for line in
               result.results["scenarios"]["summary_lines"])


def test_scenarios_are_skipped_without_curves():
    """Sweeps and Monte Carlo samples (curves=False) do not multiply their cost by the table."""
    case = build_case(raw_case(scenarios={"double_charge": True}), path="t.toml")
    block = screen_case(case, curves=False).results["scenarios"]
    assert block["run"] is False and "rows" not in block


@pytest.mark.parametrize("mode, scenarios, changes, key, fragment", [
    ("batch", {"dosing_rate_factor": 2.0}, {}, "scenarios.dosing_rate_factor", "semi-batch"),
    ("batch", {"agitation_loss": True}, {}, "scenarios.agitation_loss", "semi-batch"),
    ("semi-batch", {"dosing_temperature": "60 degC"}, {}, "scenarios.dosing_temperature",
     "must be below"),
    ("semi-batch", {"decomposition_rate_factor": 0.5}, {}, "scenarios.decomposition_rate_factor",
     "above 1"),
])
def test_impossible_deviations_are_case_errors(mode, scenarios, changes, key, fragment):
    with pytest.raises(CaseError, match=fragment) as info:
        build_case(raw_case(mode=mode, scenarios=scenarios, **changes), path="bad.toml")
    assert info.value.key == key and info.value.path == "bad.toml"


def test_wrong_coolant_needs_a_vessel():
    raw = raw_case(scenarios={"coolant_temperature": "30 degC"})
    raw.pop("vessel")
    with pytest.raises(CaseError, match="needs at least one") as info:
        build_case(raw, path="bad.toml")
    assert info.value.key == "scenarios.coolant_temperature"


# --- with kinetics: the variant is re-simulated ------------------------------------------------


def kinetic_case(scenarios):
    raw = raw_case(scenarios=scenarios, **{"synthesis.energy": None,
                                           "synthesis.molar_enthalpy": "-95 kJ/mol",
                                           "synthesis.limiting_amount": "3000 mol",
                                           "synthesis.peak_heat_release_rate": None,
                                           "mass.amount": "1800 kg",
                                           "process.accumulation": 0.1,
                                           "process.accumulation_mass_ratio": 1.0})
    raw["synthesis_kinetics"] = {
        "scheme": "second-order", "rate_constant": "2.0e-4 L/(mol s)",
        "reference_temperature": "60 degC", "initial_mass": "1300 kg",
        "initial_amount_a": "3600 mol", "initial_amount_b": "0 mol", "feed_amount": "3000 mol",
        "feed_mass": "500 kg", "dosing_time": "4 h"}
    return raw


def test_dosing_faster_with_kinetics_is_re_simulated():
    """With [synthesis_kinetics] the faster dosing is simulated (dosing_time / F); the row's MTSR
    is the higher of the case accumulation and the simulated feed-stopped worst case."""
    pytest.importorskip("screen.analyses.simulation")
    case, result = run(kinetic_case({"dosing_rate_factor": 4.0}))
    faster = row(result, "dosing_rate_factor")
    assert "re-simulated" in faster["basis"]
    from screen.runs import scenarios

    attempt = scenarios.BUILDERS["dosing_rate_factor"](case, 4.0)[0]
    assert attempt.case.sections["synthesis_kinetics"].dosing_time == pytest.approx(3600.0)
    variant = screen_case(attempt.case, curves=False).results
    expected = max(variant["mtsr_degC"], variant["simulation"]["mtsr_feed_stopped_degC"])
    assert faster["mtsr_degC"] == pytest.approx(expected, rel=1e-12)
    assert faster["mtsr_degC"] >= row(result, "base")["mtsr_degC"]


# --- end to end --------------------------------------------------------------------------------


def test_cli_check_json_and_text_on_the_example_case():
    """`check --json` carries results.barrier and results.scenarios; the text shows both blocks."""
    from click.testing import CliRunner

    from screen.cli import main

    runner = CliRunner()
    outcome = runner.invoke(main, ["check", str(EXAMPLE), "--json"])
    assert outcome.exit_code == 0, outcome.output
    data = json.loads(outcome.output)
    results = data["results"]
    barrier, scenarios = results["barrier"], results["scenarios"]
    assert barrier["assessed"] is True
    assert barrier["vessels"] and all(v["barrier_verdict"] in ("holds", "doubtful", "fails")
                                      for v in barrier["vessels"])
    # Consistency only (invented demo case): the class is the class table (Stoessel 1993)
    # applied to the printed figures, and the base row repeats it.
    from screen.models.criticality import criticality_class

    assert results["criticality_class"] == criticality_class(
        results["process_temperature_degC"], results["mtsr_degC"], results["mtt_degC"],
        results["td24_degC"])
    assert scenarios["rows"][0]["criticality_class"] == results["criticality_class"]
    keys = [item["key"] for item in scenarios["rows"]]
    assert keys == ["base", "double_charge", "dosing_rate_factor", "dosing_temperature",
                    "agitation_loss", "coolant_temperature", "decomposition_rate_factor"]
    assert all(item["error"] is None for item in scenarios["rows"])
    assert scenarios["rows"][0]["barrier_verdict"] == barrier["verdict"]
    assert "barrier" in data["methods"] and "scenarios" in data["methods"]

    text = runner.invoke(main, ["check", str(EXAMPLE), "--detail"])
    assert text.exit_code == 0
    assert "Evaporative-cooling barrier" in text.output
    assert "Deviation scenarios" in text.output


def test_example_case_is_invented_and_commented():
    """RULES: demo data invented and said so; every key of the example carries a comment."""
    text = EXAMPLE.read_text(encoding="utf-8")
    assert "INVENTED DEMO DATA" in text and "Halvorsen Fine Chemicals" in text
    for line in text.splitlines():
        stripped = line.strip()
        if stripped and not stripped.startswith(("#", "[")):
            assert "#" in stripped, f"key without a comment: {line}"


def test_double_charge_keeps_the_molar_enthalpy():
    # Issue 13 item 4: with synthesis kinetics and [synthesis] energy (no molar enthalpy), the
    # double-charge variant re-derived dH_r from the doubled energy and the extent the doubled
    # B can reach (min(A, 2 B)), about -158 instead of -95 kJ/mol. The molar enthalpy is a
    # property of the reaction (definition: heat per mol of reaction, Stoessel 2008 ch. 2): it
    # must stay that of the base case. Base value: 166.25 kJ/kg x 4000 kg / 7000 mol = 95 kJ/mol.
    import copy
    import pathlib

    from screen.io.case import build_case, load_case
    from screen.io.simulation_inputs import resolve_inputs
    from screen.runs.scenarios import _double_charge

    path = pathlib.Path(__file__).parent.parent / "cases" / "acylation_semibatch_kinetics.toml"
    raw = copy.deepcopy(load_case(str(path)).raw)
    del raw["synthesis"]["molar_enthalpy"], raw["synthesis"]["limiting_amount"]
    raw["synthesis"]["energy"] = "166.25 kJ/kg"
    case = build_case(raw, path="<test>")
    base = resolve_inputs(case.sections, case.vessels, case.path, [])
    assert base.molar_enthalpy == pytest.approx(-95e3, rel=1e-9)
    variant = _double_charge(case, True)[0].case
    doubled = resolve_inputs(variant.sections, variant.vessels, variant.path, [])
    assert doubled.molar_enthalpy == pytest.approx(-95e3, rel=1e-9)
