"""Tests of screen.models.dsc (DSC kinetics numerics).

Reference data come from outside the code under test:
- thermograms simulated here with scipy.integrate.solve_ivp from known kinetics
  (d alpha/dt = A exp(-E/(R T)) f(alpha) under linear heating; the "truth" is the input E, A, f);
- scipy.integrate.quad for the temperature integral, scipy.signal.savgol_filter for smoothing,
  scipy.stats.linregress for the regression;
- closed-form geometry of a Gaussian peak (derived in the test) for onset and peak temperature;
- published methods: Kissinger, Anal. Chem. 29 (1957) 1702 (exact for first order at the rate
  maximum); Friedman, J. Polym. Sci. C 6 (1964) 183 (exact for any single step); Doyle,
  J. Appl. Polym. Sci. 6 (1962) 639 (log10 p(x) ~ -2.315 - 0.4567 x for 20 <= x <= 60, from
  memory); ICTAC recommendations, Vyazovkin et al., Thermochim. Acta 520 (2011) 1-19.
No invented demo data is used as a check value.
"""

from __future__ import annotations

import functools
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad, solve_ivp

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import ModelDomainError
from screen.models import dsc

R = GAS_CONSTANT
LEVELS = np.round(np.arange(0.05, 0.951, 0.05), 2)


def simulate(beta_k_min, energy, a, n=1.0, m=0.0, alpha0=0.0, q_total=800e3,
             t_start=300.0, t_end=700.0, points=3000):
    """Time [s], T [K], alpha, specific heat flow [W/kg] by solve_ivp (independent of screen)."""
    beta = beta_k_min / 60.0
    duration = (t_end - t_start) / beta

    def rhs(t, y):
        temp = t_start + beta * t
        x = min(max(y[0], 0.0), 1.0)
        return [a * math.exp(-energy / (R * temp)) * (1.0 - x) ** n * (x**m if m else 1.0)]

    time = np.linspace(0.0, duration, points)
    sol = solve_ivp(rhs, (0.0, duration), [alpha0], t_eval=time, method="LSODA",
                    rtol=1e-10, atol=1e-13)
    alpha = np.clip(sol.y[0], 0.0, 1.0)
    temp = t_start + beta * time
    rate = a * np.exp(-energy / (R * temp)) * (1.0 - alpha) ** n * (alpha**m if m else 1.0)
    return time, temp, alpha, rate * q_total


@functools.lru_cache(maxsize=None)
def simulated_runs(kind):
    """Cached clean runs for the kinetics of ``kind``; returns (truth dict, list of runs)."""
    truths = {
        # first order, E and A typical of a decomposition
        "first": dict(energy=120e3, a=1e12, n=1.0, m=0.0, alpha0=0.0),
        # nth order
        "nth": dict(energy=140e3, a=5e13, n=1.6, m=0.0, alpha0=0.0),
        # autocatalytic, extended Prout-Tompkins
        "auto": dict(energy=100e3, a=1e11, n=1.2, m=0.8, alpha0=1e-3),
    }
    truth = truths[kind]
    runs = [(b / 60.0, simulate(b, **truth)) for b in (2.0, 4.0, 8.0, 16.0)]
    return truth, runs


def analyse(runs, **kwargs):
    return [dsc.analyse_peak(t, temp, q, **kwargs) for _, (t, temp, _, q) in runs]


# ------------------------------------------------------------------------------------------
# Temperature integral, smoothing, regression (reference libraries)
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("x", [5.0, 15.0, 30.0, 60.0, 150.0])
def test_temperature_integral_matches_quad(x):
    # reference: scipy.integrate.quad of exp(-E/(R T)) from 0 to T
    energy = 100e3
    temp = energy / (R * x)
    reference, _ = quad(lambda u: math.exp(-energy / (R * u)), 1e-6, temp, epsabs=0,
                        epsrel=1e-12, limit=200)
    assert dsc.temperature_integral(temp, energy) == pytest.approx(reference, rel=1e-8)


