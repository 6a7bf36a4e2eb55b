"""Cooling-failure simulation of the case's batch or semi-batch run (engine feature).

Reads ``[synthesis_kinetics]`` (kinetics, charge, dosing) and the vessel it names, integrates the
reactor balances of :mod:`screen.models.reactor` for normal operation, scans the cooling-failure
time over the whole run (feed stopped and feed continuing) and adds ``results["simulation"]``,
``curves["simulation"]``, warnings and the method text to the screening result.

Hooks (called automatically when this module exists):

- :func:`check_case` by :mod:`screen.io.case` at load time (cross-field rules, raises CaseError);
- :func:`add_simulation` by :mod:`screen.analyses.engine` with ``[synthesis_kinetics]``.

Nothing here reads files or prints. Design choices are marked "design".
"""

from __future__ import annotations

import math
from typing import Any

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import CaseError, ModelDomainError, SolverError
from screen.io.simulation_inputs import (  # noqa: F401
    DEFAULT_ACCUMULATION_LIMIT,
    MAXIMUM_END_TIME,
    SimulationInputs,
    _case_key,
    _key,
    _model_objects,
    check_case,
    parse_feed_profile,
    resolve_inputs,
)
from screen.units import to_celsius as _c

__all__ = [
    "DEFAULT_ACCUMULATION_LIMIT",
    "FULL_SCAN_POINTS",
    "QUICK_SCAN_POINTS",
    "DecompositionSource",
    "SimulationInputs",
    "add_simulation",
    "check_case",
    "parse_feed_profile",
    "resolve_inputs",
]

#: Failure times per feed mode with a full adiabatic continuation (check with curves).
FULL_SCAN_POINTS = 100
#: Failure times per feed mode in sweeps, Monte Carlo and scenario variants (curves=False).
QUICK_SCAN_POINTS = 30
#: Simulated time after each failure (the usual TMRad horizon; design). [s]
FAILURE_DURATION = 24.0 * SECONDS_PER_HOUR
#: A default end time is extended until the accumulation left at the end is below this. [-]
END_ACCUMULATION = 0.005
#: Simulated MTSR above the case MTSR by more than this is warned about. [K] (design)
MTSR_WARNING_MARGIN = 1.0

_SI_UNIT_OF_SCHEME = {"first-order": "1/s", "second-order": "m^3/(mol*s)"}
_UNIT_TEXT_OF_SCHEME = {"first-order": "1/s (e.g. \"2.5e-4 1/s\")",
                        "second-order": "m^3/(mol s) or L/(mol s) (e.g. \"2e-4 L/(mol s)\")"}




# --------------------------------------------------------------------------------------------
# Feed profile text
# --------------------------------------------------------------------------------------------





# --------------------------------------------------------------------------------------------
# Inputs resolved from the case (SI, defaults applied, contradictions rejected)
# --------------------------------------------------------------------------------------------


















def _check_rate_unit(case, inputs: SimulationInputs) -> None:
    """The rate constant's dimension must match the scheme (1/s or m^3/(mol s))."""
    key = _key(inputs.rate_key)
    expected = _SI_UNIT_OF_SCHEME[inputs.scheme]
    for record in case.inputs:
        if record.key == key and record.unit and record.unit != expected:
            raise CaseError(
                f"got {record.text!r}, a {'first' if record.unit == '1/s' else 'second'}-order "
                f"rate constant, but scheme = {inputs.scheme!r} needs "
                f"{_UNIT_TEXT_OF_SCHEME[inputs.scheme]}", key, case.path)


# --------------------------------------------------------------------------------------------
# Decomposition heat source (fast scalar view of DecompositionKinetics)
# --------------------------------------------------------------------------------------------


