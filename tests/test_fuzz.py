"""Property and fuzz tests of the case parser and the screening engine (hypothesis).

Two families:

1. Random *valid* cases, written as TOML text from strategies over physical ranges (T_p 0-150
   degC, c'p 1-4 kJ/(kg K), E 50-250 kJ/mol, the three decomposition models, 0-3 vessels with an
   area or a geometry). They never crash: only the project's own ScreenError is allowed, and it
   is counted. Every screened result must have finite figures and satisfy invariants that follow
   from the definitions, independent of this code:

   - MTSR = T_p + X_ac dT_ad/(m_acc/m_final) >= T_p, final temperature = MTSR + dT_ad,dec >= MTSR
     (Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75);
   - TMRad > 0 and non-increasing with the start temperature: the Arrhenius rate grows with T
     (Townsend & Tou, Thermochim. Acta 37 (1980) 1-30, TMRad = c'p R T0^2/(q(T0) E), which falls
     with T0 whenever E > 2 R T0; with reactant consumption the time is an integral of 1/rate
     over a path that starts higher and is shorter, so it also falls);
   - class in 1..5 and, for fixed T_p, MTT and TD24, non-decreasing in MTSR and therefore in the
     accumulation (class table of Stoessel 1993);
   - the class printed equals the class table applied to the printed temperatures.

2. Random strings (and other TOML values) in every quantity field of every section only ever
   raise ScreenError from screen.io.case.build_case / load_case.

Profiles: the default profile is derandomised and fast (about 60 cases per test); set
HYPOTHESIS_PROFILE=deep for a long random run (see docs/fuzzing.md). The bundled cases are
invented demo data: they serve only as *structure* for the string fuzzing, never as check values.
"""

from __future__ import annotations

import collections
import copy
import math
import os
import pathlib
import tomllib

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from screen.io.case import SCHEMA, build_case, load_case
from screen.errors import ScreenError
from screen.models.criticality import criticality_class

ROOT = pathlib.Path(__file__).parent.parent
CASES = sorted(ROOT.joinpath("cases").glob("*.toml"))

settings.register_profile(
    "screen-fast", max_examples=60, deadline=None, derandomize=True, print_blob=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                           HealthCheck.filter_too_much])
settings.register_profile(
    "deep", max_examples=3000, deadline=None, print_blob=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                           HealthCheck.filter_too_much])
PROFILE = "deep" if os.environ.get("HYPOTHESIS_PROFILE") == "deep" else "screen-fast"
FUZZ = settings(settings.get_profile(PROFILE))
#: The string fuzzing is cheaper per example: run more of it in the same time.
FUZZ_STRINGS = settings(FUZZ, max_examples=FUZZ.max_examples * 3)

#: Counts of examples run and of ScreenErrors met, shown at the end of the module.
STATS: collections.Counter = collections.Counter()


@pytest.fixture(scope="module", autouse=True)
def _report_statistics(request):
    yield
    reporter = request.config.pluginmanager.getplugin("terminalreporter")
    capture = request.config.pluginmanager.getplugin("capturemanager")
    if reporter is not None and capture is not None and STATS:
        with capture.global_and_fixture_disabled():
            reporter.write_line("")
            reporter.write_line(f"fuzz statistics ({PROFILE} profile):")
            for key, value in sorted(STATS.items()):
                reporter.write_line(f"  {key}: {value}")


# --------------------------------------------------------------------------------------------
# Strategies: valid cases as TOML text
# --------------------------------------------------------------------------------------------


def decimal(low, high, digits=3):
    """Numbers with a fixed number of decimals, so that the TOML text holds them exactly."""
    scale = 10 ** digits
    return st.integers(round(low * scale), round(high * scale)).map(
        lambda n: n / scale)


def log_uniform(low, high):
    return st.floats(math.log10(low), math.log10(high)).map(lambda x: float(f"{10 ** x:.4g}"))


