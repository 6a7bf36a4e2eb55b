"""The Python API behind ``import screen``: results a notebook user can hold.

:func:`screen_case` returns a :class:`Screening`, the engine's
:class:`~screen.analyses.engine.ScreeningResult` with tables (pandas), a short ``repr``, an HTML
view for Jupyter and the figures of the PDF as matplotlib figures. :func:`sweep`,
:func:`compare` and :func:`screen_portfolio` return DataFrames; :func:`uncertainty` returns an
:class:`Uncertainty`. Every table carries the cautions and the tool version in
``DataFrame.attrs``; every result object prints the caution in its ``repr``.

The figures and verdicts are those of the engine and the runs; this module only arranges them
(``docs/python-api.md`` walks through it).
"""

from __future__ import annotations

import os
from collections.abc import Mapping

from screen.analyses.engine import ScreeningResult

__all__ = ["Screening", "Uncertainty", "compare", "load_case", "screen_case",
           "screen_portfolio", "sweep", "uncertainty"]


class Screening(ScreeningResult):
    """A screening result with tables, figures and notebook display.

    The same object as :class:`screen.analyses.engine.ScreeningResult` (``results``,
    ``warnings``, ``methods``, ``curves``, ``cautions``, :meth:`to_json_dict`), plus the
    methods below. Create it with :func:`screen.screen_case`.
    """

    @classmethod
    def of(cls, result: ScreeningResult) -> Screening:
        """The same result (shared, not copied) as a :class:`Screening`.

        Parameters
        ----------
        result : ScreeningResult
            Result of the engine.
        """
        if isinstance(result, cls):
            return result
        view = cls.__new__(cls)
        view.__dict__.update(result.__dict__)
        return view

    def _data(self) -> dict:
        return self.to_json_dict(generated_at=None)

    def to_frame(self):
        """One row of the scalar figures (pandas.DataFrame, columns named as the JSON keys;
        members of nested tables as ``"table.key"``), indexed by the case title."""
        from screen.report.frames import result_frame

        return result_frame(self._data())

    def vessels_frame(self):
        """One row per vessel (pandas.DataFrame, JSON keys of ``results.vessels``), indexed by
        the vessel name."""
        from screen.report.frames import vessels_frame

        return vessels_frame(self._data())

    def figure_names(self) -> list[str]:
        """Names accepted by :meth:`figure` for this result, in the order of the PDF."""
        from screen.report.figure_data import available

        return available(self)

    def figure(self, name: str):
        """The PDF figure ``name`` as a matplotlib Figure (needs the ``plot`` extra).

        Parameters
        ----------
        name : str
            ``"criticality"``, ``"tmrad"``, ``"course"``, ``"semenov"`` (first vessel;
            ``"semenov:2"`` or ``"semenov:VESSEL NAME"`` for another), and, when the result has
            them, ``"simulation"`` and ``"sensitivity"``; see :meth:`figure_names`.

        Returns
        -------
        matplotlib.figure.Figure
            Drawn from the same figure data as the PDF.

        Raises
        ------
        MissingDependencyError
            matplotlib is not installed (``pip install 'runaway-screen[plot]'``).
        CaseError
            No such figure for this result.
        """
        from screen.report import figure_data, mpl

        mpl.require_matplotlib("figures in Python (result.figure)")
        return mpl.draw(figure_data.figure_data(self, name))

    def __repr__(self) -> str:
        from screen.report.notebook import short_text

        return short_text(self._data())

    def _repr_html_(self) -> str:
        from screen.report.notebook import html

        return html(self._data())


