"""Safe operating limits: how far each controllable input may move before a verdict changes.

For each varied input (the others held at the case's values) the screening itself is rerun and
the values at which each criterion changes are located by the sweep's bisection
(:func:`screen.runs.sweep.bisect_change`, tolerance 1e-6 of the input's admissible range). The
criteria are the verdicts the screening already decides, read here, never recomputed:

- the criticality class at most the target class, and every class boundary between today's class
  and the target (Stoessel 1993);
- per vessel: decomposition stability ``recoverable`` (Semenov heat balance), synthesis cooling
  ``adequate``, the evaporative barrier ``holds`` (where the screening assesses it) and the
  closed-vessel pressure ``below`` the relief set pressure (where one is given);
- the onset margin TD24 - MTSR at least a given margin (50 K by default: common practice, no
  source).

The input is first sampled on a coarse grid over its admissible range (the case schema's bounds
and plausibility limits, narrowed by the cross-field rules: the process temperature at most the
MTT, the coolant at least the lowest coolant temperature available, the batch at most what the
vessel holds); every change of a criterion between neighbouring samples nearest today's value is
then bracketed to the tolerance. The trial points of the bisection are secant steps on a
continuous figure behind the verdict (e.g. T_NR - MTSR) where one changes sign across the
bracket (an Illinois-type safeguard keeps both ends moving, the midpoint is used otherwise), so a
limit costs a few screenings rather than twenty. A point the screening rejects (an input error)
counts as failing the criterion (fail closed).

Vessel inputs of a case without synthesis kinetics act on their own vessel only: those points
are screened with that vessel alone (the same engine; the class and the other vessels do not
depend on it).
"""

from __future__ import annotations

import dataclasses
import math
import re
from dataclasses import dataclass, field

from screen.constants import ZERO_CELSIUS
from screen.errors import CaseError, ScreenError
from screen.io.schema import SCHEMA, TEMPERATURE_RANGE_K

#: Controllable inputs that ``limits`` varies: key (``vessel.KEY`` for vessel inputs) -> what it is.
CONTROLLABLE = {
    "process.temperature": "process temperature T_p",
    "process.accumulation": "maximum thermal accumulation X_ac",
    "vessel.coolant_temperature": "coolant temperature T_c",
    "vessel.heat_transfer_coefficient": "overall heat-transfer coefficient U",
    "vessel.batch_mass": "batch mass in the vessel",
    "synthesis.dosing_time": "dosing time (dosing-controlled peak estimate)",
    "synthesis_kinetics.dosing_time": "dosing time of the simulated feed (feed rate)",
    "synthesis_kinetics.feed_temperature": "feed temperature T_D",
}

#: Admissible ranges of inputs the schema leaves open above (design): a dosing time beyond
#: 1000 h is no longer a semi-batch process.
OPEN_UPPER_LIMITS = {"dosing_time": 1000.0 * 3600.0}  # [s]
#: Shortest dosing time considered (design). [s]
SHORTEST_DOSING_TIME = 60.0

#: Onset margin TD24 - MTSR asked for by default (common practice, no source). [K]
DEFAULT_ONSET_MARGIN = 50.0
#: Root-finding tolerance, as a fraction of the admissible range of the input (issue 17).
RELATIVE_TOLERANCE = 1e-6
#: Interior grid points between today's value and each end of the range.
GRID_POINTS_PER_SIDE = 2


CRITERION_TEXT = {
    "criticality_class": "class at most {k}",
    "onset_margin": "onset margin TD24 - MTSR at least {margin:g} K",
    "decomposition_stability": "decomposition stability: recoverable",
    "synthesis_cooling": "synthesis cooling: adequate",
    "barrier": "evaporative barrier: holds",
    "relief_pressure": "closed-vessel pressure below the relief set pressure",
}


# --------------------------------------------------------------------------------------------
# Verdict words (one adapter: the per-vessel vocabulary of the screening)

_LEGACY_VERDICTS = {
    "decomposition_stability": ("stability", {
        "stable": "recoverable", "mtsr-above-no-return": "not recoverable",
        "no-stable-point": "not recoverable", "cannot-conclude": "cannot conclude"}),
    "synthesis_cooling": ("synthesis_stability", {
        "stable": "adequate", "unstable": "insufficient", "stable-estimate": "cannot conclude",
        "not assessed": "cannot conclude"}),
}


def vessel_verdict(entry: dict, name: str) -> str:
    """The per-vessel verdict word ``name`` of one vessel entry of the screening result.

    The one place that reads the vessel vocabulary: the screening's own key when it carries
    one, else the older status words mapped to it (``cannot conclude`` for anything unknown:
    fail closed).

    Parameters
    ----------
    entry : dict
        One member of ``results.vessels``. [JSON]
    name : str
        ``"decomposition_stability"`` or ``"synthesis_cooling"``. [-]

    Returns
    -------
    str
        ``recoverable``/``not recoverable``/``cannot conclude``, or
        ``adequate``/``insufficient``/``cannot conclude``. [-]
    """
    if name in entry:
        return entry[name]
    legacy, words = _LEGACY_VERDICTS[name]
    return words.get(entry.get(legacy), "cannot conclude")


# --------------------------------------------------------------------------------------------
# Inputs and their admissible ranges


@dataclass(frozen=True)
class LimitInput:
    """One varied input: key as reported, where it acts, admissible range and today's value (SI).
    """

    key: str
    section: str
    name: str
    vessel_index: int | None  # 0-based vessel, None for a case-wide input (or every vessel)
    low: float
    high: float
    current: float
    kind: str
    unit: str  # the case file's unit for this input
    range_basis: str

    @property
    def tolerance(self) -> float:
        return RELATIVE_TOLERANCE * (self.high - self.low)