def q(value, unit):
    return f'"{value!r} {unit}"'


@st.composite
def decomposition_sections(draw, process_temperature):
    energy = draw(decimal(50, 2000, 1))
    lines = ["[decomposition]", f"energy = {q(energy, 'kJ/kg')}"]
    basis = draw(st.sampled_from(["kinetics"] * 9 + ["onset"]))
    if basis == "onset":
        onset = draw(decimal(process_temperature + 30, 400, 1))
        lines.append(f"onset_temperature = {q(onset, 'degC')}")
        return "\n".join(lines), "onset"
    model = draw(st.sampled_from(["zero-order", "nth-order", "autocatalytic"]))
    lines.append(f'model = "{model}"')
    if model == "nth-order":
        lines.append(f"order = {draw(decimal(0.5, 2.0, 2))!r}")
    elif model == "autocatalytic":
        lines.append(f"order = {draw(decimal(0.5, 2.0, 2))!r}")
        lines.append(f"autocatalytic_order = {draw(decimal(0.5, 2.0, 2))!r}")
        lines.append(f"initial_conversion = {draw(log_uniform(1e-4, 0.05))!r}")
    activation = draw(decimal(50, 250, 1))
    lines.append(f"activation_energy = {q(activation, 'kJ/mol')}")
    reference_temperature = draw(decimal(100, 300, 1))
    if draw(st.booleans()):
        lines.append(f"reference_rate = {q(draw(log_uniform(1e-3, 100.0)), 'W/kg')}")
        lines.append(f"reference_temperature = {q(reference_temperature, 'degC')}")
    else:
        # A from a heat release rate at the reference temperature: q = Q A exp(-E/RT) (zero
        # order, fresh mass), so that the kinetics stay in a measurable range.
        rate = draw(log_uniform(1e-3, 100.0))
        t_ref = reference_temperature + 273.15
        log_a = math.log(rate / (energy * 1e3)) + activation * 1e3 / (8.314462618 * t_ref)
        lines.append(f'pre_exponential_factor = "{math.exp(log_a):.6g} 1/s"')
    if draw(st.booleans()):
        low = reference_temperature - draw(decimal(0, 60, 1))
        lines.append(f"lowest_measured_temperature = {q(round(low, 1), 'degC')}")
    return "\n".join(lines), "kinetics"


@st.composite
def vessel_sections(draw, process_temperature, count):
    tables, need_density = [], False
    for index in range(count):
        lines = ["[[vessel]]", f'name = "V{index + 1}"',
                 f"heat_transfer_coefficient = {q(draw(decimal(50, 1000, 0)), 'W/(m^2 K)')}"]
        coolant = process_temperature - draw(decimal(0, 80, 1))
        lines.append(f"coolant_temperature = {q(round(coolant, 1), 'degC')}")
        if draw(st.booleans()):
            lines.append(f"heat_transfer_area = {q(draw(decimal(0.1, 30, 2)), 'm^2')}")
        else:
            need_density = True
            volume = draw(decimal(0.5, 20, 2))
            # batch_mass is given so that the fill stays below the volume (density 1000 below).
            fill = draw(decimal(0.2, 0.9, 2))
            lines += [f"volume = {q(volume, 'm^3')}",
                      f"diameter = {q(draw(decimal(0.5, 3.0, 2)), 'm')}",
                      f'bottom = "{draw(st.sampled_from(SCHEMA["vessel"]["bottom"].choices))}"',
                      f"batch_mass = {q(round(fill * volume * 1000.0, 1), 'kg')}"]
        if draw(st.booleans()):
            lines.append(f"heat_losses = {q(draw(decimal(0, 50, 1)), 'W/K')}")
            lines.append(f"ambient_temperature = {q(draw(decimal(-20, 40, 1)), 'degC')}")
        tables.append("\n".join(lines))
    return "\n\n".join(tables), need_density


