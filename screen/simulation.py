"""Cooling-failure simulation of the case's batch or semi-batch run (engine feature).

Reads ``[synthesis_kinetics]`` (kinetics, charge, dosing) and the vessel it names, integrates the
reactor balances of :mod:`screen.models.reactor` for normal operation, scans the cooling-failure
time over the whole run (feed stopped and feed continuing) and adds ``results["simulation"]``,
``curves["simulation"]``, warnings and the method text to the screening result.

Hooks (called automatically when this module exists):

- :func:`check_case` by :mod:`screen.case` at load time (cross-field rules, raises CaseError);
- :func:`add_simulation` by :mod:`screen.engine` when the case has ``[synthesis_kinetics]``.

Nothing here reads files or prints. Design choices are marked "design".
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Any

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import CaseError, ModelDomainError, SolverError
from screen.engine import to_celsius as _c

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

#: Accumulation above which a warning is raised when the case states no limit (design, common
#: practice, no source).
DEFAULT_ACCUMULATION_LIMIT = 0.3
#: Failure times per feed mode with a full adiabatic continuation (check with curves).
FULL_SCAN_POINTS = 100
#: Failure times per feed mode in sweeps, Monte Carlo and scenario variants (curves=False).
QUICK_SCAN_POINTS = 30
#: Simulated time after each failure (the usual TMRad horizon; design). [s]
FAILURE_DURATION = 24.0 * SECONDS_PER_HOUR
#: Default after-reaction time simulated after the end of dosing (as the schema states). [s]
DEFAULT_AFTER_DOSING = 2.0 * SECONDS_PER_HOUR
#: Longest simulated normal operation when the end time is a default. [s] (design)
MAXIMUM_END_TIME = 72.0 * SECONDS_PER_HOUR
#: Bounds of the default batch end time, estimated from the isothermal time to 99.9 % [s].
BATCH_END_TIME_BOUNDS = (1.0 * SECONDS_PER_HOUR, MAXIMUM_END_TIME)
#: A default end time is extended until the accumulation left at the end is below this. [-]
END_ACCUMULATION = 0.005
#: Relative tolerance on the mass balance initial_mass + feed_mass = mass.amount (design).
MASS_BALANCE_TOLERANCE = 0.01
#: Relative difference between two stated enthalpies or extents that is warned about (design).
CONSISTENCY_TOLERANCE = 0.02
#: Simulated MTSR above the case MTSR by more than this is warned about. [K] (design)
MTSR_WARNING_MARGIN = 1.0

_SI_UNIT_OF_SCHEME = {"first-order": "1/s", "second-order": "m^3/(mol*s)"}
_UNIT_TEXT_OF_SCHEME = {"first-order": "1/s (e.g. \"2.5e-4 1/s\")",
                        "second-order": "m^3/(mol s) or L/(mol s) (e.g. \"2e-4 L/(mol s)\")"}


def _key(name: str) -> str:
    return f"synthesis_kinetics.{name}"


# --------------------------------------------------------------------------------------------
# Feed profile text
# --------------------------------------------------------------------------------------------

_NUMBER = r"(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_PIECE_RE = re.compile(
    rf"^\s*(?P<start>{_NUMBER})\s*(?:-|\u2013|to)\s*(?P<end>{_NUMBER})\s*(?P<unit>[A-Za-z]+)\s*:"
    rf"\s*(?P<fraction>.+?)\s*$")
_PROFILE_FORMAT = "'start-end unit: fraction; ...', e.g. '0-1 h: 0.2; 1-3 h: 0.8'"


def parse_feed_profile(text: str, key: str = _key("feed_profile"),
                       path: str | None = None) -> tuple[tuple[float, float, float], ...]:
    """Parse a piecewise feed profile ``'0-1 h: 0.2; 1-3 h: 0.8'``.

    Each piece is ``start-end unit: fraction``: the time window (any time unit pint knows, e.g.
    ``h``, ``min``, ``s``) and the fraction of the total feed dosed evenly within it (a number or a
    percentage ``"20 %"``). The fractions must add up to 1.

    Parameters
    ----------
    text : str
        Profile text from the case file.
    key : str
        Key path for error messages.
    path : str, optional
        Case file for error messages.

    Returns
    -------
    tuple of (float, float, float)
        ``(start [s], end [s], fraction [-])`` per piece, in the order written.

    Raises
    ------
    CaseError
        Malformed pieces, an end not after its start, negative fractions, or fractions that do
        not sum to 1.
    """
    from screen.units import parse_dimensionless, parse_quantity

    if not isinstance(text, str) or not text.strip():
        raise CaseError(f"got {text!r}; expected {_PROFILE_FORMAT}", key, path)
    pieces = []
    for index, part in enumerate((p for p in text.split(";") if p.strip()), start=1):
        match = _PIECE_RE.match(part)
        if match is None:
            raise CaseError(f"piece {index} {part.strip()!r} is not understood; expected "
                            f"{_PROFILE_FORMAT}", key, path)
        seconds = parse_quantity(f"1 {match['unit']}", "time", key, path).value
        start = float(match["start"]) * seconds
        end = float(match["end"]) * seconds
        if end <= start:
            raise CaseError(f"piece {index} {part.strip()!r}: the end must be after the start",
                            key, path)
        fraction = parse_dimensionless(match["fraction"], key, path).value
        if fraction < 0.0:
            raise CaseError(f"piece {index} {part.strip()!r}: a fraction cannot be negative",
                            key, path)
        pieces.append((start, end, fraction))
    if not pieces:
        raise CaseError(f"got {text!r}; expected {_PROFILE_FORMAT}", key, path)
    total = sum(piece[2] for piece in pieces)
    if abs(total - 1.0) > 1e-6:
        raise CaseError(f"the fractions add up to {total:.6g}, not 1; each fraction is the share "
                        f"of the total feed dosed in its window", key, path)
    # Absorb the rounding of the written fractions so that the model's exact check passes.
    pieces = [(start, end, fraction / total) for start, end, fraction in pieces]
    return tuple(pieces)


# --------------------------------------------------------------------------------------------
# Inputs resolved from the case (SI, defaults applied, contradictions rejected)
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class SimulationInputs:
    """The simulated run in SI, at the scale of the case (``mass.amount``), before vessel scaling.

    Attributes
    ----------
    scheme : str
        ``"first-order"`` or ``"second-order"``.
    first_order_reagent : str
        ``"A"`` or ``"B"``.
    rate_key : str
        Case key of the rate (``rate_constant`` or ``pre_exponential_factor``).
    rate_constant, reference_temperature : float or None
        k at T_ref [1/s or m^3/(mol s)] and T_ref [K], when given.
    pre_exponential_factor : float or None
        k_inf [1/s or m^3/(mol s)], when given.
    activation_energy : float
        E. [J/mol]
    activation_energy_source : str
        Key it came from.
    molar_enthalpy : float
        dH_r, negative. [J/mol]
    molar_enthalpy_source : str
        Key (or derivation) it came from.
    initial_mass, initial_moles_a, initial_moles_b : float
        Charge. [kg], [mol], [mol]
    initial_temperature : float
        [K]
    feed_moles, feed_mass : float
        Total feed (0 for a batch). [mol], [kg]
    dosing_time : float or None
        Constant-rate dosing time. [s]
    dosing_start : float
        [s]
    feed_profile : tuple or None
        Pieces ``(start [s], end [s], fraction)``.
    feed_temperature : float
        [K]
    end_time : float
        Simulated normal operation. [s]
    end_time_source : str
        ``"given"`` or how the default was set.
    density : float or None
        [kg/m^3] (None allowed for first order only).
    vessel_index : int
        Index of the simulated vessel in ``case.vessels``.
    vessel_key : str
        Its key prefix (``vessel`` or ``vessel.N``).
    scale_factor : float
        Vessel batch mass over ``mass.amount`` (1 when equal). [-]
    accumulation_limit : float
        [-]
    notes : tuple of str
        Defaults and derivations applied (for the method text).
    """

    scheme: str
    first_order_reagent: str
    rate_key: str
    rate_constant: float | None
    reference_temperature: float | None
    pre_exponential_factor: float | None
    activation_energy: float
    activation_energy_source: str
    molar_enthalpy: float
    molar_enthalpy_source: str
    initial_mass: float
    initial_moles_a: float
    initial_moles_b: float
    initial_temperature: float
    feed_moles: float
    feed_mass: float
    dosing_time: float | None
    dosing_start: float
    feed_profile: tuple | None
    feed_temperature: float
    end_time: float
    end_time_source: str
    density: float | None
    vessel_index: int
    vessel_key: str
    scale_factor: float
    accumulation_limit: float
    notes: tuple[str, ...] = field(default=())

    @property
    def is_semi_batch(self) -> bool:
        """True when B is dosed."""
        return self.feed_moles > 0.0

    @property
    def dosing_end(self) -> float:
        """End of the dosing (0 for a batch). [s]"""
        if not self.is_semi_batch:
            return 0.0
        if self.feed_profile is not None:
            return max(piece[1] for piece in self.feed_profile)
        return self.dosing_start + self.dosing_time

    def arrhenius_factor(self) -> float:
        """k_inf from whichever rate was given. [1/s or m^3/(mol s)]"""
        if self.pre_exponential_factor is not None:
            return self.pre_exponential_factor
        return self.rate_constant * math.exp(
            self.activation_energy / (GAS_CONSTANT * self.reference_temperature))


def _relative_difference(a: float, b: float) -> float:
    return abs(a - b) / max(abs(a), abs(b), 1e-300)


def _batch_end_time(scheme, first_order_reagent, k, moles_a, moles_b, volume) -> float:
    """Isothermal time to 99.9 % of the possible extent at the start temperature [s].

    First order: t = ln(1000)/k. Second order A + B in a constant volume (integrated rate law,
    e.g. Levenspiel, Chemical Reaction Engineering, 3rd ed. 1999, ch. 3):
    t = ln[c_B0 (c_A0 - x) / (c_A0 (c_B0 - x))] / (k (c_A0 - c_B0)), x = 0.999 min(c_A0, c_B0);
    t = 0.999 / (k c0 (1 - 0.999)) for equal concentrations.
    """
    target = 0.999
    if scheme == "first-order":
        estimate = math.log(1.0 / (1.0 - target)) / k
    else:
        c_a, c_b = moles_a / volume, moles_b / volume
        if _relative_difference(c_a, c_b) < 1e-9:
            estimate = target / (k * c_a * (1.0 - target))
        else:
            x = target * min(c_a, c_b)
            estimate = math.log(c_b * (c_a - x) / (c_a * (c_b - x))) / (k * (c_a - c_b))
    low, high = BATCH_END_TIME_BOUNDS
    return min(max(estimate, low), high)


def resolve_inputs(sections, vessels, path: str | None = None,
                   warnings: list | None = None) -> SimulationInputs:
    """Read ``[synthesis_kinetics]`` with its defaults and reject contradictions.

    Parameters
    ----------
    sections : dict of screen.case.Section
        Validated sections (SI floats).
    vessels : sequence of screen.case.Section
        Validated vessels.
    path : str, optional
        Case file, for error messages.
    warnings : list of str, optional
        Receives warnings about inconsistent but usable input.

    Returns
    -------
    SimulationInputs
        Everything the simulation needs, in SI at the scale of ``mass.amount``.

    Raises
    ------
    CaseError
        Missing or contradictory input, naming the key.
    """
    warnings = [] if warnings is None else warnings
    kin = sections["synthesis_kinetics"]
    given = kin.as_dict()
    synthesis = sections["synthesis"]
    process = sections["process"]
    mass_section = sections["mass"]
    final_mass = float(mass_section.amount)
    t_p = float(process.temperature)
    notes: list[str] = []

    def error(message, name):
        raise CaseError(message, _key(name) if "." not in name else name, path)

    # Rate law.
    scheme = given.get("scheme")
    if scheme is None:
        error("missing scheme: \"second-order\" (first order in A and in B) or \"first-order\"",
              "scheme")
    reagent = given.get("first_order_reagent")
    if scheme == "second-order" and reagent is not None:
        error("first_order_reagent is used only with scheme = \"first-order\"; remove it",
              "first_order_reagent")
    if scheme == "first-order" and reagent is None:
        if given.get("feed_amount"):
            error("a first-order semi-batch needs first_order_reagent = \"A\" (charged) or \"B\" "
                  "(dosed): the reagent whose concentration sets the rate", "first_order_reagent")
        reagent = "A"
        notes.append("first order in A (default)")
    reagent = reagent or "A"

    has_k = "rate_constant" in given
    has_factor = "pre_exponential_factor" in given
    has_reference = "reference_temperature" in given
    if has_k and has_factor:
        error("give either rate_constant with reference_temperature, or pre_exponential_factor, "
              "not both", "pre_exponential_factor")
    if not has_k and not has_factor:
        error("missing the rate: give rate_constant with reference_temperature (1/s first order; "
              "m^3/(mol s) or L/(mol s) second order), or pre_exponential_factor",
              "rate_constant")
    if has_k and not has_reference:
        error("rate_constant needs reference_temperature, the temperature at which it was "
              "measured", "reference_temperature")
    if has_reference and not has_k:
        error("reference_temperature belongs to rate_constant; remove it or give rate_constant",
              "reference_temperature")

    if "activation_energy" in given:
        activation_energy = float(given["activation_energy"])
        activation_source = _key("activation_energy")
        if (synthesis.activation_energy is not None and _relative_difference(
                activation_energy, synthesis.activation_energy) > CONSISTENCY_TOLERANCE):
            warnings.append(
                f"synthesis_kinetics.activation_energy ({activation_energy / 1e3:.4g} kJ/mol) "
                f"differs from synthesis.activation_energy "
                f"({synthesis.activation_energy / 1e3:.4g} kJ/mol); the simulation uses the "
                f"first, the vessel cooling check the second.")
    elif synthesis.activation_energy is not None:
        activation_energy = float(synthesis.activation_energy)
        activation_source = "synthesis.activation_energy"
        notes.append("activation energy from [synthesis]")
    else:
        error("missing activation_energy of the desired reaction (here or in [synthesis]), e.g. "
              "\"65 kJ/mol\"", "activation_energy")

    # Charge and feed (case scale).
    if "initial_amount_a" not in given:
        error("missing initial_amount_a: the amount of A charged, e.g. \"8400 mol\"",
              "initial_amount_a")
    moles_a = float(given["initial_amount_a"])
    feed_moles = float(given.get("feed_amount", 0.0))
    semi_batch = feed_moles > 0.0
    feed_keys = [name for name in ("dosing_time", "feed_profile", "dosing_start")
                 if name in given]
    if not semi_batch:
        if feed_keys or given.get("feed_mass"):
            name = feed_keys[0] if feed_keys else "feed_mass"
            error(f"{name} is given but feed_amount is 0 or absent: give feed_amount (mol of B "
                  f"dosed) for a semi-batch, or remove the dosing keys for a batch", name)
        if process.mode == "semi-batch":
            error("process.mode is \"semi-batch\" but nothing is dosed: give feed_amount (mol of "
                  "B) with dosing_time or feed_profile", "feed_amount")
    else:
        if process.mode == "batch":
            error("feed_amount > 0 describes a semi-batch run but process.mode is \"batch\"; "
                  "set mode = \"semi-batch\" or remove the feed", "feed_amount")
        if ("dosing_time" in given) == ("feed_profile" in given):
            error("give exactly one of dosing_time (constant rate) and feed_profile "
                  "(piecewise)", "dosing_time" if "dosing_time" in given else "feed_profile")
        if "dosing_start" in given and "feed_profile" in given:
            error("dosing_start applies to dosing_time only; write the start into feed_profile",
                  "dosing_start")

    if "initial_amount_b" in given:
        moles_b = float(given["initial_amount_b"])
    elif scheme == "first-order" and reagent == "A" and not semi_batch:
        moles_b = moles_a
        notes.append("first-order batch: initial_amount_b taken equal to initial_amount_a (B "
                     "only counts the extent)")
    else:
        moles_b = 0.0
    if moles_b + feed_moles <= 0.0:
        error("nothing can react: B is neither charged (initial_amount_b) nor dosed "
              "(feed_amount)", "initial_amount_b")
    if scheme == "first-order":
        if reagent == "A" and moles_b < moles_a * (1.0 - 1e-12):
            error(f"first order in A needs B charged at least equal to A from the start "
                  f"(initial_amount_b {moles_b:.6g} mol < initial_amount_a {moles_a:.6g} mol); "
                  f"otherwise the rate would convert B that is not there", "initial_amount_b")
        if reagent == "B" and moles_a < (moles_b + feed_moles) * (1.0 - 1e-12):
            error(f"first order in B needs A charged at least equal to all B (charged plus dosed, "
                  f"{moles_b + feed_moles:.6g} mol)", "initial_amount_a")

    feed_mass = 0.0
    if semi_batch:
        initial_mass = given.get("initial_mass")
        feed_mass = given.get("feed_mass")
        if initial_mass is None and feed_mass is None:
            error(f"a semi-batch needs initial_mass or feed_mass (they add up to mass.amount = "
                  f"{final_mass:.6g} kg)", "initial_mass")
        if initial_mass is not None and feed_mass is not None:
            if _relative_difference(initial_mass + feed_mass, final_mass) > MASS_BALANCE_TOLERANCE:
                error(f"initial_mass + feed_mass = {initial_mass + feed_mass:.6g} kg differs from "
                      f"mass.amount = {final_mass:.6g} kg (the mass at the end of the step) by "
                      f"more than {MASS_BALANCE_TOLERANCE:.0%}", "feed_mass")
        elif initial_mass is None:
            initial_mass = final_mass - feed_mass
            if initial_mass <= 0.0:
                error(f"feed_mass {feed_mass:.6g} kg is not below mass.amount {final_mass:.6g} kg: "
                      f"nothing would be charged before dosing", "feed_mass")
            notes.append("initial_mass = mass.amount - feed_mass")
        else:
            feed_mass = final_mass - initial_mass
            if feed_mass <= 0.0:
                error(f"initial_mass {initial_mass:.6g} kg is not below mass.amount "
                      f"{final_mass:.6g} kg: the feed would have no mass", "initial_mass")
            notes.append("feed_mass = mass.amount - initial_mass")
        if feed_mass <= 0.0:
            error("a feed of B needs a feed_mass above 0", "feed_mass")
    else:
        initial_mass = given.get("initial_mass", final_mass)
        if _relative_difference(initial_mass, final_mass) > MASS_BALANCE_TOLERANCE:
            error(f"a batch charges everything at the start: initial_mass {initial_mass:.6g} kg "
                  f"must equal mass.amount {final_mass:.6g} kg", "initial_mass")

    density = mass_section.density
    if scheme == "second-order" and density is None:
        raise CaseError("a second-order rate k c_A c_B needs the volume of the mass: give "
                        "mass.density, e.g. \"950 kg/m^3\"", "mass.density", path)

    # Enthalpy.
    total_extent = min(moles_a, moles_b + feed_moles)
    if "molar_enthalpy" in given:
        enthalpy = float(given["molar_enthalpy"])
        enthalpy_source = _key("molar_enthalpy")
        if enthalpy >= 0.0:
            error("molar_enthalpy must be negative for an exothermic reaction (dH_r < 0 releases "
                  "heat)", "molar_enthalpy")
        if (synthesis.molar_enthalpy is not None and _relative_difference(
                enthalpy, synthesis.molar_enthalpy) > CONSISTENCY_TOLERANCE):
            warnings.append(
                f"synthesis_kinetics.molar_enthalpy ({enthalpy / 1e3:.4g} kJ/mol) differs from "
                f"synthesis.molar_enthalpy ({synthesis.molar_enthalpy / 1e3:.4g} kJ/mol); the "
                f"simulation uses the first.")
    elif synthesis.molar_enthalpy is not None:
        enthalpy = float(synthesis.molar_enthalpy)
        enthalpy_source = "synthesis.molar_enthalpy"
    else:
        # [synthesis] gives the heat per kg of final mass: spread it over the simulated extent.
        enthalpy = -float(synthesis.energy) * final_mass / total_extent
        enthalpy_source = "synthesis.energy x mass.amount / possible extent"
        notes.append(f"molar enthalpy {enthalpy / 1e3:.4g} kJ/mol derived from synthesis.energy")
    if synthesis.limiting_amount is not None and _relative_difference(
            total_extent, synthesis.limiting_amount) > CONSISTENCY_TOLERANCE:
        warnings.append(
            f"The simulated extent min(A, B charged + dosed) = {total_extent:.6g} mol differs from "
            f"synthesis.limiting_amount = {synthesis.limiting_amount:.6g} mol: the simulation and "
            f"the [synthesis] figures describe different amounts of heat.")

    # Times and temperatures.
    initial_temperature = float(given.get("initial_temperature", t_p))
    feed_temperature = float(given.get("feed_temperature", t_p))
    profile = None
    dosing_time = None
    dosing_start = float(given.get("dosing_start", 0.0))
    if semi_batch:
        if "feed_profile" in given:
            profile = parse_feed_profile(given["feed_profile"], _key("feed_profile"), path)
            dosing_end = max(piece[1] for piece in profile)
        else:
            dosing_time = float(given["dosing_time"])
            dosing_end = dosing_start + dosing_time
        if synthesis.dosing_time is not None and dosing_time is not None and _relative_difference(
                dosing_time, synthesis.dosing_time) > CONSISTENCY_TOLERANCE:
            warnings.append(
                f"synthesis_kinetics.dosing_time ({dosing_time / SECONDS_PER_HOUR:.3g} h) differs "
                f"from synthesis.dosing_time ({synthesis.dosing_time / SECONDS_PER_HOUR:.3g} h).")
    else:
        dosing_end = 0.0

    if has_k:
        factor = float(given["rate_constant"]) * math.exp(
            activation_energy / (GAS_CONSTANT * float(given["reference_temperature"])))
    else:
        factor = float(given["pre_exponential_factor"])
    if "end_time" in given:
        end_time = float(given["end_time"])
        end_source = "given"
        if end_time <= dosing_end:
            error(f"end_time {end_time / SECONDS_PER_HOUR:.4g} h must be after the end of the "
                  f"dosing ({dosing_end / SECONDS_PER_HOUR:.4g} h)", "end_time")
    elif semi_batch:
        end_time = dosing_end + DEFAULT_AFTER_DOSING
        end_source = "end of dosing + 2 h (default)"
    else:
        exponent = activation_energy / (GAS_CONSTANT * initial_temperature)
        if exponent > 700.0:
            error("E/(R T) overflows at the initial temperature; check activation_energy",
                  "activation_energy")
        k_start = factor * math.exp(-exponent)
        volume = initial_mass / density if density else 1.0
        end_time = _batch_end_time(scheme, reagent, k_start, moles_a, moles_b, volume)
        end_source = ("isothermal time to 99.9 % conversion at the initial temperature "
                      "(default, 1-72 h)")

    # Vessel.
    if not vessels:
        error("the simulation needs a [[vessel]] for the cooling (U, area, coolant temperature)",
              "vessel")
    names = [vessel.name for vessel in vessels]
    if "vessel" in given:
        if given["vessel"] not in names:
            error(f"no vessel named {given['vessel']!r}; the case has "
                  f"{', '.join(repr(name) for name in names)}", "vessel")
        index = names.index(given["vessel"])
    else:
        index = len(vessels) - 1
    vessel_key = f"vessel.{index + 1}" if len(vessels) > 1 else "vessel"
    batch_mass = vessels[index].batch_mass
    scale = 1.0
    if batch_mass is not None and _relative_difference(batch_mass, final_mass) > 1e-9:
        scale = float(batch_mass) / final_mass

    limit = float(given.get("accumulation_limit", DEFAULT_ACCUMULATION_LIMIT))
    return SimulationInputs(
        scheme=scheme, first_order_reagent=reagent,
        rate_key="rate_constant" if has_k else "pre_exponential_factor",
        rate_constant=float(given["rate_constant"]) if has_k else None,
        reference_temperature=float(given["reference_temperature"]) if has_k else None,
        pre_exponential_factor=float(given["pre_exponential_factor"]) if has_factor else None,
        activation_energy=activation_energy, activation_energy_source=activation_source,
        molar_enthalpy=enthalpy, molar_enthalpy_source=enthalpy_source,
        initial_mass=float(initial_mass), initial_moles_a=moles_a, initial_moles_b=moles_b,
        initial_temperature=initial_temperature, feed_moles=feed_moles,
        feed_mass=float(feed_mass), dosing_time=dosing_time, dosing_start=dosing_start,
        feed_profile=profile, feed_temperature=feed_temperature, end_time=end_time,
        end_time_source=end_source, density=None if density is None else float(density),
        vessel_index=index, vessel_key=vessel_key, scale_factor=scale,
        accumulation_limit=limit, notes=tuple(notes))


#: Model parameter names (screen.models.reactor) -> case keys, for error messages.
_MODEL_KEYS = {
    "scheme": "scheme", "first_order_reagent": "first_order_reagent",
    "activation_energy": "activation_energy", "molar_enthalpy": "molar_enthalpy",
    "rate_constant": "rate_constant", "reference_temperature": "reference_temperature",
    "initial_mass": "initial_mass", "initial_moles_a": "initial_amount_a",
    "initial_moles_b": "initial_amount_b", "initial_temperature": "initial_temperature",
    "feed.moles_b": "feed_amount", "feed.mass": "feed_mass",
    "feed.feed_temperature": "feed_temperature", "feed.dosing_time": "dosing_time",
    "feed.start_time": "dosing_start", "feed.profile": "feed_profile", "end_time": "end_time",
}


def _case_key(model_key: str | None, inputs: SimulationInputs | None = None) -> str:
    if model_key is None:
        return "synthesis_kinetics"
    if model_key == "pre_exponential_factor" and inputs is not None:
        return _key(inputs.rate_key)
    if model_key.startswith("feed.profile"):
        return _key("feed_profile")
    if model_key in _MODEL_KEYS:
        return _key(_MODEL_KEYS[model_key])
    return "synthesis_kinetics"


def _model_objects(inputs: SimulationInputs, specific_heat: float, path: str | None):
    """(SynthesisKinetics, ReactorCharge, Feed or None) at the vessel's scale."""
    from screen.models.reactor import Feed, ReactorCharge, SynthesisKinetics

    scale = inputs.scale_factor
    try:
        kinetics = SynthesisKinetics(
            scheme=inputs.scheme, pre_exponential_factor=inputs.arrhenius_factor(),
            activation_energy=inputs.activation_energy, molar_enthalpy=inputs.molar_enthalpy,
            first_order_reagent=inputs.first_order_reagent)
        charge = ReactorCharge(
            initial_mass=inputs.initial_mass * scale,
            initial_moles_a=inputs.initial_moles_a * scale,
            initial_moles_b=inputs.initial_moles_b * scale,
            initial_temperature=inputs.initial_temperature,
            specific_heat=specific_heat,
            # First order never uses the volume; any positive density then serves.
            density=inputs.density if inputs.density is not None else 1000.0)
        feed = None
        if inputs.is_semi_batch:
            feed = Feed(moles_b=inputs.feed_moles * scale, mass=inputs.feed_mass * scale,
                        feed_temperature=inputs.feed_temperature,
                        dosing_time=inputs.dosing_time, profile=inputs.feed_profile,
                        start_time=inputs.dosing_start)
    except (ModelDomainError, OverflowError) as exc:
        message = getattr(exc, "message", str(exc))
        raise CaseError(message, _case_key(getattr(exc, "key", None), inputs), path) from None
    return kinetics, charge, feed


