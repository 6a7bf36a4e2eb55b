"""Tests of screen.models.pressure (closed-vessel pressure).

Reference sources:
- the ideal-gas law p = n R T / V with R from scipy.constants (CODATA, a general-purpose
  reference library, not the project's own constant);
- vapour pressures from the ``chemicals`` package (DIPPR/Perry's 8th ed. Table 2-8 coefficients
  evaluated by chemicals.dippr.EQ101), a general-purpose reference library;
- water at 100 degC from IAPWS-IF97 region 4 as implemented in chemicals.iapws.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import R as CODATA_GAS_CONSTANT

from screen.errors import CaseError, ModelDomainError
from screen.models.pressure import (
    closed_vessel_pressure,
    closed_vessel_pressure_components,
    decomposition_gas_moles,
    ideal_gas_pressure,
    relief_verdict,
)
from screen.models.solvents import lookup_solvent, vapour_pressure

TOLUENE = lookup_solvent("toluene")
WATER = lookup_solvent("water")


@pytest.mark.parametrize("name", ["toluene", "methanol", "water", "2-MeTHF", "NMP"])
@pytest.mark.parametrize("fraction", [0.3, 0.7])
def test_no_gas_gives_the_vapour_pressure(name, fraction):
    solvent = lookup_solvent(name)
    temperature = solvent.minimum_temperature + fraction * (solvent.maximum_temperature - solvent.minimum_temperature)
    assert closed_vessel_pressure(temperature, solvent, headspace_volume=0.5) == vapour_pressure(solvent, temperature)


def test_vapour_part_against_chemicals():
    """Source: chemicals.dippr.EQ101 with Perry's Table 2-8 coefficients (toluene, 150 degC). The
    shipped table holds the same coefficients, so 1e-9 relative (round-off only)."""
    pytest.importorskip("chemicals")
    from chemicals.dippr import EQ101
    from chemicals.vapor_pressure import Psat_data_Perrys2_8

    row = Psat_data_Perrys2_8.loc["108-88-3"]
    expected = EQ101(423.15, row.C1, row.C2, row.C3, row.C4, row.C5)
    assert closed_vessel_pressure(423.15, TOLUENE, 1.0) == pytest.approx(expected, rel=1e-9)


def test_water_at_100_degC_against_iapws_if97():
    """Source: IAPWS-IF97 region 4, p_sat(373.15 K) = 101.418 kPa (chemicals.iapws); 0.5 %."""
    pytest.importorskip("chemicals")
    from chemicals.iapws import Psat_IAPWS

    assert closed_vessel_pressure(373.15, WATER, 1.0) == pytest.approx(Psat_IAPWS(373.15), rel=5e-3)


@pytest.mark.parametrize(("moles", "temperature", "volume"), [(10.0, 300.0, 1.0), (250.0, 450.0, 0.8), (0.5, 520.0, 0.01)])
def test_ideal_gas_term_against_n_r_t_over_v(moles, temperature, volume):
    """Source: ideal-gas law with R from scipy.constants (CODATA)."""
    expected = moles * CODATA_GAS_CONSTANT * temperature / volume
    assert ideal_gas_pressure(moles, temperature, volume) == pytest.approx(expected, rel=1e-9)
    parts = closed_vessel_pressure_components(400.0, TOLUENE, volume, gas_moles=moles)
    assert parts.decomposition_gas == pytest.approx(moles * CODATA_GAS_CONSTANT * 400.0 / volume, rel=1e-9)
    assert parts.total == pytest.approx(parts.vapour + parts.decomposition_gas, rel=1e-12)


def test_pad_gas_scales_with_absolute_temperature():
    """Closed at 25 degC and 1.01325 bar: at closing the total is the initial pressure; later the pad
    gas partial pressure (initial minus vapour pressure at closing) scales with T/T0 (ideal gas)."""
    closing = 298.15
    at_closing = closed_vessel_pressure(closing, TOLUENE, 1.0, initial_pressure=101325.0, initial_temperature=closing)
    assert at_closing == pytest.approx(101325.0, rel=1e-12)
    parts = closed_vessel_pressure_components(400.0, TOLUENE, 1.0, initial_pressure=101325.0, initial_temperature=closing)
    pad_at_closing = 101325.0 - vapour_pressure(TOLUENE, closing)
    assert parts.pad_gas == pytest.approx(pad_at_closing * 400.0 / closing, rel=1e-12)
    assert parts.total == pytest.approx(parts.vapour + parts.pad_gas, rel=1e-12)


def test_raoult_mole_fraction_scales_the_vapour_part():
    # Raoult's law for an ideal solution: p_i = x_i p_sat,i(T).
    full = closed_vessel_pressure(380.0, TOLUENE, 1.0)
    assert closed_vessel_pressure(380.0, TOLUENE, 1.0, liquid_mole_fraction=0.4) == pytest.approx(0.4 * full, rel=1e-12)


def test_decomposition_gas_moles():
    # Definition: n = m x specific gas yield x fraction decomposed (1500 kg x 2 mol/kg x 0.25).
    assert decomposition_gas_moles(1500.0, 2.0, 0.25) == pytest.approx(750.0)
    assert decomposition_gas_moles(1500.0, 2.0) == pytest.approx(3000.0)
    with pytest.raises(ModelDomainError):
        decomposition_gas_moles(1500.0, 2.0, 1.2)
    with pytest.raises(ModelDomainError):
        decomposition_gas_moles(-1.0, 2.0)


def test_initial_pressure_needs_its_temperature():
    with pytest.raises(CaseError, match="closed"):
        closed_vessel_pressure(400.0, TOLUENE, 1.0, initial_pressure=101325.0)


def test_initial_pressure_below_vapour_pressure_is_rejected():
    with pytest.raises(ModelDomainError, match="boil"):
        closed_vessel_pressure(400.0, TOLUENE, 1.0, initial_pressure=1000.0, initial_temperature=350.0)


def test_out_of_range_inputs_raise():
    with pytest.raises(ModelDomainError):
        closed_vessel_pressure(700.0, TOLUENE, 1.0)  # above the critical temperature
    with pytest.raises(ModelDomainError):
        closed_vessel_pressure(400.0, TOLUENE, 0.0)
    with pytest.raises(ModelDomainError):
        closed_vessel_pressure(400.0, TOLUENE, 1.0, gas_moles=-1.0)
    with pytest.raises(ModelDomainError):
        closed_vessel_pressure(400.0, TOLUENE, 1.0, liquid_mole_fraction=0.0)


def test_relief_verdict_bands():
    # Bands are design choices (no source): at or above the set pressure "exceeds", within 10 %
    # below it "near" (or the margin given), else "below".
    set_pressure = 4.0e5
    assert relief_verdict(4.0e5, set_pressure)[0] == "exceeds"  # a tie reaches the set pressure
    assert relief_verdict(4.5e5, set_pressure)[0] == "exceeds"
    assert relief_verdict(3.7e5, set_pressure)[0] == "near"
    assert relief_verdict(3.6e5, set_pressure)[0] == "near"
    assert relief_verdict(3.5e5, set_pressure)[0] == "below"
    verdict, reason = relief_verdict(3.5e5, set_pressure, margin=0.2)
    assert verdict == "near" and "20%" in reason
    with pytest.raises(ModelDomainError):
        relief_verdict(3.5e5, 0.0)


@settings(max_examples=50, deadline=None)
@given(
    temperature=st.floats(300.0, 550.0),
    step=st.floats(0.1, 20.0),
    moles=st.floats(0.0, 500.0),
    extra=st.floats(0.01, 100.0),
)
def test_pressure_rises_with_temperature_and_gas(temperature, step, moles, extra):
    """Property: the closed-vessel pressure rises with temperature and with the gas formed."""
    base = closed_vessel_pressure(temperature, TOLUENE, 0.7, gas_moles=moles)
    assert closed_vessel_pressure(temperature + step, TOLUENE, 0.7, gas_moles=moles) > base
    assert closed_vessel_pressure(temperature, TOLUENE, 0.7, gas_moles=moles + extra) > base