class Uncertainty:
    """A Monte Carlo propagation of the case's uncertainties (see :func:`uncertainty`).

    Attributes
    ----------
    result : Screening
        The screening; its ``results["uncertainty"]`` holds :attr:`block`.
    block : dict
        The JSON block of the run (as in ``check --uncertainty --json``).
    cautions : tuple of str
        The cautions of every output.
    """

    def __init__(self, result: Screening, block: dict):
        self.result = result
        self.block = block
        self.cautions = result.cautions

    @property
    def class_probabilities(self):
        """Probability of each criticality class (pandas.DataFrame, index 1..5)."""
        from screen.report.frames import class_probabilities_frame

        return class_probabilities_frame(self.block)

    @property
    def percentiles(self):
        """p5, p50, p95, mean and std of each sampled figure (pandas.DataFrame)."""
        from screen.report.frames import percentiles_frame

        return percentiles_frame(self.block)

    @property
    def sensitivity(self):
        """Spearman rank correlation of each uncertain input (pandas.DataFrame)."""
        from screen.report.frames import sensitivity_frame

        return sensitivity_frame(self.block)

    def to_json_dict(self) -> dict:
        """The JSON block (``results.uncertainty``)."""
        return self.block

    def figure(self, name: str = "sensitivity"):
        """The sensitivity ranking of the PDF as a matplotlib Figure.

        Parameters
        ----------
        name : str
            Figure name; ``"sensitivity"`` (the only one).
        """
        return self.result.figure(name)

    def __repr__(self) -> str:
        from screen.report.notebook import uncertainty_text

        return uncertainty_text(self.block, self.result.case.title)

    def _repr_html_(self) -> str:
        from screen.report.notebook import uncertainty_html

        return uncertainty_html(self.block, self.result.case.title,
                                self.percentiles.to_html(float_format=lambda v: f"{v:.4g}"))


# --------------------------------------------------------------------------------------------


def load_case(path, overrides=None):
    """Load and validate a case file into SI quantities.

    Parameters
    ----------
    path : str or path-like
        TOML case file.
    overrides : mapping, optional
        What-if values, e.g. ``{"process.temperature": "70 degC",
        "vessel.2.coolant_temperature": "5 degC", "process.accumulation": 0.3}``: strings with
        units, numbers for dimensionless keys, True/False for switches (``"KEY=VALUE"`` strings
        as on the command line are accepted too).

    Returns
    -------
    screen.io.case.Case

    Raises
    ------
    CaseFileNotFoundError
        The file does not exist (a :class:`FileNotFoundError` and a
        :class:`~screen.errors.CaseError`).
    CaseError
        Invalid input; the message names the file, the key and what is accepted.
    """
    from screen.io.case import load_case as _load

    return _load(path, overrides=overrides)


def _case(case, overrides=None):
    """A Case from a Case or a path (with optional overrides)."""
    from screen.io.case import Case

    if isinstance(case, Case):
        if overrides:
            from screen.errors import CaseError

            raise CaseError("overrides apply when loading: pass the path, or use "
                            "screen.load_case(path, overrides)", "overrides")
        return case
    return load_case(case, overrides)


def screen_case(case, overrides=None) -> Screening:
    """Screen a case: figures, class, vessel balances and the analyses the case asks for.

    Parameters
    ----------
    case : screen.io.case.Case or str or path-like
        A loaded case, or the path of a case file.
    overrides : mapping, optional
        With a path: what-if values (see :func:`load_case`).

    Returns
    -------
    Screening
        ``results`` in the units named by each key (degC, K, h), tables, figures.
    """
    from screen.runs.screening import screen_case as _screen

    return Screening.of(_screen(_case(case, overrides)))


def _vary_spec(key, value, steps):
    """``KEY=START:STOP:STEPS`` from a ``vary`` entry (a pair, a triple or a string)."""
    from screen.errors import CaseError

    if isinstance(value, str):
        return f"{key}={value}" if value.count(":") == 2 else f"{key}={value}:{steps}"
    try:
        items = list(value)
    except TypeError:
        raise CaseError(f"vary[{key!r}] = {value!r}: give (start, stop) or "
                        f"(start, stop, steps), e.g. ('20 degC', '60 degC')", "vary") from None
    if len(items) == 2:
        items.append(steps)
    if len(items) != 3:
        raise CaseError(f"vary[{key!r}] = {value!r}: give (start, stop) or "
                        f"(start, stop, steps)", "vary")
    start, stop, count = items
    return f"{key}={start}:{stop}:{count}"


def sweep(case, vary: Mapping, steps: int = 21, overrides=None):
    """Rerun a case over a range of one or two inputs and locate where verdicts flip.

    Parameters
    ----------
    case : screen.io.case.Case or str or path-like
        A loaded case or the path of a case file.
    vary : mapping
        One or two inputs to vary: ``{"process.temperature": ("20 degC", "60 degC")}``; a
        value may also be ``(start, stop, steps)`` or ``"20 degC:60 degC:41"``. Numbers for
        dimensionless keys (``{"process.accumulation": (0.1, 0.9)}``).
    steps : int
        Grid points per input when not given per key (2..5000). [-]
    overrides : mapping, optional
        With a path: fixed what-if values applied before the sweep.

    Returns
    -------
    pandas.DataFrame
        One row per grid point (see :func:`screen.report.frames.sweep_frame`); the verdict flips
        in ``attrs["flips"]``, cautions and tool version in ``attrs``.
    """
    from screen.errors import CaseError
    from screen.report.frames import sweep_frame
    from screen.runs.sweep import parse_vary, run_sweep

    loaded = _case(case, overrides)
    if not isinstance(vary, Mapping) or not 1 <= len(vary) <= 2:
        raise CaseError("vary takes a mapping of one or two keys, e.g. "
                        "{'process.temperature': ('20 degC', '60 degC')}", "vary")
    variations = [parse_vary(_vary_spec(key, value, steps), loaded, option="vary")
                  for key, value in vary.items()]
    rows, flips = run_sweep(loaded, variations)
    return sweep_frame(rows, flips, variations, loaded)


