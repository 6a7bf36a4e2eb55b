"""Tests of screen.runs.portfolio and the ``runaway-screen batch`` command.

Reference for "batch equals single case": the single-case engine as run by ``check``
(screen.cli.run_check). The exit status contract is documented in docs/uncertainty.md
("Screening a portfolio"): 0 all screened, 1 rows with errors (0 with --allow-errors),
2 bad arguments. The example cases are invented demo data and are used only to compare two
paths through the code, never as check values.
"""

from __future__ import annotations

import concurrent.futures
import json
import math
import os
import shutil
import subprocess
import sys

import pandas as pd
import pytest
from click.testing import CliRunner

from screen.cli import main, run_check
from screen.runs.portfolio import COLUMNS, collect_case_files, screen_portfolio

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CASES = ("esterification_batch.toml", "grignard_semibatch.toml", "nitration_semibatch.toml")


@pytest.fixture()
def portfolio(tmp_path):
    """Three example cases and one malformed file in a folder."""
    for name in CASES:
        shutil.copy(os.path.join(ROOT, "cases", name), tmp_path / name)
    (tmp_path / "broken.toml").write_text('[case]\ntitle = "broken"\n[mass]\namount = 5 kg\n',
                                          encoding="utf-8")
    (tmp_path / "notes.txt").write_text("not a case", encoding="utf-8")
    return tmp_path


def _same(a, b):
    if a is None or (isinstance(a, float) and math.isnan(a)):
        return b is None or (isinstance(b, float) and math.isnan(b))
    if isinstance(a, float) or isinstance(b, float):
        return a == pytest.approx(b, rel=1e-12, abs=0.0)
    return a == b


def test_batch_rows_equal_single_case_results(portfolio):
    frame = screen_portfolio([portfolio], workers=2)
    assert list(frame.columns) == list(COLUMNS)
    good = frame[frame["error"].isna()]
    assert set(os.path.basename(f) for f in good["file"]) == set(CASES)
    for name in CASES:
        single = run_check(str(portfolio / name)).results
        rows = frame[frame["file"] == str(portfolio / name)]
        assert len(rows) == max(1, len(single["vessels"]))
        for (_, row), vessel in zip(rows.iterrows(), single["vessels"], strict=True):
            for key in ("criticality_class", "mtsr_degC", "td24_degC", "tmrad_at_mtsr_h",
                        "onset_margin_K", "verdict", "verdict_status"):
                assert _same(row[key], single[key]), key
            assert row["vessel"] == vessel["name"]
            for column, key in (("critical_coolant_temperature_degC",
                                 "critical_coolant_temperature_degC"),
                                ("vessel_stability", "stability"),
                                ("no_return_temperature_degC", "no_return_temperature_degC")):
                assert _same(row[column], vessel[key]), column


def test_malformed_file_is_an_error_row_and_does_not_stop_the_batch(portfolio):
    frame = screen_portfolio([portfolio], workers=1)
    broken = frame[frame["file"].str.endswith("broken.toml")]
    assert len(broken) == 1
    assert "TOML syntax error" in broken["error"].iloc[0]
    assert pd.isna(broken["criticality_class"].iloc[0])
    assert frame["error"].notna().sum() == 1
    assert not frame["file"].str.endswith("notes.txt").any()
    missing = screen_portfolio([portfolio / "esterification_batch.toml",
                                portfolio / "missing.toml"], workers=1)
    assert "file not found" in missing["error"].iloc[-1]


class _ForeignFuture:
    """A future that is not a concurrent.futures.Future (as a dask future is not)."""

    def __init__(self, value):
        self._value = value

    def result(self):
        return self._value


class _ForeignExecutor:
    """Minimal executor with submit() only, evaluating eagerly."""

    def __init__(self):
        self.calls = 0

    def submit(self, function, *args):
        self.calls += 1
        return _ForeignFuture(function(*args))


def test_executor_can_be_swapped(portfolio):
    reference = screen_portfolio([portfolio], workers=1)
    foreign = _ForeignExecutor()
    swapped = screen_portfolio([portfolio], executor=foreign)
    assert foreign.calls == 4
    with concurrent.futures.ThreadPoolExecutor(max_workers=2) as pool:
        threaded = screen_portfolio([portfolio], executor=pool)
    for frame in (swapped, threaded):
        pd.testing.assert_frame_equal(frame, reference)


def test_progress_and_overrides(portfolio):
    seen = []
    frame = screen_portfolio([portfolio / "esterification_batch.toml"], workers=1,
                             overrides=["process.temperature=70 degC"],
                             progress=lambda done, total, path: seen.append((done, total)))
    assert seen == [(1, 1)]
    assert frame["process_temperature_degC"].iloc[0] == pytest.approx(70.0)


def test_collect_case_files(portfolio):
    files = collect_case_files([portfolio, portfolio / "broken.toml"])
    assert [os.path.basename(f) for f in files] == sorted(list(CASES) + ["broken.toml"])


# ---------------------------------------------------------------------------------------------
# Command line: exit status 0 / 1 / 2
# ---------------------------------------------------------------------------------------------

def test_cli_exit_status_with_and_without_allow_errors(portfolio, tmp_path):
    runner = CliRunner()
    csv_path = tmp_path / "table.csv"
    failing = runner.invoke(main, ["batch", str(portfolio), "--workers", "1", "--csv",
                                   str(csv_path)])
    assert failing.exit_code == 1, failing.output
    assert "broken.toml" in failing.output and "TOML syntax error" in failing.output
    assert csv_path.read_text().startswith("# Screening aid only")  # cautions, a comment line
    table = pd.read_csv(csv_path, comment="#")
    assert len(table) == 1 + 1 + 3 + 1  # esterification, grignard, nitration (3 vessels), broken
    allowed = runner.invoke(main, ["batch", str(portfolio), "--workers", "1", "--allow-errors",
                                   "--json"])
    assert allowed.exit_code == 0, allowed.output
    payload = json.loads(allowed.stdout)
    assert payload["rows_with_errors"] == 1 and payload["files"] == 4
    clean = runner.invoke(main, ["batch", str(portfolio / "esterification_batch.toml"),
                                 "--workers", "1"])
    assert clean.exit_code == 0, clean.output


def test_cli_bad_arguments_exit_2(portfolio, tmp_path):
    runner = CliRunner()
    empty = tmp_path / "empty"
    empty.mkdir()
    for args in (["batch", str(tmp_path / "nope.toml")],
                 ["batch", str(empty)],
                 ["batch", str(portfolio), "--workers", "0"]):
        result = runner.invoke(main, args)
        assert result.exit_code == 2, (args, result.output)
    existing = tmp_path / "exists.csv"
    existing.write_text("x", encoding="utf-8")
    result = runner.invoke(main, ["batch", str(portfolio), "--csv", str(existing)])
    assert result.exit_code == 2 and "exists" in result.output


def test_cli_batch_in_a_real_process(portfolio):
    completed = subprocess.run(
        [sys.executable, "-m", "screen", "batch", str(portfolio / "esterification_batch.toml"),
         str(portfolio / "grignard_semibatch.toml"), "--workers", "2", "--json"],
        capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert completed.returncode == 0, completed.stderr
    rows = json.loads(completed.stdout)["rows"]
    assert [r["criticality_class"] for r in rows] == [
        run_check(str(portfolio / name)).results["criticality_class"]
        for name in ("esterification_batch.toml", "grignard_semibatch.toml")]
