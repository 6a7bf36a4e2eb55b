"""Model objects built once per screening from the validated case.

The decomposition kinetics, its characteristic temperatures (TD24, TD8) and the synthesis heat are
built here, once, and handed to every analysis that needs them (engine, vessels, simulation,
barrier, scenarios, uncertainty), so that no analysis rebuilds them from the case sections.
"""

from __future__ import annotations

import functools

from screen.models import thermal

#: Crude onset-only estimate: zero order with a low activation energy, the DSC onset read as the
#: temperature where the heat release reaches the detection limit of a dynamic DSC run
#: (Keller et al., J. Loss Prev. Process Ind. 10 (1997) 31-41; values from memory, design).
#: The same constants as the crude estimate of the ``kinetics`` command (screen.models.dsc).
ONSET_ESTIMATE_ACTIVATION_ENERGY = 50e3  # J/mol
ONSET_ESTIMATE_DETECTION_LIMIT = 20.0  # W/kg

def decomposition_kinetics(case):
    """Build the decomposition kinetics object from the case (SI).

    Returns (kinetics, basis) where basis is ``"kinetics"`` or ``"onset-estimate"``.

    Parameters
    ----------
    case : Case
        Loaded case; reads the ``decomposition`` section (SI quantities).
    """
    from screen.models.decomposition import DecompositionKinetics

    dec = case.sections["decomposition"]
    if dec.model is None or dec.basis == "onset-estimate":
        # A section written from a single onset stays an onset estimate in every path, whatever
        # model keys it carries (issue 18 item 1).
        reference = onset_estimate_reference(case)
        kinetics = DecompositionKinetics.from_reference_rate(
            "zero-order", dec.energy, ONSET_ESTIMATE_ACTIVATION_ENERGY,
            reference["rate"], reference["temperature"])
        return kinetics, "onset-estimate"
    common = dict(order=dec.get("order", 1.0 if dec.model == "nth-order" else 0.0),
                  autocatalytic_order=dec.get("autocatalytic_order", 0.0),
                  initial_conversion=dec.get("initial_conversion", 0.0))
    if dec.model == "zero-order":
        common["order"] = 0.0
    if dec.reference_rate is not None:
        kinetics = DecompositionKinetics.from_reference_rate(
            dec.model, dec.energy, dec.activation_energy, dec.reference_rate,
            dec.reference_temperature, **common)
    else:
        kinetics = DecompositionKinetics(
            model=dec.model, energy=dec.energy, activation_energy=dec.activation_energy,
            pre_exponential_factor=dec.pre_exponential_factor, **common)
    return kinetics, "kinetics"


@functools.lru_cache(maxsize=256)
def _characteristic_temperatures(key, cp):
    from screen.models import decomposition as dm

    kinetics = dm.DecompositionKinetics(*key)
    return float(dm.td24(kinetics, cp)), float(dm.td8(kinetics, cp))


def characteristic_temperatures(kinetics, cp) -> tuple[float, float]:
    """(TD24, TD8) [K] of scalar kinetics, cached: sweeps of vessel or process inputs do not
    change them, and each costs a root search.

    Parameters
    ----------
    kinetics : DecompositionKinetics
        Scalar decomposition kinetics.
    cp : float
        Specific heat capacity c'p of the reaction mass. [J/(kg K)]
    """
    key = _kinetics_key(kinetics)
    return _characteristic_temperatures(key, float(cp))


def synthesis_specific_energy(case) -> float:
    """Heat of the desired reaction per kg of final mass [J/kg].

    Parameters
    ----------
    case : Case
        Loaded case; reads ``synthesis`` and ``mass``.
    """
    syn = case.sections["synthesis"]
    if syn.energy is not None:
        return float(syn.energy)
    return float(thermal.specific_energy_from_molar(syn.molar_enthalpy, syn.limiting_amount,
                                                    case.sections["mass"].amount))


def _memoised_per_section(section_name: str, size: int = 64):
    """Memoise a builder ``f(case)`` on the values of one case section: sweeps, limits and
    scenarios rebuild the same model object for every point otherwise. The objects are frozen,
    so sharing them between results is safe."""

    def decorate(build):
        cache: dict = {}

        @functools.wraps(build)
        def cached(case):
            section = case.sections.get(section_name)
            try:
                key = (case.sections["mass"].specific_heat,
                       tuple(sorted(section.as_dict().items())) if section is not None else None)
                hash(key)
            except TypeError:  # an unhashable value: build without the cache
                return build(case)
            if key not in cache:
                if len(cache) >= size:
                    cache.pop(next(iter(cache)))
                cache[key] = build(case)
            return cache[key]

        cached.cache_clear = cache.clear
        return cached

    return decorate


