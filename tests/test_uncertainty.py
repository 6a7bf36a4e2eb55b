"""Tests of screen.runs.uncertainty (Monte Carlo propagation of input uncertainties).

Check values come from outside the module under test:

* JCGM 100:2008 (GUM): first-order propagation, section 5.1.2 (u_y = |dy/dx| u_x), and the
  standard uncertainties of a rectangular (4.3.7: (b - a)/sqrt(12)) and a symmetric triangular
  distribution (4.3.9: half-width/sqrt(6)).
* Sampling statistics: the standard error of a mean, s/sqrt(N); of a standard deviation,
  about s/sqrt(2(N - 1)) for normal data; of a correlation coefficient, about (1 - r^2)/sqrt(N)
  (textbook large-sample results).
* scipy.stats.spearmanr (a general-purpose reference library) for the rank correlation.
* scipy.optimize.brentq, through screen.models.semenov.critical_point, for the vectorised
  Semenov critical point; and the scalar engine (screen.analyses.engine.screen_case) for the vectorised
  TMRad, TD24 and MTSR.

The case values below are arbitrary inputs chosen to give plant-like magnitudes; they are not
check values.
"""

from __future__ import annotations

import copy
import json
import math
import os
import subprocess
import sys

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from screen.io.case import build_case, load_case
from screen.constants import ZERO_CELSIUS
from screen.runs.screening import screen_case
from screen.errors import CaseError, ScreenError
from screen.runs import uncertainty as unc

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLE = os.path.join(ROOT, "cases", "esterification_uncertain.toml")


def base_raw(model="zero-order"):
    """An arbitrary batch case (inputs only, not check values)."""
    decomposition = {"energy": "300 kJ/kg", "model": model, "activation_energy": "110 kJ/mol",
                     "reference_rate": "1 W/kg", "reference_temperature": "180 degC"}
    if model == "nth-order":
        decomposition["order"] = 1
    return {
        "case": {"title": "uncertainty test case (arbitrary inputs)"},
        "mass": {"amount": "2000 kg", "specific_heat": "1.8 kJ/(kg K)"},
        "process": {"temperature": "50 degC", "mode": "batch",
                    "max_technical_temperature": "110 degC"},
        "synthesis": {"energy": "90 kJ/kg"},
        "decomposition": decomposition,
        "vessel": {"name": "V1", "heat_transfer_area": "8 m^2",
                   "heat_transfer_coefficient": "300 W/(m^2 K)", "coolant_temperature": "20 degC"},
    }


def screened(raw):
    result = screen_case(build_case(raw, path="<test>"), curves=False)
    return result


def with_uncertainty(raw, entries):
    raw = copy.deepcopy(raw)
    raw["uncertainty"] = dict(entries)
    return raw


# ---------------------------------------------------------------------------------------------
# Against the GUM (JCGM 100:2008)
# ---------------------------------------------------------------------------------------------

def test_adiabatic_rise_of_normal_cp_matches_first_order_propagation():
    """dT_ad = Q/c'p with c'p normal: MC mean and spread against JCGM 100:2008 5.1.2."""
    q, cp, u_cp = 90e3, 1800.0, 18.0  # J/kg, J/(kg K), J/(kg K): 1 % relative
    raw = base_raw()
    raw["mass"]["specific_heat"] = "1.8 ± 0.018 kJ/(kg K)"
    result = screened(raw)
    n = 100_000
    block = unc.add_uncertainty(result, samples=n, seed=7)
    rise = block["synthesis_adiabatic_rise_K"]
    expected = q / cp                            # first-order estimate of the mean
    u_expected = q / cp ** 2 * u_cp              # |d(Q/c)/dc| u(c), GUM 5.1.2
    # Tolerance: 4 standard errors of the sample mean, plus the second-order Taylor term of
    # E[Q/c] = Q/c0 (1 + (u/c0)^2 + ...), which first-order propagation leaves out (derived).
    tolerance = 4.0 * u_expected / math.sqrt(n) + expected * (u_cp / cp) ** 2
    assert abs(rise["mean"] - expected) <= tolerance
    # Spread: 4 standard errors of a standard deviation, s/sqrt(2(N - 1)).
    assert abs(rise["std"] - u_expected) <= 4.0 * u_expected / math.sqrt(2.0 * (n - 1))
    # The first-order result must also be distinguishable from a wrong one (5 % off).
    assert abs(rise["std"] - 1.05 * u_expected) > 4.0 * u_expected / math.sqrt(2.0 * (n - 1))


