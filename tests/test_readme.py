"""Every `runaway-screen` command in the README runs on the bundled cases without an error or an
error row, and shows what the README says it shows.

The bundled cases are invented demo data: these tests check that the examples work and say what
they promise (a verdict word, a flip, a barrier verdict), never invented values as truth.
"""

import glob
import os
import pathlib
import re
import shlex

import pytest
from click.testing import CliRunner

from screen.cli import main

ROOT = pathlib.Path(__file__).parent.parent
README = ROOT / "README.md"


def readme_commands() -> list[str]:
    """The `runaway-screen ...` command lines of the README's code blocks (comments removed;
    ``pip install . && `` in front of a command dropped; continuation lines joined)."""
    text = README.read_text(encoding="utf-8")
    commands = []
    for block in re.findall(r"```(?:sh|text|console)\n(.*?)```", text, flags=re.DOTALL):
        for line in block.replace("\\\n", " ").splitlines():
            line = line.strip()
            if "runaway-screen " not in line:
                continue
            line = line[line.index("runaway-screen "):]
            commands.append(line)
    return commands


def _arguments(command: str, workdir: pathlib.Path) -> list[str]:
    words = shlex.split(command, comments=True)
    assert words[0] == "runaway-screen", command
    out = []
    for word in words[1:]:
        if word.startswith("cases"):
            matches = sorted(glob.glob(str(ROOT / word)))
            assert matches, f"{word}: no such bundled file ({command})"
            out.extend(matches if any(c in word for c in "*?[") else [str(ROOT / word)])
        else:
            out.append(word)
    return out


COMMANDS = readme_commands()


def test_readme_has_commands_for_every_subcommand():
    used = {shlex.split(c, comments=True)[1] for c in COMMANDS}
    assert {"check", "report", "compare", "sweep", "kinetics", "batch"} <= used
    for command in COMMANDS:  # concrete, runnable examples: no placeholders
        assert "CASE.toml" not in command and "OLD.toml" not in command, command


@pytest.mark.slow
@pytest.mark.parametrize("command", COMMANDS, ids=[c[:60] for c in COMMANDS])
def test_readme_command_runs_without_error_rows(command, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # files the examples write land in a scratch folder
    arguments = _arguments(command, tmp_path)
    result = CliRunner().invoke(main, arguments)
    output = result.output
    assert result.exit_code == 0, f"{command}\n{output}"
    assert "input error" not in output and "ERROR" not in output, command
    assert "Traceback" not in output
    if arguments[0] == "sweep":
        assert "Verdict flips" in output, "the sweep example should show a flip"
    if arguments[0] == "compare":
        assert "VERDICT CHANGED" in output or "No verdict changed" in output
    if arguments[0] == "batch":
        assert "0 with errors" in output
    for written in ("-o", "--pdf", "--csv"):
        if written in arguments:
            target = arguments[arguments.index(written) + 1]
            assert os.path.exists(target), (command, target)


def test_readme_grignard_barrier_claim():
    """The README says the Grignard case shows boiling THF as a barrier (class 3): the barrier
    is assessed and its verdict is computed, not missing data."""
    import json

    text = README.read_text(encoding="utf-8")
    assert "boiling THF as barrier" in text
    out = CliRunner().invoke(main, ["check", str(ROOT / "cases" / "grignard_semibatch.toml"),
                                    "--json"])
    data = json.loads(out.output)["results"]
    assert data["criticality_class"] == 3
    assert data["barrier"]["assessed"] is True
    assert data["barrier"]["verdict"] in ("holds", "doubtful")
    for vessel in data["barrier"]["vessels"]:
        assert vessel["condenser_duty_needed_kW"] is not None
        assert vessel["vapour_line_velocity_m_per_s"] is not None
