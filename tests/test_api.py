"""The public Python API (``import screen``): loading with overrides, errors, results.

Overrides given as a mapping must act exactly like the same ``--set`` text on the command line
(two paths through the loader compared; the example cases are invented demo data and are used
only for such comparisons, never as check values).
"""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

import screen
from screen.errors import CaseError, ScreenError

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CASES = os.path.join(ROOT, "cases")
GRIGNARD = os.path.join(CASES, "grignard_semibatch.toml")


def test_missing_case_file_is_a_file_not_found_error_and_a_project_error():
    with pytest.raises(FileNotFoundError) as info:
        screen.load_case(os.path.join(CASES, "no_such_case.toml"))
    assert isinstance(info.value, ScreenError) and isinstance(info.value, CaseError)
    assert "no_such_case.toml" in str(info.value)


def test_mapping_overrides_equal_the_command_line_overrides():
    as_mapping = screen.load_case(GRIGNARD, {"process.temperature": "30 degC",
                                             "vessel.1.coolant_temperature": "5 degC",
                                             "process.accumulation": 0.4})
    as_text = screen.load_case(GRIGNARD, ["process.temperature=30 degC",
                                          "vessel.1.coolant_temperature=5 degC",
                                          "process.accumulation=0.4"])
    assert as_mapping.sections["process"].temperature == as_text.sections["process"].temperature
    assert as_mapping.sections["process"].accumulation == pytest.approx(0.4, abs=0.0)
    assert as_mapping.vessels[0].coolant_temperature == as_text.vessels[0].coolant_temperature
    assert as_mapping.overrides == as_text.overrides


@pytest.mark.parametrize("overrides, fragment", [
    ({"process.temperature": 30}, "needs a string with a unit"),
    ({"process.no_such_key": "1"}, "has no key"),
    ({"vessel.7.coolant_temperature": "5 degC"}, "vessel number 7 does not exist"),
    ({"process.accumulation": True}, "needs a number"),
])
def test_mapping_override_errors_do_not_talk_about_the_command_line(overrides, fragment):
    with pytest.raises(CaseError) as info:
        screen.load_case(GRIGNARD, overrides)
    message = info.value.one_line()
    assert fragment in message
    assert "--set" not in message
    assert "overrides[" in message and "\n" not in message


def test_command_line_override_errors_still_name_set():
    with pytest.raises(CaseError) as info:
        screen.load_case(GRIGNARD, ["process.temperature"])
    assert "--set" in info.value.one_line()


BLOCK_MATPLOTLIB = r"""
import sys
class Block:
    def find_spec(self, name, path=None, target=None):
        if name == "matplotlib" or name.startswith("matplotlib."):
            raise ImportError("matplotlib blocked for this test")
        return None
sys.meta_path.insert(0, Block())
"""


def test_check_and_report_run_without_matplotlib(tmp_path):
    """The PDF figures are reportlab drawings and the fonts ship with the package: neither
    ``check`` nor ``report`` imports (or needs) matplotlib."""
    code = BLOCK_MATPLOTLIB + (
        "from screen.cli.main import main\n"
        "for args in ([%r], [%r, '-o', %r]):\n"
        "    try:\n"
        "        main([args[0].split()[0]] + args[0].split()[1:] + args[1:])\n"
        "    except SystemExit as exc:\n"
        "        assert not exc.code, exc.code\n"
        "print('matplotlib' in sys.modules)\n"
    ) % ("check " + GRIGNARD, "report " + GRIGNARD, str(tmp_path / "r.pdf"))
    completed = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                               cwd=str(tmp_path), timeout=300)
    assert completed.returncode == 0, completed.stderr
    assert completed.stdout.strip().splitlines()[-1] == "False"
    assert (tmp_path / "r.pdf").stat().st_size > 10_000


def test_kinetics_png_without_matplotlib_is_one_line_error(tmp_path):
    code = BLOCK_MATPLOTLIB + (
        "from screen.cli.main import main\n"
        "main(['kinetics', '--peaks', %r, '--png-dir', %r])\n"
    ) % (os.path.join(CASES, "dsc", "hf417_residue_peaks.csv"), str(tmp_path / "png"))
    completed = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                               cwd=str(tmp_path), timeout=300)
    assert completed.returncode == 2
    assert completed.stderr.count("\n") == 1
    assert "matplotlib" in completed.stderr and "runaway-screen[plot]" in completed.stderr