def controllable_keys(case) -> list[str]:
    """Default inputs to vary: every controllable input the case has (vessel inputs per vessel).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]

    Returns
    -------
    list of str
        Keys as for ``--vary`` (``vessel.N.KEY`` with several vessels). [-]
    """
    keys = ["process.temperature"]
    process = case.sections["process"]
    if process.mode == "semi-batch":
        keys.append("process.accumulation")
    kinetics = case.sections.get("synthesis_kinetics")
    synthesis = case.sections["synthesis"]
    if (kinetics is None and process.mode == "semi-batch" and synthesis.dosing_time is not None
            and synthesis.peak_heat_release_rate is None):
        keys.append("synthesis.dosing_time")  # sets the dosing-controlled peak estimate
    if kinetics is not None:
        if kinetics.dosing_time is not None:
            keys.append("synthesis_kinetics.dosing_time")
        if kinetics.feed_amount:
            keys.append("synthesis_kinetics.feed_temperature")
    for index in range(len(case.vessels)):
        prefix = "vessel" if len(case.vessels) == 1 else f"vessel.{index + 1}"
        keys.extend(f"{prefix}.{name}" for name in
                    ("coolant_temperature", "heat_transfer_coefficient", "batch_mass"))
    return keys


def _parse_key(key: str, case) -> tuple[str, str, int | None]:
    parts = key.split(".")
    allowed = ", ".join(CONTROLLABLE)
    if parts[0] == "vessel" and len(parts) in (2, 3):
        generic = f"vessel.{parts[-1]}"
        index = None
        if len(parts) == 3:
            try:
                index = int(parts[1]) - 1
            except ValueError:
                raise CaseError(f"{key!r}: use vessel.KEY (every vessel) or vessel.N.KEY "
                                f"(N = 1, 2, ... in file order)", key="--vary") from None
    elif len(parts) == 2:
        generic, index = key, None
    else:
        raise CaseError(f"{key!r}: not a controllable input; limits varies {allowed}",
                        key="--vary")
    if generic not in CONTROLLABLE:
        known = (parts[0] in SCHEMA and parts[-1] in SCHEMA[parts[0]])
        what = "not a controllable input" if known else "no such key in the case schema"
        raise CaseError(f"{key!r}: {what}; limits varies {allowed} (vessel keys as "
                        f"vessel.KEY or vessel.N.KEY)", key="--vary")
    section, name = generic.split(".")
    if section == "vessel":
        if not case.vessels:
            raise CaseError(f"{key!r}: the case has no [vessel]", key="--vary")
        if index is not None and not 0 <= index < len(case.vessels):
            raise CaseError(f"{key!r}: vessel number {index + 1} does not exist (the case "
                            f"has {len(case.vessels)})", key="--vary")
        if index is None and len(case.vessels) == 1:
            index = 0
    elif section not in case.sections or case.sections[section].get(name) is None:
        raise CaseError(f"{key!r}: the case does not give {key}, so there is nothing to "
                        f"vary; add it to the case first", key="--vary")
    if generic == "process.accumulation" and case.sections["process"].mode != "semi-batch":
        raise CaseError(f"{key!r}: in batch mode the accumulation is 1 (all reagents "
                        f"charged); vary it only for a semi-batch process", key="--vary")
    return section, name, index


def _parse_key_of_case(key: str, case, option: str = "--vary"):
    """:func:`_parse_key`, with the case file named in the error."""
    try:
        return _parse_key(key, case)
    except CaseError as exc:
        raise CaseError(exc.message, option, getattr(case, "path", None)) from None


def _current_value(case, section, name, index) -> float:
    if section == "vessel":
        vessels = case.vessels if index is None else [case.vessels[index]]
        values = [v.get(name) for v in vessels]
        if name == "batch_mass":
            values = [case.sections["mass"].amount if v is None else v for v in values]
        values = [float(v) for v in values if v is not None]
        if not values:
            raise CaseError(f"vessel.{name} is not given", key="--vary")
        if max(values) != min(values):
            raise CaseError(f"--vary vessel.{name}: the vessels have different values; vary "
                            f"each one as vessel.N.{name}", key="--vary")
        return values[0]
    return float(case.sections[section].get(name))