@pytest.mark.parametrize("x", [10.0, 25.0, 50.0])
def test_log_derivative_matches_numerical_derivative(x):
    # reference: central difference of ln p(x) with p from quad, p(x) = int_x^inf e^-u/u^2 du
    def ln_p(v):
        value, _ = quad(lambda u: math.exp(-u) / u**2, v, np.inf, epsrel=1e-13)
        return math.log(value)

    h = 1e-4
    reference = -(ln_p(x + h) - ln_p(x - h)) / (2 * h)
    assert dsc.temperature_integral_log_derivative(x) == pytest.approx(reference, rel=1e-6)


@pytest.mark.parametrize("x", [20.0, 30.0, 40.0, 60.0])
def test_doyle_constant_within_its_stated_range(x):
    # Doyle (1962), from memory: b = 0.4567 for 20 <= x <= 60; exact b = D/ln10 within 5 %
    b = dsc.temperature_integral_log_derivative(x) / math.log(10.0)
    assert b == pytest.approx(0.4567, rel=0.05)


@pytest.mark.parametrize("window", [5, 11, 31])
def test_smooth_matches_scipy_savgol(window):
    from scipy.signal import savgol_filter

    rng = np.random.default_rng(3)
    y = np.sin(np.linspace(0, 6, 400)) + rng.normal(0, 0.2, 400)
    expected = savgol_filter(y, window, 3, mode="interp")
    assert np.allclose(dsc.smooth(y, window), expected, atol=1e-12)


def test_linear_regression_matches_scipy_linregress():
    from scipy.stats import linregress

    rng = np.random.default_rng(5)
    x = np.linspace(0, 1, 12)
    y = 3.0 - 2.0 * x + rng.normal(0, 0.05, x.size)
    fit = dsc.linear_regression(x, y)
    ref = linregress(x, y)
    assert fit.slope == pytest.approx(ref.slope, rel=1e-12)
    assert fit.intercept == pytest.approx(ref.intercept, rel=1e-12)
    assert fit.slope_standard_error == pytest.approx(ref.stderr, rel=1e-10)
    assert fit.intercept_standard_error == pytest.approx(ref.intercept_stderr, rel=1e-10)


def test_regression_two_points_has_no_interval():
    fit = dsc.linear_regression([1.0, 2.0], [1.0, 3.0])
    assert fit.slope == pytest.approx(2.0)
    assert fit.t_quantile is None and fit.slope_standard_error is None


# ------------------------------------------------------------------------------------------
# Kissinger, ASTM E698, isoconversional methods on simulated thermograms (solve_ivp)
# ------------------------------------------------------------------------------------------


def test_kissinger_recovers_first_order_kinetics():
    # Kissinger (1957): exact at the rate maximum for first order -> E within 1 %, ln A within 0.1
    truth, runs = simulated_runs("first")
    peaks = analyse(runs)
    beta = np.array([b for b, _ in runs])
    result = dsc.kissinger(beta, [p.peak_temperature for p in peaks])
    assert result.activation_energy == pytest.approx(truth["energy"], rel=0.01)
    assert result.ln_pre_exponential_factor == pytest.approx(math.log(truth["a"]), abs=0.1)
    low, high = result.activation_energy_interval
    assert low < truth["energy"] < high or abs(result.activation_energy / truth["energy"] - 1) < 1e-3


def test_kissinger_nth_order_within_two_percent():
    # Kissinger's relation holds approximately for n != 1 (n (1 - alpha_m)^(n-1) ~ 1): 2 %
    truth, runs = simulated_runs("nth")
    peaks = analyse(runs)
    beta = np.array([b for b, _ in runs])
    result = dsc.kissinger(beta, [p.peak_temperature for p in peaks])
    assert result.activation_energy == pytest.approx(truth["energy"], rel=0.02)


def test_kissinger_pre_exponential_factor_per_run_matches_regression():
    # A = beta E/(R Tp^2) exp(E/(R Tp)) (Kissinger relation) for first-order simulated data: 5 %
    truth, runs = simulated_runs("first")
    peaks = analyse(runs)
    values = [dsc.kissinger_pre_exponential_factor(b, p.peak_temperature, truth["energy"])
              for (b, _), p in zip(runs, peaks)]
    for value in values:
        assert value == pytest.approx(truth["a"], rel=0.05)


