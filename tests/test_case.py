"""Case-file loader: schema, units, sign rules, cross-field checks.

Conversions are checked against the SI Brochure (BIPM 2019): 0 degC = 273.15 K, 1 kJ = 1000 J.
Other checks here are rules of this project's case format (design), not physics.
"""

import pathlib
import textwrap

import pytest

from screen.io.case import SCHEMA, load_case
from screen.errors import CaseError

CASES = sorted(pathlib.Path(__file__).parent.parent.joinpath("cases").glob("*.toml"))

BASE = textwrap.dedent("""
    [case]
    title = "test"
    [mass]
    amount = "1000 kg"
    specific_heat = "2 kJ/(kg K)"
    [process]
    temperature = "50 degC"
    mode = "batch"
    max_technical_temperature = "100 degC"
    [synthesis]
    energy = "100 kJ/kg"
    [decomposition]
    energy = "500 kJ/kg"
    model = "zero-order"
    activation_energy = "100 kJ/mol"
    reference_rate = "1 W/kg"
    reference_temperature = "150 degC"
""")


def write(tmp_path, text, name="case.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_base_case_loads_in_si(tmp_path):
    case = load_case(write(tmp_path, BASE))
    assert case.process.temperature == pytest.approx(323.15)
    assert case.mass.specific_heat == pytest.approx(2000.0)
    assert case.synthesis.energy == pytest.approx(100e3)
    assert case.decomposition.reference_temperature == pytest.approx(423.15)
    assert len(case.sha256) == 64


@pytest.mark.parametrize("path", CASES, ids=[p.name for p in CASES])
def test_bundled_cases_load(path):
    case = load_case(path)
    assert case.title
    assert "invented" in path.read_text(encoding="utf-8").lower()


@pytest.mark.parametrize("old, new, key, fragment", [
    ('mode = "batch"', 'mode = "batch"\nbogus = 1', "process.bogus", "unknown key"),
    ('temperature = "50 degC"', 'temperatur = "50 degC"', "process.temperatur", "did you mean"),
    ('energy = "100 kJ/kg"', 'energy = "12 m"', "synthesis.energy", "not a specific energy"),
    ('energy = "100 kJ/kg"', 'energy = "-100 kJ/kg"', "synthesis.energy", "above 0"),
    ('energy = "100 kJ/kg"', 'molar_enthalpy = "120 kJ/mol"\nlimiting_amount = "10 mol"',
     "synthesis.molar_enthalpy", "negative"),
    ('energy = "100 kJ/kg"', 'energy = "1,5 kJ/kg"', "synthesis.energy", "decimal comma"),
    ('amount = "1000 kg"', 'amount = 1000', "mass.amount", "bare number"),
    ('temperature = "50 degC"', 'temperature = "120 degC"', "process.temperature", "above the MTT"),
    ('temperature = "50 degC"', 'temperature = "-300 degC"', "process.temperature", "0 K"),
    ('mode = "batch"', 'mode = "semi-batch"', "process.accumulation", "semi-batch needs"),
    ('mode = "batch"', 'mode = "batch"\naccumulation = 1.3', "process.accumulation", "at most 1"),
    ('mode = "batch"', 'mode = "fed-batch"', "process.mode", "expected one of"),
    ('title = "test"', 'titel = "x"', "case.titel", "unknown key"),
    ('[synthesis]', '[synthesys]', "synthesys", "unknown section"),
    ('model = "zero-order"', 'model = "nth-order"', "decomposition.order", "order"),
    ('activation_energy = "100 kJ/mol"', 'activation_energy = "nan kJ/mol"',
     "decomposition.activation_energy", "finite"),
])
def test_bad_input_names_key(tmp_path, old, new, key, fragment):
    assert old in BASE
    path = write(tmp_path, BASE.replace(old, new, 1))
    with pytest.raises(CaseError, match=fragment) as info:
        load_case(path)
    line = info.value.one_line()
    assert str(path) in line and key in line and "\n" not in line


def test_missing_file_and_toml_syntax(tmp_path):
    with pytest.raises(CaseError, match="not found"):
        load_case(tmp_path / "nope.toml")
    bad = write(tmp_path, BASE.replace('energy = "100 kJ/kg"', "energy = 100 kJ/kg"))
    with pytest.raises(CaseError, match="line .* column|quoted"):
        load_case(bad)


def test_empty_and_binary_files(tmp_path):
    with pytest.raises(CaseError, match="empty"):
        load_case(write(tmp_path, "   \n"))
    binary = tmp_path / "bin.toml"
    binary.write_bytes(bytes(range(256)))
    with pytest.raises(CaseError, match="UTF-8|NUL|binary"):
        load_case(binary)


def test_overrides_apply_and_are_recorded(tmp_path):
    path = write(tmp_path, BASE)
    case = load_case(path, overrides=["process.temperature=70 degC", "synthesis.energy=80 kJ/kg"])
    assert case.process.temperature == pytest.approx(343.15)
    assert case.synthesis.energy == pytest.approx(80e3)
    assert case.overrides == ("process.temperature=70 degC", "synthesis.energy=80 kJ/kg")
    with pytest.raises(CaseError, match="no key"):
        load_case(path, overrides=["process.temp=70 degC"])
    with pytest.raises(CaseError, match="KEY=VALUE"):
        load_case(path, overrides=["process.temperature"])


def test_uncertainty_recorded(tmp_path):
    path = write(tmp_path, BASE.replace('"100 kJ/mol"', '"100 ± 8 kJ/mol"'))
    case = load_case(path)
    assert case.uncertainties["decomposition.activation_energy"].std == pytest.approx(8000.0)


def test_semi_batch_without_mass_ratio_is_refused_naming_the_key(tmp_path):
    # Issue 18 item 6 (fail closed): the ratio 1 gives the lowest MTSR
    # (MTSR = T_p + X_ac dT_ad / ratio, Stoessel, Chem. Eng. Prog. 89(10) 1993), so it is never
    # taken silently; without feed data the key is required.
    path = write(tmp_path, BASE.replace('mode = "batch"', 'mode = "semi-batch"\naccumulation = 0.3'))
    with pytest.raises(CaseError, match="accumulation_mass_ratio") as info:
        load_case(path)
    assert info.value.key == "process.accumulation_mass_ratio"


def test_every_schema_key_is_documented():
    # Meta test (design): a key that users cannot look up is a key they will mistype.
    doc = pathlib.Path(__file__).parent.parent.joinpath("docs", "case-format.md").read_text(
        encoding="utf-8")
    for section, fields in SCHEMA.items():
        assert f"[{section}]" in doc
        for key in fields:
            assert f"`{key}`" in doc, f"{section}.{key} missing from docs/case-format.md"