class DecompositionSource:
    """Heat release of a :class:`screen.models.decomposition.DecompositionKinetics` for the reactor.

    Same law as ``DecompositionKinetics.heat_release_rate`` (module docstring there)::

        q(T, a) = Q/(1 - a0) A exp(-E/(R T)) f(a),   f = 1, (1 - a)^n or a^m (1 - a)^n
        zero order: q = Q A exp(-E/(R T)) while a < 1, and 0 once a >= 1 (design)

    evaluated with plain float arithmetic, because the stiff solver calls it thousands of times
    per continuation. Zero order keeps the fresh-mass rate until the energy is released and then
    stops (design): without the stop a zero-order decomposition would heat the mass for ever.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Scalar kinetics (not Monte Carlo arrays).

    Attributes
    ----------
    energy : float
        Q, heat still released from a0 to complete decomposition. [J/kg]
    initial_conversion : float
        a0. [-]
    """

    def __init__(self, kinetics):
        import numpy as np

        values = [np.asarray(getattr(kinetics, name)) for name in (
            "energy", "activation_energy", "log_pre_exponential_factor", "order",
            "autocatalytic_order", "initial_conversion")]
        if any(value.ndim for value in values):
            raise ModelDomainError("the simulation needs scalar decomposition kinetics, not "
                                   "sampled arrays", "decomposition")
        energy, activation_energy, log_factor, order, autocatalytic, initial = map(float, values)
        self.model = kinetics.model
        self.energy = energy
        self.initial_conversion = initial
        self.activation_temperature = activation_energy / GAS_CONSTANT
        self.order = 0.0 if self.model == "zero-order" else order
        self.autocatalytic_order = autocatalytic if self.model == "autocatalytic" else 0.0
        self.log_prefactor = math.log(energy) + log_factor
        if self.model != "zero-order":
            self.log_prefactor -= math.log1p(-initial)

    def _scalar(self, temperature: float, conversion: float) -> float:
        if not temperature > 0.0:
            raise ModelDomainError(f"temperature must be > 0 K, got {temperature}", "temperature")
        log_q = self.log_prefactor - self.activation_temperature / temperature
        if self.model == "zero-order":
            if conversion >= 1.0:
                return 0.0
        else:
            if conversion >= 1.0:
                return 0.0
            if self.order:
                log_q += self.order * math.log1p(-conversion)
            if self.model == "autocatalytic" and self.autocatalytic_order:
                if conversion <= 0.0:
                    return 0.0
                log_q += self.autocatalytic_order * math.log(conversion)
        if log_q > 709.0:
            raise SolverError(f"decomposition heat release rate overflows at {temperature:.6g} K")
        return math.exp(log_q)

    def heat_release_rate(self, temperature, conversion=None):
        """Specific heat release rate.

        Parameters
        ----------
        temperature : float or array_like
            Temperature. [K]
        conversion : float or array_like, optional
            Decomposition conversion a; default a0. [-]

        Returns
        -------
        float or numpy.ndarray
            q. [W/kg]
        """
        if conversion is None:
            conversion = self.initial_conversion
        # Fast path for the solver's scalar calls (numpy float64 is a float subclass).
        if isinstance(temperature, float) and isinstance(conversion, float):
            return self._scalar(temperature, conversion)
        import numpy as np

        if np.ndim(temperature) == 0 and np.ndim(conversion) == 0:
            return self._scalar(float(temperature), float(conversion))
        temperature, conversion = np.broadcast_arrays(np.asarray(temperature, dtype=float),
                                                      np.asarray(conversion, dtype=float))
        return np.array([self._scalar(t, a) for t, a in zip(temperature.ravel(),
                                                            conversion.ravel())]
                        ).reshape(temperature.shape)


# --------------------------------------------------------------------------------------------
# Engine hook
# --------------------------------------------------------------------------------------------



def _h(seconds):
    if seconds is None or not math.isfinite(seconds):
        return None
    return float(seconds) / SECONDS_PER_HOUR


def _hours_text(seconds) -> str:
    if seconds is None or not math.isfinite(seconds):
        return f"not within {FAILURE_DURATION / SECONDS_PER_HOUR:.0f} h"
    hours = seconds / SECONDS_PER_HOUR
    if hours < 1.0:
        return f"{hours * 60.0:.0f} min"
    return f"{hours:.1f} h"


