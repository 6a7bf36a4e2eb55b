"""Tests of screen.runs.limits and the ``limits`` command.

Check values are independent closed forms or independent numerics written out here:

- MTSR = T_p + X_ac dT_ad / (m(t_acc)/m_final), dT_ad = Q/c'p (F. Stoessel, "What is your
  thermal risk?", Chem. Eng. Prog. 89(10) (1993) 68-75): the process-temperature and
  accumulation limits of the class boundary MTSR = min(MTT, TD24);
- TD24 of zero-order kinetics from the Townsend-Tou adiabatic time to maximum rate,
  TMRad = c'p R T^2 / (q(T) E) (D. I. Townsend, J. C. Tou, Thermochim. Acta 37 (1980) 1-30),
  solved here with scipy.optimize.brentq;
- the coolant temperature at which the temperature of no return of the Semenov heat balance
  m q(T) = U A (T - T_c) equals MTSR (N. N. Semenov, Z. Phys. 48 (1928) 571; F. Stoessel,
  Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 2), by brentq on the heat balance;
- the batch mass at which the cooling capacity U A (T_p - T_c) equals the peak heat release
  m q_peak (cooling-capacity ratio 1; Stoessel 2008 ch. 2).

The case data below are arbitrary inputs (invented, not check values).
"""

from __future__ import annotations

import csv
import json
import math

import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from screen.cli.main import main
from screen.constants import GAS_CONSTANT as R
from screen.constants import ZERO_CELSIUS
from screen.errors import CaseError
from screen.io.case import build_case
from screen.runs import limits as L
from screen.runs.screening import screen_case
from screen.runs.sweep import case_with_value

try:  # Python 3.11+
    import tomllib
except ModuleNotFoundError:  # pragma: no cover
    import tomli as tomllib

CLASS4 = "cases/alkylation_reflux_class4.toml"

#: Invented inputs: semi-batch, given MTT, zero-order decomposition, one vessel with a given
#: heat-transfer area (U A known without geometry).
BASE_TOML = """
[case]
title = "limits test (invented inputs)"
[mass]
amount = "5000 kg"
specific_heat = "1.9 kJ/(kg K)"
density = "950 kg/m^3"
[process]
temperature = "80 degC"
mode = "semi-batch"
accumulation = 0.55
accumulation_mass_ratio = 0.85
feed_interlock = true
max_technical_temperature = "{mtt}"
[synthesis]
energy = "{q_syn}"
activation_energy = "70 kJ/mol"
peak_heat_release_rate = "10 W/kg"
[decomposition]
energy = "600 kJ/kg"
model = "zero-order"
activation_energy = "110 kJ/mol"
reference_rate = "1.5 W/kg"
reference_temperature = "150 degC"
[[vessel]]
name = "R-1"
heat_transfer_coefficient = "300 W/(m^2 K)"
heat_transfer_area = "12 m^2"
coolant_temperature = "{t_c}"
volume = "8 m^3"
"""

CP = 1900.0
Q_SYN_DEFAULT = 190e3
E_DEC, Q_REF, T_REF = 110e3, 1.5, 150.0 + ZERO_CELSIUS
UA = 300.0 * 12.0


def make_case(mtt="110 degC", q_syn="190 kJ/kg", t_c="15 degC"):
    raw = tomllib.loads(BASE_TOML.format(mtt=mtt, q_syn=q_syn, t_c=t_c))
    return build_case(raw, path="<limits-test>")


def q_dec(t):
    """Specific heat release of the fresh mass [W/kg], written out independently."""
    return Q_REF * math.exp(-E_DEC / R * (1.0 / t - 1.0 / T_REF))


def td24_townsend_tou():
    """TD24 from TMRad = c'p R T^2/(q(T) E) = 24 h (Townsend & Tou 1980), by brentq."""
    return brentq(lambda t: CP * R * t * t / (q_dec(t) * E_DEC) - 86400.0, 300.0, 600.0,
                  xtol=1e-10)


def run(case, **kw):
    base = screen_case(case, curves=False)
    return L.find_limits(case, base, **kw)


def entry(found, key, criterion, vessel=None):
    hits = [e for e in found.entries if e["key"] == key and e["criterion"] == criterion
            and e["vessel"] == vessel]
    assert len(hits) == 1, (key, criterion, [e["text"] for e in found.entries])
    return hits[0]


# Class boundary MTSR = min(MTT, TD24): closed form of the MTSR (Stoessel 1993) ----------------


