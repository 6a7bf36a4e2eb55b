"""The governing MTSR (issue 13 item 1, issue 18 item 2) and the assumptions of the verdict.

Sources of the check values:

- MTSR = T_p + X_ac dT_ad (Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75) and dT_ad = Q'/c'p,
  written out here;
- the class table of Stoessel (1993) applied to the governing MTSR by hand (class 1: MTSR < MTT
  < TD24; class 3: MTT <= MTSR < TD24; ...);
- severity from the runaway's adiabatic rise T_f - T_p with T_f = MTSR + dT_ad,decomposition
  (Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 3); the band limits
  50/200/400 K are from memory (as in screen.models.criticality);
- the feed-continuing bound T_p + dT_ad of the full charge: adiabatic energy balance (derived).

The case below is an arbitrary set of test inputs, not invented demo data.
"""

from __future__ import annotations

import pathlib

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from screen.constants import ZERO_CELSIUS
from screen.io.case import build_case, load_case
from screen.runs.screening import screen_case

ROOT = pathlib.Path(__file__).parent.parent
T_P = 50.0  # degC
CP = 1800.0  # J/(kg K)
Q_SYN = 90e3  # J/kg -> 50 K
Q_DEC = 360e3  # J/kg -> 200 K


def raw_case(interlock=None, accumulation=0.4, mass_ratio=0.8, mtt="110 degC"):
    raw = {
        "case": {"title": "governing MTSR test (arbitrary inputs)"},
        "mass": {"amount": "2000 kg", "specific_heat": "1.8 kJ/(kg K)"},
        "process": {"temperature": "50 degC", "mode": "semi-batch",
                    "max_technical_temperature": mtt, "accumulation": accumulation,
                    "accumulation_mass_ratio": mass_ratio},
        "synthesis": {"energy": "90 kJ/kg"},
        "decomposition": {"energy": "360 kJ/kg", "model": "zero-order",
                          "activation_energy": "100 kJ/mol", "reference_rate": "1 W/kg",
                          "reference_temperature": "180 degC",
                          "lowest_measured_temperature": "150 degC"},
    }
    if interlock is not None:
        raw["process"]["feed_interlock"] = interlock
    return raw


def screened(raw):
    return screen_case(build_case(raw, path="test.toml"), curves=False)


def severity_by_hand(rise):
    """Stoessel 2008 ch. 3 (bands from memory): >= 400 catastrophic, >= 200 critical, >= 50
    medium, else negligible."""
    if rise >= 400.0:
        return "catastrophic"
    if rise >= 200.0:
        return "critical"
    if rise >= 50.0:
        return "medium"
    return "negligible"


def test_declared_interlock_keeps_the_feed_stopped_mtsr():
    r = screened(raw_case(interlock=True)).results
    stated = T_P + 0.4 * (Q_SYN / CP) / 0.8  # 75 degC
    assert r["mtsr_degC"] == pytest.approx(stated, rel=1e-12)
    assert r["mtsr_governing_degC"] == pytest.approx(stated, rel=1e-12)
    assert r["mtsr_feed_mode"] == "stopped"
    assert r["mtsr_governing_source"] == "stated"
    feed = [a for a in r["assumptions"] if a["key"] == "process.feed_interlock"]
    assert feed == [{"key": "process.feed_interlock", "value": True, "basis": "declared",
                     "text": feed[0]["text"]}]


@pytest.mark.parametrize("interlock, basis", [(None, "default"), (False, "declared")])
def test_without_interlock_the_feed_continuing_bound_governs(interlock, basis):
    """No synthesis kinetics: the bound T_p + dT_ad of the full charge (derived) governs."""
    result = screened(raw_case(interlock=interlock, mtt="90 degC"))
    r = result.results
    bound = T_P + Q_SYN / CP  # 100 degC
    assert r["mtsr_degC"] == pytest.approx(75.0, rel=1e-12)  # old key: stated accumulation
    assert r["mtsr_governing_degC"] == pytest.approx(bound, rel=1e-12)
    assert r["mtsr_feed_mode"] == "continuing"
    assert r["mtsr_governing_source"] == "feed-continuing-bound"
    # Stated MTSR 75 < MTT 90 would be class 1 or 2; the bound 100 >= MTT 90: class 3 (TD24 is
    # far above, as the class-1 check of the interlocked case shows).
    assert r["criticality_class_stated_mtsr"] in (1, 2)
    assert r["criticality_class"] == 3
    feed = next(a for a in r["assumptions"] if a["key"] == "process.feed_interlock")
    assert (feed["value"], feed["basis"]) == (False, basis)
    declare = [w for w in result.warnings if "feed_interlock is not declared" in w]
    assert len(declare) == (1 if interlock is None else 0)


def test_assumptions_cover_the_required_keys_with_valid_bases():
    r = screened(raw_case()).results
    keys = {a["key"] for a in r["assumptions"]}
    assert {"process.feed_interlock", "process.accumulation", "process.max_technical_temperature",
            "phi", "decomposition.model"} <= keys
    assert all(a["basis"] in ("declared", "default", "derived") for a in r["assumptions"])
    assert all(set(a) == {"key", "value", "basis", "text"} for a in r["assumptions"])
    assert r["verdict_basis_lines"][0].startswith(f"Class {r['criticality_class']} on MTSR ")
    assert 3 <= len(r["verdict_basis_lines"]) <= 10


