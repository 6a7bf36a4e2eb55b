"""Tests of screen.models.semenov.

Check values come from independent numerics (scipy.optimize.brentq / minimize_scalar on the heat
balance written out here), from published results (Semenov, Z. Phys. 48 (1928) 571; F. A.
Williams, Combustion Theory, 2nd ed. 1985, app. B; Townsend & Tou, Thermochim. Acta 37 (1980)
1-30) or from derivations stated beside the check. The vessel parameters below are arbitrary
inputs chosen to give plant-like magnitudes; they are not check values.
"""

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq, minimize_scalar

from screen.constants import GAS_CONSTANT as R
from screen.errors import ModelDomainError
from screen.models import semenov

MASS = 4000.0  # kg
UA = 3000.0  # W/K
Q_REF = 10.0  # W/kg at T_REF
T_REF = 420.0  # K
E = 90e3  # J/mol
CP = 1900.0  # J/(kg K)
ARGS = (Q_REF, T_REF, E)


def specific_rate(t, q_ref=Q_REF, t_ref=T_REF, e=E):
    """q(T) = q_ref exp(-(E/R)(1/T - 1/T_ref)), written out independently of the module."""
    return q_ref * math.exp(-e / R * (1.0 / t - 1.0 / t_ref))


def balance(t, t_c, mass=MASS, ua=UA, q_ref=Q_REF, t_ref=T_REF, e=E):
    """Generation minus removal, m q(T) - U A (T - T_c)."""
    return mass * specific_rate(t, q_ref, t_ref, e) - ua * (t - t_c)


def independent_intersections(t_c, **kw):
    """Both intersections by minimize_scalar + brentq, with brackets found here by search."""
    found = minimize_scalar(lambda t: balance(t, t_c, **kw), bounds=(t_c, t_c + 400.0), method="bounded", options={"xatol": 1e-10})
    t_min = found.x
    assert balance(t_min, t_c, **kw) < 0.0
    upper = t_min
    while balance(upper, t_c, **kw) <= 0.0:
        upper += 5.0
    stable = brentq(lambda t: balance(t, t_c, **kw), t_c, t_min, xtol=1e-12)
    no_return = brentq(lambda t: balance(t, t_c, **kw), t_min, upper, xtol=1e-12)
    return stable, no_return


@pytest.fixture(scope="module")
def critical():
    return semenov.critical_point(MASS, UA, *ARGS)


# Heat generation and removal -------------------------------------------------------------------


def test_heat_generation_and_removal_definitions():
    # Definitions (Semenov 1928): G = m q(T), Q = U A (T - T_c) + L (T - T_amb).
    assert semenov.heat_generation(400.0, MASS, *ARGS) == pytest.approx(MASS * specific_rate(400.0), rel=1e-13)
    temps = np.array([350.0, 400.0, 450.0])
    assert np.allclose(semenov.heat_generation(temps, MASS, *ARGS), [MASS * specific_rate(t) for t in temps], rtol=1e-13)
    assert semenov.heat_removal(400.0, UA, 380.0) == pytest.approx(UA * 20.0)
    assert semenov.heat_removal(400.0, UA, 380.0, heat_losses=50.0, ambient_temperature=295.0) == pytest.approx(UA * 20.0 + 50.0 * 105.0)
    # Derived: the two linear terms are one line with U A + L and a weighted temperature.
    ua_total, t_eff = semenov.effective_cooling(UA, 380.0, 50.0, 295.0)
    assert ua_total * (400.0 - t_eff) == pytest.approx(UA * 20.0 + 50.0 * 105.0, rel=1e-13)


# Tangency and critical point --------------------------------------------------------------------


def test_tangency_against_minimize_scalar(critical):
    # At the critical coolant temperature the removal line touches the generation curve: the minimum
    # of generation - removal is zero at T* (definition, Semenov 1928; Williams 1985 app. B).
    t_cc = critical.critical_coolant_temperature
    found = minimize_scalar(lambda t: balance(t, t_cc), bounds=(t_cc + 1e-6, t_cc + 100.0), method="bounded", options={"xatol": 1e-10})
    assert found.x == pytest.approx(critical.tangency_temperature, abs=2e-3)
    scale = UA * critical.critical_temperature_difference
    assert abs(found.fun) <= 1e-9 * scale
    # Exact tangency relation E (T* - T_c) = R T*^2 (derived in the module docstring).
    assert semenov.tangency_temperature_for_coolant(t_cc, E) == pytest.approx(critical.tangency_temperature, rel=1e-12)
    assert E * (critical.tangency_temperature - t_cc) == pytest.approx(R * critical.tangency_temperature**2, rel=1e-12)


