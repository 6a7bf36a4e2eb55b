"""The data of every report figure, taken once from a screening result.

One function per figure turns a :class:`screen.analyses.engine.ScreeningResult` into a
:class:`FigureData`: the keyword arguments of the drawing function (the same name in
:mod:`screen.report.figures`, reportlab, for the PDF, and in :mod:`screen.report.mpl`,
matplotlib, for notebooks) plus notes that the captions need. Both surfaces draw from this data,
so the PDF and ``result.figure(name)`` show the same numbers; every array comes from the engine
(the adiabatic course from MTSR too: ``result.curves["adiabatic_course"]``, integrated on first
use); nothing is computed here.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

#: Names of the figures, in the order of the PDF.
FIGURE_NAMES = ("criticality", "tmrad", "course", "semenov", "simulation", "sensitivity")

#: Legends of the simulated courses after the worst failure (the wording is relied on by tests).
SIMULATED_COURSE_LABEL = "simulated course after failure at the worst time (feed stopped)"
SIMULATED_CONTINUING_LABEL = "simulated course after failure at the worst time (feed continuing)"
ADIABATIC_COURSE_LABEL = "unmitigated: adiabatic decomposition from MTSR"


@dataclass
class FigureData:
    """One figure: which drawing draws it, its arguments and caption notes.

    Attributes
    ----------
    name : str
        Figure name (:data:`FIGURE_NAMES`).
    drawing : str
        Name of the drawing function in :mod:`screen.report.figures` and
        :mod:`screen.report.mpl`.
    arguments : dict
        Keyword arguments of that function (SI unless a name says otherwise).
    notes : dict
        Facts for the caption (e.g. whether the course is simulated).
    """

    name: str
    drawing: str
    arguments: dict[str, Any]
    notes: dict[str, Any] = field(default_factory=dict)


def criticality(result) -> FigureData:
    """The criticality temperature scale (T_p, MTSR, MTT, TD24, TD8, final temperature).

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    results = result.results
    if results.get("criticality_class") is None:
        label = "no criticality class: cannot conclude without decomposition kinetics"
    else:
        label = f"criticality class {results.get('criticality_class')}"
        if results.get("verdict_status", "screened") != "screened":
            label += " at least (crude estimate from the DSC onset)"
    return FigureData("criticality", "temperature_scale",
                      {"temperatures_k": result.curves["temperatures_K"], "class_label": label})


def tmrad(result) -> FigureData:
    """TMRad against the start temperature, with the reported points at T_p and MTSR.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    results = result.results
    temps = result.curves["temperatures_K"]
    grid, tmr = result.curves["tmrad_curve"]
    dec = result.case.sections.get("decomposition")
    lowest = None
    if dec is not None and results.get("decomposition_basis") == "kinetics":
        lowest = dec.get("lowest_measured_temperature") or dec.get("reference_temperature")
    points = [("T_{p}", temps.get("T_p"), results.get("tmrad_at_process_temperature_h")),
              ("MTSR", temps.get("MTSR"), results.get("tmrad_at_mtsr_h"))]
    return FigureData("tmrad", "tmrad_curve",
                      {"temperature_k": grid, "tmrad_s": tmr, "levels_k": temps,
                       "points": points, "lowest_measured_k": lowest},
                      {"extrapolated": bool(lowest),
                       "crude": results.get("decomposition_basis") != "kinetics"})


def simulated_courses(result):
    """Courses after the worst cooling failure from ``curves["simulation"]``, or None.

    Returns a list of (time after the failure [s], temperature [K], failure time [s] or None,
    feed mode): the feed stopped first, then the feed continuing when the simulation gives it.
    Only the arrays named for the course after the failure are used (never the normal run).

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    import numpy as np

    simulation = result.curves.get("simulation") if isinstance(result.curves, dict) else None
    if not isinstance(simulation, dict):
        return None
    courses = []
    for time_key, temperature_key, failure_key, mode in (
            ("time_after_failure_s", "failure_temperature_K", "worst_failure_time_s",
             "feed stopped"),
            ("time_after_failure_feed_continuing_s", "failure_temperature_feed_continuing_K",
             "worst_failure_time_feed_continuing_s", "feed continuing")):
        time, temperature = simulation.get(time_key), simulation.get(temperature_key)
        if time is None or temperature is None:
            continue
        time = np.asarray(time, dtype=float)
        temperature = np.asarray(temperature, dtype=float)
        if time.shape != temperature.shape or time.size < 2:
            continue
        failure = simulation.get(failure_key)
        courses.append((time, temperature, failure, mode))
    if not courses or courses[0][3] != "feed stopped":
        return None
    return courses


