"""The MTSR that governs the verdict, and the assumptions the verdict rests on.

The criticality class, the final temperature, the severity, TMRad at MTSR, the probability and
the onset margin all rest on ONE temperature: the governing MTSR. It is the highest of

- the MTSR from the stated accumulation (``[process]``, Stoessel 1993);
- the feed-stopped MTSR of the cooling-failure simulation (with ``[synthesis_kinetics]``);
- in semi-batch, unless ``process.feed_interlock = true`` is declared, the temperature the mass
  reaches when the feed runs on after the cooling failure: simulated where
  ``[synthesis_kinetics]`` exists, otherwise the bound T_p + dT_ad of the full charge (derived:
  the whole synthesis heat ends in the final mass). Absent is the fail-closed default.

Ties go to the more critical side: candidates within :data:`MTSR_TOLERANCE` of the highest are
treated as equal and the highest value is used (design). Nothing here reads files or prints.
"""

from __future__ import annotations

from dataclasses import dataclass

from screen.constants import ZERO_CELSIUS

#: Numerical tolerance below which two MTSR candidates count as equal [K] (design: the
#: simulation reports temperatures to ~1e-6 K; this only decides which basis is named, the
#: value used is always the highest).
MTSR_TOLERANCE = 1e-6

#: Source codes of the governing MTSR (JSON ``results.mtsr_governing_source``).
SOURCES = ("stated", "simulation-feed-stopped", "simulation-feed-continuing",
           "feed-continuing-bound")

_BASIS_TEXT = {
    "stated": "MTSR from the stated accumulation ([process])",
    "simulation-feed-stopped": "simulated MTSR, feed stopped at the worst failure time",
    "simulation-feed-continuing": "simulated temperature with the feed continuing after the "
                                  "cooling failure",
    "feed-continuing-bound": "bound with the feed continuing: T_p + dT_ad of the full charge",
}


@dataclass(frozen=True)
class GoverningMtsr:
    """The governing MTSR and where it comes from.

    Attributes
    ----------
    temperature : float
        Governing MTSR. [K]
    source : str
        One of :data:`SOURCES`.
    feed_mode : str
        ``"batch"``, ``"stopped"`` or ``"continuing"`` (JSON ``results.mtsr_feed_mode``).
    candidates : dict
        Source code -> temperature [K] of every candidate considered.
    interlock : bool or None
        ``process.feed_interlock`` as declared (None: not declared; batch: None).
    """

    temperature: float
    source: str
    feed_mode: str
    candidates: dict
    interlock: bool | None

    @property
    def basis(self) -> str:
        """Plain-language basis of the governing MTSR."""
        return _BASIS_TEXT[self.source]


def feed_continuing_bound(process_temperature, synthesis_rise):
    """Upper bound of the temperature reached when the feed runs on after a cooling failure.

    With the feed continuing, the whole charge reacts in the final mass without cooling, so the
    mass reaches at most T_p + dT_ad,synthesis (adiabatic energy balance, derived; the feed at a
    temperature below T_p lowers this, neglected on the safe side).

    Parameters
    ----------
    process_temperature : float
        T_p. [K]
    synthesis_rise : float
        Adiabatic temperature rise of the full synthesis, per kg of final mass. [K]

    Returns
    -------
    float
        Bound. [K]

    Examples
    --------
    >>> feed_continuing_bound(323.15, 92.4)
    415.54999999999995
    """
    return float(process_temperature) + float(synthesis_rise)