@pytest.mark.parametrize("text, expected_std", [
    # JCGM 100:2008 4.3.7: rectangular on [a, b] has u = (b - a)/sqrt(12).
    ("uniform 1.7 .. 1.9 kJ/(kg K)", 200.0 / math.sqrt(12.0)),
    # JCGM 100:2008 4.3.9: symmetric triangular of half-width a has u = a/sqrt(6).
    ("triangular 1.7 .. 1.8 .. 1.9 kJ/(kg K)", 100.0 / math.sqrt(6.0)),
])
def test_rectangular_and_triangular_spreads_match_the_gum(text, expected_std):
    case = build_case(with_uncertainty(base_raw(), {"mass.specific_heat": text}))
    inputs, correlation, _ = unc.collect_inputs(case)
    n = 200_000
    values, _ = unc.draw_samples(inputs, n, seed=3, correlation=correlation)
    sample = values["mass.specific_heat"]
    assert abs(sample.mean() - 1800.0) <= 4.0 * expected_std / math.sqrt(n)
    assert abs(sample.std(ddof=1) - expected_std) <= 4.0 * expected_std / math.sqrt(2.0 * n)
    assert sample.min() >= 1700.0 and sample.max() <= 1900.0


def test_lognormal_factor_gives_median_and_geometric_spread():
    """lognormal factor F: median = case value, sd of ln x = ln F (definition of the words)."""
    case = build_case(with_uncertainty(base_raw(), {"decomposition.reference_rate":
                                                    "lognormal factor 2"}))
    inputs, correlation, _ = unc.collect_inputs(case)
    n = 100_000
    values, _ = unc.draw_samples(inputs, n, seed=5, correlation=correlation)
    logs = np.log(values["decomposition.reference_rate"])
    assert abs(np.median(logs)) <= 4.0 * 1.2533 * math.log(2.0) / math.sqrt(n)
    assert abs(logs.std(ddof=1) - math.log(2.0)) <= 4.0 * math.log(2.0) / math.sqrt(2.0 * n)


def test_arrhenius_correlation_is_imposed_on_e_and_ln_a():
    """Correlated E and ln A: the sample correlation equals the stated one within
    4 (1 - r^2)/sqrt(N) (large-sample standard error of r)."""
    raw = base_raw()
    dec = raw["decomposition"]
    del dec["reference_rate"], dec["reference_temperature"]
    dec["pre_exponential_factor"] = "1e10 1/s"
    raw = with_uncertainty(raw, {"decomposition.activation_energy": "normal 5 kJ/mol",
                                 "decomposition.pre_exponential_factor": "lognormal factor 30",
                                 "arrhenius_correlation": 0.95})
    case = build_case(raw)
    inputs, correlation, _ = unc.collect_inputs(case)
    n = 50_000
    values, _ = unc.draw_samples(inputs, n, seed=11, correlation=correlation)
    r = np.corrcoef(values["decomposition.activation_energy"],
                    np.log(values["decomposition.pre_exponential_factor"]))[0, 1]
    assert abs(r - 0.95) <= 4.0 * (1.0 - 0.95 ** 2) / math.sqrt(n)


def test_spearman_matches_scipy():
    """Rank correlation with ties and infinities against scipy.stats.spearmanr."""
    from scipy.stats import spearmanr

    rng = np.random.default_rng(0)
    x = rng.integers(0, 20, 2000).astype(float)
    y = x + rng.normal(0.0, 5.0, 2000)
    y[:10] = -np.inf
    assert unc.rank_correlation(x, y) == pytest.approx(spearmanr(x, y).statistic, abs=1e-12)


# ---------------------------------------------------------------------------------------------
# Vectorised figures equal the scalar engine
# ---------------------------------------------------------------------------------------------

