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
import math
import multiprocessing
import os
import pathlib
import resource
import shutil
import signal
import subprocess
import sys
import time

import numpy as np
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
    # 8 s: the other cases finish well within it even on a loaded machine.
    done = _run(["batch", folder, "--case-timeout", "8", "--json", "--workers", "3"],
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


# --- F14: CSV files with standard quoting ---------------------------------------------------------


def _demo_thermogram():
    source = CASES / "dsc" / "hf233_bottoms_01Kmin.csv"
    lines = source.read_text(encoding="utf-8").splitlines()
    meta = [line for line in lines if line.startswith("#")]
    rows = [line.split(",") for line in lines if line and not line.startswith("#")][1:]
    return meta, rows


def test_f14_quoted_header_as_written_by_the_csv_module_and_pandas(tmp_path):
    import csv

    import numpy as np
    import pandas as pd

    from screen.io.thermograms import read_thermogram

    meta, rows = _demo_thermogram()
    header = ["Time (min)", "Temperature (°C)", "Heat flow, exo down (mW/mg)"]
    quoted = tmp_path / "quoted.csv"
    with open(quoted, "w", newline="", encoding="utf-8") as stream:
        stream.write("\n".join(meta) + "\n")
        writer = csv.writer(stream, quoting=csv.QUOTE_NONNUMERIC)  # Python's csv module
        writer.writerow(header)
        writer.writerows([[float(x) for x in row] for row in rows])
    by_pandas = tmp_path / "pandas.csv"
    frame = pd.DataFrame([[float(x) for x in row] for row in rows], columns=header)
    by_pandas.write_text("\n".join(meta) + "\n" + frame.to_csv(index=False), encoding="utf-8")
    plain = tmp_path / "plain.csv"  # the same header without the comma, no quotes needed
    plain.write_text("\n".join(meta) + "\nTime (min),Temperature (°C),Heat flow exo down "
                     "(mW/mg)\n" + "\n".join(",".join(row) for row in rows) + "\n",
                     encoding="utf-8")
    reference = read_thermogram(plain)
    for path in (quoted, by_pandas):
        reading = read_thermogram(path)
        np.testing.assert_allclose(reading.heat_flow, reference.heat_flow, rtol=1e-12)
        np.testing.assert_allclose(reading.temperature, reference.temperature, rtol=1e-12)


def test_f14_quoted_run_name_in_a_peak_table(tmp_path):
    from screen.io.thermograms import read_peak_table

    peaks = tmp_path / "peaks.csv"
    peaks.write_text('run,heating_rate_K_per_min,peak_temperature_degC\n'
                     '"HF417, run 1",2,238.0\n"HF417, run 2",4,249.3\n'
                     '"HF417 ""fresh""",8,261.1\n', encoding="utf-8")
    table = read_peak_table(peaks)
    assert list(table.labels) == ["HF417, run 1", "HF417, run 2", 'HF417 "fresh"']
    done = CliRunner().invoke(main, ["kinetics", "--peaks", str(peaks), "--json"])
    assert done.exit_code == 0, done.output


@pytest.mark.parametrize("text", [
    '"Time (min),Temperature (°C),Heat flow (mW)\n0,30,0.1\n1,31,0.2\n2,32,0.3\n',
    'Time (min),Temperature (°C),"Heat flow "x" (mW)"\n0,30,0.1\n1,31,0.2\n2,32,0.3\n',
])
def test_f14_malformed_quoting_is_named(tmp_path, text):
    path = tmp_path / "broken.csv"
    path.write_text(text, encoding="utf-8")
    done = CliRunner().invoke(main, ["kinetics", str(path), "--sample-mass", "2 mg",
                                     "--heating-rate", "1 K/min"])
    assert done.exit_code == 2
    line = _one_line(done.stderr)
    assert "line 1" in line and "quote" in line and "no column header" not in line


# --- F9, F10: long titles and any Unicode in the PDF -------------------------------------------


def _variant(tmp_path, name, title, vessel=None):
    import re

    text = (CASES / "grignard_semibatch.toml").read_text(encoding="utf-8")
    text = re.sub(r'^title = .*$', lambda m: f"title = {json.dumps(title, ensure_ascii=False)}", text, count=1,
                  flags=re.M)
    if vessel is not None:  # the first name of the [vessel] section
        start = text.index("[vessel]")
        text = text[:start] + re.sub(
            r'^name = .*$', lambda m: f"name = {json.dumps(vessel, ensure_ascii=False)}",
            text[start:], count=1, flags=re.M)

    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("title", ["Long title of a step " * 150, "X" * 3000],
                         ids=["words", "one-word"])
def test_f9_long_title_no_layout_error_full_title_kept(tmp_path, title):
    pypdf = pytest.importorskip("pypdf")
    case = _variant(tmp_path, "long.toml", title.strip(), vessel="Vessel " * 60)
    done = CliRunner().invoke(main, ["report", str(case), "-o", str(tmp_path / "r.pdf")])
    assert done.exit_code == 0, done.output
    reader = pypdf.PdfReader(tmp_path / "r.pdf")
    assert reader.metadata.title.endswith(title.strip())
    first = reader.pages[0].extract_text()
    assert "shortened" in first
    furniture = ("Key", "As read", "SI value", "SI unit", "–")  # header, other cells of the row
    kept = []
    for page in reader.pages:  # drop the page header and footer drawn inside the long row
        for line in page.extract_text().splitlines():
            if not ("SCREENING AID ONLY: a qualified" in line or line.endswith("…")
                    or line.startswith("page ") or line in furniture):
                kept.append(line)
    everything = "".join("".join(kept).split())
    assert "".join(title.split()) in everything  # in full in the inputs table


def test_f10_unicode_never_silent_boxes(tmp_path):
    pypdf = pytest.importorskip("pypdf")
    from screen.report.text import _coverage

    title = "格氏反应 グリニャール 🧪 Ölçüm"
    case = _variant(tmp_path, "u.toml", title, vessel="反应釜 R-302")
    done = CliRunner().invoke(main, ["report", str(case), "-o", str(tmp_path / "r.pdf")])
    assert done.exit_code == 0, done.output
    assert "PDF note:" in done.stdout and "[U+683C]" in done.stdout  # the user is told
    reader = pypdf.PdfReader(tmp_path / "r.pdf")
    assert reader.metadata.title.endswith(title)  # the original text is kept
    first = reader.pages[0].extract_text()
    assert "[U+683C]" in first and "[U+1F9EA]" in first and "Ölçüm" in first
    assert "no glyph" in first
    for page in reader.pages:  # every drawn character has a glyph in the fonts
        for char in page.extract_text():
            assert ord(char) < 0x80 or ord(char) in _coverage() or char.isspace(), char


def test_f10_right_to_left_is_shaped_and_ordered():
    # Expected forms: Unicode Standard Annex #9 (visual order of a right-to-left run inside
    # left-to-right text) and the Arabic presentation forms of the Unicode charts (FE70-FEFF):
    # initial MEEM U+FEE3 ... final ALEF U+FE8E.
    from screen.report.text import _visual_order, drawable

    assert _visual_order("R-302 שלב 2 א") == "R-302 א 2 בלש"
    assert _visual_order("abc (אב) d") == "abc (בא) d"
    shaped = drawable("مرحبا")
    pytest.importorskip("arabic_reshaper")
    assert shaped == "\ufe8e\ufe92\ufea3\ufeae\ufee3"


# --- F11: Monte Carlo memory bounded -----------------------------------------------------------


def _uncertain_case():
    from screen.io.case import load_case
    from screen.runs.screening import screen_case

    case = load_case(CASES / "esterification_uncertain.toml")
    return case, screen_case(case, curves=False).results


def test_f11_blocks_merge_exactly(tmp_path):
    # Block mode with a reservoir that keeps every sample: the merged counts, means and standard
    # deviations must equal a one-pass computation over the same samples (numpy mean/std;
    # pairwise merge of Chan, Golub & LeVeque, Am. Stat. 37 (1983) 242-247).
    import dataclasses

    from screen.runs import uncertainty as unc

    case, results = _uncertain_case()
    blocked = unc.run_monte_carlo(case, results, 3000, seed=7, block=700, reservoir=10_000)
    assert blocked.figures["mtsr"].size == 3000  # the reservoir kept every sample
    one_pass = dataclasses.replace(blocked, tally={})  # summarise recomputes from the arrays
    merged, _ = unc.summarise(blocked, case, results)
    direct, _ = unc.summarise(one_pass, case, results)

    def compare(a, b, where="block"):
        if isinstance(a, dict):
            assert a.keys() == b.keys(), where
            for key in a:
                compare(a[key], b[key], f"{where}.{key}")
        elif isinstance(a, list):
            assert len(a) == len(b), where
            for index, (x, y) in enumerate(zip(a, b, strict=True)):
                compare(x, y, f"{where}[{index}]")
        elif isinstance(a, float) and isinstance(b, float):
            assert a == pytest.approx(b, rel=1e-9, abs=1e-12), where
        else:
            assert a == b, where

    compare(merged, direct)


def test_f11_one_block_is_identical_to_one_array():
    from screen.runs import uncertainty as unc

    case, results = _uncertain_case()
    default = unc.run_monte_carlo(case, results, 2000, seed=3)
    large_block = unc.run_monte_carlo(case, results, 2000, seed=3, block=2000)
    for key in ("td24", "mtsr", "criticality_class"):
        np.testing.assert_array_equal(default.figures[key], large_block.figures[key])
    a, _ = unc.summarise(default, case, results)
    b, _ = unc.summarise(large_block, case, results)
    assert a == b


def test_f11_memory_stays_about_constant_in_n():
    import tracemalloc

    from screen.runs import uncertainty as unc

    case, results = _uncertain_case()

    def peak(samples, **options):
        tracemalloc.start()
        try:
            unc.run_monte_carlo(case, results, samples, seed=1, chunk=2000, **options)
            return tracemalloc.get_traced_memory()[1]
        finally:
            tracemalloc.stop()

    small = peak(8_000, block=4_000, reservoir=4_000)
    large = peak(40_000, block=4_000, reservoir=4_000)
    whole = peak(40_000, block=40_000)
    assert large < 1.5 * small  # five times the samples, about the same memory
    assert large < 0.5 * whole


def test_f11_reservoir_percentiles_agree_with_all_samples():
    # Two independent estimates of the median of MTSR: the reservoir of 5,000 out of 20,000
    # samples and all 20,000 samples of another draw. The standard error of a sample median is
    # about 1.2533 sigma / sqrt(n) (asymptotic normal theory, from memory); 5 combined standard
    # errors is the tolerance.
    from screen.runs import uncertainty as unc

    case, results = _uncertain_case()
    blocked = unc.run_monte_carlo(case, results, 20_000, seed=11, block=5_000, reservoir=5_000)
    whole = unc.run_monte_carlo(case, results, 20_000, seed=11)
    assert blocked.figures["mtsr"].size == 5_000 and blocked.tally["n"] == 20_000
    a, _ = unc.summarise(blocked, case, results)
    b, _ = unc.summarise(whole, case, results)
    sigma = b["mtsr_degC"]["std"]
    tolerance = 5 * 1.2533 * sigma * math.sqrt(1 / 5_000 + 1 / 20_000)
    assert abs(a["mtsr_degC"]["p50"] - b["mtsr_degC"]["p50"]) < tolerance
    assert a["samples"] == 20_000
    assert abs(a["probability_class_4_or_5"] - b["probability_class_4_or_5"]) < \
        5 * 0.5 * math.sqrt(2 / 20_000)
