"""The report figures as matplotlib figures, for notebooks (``ScreeningResult.figure``).

Each function draws one figure of the PDF from the same figure data
(:mod:`screen.report.figure_data`) that the reportlab figures of the PDF
(:mod:`screen.report.figures`) draw, with the same line styles per meaning; nothing is computed
here. matplotlib is an optional extra (``pip install 'runaway-screen[plot]'``); it is imported
inside the functions, without pyplot state (the figures display in Jupyter and can be saved).
"""

from __future__ import annotations

from screen.errors import MissingDependencyError

#: The install hint of the optional plotting extra.
PLOT_EXTRA_HINT = "pip install 'runaway-screen[plot]'"


def require_matplotlib(purpose: str = "figures"):
    """Import and return matplotlib, or raise a one-line :class:`MissingDependencyError`.

    Parameters
    ----------
    purpose : str
        What needs it, for the message (e.g. "the kinetics figures (--png-dir)").
    """
    try:
        import matplotlib
    except ImportError:
        raise MissingDependencyError(f"{purpose} need matplotlib, which is not installed; "
                                     f"install it with {PLOT_EXTRA_HINT}") from None
    return matplotlib
