"""runaway-screen: thermal-runaway screening of exothermic reactions.

Public API (imports are lazy so that ``runaway-screen --help`` stays instant):

- :func:`load_case` -- read and validate a TOML case file into SI quantities.
- :func:`screen_case` -- run the screening engine on a loaded case.
"""

__version__ = "0.1.0"

__all__ = ["__version__", "load_case", "screen_case"]


def load_case(path, overrides=None):
    """Load and validate a case file; see :func:`screen.io.case.load_case`."""
    from screen.io.case import load_case as _load

    return _load(path, overrides=overrides)


def screen_case(case):
    """Screen a loaded case; see :func:`screen.analyses.engine.screen_case`."""
    from screen.runs.screening import screen_case as _screen

    return _screen(case)