def test_astm_e698_refinement_moves_towards_truth():
    # E698 form (from memory): Doyle first approximation, refined with D(x); refined within 1 %
    truth, runs = simulated_runs("first")
    peaks = analyse(runs)
    beta = np.array([b for b, _ in runs])
    result = dsc.astm_e698(beta, [p.peak_temperature for p in peaks])
    assert result.activation_energy == pytest.approx(truth["energy"], rel=0.01)
    assert abs(result.activation_energy - truth["energy"]) <= abs(
        result.first_approximation - truth["energy"])
    assert result.iterations >= 2


@pytest.mark.parametrize("kind", ["first", "nth", "auto"])
def test_friedman_recovers_activation_energy_across_conversion(kind):
    # Friedman (1964) involves no approximation: within 1 % at every alpha 0.05 ... 0.95
    truth, runs = simulated_runs(kind)
    peaks = analyse(runs)
    temps, rates = dsc.isoconversional_points(peaks, LEVELS)
    result = dsc.friedman(LEVELS, temps, rates)
    assert np.allclose(result.activation_energy, truth["energy"], rtol=0.01)
    assert result.spread() < 0.02


def test_flynn_wall_ozawa_refined_and_doyle():
    # Flynn-Wall-Ozawa with the iterative correction: 1 %; Doyle constant alone: 3 % (x ~ 30-40)
    truth, runs = simulated_runs("first")
    peaks = analyse(runs)
    beta = np.array([b for b, _ in runs])
    temps, _ = dsc.isoconversional_points(peaks, LEVELS)
    refined = dsc.flynn_wall_ozawa(LEVELS, temps, beta)
    doyle = dsc.flynn_wall_ozawa(LEVELS, temps, beta, refine=False)
    assert np.allclose(refined.activation_energy, truth["energy"], rtol=0.01)
    assert np.allclose(doyle.activation_energy, truth["energy"], rtol=0.03)


def test_ictac_style_two_parallel_reactions_flag_varying_energy():
    # ICTAC Kinetics Committee (Vyazovkin et al. 2011; simulated-data description of the ICTAC
    # kinetics project, Brown et al., Thermochim. Acta 355 (2000) 125) -- parameters FROM MEMORY,
    # not verifiable offline: two independent parallel first-order steps, E1 = 80 kJ/mol,
    # A1 = 1e10 1/min, E2 = 120 kJ/mol, A2 = 1e15 1/min, equal heat. Expected qualitatively
    # (published behaviour): Ea(alpha) rises between E1 and E2, the spread exceeds the
    # single-step threshold, and the integral method lags the differential one.
    k = [(80e3, 1e10 / 60.0), (120e3, 1e15 / 60.0)]
    runs = []
    for b in (1.0, 2.0, 4.0, 8.0, 16.0):
        beta = b / 60.0

        def rhs(t, y, beta=beta):
            temp = 300.0 + beta * t
            return [a * math.exp(-e / (R * temp)) * (1 - y[i]) for i, (e, a) in enumerate(k)]

        time = np.linspace(0.0, 400.0 / beta, 3000)
        sol = solve_ivp(rhs, (0, time[-1]), [0.0, 0.0], t_eval=time, method="LSODA",
                        rtol=1e-10, atol=1e-13)
        temp = 300.0 + beta * time
        q = 0.5 * sum(a * np.exp(-e / (R * temp)) * (1 - sol.y[i]) for i, (e, a) in enumerate(k))
        runs.append((beta, dsc.analyse_peak(time, temp, q * 500e3)))
    beta = np.array([b for b, _ in runs])
    peaks = [p for _, p in runs]
    temps, rates = dsc.isoconversional_points(peaks, LEVELS)
    fried = dsc.friedman(LEVELS, temps, rates)
    ozawa = dsc.flynn_wall_ozawa(LEVELS, temps, beta)
    energies = fried.activation_energy
    assert np.all((energies > 80e3) & (energies < 120e3))
    assert energies[LEVELS == 0.7][0] - energies[0] > 15e3
    assert fried.spread() > dsc.SPREAD_THRESHOLD
    assert ozawa.activation_energy[LEVELS == 0.7][0] < energies[LEVELS == 0.7][0]
    kiss = dsc.kissinger(beta, [p.peak_temperature for p in peaks])
    assert 80e3 < kiss.activation_energy < 120e3