def _file_unit(case, section, name, index, kind) -> str:
    """The unit the case file wrote this input in (SI when it cannot be read)."""
    candidates = []
    if section == "vessel":
        numbers = range(len(case.vessels)) if index is None else [index]
        for i in numbers:
            candidates += [f"vessel.{i + 1}.{name}", f"vessel.{name}"]
        if name == "batch_mass":
            candidates.append("mass.amount")
    else:
        candidates.append(f"{section}.{name}")
    texts = {record.key: record.text for record in case.inputs}
    for candidate in candidates:
        text = texts.get(candidate)
        if isinstance(text, str):
            match = re.match(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*(.*?)\s*$", text)
            unit = match.group(1) if match else ""
            if unit and "±" not in unit and "+/-" not in unit:
                return unit
            if kind == "number":
                return ""
    return {"temperature": "degC", "number": "", "time": "h"}.get(kind, _SI_UNITS.get(kind, ""))


def admissible_range(case, section, name, index, base_results) -> tuple[float, float, str]:
    """Admissible range (low, high) [SI] of one input and the text of its basis.

    From the schema bounds and plausibility limits, narrowed by the cross-field rules of the case:
    the process temperature at most the MTT; the coolant at least ``min_coolant_temperature``;
    the batch at most the vessel volume times the density.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    section, name : str
        Section and key of the input (``vessel``, ``coolant_temperature``). [-]
    index : int or None
        0-based vessel number, None for a case-wide input or every vessel. [-]
    base_results : dict
        ``results`` of today's screening (for the MTT). [JSON]

    Returns
    -------
    (float, float, str)
        Lower and upper end [SI unit of the input] and the basis of the range.
    """
    spec = SCHEMA[section][name]
    if spec.kind == "temperature":
        low, high = TEMPERATURE_RANGE_K
        basis = ["-200..1000 degC (case-file temperature range)"]
    else:
        low = spec.minimum if spec.minimum is not None else 0.0
        high = spec.maximum if spec.maximum is not None else OPEN_UPPER_LIMITS.get(name)
        basis = ["schema bounds and plausibility limits"]
        if name == "dosing_time":
            low = max(low, SHORTEST_DOSING_TIME)
            basis = ["1 min..1000 h (design)"]
        if high is None:
            raise CaseError(f"{section}.{name} has no admissible upper bound", key="--vary")
    if (section, name) == ("process", "temperature"):
        mtt = base_results.get("mtt_degC")
        if mtt is not None:
            high = min(high, mtt + ZERO_CELSIUS)
            basis.append("at most the MTT")
    if section == "synthesis_kinetics" and name == "dosing_time":
        kinetics = case.sections["synthesis_kinetics"]
        if kinetics.end_time is not None:
            # The dosing must end strictly before the simulated time ends.
            span = float(kinetics.end_time) - float(kinetics.get("dosing_start", 0.0))
            high = min(high, span * (1.0 - 1e-9))
            basis.append("dosing over before synthesis_kinetics.end_time")
    if section == "vessel" and index is not None:
        vessel = case.vessels[index]
        if name == "coolant_temperature" and vessel.min_coolant_temperature is not None:
            low = max(low, float(vessel.min_coolant_temperature))
            basis.append("at least min_coolant_temperature")
        if name == "batch_mass" and vessel.volume is not None \
                and case.sections["mass"].density is not None:
            high = min(high, float(vessel.volume) * float(case.sections["mass"].density))
            basis.append("at most the vessel volume x density")
    return float(low), float(high), "; ".join(basis)


def resolve_inputs(case, keys, base_results) -> list[LimitInput]:
    """The inputs to vary, with admissible ranges and today's values.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    keys : iterable of str
        Keys as for ``--vary``. [-]
    base_results : dict
        ``results`` of today's screening. [JSON]

    Returns
    -------
    list of LimitInput
        One per distinct key. [SI]

    Raises
    ------
    CaseError
        A key that is unknown, not controllable, or absent from the case (``--vary``).
    """
    inputs = []
    seen = set()
    for key in keys:
        key = key.strip()
        section, name, index = _parse_key_of_case(key, case)
        if key in seen:
            continue
        seen.add(key)
        kind = SCHEMA[section][name].kind
        current = _current_value(case, section, name, index)
        low, high, basis = admissible_range(case, section, name, index, base_results)
        if not low <= current <= high:
            low, high = min(low, current), max(high, current)
        if not high > low:
            raise CaseError(f"{key!r}: no admissible range to vary ({basis})",
                            key="--vary")
        unit = _file_unit(case, section, name, index, kind)
        inputs.append(LimitInput(key, section, name, index, low, high, current, kind, unit,
                                 basis))
    return inputs


# --------------------------------------------------------------------------------------------
# Criteria: one verdict of the screening each, with the continuous figures behind it


@dataclass(frozen=True)
class Criterion:
    """One verdict followed along an input: id, vessel name (or None), parameters."""

    name: str
    vessel: str | None = None
    k: int | None = None
    margin: float | None = None

    @property
    def text(self) -> str:
        return CRITERION_TEXT[self.name].format(k=self.k, margin=self.margin or 0.0)

    @property
    def label(self) -> str:
        if self.name == "criticality_class":
            return f"class<={self.k}"
        return self.name

    def ok(self, row: dict) -> bool:
        """True when the row meets the criterion; errors and missing figures fail (closed).

        Parameters
        ----------
        row : dict
            ``{"results": ...}`` of one screening or ``{"error": message}``. [JSON]

        Returns
        -------
        bool
            Whether the criterion is met. [-]
        """
        if "error" in row:
            return False
        r = row["results"]
        if self.name == "criticality_class":
            klass = r.get("criticality_class")
            return klass is not None and int(klass) <= self.k
        if self.name == "onset_margin":
            if r.get("decomposition_basis", "kinetics") != "kinetics":
                return False  # TD24 from the crude onset estimate: never a demonstrated margin
            value = _governing(r, "onset_margin_governing_K", "onset_margin_K")
            return value is not None and value >= self.margin
        if self.name in ("decomposition_stability", "synthesis_cooling"):
            entry = _vessel_entry(r.get("vessels"), self.vessel)
            good = "recoverable" if self.name == "decomposition_stability" else "adequate"
            return entry is not None and vessel_verdict(entry, self.name) == good
        if self.name == "barrier":
            block = r.get("barrier") or {}
            if not block.get("assessed"):
                return True  # boiling is not called upon at this point: nothing to hold
            entry = _vessel_entry(block.get("vessels"), self.vessel)
            return entry is not None and entry.get("barrier_verdict") == "holds"
        if self.name == "relief_pressure":
            entry = _vessel_entry((r.get("pressure") or {}).get("vessels"), self.vessel,
                                  name_key="vessel")
            return entry is not None and entry.get("verdict") == "below"
        raise ValueError(self.name)  # pragma: no cover - programming error

    def undetermined(self, row: dict) -> str:
        """Why the screening cannot conclude on this criterion at this point ("" if it can).

        Parameters
        ----------
        row : dict
            ``{"results": ...}`` of one screening or ``{"error": message}``. [JSON]

        Returns
        -------
        str
            The reason, empty when the screening concludes. [-]
        """
        if "error" in row:
            return f"the screening rejects the input: {row['error']}"
        r = row["results"]
        if self.name == "criticality_class" and r.get("criticality_class") is None:
            return "the class cannot be concluded (no decomposition kinetics)"
        if self.name == "onset_margin" and r.get("decomposition_basis", "kinetics") != "kinetics":
            return "TD24 rests on the crude onset estimate (no decomposition kinetics)"
        if self.name in ("decomposition_stability", "synthesis_cooling"):
            entry = _vessel_entry(r.get("vessels"), self.vessel)
            if entry is None or vessel_verdict(entry, self.name) == "cannot conclude":
                if self.name == "synthesis_cooling" and entry is not None:
                    return f"cannot conclude: {entry.get('synthesis_verdict', '')}"
                return "cannot conclude: " + ("" if entry is None else entry.get("verdict", ""))
        return ""

    def figures(self, row: dict) -> list:
        """Continuous figures whose sign change marks the verdict change (secant guides).

        Parameters
        ----------
        row : dict
            ``{"results": ...}`` of one screening or ``{"error": message}``. [JSON]

        Returns
        -------
        list of float or None
            Figures in their JSON units (K, kW, m/s, kg, bar, -); None where not available.
        """
        if "error" in row:
            return []
        r = row["results"]
        mtsr = _mtsr_guide(r)
        if self.name == "criticality_class":
            # Guides only (the class itself is read from the screening): the ordering of
            # MTSR, MTT and TD24 that separates class <= k from the classes above it
            # (Stoessel 1993; see screen.models.criticality).
            # The lowest of the TD24 values (kinetics, Townsend-Tou, governing) and of the MTTs
            # (case, per vessel): continuous where the governing value switches.
            td24 = _lowest([r.get("td24_degC"), r.get("td24_townsend_tou_degC"),
                            r.get("td24_governing_degC")])
            mtt = _lowest([r.get("mtt_degC")] + [v.get("mtt_degC") for v in r.get("vessels") or []
                                                 if isinstance(v, dict)])
            if None in (mtt, td24, mtsr):
                return []
            below_tp = _difference(td24, r.get("process_temperature_degC"))
            if self.k == 1:
                return [min(mtt - mtsr, td24 - mtt), below_tp]
            if self.k == 2:
                return [min(mtt, td24) - mtsr, below_tp]
            if self.k == 3:
                return [td24 - mtsr, below_tp]
            return [max(td24 - mtsr, td24 - mtt), below_tp]
        if self.name == "onset_margin":
            value = _governing(r, "onset_margin_governing_K", "onset_margin_K")
            td24 = _lowest([r.get("td24_degC"), r.get("td24_governing_degC")])
            return [None if td24 is None or mtsr is None else td24 - mtsr - self.margin,
                    None if value is None else value - self.margin]
        if self.name == "decomposition_stability":
            entry = _vessel_entry(r.get("vessels"), self.vessel) or {}
            return [_difference(entry.get("no_return_temperature_degC"), mtsr),
                    entry.get("coolant_margin_K")]
        if self.name == "synthesis_cooling":
            entry = _vessel_entry(r.get("vessels"), self.vessel) or {}
            ratio, slope = entry.get("synthesis_cooling_ratio"), entry.get("synthesis_slope_ratio")
            return [None if ratio is None else ratio - 1.0, None if slope is None else 1.0 - slope]
        if self.name == "barrier":
            from screen.models.evaporation import DEFAULT_MARGIN

            block = r.get("barrier") or {}
            entry = _vessel_entry(block.get("vessels"), self.vessel) or {}
            keep = 1.0 - DEFAULT_MARGIN  # "holds" below (1 - margin) of each limit
            pairs = (("condenser_capacity_kW", "condenser_duty_needed_kW"),
                     ("flooding_velocity_m_per_s", "vapour_line_velocity_m_per_s"),
                     ("solvent_present_kg", "solvent_evaporated_kg"),
                     ("swelling_onset_velocity_m_per_s", "surface_velocity_m_per_s"))
            called = _difference(r.get("mtt_degC"), mtsr)  # not called upon below the MTT
            return [called] + [None if entry.get(a) is None or entry.get(b) is None
                               else keep * float(entry[a]) - float(entry[b]) for a, b in pairs]
        if self.name == "relief_pressure":
            from screen.models.pressure import RELIEF_MARGIN

            entry = _vessel_entry((r.get("pressure") or {}).get("vessels"), self.vessel,
                                  name_key="vessel") or {}
            p_set = entry.get("relief_set_pressure_bar")
            return [None if p_set is None else _difference((1.0 - RELIEF_MARGIN) * p_set,
                                                           entry.get("total_bar"))]
        return []


def _difference(a, b):
    if a is None or b is None:
        return None
    value = float(a) - float(b)
    return value if math.isfinite(value) else None


def _lowest(values):
    values = [float(v) for v in values if v is not None]
    return min(values) if values else None


def _mtsr_guide(r: dict):
    """MTSR for the secant guides [degC]: the highest of the stated, the simulated (feed
    stopped) and the governing value. Continuous where the governing value switches source
    (the verdicts themselves are read from the screening)."""
    simulation = r.get("simulation") if isinstance(r.get("simulation"), dict) else {}
    values = [r.get("mtsr_degC"), r.get("mtsr_governing_degC"),
              simulation.get("mtsr_feed_stopped_degC")]
    values = [float(v) for v in values if v is not None]
    return max(values) if values else None


def _governing(r: dict, governing_key: str, key: str):
    value = r.get(governing_key)
    return r.get(key) if value is None else value


def _vessel_entry(entries, name, name_key="name"):
    for entry in entries or []:
        if entry.get(name_key) == name:
            return entry
    return None


def criteria_for(case, base_results: dict, target_class: int, margin: float) -> list[Criterion]:
    """The criteria followed: class boundaries from today's class to the target, the onset
    margin, and per vessel the verdicts the screening decides for it.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    base_results : dict
        ``results`` of today's screening. [JSON]
    target_class : int
        Class to reach, 1..5. [-]
    margin : float
        Onset margin TD24 - MTSR to reach. [K]

    Returns
    -------
    list of Criterion
    """
    today = base_results.get("criticality_class")
    if today is None or int(today) <= target_class:
        ks = [target_class]
    else:
        ks = list(range(target_class, int(today)))
    criteria = [Criterion("criticality_class", k=k) for k in ks if k < 5]
    criteria.append(Criterion("onset_margin", margin=float(margin)))
    barrier = base_results.get("barrier") or {}
    for vessel in case.vessels:
        name = vessel.name
        criteria.append(Criterion("decomposition_stability", name))
        criteria.append(Criterion("synthesis_cooling", name))
        if barrier.get("assessed"):
            criteria.append(Criterion("barrier", name))
        if vessel.relief_set_pressure is not None:
            criteria.append(Criterion("relief_pressure", name))
    return criteria


# --------------------------------------------------------------------------------------------
# Evaluation along one input


def screening_variant(case):
    """The case as the limits screen it: the deviation scenarios of ``[scenarios]`` are not
    criteria here (and are not rerun at the points), so only ``evaporation_check`` is kept; a
    scenario's own cross-check (e.g. dosing_temperature below the process temperature) then does
    not reject points of the range.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]

    Returns
    -------
    screen.io.case.Case
        The variant (the case itself without ``[scenarios]``).
    """
    from screen.io.case import case_with_changes

    scenarios = case.sections.get("scenarios")
    if scenarios is None:
        return case
    dropped = {k: None for k in scenarios.as_dict() if k != "evaporation_check"}
    if len(dropped) == len(scenarios.as_dict()):
        return case_with_changes(case, drop=("scenarios",))
    return case_with_changes(case, {"scenarios": dropped})


class _Evaluator:
    """Screenings of one varied input, memoised by value (SI)."""

    def __init__(self, case, item: LimitInput):
        from screen.runs.sweep import case_with_value

        self._case_with_value = case_with_value
        self.item = item
        self.key = item.key
        self.case = case = screening_variant(case)
        kinetics = case.sections.get("synthesis_kinetics")
        if item.section == "vessel" and item.vessel_index is not None and kinetics is None \
                and len(case.vessels) > 1:
            # The vessel's own verdicts depend only on its own inputs: screen it alone.
            self.case = dataclasses.replace(case, vessels=(case.vessels[item.vessel_index],))
            self.key = f"vessel.{item.name}"
        self.rows: dict[float, dict] = {}
        self.count = 0

    def __call__(self, value: float) -> dict:
        value = float(value)
        row = self.rows.get(value)
        if row is None:
            row = self._evaluate(value)
            self.rows[value] = row
        return row

    def _evaluate(self, value: float) -> dict:
        from screen.runs.screening import screen_case

        self.count += 1
        try:
            result = screen_case(self._case_with_value(self.case, self.key, value), curves=False)
        except ScreenError as exc:
            return {"error": exc.message}
        return {"results": result.results}


class _Secant:
    """Trial points for :func:`screen.runs.sweep.bisect_change`: secant steps on a figure that
    changes sign across the bracket, with Illinois weights (when the same end moves twice in a
    row, the figure of the end that stays is halved) so that both ends converge; ``None`` (the
    midpoint) otherwise. Illinois: M. Dowell, P. Jarratt, BIT 11 (1971) 168-174."""

    def __init__(self, criterion: Criterion, tolerance: float):
        self.criterion = criterion
        self.tolerance = tolerance
        self.previous = None
        self.weights = [1.0, 1.0]
        self.last_moved = None
        self.steps = 0

    def __call__(self, low, high, row_low, row_high):
        if self.previous is not None:
            moved = "high" if low == self.previous[0] else "low"
            if moved == self.last_moved:
                # The same end moved twice in a row: halve the weight of the end that stays
                # (Illinois), so that the next trial point falls beyond the root.
                index = 0 if moved == "high" else 1
                self.weights[index] *= 0.5
            else:
                self.weights = [1.0, 1.0]
            self.last_moved = moved
        self.previous = (low, high)
        self.steps += 1
        if self.steps > 30:
            return None
        for a, b in zip(self.criterion.figures(row_low), self.criterion.figures(row_high)):
            if a is None or b is None or not a * b <= 0.0 or a == b:
                continue
            a, b = a * self.weights[0], b * self.weights[1]
            x = low + (high - low) * a / (a - b)
            lo, hi = min(low, high), max(low, high)
            half = 0.5 * self.tolerance
            return min(max(x, lo + half), hi - half) if hi - lo > 2 * half else None
        return None


def runs_simulation(case) -> bool:
    """True when every screening of the case runs the cooling-failure simulation (it has
    ``[synthesis_kinetics]``): such inputs get the sparse grid (both ends and today's value).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case.

    Returns
    -------
    bool
        Whether the case has synthesis kinetics.
    """
    return case.sections.get("synthesis_kinetics") is not None


def _grid(item: LimitInput, per_side: int = GRID_POINTS_PER_SIDE) -> list[float]:
    """Coarse samples: both ends, today's value and points between (geometric for positive
    ranges spanning more than a factor 20)."""
    import numpy as np

    points = {item.low, item.high, item.current}
    for end in (item.low, item.high):
        a, b = item.current, end
        if a == b:
            continue
        n = per_side + 2
        if a > 0 and b > 0 and max(a, b) / min(a, b) > 20.0:
            values = np.geomspace(a, b, n)[1:-1]
        else:
            values = np.linspace(a, b, n)[1:-1]
        points.update(float(v) for v in values)
    return sorted(points)


@dataclass
class Limit:
    """One limit (or its absence) of one criterion along one input, SI values."""

    item: LimitInput
    criterion: Criterion
    status: str  # "limit" | "not achievable" | "holds in range" | "not demonstrated"
    bound: str | None = None  # "upper" | "lower"
    value: float | None = None  # SI, the last value meeting the criterion
    ok_now: bool = True
    note: str = ""
    evaluations: int = 0


def _limits_of_criterion(evaluate, item: LimitInput, criterion: Criterion) -> list[Limit]:
    from screen.runs.sweep import bisect_change

    xs = sorted(evaluate.rows)
    oks = [criterion.ok(evaluate.rows[x]) for x in xs]
    here = xs.index(item.current)
    ok_now = oks[here]
    found = []
    if ok_now:
        # Nearest failing sample on each side: the limit lies between it and its neighbour.
        for step, bound in ((1, "upper"), (-1, "lower")):
            j = here + step
            while 0 <= j < len(xs) and oks[j]:
                j += step
            if 0 <= j < len(xs):
                found.append((bound, xs[j - step], xs[j]))
    else:
        candidates = []
        for step, bound in ((1, "lower"), (-1, "upper")):
            j = here + step
            while 0 <= j < len(xs) and not oks[j]:
                j += step
            if 0 <= j < len(xs):
                candidates.append((bound, xs[j], xs[j - step]))
        found = candidates
    if not found:
        if ok_now:
            return [Limit(item, criterion, "holds in range", ok_now=True)]
        reasons = [criterion.undetermined(evaluate.rows[x]) for x in xs]
        if any(reasons):
            # Nowhere met, and somewhere the screening cannot conclude: not demonstrated.
            return [Limit(item, criterion, "not demonstrated", ok_now=False,
                          note=reasons[here] or next(r for r in reasons if r))]
        return [Limit(item, criterion, "not achievable", ok_now=False)]
    limits = []
    for bound, good, bad in found:
        # Tighten the bracket with every point already screened for this input: walking from
        # the good end, the first failing point closes it.
        inside = sorted((x for x in evaluate.rows if min(good, bad) < x < max(good, bad)),
                        key=lambda x: abs(x - good))
        for x in inside:
            if criterion.ok(evaluate.rows[x]):
                good = x
            else:
                bad = x
                break
        before = evaluate.count
        good, bad, _, _ = bisect_change(
            evaluate, criterion.ok, good, bad, item.tolerance, row_low=evaluate(good),
            row_high=evaluate(bad), max_iter=80, split=_Secant(criterion, item.tolerance))
        note = ""
        row_bad = evaluate(bad)
        if "error" in row_bad:
            note = f"beyond it the screening rejects the input: {row_bad['error']}"
        limits.append(Limit(item, criterion, "limit", bound, good, ok_now, note,
                            evaluate.count - before))
    return limits


def limits_of_input(case, item: LimitInput, criteria: list[Criterion]) -> tuple[list, int]:
    """All limits along one input.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    item : LimitInput
        The input varied. [SI]
    criteria : list of Criterion
        Criteria followed (those the input cannot act on are skipped).

    Returns
    -------
    (list of Limit, int)
        The limits (SI values) and the number of screenings run. [-]
    """
    evaluate = _Evaluator(case, item)
    relevant = criteria
    if item.section == "vessel" and case.sections.get("synthesis_kinetics") is None:
        # Without a simulation in the vessel, its inputs act on vessel verdicts only.
        names = ({v.name for v in case.vessels} if item.vessel_index is None
                 else {case.vessels[item.vessel_index].name})
        relevant = [c for c in criteria if c.vessel in names]
    # Expensive screenings (a simulation at every point): both ends and today only; the
    # verdicts are then taken as monotone between them. Decided from the case, not from a
    # timing, so that the result does not depend on the machine.
    sparse = runs_simulation(case)
    for x in _grid(item, 0 if sparse else GRID_POINTS_PER_SIDE):
        evaluate(x)
    out = []
    for criterion in relevant:
        out.extend(_limits_of_criterion(evaluate, item, criterion))
    return out, evaluate.count


@dataclass
class LimitsResult:
    """Limits of one case: JSON-ready entries plus what was varied and the run's cost."""

    target_class: int
    margin: float
    entries: list[dict] = field(default_factory=list)
    inputs: list[LimitInput] = field(default_factory=list)
    screenings: int = 0
    current_class: int | None = None


def find_limits(case, base_result, vary=None, target_class: int = 2,
                margin: float = DEFAULT_ONSET_MARGIN) -> LimitsResult:
    """Safe operating limits of ``case`` for each varied input (the others at the case's values).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case (SI).
    base_result : screen.analyses.engine.ScreeningResult
        The screening of the case as it is (today's verdicts).
    vary : list of str, optional
        Keys to vary (``process.temperature``, ``vessel.2.coolant_temperature``, ...); default
        :func:`controllable_keys`.
    target_class : int
        Criticality class to reach, 1..5 (default 2).
    margin : float
        Onset margin TD24 - MTSR to reach (default 50 K, common practice, no source). [K]

    Returns
    -------
    LimitsResult
        ``entries``: one JSON-ready dict per limit (values in the case file's unit).

    Raises
    ------
    CaseError
        Unknown or non-controllable key, target class outside 1..5, non-finite margin.
    """
    if isinstance(target_class, bool) or int(target_class) != target_class \
            or not 1 <= int(target_class) <= 5:
        raise CaseError(f"--target-class {target_class!r}: give a class from 1 to 5",
                        key="--target-class")
    if not math.isfinite(float(margin)):
        raise CaseError(f"--margin {margin!r}: give a finite temperature difference, e.g. 50 K",
                        key="--margin")
    r = base_result.results
    keys = list(vary) if vary else controllable_keys(case)
    inputs = resolve_inputs(case, keys, r)
    criteria = criteria_for(case, r, int(target_class), float(margin))
    out = LimitsResult(int(target_class), float(margin), inputs=inputs,
                       current_class=r.get("criticality_class"))
    for item in inputs:
        limits, count = limits_of_input(case, item, criteria)
        out.screenings += count
        out.entries.extend(limit_entry(limit) for limit in limits)
    return out


# --------------------------------------------------------------------------------------------
# JSON entries (values in the case file's unit)


def _from_si(value, item: LimitInput):
    if value is None:
        return None
    from screen.units import from_si

    return from_si(value, _SI_UNITS.get(item.kind, "1"), item.unit)


_SI_UNITS = {"temperature": "K", "time": "s", "mass": "kg",
             "heat_transfer_coefficient": "W/(m^2*K)", "number": "1"}


def limit_entry(limit: Limit) -> dict:
    """One JSON-ready entry of ``results.limits``.

    Parameters
    ----------
    limit : Limit
        A limit with SI values.

    Returns
    -------
    dict
        Values in the case file's unit (``unit``), see docs/limits.md. [JSON]
    """
    item, criterion = limit.item, limit.criterion
    value = _from_si(limit.value, item)
    current = _from_si(item.current, item)
    tolerance = _from_si(item.low + item.tolerance, item) - _from_si(item.low, item)
    if limit.status == "limit":
        difference = value - current
        margin = difference if limit.bound == "upper" else -difference
    else:
        margin = None
    entry = {
        "key": item.key,
        "vessel": criterion.vessel,
        "criterion": criterion.label,
        "criterion_text": criterion.text,
        "bound": limit.bound,
        "value": value,
        "unit": item.unit,
        "current_value": current,
        "margin": margin,
        "achievable": limit.status in ("limit", "holds in range"),
        "satisfied_now": limit.ok_now,
        "status": limit.status,
        "range": [_from_si(item.low, item), _from_si(item.high, item)],
        "range_basis": item.range_basis,
        "tolerance": tolerance,
        "note": limit.note,
    }
    entry["text"] = limit_text(entry)
    return entry


def format_value(value, unit: str) -> str:
    """A limit value with its unit, 4 significant digits (5 for temperatures).

    Parameters
    ----------
    value : float or None
        The value. [unit]
    unit : str
        Its unit as the case file writes it. [-]

    Returns
    -------
    str
        ``"45.96 degC"``; ``"-"`` for None. [-]
    """
    if value is None:
        return "-"
    digits = 5 if unit in ("degC", "degF", "K") and abs(value) >= 100 else 4
    text = f"{value:.{digits}g}"
    return f"{text} {unit}".strip()


def limit_text(entry: dict) -> str:
    """"KEY must stay below VALUE (today VALUE, margin VALUE)" or why there is no limit.

    Parameters
    ----------
    entry : dict
        An entry of ``results.limits`` (without ``text``). [JSON]

    Returns
    -------
    str
        The sentence. [-]
    """
    key, unit = entry["key"], entry["unit"]
    today = format_value(entry["current_value"], unit)
    if entry["status"] == "not demonstrated":
        return f"{key}: not demonstrated in range (today {today})"
    if entry["status"] == "not achievable":
        return f"{key}: no value in range achieves it (today {today})"
    if entry["status"] == "holds in range":
        low, high = entry["range"]
        return (f"{key}: holds over the whole range {format_value(low, unit)} .. "
                f"{format_value(high, unit)} (today {today})")
    word = "below" if entry["bound"] == "upper" else "above"
    verb = "must stay" if entry["satisfied_now"] else "must go"
    margin = entry["margin"]
    shown_margin = format_value(margin, unit if unit not in ("degC", "degF") else "K")
    return (f"{key} {verb} {word} {format_value(entry['value'], unit)} (today {today}, "
            f"margin {shown_margin})")


METHOD_TEXT = (
    "Safe operating limits: each controllable input is varied alone over its admissible range "
    "(schema bounds and plausibility limits, narrowed by the case's cross-field rules), the "
    "others held at the case's values; the screening is rerun and each verdict change nearest "
    "today's value is bracketed by bisection (secant trial points on the figure behind the "
    "verdict) to 1e-6 of the range. Criteria: criticality class (Stoessel 1993) at most the "
    "target and every class boundary in between; per vessel decomposition stability (Semenov "
    "heat balance), synthesis cooling, evaporative barrier (where assessed), closed-vessel "
    "pressure below the relief set pressure (where given); onset margin TD24 - MTSR (50 K "
    "default: common practice, no source). A limit value is the last value that still meets "
    "the criterion. Inputs interact: a limit holds only with the other inputs as in the case.")


def add_limits(case, result, vary=None, target_class: int = 2,
               margin: float = DEFAULT_ONSET_MARGIN) -> LimitsResult:
    """Find the limits and add them to ``result`` (``results.limits``, ``results.limits_basis``,
    ``methods.limits``).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    result : screen.analyses.engine.ScreeningResult
        Its screening, extended in place.
    vary : list of str, optional
        Keys to vary; default every controllable input. [-]
    target_class : int
        Class to reach, 1..5. [-]
    margin : float
        Onset margin TD24 - MTSR to reach. [K]

    Returns
    -------
    LimitsResult
    """
    found = find_limits(case, result, vary=vary, target_class=target_class, margin=margin)
    result.results["limits"] = found.entries
    result.results["limits_basis"] = {
        "target_class": found.target_class,
        "margin_K": found.margin,
        "margin_basis": ("common practice, no source" if found.margin == DEFAULT_ONSET_MARGIN
                         else "given with --margin"),
        "relative_tolerance": RELATIVE_TOLERANCE,
        "varied": [item.key for item in found.inputs],
        "screenings": found.screenings,
    }
    result.methods["limits"] = METHOD_TEXT
    return found


# --------------------------------------------------------------------------------------------
# Operating window over two inputs

#: Grid points per axis of the operating window (n x n screenings).
WINDOW_POINTS = 17
#: Grid points per axis when a screening is expensive (a simulation at every point).
WINDOW_POINTS_EXPENSIVE = 9


def check_window_keys(case, keys) -> None:
    """Both keys must be controllable inputs of the case and differ (``--window``).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    keys : sequence of str
        The two keys. [-]

    Raises
    ------
    CaseError
        Not two different controllable inputs of the case.
    """
    if len(keys) != 2 or keys[0] == keys[1]:
        raise CaseError(f"{' '.join(keys)}: give two different inputs, e.g. "
                        f"--window process.temperature process.accumulation", key="--window")
    for key in keys:
        _parse_key_of_case(key, case, option="--window")


def _window_axis(item: LimitInput, entries: list[dict]) -> tuple[float, float]:
    """Axis range [SI]: today's value and the limits found along this input, with a margin,
    inside the admissible range."""
    values = [item.current]
    for e in entries:
        if e["key"] == item.key and e["status"] == "limit" and e["value"] is not None:
            values.append(_to_si(e["value"], item))
    low, high = min(values), max(values)
    span = high - low
    if span <= 0.0:
        span = 40.0 if item.kind == "temperature" else max(abs(item.current), 1e-9)
    low, high = low - 0.3 * span, high + 0.3 * span
    return max(low, item.low), min(high, item.high)


def _to_si(value, item: LimitInput) -> float:
    from screen.units import from_si

    # The inverse of the display conversion: an affine map, found from two points.
    a = from_si(item.low, _SI_UNITS.get(item.kind, "1"), item.unit)
    b = from_si(item.high, _SI_UNITS.get(item.kind, "1"), item.unit)
    return item.low + (value - a) * (item.high - item.low) / (b - a)


def operating_window(case, base_result, key_x: str, key_y: str, target_class: int = 2,
                     points: int | None = None) -> dict:
    """Screen the case on a grid over two inputs: class and per-vessel verdicts at each point.

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case (SI).
    base_result : screen.analyses.engine.ScreeningResult
        Its screening (with ``results.limits`` when the limits were sought: the axes then
        span today's values and those limits).
    key_x, key_y : str
        The two controllable inputs (as for ``--vary``).
    target_class : int
        Class drawn as the acceptable region's edge (1..5).
    points : int, optional
        Grid points per axis; default :data:`WINDOW_POINTS`, or :data:`WINDOW_POINTS_EXPENSIVE`
        when every screening runs the cooling-failure simulation.

    Returns
    -------
    dict
        ``x``, ``y`` (values in the case file's units), ``unit_x``, ``unit_y``, ``classes``
        (rows over y, columns over x; None where the class cannot be concluded or the input is
        rejected), ``verdicts`` ({criterion name: {vessel: rows of True (met), False (failed)
        or None (cannot conclude)}}), ``today`` (x, y),
        ``keys``, ``target_class``, ``screenings``.
    """
    import numpy as np

    from screen.runs.screening import screen_case
    from screen.runs.sweep import case_with_value

    r = base_result.results
    check_window_keys(case, (key_x, key_y))
    items = resolve_inputs(case, [key_x, key_y], r)
    entries = r.get("limits") or []
    variant = screening_variant(case)
    if points is None:
        points = WINDOW_POINTS_EXPENSIVE if runs_simulation(case) else WINDOW_POINTS
    axes = [np.linspace(*_window_axis(item, entries), points) for item in items]
    criteria = [c for c in criteria_for(case, r, int(target_class), DEFAULT_ONSET_MARGIN)
                if c.vessel is not None]
    classes = [[None] * points for _ in range(points)]
    verdicts: dict[str, dict[str, list]] = {}
    for c in criteria:
        verdicts.setdefault(c.name, {})[c.vessel] = [[False] * points for _ in range(points)]
    for j, y in enumerate(axes[1]):
        for i, x in enumerate(axes[0]):
            try:
                point = case_with_value(case_with_value(variant, items[0].key, float(x)),
                                        items[1].key, float(y))
                row = {"results": screen_case(point, curves=False).results}
            except ScreenError as exc:
                row = {"error": exc.message}
            if "error" not in row:
                classes[j][i] = row["results"].get("criticality_class")
            for c in criteria:
                ok = c.ok(row)
                # None: the screening cannot conclude there (neither met nor failed).
                verdicts[c.name][c.vessel][j][i] = (True if ok else
                                                    None if c.undetermined(row) else False)
    return {
        "keys": [items[0].key, items[1].key],
        "x": [_from_si(float(v), items[0]) for v in axes[0]],
        "y": [_from_si(float(v), items[1]) for v in axes[1]],
        "unit_x": items[0].unit,
        "unit_y": items[1].unit,
        "classes": classes,
        "verdicts": verdicts,
        "today": [_from_si(items[0].current, items[0]), _from_si(items[1].current, items[1])],
        "target_class": int(target_class),
        "screenings": points * points,
    }


def add_window(case, result, key_x: str, key_y: str, target_class: int = 2) -> dict:
    """Compute the operating window and keep it with the result (``curves["limits_window"]``
    for the figure; ``results["limits_window"]`` a short JSON summary).

    Parameters
    ----------
    case : screen.io.case.Case
        The validated case. [SI]
    result : screen.analyses.engine.ScreeningResult
        Its screening (with ``results.limits`` when sought), extended in place.
    key_x, key_y : str
        The two inputs (as for ``--vary``). [-]
    target_class : int
        Class whose edge the figure draws, 1..5. [-]

    Returns
    -------
    dict
        As :func:`operating_window`.
    """
    window = operating_window(case, result, key_x, key_y, target_class)
    result.curves["limits_window"] = window
    result.results["limits_window"] = {
        "keys": window["keys"], "units": [window["unit_x"], window["unit_y"]],
        "x_range": [window["x"][0], window["x"][-1]], "y_range": [window["y"][0], window["y"][-1]],
        "points_per_axis": len(window["x"]), "today": window["today"],
        "target_class": window["target_class"]}
    return window