@st.composite
def valid_cases(draw):
    """(TOML text, dict of the drawn parameters) of a case that is valid by construction."""
    process_temperature = draw(decimal(0, 150, 1))
    mode = draw(st.sampled_from(["batch", "semi-batch"]))
    accumulation = draw(decimal(0, 1, 3))
    mtt = process_temperature + draw(decimal(0, 150, 1))
    process = ["[process]", f"temperature = {q(process_temperature, 'degC')}",
               f'mode = "{mode}"', f"accumulation = {accumulation!r}",
               f"max_technical_temperature = {q(round(mtt, 1), 'degC')}"]
    if mode == "semi-batch":
        process.append(f"accumulation_mass_ratio = {draw(decimal(0.3, 1.0, 3))!r}")
    else:
        process.append('accumulation_basis = "conversion at the failure from calorimetry"')
    synthesis = ["[synthesis]"]
    amount = draw(decimal(500, 8000, 0))
    specific_energy = draw(decimal(1, 400, 1))  # kJ/kg of final mass
    if draw(st.booleans()):
        synthesis.append(f"energy = {q(specific_energy, 'kJ/kg')}")
    else:
        enthalpy = draw(decimal(20, 250, 1))
        synthesis.append(f"molar_enthalpy = {q(-enthalpy, 'kJ/mol')}")
        limiting = round(specific_energy * amount / enthalpy, 1)
        synthesis.append(f"limiting_amount = {q(max(limiting, 0.1), 'mol')}")
    if draw(st.booleans()):
        synthesis.append(f"activation_energy = {q(draw(decimal(40, 120, 1)), 'kJ/mol')}")
        synthesis.append(f"peak_heat_release_rate = {q(draw(decimal(1, 60, 1)), 'W/kg')}")
    decomposition, basis = draw(decomposition_sections(process_temperature))
    vessels, need_density = draw(vessel_sections(process_temperature,
                                                 draw(st.integers(0, 3))))
    mass = ["[mass]", f"amount = {q(amount, 'kg')}",
            f"specific_heat = {q(draw(decimal(1.0, 4.0, 3)), 'kJ/(kg K)')}"]
    if need_density or draw(st.booleans()):
        mass.append(f"density = {q(1000.0, 'kg/m^3')}")
    text = "\n\n".join([
        '[case]\ntitle = "fuzz case (generated)"', "\n".join(mass), "\n".join(process),
        "\n".join(synthesis), decomposition, vessels]) + "\n"
    return text, {"basis": basis, "mode": mode, "accumulation": accumulation}


def screen_text(text):
    """Screen TOML text in memory; returns the result or raises ScreenError."""
    from screen.runs.screening import screen_case

    return screen_case(build_case(tomllib.loads(text), path="<fuzz>"), curves=False)


def _with_accumulation(text, accumulation):
    lines = [f"accumulation = {accumulation!r}" if line.startswith("accumulation = ") else line
             for line in text.splitlines()]
    return "\n".join(lines) + "\n"


def _walk_numbers(value, path="results"):
    if isinstance(value, dict):
        for key, item in value.items():
            yield from _walk_numbers(item, f"{path}.{key}")
    elif isinstance(value, (list, tuple)):
        for index, item in enumerate(value):
            yield from _walk_numbers(item, f"{path}[{index}]")
    elif isinstance(value, (float, np.floating)):
        yield path, float(value)


# --------------------------------------------------------------------------------------------
# 1. Random valid cases
# --------------------------------------------------------------------------------------------