def _vessel_cooling(case, inputs: SimulationInputs):
    """(vessel section, UA [W/K], coolant temperature [K], note) of the simulated vessel."""
    from screen.analyses.vessels import vessel_geometry

    vessel = case.vessels[inputs.vessel_index]
    _, _, area, _, _ = vessel_geometry(case, vessel, inputs.vessel_key)
    ua = float(vessel.heat_transfer_coefficient) * area
    coolant = float(vessel.coolant_temperature)
    note = f"U A = {ua:.4g} W/K at the final fill, constant (design)"
    losses = float(vessel.heat_losses or 0.0)
    if losses > 0.0:
        # Losses are a second conductance to ambient: one equivalent line (as the vessels).
        from screen.models.semenov import effective_cooling

        ua, coolant = effective_cooling(ua, coolant, losses, float(vessel.ambient_temperature))
        note += f"; heat losses {losses:.4g} W/K to ambient added"
    return vessel, ua, coolant, note


def _decomposition_for(case, result):
    kinetics = result.curves.get("kinetics") if isinstance(result.curves, dict) else None
    if kinetics is None:
        from screen.analyses.inputs import decomposition_kinetics

        kinetics, _ = decomposition_kinetics(case)
    return DecompositionSource(kinetics)


def _failure_course(continuation, points: int = 300):
    """(time after failure [s], temperature [K]) sampled densely for a figure."""
    import numpy as np

    start = continuation.failure_time
    even = np.linspace(start, start + continuation.duration, points)
    times = np.union1d(even, continuation.time)
    temperature = continuation.state_at(times)["temperature"]
    return times - start, np.asarray(temperature, dtype=float)


def _specific_synthesis_heat_rate(kinetics, state: dict, density: float) -> float:
    """Heat release rate of the desired reaction per kg of the mass present [W/kg].

    ``(-dH_r) r V / m`` with ``r V = k n_A n_B / V`` (second order, V = m / rho) or ``k n_X``
    (first order), the rate law of :class:`screen.models.reactor.SynthesisKinetics`.
    """
    temperature = float(state["temperature"])
    mass = float(state["mass"])
    moles_a = max(float(state["moles_a"]), 0.0)
    moles_b = max(float(state["moles_b"]), 0.0)
    k = kinetics.rate_constant(temperature)
    if kinetics.scheme == "second-order":
        rate_times_volume = k * moles_a * moles_b * density / mass
    else:
        rate_times_volume = k * (moles_a if kinetics.first_order_reagent == "A" else moles_b)
    return -kinetics.molar_enthalpy * rate_times_volume / mass


def add_simulation(case, result, curves: bool = True) -> None:
    """Simulate the run, scan the cooling-failure time and add the results (engine hook).

    Adds ``result.results["simulation"]`` (JSON-ready, units in the key names, ``None`` for
    "never reached within the simulated 24 h"), ``result.curves["simulation"]`` (arrays in s and
    K, with ``curves=True``), the method text and warnings.

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case with ``[synthesis_kinetics]``.
    result : screen.analyses.engine.ScreeningResult
        Result of the core screening, extended in place.
    curves : bool
        True: full scan (:data:`FULL_SCAN_POINTS` failure times per feed mode) and curves; False:
        quick scan (:data:`QUICK_SCAN_POINTS`), no curves (sweeps, Monte Carlo, scenarios).

    Raises
    ------
    CaseError
        Input the model rejects, naming the key.
    SolverError
        The integration failed.
    """
    from screen.models.reactor import Cooling

    path = case.path
    sections = case.sections
    cp = float(sections["mass"].specific_heat)
    inputs = resolve_inputs(sections, case.vessels, path, [])
    _check_rate_unit(case, inputs)
    kinetics, charge, feed = _model_objects(inputs, cp, path)
    vessel, ua, coolant, cooling_note = _vessel_cooling(case, inputs)
    cooling = Cooling(ua=ua, coolant_temperature=coolant)
    decomposition = _decomposition_for(case, result)
    mtt = float(result.curves["temperatures_K"]["MTT"])
    scan_points = FULL_SCAN_POINTS if curves else QUICK_SCAN_POINTS
    run = _SimulationRun(case, inputs, kinetics, charge, feed, cooling, decomposition, mtt,
                         scan_points, curves)
    _integrate_and_scan(run)
    _derive_figures(run, result)
    _add_simulation_warnings(run, result, vessel.name)
    method = _method_text(run, vessel.name, cooling_note)
    result.methods["simulation"] = method
    results = _simulation_results(run, vessel.name, method)
    results["summary_lines"] = _summary_lines(results, scan_points)
    result.results["simulation"] = results
    if curves:
        result.curves["simulation"] = _simulation_curves(run)