def _json_result(item) -> dict:
    """A JSON-ready result dict from a path (.toml case or .json result), a Case, a result or
    a dict."""
    from screen.io.case import Case

    if isinstance(item, ScreeningResult):
        return item.to_json_dict(generated_at=None)
    if isinstance(item, Case):
        return screen_case(item).to_json_dict(generated_at=None)
    if isinstance(item, Mapping):
        return dict(item)
    if str(os.fspath(item)).lower().endswith(".json"):
        from screen.io.result_json import read_result_json

        return read_result_json(item)
    return screen_case(item).to_json_dict(generated_at=None)


def compare(a, b):
    """What changed between two screenings: inputs first, then figures, verdicts marked.

    Parameters
    ----------
    a, b : path, Case, ScreeningResult or dict
        Case files (``.toml``), earlier ``check --json`` outputs (``.json``), loaded cases,
        results, or their JSON dicts.

    Returns
    -------
    pandas.DataFrame
        One row per change (see :func:`screen.report.frames.compare_frame`);
        ``attrs["verdict_changed"]`` is True when a class or vessel verdict changed.
    """
    from screen.report.frames import compare_frame
    from screen.runs.compare import diff_results

    old, new = _json_result(a), _json_result(b)
    input_changes, result_changes = diff_results(old, new)
    return compare_frame(old, new, input_changes, result_changes)


def screen_portfolio(paths, executor=None, workers=None, overrides=None, **options):
    """Screen many case files at once; one table row per case and vessel.

    Parameters
    ----------
    paths : str, path-like or iterable of them
        Case files and/or folders of ``*.toml`` case files.
    executor : object, optional
        Where to run the cases: a ``dask.distributed.Client`` (a cluster), a
        :mod:`concurrent.futures` executor, or None for a local process pool.
    workers : int, optional
        Processes of the local pool (default: the number of CPUs).
    overrides : mapping, optional
        What-if values applied to every case (see :func:`load_case`).
    **options
        ``pdf_dir``, ``force``, ``recursive``, ``generated_at`` of
        :func:`screen.runs.portfolio.screen_portfolio`.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`screen.runs.portfolio.COLUMNS`; a case that failed is one row with its
        ``error``. Cautions and tool version in ``attrs``.
    """
    from screen.report.frames import with_attrs
    from screen.runs.portfolio import screen_portfolio as _portfolio

    if isinstance(paths, (str, os.PathLike)):
        paths = [paths]
    frame = _portfolio(paths, workers=workers, executor=executor, overrides=overrides,
                       **options)
    return with_attrs(frame)


def uncertainty(case, samples: int = 20_000, seed: int = 20261201, overrides=None,
                executor=None) -> Uncertainty:
    """Monte Carlo propagation of the uncertainties the case gives ("135 ± 8 kJ/mol" or an
    ``[uncertainty]`` section).

    Parameters
    ----------
    case : screen.io.case.Case or str or path-like
        A loaded case or the path of a case file.
    samples : int
        Number of samples (10 .. 5,000,000). [-]
    seed : int
        Seed of the random generator (the same seed gives the same numbers). [-]
    overrides : mapping, optional
        With a path: what-if values (see :func:`load_case`).
    executor : object, optional
        Evaluate the blocks of 10,000 samples there, e.g. on a cluster with a
        ``distributed.Client``; the samples are drawn here, so the numbers are the same.

    Returns
    -------
    Uncertainty
        Class probabilities, percentiles and sensitivity as DataFrames; the JSON block.
    """
    from screen.runs.uncertainty import add_uncertainty

    result = screen_case(case, overrides)
    block = add_uncertainty(result, samples=samples, seed=seed, executor=executor)
    return Uncertainty(result, block)