def govern_mtsr(case, stated_mtsr, synthesis_rise, simulation=None) -> GoverningMtsr:
    """Decide the governing MTSR of a case.

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case (``process.mode``, ``process.feed_interlock``, ``process.temperature``).
    stated_mtsr : float
        MTSR from the stated accumulation. [K]
    synthesis_rise : float
        Adiabatic rise of the full synthesis. [K]
    simulation : dict, optional
        ``results["simulation"]`` of the cooling-failure simulation (temperatures in degC).

    Returns
    -------
    GoverningMtsr
    """
    process = case.sections["process"]
    semi_batch = process.mode == "semi-batch"
    interlock = process.get("feed_interlock") if semi_batch else None
    candidates = {"stated": float(stated_mtsr)}
    if isinstance(simulation, dict):
        stopped = simulation.get("mtsr_feed_stopped_degC")
        if _number(stopped):
            candidates["simulation-feed-stopped"] = float(stopped) + ZERO_CELSIUS
    if semi_batch and interlock is not True:
        continuing = (simulation.get("mtsr_feed_continuing_degC")
                      if isinstance(simulation, dict) else None)
        if _number(continuing):
            candidates["simulation-feed-continuing"] = float(continuing) + ZERO_CELSIUS
        else:
            candidates["feed-continuing-bound"] = feed_continuing_bound(
                process.temperature, synthesis_rise)
    highest = max(candidates.values())
    # The first source (in the order of SOURCES) within the tolerance names the basis.
    source = next(name for name in SOURCES if name in candidates
                  and candidates[name] >= highest - MTSR_TOLERANCE)
    if not semi_batch:
        feed_mode = "batch"
    elif source in ("simulation-feed-continuing", "feed-continuing-bound"):
        feed_mode = "continuing"
    else:
        feed_mode = "stopped"
    return GoverningMtsr(temperature=highest, source=source, feed_mode=feed_mode,
                         candidates=candidates, interlock=interlock)


def _number(value) -> bool:
    import math

    return isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)


def governing_warnings(governing: GoverningMtsr, stated_class, governing_class) -> list[str]:
    """Warnings that say what the governing MTSR changes against the stated accumulation.

    Parameters
    ----------
    governing : GoverningMtsr
        The governing MTSR decided by :func:`govern_mtsr`.
    stated_class : int or None
        Class at the stated MTSR.
    governing_class : int or None
        Class at the governing MTSR.

    Returns
    -------
    list of str
    """
    out = []
    stated = governing.candidates["stated"] - ZERO_CELSIUS
    value = governing.temperature - ZERO_CELSIUS
    if governing.interlock is None and governing.feed_mode != "batch":
        out.append("process.feed_interlock is not declared: the verdict assumes that the feed "
                   "runs on after a cooling failure (fail-closed default). Declare "
                   "process.feed_interlock = true if an interlock stops the dosing on cooling "
                   "failure or high temperature, or false if none does.")
    if governing.source != "stated":
        change = ""
        if stated_class is not None and governing_class is not None \
                and governing_class != stated_class:
            change = f"; the class is {governing_class} instead of {stated_class}"
        out.append(f"The verdict rests on the {governing.basis} ({value:.1f} degC), higher than "
                   f"the MTSR from the stated accumulation ({stated:.1f} degC){change}: every "
                   f"figure derived from MTSR uses {value:.1f} degC.")
    return out


# --------------------------------------------------------------------------------------------
# Assumptions of the verdict


def _assumption(key, value, basis, text) -> dict:
    return {"key": key, "value": value, "basis": basis, "text": text}


def _feed_assumption(governing: GoverningMtsr):
    if governing.feed_mode == "batch":
        return None
    if governing.interlock is True:
        return _assumption("process.feed_interlock", True, "declared",
                           "Feed interlock declared: dosing stops on cooling failure; MTSR with "
                           "the feed stopped.")
    if governing.interlock is False:
        return _assumption("process.feed_interlock", False, "declared",
                           "No feed interlock (declared): the feed may run on; MTSR is the "
                           "higher of feed stopped and feed continuing.")
    return _assumption("process.feed_interlock", False, "default",
                       "Feed interlock not declared: feed assumed to run on after a cooling "
                       "failure (fail closed); declare process.feed_interlock.")


def _accumulation_assumptions(case, results) -> list[dict]:
    """One item: the stated (or default) accumulation with its source, the mass ratio in
    semi-batch and the simulated maximum where a simulation ran."""
    process = case.sections["process"]
    accumulation = results["accumulation"]
    if process.given("accumulation"):
        basis = "declared"
        text = f"Accumulation X_ac {accumulation:.3g}: " + (process.accumulation_basis or (
            "stated (reaction calorimetry)" if process.mode == "semi-batch" else "stated"))
    else:
        basis = "default"
        text = f"Accumulation X_ac {accumulation:.3g}: batch, all charged at the start"
    if process.mode == "semi-batch":
        from screen.analyses.inputs import accumulation_mass_ratio

        ratio, ratio_basis = accumulation_mass_ratio(case)
        text += f"; mass ratio {ratio:.3g} ({ratio_basis})"
    simulation = results.get("simulation")
    if isinstance(simulation, dict) and simulation.get("accumulation_max") is not None:
        text += f"; simulated maximum {simulation['accumulation_max']:.3g}"
    return [_assumption("process.accumulation", accumulation, basis, text + ".")]