class _SimulationRun:
    """What one simulation of the case computes, step by step (see :func:`add_simulation`)."""

    def __init__(self, case, inputs, kinetics, charge, feed, cooling, decomposition, mtt,
                 scan_points, curves):
        self.case, self.inputs, self.kinetics, self.charge = case, inputs, kinetics, charge
        self.feed, self.cooling, self.decomposition = feed, cooling, decomposition
        self.mtt, self.scan_points, self.curves = mtt, scan_points, curves
        process = case.sections["process"]
        self.t_p = float(process.temperature)
        self.stated = float(process.accumulation) if process.given("accumulation") else None


def _integrate_and_scan(run) -> None:
    """Normal operation (end time extended until the synthesis is over), the scan of the
    failure time and the dosing checks."""
    from screen.models.reactor import dosing_warnings

    inputs, path, curves = run.inputs, run.case.path, run.curves
    kinetics, charge, cooling, feed = run.kinetics, run.charge, run.cooling, run.feed
    decomposition, mtt, scan_points = run.decomposition, run.mtt, run.scan_points
    t_p, stated = run.t_p, run.stated
    try:
        normal, scan, end_time, end_basis = _normal_and_scan(
            inputs.end_time, inputs.end_time_source, kinetics, charge, cooling, feed,
            decomposition, mtt, scan_points, curves)
        dosing = dosing_warnings(normal, inputs.accumulation_limit, process_temperature=t_p,
                                 stated_accumulation=stated)
    except ModelDomainError as exc:
        raise CaseError(exc.message, _case_key(exc.key, inputs), path) from None
    except SolverError as exc:
        raise SolverError(f"cooling-failure simulation: {exc.message}", "synthesis_kinetics",
                          path) from None

    run.normal, run.scan, run.dosing = normal, scan, dosing
    run.end_time, run.end_basis = end_time, end_basis


#: Simulations kept for reuse (design): reruns of one case that change no input of the
#: simulation (limits or sweeps of the accumulation, of another vessel ...) reuse the run.
_RUN_CACHE: dict = {}
_RUN_CACHE_SIZE = 8


def _normal_and_scan(end_time, end_source, kinetics, charge, cooling, feed, decomposition, mtt,
                     scan_points, curves):
    """Normal operation and the failure-time scan, memoised on every model input (exact: the
    key is the pickled inputs). The results are read, never changed, by the callers."""
    import pickle

    try:
        key = pickle.dumps((end_time, end_source, kinetics, charge, cooling, feed,
                            vars(decomposition), mtt, scan_points, curves))
    except Exception:  # an input that cannot be pickled: no reuse
        key = None
    if key is not None and key in _RUN_CACHE:
        return _RUN_CACHE[key]
    value = _integrate_normal_and_scan(end_time, end_source, kinetics, charge, cooling, feed,
                                       decomposition, mtt, scan_points, curves)
    if key is not None:
        if len(_RUN_CACHE) >= _RUN_CACHE_SIZE:
            _RUN_CACHE.pop(next(iter(_RUN_CACHE)))
        _RUN_CACHE[key] = value
    return value


def _integrate_normal_and_scan(end_time, end_source, kinetics, charge, cooling, feed,
                               decomposition, mtt, scan_points, curves):
    """Normal operation (end time extended until the synthesis is over) and the scan."""
    from screen.models.reactor import simulate_normal_operation, worst_case_scan

    end_basis = end_source
    while True:
        normal = simulate_normal_operation(
            kinetics, charge, cooling, end_time, feed=feed, decomposition=decomposition,
            output_points=501 if curves else 201)
        # A default end time is extended until the synthesis is over, so that the scan
        # covers every failure time that still holds reactant (design).
        if (end_source == "given" or normal.accumulation[-1] <= END_ACCUMULATION
                or end_time >= MAXIMUM_END_TIME):
            break
        end_time = min(2.0 * end_time, MAXIMUM_END_TIME)
        end_basis = (f"{end_source}, extended to "
                     f"{end_time / SECONDS_PER_HOUR:.3g} h until X_ac <= {END_ACCUMULATION}")
    scan = worst_case_scan(normal, mtt, n_initial=60 if curves else 30, refine=True,
                           n_failure_times=scan_points, duration=FAILURE_DURATION)
    return normal, scan, end_time, end_basis