def _raw_for(model, e, q_ref, cp, t_p, order, a0):
    e, q_ref, cp, t_p = (float(x) for x in (e, q_ref, cp, t_p))
    raw = base_raw("nth-order" if model == "nth-order" else model)
    dec = raw["decomposition"]
    dec.update(activation_energy=f"{e!r} J/mol", reference_rate=f"{q_ref!r} W/kg",
               reference_temperature="460 K")
    if model == "nth-order":
        dec["order"] = order
    if model == "autocatalytic":
        dec.update(order=order, autocatalytic_order=1, initial_conversion=a0)
    raw["mass"]["specific_heat"] = f"{cp!r} J/(kg*K)"
    raw["process"]["temperature"] = f"{t_p!r} K"
    return raw


sample_strategy = st.tuples(
    st.floats(85e3, 180e3),      # E [J/mol]
    st.floats(0.05, 20.0),       # q_ref [W/kg]
    st.floats(1500.0, 2500.0),   # c'p [J/(kg K)]
    st.floats(290.0, 350.0),     # T_p [K]
)


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(model=st.sampled_from(["zero-order", "nth-order", "autocatalytic"]),
       order=st.floats(0.5, 2.0), a0=st.floats(0.002, 0.05),
       samples=st.lists(sample_strategy, min_size=2, max_size=4))
def test_vectorised_figures_equal_scalar_engine(model, order, a0, samples):
    """TMRad, TD24, MTSR, class and critical coolant temperature of the vectorised path equal
    the scalar engine (screen_case on the same inputs) to 1e-9 relative."""
    scalar = []
    for e, q_ref, cp, t_p in samples:
        try:
            scalar.append(screened(_raw_for(model, e, q_ref, cp, t_p, order, a0)).results)
        except ScreenError:
            assume(False)
    e, q_ref, cp, t_p = (np.array(column) for column in zip(*samples, strict=True))
    case = build_case(_raw_for(model, e[0], q_ref[0], cp[0], t_p[0], order, a0))
    values = {"decomposition.activation_energy": e, "decomposition.reference_rate": q_ref,
              "mass.specific_heat": cp, "process.temperature": t_p}
    figures = unc.evaluate_figures(case, scalar[0], values)
    for index, results in enumerate(scalar):
        assert figures["td24"][index] - ZERO_CELSIUS == pytest.approx(results["td24_degC"],
                                                                      rel=1e-9)
        assert figures["tmrad_at_mtsr"][index] / 3600.0 == pytest.approx(
            results["tmrad_at_mtsr_h"], rel=1e-9)
        assert figures["mtsr"][index] - ZERO_CELSIUS == pytest.approx(results["mtsr_degC"],
                                                                      rel=1e-9)
        assert figures["criticality_class"][index] == results["criticality_class"]
        vessel = results["vessels"][0]
        assert figures["vessel.1.critical_coolant_temperature"][index] - ZERO_CELSIUS == \
            pytest.approx(vessel["critical_coolant_temperature_degC"], rel=1e-9)
        assert bool(figures["vessel.1.mtsr_above_no_return"][index]) == \
            vessel["mtsr_above_no_return"]


@settings(max_examples=30, deadline=None)
@given(e=st.floats(60e3, 250e3), q_ref=st.floats(1e-3, 100.0), t_ref=st.floats(380.0, 560.0),
       mass=st.floats(1.0, 2e4), ua=st.floats(1.0, 2e4))
def test_vectorised_critical_point_equals_brentq(e, q_ref, t_ref, mass, ua):
    """Newton in 1/T against scipy brentq in screen.models.semenov.critical_point."""
    from screen.models import semenov
    from screen.models.decomposition import DecompositionKinetics

    try:
        reference = semenov.critical_point(mass, ua, q_ref, t_ref, e)
    except ScreenError:
        assume(False)
    kinetics = DecompositionKinetics.from_reference_rate("zero-order", 3e5, np.array([e, e]),
                                                         q_ref, t_ref)
    tangency, critical = unc.critical_coolant_temperature(kinetics, mass, ua)
    assert tangency[0] == pytest.approx(reference.tangency_temperature, rel=1e-9)
    assert critical[1] == pytest.approx(reference.critical_coolant_temperature, rel=1e-9)