# --------------------------------------------------------------------------------------------
# Result objects and frames: consistent with the JSON of the same run


@pytest.fixture(scope="module")
def nitration():
    return screen.screen_case(os.path.join(CASES, "nitration_semibatch.toml"))


def test_import_screen_loads_no_heavy_module():
    code = ("import sys, screen; heavy = ('numpy', 'scipy', 'pandas', 'pint', 'matplotlib', "
            "'reportlab', 'click'); print(','.join(m for m in heavy if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, check=True)
    assert out.stdout.strip() == ""


def test_result_is_the_engine_result_with_short_repr(nitration):
    from screen.analyses.engine import ScreeningResult
    from screen.cautions import SHORT_CAUTION

    assert isinstance(nitration, ScreeningResult)
    text = repr(nitration)
    first = text.splitlines()[0]
    assert nitration.case.title in first
    assert f"class {nitration.results['criticality_class']}" in first
    assert f"MTSR {nitration.results['mtsr_degC']:.1f} degC" in first
    assert f"TD24 {nitration.results['td24_degC']:.1f} degC" in first
    assert SHORT_CAUTION in text and len(text.splitlines()) == 2


def test_to_frame_columns_are_the_json_keys(nitration):
    data = nitration.to_json_dict()
    frame = nitration.to_frame()
    assert len(frame) == 1
    for key, value in data["results"].items():
        if isinstance(value, (str, int, float)) and not isinstance(value, bool):
            cell = frame[key].iloc[0]
            if isinstance(value, float):
                assert cell == pytest.approx(value, rel=1e-12)
            else:
                assert cell == value
    assert "vessels" not in frame.columns
    assert frame.attrs["tool_version"] == screen.__version__
    assert frame.attrs["cautions"] == data["cautions"]


def test_vessels_frame_one_row_per_vessel(nitration):
    data = nitration.to_json_dict()
    frame = nitration.vessels_frame()
    assert list(frame.index) == [v["name"] for v in data["results"]["vessels"]]
    for vessel in data["results"]["vessels"]:
        row = frame.loc[vessel["name"]]
        assert row["stability"] == vessel["stability"]
        assert row["critical_coolant_temperature_degC"] == pytest.approx(
            vessel["critical_coolant_temperature_degC"], rel=1e-12)


def test_html_has_verdict_figures_vessels_and_cautions(nitration):
    from screen.cautions import CAUTIONS

    html = nitration._repr_html_()
    assert "criticality class 4" in html
    assert f"{nitration.results['mtsr_degC']:.1f}" in html
    for vessel in nitration.results["vessels"]:
        assert vessel["name"].split(" (")[0] in html
    for caution in CAUTIONS:
        assert caution.replace("'", "&#x27;") in html


def test_sweep_frame_equals_the_command_line_sweep():
    import json

    from click.testing import CliRunner

    from screen.cli import main

    path = os.path.join(CASES, "grignard_semibatch.toml")
    frame = screen.sweep(path, vary={"process.temperature": ("20 degC", "60 degC")}, steps=5)
    run = CliRunner().invoke(main, ["sweep", path, "--vary",
                                    "process.temperature=20 degC:60 degC:5", "--json"])
    assert run.exit_code == 0, run.output
    payload = json.loads(run.stdout)
    assert len(frame) == len(payload["rows"]) == 5
    for (_, row), expected in zip(frame.iterrows(), payload["rows"], strict=True):
        assert row["process.temperature [K]"] == pytest.approx(
            expected["process.temperature"], rel=1e-15)
        assert row["process.temperature [degC]"] == pytest.approx(
            expected["process.temperature"] - 273.15, rel=1e-12)
        assert row["mtsr_degC"] == pytest.approx(expected["mtsr_degC"], rel=1e-12)
    assert frame.attrs["flips"] == json.loads(json.dumps(payload["flips"]))


def test_sweep_accepts_triples_strings_and_numbers():
    path = os.path.join(CASES, "grignard_semibatch.toml")
    a = screen.sweep(path, vary={"process.temperature": ("20 degC", "40 degC", 3)})
    b = screen.sweep(path, vary={"process.temperature": "20 degC:40 degC:3"})
    assert list(a["mtsr_degC"]) == list(b["mtsr_degC"])
    c = screen.sweep(path, vary={"process.accumulation": (0.2, 0.6)}, steps=3)
    assert list(c["process.accumulation [-]"]) == pytest.approx([0.2, 0.4, 0.6], abs=1e-15)
    with pytest.raises(CaseError, match="vary"):
        screen.sweep(path, vary={"process.temperature": 20})


def test_compare_frame_lists_the_changes(nitration):
    path = os.path.join(CASES, "nitration_semibatch.toml")
    warmer = screen.load_case(path, {"process.temperature": "45 degC"})
    frame = screen.compare(nitration, warmer)
    inputs = frame[frame["kind"] == "input"]
    assert list(inputs["key"]) == ["process.temperature"]
    mtsr = frame[frame["key"] == "mtsr_degC"].iloc[0]
    assert mtsr["delta"] == pytest.approx(5.0, rel=1e-9)  # MTSR moves with T_p (same X, dT_ad)
    assert frame.attrs["verdict_changed"] is bool(frame["is_verdict"].any())


def test_portfolio_frame_carries_the_cautions():
    from screen.cautions import CAUTIONS

    frame = screen.screen_portfolio(os.path.join(CASES, "esterification_batch.toml"),
                                    workers=1, overrides={"process.temperature": "45 degC"})
    assert len(frame) == 1 and frame["error"].isna().all()
    assert frame["process_temperature_degC"].iloc[0] == pytest.approx(45.0, abs=1e-9)
    assert frame.attrs["cautions"] == list(CAUTIONS)


def test_uncertainty_frames_match_the_block():
    from screen.cautions import SHORT_CAUTION

    run = screen.uncertainty(os.path.join(CASES, "esterification_uncertain.toml"),
                             samples=500, seed=3)
    block = run.to_json_dict()
    probabilities = run.class_probabilities["probability"]
    assert probabilities.sum() == pytest.approx(1.0, abs=1e-12)
    assert [probabilities.loc[k] for k in range(1, 6)] == \
        [block["class_probabilities"][str(k)] for k in range(1, 6)]
    assert run.percentiles.loc["td24_degC", "p50"] == block["td24_degC"]["p50"]
    assert list(run.sensitivity.index) == [item["key"] for item in block["sensitivity"]]
    assert SHORT_CAUTION in repr(run)
    assert "Cautions." in run._repr_html_()


def test_figure_without_matplotlib_is_one_line_import_error(tmp_path):
    code = BLOCK_MATPLOTLIB + (
        "import screen\n"
        "from screen.errors import MissingDependencyError\n"
        "result = screen.screen_case(%r)\n"
        "try:\n"
        "    result.figure('tmrad')\n"
        "except ImportError as error:\n"
        "    assert isinstance(error, MissingDependencyError)\n"
        "    print(str(error))\n"
    ) % GRIGNARD
    completed = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                               cwd=str(tmp_path), timeout=300)
    assert completed.returncode == 0, completed.stderr
    message = completed.stdout.strip()
    assert "\n" not in message and "runaway-screen[plot]" in message


def test_command_group_loads_no_heavy_module():
    """``runaway-screen --help`` imports click and the command modules only."""
    code = ("import sys, screen.cli.main; heavy = ('numpy', 'scipy', 'pandas', 'pint', "
            "'matplotlib', 'reportlab', 'dask'); "
            "print(','.join(m for m in heavy if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, check=True)
    assert out.stdout.strip() == ""


def test_sweep_errors_name_vary_not_the_command_line_option():
    path = os.path.join(CASES, "grignard_semibatch.toml")
    with pytest.raises(CaseError) as info:
        screen.sweep(path, vary={"process.no_such_key": ("1", "2")})
    message = info.value.one_line()
    assert "no such key" in message and "--vary" not in message and "vary" in message


def test_repr_of_a_case_without_kinetics_says_no_class_and_crude():
    """Fail closed on every surface: no class granted, TD24 marked as a crude estimate."""
    result = screen.screen_case(os.path.join(CASES, "amidation_onset_only.toml"))
    assert result.results["criticality_class"] is None
    first = repr(result).splitlines()[0]
    assert "no criticality class (cannot conclude)" in first
    assert "crude" in first
    assert "no criticality class" in result._repr_html_()