def _derive_figures(run, result) -> None:
    """Worst cases per feed mode, MTSRs, the synthesis rate at the MTT, the normal peak."""
    import numpy as np

    scan, normal, kinetics, charge = run.scan, run.normal, run.kinetics, run.charge
    stopped, continuing = scan.feed_stopped, scan.feed_continuing
    worst_stopped, worst_continuing = stopped.worst, continuing.worst
    profile = scan.profile
    continuing_end = float(np.max(profile.final_temperature_feed_continuing))
    mtsr_stopped = max(scan.maximum_mtsr, worst_stopped.maximum_synthesis_temperature)
    mtsr_continuing = max(worst_continuing.maximum_synthesis_temperature, continuing_end)
    case_mtsr = float(result.curves["temperatures_K"]["MTSR"])
    rate_at_mtt = None
    if math.isfinite(worst_stopped.time_to_mtt):
        crossing = worst_stopped.state_at(worst_stopped.failure_time + worst_stopped.time_to_mtt)
        rate_at_mtt = _specific_synthesis_heat_rate(kinetics, crossing, charge.density)
    peak_normal = float(np.max(normal.temperature))
    shortest_mtt = min(stopped.shortest_time_to_mtt, continuing.shortest_time_to_mtt)
    mode = "semi-batch" if normal.is_semi_batch else "batch"

    run.stopped, run.continuing, run.worst_stopped = stopped, continuing, worst_stopped
    run.worst_continuing, run.profile = worst_continuing, profile
    run.continuing_end = continuing_end
    run.mtsr_stopped, run.mtsr_continuing, run.case_mtsr = mtsr_stopped, mtsr_continuing, case_mtsr
    run.rate_at_mtt, run.peak_normal, run.shortest_mtt = rate_at_mtt, peak_normal, shortest_mtt
    run.mode = mode


def _add_simulation_warnings(run, result, vessel_name) -> None:
    """Warnings of the dosing checks, the scan, an MTSR above the case's, the feed running on,
    the MTT reached in normal operation and a triggered decomposition."""
    import numpy as np

    dosing, scan, normal, mtt = run.dosing, run.scan, run.normal, run.mtt
    stopped, continuing = run.stopped, run.continuing
    worst_stopped, worst_continuing = run.worst_stopped, run.worst_continuing
    case_mtsr, mtsr_stopped, mtsr_continuing = run.case_mtsr, run.mtsr_stopped, run.mtsr_continuing
    peak_normal = run.peak_normal
    warnings = result.warnings
    prefix = f"Simulation ({vessel_name}): "
    for item in dosing.warnings:
        if item.code == "accumulation" and not normal.is_semi_batch:
            continue  # a batch holds everything at the start; the class figures already say so
        warnings.append(prefix + item.message[0].upper() + item.message[1:] + ".")
    for text in scan.warnings:
        if text.startswith("batch run:"):
            continue  # said in the summary; not a warning about the case
        warnings.append(prefix + text[0].upper() + text[1:] + ".")
    # Which MTSR governs the class is decided once, by screen.analyses.governing (it warns
    # there); here only the declared interlock is reminded of what it must prevent.
    interlock = result.case.sections["process"].get("feed_interlock")
    if normal.is_semi_batch and interlock is True and \
            mtsr_continuing > max(case_mtsr, mtsr_stopped) + MTSR_WARNING_MARGIN:
        reach = ("" if not math.isfinite(continuing.shortest_time_to_mtt) else
                 f"; the MTT ({_c(mtt):.1f} degC) is reached as early as "
                 f"{_hours_text(continuing.shortest_time_to_mtt)} after a failure")
        warnings.append(
            f"{prefix}if the feed ran on after a cooling failure the mass would reach "
            f"{_c(mtsr_continuing):.1f} degC (failure at "
            f"{worst_continuing.failure_time / SECONDS_PER_HOUR:.2f} h){reach}. The class rests "
            f"on the declared feed interlock (process.feed_interlock = true): it must stop the "
            f"dosing on every cooling failure.")
    if peak_normal >= mtt:
        warnings.append(f"{prefix}even with the cooling working the simulated temperature reaches "
                        f"{_c(peak_normal):.1f} degC, at or above the MTT ({_c(mtt):.1f} degC).")
    triggered_stopped = bool(np.any(stopped.decomposition_triggered)
                             or worst_stopped.decomposition_triggered)
    triggered_continuing = bool(np.any(continuing.decomposition_triggered)
                                or worst_continuing.decomposition_triggered)
    if scan.decomposition_triggered:
        which = [name for name, flag in (("feed stopped", triggered_stopped),
                                         ("feed continuing", triggered_continuing)) if flag]
        warnings.append(f"{prefix}a cooling failure triggers the decomposition within "
                        f"{FAILURE_DURATION / SECONDS_PER_HOUR:.0f} h for at least one failure "
                        f"time ({' and '.join(which) or 'worst case'}).")
    if result.results.get("decomposition_basis") == "onset-estimate":
        warnings.append(f"{prefix}the decomposition in the simulation rests on the crude onset "
                        f"estimate; its times and the trigger flag are indicative only.")

    run.triggered_stopped, run.triggered_continuing = triggered_stopped, triggered_continuing