def test_kissinger_rejects_falling_peak_temperature():
    with pytest.raises(ModelDomainError, match="does not rise"):
        dsc.kissinger([1 / 60, 2 / 60, 4 / 60], [500.0, 495.0, 490.0])


def test_kissinger_needs_two_rates():
    with pytest.raises(ModelDomainError, match="two"):
        dsc.kissinger([1 / 60, 1 / 60], [500.0, 501.0])


# ------------------------------------------------------------------------------------------
# Peak analysis: energy, baseline, onset (analytic Gaussian and simulated runs)
# ------------------------------------------------------------------------------------------


def gaussian_run(mu=450.0, sigma=6.0, height=2000.0, beta=5 / 60, drift=0.0, offset=0.0):
    temp = np.linspace(350.0, 560.0, 4000)
    time = (temp - temp[0]) / beta
    signal = height * np.exp(-0.5 * ((temp - mu) / sigma) ** 2) + offset + drift * (temp - 350)
    return time, temp, signal


def test_gaussian_peak_geometry():
    # Derived for a Gaussian: peak at mu; inflection at mu - sigma with s/s' = sigma, so the
    # tangent meets the baseline at mu - 2 sigma; area = height sigma sqrt(2 pi)/beta (in time);
    # detection where s = q_det: mu - sigma sqrt(2 ln(H/q_det)).
    mu, sigma, height, beta = 450.0, 6.0, 2000.0, 5 / 60
    time, temp, signal = gaussian_run(mu, sigma, height, beta, drift=0.3, offset=50.0)
    result = dsc.analyse_peak(time, temp, signal, detection_limit=20.0)
    assert result.peak_temperature == pytest.approx(mu, abs=0.05)
    assert result.onset_temperature == pytest.approx(mu - 2 * sigma, abs=0.1 * sigma)
    area = height * sigma * math.sqrt(2 * math.pi) / beta
    assert result.energy == pytest.approx(area, rel=0.005)
    expected_detection = mu - sigma * math.sqrt(2 * math.log(height / 20.0))
    assert result.detection_temperature == pytest.approx(expected_detection, abs=0.2)
    assert result.heating_rate == pytest.approx(beta, rel=1e-9)


def test_energy_of_simulated_runs_within_half_percent():
    # energy = integral of the heat flow = q_total (solve_ivp simulation); 0.5 %
    truth, runs = simulated_runs("nth")
    for result in analyse(runs):
        assert result.energy == pytest.approx(800e3, rel=0.005)


def test_sigmoidal_baseline_handles_heat_capacity_step():
    # A baseline step proportional to conversion (heat capacity change) is removed exactly by
    # the sigmoidal construction (design of the method); a straight line leaves an error.
    _, runs = simulated_runs("first")
    time, temp, alpha, q = runs[1][1]
    step = 150.0  # W/kg baseline shift from reactant to product
    signal = q + 100.0 + step * alpha
    sig = dsc.analyse_peak(time, temp, signal, baseline="sigmoidal")
    lin = dsc.analyse_peak(time, temp, signal, baseline="linear")
    assert sig.energy == pytest.approx(800e3, rel=0.005)
    assert abs(sig.energy - 800e3) < abs(lin.energy - 800e3)


def test_window_limits_are_used():
    time, temp, signal = gaussian_run()
    result = dsc.analyse_peak(time, temp, signal, temperature_window=(420.0, 480.0))
    assert temp[result.start_index] >= 420.0 and temp[result.end_index] <= 480.0


def test_exotherm_sign_detects_direction():
    time, temp, signal = gaussian_run()
    assert dsc.exotherm_sign(time, signal)[0] == 1.0
    sign, minor = dsc.exotherm_sign(time, -signal)
    assert sign == -1.0 and minor < 0.05


def test_flat_signal_has_no_peak():
    time = np.linspace(0, 1000, 500)
    temp = 300 + time / 10
    rng = np.random.default_rng(1)
    with pytest.raises(ModelDomainError, match="no exothermic peak"):
        dsc.analyse_peak(time, temp, rng.normal(0, 1.0, time.size))


