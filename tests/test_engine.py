"""Tests of screen.analyses.engine.screen_case: the core figures of one case against independent numbers.

Sources of the check values (named again beside each check):

- dT_ad = Q'/c'p and MTSR = T_p + X_ac dT_ad m_final/m(t_acc) (Stoessel, Thermal Safety of
  Chemical Processes, Wiley-VCH 2008, ch. 2; Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75;
  the mass correction is derived);
- zero-order TMRad = c'p R T0^2/(q(T0) E) (Townsend & Tou, Thermochim. Acta 37 (1980) 1-30),
  written out here, and TD24/TD8 as its roots found with scipy.optimize.brentq (a
  general-purpose reference library);
- the class table of Stoessel (1993) applied by hand to the independent temperatures;
- the implausibility ranges of issue 2 (c'p about 0.8-5 kJ/(kg K), E about 30-400 kJ/mol,
  dT_ad over 1000 K): common practice, no source.

The case below is an arbitrary set of test inputs, not invented demo data and not a real
material.
"""

from __future__ import annotations

import copy
import math

import pytest
from scipy.optimize import brentq

from screen.io.case import build_case
from screen.constants import ZERO_CELSIUS
from screen.runs.screening import screen_case
from scipy.constants import R as CODATA_GAS_CONSTANT  # CODATA value, not the project's constant

T_P = 50.0 + ZERO_CELSIUS
CP = 1800.0  # J/(kg K)
Q_SYN = 90e3  # J/kg -> 50 K
Q_DEC = 360e3  # J/kg -> 200 K
E_DEC = 100e3  # J/mol
Q_REF = 1.0  # W/kg
T_REF = 180.0 + ZERO_CELSIUS
MTT = 110.0 + ZERO_CELSIUS


def raw_case(mode="batch", **changes):
    raw = {
        "case": {"title": "engine test case (arbitrary inputs)"},
        "mass": {"amount": "2000 kg", "specific_heat": "1.8 kJ/(kg K)"},
        "process": {"temperature": "50 degC", "mode": mode,
                    "max_technical_temperature": "110 degC"},
        "synthesis": {"energy": "90 kJ/kg"},
        "decomposition": {"energy": "360 kJ/kg", "model": "zero-order",
                          "activation_energy": "100 kJ/mol", "reference_rate": "1 W/kg",
                          "reference_temperature": "180 degC",
                          "lowest_measured_temperature": "150 degC"},
    }
    if mode == "semi-batch":
        raw["process"].update(accumulation=0.4, accumulation_mass_ratio=0.8)
    for key, value in changes.items():
        section, name = key.split(".")
        if value is None:
            raw[section].pop(name, None)
        else:
            raw[section][name] = value
    return raw


def screened(raw):
    return screen_case(build_case(copy.deepcopy(raw), path="<test>"), curves=False)


def townsend_tou(temperature):
    """TMRad [s] of Townsend & Tou (1980), with q(T) written out (Arrhenius through q_ref)."""
    rate = Q_REF * math.exp(-E_DEC / CODATA_GAS_CONSTANT * (1.0 / temperature - 1.0 / T_REF))
    return CP * CODATA_GAS_CONSTANT * temperature**2 / (rate * E_DEC)


def temperature_for(hours):
    return brentq(lambda t: townsend_tou(t) - hours * 3600.0, 250.0, 700.0, xtol=1e-12)