@FUZZ
@given(valid_cases())
def test_random_valid_cases_screen_with_physical_invariants(drawn):
    text, parameters = drawn
    STATS["valid cases generated"] += 1
    try:
        result = screen_text(text)
    except ScreenError as exc:
        STATS["valid cases rejected with ScreenError"] += 1
        STATS[f"  {type(exc).__name__}: {exc.message[:60]}"] += 1
        assert exc.one_line() and "\n" not in exc.one_line()
        return
    STATS["valid cases screened"] += 1
    r = result.results
    for path, value in _walk_numbers(r):
        assert math.isfinite(value), f"{path} = {value}"
    assert r["mtsr_degC"] >= r["process_temperature_degC"] - 1e-9
    assert r["final_temperature_degC"] >= r["mtsr_degC"] - 1e-9
    assert r["tmrad_at_process_temperature_h"] >= r["tmrad_at_mtsr_h"] >= 0.0
    computed = r["criticality_class_computed"]
    assert computed in (1, 2, 3, 4, 5)
    assert computed == criticality_class(r["process_temperature_degC"], r["mtsr_governing_degC"],
                                         r["mtt_degC"], r["td24_degC"])
    if parameters["basis"] == "onset":
        # Fail closed: a crude onset estimate never grants a class below 4.
        assert r["criticality_class"] is None or r["criticality_class"] >= 4
        assert all(v["stability"] == "cannot-conclude" for v in r["vessels"])
    else:
        assert r["criticality_class"] == computed
    # TMRad positive and non-increasing from T_p to the final temperature, below E/(2R) where
    # the Townsend-Tou time turns (d ln TMRad/dT = 2/T - E/(R T^2); methods note).
    from screen.constants import GAS_CONSTANT
    from screen.models import decomposition as dm

    kinetics, cp = result.curves["kinetics"], result.curves["specific_heat"]
    top = min(r["final_temperature_degC"] + 273.15,
              0.9 * float(kinetics.activation_energy) / (2.0 * GAS_CONSTANT))
    temperatures = np.linspace(r["process_temperature_degC"] + 273.15, top, 25)
    times = np.asarray(dm.tmrad(kinetics, temperatures, cp), dtype=float)
    assert np.all(np.isfinite(times))
    assert np.all(np.diff(times) <= 1e-9 * times[:-1])
    b_number = dm.semenov_b_number(temperatures, (r["final_temperature_degC"]
                                                  - r["mtsr_degC"]), kinetics.activation_energy)
    accelerating = np.asarray(b_number) > float(kinetics.order) + 1e-6
    if kinetics.model == "zero-order":
        assert np.all(times > 0.0)
    else:  # with consumption and B <= n the rate is largest at the start: TMRad = 0 there
        assert np.all(times[accelerating] > 0.0)
        assert np.all(times >= 0.0)


@FUZZ
@given(valid_cases(), decimal(0, 1, 3), decimal(0, 1, 3))
def test_class_is_monotone_in_accumulation(drawn, first, second):
    text, _ = drawn
    low, high = sorted((first, second))
    STATS["accumulation pairs"] += 1
    try:
        result_low = screen_text(_with_accumulation(text, low))
        result_high = screen_text(_with_accumulation(text, high))
    except ScreenError:
        STATS["accumulation pairs rejected with ScreenError"] += 1
        return
    a, b = result_low.results, result_high.results
    assert a["mtsr_degC"] <= b["mtsr_degC"] + 1e-9
    assert a["criticality_class_computed"] <= b["criticality_class_computed"]
    assert a["td24_degC"] == pytest.approx(b["td24_degC"], rel=1e-12)


# --------------------------------------------------------------------------------------------
# 2. Random strings in every quantity field only raise ScreenError
# --------------------------------------------------------------------------------------------

QUANTITY_FIELDS = [(section, name) for section, fields in SCHEMA.items()
                   for name, spec in fields.items() if spec.kind not in ("text", "choice",
                                                                         "bool")]
ALL_FIELDS = [(section, name) for section, fields in SCHEMA.items() for name in fields]
BASES = {path.name: tomllib.loads(path.read_text(encoding="utf-8")) for path in CASES}
UNITS = ["kJ/kg", "degC", "K", "degF", "kg", "J/(kg K)", "W/kg", "1/s", "m^2", "m2", "W/(m^2 K)",
         "bar", "barg", "Pa", "mol", "kmol", "h", "min", "%", "delta_degC", "°C", "L", "kW",
         "J/mol", "kcal/mol", "mol/kg", "L/(mol s)", "m^3/(mol*s)", "W/K", "m^3", "m", ""]