def test_nominal_figures_with_losses_geometry_and_several_vessels_equal_engine():
    """Three vessels with areas from geometry, batch masses and losses to ambient: the
    vectorised path at the case values equals the scalar engine (screen.analyses.vessels)."""
    case = load_case(os.path.join(ROOT, "cases", "nitration_semibatch.toml"),
                     overrides=["vessel.3.heat_losses=400 W/K",
                                "vessel.3.ambient_temperature=30 degC"])
    results = screen_case(case, curves=False).results
    figures = unc.evaluate_figures(case, results)
    for index, vessel in enumerate(results["vessels"], start=1):
        key = f"vessel.{index}."
        assert figures[key + "critical_coolant_temperature"][0] - ZERO_CELSIUS == \
            pytest.approx(vessel["critical_coolant_temperature_degC"], rel=1e-9)
        assert figures[key + "coolant_margin"][0] == pytest.approx(vessel["coolant_margin_K"],
                                                                   rel=1e-9)
        assert bool(figures[key + "mtsr_above_no_return"][0]) == vessel["mtsr_above_no_return"]


def test_uncertain_activation_energy_keeps_the_reference_rate():
    """With reference_rate given, every sample has q(T_ref) = q_ref (the rate held as measured)."""
    raw = with_uncertainty(base_raw("nth-order"), {"decomposition.activation_energy":
                                                   "normal 15 kJ/mol"})
    case = build_case(raw)
    result = screen_case(case, curves=False)
    inputs, correlation, _ = unc.collect_inputs(case)
    values, _ = unc.draw_samples(inputs, 1000, seed=2, correlation=correlation)
    kinetics = unc.sampled_kinetics(case, result.results, values)
    rates = kinetics.heat_release_rate(180.0 + ZERO_CELSIUS)
    assert np.ptp(values["decomposition.activation_energy"]) > 50e3
    np.testing.assert_allclose(rates, 1.0, rtol=1e-12)


# ---------------------------------------------------------------------------------------------
# Probabilities, reproducibility, fail closed
# ---------------------------------------------------------------------------------------------

@pytest.fixture(scope="module")
def example_block():
    result = screen_case(load_case(EXAMPLE), curves=False)
    return result, unc.add_uncertainty(result, samples=4000, seed=123)


def test_probabilities_sum_to_one(example_block):
    _, block = example_block
    assert set(block["class_probabilities"]) == {"1", "2", "3", "4", "5"}
    for name in ("class_probabilities", "severity_probabilities", "severity_3_probabilities",
                 "probability_level_probabilities", "probability_3_level_probabilities"):
        assert sum(block[name].values()) == pytest.approx(1.0, abs=1e-12)
    for key in ("mtsr_degC", "td24_degC", "tmrad_at_mtsr_h", "onset_margin_K"):
        assert block[key]["p5"] <= block[key]["p50"] <= block[key]["p95"]


def test_result_carries_verdict_summary_and_chart(example_block):
    result, block = example_block
    assert block["samples"] == 4000 and block["seed"] == 123
    assert "Monte Carlo (4000 samples, seed 123)" in result.results["verdict"]
    assert all(len(line) <= 78 for line in block["summary_lines"])
    assert block["summary_lines"][0].startswith("Uncertainty")
    assert all(line.startswith("  ") for line in block["summary_lines"][1:])
    chart = result.curves["uncertainty"]
    assert len(chart["names"]) == len(chart["values"]) == len(block["inputs"]) == 8
    vessel = block["vessels"][0]
    assert vessel["critical_coolant_temperature_degC"]["p5"] < \
        vessel["critical_coolant_temperature_degC"]["p95"]
    json.dumps(result.to_json_dict(), allow_nan=False)


def test_same_seed_same_numbers_and_chunking_does_not_matter():
    case = load_case(EXAMPLE)
    results = screen_case(case, curves=False).results
    first = unc.run_monte_carlo(case, results, 3000, seed=99)
    again = unc.run_monte_carlo(case, results, 3000, seed=99)
    chunked = unc.run_monte_carlo(case, results, 3000, seed=99, chunk=700)
    other = unc.run_monte_carlo(case, results, 3000, seed=100)
    for key in ("td24", "tmrad_at_mtsr", "mtsr", "vessel.1.critical_coolant_temperature",
                "criticality_class"):
        np.testing.assert_array_equal(first.figures[key], again.figures[key])
        # Other block sizes change only the last bits of the root finding.
        np.testing.assert_allclose(first.figures[key], chunked.figures[key], rtol=1e-12)
    assert not np.array_equal(first.figures["td24"], other.figures["td24"])


