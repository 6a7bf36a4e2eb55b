"""PDF screening summary: content read back with pypdf, atomic writing, CLI end to end.

The bundled cases are invented demo data: they are used here only for consistency checks (the
PDF against the ``--json`` output of the same run, the printed SHA-256 against ``hashlib``),
never as check values. The number formats checked are the report's own documented precision
(screen/report/style.py, docs/report.md): temperatures 1 decimal, differences 1 decimal,
times 3 significant digits, energies 4 significant digits, ratios 2 decimals.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

pypdf = pytest.importorskip("pypdf")

from screen.cautions import CAUTIONS  # noqa: E402
from screen.cli import main  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
STAMP = "2026-12-01T08:00:00+00:00"
ENV = {"RUNAWAY_SCREEN_TIMESTAMP": STAMP}

#: Label printed on page 1 -> (JSON results key, documented precision kind). Written out here
#: rather than imported, so that a renamed label or a changed precision fails the test.
KEY_FIGURE_LABELS = {
    "Process temperature": ("process_temperature_degC", "decimal1"),
    "Maximum temperature of the synthesis reaction": ("mtsr_degC", "decimal1"),
    "Maximum technical temperature": ("mtt_degC", "decimal1"),
    "Temperature at which TMRad is 24 h": ("td24_degC", "decimal1"),
    "Temperature at which TMRad is 8 h": ("td8_degC", "decimal1"),
    "Final temperature after the runaway": ("final_temperature_degC", "decimal1"),
    "Adiabatic rise of the synthesis": ("synthesis_adiabatic_rise_K", "decimal1"),
    "Adiabatic rise of the decomposition": ("decomposition_adiabatic_rise_K", "decimal1"),
    "Adiabatic rise of the runaway": ("runaway_adiabatic_rise_K", "decimal1"),
    "Onset margin": ("onset_margin_K", "decimal1"),
    "TMRad at the process temperature": ("tmrad_at_process_temperature_h", "significant3"),
    "TMRad at MTSR": ("tmrad_at_mtsr_h", "significant3"),
    "TMRad at MTSR, zero-order estimate": ("tmrad_at_mtsr_zero_order_h", "significant3"),
    "Heat of the synthesis": ("synthesis_energy_kJ_per_kg", "significant4"),
    "Heat of the decomposition": ("decomposition_energy_kJ_per_kg", "significant4"),
    "Thermal accumulation": ("accumulation", "decimal2"),
    "DSC onset (information only)": ("dsc_onset_degC", "decimal1"),
}
NUMBER = re.compile(r"^[-+]?\d+(?:\.\d+)?(?:e[-+]\d+)?$")
#: Legend texts of the simulated temperature course (issue 5: the simulated course must not be
#: called an adiabatic decomposition from MTSR).
SIMULATED_STOPPED = "simulated course after failure at the worst time (feed stopped)"
SIMULATED_CONTINUING = "simulated course after failure at the worst time (feed continuing)"
FLOAT = r"([-+]?\d+(?:\.\d+)?(?:e[-+]\d+)?)"


def _invoke(args, expect=0):
    result = CliRunner(env=ENV).invoke(main, [str(a) for a in args])
    assert result.exit_code == expect, (result.output, result.exception)
    return result


def _page_texts(path):
    reader = pypdf.PdfReader(str(path))
    return [page.extract_text() for page in reader.pages]


def _flat(text):
    return " ".join(text.split())


def _tolerance(kind, value):
    """Half a unit in the last printed digit, from the documented precision."""
    if kind == "decimal1":
        return 0.05
    if kind == "decimal2":
        return 0.005
    digits = 3 if kind == "significant3" else 4
    if value == 0:
        return 0.0
    return 0.5 * 10.0 ** (math.floor(math.log10(abs(value))) - digits + 1)


@pytest.fixture(scope="module")
def nitration(tmp_path_factory):
    """A 3-vessel report with a --set override and --since an earlier --json result."""
    folder = tmp_path_factory.mktemp("nitration")
    case = CASES / "nitration_semibatch.toml"
    override = "vessel.3.coolant_temperature=12 degC"
    earlier = _invoke(["check", case, "--json"]).stdout
    (folder / "earlier.json").write_text(earlier, encoding="utf-8")
    data = json.loads(_invoke(["check", case, "--json", "--set", override]).stdout)
    pdf = folder / "summary.pdf"
    run = _invoke(["report", case, "-o", pdf, "--set", override, "--since",
                   folder / "earlier.json"])
    return {"case": case, "pdf": pdf, "json": data, "pages": _page_texts(pdf),
            "stdout": run.stdout, "override": override}


def test_page_one_holds_caution_and_class(nitration):
    page_one = _flat(nitration["pages"][0])
    for caution in CAUTIONS:
        assert _flat(caution) in page_one
    assert "SCREENING AID ONLY" in page_one
    klass = nitration["json"]["results"]["criticality_class"]
    assert re.search(r"CRITICALITY CLASS (\d)", page_one).group(1) == str(klass)
    assert f"Class {klass}." in page_one
    for vessel in nitration["json"]["results"]["vessels"]:
        assert vessel["name"] in page_one  # stability verdict per vessel on the summary page


def test_every_key_figure_equals_the_json_value_to_the_printed_precision(nitration):
    results = nitration["json"]["results"]
    lines = [line.strip() for line in nitration["pages"][0].splitlines()]
    checked = 0
    for label, (key, kind) in KEY_FIGURE_LABELS.items():
        if key not in results:
            continue
        assert label in lines, f"key figure {label!r} missing on page 1"
        index = lines.index(label)
        printed = next(text for text in lines[index + 1:index + 4] if NUMBER.match(text))
        value = float(printed)
        expected = float(results[key])
        assert abs(value - expected) <= _tolerance(kind, expected) * (1 + 1e-9), (label, printed,
                                                                                 expected)
        if kind == "decimal1":
            assert re.match(r"^[-+]?\d+\.\d$", printed), (label, printed)
        checked += 1
    assert checked >= 16


def test_page_count_and_footer_on_every_page(nitration):
    pages = nitration["pages"]
    total = len(pages)
    assert f"({total} pages;" in nitration["stdout"]
    assert 5 <= total <= 12  # summary, 3 + 3 figures, vessel table, inputs, traceability
    title = nitration["json"]["case"]["title"]
    for number, text in enumerate(pages, start=1):
        assert f"page {number} of {total}" in text
        assert title in text
        assert "SCREENING AID ONLY" in text


def test_printed_sha256_matches_the_case_file(nitration):
    digest = hashlib.sha256(Path(nitration["case"]).read_bytes()).hexdigest()
    printed = set(re.findall(r"\b[0-9a-f]{64}\b", "\n".join(nitration["pages"])))
    assert digest in printed
    assert nitration["json"]["case"]["sha256"] == digest


def test_overrides_inputs_methods_and_changes_since(nitration):
    text = _flat("\n".join(nitration["pages"]))
    assert nitration["override"] in text
    assert "Inputs as read" in text and "Methods and references" in text
    assert "Assumptions and limits" in text and "Data-quality notes" in text
    assert "DSC, closed steel crucible" in text  # the onset_method note of the case
    assert "Changes since the earlier result" in text
    assert "vessel.3.coolant_temperature" in text
    assert "Scale-up comparison of the vessels" in text
    for number in range(1, 7):
        assert f"Figure {number}." in text  # 3 figures + one Semenov diagram per vessel


def test_check_pdf_end_to_end_and_force(tmp_path):
    case = CASES / "esterification_batch.toml"
    pdf = tmp_path / "check.pdf"
    run = _invoke(["check", case, "--pdf", pdf, "--json"])
    data = json.loads(run.stdout)
    pages = _page_texts(pdf)
    assert f"CRITICALITY CLASS {data['results']['criticality_class']}" in _flat(pages[0])
    assert data["case"]["sha256"] in "\n".join(pages)

    before = pdf.read_bytes()
    refused = _invoke(["check", case, "--pdf", pdf], expect=2)
    assert len(refused.stderr.strip().splitlines()) == 1
    assert "--force" in refused.stderr and str(pdf) in refused.stderr
    assert pdf.read_bytes() == before
    _invoke(["check", case, "--pdf", pdf, "--force"])
    assert pdf.read_bytes()[:5] == b"%PDF-"


def test_onset_only_case_says_it_cannot_conclude_and_since_a_case_file(tmp_path, monkeypatch):
    import screen.analyses.engine

    # Only the core figures: this test is about presenting a fail-closed verdict, not about the
    # optional analyses (which have their own tests).
    monkeypatch.setattr(screen.analyses.engine, "_add_analyses", lambda case, result, curves: None)
    pdf = tmp_path / "onset.pdf"
    case = CASES / "amidation_onset_only.toml"
    _invoke(["report", case, "-o", pdf, "--set", "process.temperature=95 degC", "--since", case])
    pages = _page_texts(pdf)
    page_one = _flat(pages[0])
    assert "CANNOT CONCLUDE" in page_one  # fail closed, on the summary page
    # No low class may be shown as granted: either no class or a high crude class.
    shown = re.search(r"CRITICALITY CLASS (\S+)", page_one).group(1)
    assert shown == "–" or int(shown) >= 4
    assert "NO CLASS: CANNOT CONCLUDE" in page_one or "CRUDE ESTIMATE" in page_one
    assert "no vessel in the case" in page_one
    everything = _flat("\n".join(pages))
    assert "Changes since the earlier result" in everything  # --since an older case file
    assert "input: process.temperature" in everything
    assert "result: mtsr_degC" in everything


def test_existing_file_without_force_is_refused_in_one_line(tmp_path):
    pdf = tmp_path / "kept.pdf"
    pdf.write_bytes(b"an earlier report")
    run = _invoke(["report", CASES / "grignard_semibatch.toml", "-o", pdf], expect=2)
    assert len(run.stderr.strip().splitlines()) == 1
    assert run.stderr.startswith("error: ") and "--force" in run.stderr
    assert pdf.read_bytes() == b"an earlier report"
    assert sorted(os.listdir(tmp_path)) == ["kept.pdf"]


def test_missing_directory_leaves_no_file(tmp_path):
    target = tmp_path / "no-such-folder" / "out.pdf"
    run = _invoke(["report", CASES / "grignard_semibatch.toml", "-o", target], expect=2)
    assert "does not exist" in run.stderr
    assert not target.parent.exists()
    assert os.listdir(tmp_path) == []


def test_optional_blocks_are_rendered_when_present(tmp_path):
    """Partial members (another module still at work) are laid out defensively: missing
    figures print as n/a, nothing is lost, and page 1 carries the governing MTSR and the
    confidence sentence."""
    import numpy as np

    from screen.report import write_report

    result = _grignard_result()
    result.results["uncertainty"] = {
        "samples": 1000, "seed": 7, "class_probabilities": {"3": 0.75, "4": 0.25},
        "td24_degC": {"p5": 150.0, "p50": 160.0, "p95": 171.0},
        "summary_lines": ["Uncertainty block for the layout test."]}
    result.curves["uncertainty"] = {"sensitivity": {"decomposition.activation_energy": -0.8,
                                                    "mass.specific_heat": 0.3}}
    result.results["scenarios"] = {"rows": [{"name": "double charge", "mtsr_degC": 150.0,
                                             "criticality_class": 4}]}
    result.results["simulation"] = {"worst_failure_time_h": 2.5}
    time = np.linspace(0.0, 7200.0, 40)
    result.curves["simulation"] = {"time_s": time, "temperature_K": np.linspace(330.0, 420.0, 40),
                                   "time_after_failure_s": time,
                                   "failure_temperature_K": np.linspace(360.0, 380.0, 40)}
    result.results["mtsr_governing_degC"] = result.results["mtsr_degC"] + 12.5
    result.results["mtsr_governing_basis"] = "simulation (feed stopped at the worst failure time)"
    result.results["mtsr_governing_source"] = "simulation-feed-stopped"
    result.results["some_new_block"] = {"summary_lines": ["A block this report does not know."]}
    pdf = tmp_path / "blocks.pdf"
    write_report(result, pdf, generated_at=STAMP)
    pages = _page_texts(pdf)
    text = _flat("\n".join(pages))
    for expected in ("Cooling-failure simulation",
                     "Worst failure time (since the start of the run)", "2.50",
                     "from the dynamic simulation", SIMULATED_STOPPED,
                     "Uncertainty of the verdict", "Sensitivity ranking of the inputs",
                     "decomposition.activation_energy", "Probability of each criticality class",
                     "0.750", "Deviation scenarios", "double charge",
                     "A block this report does not know."):
        assert expected in text, expected
    assert "could not be laid out" not in text
    assert "adiabatic decomposition from MTSR" not in text  # the simulated course replaces it
    page_one = _flat(pages[0])
    governing = result.results["mtsr_governing_degC"]
    assert f"Governing MTSR: {governing:.1f} °C" in page_one
    assert "Confidence:" in page_one and "class 3: 0.750" in page_one


def _grignard_result():
    from screen.cli import run_check

    return run_check(str(CASES / "grignard_semibatch.toml"))


def test_exception_mid_way_leaves_no_file(tmp_path, monkeypatch):
    from screen.report import figures, write_report

    def broken(*args, **kwargs):
        raise RuntimeError("simulated failure while drawing")

    monkeypatch.setattr(figures, "semenov_diagram", broken)
    with pytest.raises(RuntimeError, match="simulated failure"):
        write_report(_grignard_result(), tmp_path / "out.pdf", generated_at=STAMP)
    assert os.listdir(tmp_path) == []


def test_failed_rename_removes_the_temporary_file(tmp_path, monkeypatch):
    import screen.report
    import screen.report.pdf
    from screen.errors import OutputError

    def fake_build(result, data, stream, since=None):
        stream.write(b"%PDF-1.4 fake")
        return 1

    def refuse(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(screen.report.pdf, "build_pdf", fake_build)
    monkeypatch.setattr(screen.report.os, "link", refuse)
    monkeypatch.setattr(screen.report.os, "replace", refuse)
    with pytest.raises(OutputError, match="cannot write"):
        screen.report.write_report(_grignard_result(), tmp_path / "out.pdf", generated_at=STAMP)
    assert os.listdir(tmp_path) == []


def test_since_must_be_a_result(tmp_path):
    bogus = tmp_path / "old.json"
    bogus.write_text('{"something": 1}', encoding="utf-8")
    run = _invoke(["report", CASES / "grignard_semibatch.toml", "-o", tmp_path / "r.pdf",
                   "--since", bogus], expect=2)
    assert "--since" in run.stderr
    assert not (tmp_path / "r.pdf").exists()


def test_importing_the_report_modules_is_cheap():
    code = ("import sys, screen.report, screen.cli.report; "
            "heavy = ('reportlab', 'matplotlib', 'scipy', 'pint'); "
            "print(','.join(m for m in heavy if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, check=True)
    assert out.stdout.strip() == ""


@pytest.mark.parametrize("value, printed", [
    (99.96, "100"), (0.012345, "0.0123"), (123456.0, "1.23e+05"), (354.2, "354"),
    (1.004e-4, "1.00e-04"), (12.35, "12.3"), (-0.5, "-0.500"), (2.0, "2.00"),
])
def test_three_significant_digit_format(value, printed):
    from screen.report.style import format_significant

    text = format_significant(value, 3)
    assert text == printed
    assert abs(float(text) - value) <= _tolerance("significant3", value) * (1 + 1e-9)


# --------------------------------------------------------------------------------------------
# Feature blocks: barrier, scenarios, simulation, uncertainty (PDF against the JSON of the
# same run: `check --json --pdf` prints the JSON of the very result the PDF shows).


def _check_with_pdf(folder, case, *extra):
    pdf = folder / "report.pdf"
    run = _invoke(["check", CASES / case, "--json", "--pdf", pdf, *extra])
    data = json.loads(run.stdout.split("\nPDF written")[0])
    pages = _page_texts(pdf)
    return {"json": data, "pages": pages, "text": _flat("\n".join(pages))}


def _close(printed, expected, kind):
    """The printed number equals the JSON value to its printed precision."""
    value = float(printed)
    return abs(value - expected) <= _tolerance(kind, expected) * (1 + 1e-9)


@pytest.fixture(scope="module")
def alkylation(tmp_path_factory):
    """Class 4 with a condenser (barrier assessed) and six deviation scenarios."""
    return _check_with_pdf(tmp_path_factory.mktemp("alkylation"),
                           "alkylation_reflux_class4.toml")


def test_barrier_verdict_words_in_the_pdf_equal_the_json(alkylation):
    barrier = alkylation["json"]["results"]["barrier"]
    assert barrier["assessed"] and barrier["vessels"]
    page_one = _flat(alkylation["pages"][0])
    text = alkylation["text"]
    block = text[text.index("Evaporative cooling as a barrier"):]
    assert f"Overall (worst vessel): {barrier['verdict'].upper()}." in block
    for vessel in barrier["vessels"]:
        name, verdict = vessel["name"], vessel["barrier_verdict"].upper()
        assert verdict in ("HOLDS", "DOUBTFUL", "FAILS")
        assert f"{name}: {verdict}" in page_one  # one line per vessel on the summary page
        row = re.search(re.escape(name) + r" (\S+) (\S+) (\S+) / (\S+) (\S+) / (\S+) (\S+) / "
                        r"(\S+) (HOLDS|DOUBTFUL|FAILS)", block)
        assert row is not None, f"barrier table row of {name} missing"
        keys = [("heat_release_rate_at_mtt_kW", "significant4"),
                ("vapour_mass_flow_kg_per_h", "significant4"),
                ("condenser_duty_needed_kW", "significant4"),
                ("condenser_capacity_kW", "significant4"),
                ("vapour_line_velocity_m_per_s", "significant3"),
                ("flooding_velocity_m_per_s", "significant3"),
                ("solvent_evaporated_kg", "significant4"),
                ("solvent_present_kg", "significant4")]
        for printed, (key, kind) in zip(row.groups()[:8], keys):
            assert _close(printed, vessel[key], kind), (key, printed, vessel[key])
        assert row.group(9) == verdict
        # Every reason is listed with its grade in capitals.
        for reason in vessel["reasons"]:
            sentence, grade = re.match(r"^(.*) \((holds|doubtful|fails)\)$", reason).groups()
            shown = re.sub(r"\bT_(\w+)", r"T\1", sentence.replace(" degC", " °C"))
            assert _flat(f"{shown} — {grade.upper()}") in block, reason


def test_scenario_rows_in_the_pdf_equal_the_json(alkylation):
    scenarios = alkylation["json"]["results"]["scenarios"]
    rows = scenarios["rows"]
    assert scenarios["run"] and len(rows) == scenarios["deviations"] + 1 >= 2
    text = alkylation["text"]
    table = text[text.index("Barrier change"):]
    for row in rows:
        assert row["error"] is None, row["name"]
        match = re.search(
            re.escape(row["name"]) + r" " + FLOAT + r" (–|" + FLOAT[1:-1] + r") " + FLOAT
            + r" (–|×\S+) (\d|n/c) (–|0|[-+]\d|n/c) (HOLDS|DOUBTFUL|FAILS|NOT ASSESSED) "
            r"(–|unchanged|[A-Z ]+ → [A-Z ]+?)(?= [a-z]| Ratio:)", table)
        assert match is not None, f"scenario row {row['name']!r} missing"
        mtsr, change, tmrad, ratio, klass, class_change, barrier, barrier_change = \
            match.groups()
        assert _close(mtsr, row["mtsr_degC"], "decimal1")
        assert _close(tmrad, row["tmrad_at_mtsr_h"], "significant3")
        assert klass == str(row["criticality_class"])
        assert barrier == row["barrier_verdict"].upper()
        if row["key"] == "base":
            assert change == ratio == class_change == barrier_change == "–"
            continue
        assert _close(change, row["mtsr_change_K"], "decimal1")
        assert _close(ratio[1:], row["tmrad_ratio"], "significant3")
        assert int(class_change) == row["class_change"]
        if row["barrier_change"] == "unchanged":
            assert barrier_change == "unchanged"
        else:
            before, after = row["barrier_change"].split(" to ")
            assert barrier_change == f"{before.upper()} → {after.upper()}"
    assert f"Worst deviation: {scenarios['worst_scenario']} (class {scenarios['worst_class']})" \
        in text


def test_simulated_course_and_simulation_figures(tmp_path):
    """Semi-batch kinetics: the temperature course is the simulated one (both feed modes), never
    labelled as an instantaneous synthesis rise, and the key figures equal the JSON."""
    run = _check_with_pdf(tmp_path, "acylation_semibatch_kinetics.toml")
    simulation = run["json"]["results"]["simulation"]
    text = run["text"]
    assert SIMULATED_STOPPED in text and SIMULATED_CONTINUING in text
    assert "adiabatic decomposition from MTSR" not in text
    assert "taken as instantaneous" not in text and "assumed instantaneous" not in text
    row = re.search(r"MTSR, highest over the failure times " + FLOAT + " " + FLOAT + " °C", text)
    assert _close(row.group(1), simulation["mtsr_feed_stopped_degC"], "decimal1")
    assert _close(row.group(2), simulation["mtsr_feed_continuing_degC"], "decimal1")
    row = re.search(r"Worst failure time \(since the start of the run\) " + FLOAT + " " + FLOAT,
                    text)
    assert _close(row.group(1), simulation["worst_failure_time_h"], "significant3")
    assert _close(row.group(2), simulation["worst_failure_time_feed_continuing_h"],
                  "significant3")
    triggered = "YES" if simulation["decomposition_triggered_feed_stopped"] else "no"
    assert f"Decomposition triggered within 24 h {triggered}" in text
    if not simulation["dosing_warnings"]:
        assert "Dosing warnings None:" in text
    for message in simulation["dosing_warnings"]:
        assert message["code"].replace("_", " ") in text


def test_uncertainty_block_percentiles_and_class_probabilities(tmp_path):
    run = _check_with_pdf(tmp_path, "esterification_uncertain.toml", "--uncertainty", "2000",
                          "--seed", "11")
    block = run["json"]["results"]["uncertainty"]
    text = run["text"]
    assert f"Monte Carlo propagation with {block['samples']} samples, seed {block['seed']}" in text
    assert block["samples"] == 2000 and block["seed"] == 11
    assert "Confidence:" in _flat(run["pages"][0])
    for label, key, kind in (("MTSR", "mtsr_degC", "decimal1"),
                             ("TD24", "td24_degC", "decimal1")):
        row = re.search(r"\b" + label + " " + FLOAT + " " + FLOAT + " " + FLOAT + " " + FLOAT
                        + " °C", text)
        assert row is not None, label
        nominal, p5, p50, p95 = (float(v) for v in row.groups())
        assert _close(row.group(1), run["json"]["results"][key], kind)
        for printed, name in zip(row.groups()[1:], ("p5", "p50", "p95")):
            assert _close(printed, block[key][name], kind), (label, name)
        assert p5 <= p50 <= p95
    probabilities = re.search(r"Criticality class 1 2 3 4 5 Probability (\S+(?: \S+)?) "
                              r"(\S+(?: \S+)?) (\S+(?: \S+)?) (\S+(?: \S+)?) (\S+(?: \S+)?)"
                              r"(?= P\(class)", text)
    assert probabilities is not None
    for printed, klass in zip(probabilities.groups(), "12345"):
        expected = block["class_probabilities"][klass]
        if printed.startswith("<"):
            assert expected == 0.0  # no sample: the rule-of-three bound is printed
        elif printed.startswith(">"):
            assert expected == 1.0
        else:
            assert abs(float(printed) - expected) <= 5e-4 * (1 + 1e-9)
    assert "Sensitivity ranking of the inputs" in text
    for item in block["sensitivity"]:
        assert item["key"] in text


@pytest.mark.parametrize("count, samples, printed", [
    # Rule of three: with no event in n trials the one-sided 95 % upper bound is 3/n
    # (Hanley & Lippman-Hand, "If nothing goes wrong, is everything all right?", JAMA 249
    # (1983) 1743-1745).
    (0, 20000, "< 0.00015"), (0, 300, "< 0.01"), (20000, 20000, "> 0.9998"),
    (1, 1000, "0.001"), (1, 20000, "5.0e-05"), (None, None, "0"),
])
def test_probabilities_are_never_printed_as_a_bare_zero(count, samples, printed):
    from screen.report.blocks import format_probability

    value = 0.0 if count is None else count / samples
    assert format_probability(value, samples) == printed
    if printed.startswith("<"):
        assert float(printed[2:]) == pytest.approx(3.0 / samples, rel=0.05)
