"""Tests of screen.models.evaporation (evaporative cooling as a barrier).

Reference sources:
- energy balance integrated with scipy.integrate.quad and solve_ivp (general-purpose reference
  library) for the vapour mass flow and the evaporated mass;
- IAPWS-IF97 (regions 1, 2, 4 as implemented in chemicals.iapws) for the latent heat of water;
- ideal-gas law with R from scipy.constants (CODATA);
- scipy.optimize.brentq for independent roots: the coolant temperature at which the condenser
  capacity equals the vapour load (the verdict must flip exactly there), and the void fraction of
  the level-swell model;
- the Wallis (1969) and Kutateladze (Pushkina & Sorokin 1969) flooding equations in their
  original two-phase form (constants from memory), solved here independently of the module's
  closed-form total-reflux expressions;
- surface tensions from the ``chemicals`` package (Mulero & Cachadina 2012 REFPROP fits, Jasper
  1972 via chemicals.interface) for the default surface tension.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import R as CODATA_GAS_CONSTANT
from scipy.constants import g as STANDARD_GRAVITY_CODATA

from screen.errors import CaseError, ModelDomainError
from screen.models import evaporation as ev
from screen.models.solvents import (
    available_solvents,
    boiling_temperature,
    latent_heat,
    lookup_solvent,
)

TOLUENE = lookup_solvent("toluene")
PRESSURE = 101325.0
BOILING = boiling_temperature(TOLUENE, PRESSURE)
LATENT = latent_heat(TOLUENE, BOILING)
LIQUID_DENSITY = TOLUENE.liquid_density_at_boiling_point
VAPOUR_DENSITY = ev.vapour_density_ideal_gas(TOLUENE.molar_mass, PRESSURE, BOILING)


def _inputs(**changes):
    """A vessel for which every check except the one under test holds comfortably.

    Invented numbers for a test vessel (not check values): 2 m diameter, 250 mm vapour line,
    2000 kg toluene, condenser U A 1000 W/K with coolant at 20 degC (about 91 kW).
    """
    inputs = {
        "heat_release_rate": 40e3,
        "accumulated_heat": 1.0e8,
        "sensible_heat_to_boiling": 2.0e7,
        "solvent_mass": 2000.0,
        "residual_heat_capacity": 1000.0 * 1800.0,
        "latent_heat": LATENT,
        "boiling_temperature": BOILING,
        "boiling_pressure": PRESSURE,
        "vapour_molar_mass": TOLUENE.molar_mass,
        "liquid_density": LIQUID_DENSITY,
        "condenser_capacity": ev.condenser_capacity(overall_conductance=1000.0, coolant_temperature=293.15, boiling_temperature=BOILING),
        "vapour_line_diameter": 0.25,
        "vessel_diameter": 2.0,
        "fill_fraction": 0.6,
    }
    inputs.update(changes)
    return inputs


# --- energy balance --------------------------------------------------------------------------


def test_vapour_mass_flow_of_water_against_iapws_if97():
    """100 kW boiling water at 1 atm: m = Q/(h'' - h'), latent heat from IAPWS-IF97 (chemicals.iapws)
    at T_sat(101.325 kPa); 1 %."""
    pytest.importorskip("chemicals")
    from chemicals import iapws

    temperature = iapws.Tsat_IAPWS(PRESSURE)
    tau1, tau2 = 1386.0 / temperature, 540.0 / temperature
    h_liquid = iapws.iapws97_R * temperature * tau1 * iapws.iapws97_dG_dtau_region1(tau1, PRESSURE / 16.53e6)
    h_vapour = (
        iapws.iapws97_R
        * temperature
        * tau2
        * (iapws.iapws97_dG0_dtau_region2(tau2, PRESSURE / 1e6) + iapws.iapws97_dGr_dtau_region2(tau2, PRESSURE / 1e6))
    )
    expected = 100e3 / (h_vapour - h_liquid)
    water = lookup_solvent("water")
    computed = ev.vapour_mass_flow(100e3, latent_heat(water, boiling_temperature(water, PRESSURE)))
    assert computed == pytest.approx(expected, rel=0.01)
    assert ev.condenser_duty_needed(computed, latent_heat(water, boiling_temperature(water, PRESSURE))) == pytest.approx(100e3, rel=1e-12)


def test_evaporated_mass_against_integrated_energy_balance():
    """A decaying heat release q(t) = q0 exp(-t/tau) at the boiling point: the evaporated mass
    integrated with scipy quad and with solve_ivp (dm/dt = q/dh) equals Q/dh (energy balance)."""
    from scipy.integrate import quad, solve_ivp

    initial_rate, time_constant = 80e3, 1800.0
    total_heat = initial_rate * time_constant
    by_quad, _ = quad(lambda t: ev.vapour_mass_flow(initial_rate * math.exp(-t / time_constant), LATENT), 0.0, math.inf)
    solution = solve_ivp(
        lambda t, m: [initial_rate * math.exp(-t / time_constant) / LATENT],
        (0.0, 40 * time_constant),
        [0.0],
        rtol=1e-10,
        atol=1e-9,
    )
    expected = ev.solvent_evaporated(total_heat, 0.0, LATENT)
    assert by_quad == pytest.approx(expected, rel=1e-8)
    assert solution.y[0, -1] == pytest.approx(expected, rel=1e-7)
    assert ev.solvent_evaporated(total_heat, 0.25 * total_heat, LATENT) == pytest.approx(0.75 * expected, rel=1e-12)
    assert ev.solvent_evaporated(1.0, 2.0, LATENT) == 0.0


def test_vapour_density_and_velocity_by_hand():
    """rho = M p/(R T) with R from scipy.constants; u = 4 m/(rho pi d^2)."""
    assert VAPOUR_DENSITY == pytest.approx(TOLUENE.molar_mass * PRESSURE / (CODATA_GAS_CONSTANT * BOILING), rel=1e-9)
    assert ev.vapour_velocity(0.1, 1.0, 0.1) == pytest.approx(0.1 / (math.pi * 0.05**2), rel=1e-12)


def test_condenser_capacity_forms():
    assert ev.condenser_capacity(duty=50e3) == 50e3
    assert ev.condenser_capacity(overall_conductance=2000.0, coolant_temperature=300.0, boiling_temperature=380.0) == pytest.approx(160e3)
    assert ev.condenser_capacity(overall_conductance=2000.0, coolant_temperature=390.0, boiling_temperature=380.0) == 0.0
    with pytest.raises(CaseError):
        ev.condenser_capacity()
    with pytest.raises(CaseError):
        ev.condenser_capacity(duty=1.0, overall_conductance=1.0)
    with pytest.raises(CaseError):
        ev.condenser_capacity(overall_conductance=1.0, coolant_temperature=300.0)
    assert ev.condenser_margin(40e3, 50e3) == pytest.approx(10e3)


# --- verdict flips exactly where the condenser duty equals the vapour load --------------------


def test_verdict_flips_where_condenser_duty_equals_vapour_load():
    """Independent root (scipy brentq): the coolant temperature at which U A (T_b - T_c) equals the
    duty to condense the vapour load m_v dh, with m_v = q/dh computed here."""
    from scipy.optimize import brentq

    conductance, heat_release_rate = 1000.0, 60e3
    vapour_load = heat_release_rate / LATENT  # energy balance, computed independently
    critical_coolant = brentq(lambda tc: conductance * (BOILING - tc) - vapour_load * LATENT, 200.0, BOILING)

    def verdict(coolant_temperature):
        capacity = ev.condenser_capacity(
            overall_conductance=conductance, coolant_temperature=coolant_temperature, boiling_temperature=BOILING
        )
        return ev.barrier_verdict(**_inputs(heat_release_rate=heat_release_rate, condenser_capacity=capacity))

    below, reason_below = verdict(critical_coolant - 1e-6)
    above, reason_above = verdict(critical_coolant + 1e-6)
    assert below == "doubtful" and "condenser" in reason_below
    assert above == "fails" and reason_above.startswith("condenser")
    assert verdict(critical_coolant - 5.0)[0] == "doubtful"  # within the 20 % design margin
    assert verdict(critical_coolant - 40.0)[0] == "holds"


def test_heat_release_rate_limit_is_the_flip_point():
    """The limit reported equals the brentq root of capacity - q, and the verdict flips there."""
    from scipy.optimize import brentq

    inputs = _inputs()
    root = brentq(lambda q: inputs["condenser_capacity"] - q, 1.0, 1e7)
    assessment = ev.evaluate_barrier(**inputs)
    assert assessment.heat_release_rate_limit == pytest.approx(root, rel=1e-9)
    assert ev.barrier_verdict(**_inputs(heat_release_rate=root * (1 - 1e-9)))[0] != "fails"
    assert ev.barrier_verdict(**_inputs(heat_release_rate=root * (1 + 1e-9)))[0] == "fails"


def _independent_flooding_velocity(diameter, surface_tension):
    """Lower of the Wallis and Kutateladze total-reflux flooding velocities, each solved here with
    brentq from its original two-phase form (constants 0.725 and 3.2 from memory, see the module
    header), condensate flux from the mass balance rho_l j_l = rho_v j_g."""
    from scipy.optimize import brentq

    rho_l, rho_v, g = LIQUID_DENSITY, VAPOUR_DENSITY, STANDARD_GRAVITY_CODATA
    wallis_scale = g * diameter * (rho_l - rho_v)

    def wallis(j_gas):
        j_liquid = j_gas * rho_v / rho_l
        return (math.sqrt(j_gas * math.sqrt(rho_v / wallis_scale))
                + math.sqrt(j_liquid * math.sqrt(rho_l / wallis_scale)) - 0.725)

    kutateladze_scale = (surface_tension * g * (rho_l - rho_v)) ** 0.25

    def kutateladze(j_gas):
        j_liquid = j_gas * rho_v / rho_l
        return (math.sqrt(j_gas * math.sqrt(rho_v) / kutateladze_scale)
                + math.sqrt(j_liquid * math.sqrt(rho_l) / kutateladze_scale) - math.sqrt(3.2))

    return min(brentq(wallis, 1e-9, 1e3, xtol=1e-14, rtol=1e-14),
               brentq(kutateladze, 1e-9, 1e3, xtol=1e-14, rtol=1e-14))


def test_flooding_limits_the_heat_release_rate_in_a_narrow_line():
    # The heat release rate at which the vapour velocity q/(dh rho_v A) reaches the flooding
    # velocity (energy balance + the flooding forms solved independently above).
    inputs = _inputs(vapour_line_diameter=0.05, condenser_capacity=1e7)
    assessment = ev.evaluate_barrier(**inputs)
    limit = assessment.heat_release_rate_limit
    area = math.pi * 0.05**2 / 4
    flooding = _independent_flooding_velocity(0.05, ev.DEFAULT_SURFACE_TENSION)
    assert assessment.flooding_velocity == pytest.approx(flooding, rel=1e-9)
    assert limit == pytest.approx(flooding * VAPOUR_DENSITY * area * LATENT, rel=1e-9)
    assert ev.barrier_verdict(**_inputs(vapour_line_diameter=0.05, condenser_capacity=1e7, heat_release_rate=limit * 1.001))[0] == "fails"
    assert ev.evaluate_barrier(**_inputs(vapour_line_diameter=0.05, condenser_capacity=1e7, heat_release_rate=limit * 0.999)).verdict == "doubtful"


# --- flooding and level swell ----------------------------------------------------------------


def test_wallis_without_liquid_flow():
    """Wallis: sqrt(j_g*) = C with no liquid, j_g* = j_g sqrt(rho_v/(g d (rho_l - rho_v)))."""
    diameter = 0.1
    expected = 0.725**2 * math.sqrt(STANDARD_GRAVITY_CODATA * diameter * (LIQUID_DENSITY - VAPOUR_DENSITY) / VAPOUR_DENSITY)
    computed = ev.wallis_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, diameter, condensate_counter_current=False)
    assert computed == pytest.approx(expected, rel=1e-9)


def test_wallis_total_reflux_satisfies_the_original_equation():
    """Put the closed-form velocity back into sqrt(j_g*) + m sqrt(j_l*) = C with the condensate flux
    from the mass balance rho_l j_l = rho_v j_g."""
    diameter = 0.15
    j_gas = ev.wallis_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, diameter)
    j_liquid = j_gas * VAPOUR_DENSITY / LIQUID_DENSITY
    scale = STANDARD_GRAVITY_CODATA * diameter * (LIQUID_DENSITY - VAPOUR_DENSITY)
    gas_star = j_gas * math.sqrt(VAPOUR_DENSITY / scale)
    liquid_star = j_liquid * math.sqrt(LIQUID_DENSITY / scale)
    assert math.sqrt(gas_star) + 1.0 * math.sqrt(liquid_star) == pytest.approx(0.725, rel=1e-9)


def test_kutateladze_total_reflux_satisfies_the_original_equation():
    """sqrt(Ku_g) + sqrt(Ku_l) = sqrt(3.2), Ku_k = j_k rho_k^(1/2) / (sigma g (rho_l - rho_v))^(1/4)."""
    sigma = 0.018
    j_gas = ev.kutateladze_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, sigma)
    j_liquid = j_gas * VAPOUR_DENSITY / LIQUID_DENSITY
    scale = (sigma * STANDARD_GRAVITY_CODATA * (LIQUID_DENSITY - VAPOUR_DENSITY)) ** 0.25
    kutateladze_gas = j_gas * math.sqrt(VAPOUR_DENSITY) / scale
    kutateladze_liquid = j_liquid * math.sqrt(LIQUID_DENSITY) / scale
    assert math.sqrt(kutateladze_gas) + math.sqrt(kutateladze_liquid) == pytest.approx(math.sqrt(3.2), rel=1e-9)
    no_liquid = ev.kutateladze_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, sigma, condensate_counter_current=False)
    assert no_liquid * math.sqrt(VAPOUR_DENSITY) / scale == pytest.approx(3.2, rel=1e-9)


def test_flooding_limit_is_the_lower_of_the_two():
    for diameter in (0.02, 0.1, 0.5):
        wallis = ev.wallis_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, diameter)
        kutateladze = ev.kutateladze_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY)
        assert ev.flooding_velocity_limit(LIQUID_DENSITY, VAPOUR_DENSITY, diameter) == min(wallis, kutateladze)
    wide = ev.wallis_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.1)
    narrow = ev.wallis_flooding_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.05)
    assert wide == pytest.approx(narrow * math.sqrt(2.0), rel=1e-12)  # Wallis scales with sqrt(d)


def test_level_swell_onset_against_independent_void_fraction_root():
    """Churn-turbulent drift flux: psi = 2 a / (1 - 1.5 a); at the onset velocity the void fraction
    solved with brentq equals 1 - fill fraction (the swollen level reaches the outlet).

    Sources (from memory): DIERS churn-turbulent level-swell relation with C0 = 1.5 (Fisher et
    al., Emergency Relief System Design Using DIERS Technology, AIChE 1992); bubble rise velocity
    1.53 (sigma g drho / rho_l^2)^(1/4) (Harmathy, AIChE J. 6 (1960) 281). The 0.010 N/m is the
    module's default surface tension (design, checked in the test below)."""
    from scipy.optimize import brentq

    fill = 0.75
    rise = 1.53 * (0.010 * STANDARD_GRAVITY_CODATA * (LIQUID_DENSITY - VAPOUR_DENSITY) / LIQUID_DENSITY**2) ** 0.25
    assert ev.bubble_rise_velocity(LIQUID_DENSITY, VAPOUR_DENSITY) == pytest.approx(rise, rel=1e-6)
    onset = ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, fill)
    void = brentq(lambda a: 2 * a / (1 - 1.5 * a) - onset / rise, 1e-9, 0.6)
    assert void == pytest.approx(1 - fill, rel=1e-6)


