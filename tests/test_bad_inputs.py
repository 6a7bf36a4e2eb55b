"""The catalogue of bad inputs (tests/bad_inputs/README.md) through every command.

For each row of the catalogue's first table: exit status 2, exactly one line on stderr that names
the file (or option) and the key path, no traceback, nothing on stdout, no output file left behind.
Rows run through click's CliRunner; a handful also through a real subprocess, where stray Python
warnings or tracebacks would show. The second table (contradictory but screenable inputs) must give
the most critical reading or an explicit "cannot conclude". Huge files, endless devices and
existing outputs are generated at test time.

These are rules of this project (fail loudly, fail closed; design), not physics: no check value
here comes from the invented test data.
"""

from __future__ import annotations

import json
import os
import pathlib
import shlex
import subprocess
import sys

import pytest
from click.testing import CliRunner

from screen.cli import main

ROOT = pathlib.Path(__file__).parent.parent
CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs"
README = CATALOGUE / "README.md"


def _tables() -> dict[str, list[list[str]]]:
    """Rows of every table in README.md, keyed by the heading above the table."""
    tables: dict[str, list[list[str]]] = {}
    heading = None
    for line in README.read_text(encoding="utf-8").splitlines():
        if line.startswith("## "):
            heading = line[3:].strip()
            tables[heading] = []
        elif heading and line.startswith("| ") and not line.startswith("|---"):
            cells = [c.strip().replace("\\|", "|") for c in
                     line.strip().strip("|").replace("\\|", "\x00").split(" | ")]
            cells = [c.replace("\x00", "|").strip() for c in cells]
            tables[heading].append([c[1:-1] if c.startswith("`") and c.endswith("`") else c
                                    for c in cells])
    return {k: v[1:] for k, v in tables.items()}  # drop the header row


TABLES = _tables()
ERROR_ROWS = next(v for k, v in TABLES.items() if k.startswith("Exit status 2"))
NOT_ERROR_ROWS = next(v for k, v in TABLES.items() if k.startswith("Not errors"))


def _substitute(text: str, file: pathlib.Path, tmp: pathlib.Path) -> str:
    return (text.replace("FILE", str(file)).replace("TMP", str(tmp))
            .replace("CASE", str(CATALOGUE / "valid_base.toml")))


def _snapshot(*folders):
    return {p for folder in folders for p in pathlib.Path(folder).rglob("*")}


def _one_error_line(stderr: str) -> str:
    lines = [line for line in stderr.splitlines() if line.strip()]
    assert len(lines) == 1, stderr
    assert lines[0].startswith("error: "), stderr
    assert "Traceback" not in stderr
    return lines[0]


def test_catalogue_is_complete():
    listed = {row[0] for row in ERROR_ROWS + NOT_ERROR_ROWS}
    stored = {p.name for p in CATALOGUE.iterdir() if p.name != "README.md"}
    assert stored <= listed | {"valid_base.toml", "peaks_with_energy.csv"}
    assert listed <= stored
    commands = {shlex.split(row[1])[0] for row in ERROR_ROWS}
    assert {"check", "report", "compare", "sweep", "kinetics", "batch"} <= commands
    sections = {"mass", "process", "synthesis", "decomposition", "vessel", "synthesis_kinetics",
                "solvent", "scenarios", "uncertainty", "case"}
    named = " ".join(row[3] for row in ERROR_ROWS)
    assert all(section in named for section in sections)
    assert len(ERROR_ROWS) >= 100


@pytest.mark.parametrize("row", ERROR_ROWS, ids=[f"{r[0]}:{r[1].split()[0]}:{i}"
                                                 for i, r in enumerate(ERROR_ROWS)])
def test_bad_input_exits_2_with_one_line(row, tmp_path):
    name, command, _what, expected = row
    file = CATALOGUE / name
    work = tmp_path / "work"
    work.mkdir()
    args = [_substitute(arg, file, work) for arg in shlex.split(command)]
    before = _snapshot(CATALOGUE, work)
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 2, result.output
    line = _one_error_line(result.stderr)
    assert result.stdout == ""
    fragment = _substitute(expected, file, work)
    assert fragment in line
    if ("FILE" in command and "FILE" not in expected and "TMP" not in expected
            and not expected.startswith("--")):
        assert str(file) in line  # the message names the file it is about
    assert _snapshot(CATALOGUE, work) == before  # no output, no partial or temporary file