def _method_text(run, vessel_name, cooling_note) -> str:
    """The method line of the simulation, with the notes on how its inputs were read."""
    inputs, scan_points = run.inputs, run.scan_points
    notes = list(inputs.notes)
    if inputs.scale_factor != 1.0:
        notes.append(f"amounts and masses scaled by {inputs.scale_factor:.4g} to the batch mass "
                     f"of {vessel_name}")
    notes.append(cooling_note)
    method = (
        "Mass, species and energy balances of a jacketed, well-mixed reactor (A + B -> P, "
        f"{inputs.scheme}, Arrhenius) with the decomposition from [decomposition], integrated with "
        "scipy solve_ivp (LSODA), split at every feed-rate change (structure as in Hugo & "
        "Steinbach, Chem. Eng. Sci. 41 (1986) 1081; Steensma & Westerterp, Chem. Eng. Sci. 43 "
        "(1988) 2125). Cooling failure at t_f: adiabatic from the normal-operation state, feed "
        f"stopped or continuing, {FAILURE_DURATION / SECONDS_PER_HOUR:.0f} h simulated. MTSR(t) = "
        "T + n_acc (-dH_r)/(m(t) c'p) with the mass correction (Stoessel, Chem. Eng. Prog. 89(10) "
        f"1993); worst time refined by a bounded search; {scan_points} failure times per feed "
        "mode with a full continuation. No evaporation: above the MTT the mass is treated as "
        "closed and non-boiling. Decomposition triggered = half of what remained converted "
        "(design). " + "; ".join(notes) + ".")
    return method


