"""Monte Carlo propagation of input uncertainties to the screening figures and the verdict.

Where uncertainties come from
-----------------------------
* A standard uncertainty written inside a value, ``"135 ± 8 kJ/mol"`` or ``"135 +/- 8 kJ/mol"``
  (parsed by :mod:`screen.units`, kept in ``case.uncertainties``): a normal distribution about
  the value.
* The free-form ``[uncertainty]`` section, one quoted key path per uncertain input::

      [uncertainty]
      "decomposition.activation_energy" = "normal 8 kJ/mol"
      "decomposition.reference_rate" = "lognormal factor 2"
      "mass.specific_heat" = "uniform 1.75 .. 1.95 kJ/(kg K)"
      "process.temperature" = "triangular 58 .. 60 .. 65 degC"
      "vessel.coolant_temperature" = "normal 3 K"
      arrhenius_correlation = 0.97

  The words are described in ``docs/uncertainty.md`` and validated by :func:`check_case`
  (called by :mod:`screen.io.case` while a case is loaded).

What is computed
----------------
Each uncertain input is drawn as given while every other input keeps its case value. An
uncertain activation energy keeps a measured ``reference_rate`` fixed at its
``reference_temperature`` (the pre-exponential factor is rebuilt per sample); with a
``pre_exponential_factor`` instead, ln A is held or varied with the stated correlation to E
(normal-to-anything transformation of correlated standard normals). For every sample the
figures of the scalar engine are recomputed, vectorised over the samples: MTSR, TD24 (root
finding on the exact adiabatic time), TMRad at MTSR, the criticality class, the severity and
probability levels, and for every vessel the Semenov critical coolant temperature (vectorised
Newton on ln q(T) - 2 ln T = ln(U A R/(m E))) and whether MTSR lies at or above the
temperature of no return.

Fail closed: a sample without a TD24 in the searched range counts as class 5, a sample whose
TMRad is undefined counts as "frequent", and a vessel sample whose heat balance is undefined
counts as "no stable point"; the counts are reported.

References
----------
JCGM 100:2008, Evaluation of measurement data - Guide to the expression of uncertainty in
measurement (GUM), sections 4.3.7 and 4.3.9 (rectangular and triangular distributions) and 5.1
(first-order propagation). JCGM 101:2008, Supplement 1 to the GUM - Propagation of
distributions using a Monte Carlo method. C. Spearman, "The proof and measurement of association
between two things", Am. J. Psychol. 15 (1904) 72-101 (rank correlation). M. C. Cario,
B. L. Nelson, "Modeling and generating random vectors with arbitrary marginal distributions and
correlation matrix", Northwestern Univ. technical report 1997 (normal-to-anything; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.errors import CaseError, SolverError
from screen.io.uncertainty_inputs import (  # noqa: F401  # noqa: F401
    CORRELATION_KEY,
    PROPAGATED_KEYS,
    VESSEL_KEYS,
    Marginal,  # noqa: F401
    UncertainInput,
    _check_tails,
    _domain,
    _field_spec,
    _section_entries,
    check_case,
    parse_distribution,
)

__all__ = [
    "PROPAGATED_KEYS",
    "VESSEL_KEYS",
    "Marginal",
    "UncertainInput",
    "MonteCarloRun",
    "check_case",
    "parse_distribution",
    "collect_inputs",
    "draw_samples",
    "critical_coolant_temperature",
    "mtsr_at_or_above_no_return",
    "evaluate_figures",
    "sampled_kinetics",
    "run_monte_carlo",
    "add_uncertainty",
    "average_ranks",
    "rank_correlation",
    "rank_correlation_matrix",
]






MIN_SAMPLES = 10
MAX_SAMPLES = 5_000_000
#: Samples evaluated per block: bounds the memory and paces the progress bar.
CHUNK_SAMPLES = 10_000
#: Samples drawn and summarised per statistics block [-] (design: about 200 MB at 250,000
#: samples). A run of at most this many samples keeps every sample (results exactly as from
#: one array); a longer run is drawn block by block: counts, probabilities, means and standard
#: deviations over all samples, percentiles and rank correlations from a uniform random
#: subsample of RESERVOIR_SAMPLES (see :func:`run_monte_carlo`).
BLOCK_SAMPLES = 250_000
#: Size of the uniform random subsample kept for percentiles and rank correlations [-].
RESERVOIR_SAMPLES = 250_000
#: Relative agreement required between the vectorised nominal figures and the scalar engine.
NOMINAL_TOLERANCE = 1e-6



# ----------------------------------------------------------------------------------------------
# Distributions
# ----------------------------------------------------------------------------------------------



















# ----------------------------------------------------------------------------------------------
# Case validation and collection of the uncertain inputs
# ----------------------------------------------------------------------------------------------













def collect_inputs(case):
    """All uncertain inputs of a case: ``[uncertainty]`` entries and values written with ±.

    Parameters
    ----------
    case : screen.io.case.Case
        A validated case.

    Returns
    -------
    inputs : list of UncertainInput
        Sorted by key path (the draw order, so the file order does not change the numbers).
    correlation : float or None
        Correlation coefficient of E and ln A, if given.
    not_propagated : list of str
        Key paths written with ± that the Monte Carlo does not vary.

    Raises
    ------
    CaseError
        As :func:`check_case`; an input given both with ± and in ``[uncertainty]``; an
        ``arrhenius_correlation`` without uncertain E and A.
    """
    path = case.path
    sections, vessels = case.sections, case.vessels
    entries, correlation = _section_entries(sections, vessels, path)
    taken = {target: entry.key for entry in entries for target in entry.targets}
    not_propagated = []
    single_vessel = len(vessels) == 1
    for key, parsed in sorted(case.uncertainties.items()):
        if parsed.std is None or parsed.std == 0.0:
            continue
        parts = key.split(".")
        if parts[0] == "vessel":
            name = parts[-1]
            index = 1 if single_vessel else int(parts[1])
            target = f"vessel.{index}.{name}"
            section = "vessel"
            supported = name in VESSEL_KEYS
        else:
            section, name = parts[0], parts[-1]
            target = key
            supported = key in PROPAGATED_KEYS and not (
                key == "decomposition.onset_temperature"
                and sections["decomposition"].model is not None)
        if not supported:
            not_propagated.append(key)
            continue
        if target in taken:
            raise CaseError(f"{key} carries an uncertainty in its value (±) and in [uncertainty] "
                            f"({taken[target]!r}); give one of them", key, path)
        lower, upper, lower_exclusive, upper_exclusive = _domain(section, name)
        marginal = Marginal("normal", (parsed.value, parsed.std), parsed.value, lower, upper,
                            lower_exclusive, upper_exclusive)
        _check_tails(marginal, parsed.text, key, path)
        entries.append(UncertainInput(key, parsed.text, "value ± standard uncertainty",
                                      (target,), (marginal,), parsed.si_unit))
        taken[target] = key
    entries.sort(key=lambda entry: entry.key)
    if correlation is not None:
        names = {target for entry in entries for target in entry.targets}
        for needed in ("decomposition.activation_energy", "decomposition.pre_exponential_factor"):
            if needed not in names:
                raise CaseError(f"{CORRELATION_KEY} needs uncertainties on both activation_energy "
                                f"and pre_exponential_factor; {needed} has none",
                                f"uncertainty.{CORRELATION_KEY}", path)
    return entries, correlation, not_propagated


def draw_samples(inputs, samples: int, seed: int, correlation=None, rng=None):
    """Samples of every target of the uncertain inputs.

    One row of independent standard normals per input, drawn in the order of ``inputs`` from
    ``numpy.random.default_rng(seed)``; the E - ln A correlation is imposed on the two rows by
    z_A <- rho z_E + sqrt(1 - rho^2) z_A (a Gaussian copula; exact correlation of E and ln A
    when both are normal or lognormal); each row then passes through the input's marginal
    (inverse CDF of Phi(z)).

    Parameters
    ----------
    inputs : list of UncertainInput
        From :func:`collect_inputs`.
    samples : int
        Number of samples. [-]
    seed : int
        Seed of the random generator (>= 0). [-]
    correlation : float, optional
        Correlation of E and ln A. [-]
    rng : numpy.random.Generator, optional
        Generator to draw from (a block of a longer run); default ``default_rng(seed)``.

    Returns
    -------
    values : dict
        Target key path -> array of ``samples`` values. [SI unit of the input]
    by_input : dict
        Input key as written -> the array of its first target (for the sensitivity ranking).
        [SI unit of the input]
    """
    if rng is None:
        rng = np.random.default_rng(seed)
    normals = rng.standard_normal((len(inputs), samples))
    if correlation is not None:
        rows = {target: index for index, entry in enumerate(inputs) for target in entry.targets}
        row_e = rows["decomposition.activation_energy"]
        row_a = rows["decomposition.pre_exponential_factor"]
        normals[row_a] = (correlation * normals[row_e]
                          + math.sqrt(max(0.0, 1.0 - correlation ** 2)) * normals[row_a])
    values: dict[str, np.ndarray] = {}
    by_input: dict[str, np.ndarray] = {}
    for index, entry in enumerate(inputs):
        for number, (target, marginal) in enumerate(zip(entry.targets, entry.marginals,
                                                         strict=True)):
            array = marginal.transform(normals[index])
            values[target] = array
            if number == 0:
                by_input[entry.key] = array
    return values, by_input


# ----------------------------------------------------------------------------------------------
# Vectorised figures
# ----------------------------------------------------------------------------------------------

def critical_coolant_temperature(kinetics, mass, ua, conversion=None):
    """Semenov critical point of a cooled vessel for many samples (vectorised).

    The tangency temperature T* solves ``m q(T*) = U A R T*^2/E`` on the branch T < E/(2 R),
    i.e. in y = 1/T

        G(y) = c - (E/R) y + 2 ln y - ln(U A R/(m E)) = 0,    c = ln q(T) + E/(R T),

    where q is the heat release rate of ``kinetics`` at a fixed conversion (zero order, no
    consumption: the screening convention of the vessel balance). G is concave and
    falls for y > 2 R/E, so Newton steps started at the low-temperature end (y = 1000 * 2R/E,
    where G < 0) decrease monotonically to the root. Then T_c,crit = T* - R T*^2/E
    (derived; Semenov, Z. Phys. 48 (1928) 571; construction as in Williams, Combustion Theory,
    2nd ed. 1985, app. B).

    Parameters
    ----------
    kinetics : screen.models.decomposition.DecompositionKinetics
        Decomposition kinetics (array fields allowed).
    mass : float or array
        Reaction mass in the vessel. [kg]
    ua : float or array
        Effective U A of the vessel (jacket plus losses). [W/K]
    conversion : float or array, optional
        Conversion at which the rate is frozen. [-] None: the mass as fed (a0).

    Returns
    -------
    tangency_temperature : numpy.ndarray
        T*. [K] NaN where the scalar engine raises (no tangency below E/(2 R), or the vessel is
        supercritical even at E/(2 R) * 1e-3).
    critical_coolant_temperature : numpy.ndarray
        T_c,crit. [K] NaN likewise.
    """
    e = np.asarray(kinetics.activation_energy, dtype=float)
    probe = 400.0
    log_rate_probe = np.asarray(kinetics.log_heat_release_rate(probe, conversion), dtype=float)
    shape = np.broadcast_shapes(e.shape, log_rate_probe.shape, np.shape(mass), np.shape(ua))
    e = np.broadcast_to(e, shape)
    e_over_r = e / GAS_CONSTANT
    intercept = np.broadcast_to(log_rate_probe + e_over_r / probe, shape)
    target = np.broadcast_to(np.log(np.asarray(ua, dtype=float) * GAS_CONSTANT
                                    / (np.asarray(mass, dtype=float) * e)), shape)

    def g(y):
        return intercept - e_over_r * y + 2.0 * np.log(y) - target

    y_peak = 2.0 / e_over_r               # T = E/(2 R): maximum of G
    y_start = 1000.0 * y_peak             # T = E/(2 R) * 1e-3: the scalar engine's lower end
    defined = (g(y_peak) > 0.0) & (g(y_start) < 0.0)
    y = np.where(defined, y_start, y_peak)
    for _ in range(100):
        step = g(y) / (-e_over_r + 2.0 / y)
        y = np.where(defined, y - step, y)
        if np.all(np.abs(step[defined]) <= 1e-15 * y[defined]):
            break
    tangency = np.where(defined, 1.0 / y, np.nan)
    critical = tangency - tangency ** 2 / e_over_r
    return tangency, np.where(defined, critical, np.nan)


def mtsr_at_or_above_no_return(kinetics, mass, ua, coolant_temperature, mtsr, conversion=None):
    """Whether MTSR reaches the temperature of no return (vectorised, fail closed).

    With f(T) = ln(m q(T)) - ln(U A (T - T_c)) and the tangency roots T_low < T_high of
    E (T - T_c) = R T^2: no operating point exists when f(T_low) >= 0; otherwise the
    temperature of no return T_NR is the single root of f on (T_low, T_high), where f rises, so
    MTSR >= T_NR exactly when MTSR >= T_high or (MTSR > T_low and f(MTSR) >= 0) (derived; the
    scalar engine finds T_NR by brentq on the same function).

    Parameters
    ----------
    kinetics : screen.models.decomposition.DecompositionKinetics
        Decomposition kinetics (its rate at a fixed conversion is used, as in the engine).
    mass : float or array
        Reaction mass. [kg]
    ua : float or array
        Effective U A. [W/K]
    coolant_temperature : float or array
        Effective coolant temperature. [K]
    mtsr : float or array
        MTSR. [K]
    conversion : float or array, optional
        Conversion at which the rate is frozen. [-] None: the mass as fed (a0).

    Returns
    -------
    above : numpy.ndarray of bool
        True where MTSR >= T_NR or no stable point exists, and where the heat balance is
        undefined (E <= 4 R T_c, or no T_NR below T_high): fail closed.
    no_stable_point : numpy.ndarray of bool
        True where the coolant is at or above its critical temperature (or undefined).
    undefined : numpy.ndarray of bool
        True where the scalar engine would raise.
    """
    e = np.asarray(kinetics.activation_energy, dtype=float)
    t_c = np.asarray(coolant_temperature, dtype=float)
    shape = np.broadcast_shapes(e.shape, t_c.shape, np.shape(mass), np.shape(ua), np.shape(mtsr),
                                np.shape(kinetics.log_pre_exponential_factor))
    e = np.broadcast_to(e, shape)
    t_c = np.broadcast_to(t_c, shape)
    mtsr = np.broadcast_to(np.asarray(mtsr, dtype=float), shape)
    log_mass = np.broadcast_to(np.log(np.asarray(mass, dtype=float)), shape)
    ua = np.broadcast_to(np.asarray(ua, dtype=float), shape)
    four_epsilon = 4.0 * GAS_CONSTANT * t_c / e
    sharp = four_epsilon < 1.0
    root = np.sqrt(np.where(sharp, 1.0 - four_epsilon, 1.0))
    t_low = 2.0 * t_c / (1.0 + root)
    t_high = e / GAS_CONSTANT - t_low

    def balance(temperature):
        temperature = np.where(temperature > t_c, temperature, t_c + 1.0)
        log_rate = np.asarray(kinetics.log_heat_release_rate(temperature, conversion),
                              dtype=float)
        return log_mass + log_rate - np.log(ua * (temperature - t_c))

    with np.errstate(invalid="ignore", divide="ignore"):
        f_low = balance(np.where(sharp, t_low, t_c + 1.0))
        f_high = balance(np.where(sharp, t_high, t_c + 2.0))
        f_mtsr = balance(np.where(mtsr > t_c, mtsr, t_c + 1.0))
    no_stable = sharp & (f_low >= 0.0)
    undefined = ~sharp | (~no_stable & ~(f_high > 0.0))
    above = (no_stable | undefined | (mtsr >= t_high)
             | ((mtsr > t_low) & (f_mtsr >= 0.0)))
    return above, no_stable | undefined, undefined


@dataclass
class _Context:
    """Everything fixed over the samples, read once from the case and the nominal result."""

    mode: str
    model: str | None
    reference_form: bool
    mtt_from_case: bool
    nominal_mtt: float
    nominal_mass_ratio: float
    validated_range: bool
    synthesis_from_energy: bool
    vessels: list = field(default_factory=list)
    #: Semi-batch without a declared feed interlock and without a simulation: the MTSR is at
    #: least the feed-continuing bound T_p + dT_ad (screen.analyses.governing).
    feed_continuing_bound: bool = False
    #: Simulated MTSR candidate that governed the nominal screening [K] (held fixed over the
    #: samples: the simulation is not rerun per sample), or None.
    simulated_mtsr_floor: float | None = None


def _context(case, results) -> tuple[_Context, dict[str, float]]:
    from screen.analyses.vessels import vessel_geometry

    sections = case.sections
    process, dec, syn = sections["process"], sections["decomposition"], sections["synthesis"]
    base: dict[str, float] = {}
    for key in PROPAGATED_KEYS:
        section, name = key.split(".")
        table = sections.get(section)
        if table is not None and table.get(name) is not None:
            base[key] = float(table.get(name))
    vessels = []
    multiple = len(case.vessels) > 1
    for index, vessel in enumerate(case.vessels, start=1):
        prefix = f"vessel.{index}" if multiple else "vessel"
        for name in VESSEL_KEYS:
            if vessel.get(name) is not None:
                base[f"vessel.{index}.{name}"] = float(vessel.get(name))
        _, _, area, _, _ = vessel_geometry(case, vessel, prefix)
        vessels.append({"index": index, "name": vessel.name, "area": float(area),
                        "batch_mass": vessel.get("batch_mass") is not None,
                        "heat_transfer_area": vessel.get("heat_transfer_area") is not None})
    context = _Context(
        mode=process.mode,
        model=dec.model,
        reference_form=dec.given("reference_rate"),
        mtt_from_case=process.max_technical_temperature is not None,
        nominal_mtt=float(results["mtt_degC"]) + ZERO_CELSIUS,
        nominal_mass_ratio=float(results["accumulation_mass_ratio"]),
        validated_range=bool(dec.validated_range),
        synthesis_from_energy=syn.given("energy"),
        vessels=vessels,
        feed_continuing_bound=results.get("mtsr_governing_source") == "feed-continuing-bound"
        or (process.mode == "semi-batch" and process.get("feed_interlock") is not True
            and not isinstance(results.get("simulation"), dict)),
        simulated_mtsr_floor=(float(results["mtsr_governing_degC"]) + ZERO_CELSIUS
                              if str(results.get("mtsr_governing_source", "")).startswith(
                                  "simulation") else None),
    )
    return context, base


def _kinetics(values, context):
    from screen.analyses.inputs import (
        ONSET_ESTIMATE_ACTIVATION_ENERGY,
        ONSET_ESTIMATE_DETECTION_LIMIT,
    )
    from screen.models.decomposition import DecompositionKinetics

    energy = values["decomposition.energy"]
    if context.model is None:
        return DecompositionKinetics.from_reference_rate(
            "zero-order", energy, ONSET_ESTIMATE_ACTIVATION_ENERGY,
            ONSET_ESTIMATE_DETECTION_LIMIT, values["decomposition.onset_temperature"])
    model = context.model
    order = values.get("decomposition.order", 1.0 if model == "nth-order" else 0.0)
    if model == "zero-order":
        order = 0.0
    common = dict(order=order,
                  autocatalytic_order=values.get("decomposition.autocatalytic_order", 0.0),
                  initial_conversion=values.get("decomposition.initial_conversion", 0.0))
    if context.reference_form:
        return DecompositionKinetics.from_reference_rate(
            model, energy, values["decomposition.activation_energy"],
            values["decomposition.reference_rate"], values["decomposition.reference_temperature"],
            **common)
    return DecompositionKinetics(model=model, energy=energy,
                                 activation_energy=values["decomposition.activation_energy"],
                                 pre_exponential_factor=values[
                                     "decomposition.pre_exponential_factor"], **common)


def evaluate_figures(case, results, values=None):
    """The screening figures for sampled input values, vectorised over the samples.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case.
    results : dict
        ``ScreeningResult.results`` of the nominal screening (for the MTT, which may come from
        a solvent boiling point).
    values : dict, optional
        Key path (``"decomposition.activation_energy"``, ``"vessel.1.coolant_temperature"``)
        -> array of samples [SI]; inputs not named keep their case values. None: all nominal.

    Returns
    -------
    dict of numpy.ndarray
        ``mtsr``, ``mtt``, ``td24`` [K] (NaN: no root in 150-1500 K), ``tmrad_at_mtsr`` [s],
        ``synthesis_rise``, ``decomposition_rise``, ``runaway_rise`` [K],
        ``process_temperature`` [K], ``criticality_class`` (int; NaN TD24 counted as 5),
        and per vessel ``vessel.N.critical_coolant_temperature`` [K],
        ``vessel.N.coolant_margin`` [K], ``vessel.N.no_stable_point``,
        ``vessel.N.mtsr_above_no_return``, ``vessel.N.undefined`` (bool).
    """
    from screen.models import criticality as crit
    from screen.models import decomposition as dm

    context, base = _context(case, results)
    merged = dict(base)
    merged.update(values or {})
    sizes = {np.size(v) for v in (values or {}).values()}
    size = max(sizes) if sizes else 1
    return _compose(merged, context, size, crit, dm)


def sampled_kinetics(case, results, values=None):
    """Decomposition kinetics with array fields for sampled inputs (as the Monte Carlo uses).

    With ``reference_rate`` given, A is rebuilt per sample so that the heat release rate of the
    fresh mass at ``reference_temperature`` equals the (sampled) reference rate; with
    ``pre_exponential_factor`` given, the sampled A is used as is.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case.
    results : dict
        ``results`` of the nominal screening.
    values : dict, optional
        Key path -> samples [SI] (see :func:`evaluate_figures`).

    Returns
    -------
    screen.models.decomposition.DecompositionKinetics
    """
    context, base = _context(case, results)
    merged = dict(base)
    merged.update(values or {})
    return _kinetics(merged, context)


def _compose(values, context, size, crit, dm):
    from screen.models.semenov import effective_cooling

    def full(x):
        return np.broadcast_to(np.asarray(x, dtype=float), (size,))

    cp = values["mass.specific_heat"]
    t_p = values["process.temperature"]
    if context.synthesis_from_energy:
        q_syn = values["synthesis.energy"]
    else:
        q_syn = (-np.asarray(values["synthesis.molar_enthalpy"])
                 * np.asarray(values["synthesis.limiting_amount"])
                 / np.asarray(values["mass.amount"]))
    rise_syn = np.asarray(q_syn) / np.asarray(cp)
    if context.mode == "semi-batch":
        accumulation = values["process.accumulation"]
        ratio = values.get("process.accumulation_mass_ratio", context.nominal_mass_ratio)
    else:
        accumulation = values.get("process.accumulation", 1.0)
        ratio = 1.0
    mtsr = full(np.asarray(t_p) + np.asarray(accumulation) * rise_syn / np.asarray(ratio))
    # The governing MTSR, as in screen.analyses.governing (ties to the higher value).
    if context.feed_continuing_bound:
        mtsr = np.maximum(mtsr, full(np.asarray(t_p) + rise_syn))
    if context.simulated_mtsr_floor is not None:
        mtsr = np.maximum(mtsr, context.simulated_mtsr_floor)
    if context.mtt_from_case:
        mtt = full(values["process.max_technical_temperature"])
    else:
        mtt = full(context.nominal_mtt)
    kinetics = _kinetics(values, context)
    rise_dec = full(np.asarray(values["decomposition.energy"]) / np.asarray(cp))
    with np.errstate(all="ignore"):
        tmrad_mtsr = full(dm.tmrad(kinetics, mtsr, cp))
        td24 = full(dm.temperature_for_tmrad(kinetics, cp, 24.0 * SECONDS_PER_HOUR))
    t_p = full(t_p)
    klass = np.asarray(crit.criticality_class(t_p, mtsr, mtt, np.where(np.isnan(td24), 0.0,
                                                                         td24)))
    klass = np.where(np.isnan(td24), 5, np.broadcast_to(klass, (size,))).astype(int)
    tmrad_governing = tmrad_mtsr
    if kinetics.model == "nth-order" and not context.validated_range:
        # As screen.analyses.technical_limits: the zero-order (Townsend-Tou) figures govern
        # where they are more critical, unless the kinetics are declared validated.
        zero = dm.townsend_tou_equivalent(kinetics)
        with np.errstate(all="ignore"):
            td24_zero = full(dm.temperature_for_tmrad(zero, cp, 24.0 * SECONDS_PER_HOUR))
            tmrad_governing = np.fmin(tmrad_mtsr, full(dm.tmrad(zero, mtsr, cp)))
        klass_zero = np.asarray(crit.criticality_class(
            t_p, mtsr, mtt, np.where(np.isnan(td24_zero), 0.0, td24_zero)))
        klass_zero = np.where(np.isnan(td24_zero), 5, np.broadcast_to(klass_zero, (size,)))
        klass = np.maximum(klass, klass_zero).astype(int)
    out = {
        "tmrad_at_mtsr_governing": tmrad_governing,
        "process_temperature": t_p,
        "mtsr": mtsr,
        "mtt": mtt,
        "td24": td24,
        "tmrad_at_mtsr": tmrad_mtsr,
        "synthesis_rise": full(rise_syn),
        "decomposition_rise": rise_dec,
        "runaway_rise": mtsr + rise_dec - t_p,
        "criticality_class": klass,
    }
    # The vessel balance freezes the rate at one conversion (as screen.analyses.vessels does): the mass
    # as fed, or for an autocatalytic decomposition the maximum of a^m (1-a)^n, a* = m/(m+n).
    conversion = None
    if kinetics.model == "autocatalytic":
        from screen.models.decomposition import conversion_of_maximum_rate_factor

        conversion = np.asarray(conversion_of_maximum_rate_factor(
            kinetics.order, kinetics.autocatalytic_order, kinetics.initial_conversion))
    for vessel in context.vessels:
        n = vessel["index"]
        key = f"vessel.{n}."
        mass = values[key + "batch_mass"] if vessel["batch_mass"] else values["mass.amount"]
        area = values[key + "heat_transfer_area"] if vessel["heat_transfer_area"] \
            else vessel["area"]
        ua = np.asarray(values[key + "heat_transfer_coefficient"]) * np.asarray(area)
        t_c = np.asarray(values[key + "coolant_temperature"])
        losses = values.get(key + "heat_losses")
        with_losses = losses is not None and bool(np.any(np.asarray(losses) > 0.0))
        if with_losses:
            # Losses to ambient fold into one equivalent cooling line (as in screen.analyses.vessels).
            losses = np.asarray(losses)
            t_amb = np.asarray(values[key + "ambient_temperature"])
            ua_eff, t_c_eff = effective_cooling(ua, t_c, losses, t_amb)
        else:
            ua_eff, t_c_eff = ua, t_c
        with np.errstate(all="ignore"):
            _, t_c_crit = critical_coolant_temperature(kinetics, mass, ua_eff, conversion)
            above, no_stable, undefined = mtsr_at_or_above_no_return(
                kinetics, mass, ua_eff, t_c_eff, mtsr, conversion)
            if with_losses:
                # Reported on the coolant side: the jacket temperature at which the equivalent
                # line is critical.
                t_c_crit = (ua_eff * t_c_crit - losses * t_amb) / ua
        t_c_crit = full(t_c_crit)
        out[key + "critical_coolant_temperature"] = t_c_crit
        out[key + "coolant_margin"] = t_c_crit - full(t_c)
        out[key + "mtsr_above_no_return"] = np.broadcast_to(above, (size,))
        out[key + "no_stable_point"] = np.broadcast_to(no_stable | np.isnan(t_c_crit), (size,))
        out[key + "undefined"] = np.broadcast_to(undefined | np.isnan(t_c_crit), (size,))
    return out


# ----------------------------------------------------------------------------------------------
# Statistics
# ----------------------------------------------------------------------------------------------

def average_ranks(values):
    """Ranks 1..n of a sample, ties sharing their average rank (as used by Spearman's rho).

    :func:`scipy.stats.rankdata` with ``method="average"``.

    Parameters
    ----------
    values : array
        Sample; ``inf`` ranks at the ends, NaN is not accepted. [any]

    Returns
    -------
    numpy.ndarray
        Ranks. [-]
    """
    from scipy.stats import rankdata

    return rankdata(np.asarray(values, dtype=float).ravel(), method="average")


def rank_correlation(x, y):
    """Spearman rank correlation coefficient of two samples (average ranks for ties).

    rho = Pearson correlation of rank(x) and rank(y) (C. Spearman, Am. J. Psychol. 15 (1904)
    72-101), computed by :func:`scipy.stats.spearmanr`.

    Parameters
    ----------
    x, y : array
        Samples of equal length. ``inf`` ranks at the ends; NaN is not accepted. [any]

    Returns
    -------
    float or None
        rho in [-1, 1]; None when either sample is constant.
    """
    matrix = rank_correlation_matrix(np.column_stack([np.asarray(x, dtype=float).ravel(),
                                                      np.asarray(y, dtype=float).ravel()]))
    return _correlation_or_none(matrix[0, 1])


def rank_correlation_matrix(columns):
    """Spearman rank correlations between all columns of a sample matrix (one rank per column).

    Parameters
    ----------
    columns : array, shape (samples, variables)
        One column per variable; ``inf`` ranks at the ends; NaN is not accepted. [any]

    Returns
    -------
    numpy.ndarray, shape (variables, variables)
        rho in [-1, 1]; NaN where a column is constant. [-]
    """
    import warnings

    from scipy.stats import spearmanr

    columns = np.asarray(columns, dtype=float)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a constant column: NaN, reported as None
        matrix = spearmanr(columns, axis=0).statistic
    if np.ndim(matrix) == 0:  # two columns: scipy returns the one coefficient
        matrix = np.array([[1.0, float(matrix)], [float(matrix), 1.0]])
    return np.clip(matrix, -1.0, 1.0)


def _correlation_or_none(value):
    value = float(value)
    return value if np.isfinite(value) else None


def _substituted(values, undefined=None):
    values = np.asarray(values, dtype=float)
    if undefined is not None:
        values = np.where(np.isnan(values), undefined, values)
    return values


def _moments(values) -> dict:
    """Count, mean, standard deviation (ddof 1) and sum of squared deviations of a sample."""
    n = int(values.size)
    mean = float(values.mean())
    std = float(values.std(ddof=1)) if n > 1 else 0.0
    return {"n": n, "mean": mean, "std": std, "m2": float(((values - mean) ** 2).sum())}


def _merge_moments(a: dict, b: dict) -> dict:
    """Moments of two samples together (Chan, Golub & LeVeque, "Algorithms for computing the
    sample variance", Am. Stat. 37 (1983) 242-247, pairwise update)."""
    n = a["n"] + b["n"]
    delta = b["mean"] - a["mean"]
    mean = a["mean"] + delta * b["n"] / n
    m2 = a["m2"] + b["m2"] + delta * delta * a["n"] * b["n"] / n
    return {"n": n, "mean": mean, "std": math.sqrt(m2 / (n - 1)) if n > 1 else 0.0, "m2": m2}


def _spread_tally(values, undefined=None) -> dict:
    """What :func:`_spread` needs from all samples: undefined count, finiteness, moments."""
    raw = np.asarray(values, dtype=float)
    entry = {"undefined": int(np.count_nonzero(np.isnan(raw)))}
    values = _substituted(raw, undefined)
    entry["finite"] = bool(np.isfinite(values).all())
    entry["moments"] = _moments(values) if entry["finite"] else None
    return entry


def _spread(values, scale=1.0, offset=0.0, undefined=None, tally=None):
    """p5, p50, p95, mean, std of samples; undefined samples rank as the most critical (-inf).

    With any non-finite sample the percentiles use the inverted-CDF definition (no interpolation
    across infinity) and mean and std are None. ``tally`` (:func:`_spread_tally` over all
    samples) supplies the counts, mean and std when ``values`` is a subsample.
    """
    if tally is None:
        tally = _spread_tally(values, undefined)
    values = _substituted(values, undefined)
    if tally["finite"]:
        p5, p50, p95 = np.percentile(values, [5.0, 50.0, 95.0])
        mean, std = tally["moments"]["mean"], tally["moments"]["std"]
    else:
        p5, p50, p95 = np.percentile(values, [5.0, 50.0, 95.0], method="inverted_cdf")
        mean = std = None

    def convert(v):
        v = float(v)
        return v / scale - offset if math.isfinite(v) else None

    out = {"p5": convert(p5), "p50": convert(p50), "p95": convert(p95),
           "mean": None if mean is None else mean / scale - offset,
           "std": None if std is None else std / scale}
    if tally["undefined"]:
        out["undefined_samples"] = tally["undefined"]
    return out


#: Figures summarised by percentiles: name in ``MonteCarloRun.figures`` (or "onset_margin",
#: TD24 - MTSR) -> value given to an undefined (NaN) sample (None: kept as NaN).
_SPREAD_FIGURES = {"mtsr": None, "td24": -np.inf, "tmrad_at_mtsr": 0.0, "onset_margin": -np.inf,
                   "synthesis_rise": None, "decomposition_rise": None}
_VESSEL_SPREADS = {"critical_coolant_temperature": -np.inf, "coolant_margin": -np.inf}


def _spread_values(figures, name):
    if name == "onset_margin":
        return figures["td24"] - figures["mtsr"]
    return figures[name]


def _tally(figures, input_by_key, inputs, vessel_count, crit) -> dict:
    """Counts, level tallies and moments of one block of samples (merged by
    :func:`_merge_tallies`; a run of one block uses it as it is)."""
    klass = figures["criticality_class"]
    td24, mtsr, mtt = figures["td24"], figures["mtsr"], figures["mtt"]
    no_td24 = np.isnan(td24)
    tmr = figures.get("tmrad_at_mtsr_governing", figures["tmrad_at_mtsr"])
    tmr_undefined = np.isnan(tmr)
    tmr_hours = np.where(tmr_undefined, 0.0, tmr / SECONDS_PER_HOUR)  # fail closed: frequent
    severity_codes = crit.severity_codes(figures["runaway_rise"])
    probability_codes = crit.probability_codes(tmr_hours)
    tally = {
        "n": int(klass.size),
        "class_counts": np.bincount(klass, minlength=6)[1:6],
        "no_td24": int(np.count_nonzero(no_td24)),
        "mtsr_at_or_above_td24": int(np.count_nonzero(
            no_td24 | (mtsr >= np.where(no_td24, np.inf, td24)))),
        "mtsr_at_or_above_mtt": int(np.count_nonzero(mtsr >= mtt)),
        "tmr_undefined": int(np.count_nonzero(tmr_undefined)),
        "levels": {
            "severity": np.bincount(severity_codes, minlength=len(crit.SEVERITY_4_LEVELS)),
            "severity_3": np.bincount(np.minimum(severity_codes, 2),  # the two highest merge
                                      minlength=len(crit.SEVERITY_3_LEVELS)),
            "probability": np.bincount(probability_codes,
                                       minlength=len(crit.PROBABILITY_6_LEVELS)),
            "probability_3": np.bincount(np.array(crit.PROBABILITY_3_FROM_6)[probability_codes],
                                         minlength=len(crit.PROBABILITY_3_LEVELS)),
        },
        "spreads": {name: _spread_tally(_spread_values(figures, name), undefined)
                    for name, undefined in _SPREAD_FIGURES.items()},
        "inputs": {entry.key: _moments(np.asarray(input_by_key[entry.key], dtype=float))
                   for entry in inputs},
        "vessels": [],
    }
    for index in range(1, vessel_count + 1):
        key = f"vessel.{index}."
        tally["vessels"].append({
            "no_stable_point": int(np.count_nonzero(figures[key + "no_stable_point"])),
            "mtsr_above_no_return": int(np.count_nonzero(figures[key + "mtsr_above_no_return"])),
            "undefined": int(np.count_nonzero(figures[key + "undefined"])),
            "spreads": {name: _spread_tally(figures[key + name], undefined)
                        for name, undefined in _VESSEL_SPREADS.items()},
        })
    return tally


def _merge_spread(a, b):
    finite = a["finite"] and b["finite"]
    return {"undefined": a["undefined"] + b["undefined"], "finite": finite,
            "moments": _merge_moments(a["moments"], b["moments"]) if finite else None}


def _add_counts(a, b):
    length = max(len(a), len(b))
    return np.pad(a, (0, length - len(a))) + np.pad(b, (0, length - len(b)))


def _merge_tallies(a: dict, b: dict) -> dict:
    """The tally of two blocks together (counts added, moments merged exactly)."""
    merged = {key: a[key] + b[key] for key in ("n", "no_td24", "mtsr_at_or_above_td24",
                                               "mtsr_at_or_above_mtt", "tmr_undefined")}
    merged["class_counts"] = a["class_counts"] + b["class_counts"]
    merged["levels"] = {name: _add_counts(a["levels"][name], b["levels"][name])
                        for name in a["levels"]}
    merged["spreads"] = {name: _merge_spread(a["spreads"][name], b["spreads"][name])
                         for name in a["spreads"]}
    merged["inputs"] = {key: _merge_moments(a["inputs"][key], b["inputs"][key])
                        for key in a["inputs"]}
    merged["vessels"] = []
    for first, second in zip(a["vessels"], b["vessels"], strict=True):
        entry = {key: first[key] + second[key]
                 for key in ("no_stable_point", "mtsr_above_no_return", "undefined")}
        entry["spreads"] = {name: _merge_spread(first["spreads"][name], second["spreads"][name])
                            for name in first["spreads"]}
        merged["vessels"].append(entry)
    return merged


def _fraction(mask, total):
    return float(np.count_nonzero(mask)) / total


def _probability_phrase(label: str, count: int, total: int, equals: str = " = ") -> str:
    """"label = p" from a count; none or all samples give the 95 % bound of the rule of three.

    With no event in n samples the one-sided 95 % upper bound of its probability is about 3/n
    (Hanley & Lippman-Hand, "If nothing goes wrong, is everything all right?", JAMA 249 (1983)
    1743-1745).
    """
    if count == 0:
        return f"{label} < {3.0 / total:.2g} (none of {total} samples, 95 % bound)"
    if count == total:
        return f"{label} > {1.0 - 3.0 / total:.4g} (all {total} samples, 95 % bound)"
    return f"{label}{equals}{_format_probability(count / total)}"


def _format_probability(p: float) -> str:
    if p is None:
        return "n/c"
    if p == 0.0:
        return "0"
    if p == 1.0:
        return "1"
    if p < 0.001:
        return f"{p:.1e}"
    if p > 0.999:  # never round a small remaining risk away
        return f"{p:.6f}".rstrip("0")
    return f"{p:.3f}"


@dataclass
class MonteCarloRun:
    """Samples of the inputs and of the figures (arrays over the samples).

    ``input_values``, ``input_by_key`` and ``figures`` hold every sample when ``samples`` is at
    most :data:`BLOCK_SAMPLES`, otherwise the uniform random subsample of
    :data:`RESERVOIR_SAMPLES` kept for percentiles and rank correlations. ``tally`` holds the
    counts, means and standard deviations over all samples (:func:`_tally`).
    """

    samples: int
    seed: int
    inputs: list
    correlation: float | None
    not_propagated: list
    input_values: dict
    input_by_key: dict
    figures: dict
    tally: dict = field(default_factory=dict)


def _evaluate(input_values, base, context, size, chunk, crit, dm, advance, executor=None):
    """Figures of ``size`` samples, composed ``chunk`` samples at a time (on ``executor``
    when given: all chunks submitted at once, collected in order)."""
    pieces: list[dict] = []
    chunks = []
    for start in range(0, size, max(1, int(chunk))):
        stop = min(size, start + int(chunk))
        merged = dict(base)
        for key, array in input_values.items():
            merged[key] = array[start:stop]
        chunks.append((merged, stop - start))
    pending = ([executor.submit(compose_block, merged, context, count)
                for merged, count in chunks] if executor is not None else None)
    for index, (merged, count) in enumerate(chunks):
        if pending is None:
            pieces.append(_compose(merged, context, count, crit, dm))
        else:
            pieces.append(pending[index].result())
        advance(count)
    return {key: np.concatenate([piece[key] for piece in pieces]) for key in pieces[0]}


def _keep_smallest(keys, arrays, size):
    """The ``size`` entries with the smallest keys (bottom-k: a uniform sample without
    replacement when the keys are independent uniform numbers)."""
    if keys.size <= size:
        return keys, arrays
    chosen = np.argpartition(keys, size - 1)[:size]
    chosen.sort()  # keep the order of drawing
    return keys[chosen], {name: array[chosen] for name, array in arrays.items()}


def run_monte_carlo(case, results, samples: int, seed: int, progress: bool = False,
                    chunk: int = CHUNK_SAMPLES, executor=None, block: int | None = None,
                    reservoir: int | None = None) -> MonteCarloRun:
    """Draw the uncertain inputs and evaluate the figures for every sample.

    Memory stays bounded whatever the number of samples: the samples are drawn and evaluated in
    statistics blocks of ``block`` samples. Up to one block, every sample is kept and the
    summary is computed from the whole arrays. Beyond it, each block is drawn from the same
    generator in turn (``default_rng(seed)``; the random numbers of a block are not those of a
    single draw of all samples), then reduced: counts of classes, levels and events, and the
    sums for means and standard deviations (merged exactly, Chan, Golub & LeVeque 1983) cover
    all samples; percentiles and rank correlations come from a uniform random subsample of
    ``reservoir`` samples without replacement, chosen by bottom-k selection on independent
    uniform keys (a reservoir: the samples with the ``reservoir`` smallest keys of a second
    generator seeded from ``seed``). The sampling error this adds to a percentile p is about
    sqrt(p (1 - p) / reservoir) in probability (4.4e-4 for p5 at 250,000).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case.
    results : dict
        ``results`` of the nominal screening of the same case.
    samples : int
        Number of samples, 10 .. 5,000,000. [-]
    seed : int
        Seed of ``numpy.random.default_rng``, >= 0. [-]
    progress : bool or callable
        True: a progress bar on stderr when it is a terminal (silent otherwise); a callable is
        called as ``progress(samples done, samples)`` after each block.
    chunk : int
        Samples evaluated per block (does not change the numbers). [-]
    executor : object, optional
        Evaluate the blocks there: anything with ``submit(function, *args)`` returning futures
        with ``result()`` (a ``dask.distributed.Client``, a :mod:`concurrent.futures`
        executor). The samples are drawn here, so the numbers do not depend on where the blocks
        run. Default: one after the other in this process.
    block : int, optional
        Samples per statistics block; default :data:`BLOCK_SAMPLES`. [-]
    reservoir : int, optional
        Size of the subsample for percentiles and rank correlations; default
        :data:`RESERVOIR_SAMPLES`. [-]

    Returns
    -------
    MonteCarloRun

    Raises
    ------
    CaseError
        Bad sample count or seed, no uncertain input, or an invalid uncertainty entry.
    """
    if isinstance(samples, bool) or not isinstance(samples, (int, np.integer)) or \
            not MIN_SAMPLES <= samples <= MAX_SAMPLES:
        raise CaseError(f"got {samples!r} samples; give an integer from {MIN_SAMPLES} to "
                        f"{MAX_SAMPLES:,} (e.g. --uncertainty 20000)", "--uncertainty", case.path)
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise CaseError(f"got seed {seed!r}; the seed is an integer >= 0", "--seed", case.path)
    samples, seed = int(samples), int(seed)
    block = max(1, int(block or BLOCK_SAMPLES))
    reservoir = max(MIN_SAMPLES, int(reservoir or RESERVOIR_SAMPLES))
    inputs, correlation, not_propagated = collect_inputs(case)
    if not inputs:
        raise CaseError("the case gives no uncertainty to propagate: write a value with its "
                        "standard uncertainty (\"135 ± 8 kJ/mol\") or add an [uncertainty] "
                        "section (see docs/uncertainty.md)", "--uncertainty", case.path)

    from screen.models import criticality as crit
    from screen.models import decomposition as dm

    context, base = _context(case, results)
    _check_nominal(case, results, context, base, crit, dm)
    from screen.progress import ProgressBar

    # A callable receives (samples done, samples); True draws a bar on a terminal.
    callback = progress if callable(progress) else None
    done = [0]
    with ProgressBar(samples, "Monte Carlo", enabled=progress is True, unit="samples") as bar:
        def advance(count):
            done[0] += count
            bar.update(done[0])
            if callback is not None:
                callback(done[0], samples)

        if samples <= block:  # one block: every sample kept, results as from one array
            input_values, input_by_key = draw_samples(inputs, samples, seed, correlation)
            figures = _evaluate(input_values, base, context, samples, chunk, crit, dm, advance,
                                executor)
            tally = _tally(figures, input_by_key, inputs, len(context.vessels), crit)
            return MonteCarloRun(samples, seed, inputs, correlation, not_propagated,
                                 input_values, input_by_key, figures, tally)
        rng = np.random.default_rng(seed)
        key_rng = np.random.default_rng([seed, 1])  # the reservoir's keys: a second stream
        kept_keys = np.empty(0)
        kept: dict[str, np.ndarray] = {}
        tally = None
        for start in range(0, samples, block):
            size = min(block, samples - start)
            input_values, input_by_key = draw_samples(inputs, size, seed, correlation, rng=rng)
            figures = _evaluate(input_values, base, context, size, chunk, crit, dm, advance,
                                executor)
            part = _tally(figures, input_by_key, inputs, len(context.vessels), crit)
            tally = part if tally is None else _merge_tallies(tally, part)
            arrays = {f"figure:{k}": v for k, v in figures.items()}
            arrays.update({f"target:{k}": v for k, v in input_values.items()})
            arrays.update({f"input:{k}": v for k, v in input_by_key.items()})
            del figures, input_values, input_by_key
            keys = key_rng.random(size)
            if kept:
                keys = np.concatenate([kept_keys, keys])
                arrays = {name: np.concatenate([kept[name], array])
                          for name, array in arrays.items()}
            kept_keys, kept = _keep_smallest(keys, arrays, reservoir)
            del arrays, keys

    def part_of(prefix):
        return {name[len(prefix):]: array for name, array in kept.items()
                if name.startswith(prefix)}

    return MonteCarloRun(samples, seed, inputs, correlation, not_propagated,
                         part_of("target:"), part_of("input:"), part_of("figure:"), tally)


def compose_block(values, context, size: int) -> dict:
    """The figures of one block of samples (a top-level function, so that a worker process or
    a cluster can run it); see :func:`run_monte_carlo`.

    Parameters
    ----------
    values : dict of str to numpy.ndarray
        Sampled inputs by key path, in SI units.
    context : object
        Fixed figures of the case shared by all blocks (built once per run).
    size : int
        Number of samples in the block.
    """
    from screen.models import criticality as crit
    from screen.models import decomposition as dm

    return _compose(values, context, size, crit, dm)


def _check_nominal(case, results, context, base, crit, dm) -> None:
    """The vectorised composition must reproduce the scalar engine at the case values."""
    nominal = _compose(dict(base), context, 1, crit, dm)
    pairs = [("MTSR", nominal["mtsr"][0] - ZERO_CELSIUS,
              results.get("mtsr_governing_degC", results["mtsr_degC"])),
             ("TD24", nominal["td24"][0] - ZERO_CELSIUS, results["td24_degC"]),
             ("TMRad at MTSR", nominal["tmrad_at_mtsr"][0] / SECONDS_PER_HOUR,
              results["tmrad_at_mtsr_h"]),
             ("class", float(nominal["criticality_class"][0]),
              float(results.get("criticality_class_computed", results["criticality_class"])))]
    for entry, vessel in zip(results.get("vessels") or [], context.vessels, strict=True):
        key = f"vessel.{vessel['index']}."
        pairs.append((f"{vessel['name']}: critical coolant temperature",
                      nominal[key + "critical_coolant_temperature"][0] - ZERO_CELSIUS,
                      entry["critical_coolant_temperature_degC"]))
        pairs.append((f"{vessel['name']}: MTSR above T_NR",
                      float(nominal[key + "mtsr_above_no_return"][0]),
                      float(entry["mtsr_above_no_return"])))
    for name, vector, scalar in pairs:
        if scalar is None or not math.isfinite(vector) or \
                abs(vector - scalar) > NOMINAL_TOLERANCE * max(1.0, abs(scalar)):
            raise SolverError(
                f"the vectorised Monte Carlo figures do not reproduce the nominal screening "
                f"({name}: {vector!r} against {scalar!r}); the propagation is not trusted and "
                f"was not run. This is a bug, please report it with the case file",
                "--uncertainty", case.path)


def add_uncertainty(result, samples: int = 20_000, seed: int = 20261201,
                    progress: bool = False, executor=None) -> dict:
    """Propagate the uncertainties of a case and add ``results["uncertainty"]``.

    Also appends the confidence to ``results["verdict"]``, warnings to ``result.warnings``,
    the method to ``result.methods["uncertainty"]`` and the sensitivity bars to
    ``result.curves["uncertainty"]``.

    Parameters
    ----------
    result : screen.analyses.engine.ScreeningResult
        The nominal screening of the case (modified in place).
    samples : int
        Number of Monte Carlo samples. [-]
    seed : int
        Random seed (reported). [-]
    progress : bool or callable
        True: a progress bar on stderr when it is a terminal (silent otherwise); a callable is
        called as ``progress(samples done, samples)`` after each block.
    executor : object, optional
        Where the blocks of samples are evaluated (see :func:`run_monte_carlo`).

    Returns
    -------
    dict
        The ``uncertainty`` block (JSON-ready apart from numpy scalars, which the result's
        JSON export converts).

    Raises
    ------
    CaseError
        See :func:`run_monte_carlo`.
    SolverError
        The vectorised figures do not reproduce the nominal screening.
    """
    case, results = result.case, result.results
    run = run_monte_carlo(case, results, samples, seed, progress=progress, executor=executor)
    block, warnings = summarise(run, case, results)
    results["uncertainty"] = block
    results["verdict"] = f"{results['verdict']} {block['confidence']}"
    result.warnings.extend(warnings)
    result.methods["uncertainty"] = (
        "Monte Carlo propagation of distributions (JCGM 101:2008): each uncertain input drawn as "
        "given, the others at their case values; figures recomputed per sample by the same "
        "models (vectorised); sensitivity by Spearman rank correlation (Spearman 1904)")
    ranking = block["sensitivity"]
    if not isinstance(result.curves, dict):
        result.curves = {}
    result.curves["uncertainty"] = {
        "names": [item["key"] for item in ranking],
        "values": [item["rank_correlation_onset_margin"] or 0.0 for item in ranking],
        "values_tmrad": [item["rank_correlation_tmrad_at_mtsr"] or 0.0 for item in ranking],
        "label": "Spearman rank correlation with the margin TD24 - MTSR [-]",
    }
    return block


def summarise(run: MonteCarloRun, case, results):
    """The JSON block and the warnings of a Monte Carlo run (see :func:`add_uncertainty`).

    Parameters
    ----------
    run : MonteCarloRun
        Finished Monte Carlo run.
    case : Case
        The validated case (SI values).
    results : dict
        Nominal results of the screening, for comparison with the samples.
    """
    from screen.models import criticality as crit

    n = run.samples
    fig = run.figures  # every sample, or the uniform subsample of a long run
    tally = run.tally or _tally(fig, run.input_by_key, run.inputs, len(case.vessels), crit)
    counts = tally["class_counts"]
    class_probabilities = {str(k): float(counts[k - 1]) / n for k in range(1, 6)}
    nominal_class = int(results.get("criticality_class_computed", results["criticality_class"]))
    crude = results.get("decomposition_basis") == "onset-estimate"
    most_probable = int(np.argmax(counts)) + 1
    td24, mtsr = fig["td24"], fig["mtsr"]
    tmr = fig.get("tmrad_at_mtsr_governing", fig["tmrad_at_mtsr"])
    tmr_undefined_count = tally["tmr_undefined"]
    margin = td24 - mtsr

    def level_probabilities(name, names):
        levels = tally["levels"][name]
        return {label: float(levels[i]) / n for i, label in enumerate(names)}

    p_class_4_5 = (counts[3] + counts[4]) / n
    p_td24 = tally["mtsr_at_or_above_td24"] / n
    p_mtt = tally["mtsr_at_or_above_mtt"] / n

    # Sensitivity: rank correlation of each input with the margin and with TMRad at MTSR,
    # undefined outputs ranked as the most critical; every column is ranked once.
    matrix = rank_correlation_matrix(np.column_stack(
        [run.input_by_key[entry.key] for entry in run.inputs]
        + [np.where(np.isnan(margin), -np.inf, margin),
           np.where(np.isnan(tmr), -np.inf, tmr)]))
    ranking = []
    for index, entry in enumerate(run.inputs):
        ranking.append({
            "key": entry.key,
            "rank_correlation_onset_margin": _correlation_or_none(matrix[index, -2]),
            "rank_correlation_tmrad_at_mtsr": _correlation_or_none(matrix[index, -1]),
        })
    ranking.sort(key=lambda item: -max(abs(item["rank_correlation_onset_margin"] or 0.0),
                                       abs(item["rank_correlation_tmrad_at_mtsr"] or 0.0)))

    vessels = []
    for index, vessel in enumerate(case.vessels, start=1):
        key = f"vessel.{index}."
        counted = tally["vessels"][index - 1]
        vessels.append({
            "name": vessel.name,
            "critical_coolant_temperature_degC": _spread(
                fig[key + "critical_coolant_temperature"], offset=ZERO_CELSIUS,
                undefined=-np.inf, tally=counted["spreads"]["critical_coolant_temperature"]),
            "coolant_margin_K": _spread(fig[key + "coolant_margin"], undefined=-np.inf,
                                        tally=counted["spreads"]["coolant_margin"]),
            "probability_no_stable_point": counted["no_stable_point"] / n,
            "probability_mtsr_at_or_above_no_return": counted["mtsr_above_no_return"] / n,
            "undefined_samples": counted["undefined"],
        })

    inputs = []
    for entry in run.inputs:
        moments = tally["inputs"][entry.key]
        first = entry.marginals[0]
        inputs.append({
            "key": entry.key,
            "as_written": entry.text,
            "source": entry.source,
            "distribution": first.describe(entry.unit),
            "applies_to": list(entry.targets),
            "nominal_si": first.nominal,
            "unit_si": entry.unit,
            "sample_mean_si": moments["mean"],
            "sample_std_si": moments["std"],
        })

    count_td24 = tally["mtsr_at_or_above_td24"]
    nominal_phrase = _probability_phrase(f"class {nominal_class} with probability",
                                         int(counts[nominal_class - 1]), n, " ")
    high_phrase = _probability_phrase("P(class >= 4)", int(counts[3] + counts[4]), n)
    td24_phrase = _probability_phrase("P(MTSR >= TD24)", count_td24, n)
    if crude:
        # Fail closed: the crude onset estimate never grants a low class, with or without
        # sampling; only the probability of the high classes is stated.
        confidence = (f"Monte Carlo ({n} samples, seed {run.seed}) on the crude onset estimate: "
                      f"{high_phrase}; {td24_phrase}; a low class cannot be concluded from it.")
    else:
        confidence = (f"Monte Carlo ({n} samples, seed {run.seed}): {nominal_phrase}; "
                      f"{high_phrase}; {td24_phrase}.")
        if most_probable != nominal_class:
            confidence += (f" The most probable class is {most_probable} "
                           f"({_format_probability(class_probabilities[str(most_probable)])}), "
                           f"not the nominal class.")
    count_no_td24 = tally["no_td24"]
    if count_no_td24:
        confidence += (f" {count_no_td24} samples without a TD24 in 150-1500 K count as class 5 "
                       f"(fail closed).")

    warnings = []
    if count_no_td24:
        warnings.append(f"Monte Carlo: {count_no_td24} of {n} samples have no TD24 between 150 K "
                        f"and 1500 K; they are counted as class 5 (fail closed) and rank as the "
                        f"most critical in the percentiles.")
    if tmr_undefined_count:
        warnings.append(f"Monte Carlo: TMRad at MTSR is undefined for "
                        f"{tmr_undefined_count} samples; counted as 'frequent' "
                        f"(fail closed).")
    for vessel in vessels:
        if vessel["undefined_samples"]:
            warnings.append(f"Monte Carlo: the heat balance of {vessel['name']} is undefined for "
                            f"{vessel['undefined_samples']} samples; counted as no stable point "
                            f"(fail closed).")
    if run.not_propagated:
        warnings.append("Monte Carlo: the uncertainty written for " + ", ".join(run.not_propagated)
                        + " is not propagated (the input does not enter the figures of the "
                        "Monte Carlo); those inputs are held at their values.")
    names = {target for entry in run.inputs for target in entry.targets}
    if ("decomposition.activation_energy" in names
            and case.sections["decomposition"].given("pre_exponential_factor")
            and run.correlation is None):
        warnings.append(
            "Monte Carlo: activation_energy varies with ln A held (no arrhenius_correlation): "
            "fitted E and ln A are strongly correlated, so the spread of TD24 and TMRad is "
            "overstated; give arrhenius_correlation or a reference_rate at a measured "
            "temperature.")
    if not crude and (class_probabilities[str(nominal_class)] < 0.5
                      or most_probable > nominal_class):
        warnings.append(
            f"Monte Carlo: the nominal class {nominal_class} has probability "
            f"{_format_probability(class_probabilities[str(nominal_class)])}; the verdict is not "
            f"robust against the stated uncertainties.")

    spreads = tally["spreads"]
    block = {
        "samples": n,
        "seed": run.seed,
        "method": ("Monte Carlo propagation (JCGM 101:2008), inputs drawn as given, others at "
                   "their case values; percentiles p5/p50/p95; sensitivity by Spearman rank "
                   "correlation"),
        "inputs": inputs,
        "arrhenius_correlation": run.correlation,
        "not_propagated": list(run.not_propagated),
        "class_probabilities": class_probabilities,
        "nominal_class": nominal_class,
        "nominal_class_probability": class_probabilities[str(nominal_class)],
        "most_probable_class": most_probable,
        "probability_class_4_or_5": float(p_class_4_5),
        "probability_mtsr_at_or_above_td24": p_td24,
        "probability_mtsr_at_or_above_mtt": p_mtt,
        "probability_standard_error_max": 0.5 / math.sqrt(n),
        "severity_probabilities": level_probabilities("severity", crit.SEVERITY_4_LEVELS),
        "severity_3_probabilities": level_probabilities("severity_3", crit.SEVERITY_3_LEVELS),
        "probability_level_probabilities": level_probabilities("probability",
                                                               crit.PROBABILITY_6_LEVELS),
        "probability_3_level_probabilities": level_probabilities("probability_3",
                                                                 crit.PROBABILITY_3_LEVELS),
        "mtsr_degC": _spread(mtsr, offset=ZERO_CELSIUS, tally=spreads["mtsr"]),
        "td24_degC": _spread(td24, offset=ZERO_CELSIUS, undefined=-np.inf,
                             tally=spreads["td24"]),
        "tmrad_at_mtsr_h": _spread(tmr, scale=SECONDS_PER_HOUR, undefined=0.0,
                                   tally=spreads["tmrad_at_mtsr"]),
        "onset_margin_K": _spread(margin, undefined=-np.inf, tally=spreads["onset_margin"]),
        "synthesis_adiabatic_rise_K": _spread(fig["synthesis_rise"],
                                              tally=spreads["synthesis_rise"]),
        "decomposition_adiabatic_rise_K": _spread(fig["decomposition_rise"],
                                                  tally=spreads["decomposition_rise"]),
        "td24_no_root_samples": count_no_td24,
        "vessels": vessels,
        "sensitivity": ranking,
        "confidence": confidence,
    }
    if crude:
        # Fail closed: on the crude onset estimate the sampled classes 1-3 and the probability
        # levels are no basis for a verdict; they are withheld (classes 4 and 5 are kept).
        block["class_probabilities_basis"] = ("crude onset estimate: only the probability of "
                                              "classes 4 and 5 is meaningful")
        low = sum(class_probabilities[k] for k in ("1", "2", "3"))
        block["class_probabilities"] = {"1": None, "2": None, "3": None,
                                        "4": class_probabilities["4"],
                                        "5": class_probabilities["5"]}
        block["probability_class_1_to_3_not_concluded"] = low
        block["nominal_class_probability"] = None
        block["probability_level_probabilities"] = {
            name: None for name in block["probability_level_probabilities"]}
        block["probability_3_level_probabilities"] = {
            name: None for name in block["probability_3_level_probabilities"]}
    block["summary_lines"] = _summary_lines(block)
    return block, warnings


def _summary_lines(block) -> list[str]:
    width = 78

    def fit(text):
        return text if len(text) <= width else text[:width - 3] + "..."

    def num(value, digits=1):
        if value is None:
            return "n/a"
        if digits is None:  # times: three significant digits
            return f"{value:.3g}" if abs(value) < 1e5 else f"{value:.2e}"
        return f"{value:.{digits}f}"

    samples = block["samples"]

    def p(value):
        # A probability no sample (or every sample) reached is shown with its 95 % bound
        # (rule of three: Hanley & Lippman-Hand 1983), never as a bare 0 or 1.
        if value == 0.0:
            return f"<{3.0 / samples:.2g}"
        if value == 1.0:
            return f">{1.0 - 3.0 / samples:.4g}"
        return _format_probability(value)
    lines = [f"Uncertainty of the verdict (Monte Carlo, {block['samples']} samples, seed "
             f"{block['seed']})"]
    classes = " ".join(f"{k}: {p(v)}" for k, v in block["class_probabilities"].items())
    lines.append(fit(f"  class probability {classes}"))
    lines.append(fit(f"  P(class >= 4) = {p(block['probability_class_4_or_5'])}  "
                     f"P(MTSR >= TD24) = {p(block['probability_mtsr_at_or_above_td24'])}"))
    lines.append(fit(f"  P(MTSR >= MTT) = {p(block['probability_mtsr_at_or_above_mtt'])}"))
    lines.append(f"  (standard error of a probability at most "
                 f"{block['probability_standard_error_max']:.2g})")
    lines.append(f"  {'':<26}{'p5':>10}{'p50':>10}{'p95':>10}")
    for label, key, digits in (("MTSR degC", "mtsr_degC", 1), ("TD24 degC", "td24_degC", 1),
                               ("TD24 - MTSR K", "onset_margin_K", 1),
                               ("TMRad at MTSR h", "tmrad_at_mtsr_h", None)):
        spread = block[key]
        lines.append(f"  {label:<26}{num(spread['p5'], digits):>10}"
                     f"{num(spread['p50'], digits):>10}{num(spread['p95'], digits):>10}")
    severity = "  ".join(f"{k} {p(v)}" for k, v in block["severity_probabilities"].items())
    lines.append(fit(f"  severity     {severity}"))
    levels = list(block["probability_level_probabilities"].items())
    first = "  ".join(f"{k} {p(v)}" for k, v in levels[:3])
    second = "  ".join(f"{k} {p(v)}" for k, v in levels[3:])
    lines.append(fit(f"  probability  {first}"))
    lines.append(fit(f"               {second}"))
    for vessel in block["vessels"]:
        crit = vessel["critical_coolant_temperature_degC"]
        lines.append(fit(f"  {vessel['name']}"))
        lines.append(fit(f"    critical coolant temperature p5/p50/p95 {num(crit['p5'])}/"
                         f"{num(crit['p50'])}/{num(crit['p95'])} degC"))
        lines.append(fit(f"    P(no stable point) = {p(vessel['probability_no_stable_point'])}   "
                         f"P(MTSR >= T_NR) = "
                         f"{p(vessel['probability_mtsr_at_or_above_no_return'])}"))
    lines.append("  sensitivity (Spearman rank correlation)     TD24 - MTSR   TMRad at MTSR")
    for item in block["sensitivity"]:
        a = item["rank_correlation_onset_margin"]
        b = item["rank_correlation_tmrad_at_mtsr"]
        lines.append(fit(f"    {item['key'][:42]:<42}"
                         f"{'n/a' if a is None else format(a, '+.2f'):>12}"
                         f"{'n/a' if b is None else format(b, '+.2f'):>16}"))
    if block["td24_no_root_samples"]:
        lines.append(fit(f"  {block['td24_no_root_samples']} samples without TD24 in 150-1500 K: "
                         f"counted as class 5 (fail closed)"))
    return lines
