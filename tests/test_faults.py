"""Nothing lost under faults (issue 14): full disks, crashed workers, signals, racing writers.

Each test names the finding of issue 14 it covers (F1 ... F14). Signals, worker kills and FIFOs
use real processes; a full disk is a file-size limit set with ``resource.setrlimit`` in the
child (``preexec_fn``) or ``/dev/full``. The rules checked (exit statuses, one stderr line, no
lost or half-written output) are the tool's own contract (design) and the POSIX conventions
(exit status 128 + signal number, IEEE Std 1003.1-2017, Shell and Utilities, 2.8.2); no check
value comes from the invented demo cases.
"""

from __future__ import annotations

import json
import multiprocessing
import os
import pathlib
import resource
import shutil
import signal
import subprocess
import sys
import time

import pytest
from click.testing import CliRunner

from screen.cli import main

ROOT = pathlib.Path(__file__).parent.parent
CASES = ROOT / "cases"
CASE = CASES / "esterification_batch.toml"
PEAKS = ROOT / "tests" / "bad_inputs" / "peaks_with_energy.csv"

needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs (POSIX)")
needs_linux = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="Linux only")


def _env(**extra):
    env = dict(os.environ)
    env.pop("RUNAWAY_SCREEN_DEBUG", None)
    env.update({k: str(v) for k, v in extra.items()})
    return env


def _cli(*args):
    return [sys.executable, "-m", "screen", *[str(a) for a in args]]


def _run(args, timeout=120, **kwargs):
    kwargs.setdefault("env", _env())
    kwargs.setdefault("capture_output", True)
    return subprocess.run(_cli(*args), timeout=timeout, text=True, **kwargs)


def _one_line(stderr: str) -> str:
    lines = [line for line in stderr.splitlines() if line.strip()]
    assert len(lines) == 1, stderr
    assert lines[0].startswith("error: "), stderr
    return lines[0]


def _file_size_limit(size_bytes):
    def limit():
        resource.setrlimit(resource.RLIMIT_FSIZE, (size_bytes, size_bytes))
    return limit


def _portfolio(folder, names):
    folder.mkdir(parents=True, exist_ok=True)
    for name in names:
        shutil.copy(CASE, folder / name)
    return folder


def _alive(pid: int) -> bool:
    try:
        with open(f"/proc/{pid}/stat", encoding="utf-8") as handle:
            return handle.read().split(") ")[-1][0] != "Z"  # a zombie is gone for good
    except FileNotFoundError:
        return False


# --- F1: stdout on a full disk or over a file-size limit --------------------------------------


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_f1_stdout_on_dev_full_is_bad_output_not_a_bug():
    with open("/dev/full", "w") as full:
        done = _run(["check", CASE, "--json"], stdout=full, stderr=subprocess.PIPE,
                    capture_output=False)
    assert done.returncode == 2
    line = _one_line(done.stderr)
    assert "standard output" in line and "internal error" not in line


def test_f1_stdout_over_a_file_size_limit_exits_2(tmp_path):
    target = tmp_path / "out.json"
    with open(target, "w") as stream:
        done = _run(["check", CASE, "--json"], stdout=stream, stderr=subprocess.PIPE,
                    capture_output=False, preexec_fn=_file_size_limit(2048))
    assert done.returncode == 2, done.stderr
    assert "standard output" in _one_line(done.stderr)
    assert target.stat().st_size <= 2048


def test_f1_pdf_over_a_file_size_limit_leaves_nothing(tmp_path):
    done = _run(["check", CASE, "--pdf", tmp_path / "out.pdf"],
                preexec_fn=_file_size_limit(20_000))
    assert done.returncode == 2, done.stderr
    assert "cannot write" in _one_line(done.stderr)
    assert os.listdir(tmp_path) == []


# --- F2: batch PDF names never collide ---------------------------------------------------------


def test_f2_batch_pdf_names_are_unique_and_hold_their_own_case(tmp_path):
    pypdf = pytest.importorskip("pypdf")
    titles = {}
    for folder, name, title in (("d1", "a.toml", "First case"), ("d2", "a.toml", "Second case"),
                                ("d3", "a-2.toml", "Third case")):
        (tmp_path / folder).mkdir()
        text = CASE.read_text(encoding="utf-8")
        start = text.index("title")
        end = text.index("\n", start)
        (tmp_path / folder / name).write_text(text[:start] + f'title = "{title}"' + text[end:],
                                              encoding="utf-8")
        titles[str(tmp_path / folder / name)] = title
    out = tmp_path / "P"
    out.mkdir()
    (out / "a-2.pdf").write_bytes(b"old")  # a name the old de-duplication would have used
    done = CliRunner().invoke(main, ["batch", *titles, "--pdf-dir", str(out), "--force",
                                     "--json", "--workers", "1"])
    assert done.exit_code == 0, done.output
    rows = json.loads(done.stdout)["rows"]
    pdfs = {row["file"]: row["pdf"] for row in rows}
    assert len(set(pdfs.values())) == 3
    for path, pdf in pdfs.items():
        text = "".join(page.extract_text() for page in pypdf.PdfReader(pdf).pages[:1])
        assert titles[path] in text
    assert sorted(os.path.basename(p) for p in pdfs.values()) == [
        "d1__a.pdf", "d2__a.pdf", "d3__a-2.pdf"]