def test_core_figures_of_a_zero_order_batch_case():
    r = screened(raw_case()).results
    # Stoessel 2008 ch. 2 / Stoessel 1993 (batch, X_ac = 1).
    mtsr = T_P + Q_SYN / CP
    final = mtsr + Q_DEC / CP
    assert r["synthesis_adiabatic_rise_K"] == pytest.approx(50.0, rel=1e-12)
    assert r["decomposition_adiabatic_rise_K"] == pytest.approx(200.0, rel=1e-12)
    assert r["mtsr_degC"] + ZERO_CELSIUS == pytest.approx(mtsr, rel=1e-12)
    assert r["final_temperature_degC"] + ZERO_CELSIUS == pytest.approx(final, rel=1e-12)
    assert r["runaway_adiabatic_rise_K"] == pytest.approx(final - T_P, rel=1e-12)
    # Townsend & Tou (1980) written out; brentq roots for TD24 and TD8. R from CODATA agrees
    # with the project's constant to 1e-9, so 1e-8 relative on times and 1e-9 on temperatures.
    td24, td8 = temperature_for(24.0), temperature_for(8.0)
    assert r["td24_degC"] + ZERO_CELSIUS == pytest.approx(td24, rel=1e-9)
    assert r["td8_degC"] + ZERO_CELSIUS == pytest.approx(td8, rel=1e-9)
    assert r["tmrad_at_mtsr_h"] * 3600.0 == pytest.approx(townsend_tou(mtsr), rel=1e-8)
    assert r["tmrad_at_process_temperature_h"] * 3600.0 == pytest.approx(townsend_tou(T_P),
                                                                         rel=1e-8)
    assert r["tmrad_at_mtsr_zero_order_h"] == pytest.approx(r["tmrad_at_mtsr_h"], rel=1e-12)
    assert r["onset_margin_K"] == pytest.approx(td24 - mtsr, rel=1e-8)
    # Class table (Stoessel 1993) by hand: MTSR 100 degC < MTT 110 degC, and TD24 (about
    # 162 degC for these inputs, the brentq root above) above both -> class 1.
    assert mtsr < MTT < td24
    assert r["criticality_class"] == 1
    # Severity from the runaway rise 250 K: 200-400 K "critical" / "high"; probability from
    # TMRad at MTSR (Stoessel 2008 ch. 3, bands from memory).
    assert r["severity_4"] == "critical" and r["severity"] == "high"
    tmr_h = townsend_tou(mtsr) / 3600.0
    expected_6 = ("frequent" if tmr_h <= 1 else "probable" if tmr_h <= 8 else
                  "occasional" if tmr_h <= 24 else "seldom" if tmr_h <= 50 else
                  "remote" if tmr_h <= 100 else "almost impossible")
    assert r["probability_6"] == expected_6


def test_semi_batch_mtsr_with_mass_correction_through_the_engine():
    # Stoessel 1993 with the derived mass correction: 50 degC + 0.4 x 50 K / 0.8 = 75 degC.
    r = screened(raw_case("semi-batch")).results
    assert r["mtsr_degC"] == pytest.approx(75.0, rel=1e-12)


@pytest.mark.parametrize("accumulations", [(0.0, 0.1, 0.35, 0.6, 0.9, 1.0)])
def test_mtsr_and_class_are_monotone_in_accumulation_through_the_engine(accumulations):
    # Issue 2 property "MTSR is monotone in accumulation": MTSR = T_p + X_ac dT_ad/ratio
    # (Stoessel 1993, mass correction derived) for each X_ac, and a higher MTSR never lowers the
    # class (class table, Stoessel 1993). TD24 does not depend on X_ac.
    results = [screened(raw_case("semi-batch", **{"process.accumulation": x})).results
               for x in accumulations]
    for x, r in zip(accumulations, results):
        assert r["mtsr_degC"] == pytest.approx(50.0 + x * 50.0 / 0.8, rel=1e-12)
    mtsr = [r["mtsr_degC"] for r in results]
    classes = [r["criticality_class"] for r in results]
    assert all(b > a for a, b in zip(mtsr, mtsr[1:]))
    assert all(b >= a for a, b in zip(classes, classes[1:]))
    assert classes[0] < classes[-1]  # the sweep crosses the MTT, so the check can fail
    assert len({r["td24_degC"] for r in results}) == 1


