"""Inputs of the cooling-failure simulation: ``[synthesis_kinetics]`` read into
:class:`SimulationInputs`.

Resolves the charge, the feed (rate, time or profile), the kinetics and the vessel the simulation
runs in, with the cross-field rules checked at load time (:func:`check_case`). The simulation
itself is :mod:`screen.analyses.simulation`.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import CaseError, ModelDomainError

#: Accumulation above which a warning is raised when the case states no limit (design, common
#: practice, no source).
DEFAULT_ACCUMULATION_LIMIT = 0.3


#: Default after-reaction time simulated after the end of dosing (as the schema states). [s]
DEFAULT_AFTER_DOSING = 2.0 * SECONDS_PER_HOUR


#: Longest simulated normal operation when the end time is a default. [s] (design)
MAXIMUM_END_TIME = 72.0 * SECONDS_PER_HOUR


#: Bounds of the default batch end time, estimated from the isothermal time to 99.9 % [s].
BATCH_END_TIME_BOUNDS = (1.0 * SECONDS_PER_HOUR, MAXIMUM_END_TIME)


#: Relative tolerance on the mass balance initial_mass + feed_mass = mass.amount (design).
MASS_BALANCE_TOLERANCE = 0.01


#: Relative difference between two stated enthalpies or extents that is warned about (design).
CONSISTENCY_TOLERANCE = 0.02


def _key(name: str) -> str:
    return f"synthesis_kinetics.{name}"


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


class _InputReader:
    """The ``[synthesis_kinetics]`` values being read, with the case context of every step."""

    def __init__(self, sections, path, warnings):
        self.given = sections["synthesis_kinetics"].as_dict()
        self.synthesis = sections["synthesis"]
        self.process = sections["process"]
        self.mass_section = sections["mass"]
        self.final_mass = float(self.mass_section.amount)
        self.path = path
        self.warnings = warnings
        self.notes: list[str] = []

    def error(self, message, name):
        raise CaseError(message, _key(name) if "." not in name else name, self.path)


def _rate_law(reader):
    """Scheme, first-order reagent and which rate keys are given."""
    given, error = reader.given, reader.error
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
        reader.notes.append("first order in A (default)")
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
    return scheme, reagent, has_k, has_factor


def _activation_energy(reader):
    """Activation energy [J/mol] of the desired reaction and its source key."""
    given, error = reader.given, reader.error
    if "activation_energy" in given:
        activation_energy = float(given["activation_energy"])
        activation_source = _key("activation_energy")
        if (reader.synthesis.activation_energy is not None and _relative_difference(
                activation_energy, reader.synthesis.activation_energy) > CONSISTENCY_TOLERANCE):
            reader.warnings.append(
                f"synthesis_kinetics.activation_energy ({activation_energy / 1e3:.4g} kJ/mol) "
                f"differs from synthesis.activation_energy "
                f"({reader.synthesis.activation_energy / 1e3:.4g} kJ/mol); the simulation uses the "
                f"first, the vessel cooling check the second.")
    elif reader.synthesis.activation_energy is not None:
        activation_energy = float(reader.synthesis.activation_energy)
        activation_source = "synthesis.activation_energy"
        reader.notes.append("activation energy from [synthesis]")
    else:
        error("missing activation_energy of the desired reaction (here or in [synthesis]), e.g. "
              "\"65 kJ/mol\"", "activation_energy")
    return activation_energy, activation_source


def _charge_and_feed(reader, scheme, reagent):
    """Amounts charged and dosed [mol] (case scale), and whether the run is a semi-batch."""
    given, error = reader.given, reader.error
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
        if reader.process.mode == "semi-batch":
            error("process.mode is \"semi-batch\" but nothing is dosed: give feed_amount (mol of "
                  "B) with dosing_time or feed_profile", "feed_amount")
    else:
        if reader.process.mode == "batch":
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
        reader.notes.append("first-order batch: initial_amount_b taken equal to initial_amount_a "
                            "(B only counts the extent)")
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
    return moles_a, moles_b, feed_moles, semi_batch


def _masses(reader, semi_batch):
    """Initial and fed mass [kg], checked against mass.amount."""
    given, error = reader.given, reader.error
    final_mass = reader.final_mass
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
            reader.notes.append("initial_mass = mass.amount - feed_mass")
        else:
            feed_mass = final_mass - initial_mass
            if feed_mass <= 0.0:
                error(f"initial_mass {initial_mass:.6g} kg is not below mass.amount "
                      f"{final_mass:.6g} kg: the feed would have no mass", "initial_mass")
            reader.notes.append("feed_mass = mass.amount - initial_mass")
        if feed_mass <= 0.0:
            error("a feed of B needs a feed_mass above 0", "feed_mass")
    else:
        initial_mass = given.get("initial_mass", final_mass)
        if _relative_difference(initial_mass, final_mass) > MASS_BALANCE_TOLERANCE:
            error(f"a batch charges everything at the start: initial_mass {initial_mass:.6g} kg "
                  f"must equal mass.amount {final_mass:.6g} kg", "initial_mass")
    return initial_mass, feed_mass


def _molar_enthalpy(reader, moles_a, moles_b, feed_moles):
    """Molar reaction enthalpy [J/mol] and its source."""
    given, error = reader.given, reader.error
    final_mass, synthesis = reader.final_mass, reader.synthesis
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
            reader.warnings.append(
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
        reader.notes.append(f"molar enthalpy {enthalpy / 1e3:.4g} kJ/mol derived from "
                            f"synthesis.energy")
    if synthesis.limiting_amount is not None and _relative_difference(
            total_extent, synthesis.limiting_amount) > CONSISTENCY_TOLERANCE:
        reader.warnings.append(
            f"The simulated extent min(A, B charged + dosed) = {total_extent:.6g} mol differs from "
            f"synthesis.limiting_amount = {synthesis.limiting_amount:.6g} mol: the simulation and "
            f"the [synthesis] figures describe different amounts of heat.")
    return enthalpy, enthalpy_source


def _dosing(reader, semi_batch):
    """Initial and feed temperatures [K], feed profile or dosing time and start [s], and the
    end of dosing [s]."""
    given = reader.given
    t_p, synthesis = float(reader.process.temperature), reader.synthesis
    # Times and temperatures.
    initial_temperature = float(given.get("initial_temperature", t_p))
    feed_temperature = float(given.get("feed_temperature", t_p))
    profile = None
    dosing_time = None
    dosing_start = float(given.get("dosing_start", 0.0))
    if semi_batch:
        if "feed_profile" in given:
            profile = parse_feed_profile(given["feed_profile"], _key("feed_profile"), reader.path)
            dosing_end = max(piece[1] for piece in profile)
        else:
            dosing_time = float(given["dosing_time"])
            dosing_end = dosing_start + dosing_time
        if synthesis.dosing_time is not None and dosing_time is not None and _relative_difference(
                dosing_time, synthesis.dosing_time) > CONSISTENCY_TOLERANCE:
            reader.warnings.append(
                f"synthesis_kinetics.dosing_time ({dosing_time / SECONDS_PER_HOUR:.3g} h) differs "
                f"from synthesis.dosing_time ({synthesis.dosing_time / SECONDS_PER_HOUR:.3g} h).")
    else:
        dosing_end = 0.0
    return initial_temperature, feed_temperature, profile, dosing_time, dosing_start, dosing_end


def _end_time(reader, scheme, reagent, has_k, activation_energy, semi_batch, dosing_end,
              initial_temperature, initial_mass, moles_a, moles_b, density):
    """Simulated end time [s] and its source (given, after the dosing, or from the batch rate)."""
    given, error = reader.given, reader.error
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
    return end_time, end_source


def _simulated_vessel(reader, vessels):
    """Index and key of the vessel simulated, and the scale from the case mass to its batch."""
    given, error = reader.given, reader.error
    final_mass = reader.final_mass
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
    return index, vessel_key, scale


def resolve_inputs(sections, vessels, path: str | None = None,
                   warnings: list | None = None) -> SimulationInputs:
    """Read ``[synthesis_kinetics]`` with its defaults and reject contradictions.

    Parameters
    ----------
    sections : dict of screen.io.case.Section
        Validated sections (SI floats).
    vessels : sequence of screen.io.case.Section
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
    reader = _InputReader(sections, path, warnings)
    given = reader.given
    scheme, reagent, has_k, has_factor = _rate_law(reader)
    activation_energy, activation_source = _activation_energy(reader)
    moles_a, moles_b, feed_moles, semi_batch = _charge_and_feed(reader, scheme, reagent)
    initial_mass, feed_mass = _masses(reader, semi_batch)
    density = reader.mass_section.density
    if scheme == "second-order" and density is None:
        raise CaseError("a second-order rate k c_A c_B needs the volume of the mass: give "
                        "mass.density, e.g. \"950 kg/m^3\"", "mass.density", reader.path)

    enthalpy, enthalpy_source = _molar_enthalpy(reader, moles_a, moles_b, feed_moles)
    (initial_temperature, feed_temperature, profile, dosing_time, dosing_start,
     dosing_end) = _dosing(reader, semi_batch)
    end_time, end_source = _end_time(reader, scheme, reagent, has_k, activation_energy,
                                     semi_batch, dosing_end, initial_temperature, initial_mass,
                                     moles_a, moles_b, density)
    index, vessel_key, scale = _simulated_vessel(reader, vessels)
    notes = reader.notes
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
    """Cross-field rules of ``[synthesis_kinetics]`` (called by :mod:`screen.io.case` at load time).

    Parameters
    ----------
    sections : dict of screen.io.case.Section
        Validated sections (SI floats).
    vessels : sequence of screen.io.case.Section
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
