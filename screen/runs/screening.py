"""The complete screening of one case: the engine's figures plus the runs the case asks for.

:func:`screen.analyses.engine.screen_case` computes the figures, the vessel balances, the
simulation, the pressure and the barrier. The deviation scenarios rerun that engine on changed
copies of the case, so they sit here, above it, and are added to the result afterwards.
"""

from __future__ import annotations

from screen.analyses import engine
from screen.runs.scenarios import add_scenarios


def screen_case(case, curves: bool = True) -> engine.ScreeningResult:
    """Screen ``case`` completely (engine figures, then the ``[scenarios]`` rows if asked).

    Parameters
    ----------
    case : screen.io.case.Case
        A validated case (SI values).
    curves : bool
        Also compute the curves for figures; without curves (sweeps, Monte Carlo samples) the
        scenarios are skipped and their block says so.

    Returns
    -------
    screen.analyses.engine.ScreeningResult
        Figures in the units named by each key (degC, K, h).
    """
    result = engine.screen_case(case, curves=curves)
    if "scenarios" in case.sections:
        add_scenarios(case, result, curves=curves)
    return result