def test_class_boundary_at_mtt_matches_mtsr_formula():
    case = make_case(mtt="110 degC")  # TD24 (about 127 degC) above the MTT: boundary at MTT
    found = run(case, vary=["process.temperature", "process.accumulation"], target_class=2)
    rise = Q_SYN_DEFAULT / CP / 0.85  # dT_ad / mass ratio
    mtt = 110.0
    assert td24_townsend_tou() - ZERO_CELSIUS > mtt
    t_limit = mtt - 0.55 * rise  # T_p with MTSR = MTT [degC]
    x_limit = (mtt - 80.0) / rise  # X_ac with MTSR = MTT
    e_t = entry(found, "process.temperature", "class<=2")
    e_x = entry(found, "process.accumulation", "class<=2")
    assert e_t["bound"] == "upper" and e_x["bound"] == "upper"
    assert e_t["value"] == pytest.approx(t_limit, abs=1.3e-3)  # 1e-6 of 1310 K range
    assert e_x["value"] == pytest.approx(x_limit, abs=2e-6)
    assert e_t["unit"] == "degC" and e_t["current_value"] == pytest.approx(80.0)
    assert not e_t["satisfied_now"] and e_t["achievable"]


def test_class_boundary_at_td24_matches_mtsr_formula_and_townsend_tou():
    case = make_case(mtt="160 degC")  # MTT above TD24: the boundary is MTSR = TD24
    found = run(case, vary=["process.temperature", "process.accumulation"], target_class=2)
    td24 = td24_townsend_tou() - ZERO_CELSIUS
    rise = Q_SYN_DEFAULT / CP / 0.85
    e_t = entry(found, "process.temperature", "class<=2")
    e_x = entry(found, "process.accumulation", "class<=2")
    assert e_t["value"] == pytest.approx(td24 - 0.55 * rise, abs=2e-3)
    assert e_x["value"] == pytest.approx((td24 - 80.0) / rise, abs=2e-5)


def test_onset_margin_limit_matches_td24_minus_margin():
    case = make_case(mtt="160 degC")
    found = run(case, vary=["process.accumulation"], margin=20.0)
    td24 = td24_townsend_tou() - ZERO_CELSIUS
    rise = Q_SYN_DEFAULT / CP / 0.85
    e = entry(found, "process.accumulation", "onset_margin")
    assert e["value"] == pytest.approx((td24 - 20.0 - 80.0) / rise, abs=2e-5)


# Coolant limit of recoverability: T_NR = MTSR on the Semenov heat balance ----------------------


def no_return_temperature(t_c, mass=5000.0):
    """Upper intersection of m q(T) = U A (T - T_c) (Semenov 1928), by brentq above the
    tangency of the removal line's slope (dq/dT m = U A)."""
    t_star = brentq(lambda t: mass * q_dec(t) * E_DEC / (R * t * t) - UA, 300.0, 900.0)
    g = lambda t: mass * q_dec(t) - UA * (t - t_c)  # noqa: E731
    if g(t_star) >= 0.0:
        return None
    return brentq(g, t_star, 1500.0, xtol=1e-12)


def test_coolant_limit_of_recoverability_is_semenov_root_at_mtsr():
    # A large synthesis heat puts MTSR on the unstable branch, above the tangency temperature.
    case = make_case(mtt="400 degC", q_syn="380 kJ/kg")
    base = screen_case(case, curves=False)
    mtsr = base.results["mtsr_degC"] + ZERO_CELSIUS
    found = L.find_limits(case, base, vary=["vessel.coolant_temperature"])
    e = entry(found, "vessel.coolant_temperature", "decomposition_stability", "R-1")
    # Independent: the coolant temperature at which T_NR(T_c) = MTSR.
    t_c_limit = brentq(lambda tc: (no_return_temperature(tc) or 0.0) - mtsr,
                       200.0, mtsr - 1.0, xtol=1e-10)
    assert e["bound"] == "upper" and e["satisfied_now"]
    assert e["value"] == pytest.approx(t_c_limit - ZERO_CELSIUS, abs=1.3e-3)


# Batch-mass limit of synthesis cooling: cooling capacity = peak heat release -------------------


