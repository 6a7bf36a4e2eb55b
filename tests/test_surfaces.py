"""Every surface tells the user what the figures are worth: the first screen of `check` fits on a
screen with the caution at the top, and the cautions (screen/cautions.py, one text) are on the
terminal, `compare`, `sweep`, `batch` and every CSV file.

The bundled cases are invented demo data: these tests check presentation invariants only (line
counts, the presence of the caution text, the words that each verdict prints), never values.
"""

import functools
import io
import json
import pathlib

import pandas as pd
import pytest
from click.testing import CliRunner

from screen.cautions import CAUTIONS, SHORT_CAUTION, csv_comment
from screen.cli import main
from screen.report.terminal import format_check, unique_messages, warning_rank

ROOT = pathlib.Path(__file__).parent.parent
CASES = sorted(ROOT.joinpath("cases").glob("*.toml"))
FIRST_SCREEN_LINES = 60


@functools.lru_cache(maxsize=None)
def _json(path: pathlib.Path) -> str:
    result = CliRunner().invoke(main, ["check", str(path), "--json"])
    assert result.exit_code == 0, result.output
    return result.output


def result_of(path) -> dict:
    return json.loads(_json(path))


def _flat(text: str) -> str:
    return " ".join(text.split())


def assert_full_cautions(text: str) -> None:
    flat = _flat(text)
    for caution in CAUTIONS:
        assert _flat(caution) in flat, caution


@pytest.mark.parametrize("path", CASES, ids=[p.name for p in CASES])
def test_first_screen_fits_with_caution_on_top(path):
    data = result_of(path)
    text = format_check(data)
    lines = text.splitlines()
    assert len(lines) <= FIRST_SCREEN_LINES, f"{len(lines)} lines"
    fixed = [line for line in lines if not line.startswith(("case file", "what-if"))]
    assert all(len(line) <= 80 for line in fixed), max(fixed, key=len)  # paths may be long
    top = _flat(" ".join(lines[:6]))
    assert _flat(SHORT_CAUTION) in top
    assert_full_cautions("\n".join(lines[-12:]))
    # The verdict and every vessel are on the first screen.
    assert "VERDICT:" in text
    for vessel in data["results"].get("vessels") or []:
        assert vessel["name"][:12] in text
    # Missing data never reads as a computed failure.
    assert "FAILS" not in text


@pytest.mark.parametrize("path", CASES, ids=[p.name for p in CASES])
def test_detail_prints_everything_and_fails_only_for_a_computed_failure(path):
    data = result_of(path)
    short, detail = format_check(data), format_check(data, detail=True)
    assert len(detail.splitlines()) >= len(short.splitlines())
    assert_full_cautions(detail)
    names = [v["name"] for v in data["results"].get("vessels") or []]
    for text in unique_messages(data["warnings"], names):
        assert _flat(text) in _flat(detail)
    barrier = data["results"].get("barrier") or {}
    # "fails" means a computed criterion fails; missing data read "not demonstrated".
    computed_failure = barrier.get("verdict") == "fails" or any(
        v.get("barrier_verdict") == "fails" for v in barrier.get("vessels") or []
        if isinstance(v, dict))
    if not computed_failure:
        assert "FAILS" not in detail


def test_check_detail_option_and_default_differ():
    case = ROOT / "cases" / "alkylation_reflux_class4.toml"
    short = CliRunner().invoke(main, ["check", str(case)])
    detail = CliRunner().invoke(main, ["check", str(case), "--detail"])
    assert short.exit_code == 0 and detail.exit_code == 0
    assert "Deviation scenarios (each a full screening" in detail.output
    assert "Deviation scenarios (each a full screening" not in short.output
    assert len(short.output.splitlines()) <= FIRST_SCREEN_LINES


def test_repeated_messages_are_printed_once():
    names = ["Lab A", "Pilot B"]
    messages = ["Lab A: barrier not demonstrated: give x", "Pilot B: barrier not demonstrated: "
                "give x", "other", "other", "Pilot B: own text"]
    assert unique_messages(messages, names) == [
        "Lab A, Pilot B: barrier not demonstrated: give x", "other", "Pilot B: own text"]


def test_warning_rank_puts_verdict_warnings_first():
    assert warning_rank("the feed continuing reaches 134 degC") == 0
    assert warning_rank("gas yield not given: lower bound") == 1
    assert warning_rank("the zero-order B number is small") == 2


def test_csv_comment_line_reads_with_pandas():
    line = csv_comment()
    assert line.startswith("# ") and line.endswith("\n") and line.count("\n") == 1
    table = pd.read_csv(io.StringIO(line + 'a,b\n"R-1 #2",1\n'), comment="#")
    assert list(table.columns) == ["a", "b"] and table["a"][0] == "R-1 #2"


def test_sweep_and_batch_carry_the_full_cautions(tmp_path):
    case = ROOT / "cases" / "esterification_batch.toml"
    out = tmp_path / "sweep.csv"
    sweep = CliRunner().invoke(main, ["sweep", str(case), "--vary",
                                      "vessel.coolant_temperature=0 degC:30 degC:3",
                                      "--csv", str(out)])
    assert sweep.exit_code == 0, sweep.output
    assert_full_cautions(sweep.output)
    assert _flat(SHORT_CAUTION) in _flat(" ".join(sweep.output.splitlines()[:4]))
    first = out.read_text().splitlines()[0]
    assert first.startswith("# ") and _flat(" ".join(CAUTIONS)) in first
    assert len(pd.read_csv(out, comment="#")) == 3

    table = tmp_path / "batch.csv"
    batch = CliRunner().invoke(main, ["batch", str(case), "--workers", "1", "--csv", str(table)])
    assert batch.exit_code == 0, batch.output
    assert_full_cautions(batch.output)
    assert table.read_text().startswith("# ")
    assert len(pd.read_csv(table, comment="#")) == 1