def test_f2_pathological_names_still_unique(tmp_path):
    from screen.runs.portfolio import _pdf_names

    files = [tmp_path / "d1" / "a.toml", tmp_path / "d1__a.toml", tmp_path / "d1" / "a.txt",
             tmp_path / "A.toml", tmp_path / "a.toml"]
    names = _pdf_names([str(f) for f in files], tmp_path / "out")
    assert len({n.casefold() for n in names}) == len(names)
    same_folder = _pdf_names([str(tmp_path / "x.toml"), str(tmp_path / "y.toml")], tmp_path)
    assert [os.path.basename(n) for n in same_folder] == ["x.pdf", "y.pdf"]


# --- F3: an output is never one of the inputs ---------------------------------------------------


@pytest.mark.parametrize("command", [
    ["check", "{case}", "--pdf", "{case}", "--force"],
    ["check", "{case}", "--pdf", "{link}", "--force"],
    ["report", "{case}", "-o", "{case}", "--force"],
    ["batch", "{folder}", "--csv", "{case}", "--force"],
    ["sweep", "{case}", "--vary", "process.temperature=20 degC:30 degC:2", "--csv", "{case}",
     "--force"],
    ["kinetics", "--peaks", "{peaks}", "-o", "{peaks}", "--force"],
])
def test_f3_output_onto_an_input_is_refused_even_with_force(tmp_path, command):
    folder = tmp_path / "cases"
    case = _portfolio(folder, ["x.toml"]) / "x.toml"
    peaks = tmp_path / "peaks.csv"
    shutil.copy(PEAKS, peaks)
    link = tmp_path / "link.pdf"
    link.symlink_to(case)
    before = case.read_bytes(), peaks.read_bytes()
    args = [part.format(case=case, link=link, folder=folder, peaks=peaks) for part in command]
    done = CliRunner().invoke(main, args)
    assert done.exit_code == 2, done.output
    assert "is also an input" in _one_line(done.stderr)
    assert (case.read_bytes(), peaks.read_bytes()) == before


def test_f3_batch_pdf_never_replaces_a_case(tmp_path):
    case = _portfolio(tmp_path, ["x.toml"]) / "x.toml"
    disguised = tmp_path / "y.pdf"
    shutil.copy(case, disguised)  # a case file named *.pdf, its PDF would be itself
    before = disguised.read_bytes()
    done = CliRunner().invoke(main, ["batch", str(disguised), "--pdf-dir", str(tmp_path),
                                     "--force", "--json", "--workers", "1"])
    assert done.exit_code == 1
    row = json.loads(done.stdout)["rows"][0]
    assert "is also an input" in row["error"]
    assert disguised.read_bytes() == before


# --- F4: a killed worker costs at most its case, which is retried once ---------------------


def test_f4_killed_worker_costs_only_its_case_and_is_named(tmp_path, monkeypatch):
    from screen.runs.portfolio import screen_portfolio

    folder = _portfolio(tmp_path, ["a.toml", "b_crash.toml", "c.toml", "d.toml", "e.toml"])
    monkeypatch.setenv("RUNAWAY_SCREEN_TEST_CRASH_CASE", "b_crash")
    frame = screen_portfolio([folder], workers=2, case_timeout=60)
    errors = frame[frame["error"].notna()]
    assert list(errors["file"]) == [str(folder / "b_crash.toml")]
    assert "worker process died (killed by SIGKILL)" in errors["error"].iloc[0]
    assert "also when retried" in errors["error"].iloc[0]
    good = frame[frame["error"].isna()]
    assert good["file"].nunique() == 4