def test_batch_mass_limit_of_synthesis_cooling_is_cooling_capacity_ratio():
    # T_p - T_c = 10 K < R T_p^2/E = 14.8 K: the capacity ratio binds before the slope.
    case = make_case(t_c="70 degC")
    found = run(case, vary=["vessel.batch_mass"])
    e = entry(found, "vessel.batch_mass", "synthesis_cooling", "R-1")
    m_limit = UA * 10.0 / 10.0  # U A (T_p - T_c) / q_peak [kg]
    assert e["bound"] == "upper" and not e["satisfied_now"]
    assert e["value"] == pytest.approx(m_limit, abs=8e-3)  # 1e-6 of the 7600 kg range


# Property: 1e-3 of the range past a limit flips the criterion, back restores it -----------------


@pytest.fixture(scope="module")
def class4_limits():
    from screen.io.case import load_case

    case = load_case(CLASS4)
    base = screen_case(case, curves=False)
    found = L.find_limits(case, base)
    return case, found


def _criterion(found, e):
    if e["criterion"].startswith("class<="):
        return L.Criterion("criticality_class", k=int(e["criterion"][7:]))
    if e["criterion"] == "onset_margin":
        return L.Criterion("onset_margin", margin=found.margin)
    return L.Criterion(e["criterion"], e["vessel"])


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_moving_past_a_limit_flips_and_back_restores(class4_limits, data):
    case, found = class4_limits
    limits = [e for e in found.entries if e["status"] == "limit"]
    assert len(limits) >= 8
    e = data.draw(st.sampled_from(limits))
    item = next(i for i in found.inputs if i.key == e["key"])
    criterion = _criterion(found, e)
    evaluate = L._Evaluator(case, item)
    step = 1e-3 * (item.high - item.low) * (1 if e["bound"] == "upper" else -1)
    limit_si = {"degC": e["value"] + ZERO_CELSIUS}.get(e["unit"], e["value"])
    if e["unit"] not in ("degC", "", "kg", "W/(m^2 K)"):
        pytest.skip(f"unit {e['unit']}")
    inside = criterion.ok(evaluate(limit_si - step))
    outside = criterion.ok(evaluate(limit_si + step))
    assert inside is True and outside is False, e["text"]


# Bad input -------------------------------------------------------------------------------------


@pytest.mark.parametrize("args, fragment", [
    (["--vary", "process.nonsense"], "no such key"),
    (["--vary", "decomposition.energy"], "not a controllable input"),
    (["--vary", "vessel.7.coolant_temperature"], "vessel number 7"),
    (["--target-class", "0"], "1 to 5"),
    (["--target-class", "6"], "1 to 5"),
    (["--margin", "fifty"], "--margin"),
])
def test_bad_input_one_line_exit_2(args, fragment):
    result = CliRunner().invoke(main, ["limits", CLASS4, *args])
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.strip().splitlines() if line]
    assert len(lines) == 1 and lines[0].startswith("error:") and fragment in lines[0]


def test_target_class_out_of_range_in_library():
    with pytest.raises(CaseError, match="1 to 5"):
        L.find_limits(make_case(), screen_case(make_case(), curves=False), target_class=7)


# Command: JSON contract, CSV, text -------------------------------------------------------------


def test_limits_json_contract_and_csv(tmp_path):
    out = tmp_path / "limits.csv"
    result = CliRunner().invoke(main, ["limits", CLASS4, "--json", "--csv", str(out)])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    entries = data["results"]["limits"]
    assert entries and data["cautions"]
    for e in entries:
        for name in ("key", "vessel", "criterion", "bound", "value", "unit", "current_value",
                     "achievable"):
            assert name in e
        assert e["bound"] in ("upper", "lower", None)
        assert isinstance(e["achievable"], bool)
        if e["status"] == "limit":
            assert e["value"] is not None and e["bound"] is not None
    text = out.read_text(encoding="utf-8")
    assert text.startswith("# ") and "SCREENING AID" in text.splitlines()[0].upper()
    rows = list(csv.DictReader(line for line in text.splitlines() if not line.startswith("#")))
    assert len(rows) == len(entries)
    again = CliRunner().invoke(main, ["limits", CLASS4, "--csv", str(out)])
    assert again.exit_code == 2 and "exists" in again.output


def test_limits_text_is_short_and_actionable():
    result = CliRunner().invoke(main, ["limits", CLASS4])
    assert result.exit_code == 0, result.output
    assert "must go below" in result.output and "must stay" in result.output
    assert "Cautions" in result.output


