"""The declarative case-file schema: every section and key, its kind, bounds and documentation.

To add a key, add a :class:`Field` to :data:`SCHEMA` and document it in ``docs/case-format.md``
(a test fails otherwise). The loader that applies the schema is :mod:`screen.io.case`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from screen.constants import ZERO_CELSIUS

#: Largest case file read [bytes]; a real case is a few kB.
MAX_CASE_BYTES = 1_000_000

#: Absolute temperatures accepted in a case file [K]: -200 degC to 1000 degC (design). Wider
#: than any liquid reaction mass, coolant or calorimetric reference temperature; outside it the
#: value is a typing or unit error, and Arrhenius factors leave floating-point range.
TEMPERATURE_RANGE_K = (ZERO_CELSIUS - 200.0, ZERO_CELSIUS + 1000.0)

#: Largest E/(R T) accepted [-]: exp(709.8) is the largest double, so exp(+-E/RT) beyond about
#: 700 overflows or underflows (design). At 60 degC this is E = 1900 kJ/mol, far above the
#: 30-400 kJ/mol of real reactions: only a unit error (J vs kJ) or a typing error gets there.
MAX_ARRHENIUS_EXPONENT = 700.0


@dataclass(frozen=True)
class Field:
    """Declaration of one case-file key.

    ``kind`` is a quantity kind of :data:`screen.units.DIMENSIONS`, or one of ``"text"``,
    ``"choice"``, ``"number"`` (dimensionless), ``"bool"``.
    """

    kind: str
    required: bool = False
    choices: tuple[str, ...] = ()
    minimum: float | None = None
    maximum: float | None = None
    exclusive_minimum: bool = False
    exclusive_maximum: bool = False
    doc: str = ""


def _f(kind, doc="", **kw) -> Field:
    return Field(kind=kind, doc=doc, **kw)


POSITIVE = dict(minimum=0.0, exclusive_minimum=True)
FRACTION = dict(minimum=0.0, maximum=1.0)

#: The schema: section -> key -> Field. ``vessel`` may be a table or an array of tables.
SCHEMA: dict[str, dict[str, Field]] = {
    "case": {
        "title": _f("text", "Short title of the assessed step", required=True),
        "revision": _f("text", "Revision label of the case"),
        "author": _f("text", "Who prepared the data"),
        "date": _f("text", "Date of the data set (free text, e.g. 2026-11-30)"),
        "notes": _f("text", "Free-text notes, e.g. data sources"),
    },
    "mass": {
        "amount": _f("mass", "Reaction mass at the end of the step", required=True, **POSITIVE),
        "specific_heat": _f("specific_heat", "Specific heat capacity c'p of the reaction mass",
                            required=True, **POSITIVE),
        "density": _f("density", "Density of the reaction mass (for vessel fill)", **POSITIVE),
    },
    "process": {
        "temperature": _f("temperature", "Normal process temperature T_p", required=True),
        "mode": _f("choice", "batch or semi-batch", required=True, choices=("batch", "semi-batch")),
        "accumulation": _f("number", "Maximum thermal accumulation X_ac (0..1)", **FRACTION),
        "accumulation_basis": _f("text", "How a batch accumulation below 1 was established"),
        "accumulation_mass_ratio": _f(
            "number", "Mass present at maximum accumulation over final mass (0..1]",
            minimum=0.0, maximum=1.0, exclusive_minimum=True),
        "max_technical_temperature": _f(
            "temperature", "MTT: boiling point at operating pressure or relief temperature"),
        "mtt_basis": _f("text", "What the MTT is (e.g. boiling point of toluene at 1.013 bar)"),
        "feed_interlock": _f(
            "bool", "Semi-batch: the feed stops automatically on cooling failure or high "
            "temperature (absent: the feed is assumed to run on, fail closed)"),
    },
    "synthesis": {
        "energy": _f("specific_energy", "Heat of the desired reaction per kg of final mass",
                     **POSITIVE),
        "molar_enthalpy": _f("molar_energy", "Molar reaction enthalpy (negative: exothermic)"),
        "limiting_amount": _f("amount_of_substance", "Limiting reagent in the batch", **POSITIVE),
        "activation_energy": _f("molar_energy", "Activation energy of the desired reaction",
                                **POSITIVE),
        "peak_heat_release_rate": _f("specific_power",
                                     "Peak heat release rate measured at T_p", **POSITIVE),
        "dosing_time": _f("time", "Dosing time of the semi-batch feed", **POSITIVE),
    },
    "decomposition": {
        "energy": _f("specific_energy", "Decomposition energy per kg of reaction mass",
                     **POSITIVE),
        "model": _f("choice", "Kinetic model", choices=("zero-order", "nth-order", "autocatalytic")),
        "activation_energy": _f("molar_energy", "Activation energy E", **POSITIVE),
        "reference_rate": _f("specific_power", "Heat release rate of the fresh mass at T_ref",
                             **POSITIVE),
        "reference_temperature": _f("temperature", "Temperature of the reference rate"),
        "pre_exponential_factor": _f("frequency", "Arrhenius pre-exponential factor A",
                                     **POSITIVE),
        "order": _f("number", "Reaction order n", minimum=0.0, maximum=10.0),
        "autocatalytic_order": _f("number", "Autocatalytic order m", minimum=0.0, maximum=10.0),
        "initial_conversion": _f("number", "Initial conversion a0 (autocatalytic)",
                                 minimum=0.0, maximum=1.0, exclusive_minimum=True,
                                 exclusive_maximum=True),
        "onset_temperature": _f("temperature", "DSC onset (information only when kinetics are "
                                "given; else the basis of the crude estimate)"),
        "onset_type": _f("choice", "Which onset onset_temperature is: the detection point (heat "
                         "flow first above the detection limit) or the extrapolated tangent onset "
                         "of a dynamic run", choices=("detection-point", "extrapolated")),
        "onset_detection_limit": _f("specific_power", "Detection limit of the instrument, per kg "
                                    "of sample (detection-point onset)", **POSITIVE),
        "onset_scan_rate": _f("heating_rate", "Heating rate of the dynamic DSC run "
                              "(extrapolated onset)", **POSITIVE),
        "basis": _f("choice", "measured kinetics, or an onset-estimate (a section written from a "
                    "single onset: never treated as measured kinetics)",
                    choices=("measured", "onset-estimate")),
        "onset_method": _f("text", "How the onset was obtained (instrument, crucible, scan rate)"),
        "lowest_measured_temperature": _f(
            "temperature", "Lowest temperature at which the kinetics were measured"),
        "source": _f("text", "Where the kinetics come from (report, DSC run ids)"),
        "validated_range": _f("bool", "The kinetics with reactant consumption were validated "
                                      "(e.g. by adiabatic calorimetry) from MTSR up to the "
                                      "runaway: the integrated nth-order TMRad then governs even "
                                      "where the zero-order value is more critical"),
    },
    "vessel": {
        "name": _f("text", "Vessel name", required=True),
        "batch_mass": _f("mass", "Reaction mass in this vessel (default: mass.amount)", **POSITIVE),
        "heat_transfer_area": _f("area", "Wetted heat-transfer area", **POSITIVE),
        "heat_transfer_coefficient": _f("heat_transfer_coefficient", "Overall U", **POSITIVE),
        "coolant_temperature": _f("temperature", "Coolant (jacket) temperature T_c"),
        "min_coolant_temperature": _f("temperature", "Lowest coolant temperature available"),
        "volume": _f("volume", "Nominal vessel volume", **POSITIVE),
        "diameter": _f("length", "Inner diameter", **POSITIVE),
        "bottom": _f("choice", "Bottom head shape",
                     choices=("flat", "torispherical", "torispherical-0.8",
                              "torispherical-asme", "elliptical")),
        "jacket_height": _f("length", "Height of the jacket top above the bottom", **POSITIVE),
        "heat_losses": _f("thermal_conductance", "Heat losses to ambient", minimum=0.0),
        "ambient_temperature": _f("temperature", "Ambient temperature for heat losses"),
        "headspace_volume": _f("volume", "Gas volume above the mass (closed-vessel pressure)",
                               **POSITIVE),
        "relief_set_pressure": _f("pressure", "Set pressure of the relief device (absolute)",
                                  **POSITIVE),
        "closed": _f("bool", "Closed vessel (true) or open to a condenser or vent (false, "
                             "default); a closed vessel's MTT is the temperature at which vapour "
                             "and pad gas reach relief_set_pressure"),
        "condenser_duty": _f("power", "Condenser capacity as a duty", **POSITIVE),
        "condenser_ua": _f("thermal_conductance", "Condenser U A", **POSITIVE),
        "condenser_coolant_temperature": _f("temperature", "Condenser coolant temperature "
                                            "(inlet)"),
        "condenser_coolant_outlet_temperature": _f(
            "temperature", "Condenser coolant outlet temperature (for the log-mean temperature "
            "difference)"),
        "vapour_line_diameter": _f("length", "Inner diameter of the vapour line", **POSITIVE),
    },
    "synthesis_kinetics": {
        "scheme": _f("choice", "Rate law of the desired reaction A + B -> P",
                     choices=("second-order", "first-order")),
        "first_order_reagent": _f("choice", "Reagent the first-order rate depends on",
                                  choices=("A", "B")),
        "rate_constant": _f("rate_constant", "Rate constant k at reference_temperature "
                            "(1/s first order; m^3/(mol s) or L/(mol s) second order)",
                            **POSITIVE),
        "reference_temperature": _f("temperature", "Temperature of rate_constant"),
        "pre_exponential_factor": _f("rate_constant", "Arrhenius factor of k (instead of "
                                     "rate_constant)", **POSITIVE),
        "activation_energy": _f("molar_energy", "Activation energy of the desired reaction",
                                **POSITIVE),
        "molar_enthalpy": _f("molar_energy", "Molar reaction enthalpy (negative; default: "
                             "synthesis.molar_enthalpy)"),
        "initial_mass": _f("mass", "Mass charged before dosing", **POSITIVE),
        "initial_amount_a": _f("amount_of_substance", "A charged (mol)", **POSITIVE),
        "initial_amount_b": _f("amount_of_substance", "B charged before dosing (mol)",
                               minimum=0.0),
        "initial_temperature": _f("temperature", "Temperature at the start (default T_p)"),
        "feed_amount": _f("amount_of_substance", "B dosed in total (mol; 0 or absent: batch)",
                          minimum=0.0),
        "feed_mass": _f("mass", "Mass of the feed", minimum=0.0),
        "dosing_time": _f("time", "Dosing time (constant feed rate)", **POSITIVE),
        "dosing_start": _f("time", "Start of dosing after t = 0", minimum=0.0),
        "feed_profile": _f("text", "Piecewise feed: 'start-end h: fraction; ...' e.g. "
                           "'0-1 h: 0.2; 1-3 h: 0.8'"),
        "feed_temperature": _f("temperature", "Feed temperature T_D (default T_p)"),
        "end_time": _f("time", "Simulated time of normal operation (default: until at most 0.5 % accumulation is left, up to 72 h)",
                       **POSITIVE),
        "vessel": _f("text", "Name of the vessel to simulate in (default: the last vessel)"),
        "accumulation_limit": _f("number", "Accumulation above which a warning is raised",
                                 **FRACTION),
    },
    "solvent": {
        "name": _f("text", "Solvent name or CAS number (see docs/evaporation.md for the list)"),
        "pressure": _f("pressure", "Operating pressure (absolute) for the boiling point",
                       **POSITIVE),
        "amount": _f("mass", "Solvent present in the batch (for boil-dry)", minimum=0.0),
        "latent_heat": _f("specific_energy", "Latent heat (instead of the table value)",
                          **POSITIVE),
        "gas_yield": _f("specific_amount", "Permanent gas from the decomposition per kg",
                        minimum=0.0),
    },
    "scenarios": {
        "double_charge": _f("bool", "Limiting reagent charged twice"),
        "dosing_rate_factor": _f("number", "Dosing faster by this factor", minimum=1.0,
                                 exclusive_minimum=True, maximum=1000.0),
        "dosing_temperature": _f("temperature", "Dosing at this (lower) temperature"),
        "agitation_loss": _f("bool", "Agitation lost during dosing: dosed feed accumulates"),
        "coolant_temperature": _f("temperature", "Wrong coolant temperature in all vessels"),
        "decomposition_rate_factor": _f("number", "Contamination: decomposition rate times "
                                        "this factor", **POSITIVE),
        "evaporation_check": _f("bool", "Check the boiling barrier in every class"),
    },
    # Free-form: keys are key paths of numeric inputs ("decomposition.activation_energy"),
    # values describe a distribution; validated by screen.runs.uncertainty.check_case.
    "uncertainty": {},
}

#: Hard plausibility limits in SI (design), merged into SCHEMA below: generous ranges outside
#: which a value is a typing or unit error ("1.8 km" for 1.8 m) and the models would leave
#: floating-point range (divisions by near-zero lengths, masses of 1e300 kg). Narrower limits
#: of a field stay; an exclusive minimum of 0 becomes the lower limit given here.
PLAUSIBLE_LIMITS: dict[tuple[str, str], tuple[float | None, float | None]] = {
    ("mass", "amount"): (1e-6, 1e7),  # 1 mg .. 10 000 t [kg]
    ("mass", "density"): (1.0, 30000.0),  # [kg/m^3]
    # Condensed matter lies within 0.1-20 kJ/(kg K); c'p divides every adiabatic rise.
    ("mass", "specific_heat"): (100.0, 20000.0),  # [J/(kg K)]
    ("synthesis", "energy"): (None, 1e8),  # [J/kg]
    ("synthesis", "molar_enthalpy"): (-1e8, None),  # [J/mol]
    ("synthesis", "limiting_amount"): (None, 1e10),  # [mol]
    ("synthesis", "activation_energy"): (1e3, 1e6),  # 1 .. 1000 kJ/mol [J/mol]
    ("decomposition", "energy"): (None, 1e8),
    ("decomposition", "activation_energy"): (1e3, 1e6),
    ("vessel", "batch_mass"): (1e-6, 1e7),
    ("vessel", "heat_transfer_area"): (1e-6, 1e5),  # [m^2]
    ("vessel", "heat_transfer_coefficient"): (1e-2, 1e5),  # [W/(m^2 K)]
    ("vessel", "volume"): (1e-6, 1e4),  # 1 mL .. 10 000 m^3 [m^3]
    ("vessel", "diameter"): (1e-3, 100.0),  # [m]
    ("vessel", "jacket_height"): (1e-3, 100.0),
    ("vessel", "heat_losses"): (None, 1e9),  # [W/K]
    ("vessel", "headspace_volume"): (1e-6, 1e4),
    ("vessel", "relief_set_pressure"): (1.0, 1e9),  # [Pa]
    ("vessel", "condenser_duty"): (None, 1e10),  # [W]
    ("vessel", "condenser_ua"): (None, 1e9),
    ("vessel", "vapour_line_diameter"): (1e-3, 100.0),
    ("synthesis_kinetics", "activation_energy"): (1e3, 1e6),
    ("synthesis_kinetics", "molar_enthalpy"): (-1e8, None),
    ("synthesis_kinetics", "initial_mass"): (1e-6, 1e7),
    ("synthesis_kinetics", "initial_amount_a"): (None, 1e10),
    ("synthesis_kinetics", "initial_amount_b"): (None, 1e10),
    ("synthesis_kinetics", "feed_amount"): (None, 1e10),
    ("synthesis_kinetics", "feed_mass"): (None, 1e7),
    ("solvent", "pressure"): (1.0, 1e9),
    ("solvent", "amount"): (None, 1e7),
    ("solvent", "latent_heat"): (1.0, 1e8),
    ("solvent", "gas_yield"): (None, 1e3),  # [mol/kg]; pure hydrogen is about 500 mol/kg
    ("decomposition", "onset_detection_limit"): (1e-3, 1e4),  # [W/kg]
    ("decomposition", "onset_scan_rate"): (1e-4, 10.0),  # 0.006-600 K/min [K/s]
}


def _apply_plausible_limits() -> None:
    import dataclasses

    for (section, name), (low, high) in PLAUSIBLE_LIMITS.items():
        spec = SCHEMA[section][name]
        changes: dict[str, Any] = {}
        if low is not None and (spec.minimum is None or low > spec.minimum):
            changes.update(minimum=low, exclusive_minimum=False)
        if high is not None and (spec.maximum is None or high < spec.maximum):
            changes.update(maximum=high, exclusive_maximum=False)
        SCHEMA[section][name] = dataclasses.replace(spec, **changes)


_apply_plausible_limits()

#: Sections whose keys are free-form (validated by the feature module, not by SCHEMA).
FREE_FORM_SECTIONS = ("uncertainty",)

#: Sections that may appear at most once and are required.
REQUIRED_SECTIONS = ("case", "mass", "process", "synthesis")
