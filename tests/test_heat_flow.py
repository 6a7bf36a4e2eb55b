"""Heat-flow calorimetry: screen/models/heat_flow.py, screen/analyses/heat_flow.py and the
``heat-flow`` command.

Check values come from outside the tool: an independent ``scipy.integrate.solve_ivp`` model of
the semi-batch run (tests/calorimetry_simulation.py), closed forms of first-order kinetics,
``scipy.integrate.cumulative_trapezoid``, and the published balance equations (Gygax 1988;
Stoessel 1993) evaluated by hand.
"""

from __future__ import annotations

import json
import math
import time
import tomllib

import numpy as np
import pytest
from click.testing import CliRunner
from hypothesis import given, settings
from hypothesis import strategies as st

from calorimetry_simulation import semibatch_trace, write_csv
from screen.analyses.heat_flow import analyse_heat_flow
from screen.cli.main import main
from screen.errors import DataFileError
from screen.models import heat_flow as hf
from screen.report.heat_flow import case_fragment, result_to_dict

COLUMNS = ["time_s", "reactor_temperature_degC", "heat_flow_W", "dosed_mass_kg"]
RUN = dict(initial_mass=1.2, specific_heat=1900.0, limiting_amount=1.5,
           feed_temperature=293.15, feed_specific_heat=1700.0)


@pytest.fixture(scope="module")
def simulated(tmp_path_factory):
    truth = semibatch_trace()
    path = tmp_path_factory.mktemp("hf") / "run.csv"
    write_csv(path, truth, COLUMNS, fmt="%.6f")
    return path, truth


# ---- models -----------------------------------------------------------------------------------

def test_cumulative_integral_matches_scipy():
    # Reference library: scipy.integrate.cumulative_trapezoid.
    from scipy.integrate import cumulative_trapezoid

    t = np.sort(np.random.default_rng(3).uniform(0, 100, 300))
    p = np.sin(t / 7.0) + 2.0
    assert np.allclose(hf.cumulative_integral(t, p),
                       cumulative_trapezoid(p, t, initial=0.0), rtol=1e-12, atol=1e-12)


def test_linear_baseline_reproduces_a_linear_drift():
    # Derived: the mean of a straight line over a segment is its value at the mean time.
    t = np.linspace(0, 1000, 1001)
    drift = 2.0 + 0.003 * t
    before, after = slice(0, 100), slice(800, 1001)
    base = hf.linear_baseline(t, (t[before].mean(), drift[before].mean()),
                              (t[after].mean(), drift[after].mean()))
    assert np.allclose(base, drift, atol=1e-12)


def test_mtsr_course_by_hand():
    # Stoessel 1993: MTSR = T_r + X_ac Q/(m c'p); by hand 323.15 + 0.25 * 2e5/(1.6 * 2000)
    # = 323.15 + 15.625 = 338.775 K; negative accumulation counts as zero.
    out = hf.mtsr_course([323.15, 323.15], [0.25, -0.01], 2e5, [1.6, 1.6], 2000.0)
    assert out[0] == pytest.approx(338.775, abs=1e-9)
    assert out[1] == pytest.approx(323.15, abs=1e-12)


def test_accumulation_and_conversion_definitions():
    # Gygax 1988: X_th = Q(t)/Q_total, X_ac = X_dosed - X_th.
    x = hf.thermal_conversion(np.array([0.0, 50.0, 100.0]), 100.0)
    assert np.allclose(x, [0, 0.5, 1.0])
    assert np.allclose(hf.thermal_accumulation([0.2, 0.8, 1.0], x), [0.2, 0.3, 0.0])


def test_dosing_heat_flow_integrates_to_feed_sensible_heat():
    # m_feed c'p,feed (T_r - T_feed) = 0.5 kg * 1700 J/(kg K) * 30 K = 25.5 kJ (by hand).
    t = np.linspace(0, 3600, 3601)
    dosed = np.clip((t - 600) / 2400, 0, 1) * 0.5
    q = hf.dosing_heat_flow(t, dosed, np.full(t.size, 323.15), 293.15, 1700.0)
    assert hf.cumulative_integral(t, q)[-1] == pytest.approx(25.5e3, rel=2e-3)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(0.0, 1.0), min_size=3, max_size=30),
       st.floats(1e3, 1e7), st.floats(0.1, 1e4), st.floats(500.0, 5000.0))