def test_tangency_temperature_is_the_smaller_root():
    # Quadratic R T^2 - E T + E T_c = 0 solved by numpy.roots (independent); the smaller root.
    t_c = 350.0
    roots = np.sort(np.roots([R, -E, E * 350.0]).real)
    assert semenov.tangency_temperature_for_coolant(t_c, E) == pytest.approx(roots[0], rel=1e-12)


def test_tangency_temperature_gives_the_minimum_of_the_balance_for_any_coolant():
    # For any coolant temperature, ln G - ln Q is smallest where E (T - T_c) = R T^2 (derived);
    # checked with minimize_scalar on the written-out logarithmic balance.
    t_c = 330.0
    log_balance = lambda t: math.log(MASS * specific_rate(t)) - math.log(UA * (t - t_c))
    found = minimize_scalar(log_balance, bounds=(t_c + 1e-3, t_c + 100.0), method="bounded", options={"xatol": 1e-10})
    assert found.x == pytest.approx(semenov.tangency_temperature_for_coolant(t_c, E), abs=1e-3)


def test_tmrad_at_tangency_equals_cooling_time_constant(critical):
    # Townsend & Tou (1980): TMRad = c'p R T^2/(q E). With the tangency condition
    # m q(T*) = U A R T*^2/E this equals m c'p/(U A) (derived).
    t_star = critical.tangency_temperature
    tmr_townsend_tou = CP * R * t_star**2 / (specific_rate(t_star) * E)
    assert tmr_townsend_tou == pytest.approx(semenov.cooling_time_constant(MASS, CP, UA), rel=1e-10)
    assert semenov.cooling_time_constant(MASS, CP, UA) == pytest.approx(MASS * CP / UA)


@pytest.mark.parametrize("activation_energy", [60e3, 100e3, 180e3, 350e3])
def test_semenov_number_at_critical_point_tends_to_inverse_e(activation_energy):
    # Semenov (1928); Williams (1985) app. B: critical psi = 1/e for large E/(R T_c). Derived here:
    # the exact critical psi = x^2 exp(-x), x = T*/T_c > 1, so psi e - 1 = eps + O(eps^2) > 0
    # with eps = R T_c/E.
    crit = semenov.critical_point(MASS, UA, Q_REF, T_REF, activation_energy)
    t_cc = crit.critical_coolant_temperature
    psi = semenov.semenov_number(MASS, UA, t_cc, Q_REF, T_REF, activation_energy)
    eps = R * t_cc / activation_energy
    assert 0.0 < psi * math.e - 1.0 <= 1.5 * eps
    ratio = crit.tangency_temperature / t_cc
    assert psi == pytest.approx(ratio**2 * math.exp(-ratio), rel=1e-10)


def test_semenov_number_definition():
    # psi = (E/(R T_c^2)) m q(T_c)/(U A) (Semenov 1928), written out.
    t_c = 360.0
    expected = E / (R * t_c**2) * MASS * specific_rate(t_c) / UA
    assert semenov.semenov_number(MASS, UA, t_c, *ARGS) == pytest.approx(expected, rel=1e-13)


def test_classical_criterion_is_conservative(critical):
    # A coolant temperature at which psi = 0.99/e (classically subcritical, Semenov 1928) lies
    # below the exact critical coolant temperature (derived: exact critical psi > 1/e), so a
    # stable operating point must exist there.
    target = 0.99 / math.e
    t_c = brentq(lambda t: semenov.semenov_number(MASS, UA, t, *ARGS) - target, 250.0, critical.critical_coolant_temperature)
    assert t_c < critical.critical_coolant_temperature
    stable = semenov.stable_operating_temperature(MASS, UA, t_c, *ARGS)
    assert stable is not None
    assert stable == pytest.approx(independent_intersections(t_c)[0], abs=1e-8)


def test_linearised_versus_exact_critical_rise(critical):
    # Linearised (Semenov 1928; Williams 1985 app. B): dT_crit = R T_c^2/E. Exact (derived):
    # R T*^2/E with T* = T_c (1 + eps + 2 eps^2 + 5 eps^3 + ...), eps = R T_c/E, so
    # exact/linearised = 1 + 2 eps + 5 eps^2 + ...: the exact rise is LARGER, by O(R T/E).
    t_cc = critical.critical_coolant_temperature
    exact = critical.critical_temperature_difference
    linear = semenov.linearised_critical_temperature_difference(t_cc, E)
    eps = R * t_cc / E
    assert exact > linear
    assert exact / linear - 1.0 <= 3.0 * eps
    assert exact / linear - 1.0 - 2.0 * eps == pytest.approx(5.0 * eps**2, rel=0.5)
    # At T* itself the linearised form is exact (definition of T*).
    assert semenov.linearised_critical_temperature_difference(critical.tangency_temperature, E) == pytest.approx(exact, rel=1e-13)