def test_samples_without_td24_count_as_class_5():
    """Fail closed: a sample with no TD24 root in 150-1500 K counts as class 5 (design)."""
    raw = base_raw()
    del raw["vessel"]
    # Low E and a slow rate: zero-order TMRad at 1500 K is near 24 h, so slower samples have
    # no TD24 in the searched range.
    raw["decomposition"].update(activation_energy="40 kJ/mol", reference_rate="0.05 W/kg",
                                reference_temperature="500 K")
    raw = with_uncertainty(raw, {"decomposition.reference_rate": "lognormal factor 10"})
    result = screened(raw)
    assert result.results["criticality_class"] == 1
    block = unc.add_uncertainty(result, samples=2000, seed=1)
    missing = block["td24_no_root_samples"]
    assert 200 < missing < 1800
    # Independent expectation: E/(2R) = 2405 K lies above 1500 K, so the Townsend & Tou (1980)
    # TMRad falls over the whole search range and a sample has no TD24 exactly when
    # TMRad(1500 K) > 24 h, i.e. q_ref below q_crit (solved by hand from c'p R T^2/(q E) = 24 h
    # with q(1500 K) = q_ref exp(-(E/R)(1/1500 - 1/500))). ln q_ref is normal with sd ln 10
    # ("lognormal factor 10"), so the expected share is Phi(ln(q_crit/0.05)/ln 10); binomial
    # sampling error, 4 standard deviations.
    from scipy.constants import R as codata_r
    from scipy.stats import norm

    activation, cp, top = 40e3, 1800.0, 1500.0
    q_crit = (cp * codata_r * top**2 / (activation * 86400.0)
              / math.exp(-activation / codata_r * (1.0 / top - 1.0 / 500.0)))
    share = norm.cdf(math.log(q_crit / 0.05) / math.log(10.0))
    assert missing / 2000 == pytest.approx(share, abs=4.0 * math.sqrt(share * (1 - share) / 2000))
    assert block["class_probabilities"]["5"] >= missing / 2000
    assert block["td24_degC"]["p5"] is None  # the lower percentiles are undefined, not hidden
    assert "fail closed" in result.results["verdict"]
    assert any("fail closed" in text for text in result.warnings)


def test_plus_minus_on_an_input_that_does_not_enter_is_reported():
    raw = base_raw()
    raw["mass"]["specific_heat"] = "1.8 ± 0.05 kJ/(kg K)"
    raw["decomposition"]["onset_temperature"] = "220 ± 5 degC"
    result = screened(raw)
    block = unc.add_uncertainty(result, samples=200, seed=1)
    assert block["not_propagated"] == ["decomposition.onset_temperature"]
    assert any("not propagated" in text for text in result.warnings)


# ---------------------------------------------------------------------------------------------
# Validation of the [uncertainty] section
# ---------------------------------------------------------------------------------------------