def _mtt_assumption(case, results) -> dict:
    process = case.sections["process"]
    mtt = results["mtt_degC"]
    if process.max_technical_temperature is not None:
        what = process.mtt_basis or "as given in the case"
        return _assumption("process.max_technical_temperature", mtt, "declared",
                           f"MTT {mtt:.1f} degC: {what}.")
    solvent = case.sections["solvent"]
    pressure = solvent.pressure
    at = "1.01325 bar (default)" if pressure is None else f"{pressure / 1e5:.4g} bar"
    return _assumption("process.max_technical_temperature", mtt, "derived",
                       f"MTT {mtt:.1f} degC: boiling point of {solvent.name} at {at}.")


def _decomposition_assumption(results) -> dict:
    if results["decomposition_basis"] == "onset-estimate":
        return _assumption("decomposition.model", "onset-estimate", "derived",
                           "Decomposition: CRUDE estimate from the DSC onset (no kinetics); no "
                           "class below 4 granted.")
    return _assumption("decomposition.model", results["decomposition_model"], "declared",
                       f"Decomposition: {results['decomposition_model']} kinetics from the "
                       f"case (measured).")


def assumptions(case, results, governing: GoverningMtsr) -> list[dict]:
    """The assumptions the verdict rests on, each ``{"key", "value", "basis", "text"}``.

    ``basis`` is ``"declared"`` (stated in the case), ``"default"`` (the tool's fail-closed or
    conventional default) or ``"derived"`` (computed from other inputs).

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case (SI values).
    results : dict
        ``ScreeningResult.results`` with the core figures.
    governing : GoverningMtsr
        The governing MTSR decided by :func:`govern_mtsr`.

    Returns
    -------
    list of dict
        JSON-ready.
    """
    out = []
    feed = _feed_assumption(governing)
    if feed is not None:
        out.append(feed)
    out.extend(_accumulation_assumptions(case, results))
    out.append(_mtt_assumption(case, results))
    out.append(_assumption(
        "phi", 1.0, "default",
        "phi = 1: heat capacity of the vessel neglected (adiabatic, large vessel)."))
    out.append(_decomposition_assumption(results))
    return out


def verdict_basis_lines(results) -> list[str]:
    """A few lines saying what the verdict rests on (terminal first screen, PDF page 1).

    Parameters
    ----------
    results : dict
        ``ScreeningResult.results`` with ``assumptions`` and the governing MTSR.

    Returns
    -------
    list of str
        Plain text, one statement per line (unwrapped).
    """
    klass = results.get("criticality_class")
    head = ("No class granted" if klass is None else f"Class {klass}")
    lines = [f"{head} on MTSR {results['mtsr_governing_degC']:.1f} degC: "
             f"{results['mtsr_governing_basis']}."]
    shown = ("process.feed_interlock", "process.accumulation", "process.max_technical_temperature",
             "decomposition.model", "phi")
    by_key = {item["key"]: item for item in results["assumptions"]}
    lines.extend(f"{by_key[key]['text']} [{by_key[key]['basis']}]" for key in shown
                 if key in by_key)
    return lines


def add_assumptions(case, result, governing: GoverningMtsr) -> None:
    """Add ``results["assumptions"]`` and ``results["verdict_basis_lines"]`` (engine step).

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case (SI values).
    result : screen.analyses.engine.ScreeningResult
        Result with the core figures; changed in place.
    governing : GoverningMtsr
        The governing MTSR decided by :func:`govern_mtsr`.
    """
    r = result.results
    r["assumptions"] = assumptions(case, r, governing)
    r["verdict_basis_lines"] = verdict_basis_lines(r)
