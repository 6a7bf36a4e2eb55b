"""The cautions every output carries (terminal, JSON, PDF, CSV, figures). Imports nothing.

One text, used everywhere: :data:`CAUTIONS` in full (end of the terminal output, ``compare``,
``sweep``, ``batch``, JSON, PDF), :data:`SHORT_CAUTION` as the one line at the top of a
terminal screen and in page headers (it keeps every element of the full text: screening aid,
input data quality, review, codes and regulations, licensed practice), :func:`csv_comment` as the
leading comment line of every CSV file (read it with ``pandas.read_csv(path, comment="#")``).
"""

CAUTIONS = (
    "Screening aid only: it does not replace a qualified process-safety review.",
    "Results hold only for the data and assumptions stated here; they are as good as the input "
    "data (calorimetry, kinetics, vessel data).",
    "A qualified process-safety review, local codes and regulations, and licensed engineering "
    "practice decide; they prevail over any figure of this tool.",
    "Rerun the screening after any change of recipe, equipment, scale or data.",
)

SHORT_CAUTION = ("SCREENING AID ONLY: results depend on the input data; a qualified process-safety "
                 "review, local codes and regulations, and licensed practice decide.")

#: Further cautions of the DSC kinetics evaluation (``kinetics``), shown after :data:`CAUTIONS`.
KINETICS_CAUTIONS = (
    "The kinetic parameters are fitted to the DSC data given and depend on their quality "
    "(calibration, sample representativeness, closed crucibles, baseline choice).",
    "Extrapolation to storage or process temperatures assumes the same single mechanism; "
    "confirm with isothermal or adiabatic calorimetry before relying on it.",
)


def caution_text(cautions=CAUTIONS) -> str:
    """The cautions as one paragraph (figures, CSV comment lines).

    Parameters
    ----------
    cautions : sequence of str
        The caution sentences; :data:`CAUTIONS` by default.

    Returns
    -------
    str
        The sentences joined by spaces.
    """
    return " ".join(cautions)


def csv_comment(cautions=CAUTIONS) -> str:
    """The leading comment line of a CSV file: ``# `` + the full cautions, one line, newline.

    pandas reads the table after it with ``pandas.read_csv(path, comment="#")``; the csv module
    with a reader that skips lines starting with ``#``.

    Parameters
    ----------
    cautions : sequence of str
        The caution sentences; :data:`CAUTIONS` by default.

    Returns
    -------
    str
        ``"# " + the cautions + "\\n"``.
    """
    return "# " + caution_text(cautions).replace("\n", " ") + "\n"