def check_case(sections, vessels, path, warnings) -> None:
    """Cross-field rules of ``[synthesis_kinetics]`` (called by :mod:`screen.case` at load time).

    Parameters
    ----------
    sections : dict of screen.case.Section
        Validated sections (SI floats).
    vessels : sequence of screen.case.Section
        Validated vessels.
    path : str
        Case file, for error messages.
    warnings : list of str
        Receives warnings about inconsistent but usable input.

    Raises
    ------
    CaseError
        Missing or contradictory input, naming the key.
    """
    if "synthesis_kinetics" not in sections:
        return
    inputs = resolve_inputs(sections, vessels, path, warnings)
    _model_objects(inputs, float(sections["mass"].specific_heat), path)


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
    from screen.vessels import vessel_geometry

    vessel = case.vessels[inputs.vessel_index]
    _, _, area, _, _ = vessel_geometry(case, vessel, inputs.vessel_key)
    ua = float(vessel.heat_transfer_coefficient) * area
    coolant = float(vessel.coolant_temperature)
    note = f"U A = {ua:.4g} W/K at the final fill, constant (design)"
    losses = float(vessel.heat_losses or 0.0)
    if losses > 0.0:
        # Losses are a second conductance to ambient: one equivalent line, as in screen.vessels.
        coolant = (ua * coolant + losses * float(vessel.ambient_temperature)) / (ua + losses)
        ua += losses
        note += f"; heat losses {losses:.4g} W/K to ambient added"
    return vessel, ua, coolant, note