def test_trimmed_vessel_screening_matches_full_case():
    """Vessel inputs are screened with their vessel alone: same verdicts as the full case."""
    from screen.io.case import load_case

    case = load_case("cases/nitration_semibatch.toml")
    base = screen_case(case, curves=False).results
    item = L.resolve_inputs(case, ["vessel.2.coolant_temperature"], base)[0]
    evaluate = L._Evaluator(case, item)
    assert len(evaluate.case.vessels) == 1
    for value in (item.current, item.current + 40.0):
        alone = evaluate(value)["results"]["vessels"][0]
        full = screen_case(case_with_value(case, "vessel.2.coolant_temperature", value),
                           curves=False).results["vessels"][1]
        for name in ("stability", "synthesis_stability", "no_return_temperature_degC"):
            assert alone.get(name) == full.get(name)


def test_check_and_report_with_limits(tmp_path):
    result = CliRunner().invoke(main, ["check", CLASS4, "--limits", "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["results"]["limits"] and data["results"]["limits_basis"]["target_class"] == 2
    pdf = tmp_path / "r.pdf"
    result = CliRunner().invoke(main, ["report", CLASS4, "-o", str(pdf), "--limits", "--window",
                                       "process.temperature", "process.accumulation"])
    assert result.exit_code == 0, result.output
    assert pdf.read_bytes().startswith(b"%PDF")
    bad = CliRunner().invoke(main, ["report", CLASS4, "-o", str(tmp_path / "x.pdf"), "--window",
                                    "process.temperature", "process.accumulation"])
    assert bad.exit_code == 2 and "--limits" in bad.output


def test_window_grid_classes_match_mtsr_formula():
    """Each window point's class agrees with MTSR = T_p + X_ac dT_ad/ratio against MTT and
    TD24 (Stoessel 1993; TD24 from Townsend & Tou 1980), for the invented test case."""
    case = make_case(mtt="110 degC")
    base = screen_case(case, curves=False)
    window = L.operating_window(case, base, "process.temperature", "process.accumulation",
                                points=5)
    td24 = td24_townsend_tou() - ZERO_CELSIUS
    rise = Q_SYN_DEFAULT / CP / 0.85
    for j, x_ac in enumerate(window["y"]):
        for i, t_p in enumerate(window["x"]):
            mtsr = t_p + x_ac * rise
            expected = (1 if mtsr < 110.0 else 3) if mtsr < td24 else 4
            assert window["classes"][j][i] == expected, (t_p, x_ac)


RELIEF_TOML = """headspace_volume = "3 m^3"
relief_set_pressure = "35 bar"
[solvent]
name = "toluene"
pressure = "1.013 bar"
amount = "2000 kg"
gas_yield = "0.1 mol/kg"
"""


def test_relief_pressure_limit_flips_one_thousandth_past_it():
    """The closed-vessel pressure criterion: 1e-3 of the range past the limit it fails, back
    inside it holds (property of the root finding; the pressure itself is checked in
    tests/test_pressure.py)."""
    text = (BASE_TOML.format(mtt="110 degC", q_syn="190 kJ/kg", t_c="15 degC")
            .replace('max_technical_temperature = "110 degC"\n', '')
            .replace('energy = "600 kJ/kg"', 'energy = "200 kJ/kg"') + RELIEF_TOML)
    case = build_case(tomllib.loads(text), path="<limits-test>")
    found = run(case, vary=["process.accumulation"])
    e = entry(found, "process.accumulation", "relief_pressure", "R-1")
    assert e["status"] == "limit" and e["bound"] == "upper" and e["satisfied_now"]
    item = found.inputs[0]
    evaluate = L._Evaluator(case, item)
    criterion = L.Criterion("relief_pressure", "R-1")
    assert criterion.ok(evaluate(e["value"] - 1e-3))
    assert not criterion.ok(evaluate(e["value"] + 1e-3))


@settings(max_examples=12, deadline=None)
@given(margin=st.floats(min_value=0.0, max_value=45.0))
def test_onset_margin_limit_follows_any_margin(margin):
    """For any margin, the accumulation limit of TD24 - MTSR >= margin is the closed form
    X_ac = (TD24 - margin - T_p) / (dT_ad / ratio) (Stoessel 1993; TD24 by Townsend & Tou 1980)."""
    case = make_case(mtt="160 degC")
    found = run(case, vary=["process.accumulation"], margin=margin)
    td24 = td24_townsend_tou() - ZERO_CELSIUS
    rise = Q_SYN_DEFAULT / CP / 0.85
    e = entry(found, "process.accumulation", "onset_margin")
    assert e["value"] == pytest.approx((td24 - margin - 80.0) / rise, abs=2e-5)
