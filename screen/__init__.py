"""runaway-screen: thermal-runaway screening of exothermic reactions.

Public API (``docs/python-api.md`` walks through it). Importing :mod:`screen` is light: numpy,
scipy, pandas and the engine are imported on first use, so that ``runaway-screen --help`` and
``import screen`` stay instant.

- :func:`load_case` -- read and validate a TOML case file (optional what-if overrides).
- :func:`screen_case` -- screen a case; the result has ``to_frame()``, ``vessels_frame()``,
  ``to_json_dict()``, ``figure(name)`` and a notebook display.
- :func:`sweep`, :func:`compare`, :func:`screen_portfolio` -- DataFrames.
- :func:`uncertainty` -- Monte Carlo propagation; class probabilities and percentiles as frames.

Every result carries the cautions: a screening aid; results depend on input data quality; a
qualified process-safety review, local codes and regulations, and licensed practice decide.
"""

__version__ = "0.1.0"

__all__ = ["__version__", "compare", "load_case", "screen_case", "screen_portfolio", "sweep",
           "uncertainty"]


def load_case(path, overrides=None):
    """Load and validate a case file; see :func:`screen.api.load_case`.

    Parameters
    ----------
    path : str or path-like
        TOML case file.
    overrides : mapping, optional
        What-if values such as ``{"process.temperature": "70 degC"}`` (strings with units; numbers
        for dimensionless keys).
    """
    from screen import api

    return api.load_case(path, overrides)


def screen_case(case, overrides=None):
    """Screen a case (or a case file); see :func:`screen.api.screen_case`.

    Parameters
    ----------
    case : Case or str or path-like
        A loaded case, or the path of a case file.
    overrides : mapping, optional
        With a path: what-if values (see :func:`load_case`).
    """
    from screen import api

    return api.screen_case(case, overrides)


def sweep(case, vary, steps=21, overrides=None):
    """Rerun a case over one or two inputs (DataFrame); see :func:`screen.api.sweep`.

    Parameters
    ----------
    case : Case or str or path-like
        A loaded case, or the path of a case file.
    vary : mapping
        One or two inputs to vary, e.g. ``{"process.temperature": ("20 degC", "60 degC")}`` (values
        with units; numbers for dimensionless keys).
    steps : int
        Grid points per input when not given per key. [-]
    overrides : mapping, optional
        With a path: fixed what-if values.
    """
    from screen import api

    return api.sweep(case, vary, steps=steps, overrides=overrides)


def compare(a, b):
    """What changed between two screenings (DataFrame); see :func:`screen.api.compare`.

    Parameters
    ----------
    a : path, Case, ScreeningResult or dict
        The earlier screening (case file, ``check --json`` output, case, result or its JSON dict).
    b : path, Case, ScreeningResult or dict
        The later screening, same forms.
    """
    from screen import api

    return api.compare(a, b)


def screen_portfolio(paths, executor=None, workers=None, overrides=None, **options):
    """Screen many case files (DataFrame); see :func:`screen.api.screen_portfolio`.

    Parameters
    ----------
    paths : str, path-like or iterable of them
        Case files and/or folders of ``*.toml`` case files.
    executor : object, optional
        A ``dask.distributed.Client``, a :mod:`concurrent.futures` executor, or None for a local
        process pool.
    workers : int, optional
        Processes of the local pool (default: the number of CPUs). [-]
    overrides : mapping, optional
        What-if values applied to every case.
    **options
        ``pdf_dir``, ``force``, ``recursive``, ``generated_at``; any other keyword is rejected with
        a TypeError.
    """
    from screen import api

    return api.screen_portfolio(paths, executor=executor, workers=workers,
                                overrides=overrides, **options)


def uncertainty(case, samples=20_000, seed=20261201, overrides=None, executor=None):
    """Monte Carlo propagation; see :func:`screen.api.uncertainty`.

    Parameters
    ----------
    case : Case or str or path-like
        A loaded case, or the path of a case file.
    samples : int
        Number of samples (10 .. 5,000,000). [-]
    seed : int
        Seed of the random generator (the same seed gives the same numbers). [-]
    overrides : mapping, optional
        With a path: what-if values (see :func:`load_case`).
    executor : object, optional
        Evaluate the sample blocks there (e.g. a ``distributed.Client``).
    """
    from screen import api

    return api.uncertainty(case, samples=samples, seed=seed, overrides=overrides,
                           executor=executor)