def test_mtsr_invariants(fractions, total, mass, cp):
    # Invariants of the published definitions (Gygax 1988; Stoessel 1993): MTSR(t) >= T_r,
    # equal where nothing is accumulated, and rising with the accumulation.
    x = np.array(fractions)
    t_r = np.full(x.size, 330.0)
    mtsr = hf.mtsr_course(t_r, x, total, np.full(x.size, mass), cp)
    assert np.all(mtsr >= t_r)
    assert np.all(mtsr[x == 0.0] == 330.0)
    order = np.argsort(x, kind="stable")
    assert np.all(np.diff(mtsr[order]) >= -1e-9)
    dosed = np.maximum.accumulate(x)
    assert np.all(hf.thermal_accumulation(dosed, np.minimum(x, dosed)) >= 0.0)


def test_dosing_interval_and_no_dosing():
    assert hf.dosing_interval(np.zeros(10)) is None
    start, end = hf.dosing_interval(np.r_[np.zeros(5), np.linspace(0, 1, 11), np.ones(5)])
    assert (start, end) == (6, 15)


# ---- analysis against the independent simulation ---------------------------------------------

def test_recovers_simulated_semibatch_run(simulated):
    # Check values: solve_ivp model of A + B -> P with dosing pause, cold feed, temperature
    # wobble, baseline drift and noise (tests/calorimetry_simulation.py). Tolerances of issue 16.
    path, truth = simulated
    r = analyse_heat_flow(path, **RUN)
    d = result_to_dict(r)
    assert d["mode"] == "semi-batch"
    assert d["reaction_heat_kJ"] * 1e3 == pytest.approx(truth["reaction_heat_J"], rel=0.01)
    assert d["max_accumulation"] == pytest.approx(truth["max_accumulation"], abs=0.01)
    assert abs(d["time_of_max_accumulation_h"] * 3600 - truth["time_of_max_accumulation_s"]) \
        < 0.02 * truth["dosing_time_s"]
    assert d["accumulation_mass_ratio"] == pytest.approx(truth["mass_ratio"], abs=0.01)
    assert d["mtsr_max_degC"] + 273.15 == pytest.approx(truth["mtsr_max_K"], abs=0.5)
    assert d["molar_enthalpy_kJ_per_mol"] == pytest.approx(-125.0, rel=0.01)
    assert d["synthesis_energy_kJ_per_kg"] * 1e3 == pytest.approx(
        truth["reaction_heat_J"] / truth["final_mass"], rel=0.01)
    assert d["synthesis_adiabatic_rise_K"] == pytest.approx(
        truth["reaction_heat_J"] / truth["final_mass"] / 1900.0, rel=0.01)
    assert d["dosing_heat_kJ"] * 1e3 == pytest.approx(truth["dosing_heat_J"], rel=0.01)
    assert d["dosing_time_h"] * 3600 == pytest.approx(truth["dosing_time_s"], rel=0.01)
    assert d["warnings"] == []
    curves = d["curves"]
    assert len(curves["time_h"]) <= 700 and len(set(map(len, curves.values()))) == 1


def test_without_feed_temperature_the_heat_is_low_and_flagged(simulated):
    path, truth = simulated
    r = analyse_heat_flow(path, 1.2, 1900.0)
    assert r.reaction_heat < truth["reaction_heat_J"] - 0.8 * truth["dosing_heat_J"]
    assert any("cannot be separated" in w for w in r.warnings)
    assert r.molar_enthalpy is None


def test_batch_run_first_order_closed_form(tmp_path):
    # Closed form of an isothermal first-order batch reaction started at t0:
    # q(t) = Q k exp(-k (t - t0)), Q = 150 kJ, k = 1/1200 s.
    t = np.arange(0, 6 * 3600, 2.0)
    t0, q_total, k = 1800.0, 150e3, 1 / 1200
    q = np.where(t >= t0, q_total * k * np.exp(-k * (t - t0)), 0.0)
    rng = np.random.default_rng(5)
    cols = {"time_s": t, "reactor_temperature_degC": np.full(t.size, 60.0),
            "heat_flow_W": q + 3.0 + rng.normal(0, 0.1, t.size)}
    path = tmp_path / "batch.csv"
    write_csv(path, cols, list(cols))
    r = analyse_heat_flow(path, 2.0, 2000.0)
    assert r.mode == "batch"
    assert r.reaction_heat == pytest.approx(q_total, rel=0.01)
    assert r.max_accumulation == pytest.approx(1.0, abs=1e-9)
    assert r.mass_ratio == 1.0
    # MTSR of a batch = T_p + dT_ad: 60 + 150e3/(2 * 2000) = 97.5 degC (by hand)
    assert float(r.mtsr.max()) - 273.15 == pytest.approx(97.5, abs=0.5)
    text = case_fragment(r)
    data = tomllib.loads(text)
    assert data["process"]["mode"] == "batch" and data["process"]["accumulation"] == 1.0


def test_incomplete_reaction_is_flagged(simulated, tmp_path):
    _, truth = simulated
    cut = {k: v[: int(9600 / 2)] for k, v in truth.items() if k in COLUMNS}
    path = tmp_path / "cut.csv"
    write_csv(path, cut, COLUMNS, fmt="%.6f")
    r = analyse_heat_flow(path, **RUN)
    assert any("lower bound" in w for w in r.warnings)