def adiabatic_course(result):
    """(time [s], temperature [K], time to maximum rate [s] or None) of the unmitigated
    adiabatic course from MTSR, as the engine gives it in ``curves["adiabatic_course"]``
    (:class:`screen.analyses.courses.AdiabaticCourse`); nothing is computed here.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).

    Raises
    ------
    ScreenError
        The result carries no course (screened without curves), or the course cannot be
        integrated for these kinetics.
    """
    course = result.curves.get("adiabatic_course") if isinstance(result.curves, dict) else None
    if course is None:
        from screen.errors import ModelDomainError

        raise ModelDomainError("the result carries no adiabatic course (screened without "
                               "curves)")
    return course.time_s, course.temperature_K, course.time_to_maximum_rate_s


def barrier_course_label(results) -> str:
    """Legend of the barrier line of the course figure: what the barrier at the MTT does, with
    the verdict of the barrier analysis (never a verdict of its own).

    Parameters
    ----------
    results : dict
        ``result.results`` (its ``barrier`` member, when present).
    """
    barrier = results.get("barrier") if isinstance(results.get("barrier"), dict) else None
    verdict = barrier.get("verdict") if barrier is not None and barrier.get("assessed") else None
    if verdict == "holds":
        return "with the barrier (HOLDS): boiling keeps the mass at the MTT"
    if verdict:
        return (f"barrier {str(verdict).upper()}: boiling would have to keep the mass at the "
                f"MTT")
    return "barrier not assessed: boiling or relief would have to keep the mass at the MTT"


def course(result) -> FigureData:
    """Temperature course after a cooling failure: simulated when the case has a simulation,
    else T_p -> MTSR at once and the adiabatic decomposition from MTSR.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).

    Raises
    ------
    ScreenError
        No simulation and the adiabatic course cannot be computed.
    """
    temps = result.curves["temperatures_K"]
    levels = {"MTT": temps.get("MTT"), "TD24": temps.get("TD24")}
    courses = simulated_courses(result)
    if courses is not None:
        time, temperature, failure, _ = courses[0]
        extra, continuing = [], None
        for other_time, other_temperature, other_failure, mode in courses[1:]:
            if mode == "feed continuing":
                extra.append((other_time, other_temperature, SIMULATED_CONTINUING_LABEL))
                continuing = other_failure
        return FigureData("course", "temperature_course",
                          {"time_s": time, "temperature_k": temperature, "levels_k": levels,
                           "process_temperature_k": temps.get("T_p"),
                           "time_to_maximum_rate_s": None, "jump_at_start": False,
                           "label": SIMULATED_COURSE_LABEL, "extra_courses": extra,
                           "barrier_label": barrier_course_label(result.results)},
                          {"source": "simulation", "failure_time_s": failure,
                           "failure_time_feed_continuing_s": continuing,
                           "feed_continuing": bool(extra)})
    time, temperature, time_max = adiabatic_course(result)
    return FigureData("course", "temperature_course",
                      {"time_s": time, "temperature_k": temperature, "levels_k": levels,
                       "process_temperature_k": temps.get("T_p"),
                       "time_to_maximum_rate_s": time_max, "jump_at_start": True,
                       "label": ADIABATIC_COURSE_LABEL,
                       "barrier_label": barrier_course_label(result.results)},
                      {"source": "adiabatic"})


def semenov(result) -> list[FigureData]:
    """One Semenov diagram per vessel, in the order of the vessels.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    curves = (result.curves.get("vessels") if isinstance(result.curves, dict) else None) or []
    return [FigureData("semenov", "semenov_diagram", {"curve": curve},
                       {"vessel": curve.get("name", "")}) for curve in curves]


def simulation(result) -> FigureData | None:
    """Normal-operation temperature and MTSR(t) over the run, when the simulation gives them.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    curve = result.curves.get("simulation") if isinstance(result.curves, dict) else None
    return simulation_from_curve(curve)