def onset_estimate_reference(case) -> dict:
    """Reference point of the crude onset-only estimate: (temperature, heat release rate).

    - ``onset_type = "detection-point"``: the onset with the instrument's
      ``onset_detection_limit``;
    - ``onset_type = "extrapolated"``: the extrapolated onset converted to the temperature at
      which the run first released 20 W/kg, by
      :func:`screen.models.dsc.conservative_detection_point` (first-order model run with the
      case's energy and ``onset_scan_rate``, lowest over E = 50-300 kJ/mol; derived);
    - not declared: the onset read as a 20 W/kg detection point, ``declared`` False: the engine
      then grants no class (fail closed: an extrapolated onset lies tens of kelvin above the
      detection point).

    Parameters
    ----------
    case : screen.io.case.Case
        Validated case with ``decomposition.onset_temperature``.

    Returns
    -------
    dict
        ``temperature`` [K], ``rate`` [W/kg], ``onset_type`` (str or None), ``declared`` (bool),
        ``text`` (how the point was obtained).
    """
    from screen.errors import CaseError, ScreenError
    from screen.models import dsc

    dec = case.sections["decomposition"]
    onset = float(dec.onset_temperature)
    kind = dec.onset_type
    if kind == "detection-point":
        limit = float(dec.onset_detection_limit)
        return {"temperature": onset, "rate": limit, "onset_type": kind, "declared": True,
                "text": (f"onset {onset - 273.15:.1f} degC read as the detection point, "
                         f"{limit:g} W/kg (declared)")}
    if kind == "extrapolated":
        scan = float(dec.onset_scan_rate)
        try:
            temperature, energy = dsc.conservative_detection_point(
                onset, scan, float(dec.energy), ONSET_ESTIMATE_DETECTION_LIMIT)
        except ScreenError as exc:
            raise CaseError(exc.message, "decomposition.onset_temperature", case.path) from None
        how = ("the onset itself is lower" if energy != energy
               else f"E = {energy / 1e3:.0f} kJ/mol gives the lowest")
        return {"temperature": temperature, "rate": ONSET_ESTIMATE_DETECTION_LIMIT,
                "onset_type": kind, "declared": True,
                "text": (f"extrapolated onset {onset - 273.15:.1f} degC at {scan * 60:.3g} K/min "
                         f"converted to the {ONSET_ESTIMATE_DETECTION_LIMIT:g} W/kg detection "
                         f"point {temperature - 273.15:.1f} degC (first-order model run, lowest "
                         f"over E = 50-300 kJ/mol, {how}; derived)")}
    return {"temperature": onset, "rate": ONSET_ESTIMATE_DETECTION_LIMIT, "onset_type": None,
            "declared": False,
            "text": (f"onset {onset - 273.15:.1f} degC read as a "
                     f"{ONSET_ESTIMATE_DETECTION_LIMIT:g} W/kg detection point, but "
                     f"decomposition.onset_type is not declared")}


decomposition_kinetics = _memoised_per_section("decomposition")(decomposition_kinetics)
onset_estimate_reference = _memoised_per_section("decomposition")(onset_estimate_reference)


@functools.lru_cache(maxsize=1024)
def _tmrad_cached(key, temperature, cp):
    from screen.models import decomposition as dm

    return float(dm.tmrad(dm.DecompositionKinetics(*key), temperature, cp))


def tmrad_at(kinetics, temperature, cp) -> float:
    """TMRad [s] of scalar kinetics at one start temperature [K], cached (the engine's TMRad at
    T_p and MTSR stay the same over a sweep of a vessel input).

    Parameters
    ----------
    kinetics : screen.models.decomposition.DecompositionKinetics
        Scalar decomposition kinetics.
    temperature : float
        Start temperature. [K]
    cp : float
        Specific heat capacity. [J/(kg K)]

    Returns
    -------
    float
        TMRad (phi = 1). [s]
    """
    return _tmrad_cached(_kinetics_key(kinetics), float(temperature), float(cp))


def _kinetics_key(kinetics) -> tuple:
    return (kinetics.model, float(kinetics.energy), float(kinetics.activation_energy),
            float(kinetics.pre_exponential_factor), float(kinetics.order),
            float(kinetics.autocatalytic_order), float(kinetics.initial_conversion),
            None if kinetics.log_pre_exponential_factor is None
            else float(kinetics.log_pre_exponential_factor))


def accumulation_mass_ratio(case) -> tuple[float, str]:
    """Mass present at the maximum accumulation over the final mass, and its basis.

    Semi-batch only (batch: 1, the mass does not change). As given
    (``process.accumulation_mass_ratio``, basis ``"declared"``); else derived from the feed data
    as the smallest physically possible ratio, the initial charge over the final mass
    (``synthesis_kinetics.initial_mass / mass.amount``, basis ``"derived"``): the maximum
    accumulation cannot occur in less mass than was charged before dosing, and the smallest
    ratio gives the highest MTSR (fail closed; derived). The case loader refuses a semi-batch
    case that has neither.

    Parameters
    ----------
    case : Case
        Loaded case; reads ``process``, ``synthesis_kinetics`` and ``mass``.

    Returns
    -------
    tuple of (float, str)
        Ratio (0..1] [-] and ``"declared"``, ``"derived"`` or ``"batch"``.
    """
    process = case.sections["process"]
    if process.mode != "semi-batch":
        return 1.0, "batch"
    if process.accumulation_mass_ratio is not None:
        return float(process.accumulation_mass_ratio), "declared"
    kinetics = case.sections.get("synthesis_kinetics")
    initial = None if kinetics is None else kinetics.initial_mass
    if initial is None:
        from screen.errors import CaseError
        from screen.io.case import MASS_RATIO_MISSING

        raise CaseError(MASS_RATIO_MISSING, "process.accumulation_mass_ratio", case.path)
    return min(float(initial) / float(case.sections["mass"].amount), 1.0), "derived"