NUMBER_TEXT = st.one_of(st.floats().map(repr), st.integers(-10**400, 10**400).map(str),
                        st.sampled_from(["1e308", "-0", "1e-320", ".5", "5.", "1,5", "nan",
                                         "inf", "-inf", "1e999", "0x10", "1_000"]))
QUANTITY_TEXT = st.builds(
    lambda number, spread, unit, pad: f"{number}{spread}{pad}{unit}",
    NUMBER_TEXT, st.one_of(st.just(""), NUMBER_TEXT.map(lambda s: f" ± {s}"),
                           NUMBER_TEXT.map(lambda s: f" +/- {s}")),
    st.one_of(st.sampled_from(UNITS), st.lists(st.sampled_from(UNITS), max_size=3).map(
        " ".join)), st.sampled_from(["", " ", "  "]))
DISTRIBUTION_TEXT = st.builds(
    lambda word, body: f"{word} {body}",
    st.sampled_from(["normal", "lognormal", "uniform", "triangular", "poisson", "Normal", ""]),
    st.one_of(QUANTITY_TEXT, st.builds(lambda a, b: f"{a} .. {b}", QUANTITY_TEXT, QUANTITY_TEXT),
              st.builds(lambda a: f"factor {a}", NUMBER_TEXT), st.text(max_size=20)))
ANY_VALUE = st.one_of(
    QUANTITY_TEXT, st.text(max_size=30), st.floats(), st.integers(-10**30, 10**30),
    st.booleans(), st.lists(st.integers(), max_size=3), st.dictionaries(
        st.text(max_size=5), st.integers(), max_size=2), st.none())


def _unit_of(section, name):
    """A unit of the right dimension for a field (the SI unit of its kind)."""
    from screen.units import DIMENSIONS

    kind = SCHEMA[section][name].kind
    if kind == "temperature":
        return "degC"
    if kind == "rate_constant":
        return "L/(mol s)"
    return DIMENSIONS[kind][1] if kind in DIMENSIONS else ""


#: Extreme magnitudes with the right unit: they pass the parser and reach the cross-checks and
#: the models (where overflow, underflow and division by zero hide).
MAGNITUDE = st.one_of(st.floats(allow_nan=False, allow_infinity=False),
                      st.sampled_from([0.0, -0.0, 1e-300, -1e-300, 1e300, 5e-324, 1.0, -1.0,
                                       0.5, 2.0, 1e6, 1e-6]))


def right_unit_values(field):
    section, name = field
    unit = _unit_of(section, name)
    if not unit:
        return MAGNITUDE
    return MAGNITUDE.map(lambda x: f"{x!r} {unit}")


def _targets(raw, section, name):
    """Where (section, name) lives in a raw case: the section table or every vessel table."""
    if section == "vessel":
        vessels = raw.get("vessel")
        if isinstance(vessels, dict):
            return [vessels]
        return list(vessels or [])
    return [raw.setdefault(section, {})]