def test_temperature_drift_is_flagged(tmp_path):
    truth = semibatch_trace(wobble=4.0, t_end=5 * 3600)
    path = tmp_path / "drift.csv"
    write_csv(path, truth, COLUMNS, fmt="%.6f")
    r = analyse_heat_flow(path, **RUN)
    assert any("isothermal" in w for w in r.warnings)


def test_header_variants_and_units(simulated, tmp_path):
    # Same data in an instrument style: semicolon, decimal comma, minutes, mW, grams.
    path, truth = simulated
    reference = analyse_heat_flow(path, **RUN).reaction_heat
    rows = ["Exported by an invented calorimeter", "Time (min);Tr (°C);Tj (°C);Qr (mW);Dosed mass (g)"]
    for i in range(0, truth["time_s"].size):
        rows.append(";".join(f"{v:.6f}".replace(".", ",") for v in (
            truth["time_s"][i] / 60, truth["reactor_temperature_degC"][i], 20.0,
            truth["heat_flow_W"][i] * 1e3, truth["dosed_mass_kg"][i] * 1e3)))
    other = tmp_path / "styled.csv"
    other.write_text("\n".join(rows) + "\n", encoding="utf-8")
    r = analyse_heat_flow(other, **RUN)
    assert r.reaction_heat == pytest.approx(reference, rel=1e-4)
    assert any("Tj" in n for n in r.notes)


def test_hundred_thousand_rows_fast(tmp_path):
    truth = semibatch_trace(dt=0.216)  # 100,001 rows over 6 h
    path = tmp_path / "big.csv"
    write_csv(path, truth, COLUMNS, fmt="%.5f")
    start = time.perf_counter()
    r = analyse_heat_flow(path, **RUN)
    elapsed = time.perf_counter() - start
    assert r.time.size >= 100_000
    assert r.reaction_heat == pytest.approx(truth["reaction_heat_J"], rel=0.01)
    assert elapsed < 3.0  # design target about 1 s; generous for a shared machine


# ---- command line -----------------------------------------------------------------------------

ARGS = ["--initial-mass", "1.2 kg", "--specific-heat", "1.9 kJ/(kg K)", "--limiting-amount",
        "1.5 mol", "--feed-temperature", "20 degC", "--feed-specific-heat", "1.7 kJ/(kg K)"]
KEYS = ("reaction_heat_kJ", "synthesis_energy_kJ_per_kg", "molar_enthalpy_kJ_per_mol",
        "synthesis_adiabatic_rise_K", "max_accumulation", "time_of_max_accumulation_h",
        "accumulation_mass_ratio", "mtsr_max_degC", "curves", "warnings", "cautions")


def test_cli_json_keys_fragment_and_screening(simulated, tmp_path):
    path, truth = simulated
    runner = CliRunner()
    fragment = tmp_path / "frag.toml"
    result = runner.invoke(main, ["heat-flow", str(path), *ARGS, "--json", "-o", str(fragment),
                                  "--png-dir", str(tmp_path / "png")])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    for key in KEYS:
        assert key in data
    assert data["molar_enthalpy_kJ_per_mol"] < 0
    assert sorted(p.name for p in (tmp_path / "png").iterdir()) == ["accumulation.png",
                                                                    "heat_flow.png"]
    text = fragment.read_text(encoding="utf-8")
    assert "SHA-256" in text and "SCREENING AID" in text
    parts = tomllib.loads(text)
    assert parts["process"]["mode"] == "semi-batch"
    assert parts["process"]["accumulation"] == pytest.approx(data["max_accumulation"], abs=1e-4)
    # Done-when: the sections screen in a case (bundled invented case, keys replaced).
    import pathlib

    case_text = pathlib.Path("cases/esterification_batch.toml").read_text(encoding="utf-8")
    case = tomllib.loads(case_text)
    case["synthesis"] = dict(parts["synthesis"])
    case["process"] = {**{k: v for k, v in case["process"].items()
                          if k in ("temperature", "max_technical_temperature", "mtt_basis")},
                       **parts["process"]}
    case.pop("synthesis_kinetics", None)
    case_path = tmp_path / "case.toml"
    case_path.write_text(_dump_toml(case), encoding="utf-8")
    check = runner.invoke(main, ["check", str(case_path), "--json"])
    assert check.exit_code == 0, check.output
    results = json.loads(check.output)["results"]
    assert results["synthesis_adiabatic_rise_K"] == pytest.approx(
        -data["molar_enthalpy_kJ_per_mol"] * 1.5 / float(case["mass"]["amount"].split()[0]) /
        float(case["mass"]["specific_heat"].split()[0]), rel=0.01)