def test_level_swell_regimes():
    # Ordering only (DIERS bubbly C0 = 1.2, k = 1.18 against churn-turbulent; from memory).
    churn = ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.7)
    bubbly = ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.7, regime="bubbly")
    assert 0.0 < bubbly < churn  # bubbly flow holds the vapour back: swells at lower rates
    assert ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.7, regime="foamy") == 0.0
    assert ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.2) == math.inf
    with pytest.raises(CaseError):
        ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 0.7, regime="sludge")
    with pytest.raises(ModelDomainError):
        ev.level_swell_onset_velocity(LIQUID_DENSITY, VAPOUR_DENSITY, 1.5)


def test_default_surface_tension_is_below_the_table_solvents_at_boiling():
    """Design check of DEFAULT_SURFACE_TENSION against chemicals surface-tension data (Mulero &
    Cachadina REFPROP fits, else Jasper) at each solvent's normal boiling point."""
    pytest.importorskip("chemicals")
    from chemicals import interface

    mulero = interface.sigma_data_Mulero_Cachadina
    jasper = interface.sigma_data_Jasper_Lange
    checked = 0
    for solvent in available_solvents():
        temperature = solvent.normal_boiling_temperature
        if solvent.cas in mulero.index:
            row = mulero.loc[solvent.cas]
            sigma = interface.REFPROP_sigma(temperature, row.Tc, row.sigma0, row.n0, row.sigma1, row.n1, row.sigma2, row.n2)
        elif solvent.cas in jasper.index:
            row = jasper.loc[solvent.cas]
            sigma = interface.Jasper(temperature, row.a, row.b)
        else:
            continue
        checked += 1
        assert sigma > ev.DEFAULT_SURFACE_TENSION, solvent.name
    assert checked >= 20