def test_f4_killed_worker_is_retried_once(tmp_path, monkeypatch):
    from screen.runs.portfolio import screen_portfolio

    folder = _portfolio(tmp_path / "cases", ["a.toml", "b_crash.toml", "c.toml"])
    monkeypatch.setenv("RUNAWAY_SCREEN_TEST_CRASH_CASE", "b_crash")
    monkeypatch.setenv("RUNAWAY_SCREEN_TEST_CRASH_ONCE", str(tmp_path / "crashed-once"))
    frame = screen_portfolio([folder], workers=2, case_timeout=60)
    assert (tmp_path / "crashed-once").exists()  # the worker did die once
    assert frame["error"].isna().all()
    reference = screen_portfolio([folder / "a.toml"], workers=1)
    assert frame["mtsr_degC"].iloc[0] == pytest.approx(reference["mtsr_degC"].iloc[0],
                                                       rel=1e-12)


# --- F5, F12: signals stop the workers with the parent; own exit status; partial CSV ---------


def _start_hanging_batch(tmp_path, extra=(), hang="hang", workers=2, names=None):
    folder = _portfolio(tmp_path / "cases", names or ["a_hang.toml", "b_hang.toml"])
    pids = tmp_path / "pids"
    pids.mkdir()
    process = subprocess.Popen(
        _cli("batch", folder, "--workers", workers, *extra), stdout=subprocess.PIPE,
        stderr=subprocess.PIPE, text=True,
        env=_env(RUNAWAY_SCREEN_TEST_HANG_CASE=hang, RUNAWAY_SCREEN_TEST_PID_DIR=pids))
    return process, pids


def _wait_for(condition, seconds=60.0):
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if condition():
            return
        time.sleep(0.05)
    raise AssertionError("timed out waiting")


@needs_linux
@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGHUP, signal.SIGINT])
def test_f5_signal_to_batch_parent_leaves_no_orphan(tmp_path, signum):
    process, pids = _start_hanging_batch(tmp_path)
    try:
        _wait_for(lambda: len(os.listdir(pids)) == 2)
        workers = [int(name) for name in os.listdir(pids)]
        assert all(_alive(pid) for pid in workers)
        process.send_signal(signum)
        _, stderr = process.communicate(timeout=30)
    finally:
        if process.poll() is None:
            process.kill()
    assert process.returncode == 128 + signum
    assert signal.Signals(signum).name in _one_line(stderr)
    _wait_for(lambda: not any(_alive(pid) for pid in workers), seconds=10)


@needs_linux
def test_f12_ctrl_c_exits_130_with_a_partial_csv(tmp_path):
    csv_path = tmp_path / "table.csv"
    process, pids = _start_hanging_batch(tmp_path, extra=["--csv", csv_path], workers=1,
                                         names=["a.toml", "b.toml", "z_hang.toml"])
    try:
        def hanging():
            files = os.listdir(pids)
            return files and "z_hang" in (pids / files[0]).read_text(encoding="utf-8")
        _wait_for(hanging)
        process.send_signal(signal.SIGINT)
        stdout, stderr = process.communicate(timeout=30)
    finally:
        if process.poll() is None:
            process.kill()
    assert process.returncode == 130
    assert "SIGINT" in _one_line(stderr)
    assert "Aborted" not in stderr
    lines = csv_path.read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("# PARTIAL") and "2 of 3" in lines[0]
    import pandas as pd

    table = pd.read_csv(csv_path, comment="#")
    assert sorted(os.path.basename(f) for f in table["file"].unique()) == ["a.toml", "b.toml"]
    assert not [name for name in os.listdir(tmp_path) if name.endswith(".tmp")]


# --- F6: FIFOs and other non-regular files; a per-case time limit ----------------------------


@needs_fifo
@pytest.mark.parametrize("command", [["check", "{fifo}"], ["kinetics", "--peaks", "{fifo}"],
                                     ["batch", "{fifo}"]])
def test_f6_fifo_is_refused_at_once(tmp_path, command):
    fifo = tmp_path / "case.toml"
    os.mkfifo(fifo)
    started = time.monotonic()
    done = _run([part.format(fifo=fifo) for part in command], timeout=60)
    assert done.returncode == 2
    assert "FIFO" in _one_line(done.stderr)
    assert time.monotonic() - started < 30


@needs_fifo
def test_f6_fifo_inside_a_batch_folder_is_a_row_error(tmp_path):
    folder = _portfolio(tmp_path, ["a.toml"])
    os.mkfifo(folder / "b.toml")
    done = _run(["batch", folder, "--recursive", "--json", "--workers", "1"], timeout=60)
    assert done.returncode == 1
    rows = {os.path.basename(r["file"]): r for r in json.loads(done.stdout)["rows"]}
    assert "FIFO" in rows["b.toml"]["error"] and rows["a.toml"]["error"] is None


