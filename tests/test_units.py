"""Parsing of quantity strings into SI.

Conversion factors checked against the SI Brochure (BIPM, 9th ed. 2019): 1 kJ = 1000 J,
0 degC = 273.15 K, 1 h = 3600 s, 1 bar = 1e5 Pa; 1 degF step = 5/9 K (NIST SP 811, 2008).
"""

import math

import pytest
from hypothesis import given, strategies as st

from screen.errors import ScreenError, UnitError
from screen.units import parse_dimensionless, parse_quantity


@pytest.mark.parametrize("text, kind, expected", [
    ("250 kJ/kg", "specific_energy", 250e3),
    ("85 degC", "temperature", 358.15),
    ("85 °C", "temperature", 358.15),
    ("358.15 K", "temperature", 358.15),
    ("212 degF", "temperature", 373.15),
    ("60 K", "temperature_difference", 60.0),
    ("1.9 kJ/(kg K)", "specific_heat", 1900.0),
    ("1.9 J/g/degC", "specific_heat", 1900.0),
    ("6.2 m2", "area", 6.2),
    ("6.2 m^2", "area", 6.2),
    ("300 W/(m2 K)", "heat_transfer_coefficient", 300.0),
    ("4 h", "time", 14400.0),
    ("90 min", "time", 5400.0),
    ("2.5 bar", "pressure", 2.5e5),
    ("-120 kJ/mol", "molar_energy", -120e3),
    ("3.2e12 1/s", "frequency", 3.2e12),
    ("2.4 kmol", "amount_of_substance", 2400.0),
    ("12 mW/g", "specific_power", 12.0),
])
def test_conversions_to_si(text, kind, expected):
    assert parse_quantity(text, kind, "k").value == pytest.approx(expected, rel=1e-12)


def test_uncertainty_is_parsed_in_si():
    parsed = parse_quantity("100 ± 8 kJ/mol", "molar_energy", "k")
    assert parsed.value == pytest.approx(100e3)
    assert parsed.std == pytest.approx(8e3)
    parsed = parse_quantity("85 +/- 2 degC", "temperature", "k")
    assert parsed.value == pytest.approx(358.15)
    assert parsed.std == pytest.approx(2.0)  # a difference: scale only, no offset
    parsed = parse_quantity("185 +/- 9 degF", "temperature", "k")
    assert parsed.std == pytest.approx(5.0)


@pytest.mark.parametrize("raw, kind, fragment", [
    ("12 m", "specific_energy", "not a specific energy"),
    ("60 degC", "temperature_difference", "difference"),
    ("1,5 kJ/kg", "specific_energy", "decimal comma"),
    ("nan kJ/kg", "specific_energy", "finite"),
    ("inf K", "temperature", "finite"),
    (250, "specific_energy", "bare number"),
    ("250", "specific_energy", "without a unit"),
    ("-300 degC", "temperature", "above 0 K"),
    ("0 K", "temperature", "above 0 K"),
    ("5 blorgs", "length", "not known"),
    ("3 barg", "temperature", "gauge"),
    ("3 barg/s", "pressure", "gauge"),
    ("-2 barg", "pressure", "above 0"),
    (True, "mass", "expected"),
    ([1, 2], "mass", "expected"),
])
def test_bad_quantities_raise_our_error(raw, kind, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_quantity(raw, kind, "section.key", "case.toml")


def test_error_line_names_file_and_key():
    with pytest.raises(UnitError) as info:
        parse_quantity("12 m", "specific_energy", "synthesis.energy", "my.toml")
    line = info.value.one_line()
    assert line.startswith("my.toml: synthesis.energy: ")
    assert "\n" not in line


@pytest.mark.parametrize("raw, expected", [(0.35, 0.35), ("0.35", 0.35), ("35 %", 0.35), (1, 1.0)])
def test_dimensionless(raw, expected):
    assert parse_dimensionless(raw, "k").value == pytest.approx(expected)


@pytest.mark.parametrize("raw", ["0.3 kg", "abc", True, "1,5", float("nan")])
def test_dimensionless_rejects(raw):
    with pytest.raises(UnitError):
        parse_dimensionless(raw, "k")


@given(st.text(max_size=40))
def test_random_strings_only_raise_our_error(text):
    for kind in ("temperature", "specific_energy", "temperature_difference", "frequency"):
        try:
            parsed = parse_quantity(text, kind, "k")
        except ScreenError:
            continue
        assert math.isfinite(parsed.value)


@pytest.mark.parametrize("raw, expected_pa", [
    # Gauge + standard atmosphere 101325 Pa (ISO 2533:1975); 1 psi = 6894.757293 Pa (NIST SP 811,
    # 2008, appendix B).
    ("3.5 barg", 3.5e5 + 101325.0),
    ("0 barg", 101325.0),
    ("50 psig", 50 * 6894.757293168 + 101325.0),
    ("250 kPag", 250e3 + 101325.0),
    ("-0.5 barg", 101325.0 - 0.5e5),
])
def test_gauge_pressure_converted_with_standard_atmosphere(raw, expected_pa):
    # Issue 13 item 4: "barg" was refused before.
    parsed = parse_quantity(raw, "pressure", "vessel.relief_set_pressure", "case.toml")
    assert parsed.value == pytest.approx(expected_pa, rel=1e-12)
    assert parsed.text == raw
