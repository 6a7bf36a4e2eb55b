"""Barrier physics of issue 18: level swell at low fill (item 7), condenser LMTD and
non-condensables (item 9). Sources beside each check."""

from __future__ import annotations

import math

import pytest

from screen.constants import ZERO_CELSIUS
from screen.models import evaporation


def _assessment(fill_fraction, heat_release_rate):
    # Toluene-like figures at 1 atm (invented test inputs); a 1 m vessel.
    return evaporation.evaluate_barrier(
        heat_release_rate=heat_release_rate, accumulated_heat=1e8, sensible_heat_to_boiling=0.0,
        solvent_mass=5000.0, residual_heat_capacity=1e6, latent_heat=360e3,
        boiling_temperature=383.8, boiling_pressure=101325.0, vapour_molar_mass=0.0921,
        liquid_density=780.0, condenser_capacity=1e9, vapour_line_diameter=2.0,
        vessel_diameter=1.0, fill_fraction=fill_fraction)


def test_level_swell_at_low_fill_is_not_holds_at_the_bubble_rise_velocity():
    # DIERS drift flux (Fisher et al. 1992, Emergency Relief System Design Using DIERS
    # Technology, from memory): churn-turbulent C0 = 1.5, so below a fill of 1 - 1/C0 = 1/3 the
    # onset velocity is infinite. A surface velocity at or above the bubble rise velocity
    # u_inf = 1.53 (sigma g (rho_l - rho_v)/rho_l^2)^(1/4) (Harmathy 1960) is outside the range
    # the limit rests on: the grade must not be "holds" (issue 18 item 7).
    fill = 0.25
    assert evaporation.level_swell_onset_velocity(780.0, 2.9, fill) == math.inf
    rise = evaporation.bubble_rise_velocity(780.0, 2.9)
    # Heat release giving a surface velocity of 1.2 u_inf: q = 1.2 u_inf rho_v A h_v.
    probe = _assessment(fill, 1e6)
    density = probe.vapour_density
    area = math.pi / 4.0
    rate = 1.2 * rise * density * area * 360e3
    assessment = _assessment(fill, rate)
    assert assessment.surface_velocity == pytest.approx(1.2 * rise, rel=1e-6)
    assert assessment.verdict != "holds"
    assert any("bubble rise velocity" in r for r in assessment.reasons)
    low = _assessment(fill, 0.5 * rise * density * area * 360e3)
    assert not any("bubble rise velocity" in r for r in low.reasons)


def test_condenser_capacity_uses_the_log_mean_temperature_difference():
    # LMTD of a condenser (isothermal hot side): dT_lm = (T_out - T_in)/ln((T_b - T_in)/
    # (T_b - T_out)) (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, ch. 11; from
    # memory). 110 degC condensing, coolant 20 -> 40 degC: dT_lm = 20/ln(90/70) = 79.58 K.
    capacity = evaporation.condenser_capacity(
        overall_conductance=1000.0, coolant_temperature=20.0 + ZERO_CELSIUS,
        boiling_temperature=110.0 + ZERO_CELSIUS,
        coolant_outlet_temperature=40.0 + ZERO_CELSIUS)
    assert capacity == pytest.approx(1000.0 * 20.0 / math.log(90.0 / 70.0), rel=1e-12)
    arithmetic = evaporation.condenser_capacity(
        overall_conductance=1000.0, coolant_temperature=20.0 + ZERO_CELSIUS,
        boiling_temperature=110.0 + ZERO_CELSIUS)
    assert capacity < arithmetic


def test_barrier_reads_the_outlet_temperature_and_warns_on_non_condensables():
    import copy
    import pathlib

    from screen.io.case import build_case, load_case
    from screen.runs.screening import screen_case

    path = pathlib.Path(__file__).parent.parent / "cases" / "alkylation_reflux_class4.toml"
    raw = copy.deepcopy(load_case(str(path)).raw)
    vessel = raw["vessel"]
    del vessel["condenser_duty"]
    vessel.update(condenser_ua="12 kW/K", condenser_coolant_temperature="20 degC",
                  condenser_coolant_outlet_temperature="45 degC")
    raw["solvent"]["gas_yield"] = "0.2 mol/kg"
    result = screen_case(build_case(raw, path="<test>"), curves=False)
    entry = result.results["barrier"]["vessels"][0]
    mtt = result.results["barrier"]["mtt_degC"]
    lmtd = 25.0 / math.log((mtt - 20.0) / (mtt - 45.0))
    assert entry["condenser_capacity_kW"] == pytest.approx(12.0 * lmtd, rel=1e-9)
    assert "log-mean" in entry["condenser_capacity_basis"]
    assert any("non-condensable" in w for w in result.warnings)


def test_fill_for_the_level_swell_uses_the_density_at_the_mtt():
    # Issue 18 item 7: the fill at the MTT is the fill from mass.density (taken at 25 degC)
    # times rho(25 degC)/rho(MTT) of the solvent; check value from DIPPR 105 (Perry's 8th ed.,
    # via chemicals) within 2 %.
    import pathlib

    import chemicals.volume as volume
    from chemicals.dippr import EQ105

    from screen.io.case import load_case
    from screen.runs.screening import screen_case

    case = load_case(pathlib.Path(__file__).parent.parent / "cases"
                     / "alkylation_reflux_class4.toml")
    r = screen_case(case, curves=False).results
    entry = r["barrier"]["vessels"][0]
    fill = r["vessels"][0]["fill_fraction"]
    volume._load_rho_data()
    row = volume.rho_data_Perry_8E_105_l.loc["108-88-3"]

    def rho(t):
        return EQ105(t, row["C1"], row["C2"], row["C3"], row["C4"])

    expected = fill * rho(298.15) / rho(r["barrier"]["mtt_degC"] + ZERO_CELSIUS)
    assert entry["fill_fraction_at_mtt"] == pytest.approx(expected, rel=0.02)
    assert entry["fill_fraction_at_mtt"] > fill