@pytest.mark.parametrize("changes, fragment", [
    # Ranges of issue 2 (common practice, no source); each value lies outside one of them.
    ({"mass.specific_heat": "0.6 kJ/(kg K)"}, "mass.specific_heat"),
    ({"mass.specific_heat": "5.5 kJ/(kg K)"}, "mass.specific_heat"),
    ({"decomposition.activation_energy": "25 kJ/mol"}, "decomposition.activation_energy"),
    ({"decomposition.activation_energy": "450 kJ/mol",
      "decomposition.reference_temperature": "120 degC"}, "decomposition.activation_energy"),
    ({"decomposition.energy": "2000 kJ/kg"}, "decomposition adiabatic rise"),
    ({"synthesis.energy": "1900 kJ/kg"},
     "synthesis adiabatic rise"),
])
def test_implausible_values_give_warnings(changes, fragment):
    # Issue 2: implausible but possible values produce warnings in the result, not errors.
    base = screened(raw_case())
    assert not any(fragment in text for text in base.warnings)
    result = screened(raw_case(**changes))
    assert any(fragment in text for text in result.warnings), result.warnings


def test_plausible_edges_do_not_warn():
    # Just inside the issue-2 ranges (common practice, no source): no warning.
    result = screened(raw_case(**{"mass.specific_heat": "0.85 kJ/(kg K)",
                                  "decomposition.activation_energy": "35 kJ/mol"}))
    assert not any("outside the usual" in text for text in result.warnings)


def test_higher_simulated_mtsr_governs_the_class():
    """Fail closed (design): when the cooling-failure simulation finds a higher MTSR than the
    stated accumulation gives, the class follows the higher value. Checked with the class table
    (Stoessel 1993) applied to the simulated MTSR; the demo case supplies only the inputs."""
    import pathlib

    from screen.io.case import load_case
    from screen.runs.screening import screen_case
    from screen.models.criticality import criticality_class

    path = pathlib.Path(__file__).parent.parent / "cases" / "acylation_semibatch_kinetics.toml"
    case = load_case(path, overrides=["process.accumulation=0.01",
                                      "process.max_technical_temperature=55 degC",
                                      "solvent.pressure=0.45 bar",
                                      "process.feed_interlock=true"])
    result = screen_case(case, curves=False)
    r = result.results
    simulated = r["simulation"]["mtsr_feed_stopped_degC"]
    assert simulated > r["mtsr_degC"] + 1.0
    assert r["mtsr_governing_degC"] == simulated
    expected = criticality_class(r["process_temperature_degC"], simulated, r["mtt_degC"],
                                 r["td24_degC"])
    assert r["criticality_class"] == expected
    assert r["criticality_class"] > r["criticality_class_stated_mtsr"]
    assert r["mtsr_feed_mode"] == "stopped"
    assert any("the class is" in w and "instead of" in w for w in result.warnings)


def test_vessel_without_semenov_structure_cannot_conclude(monkeypatch):
    """Fail closed (design): when the Semenov analysis of one vessel is not defined (here forced:
    the model raises as it does for E <= 4 R T_c), that vessel says "cannot-conclude" with null
    safety figures, keeps its synthesis check, and the rest of the screening goes on."""
    import pathlib

    from screen.io.case import load_case
    from screen.runs.screening import screen_case
    from screen.errors import ModelDomainError
    from screen.models import semenov

    def no_tangency(*args, **kwargs):
        raise ModelDomainError("activation energy <= 4 R T_c: no tangency")

    monkeypatch.setattr(semenov, "no_return_temperature", no_tangency)
    path = pathlib.Path(__file__).parent.parent / "cases" / "grignard_semibatch.toml"
    result = screen_case(load_case(path))
    (vessel,) = result.results["vessels"]
    assert vessel["stability"] == "cannot-conclude"
    assert vessel["mtsr_above_no_return"] is True
    assert vessel["critical_coolant_temperature_degC"] is None
    assert vessel["no_return_temperature_degC"] is None
    assert "no tangency" in vessel["verdict"]
    assert vessel["synthesis_stability"] in ("stable", "unstable", "stable-estimate")
    assert result.curves["vessels"] == []
    assert result.results["criticality_class"] == 3
    assert any("CANNOT CONCLUDE" in w for w in result.warnings)