def test_f6_case_timeout_stops_one_case_and_the_rest_go_on(tmp_path):
    folder = _portfolio(tmp_path / "cases", ["a.toml", "b_hang.toml", "c.toml"])
    started = time.monotonic()
    done = _run(["batch", folder, "--case-timeout", "2", "--json", "--workers", "2"],
                env=_env(RUNAWAY_SCREEN_TEST_HANG_CASE="b_hang"), timeout=120)
    assert done.returncode == 1, done.stderr
    rows = {os.path.basename(r["file"]): r for r in json.loads(done.stdout)["rows"]}
    assert "--case-timeout" in rows["b_hang.toml"]["error"]
    assert rows["a.toml"]["error"] is None and rows["c.toml"]["error"] is None
    assert time.monotonic() - started < 60


# --- F7: two writers racing on one target -------------------------------------------------------


def _racing_writer(path, payload, barrier, results):
    from screen.errors import OutputError
    from screen.io.fileio import write_atomic

    barrier.wait()
    try:
        write_atomic(path, payload, force=False)
        results.put(("ok", payload))
    except OutputError as exc:
        results.put(("refused", str(exc)))


def test_f7_two_racing_writers_never_both_succeed(tmp_path):
    context = multiprocessing.get_context("fork")
    for trial in range(20):
        target = tmp_path / f"out-{trial}.csv"
        barrier, results = context.Barrier(2), context.Queue()
        payloads = [b"A" * 200_000, b"B" * 200_000]
        writers = [context.Process(target=_racing_writer, args=(target, p, barrier, results))
                   for p in payloads]
        for writer in writers:
            writer.start()
        outcomes = [results.get(timeout=30) for _ in writers]
        for writer in writers:
            writer.join(10)
        winners = [payload for kind, payload in outcomes if kind == "ok"]
        assert len(winners) == 1, outcomes
        assert target.read_bytes() == winners[0]
        assert any(kind == "refused" and "exists" in text for kind, text in outcomes)
    assert not [name for name in os.listdir(tmp_path) if name.endswith(".tmp")]


# --- F8: SIGTERM while the PDF is written leaves no temporary file -----------------------------


@needs_linux
@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGINT])
def test_f8_signal_while_writing_leaves_no_temporary_file(tmp_path, signum):
    marker = tmp_path / "writing"
    out = tmp_path / "out"
    out.mkdir()
    script = (
        "import os, sys, time\n"
        "real_fsync = os.fsync\n"
        "def slow_fsync(fd):\n"
        f"    open({str(marker)!r}, 'w').close()\n"
        "    time.sleep(60)\n"
        "os.fsync = slow_fsync\n"
        "from screen.cli.main import main\n"
        f"sys.argv = ['runaway-screen', 'report', {str(CASE)!r}, '-o', "
        f"{str(out / 'r.pdf')!r}]\n"
        "main()\n")
    process = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, text=True, env=_env())
    try:
        _wait_for(marker.exists)
        assert [n for n in os.listdir(out) if n.endswith(".tmp")]  # caught mid-write
        process.send_signal(signum)
        _, stderr = process.communicate(timeout=30)
    finally:
        if process.poll() is None:
            process.kill()
    assert process.returncode == 128 + signum
    _one_line(stderr)
    assert os.listdir(out) == []


# --- F13: one stderr line for every error; progress labels only on a terminal -----------------


def test_f13_error_after_the_progress_phase_is_one_line(tmp_path):
    folder = _portfolio(tmp_path / "cases", ["a.toml", "b.toml"])
    done = _run(["batch", folder, "--csv", tmp_path / "t.csv", "--workers", "1"],
                preexec_fn=_file_size_limit(300))
    assert done.returncode == 2
    assert "cannot write" in _one_line(done.stderr)
    assert not (tmp_path / "t.csv").exists()


def test_f13_no_progress_label_when_stderr_is_not_a_terminal():
    done = _run(["check", ROOT / "cases" / "esterification_uncertain.toml", "--uncertainty",
                 "200"])
    assert done.returncode == 0, done.stderr
    assert done.stderr.strip() == ""


def test_f13_read_only_pdf_dir_names_the_fix(tmp_path, monkeypatch):
    # Tests run as root, where chmod cannot make a folder unwritable: os.access is stubbed.
    real_access = os.access
    folder = _portfolio(tmp_path / "cases", ["a.toml"])
    out = tmp_path / "out"
    out.mkdir()
    monkeypatch.setattr(os, "access", lambda path, mode, **kw: False
                        if os.fspath(path) == str(out) and mode & os.W_OK
                        else real_access(path, mode, **kw))
    done = CliRunner().invoke(main, ["batch", str(folder), "--pdf-dir", str(out)])
    assert done.exit_code == 2
    line = _one_line(done.stderr)
    assert "--pdf-dir" in line and "chmod u+w" in line