def test_compare_carries_the_full_cautions():
    case = ROOT / "cases" / "esterification_batch.toml"
    out = CliRunner().invoke(main, ["compare", str(case), str(case)])
    assert out.exit_code == 0, out.output
    assert_full_cautions(out.output)
    assert _flat(SHORT_CAUTION) in _flat(" ".join(out.output.splitlines()[:4]))


def test_override_of_an_accumulation_condition_warns():
    from screen.io.case import load_case

    case = ROOT / "cases" / "nitration_semibatch.toml"
    assert not any("measured under other conditions" in w for w in load_case(case).warnings)
    for key in ("synthesis.dosing_time=8 h", "process.temperature=45 degC"):
        warnings = load_case(case, overrides=[key]).warnings
        assert any("measured under other conditions" in w and key.split("=")[0] in w
                   for w in warnings), key
    both = load_case(case, overrides=["synthesis.dosing_time=8 h", "process.accumulation=0.6"])
    assert not any("measured under other conditions" in w for w in both.warnings)


def test_compare_hides_differences_below_the_printed_precision():
    from screen.runs.compare import Change, printed, shows_a_difference, split_unit

    assert split_unit("vessels[R-1].ua_W_per_K") == ("vessels[R-1].ua", "W/K")
    assert split_unit("mtsr_degC") == ("mtsr", "degC")
    noise = Change("vessels[R-1].stable_temperature_degC", 15.0, 15.0 - 5.51e-6, "down")
    assert not shows_a_difference(noise)
    assert shows_a_difference(Change("mtsr_degC", 126.76, 126.86, "up"))
    assert printed(0.123456, "h") == "0.1235" and printed(-0.04, "degC") == "0.0"


def test_compare_a_case_with_its_own_what_if():
    case = ROOT / "cases" / "esterification_batch.toml"
    out = CliRunner().invoke(main, ["compare", str(case), "--set",
                                    "vessel.heat_transfer_coefficient=20 W/(m^2 K)"])
    assert out.exit_code == 0, out.output
    text = out.output
    assert "what-if    --set vessel.heat_transfer_coefficient" in text
    # Verdict changes come first, then the inputs, then the table of figures with units.
    assert text.index("erdict") < text.index("Inputs that differ") < text.index("Figures that")
    assert "W/K" in text and "degC" in text
    missing = CliRunner().invoke(main, ["compare", str(case)])
    assert missing.exit_code == 2 and "--set" in missing.output


def test_kinetics_figures_and_text_carry_the_cautions(tmp_path):
    runs = sorted(str(p) for p in (ROOT / "cases" / "dsc").glob("hf417_residue_*Kmin.csv"))
    out = CliRunner().invoke(main, ["kinetics", *runs, "--png-dir", str(tmp_path)])
    assert out.exit_code == 0, out.output
    assert_full_cautions(out.output)
    pngs = sorted(tmp_path.glob("*.png"))
    assert pngs
    for png in pngs:  # the PNG Description text chunk holds the cautions
        assert _flat(" ".join(CAUTIONS)).encode("latin-1") in png.read_bytes()
    from screen.analyses.kinetics import CAUTIONS as KINETICS_OUTPUT_CAUTIONS

    assert KINETICS_OUTPUT_CAUTIONS[:len(CAUTIONS)] == CAUTIONS  # one text, not a copy


def test_demo_data_headers_are_neutral():
    """Demo DSC files use our own neutral column names (vendor layouts are read by the readers
    and tested with synthetic headers in tests/test_cli_kinetics.py)."""
    for path in (ROOT / "cases" / "dsc").glob("*.csv"):
        text = path.read_text(encoding="utf-8")
        assert "INVENTED DEMO DATA" in text
        for vendor_style in ("Instrument;", "Ts/", "DSC/(", "Heat Flow [", "Exo Up",
                             "Sample Temperature"):
            assert vendor_style not in text, (path.name, vendor_style)


@pytest.mark.parametrize("path", CASES, ids=[p.name for p in CASES])
def test_user_facing_method_notes_never_say_from_memory(path):
    """Method notes cite the published source; an unverified value says "verify against the
    source" (the provenance detail stays in docs/methods.md and the tests)."""
    text = _json(path)
    assert "from memory" not in text


def test_pdf_sentences_do_not_contradict_themselves():
    from screen.report.blocks import scenario_footnote
    from screen.report.pdf import _probability_sentence

    base_holds = [{"key": "base", "barrier_verdict": "holds", "criticality_class": 4},
                  {"key": "x", "barrier_verdict": "fails", "criticality_class": 4}]
    assert "NOT ASSESSED" not in scenario_footnote(base_holds)  # no row says it
    with_not_assessed = base_holds + [{"key": "y", "barrier_verdict": "not assessed",
                                       "criticality_class": 1}]
    assert "NOT ASSESSED" in scenario_footnote(with_not_assessed)
    crude = _probability_sentence({"probability_6": None, "tmrad_at_mtsr_h": 39.6})
    assert "not assessed" not in crude and "no level is granted" in crude
    screened = _probability_sentence({"probability_6": "occasional", "probability": "medium",
                                      "tmrad_at_mtsr_h": 15.2})
    assert "occasional" in screened and "15.2" in screened


def test_class_one_wording_never_promises_no_runaway():
    from screen.models.criticality import CLASS_MEANINGS

    for klass in (1, 2):
        assert "no runaway" not in CLASS_MEANINGS[klass].lower()