# --- dry-out ---------------------------------------------------------------------------------


def test_temperature_course_conserves_energy():
    """Q = Q_sens + m_s dh + C_res (T - T_b) after dry-out; plateau at T_b while boiling."""
    import numpy as np

    sensible, solvent_mass, residual = 2.0e7, 100.0, 1.5e6
    heat = np.array([0.0, 1.0e7, 2.0e7, 3.0e7, 2.0e7 + 100.0 * LATENT, 2.0e7 + 100.0 * LATENT + 3.0e7])
    temperatures = ev.temperature_course(heat, 330.0, BOILING, sensible, solvent_mass, LATENT, residual)
    assert temperatures[0] == pytest.approx(330.0)
    assert temperatures[1] == pytest.approx(330.0 + 0.5 * (BOILING - 330.0))
    assert temperatures[2] == pytest.approx(BOILING)
    assert temperatures[3] == pytest.approx(BOILING)
    assert temperatures[4] == pytest.approx(BOILING)
    assert temperatures[5] == pytest.approx(BOILING + 3.0e7 / residual)
    assert ev.temperature_after_dry_out(3.0e7, BOILING, 1000.0, 1500.0) == pytest.approx(temperatures[5])


def test_boiling_dry_fails_with_the_final_temperature():
    solvent_mass, residual = 50.0, 1.2e6
    inputs = _inputs(solvent_mass=solvent_mass, residual_heat_capacity=residual)
    assessment = ev.evaluate_barrier(**inputs)
    remaining = inputs["accumulated_heat"] - inputs["sensible_heat_to_boiling"] - solvent_mass * LATENT
    assert assessment.verdict == "fails"
    assert "boils dry" in assessment.reason
    assert assessment.final_temperature == pytest.approx(BOILING + remaining / residual)
    returned = ev.evaluate_barrier(**_inputs(solvent_mass=solvent_mass, condensate_returned=True))
    assert returned.verdict == "holds" and "not checked" in returned.reason