# ------------------------------------------------------------------------------------------
# Model fitting and simulation
# ------------------------------------------------------------------------------------------


def test_simulate_linear_heating_matches_solve_ivp():
    # the generalised-time solution against a direct solve_ivp integration in time
    truth, runs = simulated_runs("auto")
    beta, (time, temp, alpha, _) = runs[0]
    sim_alpha, _ = dsc.simulate_linear_heating(temp, beta, truth["energy"], math.log(truth["a"]),
                                               truth["n"], truth["m"], truth["alpha0"])
    assert np.max(np.abs(sim_alpha - alpha)) < 1e-4


def test_model_fit_recovers_nth_order():
    truth, runs = simulated_runs("nth")
    beta = np.array([b for b, _ in runs])
    fit = dsc.fit_reaction_model(analyse(runs), beta)
    assert fit.name == "nth-order"
    assert fit.activation_energy == pytest.approx(truth["energy"], rel=0.01)
    assert fit.order == pytest.approx(truth["n"], abs=0.05)
    assert fit.rms_temperature_residual < 0.5


def test_model_fit_recovers_autocatalytic():
    truth, runs = simulated_runs("auto")
    beta = np.array([b for b, _ in runs])
    fit = dsc.fit_reaction_model(analyse(runs), beta)
    assert fit.name == "autocatalytic"
    assert fit.activation_energy == pytest.approx(truth["energy"], rel=0.01)
    assert fit.order == pytest.approx(truth["n"], abs=0.1)
    assert fit.autocatalytic_order == pytest.approx(truth["m"], abs=0.1)
    assert 0.2 * truth["alpha0"] < fit.initial_conversion < 5 * truth["alpha0"]
    assert fit.rms_temperature_residual < 0.5
    assert any("autocatalytic model chosen" in text for text in fit.explanation)


def test_forcing_autocatalytic_on_nth_order_data_fails_closed():
    _, runs = simulated_runs("first")
    beta = np.array([b for b, _ in runs])
    with pytest.raises(ModelDomainError, match="no autocatalysis"):
        dsc.fit_reaction_model(analyse(runs), beta, choice="autocatalytic")


def test_maximum_of_reaction_model_matches_grid():
    alpha = np.linspace(0, 1, 200001)
    for m, n in [(0.8, 1.2), (1.0, 1.0), (0.3, 2.0)]:
        grid_max = np.max(dsc.reaction_model(alpha, n, m))
        assert dsc.maximum_of_reaction_model(n, m) == pytest.approx(grid_max, rel=1e-6)


# ------------------------------------------------------------------------------------------
# TMRad and TD24 (Townsend & Tou 1980, zero order)
# ------------------------------------------------------------------------------------------


def test_zero_order_td24_satisfies_townsend_tou():
    # At TD24: c'p R T^2/(q(T) E) = 24 h, evaluated here independently of the module.
    energy, cp = 100e3, 1800.0
    q_ref, t_ref = 50.0, 450.0  # W/kg at 450 K
    ln_q_inf = math.log(q_ref) + energy / (R * t_ref)
    td = dsc.zero_order_td(ln_q_inf, energy, cp)
    q = q_ref * math.exp(-energy / R * (1 / td - 1 / t_ref))
    assert cp * R * td**2 / (q * energy) == pytest.approx(24 * SECONDS_PER_HOUR, rel=1e-8)
    assert td < t_ref


def test_crude_td24_assumptions_and_monotonicity():
    # Keller et al. (1997, from memory): zero order, E = 50 kJ/mol, q(onset) = detection limit.
    onset = 180.0 + 273.15
    td = dsc.crude_td24_from_onset(onset)
    q = dsc.CRUDE_DETECTION_LIMIT * math.exp(-dsc.CRUDE_ACTIVATION_ENERGY / R * (1 / td - 1 / onset))
    tmr = dsc.DEFAULT_SPECIFIC_HEAT * R * td**2 / (q * dsc.CRUDE_ACTIVATION_ENERGY)
    assert tmr == pytest.approx(24 * SECONDS_PER_HOUR, rel=1e-8)
    # a more sensitive instrument (lower detection limit) gives a higher TD24
    assert dsc.crude_td24_from_onset(onset, detection_limit=10.0) > td
    assert td < onset - 50.0