def _simulation_results(run, vessel_name, method) -> dict:
    """The JSON-ready ``results["simulation"]`` member (units in the key names)."""
    inputs, scan, dosing, normal = run.inputs, run.scan, run.dosing, run.normal
    scan_points, end_time, end_basis, mtt = run.scan_points, run.end_time, run.end_basis, run.mtt
    stated, mode, case_mtsr = run.stated, run.mode, run.case_mtsr
    mtsr_stopped, mtsr_continuing = run.mtsr_stopped, run.mtsr_continuing
    worst_stopped, worst_continuing = run.worst_stopped, run.worst_continuing
    continuing_end, shortest_mtt = run.continuing_end, run.shortest_mtt
    rate_at_mtt = run.rate_at_mtt
    peak_normal = run.peak_normal
    triggered_stopped, triggered_continuing = run.triggered_stopped, run.triggered_continuing
    results: dict[str, Any] = {
        "vessel": vessel_name,
        "mode": mode,
        "scan_points": scan_points,
        "continuations": int(scan.continuation_count),
        "scale_factor": inputs.scale_factor,
        "end_time_h": _h(end_time),
        "end_time_basis": end_basis,
        "molar_enthalpy_kJ_per_mol": inputs.molar_enthalpy / 1e3,
        "molar_enthalpy_source": inputs.molar_enthalpy_source,
        "mtt_degC": _c(mtt),
        "accumulation_max": float(scan.maximum_accumulation),
        "accumulation_max_time_h": _h(scan.time_of_maximum_accumulation),
        "accumulation_limit": inputs.accumulation_limit,
        "accumulation_stated": stated,
        "accumulation_stated_lower": (None if stated is None
                                      else bool(stated < scan.maximum_accumulation)),
        "worst_failure_time_h": _h(scan.worst_failure_time),
        "accumulation_at_worst": float(scan.accumulation_at_worst),
        "mtsr_case_degC": _c(case_mtsr),
        "mtsr_feed_stopped_degC": _c(mtsr_stopped),
        "mtsr_feed_stopped_reached_degC": _c(worst_stopped.maximum_synthesis_temperature),
        "mtsr_feed_continuing_degC": _c(mtsr_continuing),
        "mtsr_feed_continuing_reached_degC": _c(worst_continuing.maximum_synthesis_temperature),
        "worst_failure_time_feed_continuing_h": _h(worst_continuing.failure_time),
        "final_temperature_feed_continuing_max_degC": _c(continuing_end),
        "max_temperature_feed_stopped_degC": _c(worst_stopped.maximum_temperature),
        "max_temperature_feed_continuing_degC": _c(worst_continuing.maximum_temperature),
        "time_to_mtt_h": _h(worst_stopped.time_to_mtt),
        "time_to_mtt_feed_continuing_h": _h(worst_continuing.time_to_mtt),
        "shortest_time_to_mtt_h": _h(shortest_mtt),
        "synthesis_heat_release_rate_at_mtt_W_per_kg": rate_at_mtt,
        "time_to_max_rate_h": _h(worst_stopped.time_to_maximum_rate),
        "time_to_max_rate_feed_continuing_h": _h(worst_continuing.time_to_maximum_rate),
        "decomposition_triggered": bool(scan.decomposition_triggered),
        "decomposition_triggered_feed_stopped": triggered_stopped,
        "decomposition_triggered_feed_continuing": triggered_continuing,
        "normal_operation": {
            "peak_temperature_degC": _c(peak_normal),
            "final_conversion": float(normal.conversion[-1]),
            "peak_reaction_heat_kW": dosing.peak_reaction_heat_rate / 1e3,
            "dosing_heat_kW": dosing.dosing_heat_rate / 1e3,
            "cooling_capacity_kW": dosing.cooling_capacity / 1e3,
            "damkoehler_number": (None if not math.isfinite(dosing.damkoehler_number)
                                  else float(dosing.damkoehler_number)),
        },
        "dosing_warnings": [{"code": item.code, "message": item.message}
                            for item in dosing.warnings],
        "method": method,
    }
    return results


def _simulation_curves(run) -> dict:
    """Arrays for the figures [s, K, -]: normal course, MTSR(t), the worst failure courses."""
    import numpy as np

    profile, normal, mtt, t_p = run.profile, run.normal, run.mtt, run.t_p
    stopped, worst_stopped, worst_continuing = run.stopped, run.worst_stopped, run.worst_continuing
    continuing = run.continuing
    after_stopped, course_stopped = _failure_course(worst_stopped)
    after_continuing, course_continuing = _failure_course(worst_continuing)
    return {
        "time_s": np.asarray(profile.time),
        "temperature_K": np.asarray(normal.state_at(profile.time)["temperature"]),
        "accumulation": np.asarray(profile.accumulation),
        "mtsr_K": np.asarray(profile.mtsr),
        "mtsr_without_mass_correction_K": np.asarray(profile.mtsr_without_mass_correction),
        "final_temperature_feed_continuing_K": np.asarray(
            profile.final_temperature_feed_continuing),
        "worst_failure_time_s": float(worst_stopped.failure_time),
        "time_after_failure_s": after_stopped,
        "failure_temperature_K": course_stopped,
        "worst_failure_time_feed_continuing_s": float(worst_continuing.failure_time),
        "time_after_failure_feed_continuing_s": after_continuing,
        "failure_temperature_feed_continuing_K": course_continuing,
        "scan_failure_times_s": np.asarray(stopped.failure_times),
        "scan_mtsr_feed_stopped_K": np.asarray(stopped.maximum_synthesis_temperature),
        "scan_mtsr_feed_continuing_K": np.asarray(continuing.maximum_synthesis_temperature),
        "mtt_K": mtt,
        "process_temperature_K": t_p,
    }