def simulation_from_curve(curve) -> FigureData | None:
    """Run-profile data from ``curves["simulation"]`` (None without a usable run).

    Parameters
    ----------
    curve : dict or None
        ``curves["simulation"]`` of a result (SI arrays), or None.
    """
    if not isinstance(curve, dict):
        return None
    time = curve.get("time_s")
    mtsr = curve.get("mtsr_K")
    if time is None or mtsr is None or len(time) != len(mtsr) or len(time) < 2:
        return None
    temperature = curve.get("temperature_K")
    series = [("MTSR if the cooling fails at this moment (feed stopped)", mtsr, "accent")]
    if temperature is not None and len(temperature) == len(time):
        series.insert(0, ("temperature in normal operation", temperature, "ink"))
    return FigureData("simulation", "run_profile",
                      {"time_s": time, "series": series, "levels_k": {"MTT": curve.get("mtt_K")},
                       "marker_time_s": curve.get("worst_failure_time_s")})


def sensitivity(result) -> FigureData | None:
    """The sensitivity ranking of the Monte Carlo run (``curves["uncertainty"]``), if any.

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    curve = result.curves.get("uncertainty") if isinstance(result.curves, dict) else None
    return sensitivity_from_curve(curve)


def sensitivity_from_curve(curve) -> FigureData | None:
    """Bar-chart data from ``curves["uncertainty"]``: ``names`` with ``values`` (and optionally
    ``values_tmrad``), or ``{"sensitivity": {input: value}}``, or ``[(input, value)]``.

    Parameters
    ----------
    curve : dict, list or None
        ``curves["uncertainty"]`` of a result, or None.
    """
    names = values = second = None
    label = "sensitivity [-]"
    if isinstance(curve, dict):
        label = curve.get("label", label)
        source = curve.get("sensitivity")
        if isinstance(source, dict) and all(isinstance(v, (int, float))
                                            for v in source.values()):
            names, values = list(source), [float(v) for v in source.values()]
        elif "names" in curve and "values" in curve:
            names, values = list(curve["names"]), [float(v or 0.0) for v in curve["values"]]
            if curve.get("values_tmrad") is not None and \
                    len(curve["values_tmrad"]) == len(names):
                second = [float(v or 0.0) for v in curve["values_tmrad"]]
    elif isinstance(curve, (list, tuple)) and curve and all(len(item) == 2 for item in curve):
        names, values = [n for n, _ in curve], [float(v) for _, v in curve]
    if not names:
        return None
    series = ("with the margin T_{D24} − MTSR", "with TMRad at MTSR") if second else None
    if second:
        label = "Spearman rank correlation [-]"
    return FigureData("sensitivity", "sensitivity_bars",
                      {"names": names, "values": values, "value_label": label,
                       "second_values": second, "series_labels": series},
                      {"two_measures": bool(second)})


def available(result) -> list[str]:
    """Names of the figures this result can draw (``semenov`` once per vessel: ``semenov``,
    ``semenov:2``, ...).

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    """
    names = ["criticality", "tmrad", "course"]
    count = len(semenov(result))
    names += ["semenov" if index == 1 else f"semenov:{index}" for index in range(1, count + 1)]
    if simulation(result) is not None:
        names.append("simulation")
    if sensitivity(result) is not None:
        names.append("sensitivity")
    return names


def figure_data(result, name: str) -> FigureData:
    """The data of the figure ``name`` (see :func:`available`).

    Parameters
    ----------
    result : ScreeningResult
        Result of the engine (figures in SI, curves in ``result.curves``).
    name : str
        Figure name, e.g. ``criticality``, ``tmrad``, ``semenov:2``.

    Raises
    ------
    CaseError
        Unknown name, or a figure this result has no data for; the message lists the names.
    """
    from screen.errors import CaseError

    known = available(result)
    key, _, number = str(name).partition(":")
    data = None
    if key in ("criticality", "tmrad", "course"):
        data = globals()[key](result)
    elif key == "semenov":
        diagrams = semenov(result)
        vessel = _vessel_index(number, diagrams)
        if vessel is not None:
            data = diagrams[vessel]
    elif key in ("simulation", "sensitivity") and not number:
        data = globals()[key](result)
    if data is None:
        raise CaseError(f"no figure {name!r} for this result; available: {', '.join(known)}",
                        "figure")
    return data


def _vessel_index(number: str, diagrams):
    if not diagrams:
        return None
    if not number:
        return 0
    try:
        index = int(number)
    except ValueError:
        names = [d.notes["vessel"] for d in diagrams]
        return names.index(number) if number in names else None
    return index - 1 if 1 <= index <= len(diagrams) else None