# --- verdict rules ---------------------------------------------------------------------------


def test_comfortable_vessel_holds():
    assessment = ev.evaluate_barrier(**_inputs())
    assert assessment.verdict == "holds", assessment.reason
    assert len(assessment.reasons) == 4


def test_foamy_mass_and_missing_swelling_data_are_doubtful():
    assert ev.barrier_verdict(**_inputs(swelling_regime="foamy"))[0] == "doubtful"
    verdict, reason = ev.barrier_verdict(**_inputs(vessel_diameter=None))
    assert verdict == "doubtful" and "level swell not checked" in reason


def test_level_swell_above_onset_is_doubtful():
    assessment = ev.evaluate_barrier(**_inputs(vessel_diameter=0.3, vapour_line_diameter=0.3, fill_fraction=0.9))
    assert assessment.surface_velocity >= assessment.swelling_onset_velocity
    assert assessment.verdict == "doubtful"


def test_no_condenser_fails_and_no_heat_holds():
    assert ev.barrier_verdict(**_inputs(condenser_capacity=0.0))[0] == "fails"
    assert ev.barrier_verdict(**_inputs(heat_release_rate=0.0, accumulated_heat=0.0))[0] == "holds"


def test_bad_inputs_raise():
    with pytest.raises(TypeError):
        ev.barrier_verdict(**_inputs(), colour="red")
    with pytest.raises(ModelDomainError):
        ev.evaluate_barrier(**_inputs(heat_release_rate=-1.0))
    with pytest.raises(ModelDomainError):
        ev.evaluate_barrier(**_inputs(latent_heat=float("nan")))
    with pytest.raises(ModelDomainError):
        ev.vapour_mass_flow(1.0, 0.0)
    with pytest.raises(ModelDomainError):
        ev.wallis_flooding_velocity(1.0, 2.0, 0.1)


@settings(max_examples=60, deadline=None)
@given(low=st.floats(0.0, 2e5), extra=st.floats(0.0, 2e5))
def test_more_heat_never_improves_the_verdict(low, extra):
    """Property: the verdict is monotone in the heat release rate."""
    rank = {name: index for index, name in enumerate(ev.VERDICTS)}
    first = ev.barrier_verdict(**_inputs(heat_release_rate=low))[0]
    second = ev.barrier_verdict(**_inputs(heat_release_rate=low + extra))[0]
    assert rank[second] >= rank[first]