def test_batch_case_has_no_feed_assumption():
    raw = raw_case()
    raw["process"] = {"temperature": "50 degC", "mode": "batch",
                      "max_technical_temperature": "110 degC"}
    r = screened(raw).results
    assert r["mtsr_feed_mode"] == "batch"
    assert r["mtsr_governing_degC"] == pytest.approx(T_P + Q_SYN / CP, rel=1e-12)
    assert all(a["key"] != "process.feed_interlock" for a in r["assumptions"])


def test_acylation_demo_of_issue_18_item_2():
    """The demo of issue 18 item 2: with the interlock declared the simulated feed-stopped MTSR
    (60.2 degC) governs; final temperature, runaway rise and severity follow it (rise 201.9 K:
    'critical', no longer 196.3 K 'medium')."""
    case = load_case(ROOT / "cases" / "acylation_semibatch_kinetics.toml",
                     overrides=["process.accumulation=0.05", "decomposition.energy=345 kJ/kg",
                                "process.feed_interlock=true"])
    r = screen_case(case, curves=False).results
    simulated = r["simulation"]["mtsr_feed_stopped_degC"]
    assert r["mtsr_governing_degC"] == simulated
    assert r["mtsr_governing_degC"] == pytest.approx(60.2, abs=0.05)
    assert r["final_temperature_degC"] == pytest.approx(
        simulated + r["decomposition_adiabatic_rise_K"], abs=1e-9)
    assert r["runaway_adiabatic_rise_K"] == pytest.approx(201.9, abs=0.05)
    assert r["severity_4"] == "critical"
    assert r["onset_margin_K"] == pytest.approx(r["td24_degC"] - simulated, abs=1e-9)


def test_acylation_without_interlock_is_classed_on_the_feed_continuing_simulation():
    """Issue 13: the acylation case's own simulation with the feed continuing reaches 134.1 degC,
    above the MTT 110.7 degC and below TD24: class 3 (Stoessel 1993), not class 1."""
    case = load_case(ROOT / "cases" / "acylation_semibatch_kinetics.toml")
    r = screen_case(case, curves=False).results
    continuing = r["simulation"]["mtsr_feed_continuing_degC"]
    assert r["mtsr_governing_degC"] == continuing
    assert r["mtsr_feed_mode"] == "continuing"
    assert r["mtt_degC"] <= continuing < r["td24_degC"]
    assert r["criticality_class"] == 3


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(accumulation=st.integers(0, 1000).map(lambda i: i / 1000),
       mass_ratio=st.integers(300, 1000).map(lambda i: i / 1000),
       interlock=st.sampled_from([None, True, False]),
       q_syn=st.integers(10, 600), q_dec=st.integers(20, 1500), mtt=st.integers(55, 250))
def test_property_every_mtsr_figure_follows_the_governing_mtsr(accumulation, mass_ratio,
                                                                interlock, q_syn, q_dec, mtt):
    """Invariant of issue 18 item 2 over random cases: T_f = governing MTSR + dT_ad,dec, the
    runaway rise is T_f - T_p, the severity follows it, the margin is TD24 - governing MTSR,
    and the governing MTSR is the highest candidate (ties to the more critical side)."""
    raw = raw_case(interlock=interlock, accumulation=accumulation, mass_ratio=mass_ratio,
                   mtt=f"{mtt} degC")
    raw["synthesis"]["energy"] = f"{q_syn} kJ/kg"
    raw["decomposition"]["energy"] = f"{q_dec} kJ/kg"
    r = screened(raw).results
    stated = T_P + accumulation * (q_syn * 1e3 / CP) / mass_ratio
    candidates = [stated] + ([] if interlock is True else [T_P + q_syn * 1e3 / CP])
    governing = max(candidates)
    assert r["mtsr_degC"] == pytest.approx(stated, rel=1e-9, abs=1e-9)
    assert r["mtsr_governing_degC"] == pytest.approx(governing, rel=1e-9, abs=1e-9)
    final = governing + q_dec * 1e3 / CP
    assert r["final_temperature_degC"] == pytest.approx(final, rel=1e-9)
    assert r["runaway_adiabatic_rise_K"] == pytest.approx(final - T_P, rel=1e-9)
    # The lowest level needs no pressure increase (Stoessel 2008 ch. 3, issue 18 item 5): the
    # final temperature at or above the MTT (a boiling point) makes it at least "medium".
    expected = severity_by_hand(r["runaway_adiabatic_rise_K"])
    if expected == "negligible" and final >= mtt:
        expected = "medium"
    assert r["severity_4"] == expected
    assert r["onset_margin_K"] == pytest.approx(r["td24_degC"] - governing, abs=1e-6)
    assert r["mtsr_governing_degC"] >= max(r["mtsr_candidates_degC"].values()) - 1e-9
    assert r["tmrad_at_mtsr_h"] == r["tmrad_at_mtsr_governing_h"]


def test_every_bundled_case_satisfies_the_invariant():
    for path in sorted((ROOT / "cases").glob("*.toml")):
        r = screen_case(load_case(path), curves=False).results
        assert r["final_temperature_degC"] == pytest.approx(
            r["mtsr_governing_degC"] + r["decomposition_adiabatic_rise_K"], abs=1e-6), path.name
        assert r["runaway_adiabatic_rise_K"] == pytest.approx(
            r["final_temperature_degC"] - r["process_temperature_degC"], abs=1e-6), path.name
        expected = severity_by_hand(r["runaway_adiabatic_rise_K"])
        if expected == "negligible" and r.get("pressure_increase"):
            expected = "medium"  # Stoessel 2008 ch. 3: the lowest level needs no pressure rise
        assert r["severity_4"] == expected, path.name
        assert r["mtsr_governing_degC"] + ZERO_CELSIUS >= r["mtsr_degC"] + ZERO_CELSIUS - 1e-9
