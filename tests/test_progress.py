"""Progress bars on a terminal only; silence on stderr for a successful piped run.

Contract (issue 15): ``sweep``, ``batch``, the Monte Carlo of ``check --uncertainty`` and
``report`` show a bar on a terminal; with ``--json``, or when stderr is not a terminal, a
successful run prints nothing to stderr; a time estimate appears only after a few completed
items (design values of :mod:`screen.progress`, no external source). The example cases are
invented demo data, used here only to run the commands.
"""

from __future__ import annotations

import io
import json
import os
import subprocess
import sys

import pytest
from click.testing import CliRunner

from screen import progress as progress_module
from screen.progress import ETA_AFTER_ITEMS, ProgressBar

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CASES = os.path.join(ROOT, "cases")


class FakeTerminal(io.StringIO):
    def isatty(self):
        return True


def test_bar_is_silent_when_not_a_terminal():
    stream = io.StringIO()
    with ProgressBar(10, "Sweep", stream=stream) as bar:
        for _ in range(10):
            bar.advance()
    assert stream.getvalue() == ""


def test_bar_is_silent_when_disabled_even_on_a_terminal():
    stream = FakeTerminal()
    with ProgressBar(10, "Sweep", stream=stream, enabled=False) as bar:
        bar.advance(10)
    assert stream.getvalue() == ""


def test_bar_draws_on_a_terminal_and_erases_itself(monkeypatch):
    monkeypatch.delenv("TERM", raising=False)
    stream = FakeTerminal()
    with ProgressBar(4, "Sweep", stream=stream, unit="points") as bar:
        bar.advance()
        bar.advance(3)
    text = stream.getvalue()
    assert "Sweep [" in text and "4/4 points" in text
    assert text.endswith("\r")  # the last write blanks the line for the output that follows
    assert text.rsplit("\r", 2)[-2].strip() == ""


def test_time_estimate_only_after_a_few_items(monkeypatch):
    clock = [100.0]
    monkeypatch.setattr(progress_module.time, "monotonic", lambda: clock[0])
    bar = ProgressBar(100, "Screening", stream=io.StringIO())
    # The first item takes long (start-up): it must not set the pace of the estimate.
    clock[0] += 60.0
    bar.update(1)
    for done in range(2, ETA_AFTER_ITEMS):
        clock[0] += 0.5
        bar.update(done)
        assert bar.eta_seconds() is None and "left" not in bar.line()
    clock[0] += 0.5
    bar.update(ETA_AFTER_ITEMS)
    eta = bar.eta_seconds()
    # Pace after the first item: (ETA_AFTER_ITEMS - 1) items in 0.5 s each.
    assert eta == pytest.approx((100 - ETA_AFTER_ITEMS) * 0.5, rel=1e-9)
    assert "left" in bar.line()


def test_bar_as_progress_callback_counts_done_items():
    bar = ProgressBar(5, "Screening", stream=io.StringIO())
    bar(3, 5, "a.toml")
    assert bar.done == 3
    bar(5, 5)
    assert bar.done == 5 and bar.eta_seconds() is None


def test_batch_json_shows_no_bar_even_on_a_terminal(monkeypatch, tmp_path):
    """--json keeps stderr quiet on a terminal; without it the bar is drawn there."""
    from screen.cli import main

    monkeypatch.setattr(progress_module, "is_terminal", lambda stream: True)
    case = os.path.join(CASES, "esterification_batch.toml")
    runner = CliRunner()
    quiet = runner.invoke(main, ["batch", case, "--workers", "1", "--json"])
    assert quiet.exit_code == 0, quiet.output
    assert quiet.stderr == ""
    shown = runner.invoke(main, ["batch", case, "--workers", "1"])
    assert shown.exit_code == 0
    assert "Screening [" in shown.stderr


def test_sweep_reports_progress_per_point():
    from screen.io.case import load_case
    from screen.runs.sweep import parse_vary, run_sweep

    case = load_case(os.path.join(CASES, "esterification_batch.toml"))
    variation = parse_vary("process.temperature=40 degC:60 degC:4", case)
    seen = []
    rows, _ = run_sweep(case, [variation], progress=lambda done, total: seen.append((done, total)))
    assert seen == [(1, 4), (2, 4), (3, 4), (4, 4)]
    assert len(rows) == 4


DRIVER = r"""
import json, sys
from screen.cli.main import main
codes = []
for args in json.loads(sys.argv[1]):
    try:
        main(args, prog_name="runaway-screen")
    except SystemExit as exc:
        codes.append(exc.code or 0)
    else:
        codes.append(0)
print(json.dumps(codes))
"""


def test_every_command_piped_prints_nothing_to_stderr(tmp_path):
    """One real process whose stderr is a pipe runs every command successfully."""
    case = os.path.join(CASES, "esterification_batch.toml")
    uncertain = os.path.join(CASES, "esterification_uncertain.toml")
    other = os.path.join(CASES, "grignard_semibatch.toml")
    peaks = os.path.join(CASES, "dsc", "hf417_residue_peaks.csv")
    portfolio = tmp_path / "portfolio"
    portfolio.mkdir()
    for name in ("esterification_batch.toml", "grignard_semibatch.toml"):
        (portfolio / name).write_bytes(open(os.path.join(CASES, name), "rb").read())
    commands = [
        ["check", case],
        ["check", case, "--json"],
        ["check", uncertain, "--uncertainty", "200"],
        ["check", uncertain, "--uncertainty", "200", "--json"],
        ["report", other, "-o", str(tmp_path / "a.pdf")],
        ["compare", case, other],
        ["compare", case, other, "--json"],
        ["sweep", case, "--vary", "process.temperature=40 degC:60 degC:3"],
        ["sweep", case, "--vary", "process.temperature=40 degC:60 degC:3", "--json"],
        ["kinetics", "--peaks", peaks, "--png-dir", str(tmp_path / "png")],
        ["kinetics", "--peaks", peaks, "--json"],
        ["heat-flow", os.path.join(CASES, "calorimetry", "hf330_heat_flow_semibatch.csv"),
         "--initial-mass", "1.2 kg", "--specific-heat", "1.9 kJ/(kg K)", "--png-dir",
         str(tmp_path / "png-heat-flow")],
        ["kinetics", "--adiabatic", os.path.join(CASES, "calorimetry", "hf233_adiabatic_run.csv"),
         "--phi", "1.75", "--specific-heat", "1.9 J/(g K)", "--json"],
        ["batch", str(portfolio), "--workers", "2"],
        ["batch", str(portfolio), "--workers", "1", "--json", "--csv",
         str(tmp_path / "p.csv")],
    ]
    env = dict(os.environ, MPLBACKEND="Agg")
    env.pop("RUNAWAY_SCREEN_DEBUG", None)
    completed = subprocess.run([sys.executable, "-c", DRIVER, json.dumps(commands)],
                               capture_output=True, text=True, cwd=str(tmp_path), env=env,
                               timeout=600)
    assert completed.returncode == 0, completed.stderr
    codes = json.loads(completed.stdout.strip().splitlines()[-1])
    assert codes == [0] * len(commands), list(zip(codes, commands))
    assert completed.stderr == ""