def _check_json(path):
    result = CliRunner().invoke(main, ["check", str(path), "--json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_td24_below_process_temperature_is_class_5():
    # The class table puts TD24 <= T_p outside the scheme; it must read as the most critical
    # class (design, docs/fail-closed.md), with the reason in the warnings.
    data = _check_json(CATALOGUE / "td24_below_process_temperature.toml")
    r = data["results"]
    assert r["td24_degC"] < r["process_temperature_degC"]
    assert r["criticality_class"] == 5
    assert any("at or below the process temperature" in w for w in data["warnings"])


def test_onset_only_cannot_conclude():
    data = _check_json(CATALOGUE / "onset_only.toml")
    r = data["results"]
    assert r["criticality_class"] is None
    assert r["verdict_status"] == "cannot-conclude"
    assert r["criticality_class_computed"] < 4
    assert "CANNOT CONCLUDE" in r["verdict"]
    assert [v["stability"] for v in r["vessels"]] == ["cannot-conclude"]


def test_onset_only_with_low_onset_keeps_the_high_class():
    data = _check_json(CATALOGUE / "onset_only_low_onset.toml")
    r = data["results"]
    assert r["criticality_class"] >= 4
    assert r["verdict_status"] == "crude-estimate"


def test_not_error_table_lists_the_tested_files():
    assert {row[0] for row in NOT_ERROR_ROWS} == {
        "td24_below_process_temperature.toml", "onset_only.toml", "onset_only_low_onset.toml"}


# --------------------------------------------------------------------------------------------
# Generated at test time
# --------------------------------------------------------------------------------------------


def _run_error(args):
    result = CliRunner().invoke(main, [str(a) for a in args])
    assert result.exit_code == 2, result.output
    assert result.stdout == ""
    return _one_error_line(result.stderr)


def test_huge_case_file(tmp_path):
    path = tmp_path / "huge.toml"
    base = (CATALOGUE / "valid_base.toml").read_text(encoding="utf-8")
    path.write_text(base + ("# padding line of a huge file\n" * 40_000), encoding="utf-8")
    assert path.stat().st_size > 1_000_000
    line = _run_error(["check", path])
    assert str(path) in line and "1000000 bytes" in line


def test_huge_csv_file(tmp_path):
    path = tmp_path / "huge.csv"
    with open(path, "wb") as handle:
        handle.write(b"run,heating_rate_K_per_min,peak_temperature_degC\n")
        handle.write(b"A,2,238.0\n" * 2_100_000)
    assert path.stat().st_size > 20_000_000
    line = _run_error(["kinetics", "--peaks", path])
    assert str(path) in line and "larger than 20 MB" in line


def test_large_csv_of_text(tmp_path):
    path = tmp_path / "text.csv"
    path.write_text("lorem ipsum dolor sit amet\n" * 60_000, encoding="utf-8")
    assert path.stat().st_size > 1_000_000
    line = _run_error(["kinetics", "--peaks", path])
    assert str(path) in line and "column" in line


def test_huge_earlier_result(tmp_path):
    path = tmp_path / "huge.json"
    path.write_text('{"padding": "' + "x" * 21_000_000 + '"}', encoding="utf-8")
    line = _run_error(["compare", CATALOGUE / "valid_base.toml", path])
    assert str(path) in line and "bytes" in line


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="needs /dev/zero")
def test_endless_device_is_refused(tmp_path):
    # /dev/zero reports size 0 and never ends: only regular files are read (issue 14).
    assert "a device, not a regular file" in _run_error(["check", "/dev/zero"])
    assert "a device, not a regular file" in _run_error(["kinetics", "--peaks", "/dev/zero"])
    link = tmp_path / "zero.json"
    link.symlink_to("/dev/zero")
    assert "a device" in _run_error(["compare", CATALOGUE / "valid_base.toml", link])


def test_existing_outputs_are_not_overwritten_without_force(tmp_path):
    case = CATALOGUE / "valid_base.toml"
    peaks = CATALOGUE / "peaks_with_energy.csv"
    for args in (["sweep", case, "--vary", "process.temperature=50 degC:60 degC:3", "--csv"],
                 ["kinetics", "--peaks", peaks, "-o"],
                 ["report", case, "-o"]):
        target = tmp_path / f"existing-{args[0]}.out"
        target.write_text("precious\n", encoding="utf-8")
        line = _run_error(args + [target])
        assert "--force" in line and str(target) in line
        assert target.read_text(encoding="utf-8") == "precious\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "existing-kinetics.out", "existing-report.out", "existing-sweep.out"]


def test_sweep_csv_is_written_with_force(tmp_path):
    target = tmp_path / "sweep.csv"
    target.write_text("old\n", encoding="utf-8")
    result = CliRunner().invoke(main, ["sweep", str(CATALOGUE / "valid_base.toml"), "--vary",
                                       "process.temperature=50 degC:60 degC:3", "--csv",
                                       str(target), "--force"])
    assert result.exit_code == 0, result.output
    text = target.read_text(encoding="utf-8")
    assert text.startswith("# ")  # the cautions as a comment line
    assert text.count("\n") == 5  # cautions, header and three rows
    assert [p.name for p in tmp_path.iterdir()] == ["sweep.csv"]  # no temporary file left


def test_batch_over_the_catalogue_reports_rows_never_crashes(tmp_path):
    # batch screens every case file; a bad case gives a row with its error (exit status 1 by the
    # batch contract), never an internal error (status 3) or a traceback.
    folder = tmp_path / "cases"
    folder.mkdir()
    for path in sorted(CATALOGUE.glob("*.toml")):
        (folder / path.name).write_bytes(path.read_bytes())
    result = CliRunner().invoke(main, ["batch", str(folder), "--workers", "1", "--json"])
    assert result.exit_code == 1, result.output
    assert "Traceback" not in result.output
    data = json.loads(result.stdout)
    by_file = {}
    for row in data["rows"]:
        by_file.setdefault(pathlib.Path(row["file"]).name, []).append(row)
    bad_names = {row[0] for row in ERROR_ROWS if row[0].endswith(".toml")
                 and shlex.split(row[1]) == ["check", "FILE"]}
    for name in bad_names:
        assert all(row["error"] for row in by_file[name]), name
    for name in ("valid_base.toml", "td24_below_process_temperature.toml"):
        assert not any(row["error"] for row in by_file[name]), name


# --------------------------------------------------------------------------------------------
# A handful through a real subprocess (stderr exactly as a user sees it)
# --------------------------------------------------------------------------------------------

SUBPROCESS_ROWS = ["toml_syntax_unquoted_unit.toml", "binary.toml", "wrong_dimension.toml",
                   "exp_overflow_huge_pre_exponential_factor.toml", "peaks_exp_overflow.csv",
                   "result_nan.json", "thermogram_nan.csv"]


@pytest.mark.parametrize("name", SUBPROCESS_ROWS)
def test_bad_input_through_real_subprocess(name, tmp_path):
    row = next(r for r in ERROR_ROWS if r[0] == name)
    file = CATALOGUE / name
    args = [_substitute(a, file, tmp_path) for a in shlex.split(row[1])]
    env = dict(os.environ)
    env.pop("RUNAWAY_SCREEN_DEBUG", None)
    proc = subprocess.run([sys.executable, "-m", "screen", *args], check=False,
                          capture_output=True, text=True, timeout=120, cwd=ROOT, env=env)
    assert proc.returncode == 2, proc.stderr
    assert proc.stdout == ""
    assert proc.stderr.endswith("\n") and proc.stderr.count("\n") == 1, proc.stderr
    line = _one_error_line(proc.stderr)
    assert str(file) in line and _substitute(row[3], file, tmp_path) in line


def test_usage_error_through_real_subprocess_is_one_line(tmp_path):
    proc = subprocess.run([sys.executable, "-m", "screen", "check", str(tmp_path)],
                          check=False, capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert proc.returncode == 2
    assert proc.stdout == "" and proc.stderr.count("\n") == 1
    assert str(tmp_path) in proc.stderr and "--help" in proc.stderr
