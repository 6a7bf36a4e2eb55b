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