# Intersections ---------------------------------------------------------------------------------


@pytest.mark.parametrize("below_critical", [0.05, 2.0, 15.0, 60.0])
def test_intersections_against_brentq(critical, below_critical):
    # Independent roots of m q(T) = U A (T - T_c) with scipy.optimize (brackets searched here).
    # T_NR is the upper, unstable intersection (Townsend, IChemE Symp. Ser. 68, 1981; from memory).
    t_c = critical.critical_coolant_temperature - below_critical
    stable, no_return = independent_intersections(t_c)
    assert semenov.no_return_temperature(MASS, UA, t_c, *ARGS) == pytest.approx(no_return, abs=1e-8)
    assert semenov.stable_operating_temperature(MASS, UA, t_c, *ARGS) == pytest.approx(stable, abs=1e-8)
    # Stability of each intersection from the slopes (Semenov 1928): removal steeper at the lower.
    slope = lambda t: MASS * specific_rate(t) * E / (R * t**2)
    assert slope(stable) < UA < slope(no_return)


@pytest.mark.parametrize("above_critical", [1e-4, 0.01, 1.0, 20.0])
def test_no_intersection_above_critical_coolant_temperature(critical, above_critical):
    # Above the critical coolant temperature generation exceeds removal everywhere (definition);
    # checked on a dense grid of the written-out balance, then the module must return None.
    t_c = critical.critical_coolant_temperature + above_critical
    grid = np.linspace(t_c + 1e-6, t_c + 300.0, 30001)
    assert all(balance(t, t_c) > 0.0 for t in grid[::10])
    assert semenov.no_return_temperature(MASS, UA, t_c, *ARGS) is None
    assert semenov.stable_operating_temperature(MASS, UA, t_c, *ARGS) is None
    # just below: both exist and close in on T* as T_c -> T_c,crit
    t_below = critical.critical_coolant_temperature - above_critical
    assert semenov.no_return_temperature(MASS, UA, t_below, *ARGS) > critical.tangency_temperature
    assert semenov.stable_operating_temperature(MASS, UA, t_below, *ARGS) < critical.tangency_temperature


@settings(max_examples=40, deadline=None)
@given(first=st.floats(0.001, 0.999), second=st.floats(0.001, 0.999))
def test_no_return_temperature_falls_as_coolant_warms(critical, first, second):
    # Property (derived): raising T_c shifts the removal line right, so the upper crossing moves
    # down and the lower crossing moves up, meeting at T* at the critical coolant temperature.
    assume(abs(first - second) > 1e-3)
    low, high = sorted((first, second))
    t_cc = critical.critical_coolant_temperature
    span = 120.0
    t_cold, t_warm = t_cc - span * (1 - low), t_cc - span * (1 - high)
    assert semenov.no_return_temperature(MASS, UA, t_cold, *ARGS) > semenov.no_return_temperature(MASS, UA, t_warm, *ARGS)
    assert semenov.stable_operating_temperature(MASS, UA, t_cold, *ARGS) < semenov.stable_operating_temperature(MASS, UA, t_warm, *ARGS)


@settings(max_examples=40, deadline=None)
@given(ua=st.floats(10.0, 1e4), factor=st.floats(1.01, 10.0), activation_energy=st.floats(50e3, 250e3))
def test_critical_coolant_temperature_rises_with_ua(ua, factor, activation_energy):
    # Property (derived): more cooling admits a warmer coolant.
    low = semenov.critical_point(MASS, ua, Q_REF, T_REF, activation_energy)
    high = semenov.critical_point(MASS, ua * factor, Q_REF, T_REF, activation_energy)
    assert high.critical_coolant_temperature > low.critical_coolant_temperature


def test_coolant_sweep_matches_scalar_functions(critical):
    t_cc = critical.critical_coolant_temperature
    coolant = np.array([t_cc - 50.0, t_cc - 5.0, t_cc + 5.0])
    sweep = semenov.coolant_temperature_sweep(MASS, UA, coolant, *ARGS)
    assert sweep.subcritical.tolist() == [True, True, False]
    for index in range(2):
        assert sweep.no_return_temperature[index] == semenov.no_return_temperature(MASS, UA, coolant[index], *ARGS)
        assert sweep.stable_operating_temperature[index] == semenov.stable_operating_temperature(MASS, UA, coolant[index], *ARGS)
    assert np.isnan(sweep.no_return_temperature[2]) and np.isnan(sweep.stable_operating_temperature[2])
    assert np.allclose(sweep.semenov_number, semenov.semenov_number(MASS, UA, coolant, *ARGS), rtol=1e-14)
    assert sweep.critical_coolant_temperature == critical.critical_coolant_temperature