@pytest.mark.parametrize("entries, key, message", [
    ({"decomposition.activation_enrgy": "normal 8 kJ/mol"},
     "uncertainty.decomposition.activation_enrgy",
     "did you mean 'decomposition.activation_energy'"),
    ({"decomposition.activation_energy": "gaussian 8 kJ/mol"},
     "uncertainty.decomposition.activation_energy", "unknown distribution"),
    ({"decomposition.activation_energy": "normal 8 K"},
     "uncertainty.decomposition.activation_energy", "not a molar energy"),
    ({"decomposition.activation_energy": "uniform 120 .. 130 kJ/mol"},
     "uncertainty.decomposition.activation_energy", "must contain the case value"),
    ({"mass.specific_heat": "normal 1 kJ/(kg K)"},
     "uncertainty.mass.specific_heat", "outside the allowed range"),
    ({"decomposition.reference_rate": "lognormal factor 0.5"},
     "uncertainty.decomposition.reference_rate", "F > 1"),
    ({"decomposition.pre_exponential_factor": "lognormal factor 3"},
     "uncertainty.decomposition.pre_exponential_factor", "not given in the case"),
    ({"arrhenius_correlation": 0.9},
     "uncertainty.arrhenius_correlation", "needs pre_exponential_factor"),
    ({"arrhenius_correlation": 1.5},
     "uncertainty.arrhenius_correlation", r"in \[-1, 1\]"),
    ({"vessel.2.coolant_temperature": "normal 2 K"},
     "uncertainty.vessel.2.coolant_temperature", "does not exist"),
    ({"vessel.volume": "normal 2 %"}, "uncertainty.vessel.volume", "not propagated"),
    ({"synthesis.energy": 5}, "uncertainty.synthesis.energy", "quoted distribution"),
])
def test_bad_uncertainty_entries_name_key_and_fix(entries, key, message):
    with pytest.raises(CaseError, match=message) as info:
        build_case(with_uncertainty(base_raw(), entries), path="c.toml")
    assert info.value.key == key
    assert info.value.path == "c.toml"


def test_good_words_are_accepted():
    raw = with_uncertainty(base_raw(), {
        "decomposition.activation_energy": "normal 5 %",
        "decomposition": {"energy": "triangular 280 .. 300 .. 330 kJ/kg"},  # unquoted dotted key
        "process.temperature": "normal 2 degC",
        "vessel.coolant_temperature": "uniform 15 .. 25 degC"})
    case = build_case(raw)
    inputs, _, _ = unc.collect_inputs(case)
    by_key = {entry.key: entry.marginals[0] for entry in inputs}
    assert by_key["decomposition.activation_energy"].parameters == (110e3, pytest.approx(5.5e3))
    assert by_key["process.temperature"].parameters[1] == pytest.approx(2.0)  # a difference
    assert by_key["decomposition.energy"].kind == "triangular"


def test_same_input_twice_is_an_error():
    raw = base_raw()
    raw["mass"]["specific_heat"] = "1.8 ± 0.05 kJ/(kg K)"
    raw = with_uncertainty(raw, {"mass.specific_heat": "normal 2 %"})
    result = screened(raw)
    with pytest.raises(CaseError, match="give one of them"):
        unc.add_uncertainty(result, samples=100, seed=1)


def test_no_uncertainty_and_bad_sample_counts_are_errors():
    result = screened(base_raw())
    with pytest.raises(CaseError, match="no uncertainty to propagate"):
        unc.add_uncertainty(result, samples=100, seed=1)
    result = screened(with_uncertainty(base_raw(), {"mass.specific_heat": "normal 2 %"}))
    with pytest.raises(CaseError, match="samples"):
        unc.add_uncertainty(result, samples=5, seed=1)
    with pytest.raises(CaseError, match="seed"):
        unc.add_uncertainty(result, samples=100, seed=-1)


# ---------------------------------------------------------------------------------------------
# Command line, end to end
# ---------------------------------------------------------------------------------------------

def test_check_uncertainty_json_end_to_end():
    completed = subprocess.run(
        [sys.executable, "-m", "screen", "check", EXAMPLE, "--uncertainty", "2000", "--seed", "5",
         "--json"], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert completed.returncode == 0, completed.stderr
    data = json.loads(completed.stdout)
    block = data["results"]["uncertainty"]
    assert block["samples"] == 2000 and block["seed"] == 5
    assert sum(block["class_probabilities"].values()) == pytest.approx(1.0)
    for key in ("td24_degC", "mtsr_degC"):
        assert block[key]["p5"] <= block[key]["p50"] <= block[key]["p95"]
    # The nominal figures lie inside the Monte Carlo spread.
    assert block["td24_degC"]["p5"] < data["results"]["td24_degC"] < block["td24_degC"]["p95"]
    assert "probability" in data["results"]["verdict"]


def test_check_uncertainty_without_uncertainties_exits_2():
    completed = subprocess.run(
        [sys.executable, "-m", "screen", "check", os.path.join(ROOT, "cases",
                                                               "esterification_batch.toml"),
         "--uncertainty", "100"], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert completed.returncode == 2
    assert "no uncertainty to propagate" in completed.stderr