def _dump_toml(data):
    """Minimal TOML writer for the nested tables of a case (strings, numbers, tables, arrays
    of tables)."""
    lines = []

    def value(v):
        return json.dumps(v) if isinstance(v, str) else repr(v)

    for name, body in data.items():
        if isinstance(body, list):
            for item in body:
                lines.append(f"[[{name}]]")
                lines.extend(f"{k} = {value(v)}" for k, v in item.items())
        else:
            lines.append(f"[{name}]")
            lines.extend(f"{k} = {value(v)}" for k, v in body.items()
                         if not isinstance(v, dict))
    return "\n".join(lines) + "\n"


def test_cli_never_overwrites_without_force_and_uses_the_atomic_writer(simulated, tmp_path,
                                                                     monkeypatch):
    import screen.io.fileio as fileio

    path, _ = simulated
    target = tmp_path / "frag.toml"
    target.write_text("keep", encoding="utf-8")
    runner = CliRunner()
    result = runner.invoke(main, ["heat-flow", str(path), *ARGS, "-o", str(target)])
    assert result.exit_code == 2 and "--force" in result.output
    assert target.read_text(encoding="utf-8") == "keep"
    calls = []
    original = fileio.write_atomic
    monkeypatch.setattr(fileio, "write_atomic",
                        lambda *a, **k: (calls.append(a[0]), original(*a, **k)))
    result = runner.invoke(main, ["heat-flow", str(path), *ARGS, "-o", str(target), "--force"])
    assert result.exit_code == 0, result.output
    assert calls == [str(target)] and "[synthesis]" in target.read_text(encoding="utf-8")


@pytest.mark.parametrize("content, expected", [
    ("time_s,reactor_temperature_degC,heat_flow_W\n" +
     "".join(f"{i},50,1.0\n" for i in range(30)) + "31,50,abc\n" +
     "".join(f"{i},50,1.0\n" for i in range(32, 40)), ["row 32", "heat_flow_W", "not a number"]),
    ("time_s,reactor_temperature_degC\n" + "".join(f"{i},50\n" for i in range(30)),
     ["no heat flow column", "heat_flow_W"]),
    ("time_s,reactor_temperature,heat_flow_W\n" + "".join(f"{i},50,1\n" for i in range(30)),
     ["'reactor_temperature' has no unit"]),
    ("time_s,reactor_temperature_degC,heat_flow_W\n" +
     "".join(f"{i if i != 10 else 9},50,1\n" for i in range(30)), ["row 12", "time does not increase"]),
    ("time_s,reactor_temperature_degC,heat_flow_W\n" + "".join(f"{i},50,1\n" for i in range(30)),
     ["no exotherm"]),
])
def test_cli_bad_trace_one_line_exit_2(tmp_path, content, expected):
    path = tmp_path / "bad.csv"
    path.write_text(content, encoding="utf-8")
    result = CliRunner().invoke(main, ["heat-flow", str(path), "--initial-mass", "1 kg",
                                       "--specific-heat", "2 kJ/(kg K)"])
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ") and str(path) in lines[0]
    for text in expected:
        assert text in lines[0]
    assert "Traceback" not in result.output


def test_cli_bad_options(simulated):
    path, _ = simulated
    runner = CliRunner()
    result = runner.invoke(main, ["heat-flow", str(path), "--initial-mass", "1.2",
                                  "--specific-heat", "1.9 kJ/(kg K)"])
    assert result.exit_code == 2 and "--initial-mass" in result.output
    result = runner.invoke(main, ["heat-flow", str(path), "--initial-mass", "-1 kg",
                                  "--specific-heat", "1.9 kJ/(kg K)"])
    assert result.exit_code == 2 and "positive" in result.output


def test_demo_trace_runs():
    # Invented demo data: consistency only, never a check value.
    import pathlib

    demo = pathlib.Path("cases/calorimetry/hf330_heat_flow_semibatch.csv")
    result = CliRunner().invoke(main, ["heat-flow", str(demo), "--initial-mass", "1.2 kg",
                                       "--specific-heat", "1.9 kJ/(kg K)", "--feed-temperature",
                                       "20 degC", "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert 0 < data["max_accumulation"] < 1 and math.isfinite(data["mtsr_max_degC"])
    assert data["mtsr_max_degC"] >= data["process_temperature_degC"]


def test_reader_error_is_data_file_error(tmp_path):
    path = tmp_path / "x.csv"
    path.write_text("time_s,reactor_temperature_degC,heat_flow_W\n1,50,1\n", encoding="utf-8")
    with pytest.raises(DataFileError, match="only 1 data rows"):
        analyse_heat_flow(path, 1.0, 2000.0)