def _decomposition_for(case, result):
    kinetics = result.curves.get("kinetics") if isinstance(result.curves, dict) else None
    if kinetics is None:
        from screen.engine import decomposition_kinetics

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
    case : screen.case.Case
        Validated case with ``[synthesis_kinetics]``.
    result : screen.engine.ScreeningResult
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
    import numpy as np

    from screen.models.reactor import (
        Cooling,
        dosing_warnings,
        simulate_normal_operation,
        worst_case_scan,
    )

    path = case.path
    sections = case.sections
    process = sections["process"]
    t_p = float(process.temperature)
    cp = float(sections["mass"].specific_heat)
    inputs = resolve_inputs(sections, case.vessels, path, [])
    _check_rate_unit(case, inputs)
    kinetics, charge, feed = _model_objects(inputs, cp, path)
    vessel, ua, coolant, cooling_note = _vessel_cooling(case, inputs)
    cooling = Cooling(ua=ua, coolant_temperature=coolant)
    decomposition = _decomposition_for(case, result)
    mtt = float(result.curves["temperatures_K"]["MTT"])
    scan_points = FULL_SCAN_POINTS if curves else QUICK_SCAN_POINTS
    stated = float(process.accumulation) if process.given("accumulation") else None

    end_time, end_basis = inputs.end_time, inputs.end_time_source
    try:
        while True:
            normal = simulate_normal_operation(
                kinetics, charge, cooling, end_time, feed=feed, decomposition=decomposition,
                output_points=501 if curves else 201)
            # A default end time is extended until the synthesis is over, so that the scan
            # covers every failure time that still holds reactant (design).
            if (inputs.end_time_source == "given" or normal.accumulation[-1] <= END_ACCUMULATION
                    or end_time >= MAXIMUM_END_TIME):
                break
            end_time = min(2.0 * end_time, MAXIMUM_END_TIME)
            end_basis = (f"{inputs.end_time_source}, extended to "
                         f"{end_time / SECONDS_PER_HOUR:.3g} h until X_ac <= {END_ACCUMULATION}")
        scan = worst_case_scan(normal, mtt, n_initial=60 if curves else 30, refine=True,
                               n_failure_times=scan_points, duration=FAILURE_DURATION)
        dosing = dosing_warnings(normal, inputs.accumulation_limit, process_temperature=t_p,
                                 stated_accumulation=stated)
    except ModelDomainError as exc:
        raise CaseError(exc.message, _case_key(exc.key, inputs), path) from None
    except SolverError as exc:
        raise SolverError(f"cooling-failure simulation: {exc.message}", "synthesis_kinetics",
                          path) from None

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
    vessel_name = vessel.name
    mode = "semi-batch" if normal.is_semi_batch else "batch"

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
    if mtsr_stopped > case_mtsr + MTSR_WARNING_MARGIN:
        warnings.append(
            f"{prefix}the simulated MTSR with the feed stopped ({_c(mtsr_stopped):.1f} degC) "
            f"exceeds the MTSR from [process] ({_c(case_mtsr):.1f} degC) on which the criticality "
            f"class rests: the class may be too favourable; check the accumulation data.")
    if mtsr_continuing > max(case_mtsr, mtsr_stopped) + MTSR_WARNING_MARGIN:
        reach = ("" if not math.isfinite(continuing.shortest_time_to_mtt) else
                 f"; the MTT ({_c(mtt):.1f} degC) is reached as early as "
                 f"{_hours_text(continuing.shortest_time_to_mtt)} after a failure")
        warnings.append(
            f"{prefix}if the feed runs on after a cooling failure the mass reaches "
            f"{_c(mtsr_continuing):.1f} degC (failure at "
            f"{worst_continuing.failure_time / SECONDS_PER_HOUR:.2f} h){reach}. The MTSR and the "
            f"class assume that the dosing stops: interlock the feed with the cooling.")
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
    result.methods["simulation"] = method

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
    results["summary_lines"] = _summary_lines(results, scan_points)
    result.results["simulation"] = results

    if curves:
        after_stopped, course_stopped = _failure_course(worst_stopped)
        after_continuing, course_continuing = _failure_course(worst_continuing)
        result.curves["simulation"] = {
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