def _summary_lines(r: dict, scan_points: int) -> list[str]:
    """Terminal lines: a heading, then rows indented by 2 spaces (<= 78 characters)."""
    horizon = f"{FAILURE_DURATION / SECONDS_PER_HOUR:.0f} h"

    def degc(value):
        return "n/a" if value is None else f"{value:.1f} degC"

    def hours(value):
        if value is None:
            return f"not within {horizon}"
        if value * 60.0 < 0.5:
            return "at once"
        return f"{value * 60:.0f} min" if value < 1.0 else f"{value:.1f} h"

    batch = r["mode"] == "batch"
    modes = "failure times" if batch else "failure times per feed mode"
    lines = [f"Cooling-failure simulation ({r['mode']}, {scan_points} {modes})",
             f"  vessel                  {r['vessel'][:52]}"]
    stated = ("" if r["accumulation_stated"] is None
              else f"; stated in [process] {r['accumulation_stated']:.2f}")
    lines.append(f"  accumulation X_ac       max {r['accumulation_max']:.2f} at "
                 f"{r['accumulation_max_time_h']:.2f} h{stated}")
    worst = f"  worst failure time      {r['worst_failure_time_h']:.2f} h (X_ac " \
            f"{r['accumulation_at_worst']:.2f})"
    if not batch:
        worst += f", feed continuing {r['worst_failure_time_feed_continuing_h']:.2f} h"
    lines.append(worst)
    if batch:
        lines.append(f"  MTSR                    {degc(r['mtsr_feed_stopped_degC'])}  (from "
                     f"[process]: {degc(r['mtsr_case_degC'])}; MTT {degc(r['mtt_degC'])})")
        lines.append(f"  time to MTT             {hours(r['time_to_mtt_h'])}")
        lines.append(f"  time to max. rate       {hours(r['time_to_max_rate_h'])}")
    else:
        lines.append(f"  MTSR feed stopped       {degc(r['mtsr_feed_stopped_degC'])}  (from "
                     f"[process]: {degc(r['mtsr_case_degC'])})")
        lines.append(f"  MTSR feed continuing    {degc(r['mtsr_feed_continuing_degC'])}  (MTT "
                     f"{degc(r['mtt_degC'])})")
        lines.append(f"  time to MTT             feed stopped {hours(r['time_to_mtt_h'])}, "
                     f"continuing {hours(r['time_to_mtt_feed_continuing_h'])}")
        lines.append(f"  time to max. rate       feed stopped {hours(r['time_to_max_rate_h'])}, "
                     f"continuing {hours(r['time_to_max_rate_feed_continuing_h'])}")
    if not r["decomposition_triggered"]:
        trigger = f"not triggered within {horizon}"
    elif batch:
        trigger = f"TRIGGERED within {horizon}"
    else:
        which = [name for name, key in (("feed stopped", "decomposition_triggered_feed_stopped"),
                                        ("continuing", "decomposition_triggered_feed_continuing"))
                 if r[key]]
        trigger = f"TRIGGERED within {horizon} ({', '.join(which) or 'worst case'})"
    lines.append(f"  decomposition           {trigger}")
    normal = r["normal_operation"]
    da = normal["damkoehler_number"]
    lines.append(f"  normal operation        peak {degc(normal['peak_temperature_degC'])}, "
                 f"conversion {normal['final_conversion']:.3f} at {r['end_time_h']:.3g} h"
                 + ("" if da is None else f", Da {da:.3g}"))
    if batch:
        lines.append(f"  cooling vs release      {normal['cooling_capacity_kW']:.4g} kW at T_p vs "
                     f"{normal['peak_reaction_heat_kW']:.4g} kW peak reaction")
    else:
        lines.append(f"  cooling vs dosing       {normal['cooling_capacity_kW']:.4g} kW at T_p vs "
                     f"{normal['dosing_heat_kW']:.4g} kW dosing-controlled")
    codes = [item["code"].replace("_", " ") for item in r["dosing_warnings"]]
    label = "  dosing warnings         "
    if not codes:
        lines.append(label + "none")
    for code in codes:
        lines.append(label + code)
        label = " " * len(label)
    return lines
