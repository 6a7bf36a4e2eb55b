"""Tests of screen.models.thermal (adiabatic temperature rise and MTSR).

Sources of the check values:

- dT_ad = Q'/c'p and Q' = n (-dH_r)/m (Stoessel, Thermal Safety of Chemical Processes,
  Wiley-VCH 2008, ch. 2; CCPS, Guidelines for Chemical Reactivity Evaluation and Application to
  Process Design, AIChE 1995); the expected numbers below are worked by hand from that formula;
- MTSR = T_p + X_ac dT_ad (Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75) with the semi-batch
  mass correction m_final/m(t_acc) (derived: the accumulated heat goes into the mass present,
  docs/methods.md "Trap").

The inputs are arbitrary test numbers, not data of any real reaction.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from screen.models import thermal


@pytest.mark.parametrize("energy, cp, expected", [
    # Hand-worked: 180 kJ/kg / 1.8 kJ/(kg K) = 100 K; 65 kJ/kg / 1.95 kJ/(kg K) = 33.33 K.
    (180e3, 1800.0, 100.0),
    (65e3, 1950.0, 65.0 / 1.95),
    (1.2e6, 2400.0, 500.0),
])
def test_adiabatic_rise_is_energy_over_specific_heat(energy, cp, expected):
    # Stoessel 2008 ch. 2: dT_ad = Q'/c'p (exact arithmetic, so 1e-14).
    assert float(thermal.adiabatic_temperature_rise(energy, cp)) == pytest.approx(expected,
                                                                                  rel=1e-14)


def test_specific_energy_from_molar_enthalpy():
    # Stoessel 2008 ch. 2: Q' = n (-dH_r)/m. Hand-worked: 1500 mol x 120 kJ/mol / 2000 kg
    # = 90 kJ/kg, and with c'p = 1.8 kJ/(kg K) a rise of 50 K.
    energy = float(thermal.specific_energy_from_molar(-120e3, 1500.0, 2000.0))
    assert energy == pytest.approx(90e3, rel=1e-14)
    assert float(thermal.adiabatic_temperature_rise(energy, 1800.0)) == pytest.approx(50.0,
                                                                                      rel=1e-14)
    # Sign convention: an exothermic (negative) molar enthalpy releases positive heat.
    assert float(thermal.specific_energy_from_molar(-1.0, 1.0, 1.0)) > 0.0


@pytest.mark.parametrize("t_p, rise, accumulation, ratio, expected", [
    # Stoessel 1993, batch (X_ac = 1): MTSR = T_p + dT_ad.
    (333.15, 100.0, 1.0, 1.0, 433.15),
    # Semi-batch, hand-worked: 350 + 0.3 x 100 / 0.75 = 390 K (mass correction, derived).
    (350.0, 100.0, 0.3, 0.75, 390.0),
    # No accumulation: the mass stays at T_p.
    (320.0, 80.0, 0.0, 0.6, 320.0),
])
def test_mtsr_worked_values(t_p, rise, accumulation, ratio, expected):
    value = float(thermal.maximum_temperature_synthesis_reaction(t_p, rise, accumulation, ratio))
    assert value == pytest.approx(expected, rel=1e-14)


def test_leaving_out_the_mass_correction_underestimates_mtsr():
    # Derived (docs/methods.md "Trap"): m(t_acc) < m_final -> the corrected MTSR is higher.
    corrected = float(thermal.maximum_temperature_synthesis_reaction(350.0, 100.0, 0.3, 0.75))
    plain = float(thermal.maximum_temperature_synthesis_reaction(350.0, 100.0, 0.3, 1.0))
    assert plain == pytest.approx(380.0, rel=1e-14)
    assert corrected - plain == pytest.approx(10.0, rel=1e-12)


@settings(max_examples=80, deadline=None)
@given(t_p=st.floats(250.0, 500.0), rise=st.floats(0.1, 800.0),
       first=st.floats(0.0, 1.0), second=st.floats(0.0, 1.0), ratio=st.floats(0.05, 1.0))
def test_mtsr_is_monotone_in_accumulation(t_p, rise, first, second, ratio):
    # Property required by issue 2 ("MTSR is monotone in accumulation"): with dT_ad > 0 the
    # MTSR of Stoessel (1993), T_p + X_ac dT_ad/ratio, rises strictly with X_ac; the step equals
    # (X2 - X1) dT_ad/ratio (linear in X_ac, derived).
    low, high = sorted((first, second))
    mtsr_low = float(thermal.maximum_temperature_synthesis_reaction(t_p, rise, low, ratio))
    mtsr_high = float(thermal.maximum_temperature_synthesis_reaction(t_p, rise, high, ratio))
    assert mtsr_high >= mtsr_low
    if high > low:
        assert mtsr_high > mtsr_low or (high - low) * rise / ratio < 1e-12 * t_p
    assert mtsr_high - mtsr_low == pytest.approx((high - low) * rise / ratio, rel=1e-9,
                                                 abs=1e-9 * t_p)
    assert mtsr_low >= t_p


@settings(max_examples=40, deadline=None)
@given(t_p=st.floats(250.0, 500.0), rise=st.floats(0.1, 800.0),
       accumulation=st.floats(0.01, 1.0), first=st.floats(0.05, 1.0), second=st.floats(0.05, 1.0))
def test_mtsr_falls_as_the_mass_ratio_rises(t_p, rise, accumulation, first, second):
    # Derived: a smaller mass at maximum accumulation takes the same heat -> higher MTSR.
    low, high = sorted((first, second))
    assert float(thermal.maximum_temperature_synthesis_reaction(t_p, rise, accumulation, low)) \
        >= float(thermal.maximum_temperature_synthesis_reaction(t_p, rise, accumulation, high))


def test_arrays_broadcast():
    accumulation = np.array([0.0, 0.25, 0.5, 1.0])
    values = thermal.maximum_temperature_synthesis_reaction(300.0, 40.0, accumulation, 0.8)
    np.testing.assert_allclose(values, 300.0 + accumulation * 40.0 / 0.8, rtol=1e-14)
    rises = thermal.adiabatic_temperature_rise(np.array([90e3, 180e3]), 1800.0)
    np.testing.assert_allclose(rises, [50.0, 100.0], rtol=1e-14)


@pytest.mark.filterwarnings("ignore::RuntimeWarning")
@pytest.mark.parametrize("call", [
    lambda: thermal.adiabatic_temperature_rise(1e5, 0.0),
    lambda: thermal.adiabatic_temperature_rise(1e5, -1800.0),
    lambda: thermal.maximum_temperature_synthesis_reaction(300.0, 100.0, 1.5, 1.0),
    lambda: thermal.maximum_temperature_synthesis_reaction(300.0, 100.0, 0.3, 0.0),
    lambda: thermal.maximum_temperature_synthesis_reaction(300.0, 100.0, float("nan")),
    lambda: thermal.specific_energy_from_molar(-1e5, 10.0, 0.0),
], ids=["cp-zero", "cp-negative", "accumulation-above-1", "mass-ratio-zero", "nan",
        "mass-zero"])
def test_out_of_domain_inputs_raise_model_domain_error(call):
    # Project rule (RULES.md): out-of-domain input raises screen.errors, never inf/NaN silently.
    from screen.errors import ModelDomainError

    with pytest.raises(ModelDomainError):
        call()