# Synthesis checks ------------------------------------------------------------------------------


def test_generation_slope_against_finite_difference():
    # d(m q)/dT = m q E/(R T^2) (derived from Arrhenius) against a central difference.
    t_p, q_p, e = 353.15, 12.0, 75e3
    result = semenov.operating_point_stability(MASS, UA, t_p, q_p, e)
    step = 1e-3
    numeric = MASS * (specific_rate(t_p + step, q_p, t_p, e) - specific_rate(t_p - step, q_p, t_p, e)) / (2 * step)
    assert result.generation_slope == pytest.approx(numeric, rel=1e-7)
    assert result.removal_slope == UA
    assert result.stable == (result.slope_ratio < 1.0)


@settings(max_examples=50, deadline=None)
@given(q_p=st.floats(0.5, 200.0), e=st.floats(40e3, 200e3), ua=st.floats(200.0, 2e4))
def test_slope_criterion_agrees_with_heat_balance(q_p, e, ua):
    # Derived consistency (Semenov 1928 construction): with the coolant that holds T_p, T_p is
    # one of the two intersections of the generation curve through (T_p, q_p). It is the stable
    # one exactly when the slope criterion holds; that requires T_hold below the critical coolant
    # temperature, but T_hold < T_c,crit alone is not enough (T_p may be the upper crossing).
    t_p = 343.15
    t_hold = t_p - MASS * q_p / ua
    assume(t_hold > 150.0)
    result = semenov.operating_point_stability(MASS, ua, t_p, q_p, e)
    assume(abs(result.slope_ratio - 1.0) > 1e-6)
    assert semenov.required_coolant_temperature(MASS, ua, t_p, q_p) == pytest.approx(t_hold, rel=1e-14)
    t_max = semenov.max_stable_coolant_temperature(MASS, ua, t_p, q_p, e)
    stable_point = semenov.stable_operating_temperature(MASS, ua, t_hold, q_p, t_p, e)
    if result.stable:
        assert t_hold < t_max
        assert stable_point == pytest.approx(t_p, abs=1e-7)
    else:
        assert stable_point is None or stable_point < t_p - 1e-7


def test_dosing_controlled_estimates():
    # Derived: the whole heat m c'p dT_ad released evenly over the dosing time.
    rate = semenov.dosing_controlled_peak_rate(adiabatic_rise=120.0, specific_heat=CP, final_mass=MASS, dosing_time=4 * 3600.0)
    assert rate * 4 * 3600.0 == pytest.approx(MASS * CP * 120.0, rel=1e-14)
    capacity = semenov.cooling_capacity(UA, 353.15, 333.15)
    assert capacity == pytest.approx(UA * 20.0)
    time = semenov.shortest_coolable_dosing_time(MASS * CP * 120.0, capacity)
    assert semenov.dosing_controlled_peak_rate(120.0, CP, MASS, time) == pytest.approx(capacity, rel=1e-13)


# Domain errors --------------------------------------------------------------------------------


def test_domain_errors():
    with pytest.raises(ModelDomainError, match="no sharp ignition"):
        semenov.tangency_temperature_for_coolant(400.0, 4.0 * R * 400.0)
    with pytest.raises(ModelDomainError, match="no sharp ignition"):
        semenov.no_return_temperature(MASS, UA, 400.0, Q_REF, T_REF, 10e3)
    with pytest.raises(ModelDomainError, match="ambient_temperature"):
        semenov.heat_removal(400.0, UA, 380.0, heat_losses=5.0)
    with pytest.raises(ModelDomainError, match="overflow"):
        semenov.heat_generation(5000.0, MASS, Q_REF, 300.0, 2e6)
    with pytest.raises(ModelDomainError, match="mass"):
        semenov.critical_point(0.0, UA, *ARGS)
    with pytest.raises(ModelDomainError, match="cooling_capacity"):
        semenov.shortest_coolable_dosing_time(1e6, semenov.cooling_capacity(UA, 330.0, 340.0))
    with pytest.raises(ModelDomainError, match="ua"):
        semenov.semenov_number(MASS, np.nan, 350.0, *ARGS)
