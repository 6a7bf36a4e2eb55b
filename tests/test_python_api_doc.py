"""The notebook walk-through of docs/python-api.md runs as written, and the result objects keep
their promises: a DataFrame, an HTML verdict, and one matplotlib figure per figure of the PDF.

The check values here are consistency checks between two surfaces of the same result (the PDF
and the Python figures, the JSON and the frames); the example cases are invented demo data and
are never check values.
"""

from __future__ import annotations

import os
import re

import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DOC = os.path.join(ROOT, "docs", "python-api.md")


def doc_blocks() -> list[str]:
    with open(DOC, encoding="utf-8") as handle:
        return re.findall(r"```python\n(.*?)```", handle.read(), re.S)


@pytest.fixture(scope="module")
def walkthrough():
    """Run every python block of the page in order, in one namespace, from the repository root
    (the page uses relative paths as a notebook next to the cases would)."""
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    namespace: dict = {"__name__": "walkthrough"}
    here = os.getcwd()
    os.chdir(ROOT)
    try:
        for number, block in enumerate(doc_blocks(), start=1):
            exec(compile(block, f"{DOC} block {number}", "exec"), namespace)
    finally:
        os.chdir(here)
    return namespace


def test_the_page_has_code_to_run():
    assert len(doc_blocks()) >= 10


def test_walkthrough_shows_a_frame_html_and_figures(walkthrough):
    import pandas as pd
    from matplotlib.figure import Figure

    from screen.cautions import CAUTIONS, SHORT_CAUTION

    result = walkthrough["result"]
    assert isinstance(walkthrough["figures"], pd.DataFrame)
    assert list(walkthrough["figures"].attrs["cautions"]) == list(CAUTIONS)
    html = walkthrough["html"]
    assert result.results["verdict"].split(":")[0] in html
    assert all(caution.split(":")[0] in html for caution in CAUTIONS)
    assert SHORT_CAUTION in repr(result)
    assert isinstance(walkthrough["figure"], Figure)
    saved = sorted(os.listdir(walkthrough["out"]))
    assert len(saved) == len(result.figure_names()) == 6


def _pdf_figure_titles(result, tmp_path):
    from pypdf import PdfReader

    from screen.report import write_report

    path = tmp_path / "r.pdf"
    write_report(result, path, generated_at="2026-01-01T00:00:00+00:00")
    text = "\n".join(page.extract_text() for page in PdfReader(str(path)).pages)
    return sorted(set(re.findall(r"Figure (\d+)\. ([A-Z][a-z]+)", text)), key=lambda t: int(t[0]))


@pytest.mark.parametrize("name, samples", [
    ("nitration_semibatch.toml", None),            # three vessels: three Semenov diagrams
    ("acylation_semibatch_kinetics.toml", None),   # simulation: the run profile
    ("esterification_uncertain.toml", 500),        # Monte Carlo: the sensitivity bars
])
def test_one_python_figure_per_pdf_figure(name, samples, tmp_path):
    pytest.importorskip("matplotlib")
    from matplotlib.figure import Figure

    import screen
    from screen.runs.uncertainty import add_uncertainty

    result = screen.screen_case(os.path.join(ROOT, "cases", name))
    if samples:
        add_uncertainty(result, samples=samples, seed=5)
    titles = _pdf_figure_titles(result, tmp_path)
    names = result.figure_names()
    assert len(names) == len(titles)
    first_words = {"criticality": "Criticality", "tmrad": "Time", "course": "Unmitigated",
                   "semenov": "Semenov", "simulation": "Temperature", "sensitivity": "Sensitivity"}
    for figure_name, (_, word) in zip(names, titles, strict=True):
        assert first_words[figure_name.split(":")[0]] == word
        assert isinstance(result.figure(figure_name), Figure)


def test_figures_use_the_pdf_figure_data(monkeypatch):
    """The Python figure and the PDF figure receive identical arguments (one data path)."""
    pytest.importorskip("matplotlib")
    import screen
    from screen.report import figures, mpl

    result = screen.screen_case(os.path.join(ROOT, "cases", "grignard_semibatch.toml"))
    seen = {}

    def recorder(target, tag):
        original = getattr(target, "tmrad_curve")

        def wrapped(**kwargs):
            seen[tag] = kwargs
            return original(**kwargs)
        monkeypatch.setattr(target, "tmrad_curve", wrapped)

    recorder(figures, "pdf")
    recorder(mpl, "python")
    from screen.report import figure_data

    figures.draw(figure_data.tmrad(result))
    result.figure("tmrad")
    assert seen["pdf"].keys() == seen["python"].keys()
    assert seen["pdf"]["points"] == seen["python"]["points"]
    assert seen["pdf"]["temperature_k"] is seen["python"]["temperature_k"]


def test_adiabatic_course_is_computed_once_per_result(monkeypatch):
    pytest.importorskip("matplotlib")
    import screen
    from screen.models import decomposition

    calls = []
    original = decomposition.adiabatic_course

    def counting(*args, **kwargs):
        calls.append(1)
        return original(*args, **kwargs)

    monkeypatch.setattr(decomposition, "adiabatic_course", counting)
    result = screen.screen_case(os.path.join(ROOT, "cases", "esterification_batch.toml"))
    result.figure("course")
    result.figure("course")
    assert len(calls) == 1


def test_unknown_figure_name_lists_the_names():
    import screen
    from screen.errors import CaseError

    result = screen.screen_case(os.path.join(ROOT, "cases", "amidation_onset_only.toml"))
    with pytest.raises(CaseError, match="available: criticality, tmrad, course"):
        result.figure("semenov")