@FUZZ_STRINGS
@given(st.sampled_from(sorted(BASES)), st.data())
def test_random_values_in_quantity_fields_raise_only_screen_error(base, data):
    raw = copy.deepcopy(BASES[base])
    field = data.draw(st.sampled_from(QUANTITY_FIELDS), label="field")
    value = data.draw(st.one_of(ANY_VALUE, right_unit_values(field)), label="value")
    section, name = field
    targets = _targets(raw, section, name)
    assume(targets)
    for table in targets:
        table[name] = value
    STATS["field values fuzzed"] += 1
    try:
        case = build_case(raw, path="<fuzz>")
    except ScreenError as exc:
        STATS["field values rejected with ScreenError"] += 1
        line = exc.one_line()
        assert "\n" not in line and line
        if exc.key:
            assert exc.key.split(".")[0] in SCHEMA or exc.key.startswith("--")
        return
    STATS["field values accepted"] += 1
    # An accepted value must also screen, or fail with the project's own error.
    from screen.runs.screening import screen_case

    reason = _known_open_defect(case)
    if reason:
        STATS[f"screening skipped: {reason}"] += 1
        return
    try:
        result = screen_case(case, curves=False)
    except ScreenError:
        STATS["accepted values stopped by a ScreenError in screening"] += 1
        return
    klass = result.results["criticality_class_computed"]
    assert klass in (1, 2, 3, 4, 5)


def _known_open_defect(case):
    """Regions the screening cannot be fuzzed in yet (docs/fuzzing.md, "Open defects")."""
    if "synthesis_kinetics" in case.sections:
        # The simulation costs 0.6 s per case; its runaway integrations are bounded by
        # reactor.MAX_RHS_EVALUATIONS (a clean SolverError), tested in test_invariants.
        return "simulation (synthesis_kinetics), too slow for field fuzzing"
    return None


def test_tiny_reaction_order_is_a_clean_error():
    from screen.models import decomposition as dm

    kinetics = dm.DecompositionKinetics.from_reference_rate(
        "nth-order", 310e3, 135e3, 2.5, 473.15, order=1e-30)
    try:
        dm.tmrad(kinetics, 333.15, 1850.0)
    except ScreenError:
        pass  # a clean error (or a finite time) is the fixed behaviour


@FUZZ_STRINGS
@given(st.sampled_from(sorted(BASES)), st.data())
def test_random_values_through_toml_text_raise_only_screen_error(tmp_path_factory, base, data):
    """The same through load_case: TOML text on disk, [uncertainty] entries included."""
    import json

    raw = copy.deepcopy(BASES[base])
    section, name = data.draw(st.sampled_from(ALL_FIELDS), label="field")
    value = data.draw(st.one_of(ANY_VALUE, right_unit_values((section, name))
                                if (section, name) in QUANTITY_FIELDS else ANY_VALUE),
                      label="value")
    for table in _targets(raw, section, name):
        table[name] = value
    if data.draw(st.booleans(), label="add an uncertainty"):
        uncertain = data.draw(st.sampled_from(QUANTITY_FIELDS), label="uncertain field")
        spread = data.draw(st.one_of(DISTRIBUTION_TEXT, st.sampled_from(
            ["normal 5 %", "lognormal factor 2", "normal 1e300 %", "uniform 0 .. 1",
             "triangular 1 .. 2 .. 3", "normal 0 %", "lognormal factor 1"])), label="spread")
        raw.setdefault("uncertainty", {})[".".join(uncertain)] = spread
    lines = []
    for section_name, table in raw.items():
        tables = table if isinstance(table, list) else [table]
        for item in tables:
            lines.append(f"[[{section_name}]]" if isinstance(table, list) else f"[{section_name}]")
            for key, item_value in item.items():
                lines.append(f"{json.dumps(key)} = {_toml_value(item_value)}")
    path = tmp_path_factory.mktemp("fuzz") / "case.toml"
    path.write_bytes("\n".join(lines).encode("utf-8", "surrogatepass"))
    STATS["case files fuzzed"] += 1
    try:
        load_case(path)
    except ScreenError as exc:
        STATS["case files rejected with ScreenError"] += 1
        assert "\n" not in exc.one_line()
        return
    STATS["case files accepted"] += 1


def _toml_value(value):
    import json

    if value is None:
        return '"None"'
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, int):
        return str(value) if abs(value) < 2**63 else json.dumps(str(value))
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join(f"{json.dumps(k)} = {_toml_value(v)}"
                               for k, v in value.items()) + "}"
    raise TypeError(type(value))