def test_townsend_tou_time_to_maximum_rate_hand_value():
    # Townsend & Tou (1980): TMRad = c'p R T^2/(q E). Hand-worked: c'p = 1800 J/(kg K),
    # T = 400 K, q(400 K) = 0.1 W/kg, E = 100 kJ/mol -> 1800 x 8.314462618 x 400^2/(0.1 x 1e5)
    # = 239456.5234 s (R from the CODATA 2018 exact value, from memory).
    energy = 100e3
    ln_q_inf = math.log(0.1) + energy / (8.314462618 * 400.0)
    value = dsc.townsend_tou_time_to_maximum_rate(400.0, ln_q_inf, energy, 1800.0)
    assert float(value) == pytest.approx(239456.52339, rel=1e-9)
    # Arrays: each element is the scalar formula (q written out here).
    temps = np.array([380.0, 420.0])
    q = 0.1 * np.exp(-energy / R * (1.0 / temps - 1.0 / 400.0))
    np.testing.assert_allclose(dsc.townsend_tou_time_to_maximum_rate(temps, ln_q_inf, energy,
                                                                     1800.0),
                               1800.0 * R * temps**2 / (q * energy), rtol=1e-12)


def test_townsend_tou_rejects_bad_input():
    with pytest.raises(ModelDomainError):
        dsc.townsend_tou_time_to_maximum_rate(400.0, 20.0, -1.0, 1500.0)


# ------------------------------------------------------------------------------------------
# Robustness to noise and baseline drift (property tests)
# ------------------------------------------------------------------------------------------


@settings(max_examples=20, deadline=None)
@given(
    noise_fraction=st.floats(0.0, 0.01),
    drift=st.floats(-1.0, 1.0),
    offset=st.floats(-300.0, 300.0),
    exo_down=st.booleans(),
    seed=st.integers(0, 2**31 - 1),
)
def test_kinetics_robust_to_noise_and_drift(noise_fraction, drift, offset, exo_down, seed):
    # Moderate white noise (up to 1 % of the peak height) and a linear baseline drift: Kissinger
    # and mean Friedman E within 3 %, energy within 2 % of the simulated truth (solve_ivp data).
    truth, runs = simulated_runs("first")
    rng = np.random.default_rng(seed)
    analyses, beta = [], []
    for b, (time, temp, _, q) in runs:
        signal = q + offset + drift * (temp - temp[0]) + rng.normal(0, noise_fraction * q.max(), q.size)
        if exo_down:
            signal = -signal
        sign, _ = dsc.exotherm_sign(time, signal)
        assert sign == (-1.0 if exo_down else 1.0)
        analyses.append(dsc.analyse_peak(time, temp, sign * signal))
        beta.append(b)
    kiss = dsc.kissinger(beta, [a.peak_temperature for a in analyses])
    assert kiss.activation_energy == pytest.approx(truth["energy"], rel=0.03)
    temps, rates = dsc.isoconversional_points(analyses, LEVELS)
    fried = dsc.friedman(LEVELS, temps, rates)
    assert fried.mean() == pytest.approx(truth["energy"], rel=0.03)
    for a in analyses:
        assert a.energy == pytest.approx(800e3, rel=0.02)


def test_zero_order_helpers_reject_nan():
    # Project rule (fail closed): a NaN input raises the project's error, never returns NaN.
    import math as _math

    from screen.errors import ModelDomainError
    from screen.models import dsc as _dsc

    with pytest.raises(ModelDomainError):
        _dsc.townsend_tou_time_to_maximum_rate(_math.nan, 30.0, 100e3, 1800.0)
    with pytest.raises(ModelDomainError):
        _dsc.townsend_tou_time_to_maximum_rate(400.0, 30.0, _math.nan, 1800.0)
    with pytest.raises(ModelDomainError):
        _dsc.crude_td24_from_onset(_math.nan)
