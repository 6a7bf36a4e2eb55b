"""Reading DSC peak tables and thermogram exports (CSV) into SI arrays.

Accepted input (see docs/kinetics.md for examples):

- Peak table: columns ``heating_rate_K_per_min`` and ``peak_temperature_degC``, optionally
  ``onset_temperature_degC``, ``energy_J_per_g`` and a text column ``run``/``label``/``note``.
- Thermogram: columns for time, temperature and heat flow, recognised by the unit in the column
  name (``Temperature (°C)``, ``t/min``, ``Heat flow / mW``, ``DSC/(mW/mg)``, ``HF [W/g]``).
  Header lines before the table and ``#`` comment lines are allowed; ``key = value`` or
  ``key: value`` lines there give the sample mass, heating rate and exotherm direction
  (``# sample_mass = 2.35 mg``, ``# heating_rate = 4 K/min``, ``# exotherm = up``). Separators
  ``,`` ``;`` tab or blanks; with ``;``, tab or blanks a decimal comma is accepted.

Every problem raises :class:`screen.errors.DataFileError` with one line naming the file, the
column or row, and the fix. Values are returned in SI: s, K, K/s, kg, W/kg, J/kg.
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from screen.constants import ZERO_CELSIUS
from screen.errors import CaseError, DataFileError

# --------------------------------------------------------------------------------------------
# Units
# --------------------------------------------------------------------------------------------

_TIME_UNITS = {"s": 1.0, "sec": 1.0, "second": 1.0, "seconds": 1.0, "min": 60.0,
               "minute": 60.0, "minutes": 60.0, "h": 3600.0, "hr": 3600.0, "hour": 3600.0}
_TEMPERATURE_UNITS = {"degc": "C", "c": "C", "celsius": "C", "k": "K", "kelvin": "K"}
#: heat-flow units: (factor to the base, base) where base "W" needs the sample mass
_HEAT_FLOW_UNITS = {
    "w": (1.0, "W"), "mw": (1e-3, "W"), "uw": (1e-6, "W"),
    "w/g": (1e3, "W/kg"), "mw/mg": (1e3, "W/kg"), "w/kg": (1.0, "W/kg"), "mw/g": (1.0, "W/kg"),
    "uw/mg": (1.0, "W/kg"), "kw/kg": (1e3, "W/kg"),
}
_UNCALIBRATED = {"uv", "mv", "v"}
_MASS_UNITS = {"mg": 1e-6, "g": 1e-3, "kg": 1.0, "ug": 1e-9}
_RATE_UNITS = {"k/min": 1 / 60, "degc/min": 1 / 60, "c/min": 1 / 60, "k/s": 1.0,
               "degc/s": 1.0, "c/s": 1.0, "k/h": 1 / 3600, "degc/h": 1 / 3600, "c/h": 1 / 3600}
_ENERGY_UNITS = {"j/g": 1e3, "kj/kg": 1e3, "j/kg": 1.0, "kj/g": 1e6, "mj/kg": 1e6}
_SPECIFIC_HEAT_UNITS = {"j/gk": 1e3, "kj/kgk": 1e3, "j/kgk": 1.0, "j/g/k": 1e3,
                        "kj/kg/k": 1e3, "j/kg/k": 1.0}
_SPECIFIC_POWER_UNITS = {"w/kg": 1.0, "mw/g": 1.0, "w/g": 1e3, "mw/mg": 1e3}


def canonical_unit(text):
    """Lower-case unit spelling without blanks, degree signs or exponent notation.

    Parameters
    ----------
    text : str
        A unit as written (``"°C"``, ``"mW/mg"``, ``"W g^-1"``, ``"J/(g K)"``).

    Returns
    -------
    str
        Canonical spelling (``"degc"``, ``"mw/mg"``, ``"w/g"``, ``"j/gk"``).
    """
    s = text.strip().lower()
    for a, b in (("µ", "u"), ("μ", "u"), ("℃", "degc"), ("°", "deg"), ("·", ""), ("*", ""),
                 ("^", ""), ("−", "-"), (" ", ""), ("(", ""), (")", ""), ("[", ""), ("]", "")):
        s = s.replace(a, b)
    # exponent notation: W g-1 -> W/g, J g-1 K-1 -> J/gK
    s = re.sub(r"(mg|kg|ug|g|k|min|s)-1", r"/\1", s)
    s = s.replace("//", "/")
    if s == "degk":
        s = "k"
    return s


def parse_quantity(text, kind, option=None):
    """Parse ``"value unit"`` from the command line into SI.

    Parameters
    ----------
    text : str
        For example ``"2.35 mg"``, ``"4 K/min"``, ``"185 degC"``, ``"650 J/g"``.
    kind : {"mass", "heating_rate", "temperature", "energy", "specific_heat", "specific_power"}
        Quantity expected.
    option : str, optional
        Name of the option, for the error message.

    Returns
    -------
    float
        Value in SI (kg, K/s, K, J/kg, J/(kg K), W/kg).

    Raises
    ------
    screen.errors.CaseError
        Missing or unknown unit, or a value that is not a positive number.
    """
    accepted = {
        "mass": ("mg, g", _MASS_UNITS),
        "heating_rate": ("K/min, K/s, K/h", _RATE_UNITS),
        "temperature": ("degC, K", _TEMPERATURE_UNITS),
        "energy": ("J/g, kJ/kg, J/kg", _ENERGY_UNITS),
        "specific_heat": ("J/(g K), kJ/(kg K), J/(kg K)", _SPECIFIC_HEAT_UNITS),
        "specific_power": ("W/kg, mW/g, W/g", _SPECIFIC_POWER_UNITS),
    }[kind]
    where = option or kind.replace("_", " ")
    match = re.match(r"^\s*([-+]?\d+(?:[.,]\d*)?(?:[eE][-+]?\d+)?)\s*(.*)$", str(text))
    if not match or not match.group(2).strip():
        raise CaseError(
            f"{text!r} needs a number and a unit, e.g. accepted units: {accepted[0]}", key=where
        )
    value = float(match.group(1).replace(",", "."))
    unit = canonical_unit(match.group(2))
    table = accepted[1]
    if unit not in table:
        raise CaseError(f"unit {match.group(2).strip()!r} in {text!r} not accepted; use {accepted[0]}",
                        key=where)
    if not math.isfinite(value):
        raise CaseError(f"{text!r} is not a finite number", key=where)
    if kind == "temperature":
        kelvin = value + ZERO_CELSIUS if table[unit] == "C" else value
        problem = _temperature_problem(kelvin)
        if problem:
            raise CaseError(f"{text!r} {problem}", key=where)
        return kelvin
    if not value > 0:
        raise CaseError(f"{text!r} must be positive", key=where)
    si = value * table[unit]
    if not math.isfinite(si) or si == 0.0:
        raise CaseError(f"{text!r} is outside the range of floating-point numbers", key=where)
    return si


# --------------------------------------------------------------------------------------------
# Low-level table reading
# --------------------------------------------------------------------------------------------

#: Largest CSV file read [bytes] (design): a DSC export of one run is some 0.1-5 MB.
MAX_CSV_BYTES = 20_000_000

#: Temperatures accepted from DSC data and options [K]: -200 degC to 1000 degC (design, the
#: same window as absolute temperatures in case files, screen.io.case.TEMPERATURE_RANGE_K).
TEMPERATURE_RANGE_K = (ZERO_CELSIUS - 200.0, ZERO_CELSIUS + 1000.0)


def _temperature_problem(kelvin):
    """None if ``kelvin`` lies in TEMPERATURE_RANGE_K, else the reason as text."""
    low, high = TEMPERATURE_RANGE_K
    if kelvin <= 0:
        return "is below absolute zero"
    if not low <= kelvin <= high:
        return (f"lies outside {low - ZERO_CELSIUS:.0f} to {high - ZERO_CELSIUS:.0f} degC; "
                f"check the value and its unit")
    return None

_NUMBER = re.compile(r"^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$")
_NUMBER_COMMA = re.compile(r"^[-+]?(?:\d+,?\d*|,\d+)(?:[eE][-+]?\d+)?$")


@dataclass
class _Table:
    path: str
    header: list
    header_line: int
    rows: list  # (line number, list of str)
    separator: str
    decimal_comma: bool
    metadata: dict = field(default_factory=dict)  # key -> (value text, unit text, line)
    preamble: list = field(default_factory=list)


def _split(line, separator):
    """Fields of one line: standard CSV quoting (``"Heat flow, exo down (mW/mg)"``, doubled
    quotes inside a quoted field) as written by Python's csv module, pandas and spreadsheets."""
    if separator == " ":
        return line.split()
    try:
        fields = next(csv.reader([line], delimiter=separator, quotechar='"',
                                 skipinitialspace=True, strict=True))
    except (csv.Error, StopIteration):  # not valid CSV with this separator: plain split
        fields = [f.strip().strip('"') for f in line.split(separator)]
    return [f.strip().strip("'").strip() for f in fields]


def _check_quoting(path, numbered_lines, separator) -> None:
    """Raise DataFileError naming the first line whose quotes do not make a valid CSV record."""
    if separator == " ":
        return
    for number, line in numbered_lines:
        if '"' not in line:
            continue
        try:
            next(csv.reader([line], delimiter=separator, quotechar='"', skipinitialspace=True,
                            strict=True))
        except csv.Error as exc:
            raise DataFileError(
                f"line {number}: the quotes do not form a valid CSV field ({exc}); a quoted "
                f"field starts and ends with \" and a quote inside it is doubled (\"\")",
                path=str(path)) from None


def _is_number(text, decimal_comma):
    text = text.strip()
    if _NUMBER.match(text):
        return True
    return decimal_comma and bool(_NUMBER_COMMA.match(text))


def _to_float(text, decimal_comma):
    text = text.strip()
    if decimal_comma:
        text = text.replace(",", ".")
    return float(text)


def _decode(path):
    p = Path(path)
    if not p.exists():
        raise DataFileError("file not found; check the path", path=str(path))
    if p.is_dir():
        raise DataFileError("is a directory, not a CSV file", path=str(path))
    from screen.io.fileio import require_regular_file

    require_regular_file(p, DataFileError, "CSV file")  # a FIFO would block for ever
    try:
        # Bounded read: a device or pipe (/dev/zero) may never end.
        with open(p, "rb") as handle:
            raw = handle.read(MAX_CSV_BYTES + 1)
    except OSError as exc:
        raise DataFileError(f"cannot be read ({exc.strerror})", path=str(path)) from None
    if len(raw) > MAX_CSV_BYTES:
        raise DataFileError(f"is larger than {MAX_CSV_BYTES // 1_000_000} MB; export one heating "
                            f"run per CSV file (a DSC run is well below 10 MB)", path=str(path))
    if b"\x00" in raw[:4096]:
        raise DataFileError(
            "is binary (a native instrument file?); export the run as CSV text", path=str(path)
        )
    for encoding in ("utf-8-sig", "cp1252", "latin-1"):
        try:
            return raw.decode(encoding)
        except UnicodeDecodeError:
            continue
    raise DataFileError("text encoding not recognised; save as UTF-8", path=str(path))  # pragma: no cover


def _parse_metadata_line(text):
    """'key = value', 'key: value', 'key;value;unit' -> (key, value, unit) or None."""
    body = text.lstrip("#%").strip()
    if not body:
        return None
    for splitter in ("=", ":", ";", "\t", ","):
        if splitter in body:
            key, _, value = body.partition(splitter)
            break
    else:
        return None
    key = key.strip()
    value = value.strip()
    if splitter in (";", "\t", ","):
        # "Sample mass;2,35;mg": split on the separator only (the comma may be a decimal one)
        value = " ".join(p.strip() for p in value.split(splitter) if p.strip())
    base, unit, _ = split_column_name(key)
    return base.lower().strip(" .#"), value, unit


def _read_table(path):
    text = _decode(path)
    lines = text.splitlines()
    comments, candidates = [], []
    for number, line in enumerate(lines, start=1):
        stripped = line.strip()
        if not stripped:
            continue
        if stripped.startswith("#"):
            comments.append((number, stripped))
            continue
        candidates.append((number, stripped))
    if not candidates:
        raise DataFileError("contains no table; expected a header line and numeric rows",
                            path=str(path))

    best = None
    for separator, comma in ((";", True), ("\t", True), (",", False), (" ", True)):
        count = 0
        for _, line in candidates:
            fields = _split(line, separator)
            if len(fields) >= 2 and all(_is_number(f, comma) for f in fields):
                count += 1
        if count and (best is None or count > best[2]):
            best = (separator, comma, count)
    if best is None:
        raise DataFileError(
            "no rows of numbers found; expected columns separated by ',', ';' or tabs",
            path=str(path),
        )
    separator, comma, _ = best
    _check_quoting(path, candidates, separator)  # a broken quote, not a missing header
    # decimal comma only if a number actually uses one
    first_numeric = None
    for index, (number, line) in enumerate(candidates):
        fields = _split(line, separator)
        if len(fields) >= 2 and all(_is_number(f, comma) for f in fields):
            first_numeric = index
            break
    width = len(_split(candidates[first_numeric][1], separator))
    header_index = None
    for index in range(first_numeric - 1, -1, -1):
        fields = _split(candidates[index][1], separator)
        if len(fields) == width:
            header_index = index
            break
    if header_index is None:
        raise DataFileError(
            f"no column header above the data (line {candidates[first_numeric][0]}); add a line "
            "naming the columns with units, e.g. 'Time (min),Temperature (°C),Heat flow (mW)'",
            path=str(path),
        )
    header_line, header_text = candidates[header_index]
    header = _split(header_text, separator)
    rows = []
    body = candidates[first_numeric:]
    # footer lines (non-numeric) after the last numeric row are ignored
    last = len(body) - 1
    while last >= 0:
        fields = _split(body[last][1], separator)
        if len(fields) == width and all(_is_number(f, comma) for f in fields):
            break
        last -= 1
    for number, line in body[: last + 1]:
        rows.append((number, _split(line, separator)))
    decimal_comma = comma and any("," in f for _, fields in rows[:50] for f in fields)
    table = _Table(str(path), header, header_line, rows, separator, decimal_comma)
    table.preamble = [c for c in candidates[:header_index]]
    for number, line in comments + table.preamble:
        parsed = _parse_metadata_line(line)
        if parsed:
            key, value, unit = parsed
            table.metadata.setdefault(key, (value, unit, number))
    return table


def _column(table, index, name):
    values = np.empty(len(table.rows))
    for k, (number, fields) in enumerate(table.rows):
        if len(fields) != len(table.header):
            raise DataFileError(
                f"row {number}: {len(fields)} fields where the header has {len(table.header)}; "
                "check the separators in that row",
                path=table.path,
            )
        text = fields[index]
        if not _is_number(text, table.decimal_comma or table.separator != ","):
            raise DataFileError(
                f"row {number}, column {name!r}: {text!r} is not a number; remove or fix the row",
                path=table.path,
            )
        values[k] = _to_float(text, table.separator != ",")
    if not np.all(np.isfinite(values)):
        bad = int(np.argmax(~np.isfinite(values)))
        raise DataFileError(
            f"row {table.rows[bad][0]}, column {name!r}: value is not finite", path=table.path
        )
    return values


# --------------------------------------------------------------------------------------------
# Column names
# --------------------------------------------------------------------------------------------


def split_column_name(name):
    """Split a column or key name into (base name, unit, remainder).

    Parameters
    ----------
    name : str
        E.g. ``"Heat Flow (W/g) Exo Up"``, ``"DSC/(mW/mg)"``, ``"Temp./°C"``, ``"t in min"``.

    Returns
    -------
    tuple of str
        (base, unit, remainder); unit is "" when none is written.
    """
    text = name.strip()
    match = re.match(r"^(.*?)\s*[\(\[]\s*(.+?)\s*[\)\]]\s*(.*)$", text)
    if match:
        return match.group(1).rstrip(" /").strip(), match.group(2), match.group(3)
    match = re.match(r"^(.*?)\s*/\s*(.+)$", text)
    if match:
        return match.group(1).strip(), match.group(2).strip(), ""
    match = re.match(r"^(.*?)\s+in\s+(\S+)$", text, flags=re.IGNORECASE)
    if match:
        return match.group(1).strip(), match.group(2).strip(), ""
    return text, "", ""


def exotherm_direction_from_text(text):
    """'up', 'down' or None from phrases like 'exo up', '↑ exo', 'endo down'.

    Parameters
    ----------
    text : str
        Column name or metadata value.

    Returns
    -------
    str or None
    """
    s = text.lower()
    match = re.search(r"(exo|endo)[a-z]*\s*[:=]?\s*(up|down|↑|↓)", s) or \
        re.search(r"(↑|↓)\s*(exo|endo)", s)
    if match is None:
        if s.strip() in ("up", "down"):
            return s.strip()
        return None
    a, b = match.group(1), match.group(2)
    kind, arrow = (a, b) if a in ("exo", "endo") else (b, a)
    up = arrow in ("up", "↑")
    if kind == "endo":
        up = not up
    return "up" if up else "down"


_TIME_NAMES = {"time", "t", "zeit", "elapsed time", "run time"}
_TEMPERATURE_NAMES = {"temperature", "temp", "temp.", "t", "ts", "sample temperature",
                      "sample temp", "sample temp."}
_HEAT_FLOW_NAMES = {"heat flow", "heatflow", "heat flux", "dsc", "hf", "q", "heat flow rate"}
_REFERENCE_TEMPERATURE_WORDS = ("program", "reference", "furnace", "tr")


@dataclass
class Thermogram:
    """One DSC run in SI units.

    Attributes
    ----------
    path : str
        File it came from.
    time : numpy.ndarray
        [s]
    temperature : numpy.ndarray
        Sample temperature. [K]
    heat_flow : numpy.ndarray
        Specific heat flow with the sign as recorded. [W/kg]
    sample_mass : float or None
        [kg]
    heating_rate : float or None
        Nominal heating rate (header or command line). [K/s]
    exotherm_direction : str or None
        "up" or "down" when the file says so.
    columns : dict
        Role ("time", "temperature", "heat_flow") -> column name used.
    notes : list of str
        What the reader assumed or ignored.
    """

    path: str
    time: np.ndarray
    temperature: np.ndarray
    heat_flow: np.ndarray
    sample_mass: float | None
    heating_rate: float | None
    exotherm_direction: str | None
    columns: dict
    notes: list


def _metadata_quantity(table, keys, kind):
    for key in keys:
        if key in table.metadata:
            value, unit, line = table.metadata[key]
            text = value if not unit else f"{value.split()[0] if value.split() else value} {unit}"
            try:
                return parse_quantity(text, kind), line
            except CaseError as exc:
                raise DataFileError(
                    f"line {line}: {key} {exc.message}; write e.g. "
                    f"'# {keys[0].replace(' ', '_')} = {'2.35 mg' if kind == 'mass' else '4 K/min'}'",
                    path=table.path,
                ) from None
    return None, None


def _consistent(table, name, from_file, line, given, describe):
    if from_file is None:
        return given
    if given is not None and abs(from_file - given) > 0.01 * abs(from_file):
        raise DataFileError(
            f"line {line}: {name} {describe(from_file)} differs from the command line "
            f"{describe(given)}; correct the file or the option",
            path=table.path,
        )
    return from_file


def read_thermogram(path, sample_mass=None, heating_rate=None):
    """Read a DSC thermogram export.

    Parameters
    ----------
    path : str or pathlib.Path
        CSV file.
    sample_mass : float, optional
        Sample mass from the command line; needed for heat flow in mW or W. [kg]
    heating_rate : float, optional
        Nominal heating rate from the command line. [K/s]

    Returns
    -------
    Thermogram

    Raises
    ------
    screen.errors.DataFileError
        With one line naming the file, the column or row and the fix.
    """
    table = _read_table(path)
    notes = []
    roles = {}
    units = {}
    for index, name in enumerate(table.header):
        base, unit, rest = split_column_name(name)
        lower = base.lower().strip()
        cunit = canonical_unit(unit) if unit else ""
        role = None
        if cunit in _TIME_UNITS:
            role = "time"
        elif cunit in _TEMPERATURE_UNITS:
            role = "temperature"
        elif cunit in _HEAT_FLOW_UNITS:
            role = "heat_flow"
        elif cunit in _UNCALIBRATED and (lower in _HEAT_FLOW_NAMES or "heat" in lower):
            raise DataFileError(
                f"column {name!r} is an uncalibrated signal ({unit}); export the calibrated "
                "heat flow in mW or W/g",
                path=table.path,
            )
        elif not unit:
            if lower in _TIME_NAMES - {"t"}:
                role = "time"
            elif lower in _TEMPERATURE_NAMES - {"t"} or "temperature" in lower:
                raise DataFileError(
                    f"column {name!r} has no unit; write it in the header, e.g. "
                    "'Temperature (°C)' or 'Temperature (K)'",
                    path=table.path,
                )
            elif lower in _HEAT_FLOW_NAMES or "heat flow" in lower:
                raise DataFileError(
                    f"column {name!r} has no unit; write it in the header, e.g. "
                    "'Heat flow (mW)' or 'Heat flow (W/g)'",
                    path=table.path,
                )
        if role is None:
            notes.append(f"column {name!r} ignored")
            continue
        if role == "temperature" and role in roles:
            previous = table.header[roles[role]].lower()
            if any(w in previous for w in _REFERENCE_TEMPERATURE_WORDS) or "sample" in lower:
                notes.append(f"column {table.header[roles[role]]!r} ignored (sample temperature used)")
                roles[role], units[role] = index, cunit
            else:
                notes.append(f"column {name!r} ignored (first temperature column used)")
            continue
        if role in roles:
            notes.append(f"column {name!r} ignored (first {role.replace('_', ' ')} column used)")
            continue
        roles[role], units[role] = index, cunit
        direction = exotherm_direction_from_text(name)
        if role == "heat_flow" and direction:
            units["direction"] = direction
    for role, example in (("temperature", "'Temperature (°C)'"), ("heat_flow", "'Heat flow (mW)'")):
        if role not in roles:
            raise DataFileError(
                f"no {role.replace('_', ' ')} column found in the header {table.header}; name it "
                f"with its unit, e.g. {example}",
                path=table.path,
            )
    temperature = _column(table, roles["temperature"], table.header[roles["temperature"]])
    if _TEMPERATURE_UNITS[units["temperature"]] == "C":
        temperature = temperature + ZERO_CELSIUS
    _, high = TEMPERATURE_RANGE_K
    if np.any(temperature <= 0) or np.any(temperature > high):
        bad = int(np.argmax((temperature <= 0) | (temperature > high)))
        problem = _temperature_problem(float(temperature[bad]))
        raise DataFileError(
            f"row {table.rows[bad][0]}: temperature {problem}; check the unit of "
            f"{table.header[roles['temperature']]!r}",
            path=table.path,
        )
    raw_flow = _column(table, roles["heat_flow"], table.header[roles["heat_flow"]])

    file_mass, mass_line = _metadata_quantity(
        table, ("sample mass", "sample_mass", "mass", "sample weight"), "mass")
    mass = _consistent(table, "sample mass", file_mass, mass_line, sample_mass,
                       lambda v: f"{v * 1e6:.4g} mg")
    file_rate, rate_line = _metadata_quantity(
        table, ("heating rate", "heating_rate", "scan rate"), "heating_rate")
    rate = _consistent(table, "heating rate", file_rate, rate_line, heating_rate,
                       lambda v: f"{v * 60:.4g} K/min")

    direction = units.get("direction")
    for key in ("exotherm", "exo", "exo direction", "exotherm direction", "exo_direction"):
        if key in table.metadata:
            value, _, line = table.metadata[key]
            found = exotherm_direction_from_text(value) or exotherm_direction_from_text(f"exo {value}")
            if found is None:
                raise DataFileError(
                    f"line {line}: exotherm direction {value!r} not understood; write "
                    "'# exotherm = up' or '# exotherm = down'",
                    path=table.path,
                )
            direction = found
            break

    factor, base = _HEAT_FLOW_UNITS[units["heat_flow"]]
    flow_name = table.header[roles["heat_flow"]]
    if base == "W":
        if mass is None:
            raise DataFileError(
                f"column {flow_name!r} is in absolute units; give the sample mass with "
                "--sample-mass '2.35 mg' or a header line '# sample_mass = 2.35 mg'",
                path=table.path,
            )
        heat_flow = raw_flow * factor / mass
    else:
        heat_flow = raw_flow * factor

    if "time" in roles:
        time = _column(table, roles["time"], table.header[roles["time"]])
        time_unit = units["time"]
        if time_unit == "":
            time_unit = _infer_time_unit(table, time, temperature, rate, table.header[roles["time"]])
            notes.append(f"time column {table.header[roles['time']]!r} taken as {time_unit} "
                         "(inferred from the heating rate)")
        time = time * _TIME_UNITS[time_unit]
    else:
        if rate is None:
            raise DataFileError(
                "has no time column; give the heating rate with --heating-rate '4 K/min' or "
                "'# heating_rate = 4 K/min' so that time can be derived from temperature",
                path=table.path,
            )
        time = (temperature - temperature[0]) / rate
        notes.append("time derived from temperature and the nominal heating rate")
    steps = np.diff(time)
    if np.any(steps <= 0):
        bad = int(np.argmax(steps <= 0)) + 1
        raise DataFileError(
            f"row {table.rows[bad][0]}: time does not increase; remove repeated or cooling "
            "segments so that one heating segment remains",
            path=table.path,
        )
    if len(table.rows) < 20:
        raise DataFileError(
            f"only {len(table.rows)} data rows; a thermogram needs at least 20", path=table.path
        )
    if temperature[-1] - temperature[0] < 10.0:
        raise DataFileError(
            "temperature rises by less than 10 K; only dynamic (heating) runs can be analysed",
            path=table.path,
        )
    columns = {role: table.header[index] for role, index in roles.items()}
    return Thermogram(str(path), time, temperature, heat_flow, mass, rate, direction, columns, notes)


def _infer_time_unit(table, time, temperature, rate, name):
    if rate is None:
        raise DataFileError(
            f"column {name!r} has no unit; write 'Time (min)' or 'Time (s)'", path=table.path
        )
    slope = np.polyfit(time, temperature, 1)[0]
    for unit in ("s", "min"):
        ratio = slope / (rate * _TIME_UNITS[unit])
        if 0.8 < ratio < 1.25:
            return unit
    raise DataFileError(
        f"column {name!r} has no unit and matches neither s nor min at the given heating rate; "
        "write 'Time (min)' or 'Time (s)'",
        path=table.path,
    )


# --------------------------------------------------------------------------------------------
# Peak table
# --------------------------------------------------------------------------------------------

PEAK_COLUMNS_REQUIRED = ("heating_rate_K_per_min", "peak_temperature_degC")
PEAK_COLUMNS_OPTIONAL = ("onset_temperature_degC", "energy_J_per_g")
PEAK_COLUMNS_TEXT = ("run", "label", "sample", "note", "notes", "comment")


@dataclass
class PeakTable:
    """Peak temperatures per heating rate.

    Attributes
    ----------
    path : str
    heating_rates : numpy.ndarray
        [K/s]
    peak_temperatures : numpy.ndarray
        [K]
    onset_temperatures : numpy.ndarray or None
        [K]
    energies : numpy.ndarray or None
        [J/kg]
    labels : list of str
    """

    path: str
    heating_rates: np.ndarray
    peak_temperatures: np.ndarray
    onset_temperatures: np.ndarray | None
    energies: np.ndarray | None
    labels: list


def read_peak_table(path):
    """Read a table of peak temperatures per heating rate.

    Parameters
    ----------
    path : str or pathlib.Path
        CSV with columns ``heating_rate_K_per_min`` and ``peak_temperature_degC`` (optional
        ``onset_temperature_degC``, ``energy_J_per_g``, text ``run``/``label``/``note``).

    Returns
    -------
    PeakTable

    Raises
    ------
    screen.errors.DataFileError
        Missing or unknown columns, non-numeric or non-positive values (row named).
    """
    text = _decode(path)
    lines = [(n, l.strip()) for n, l in enumerate(text.splitlines(), start=1)
             if l.strip() and not l.strip().startswith("#")]
    if not lines:
        raise DataFileError("is empty; expected the header 'heating_rate_K_per_min,"
                            "peak_temperature_degC' and one row per run", path=str(path))
    header_line, header_text = lines[0]
    separator = ";" if header_text.count(";") >= 1 else ("\t" if "\t" in header_text else ",")
    _check_quoting(path, lines, separator)
    header = [h.strip().strip('"') for h in _split(header_text, separator)]
    lookup = {h.lower(): i for i, h in enumerate(header)}
    accepted = PEAK_COLUMNS_REQUIRED + PEAK_COLUMNS_OPTIONAL + PEAK_COLUMNS_TEXT
    for h in header:
        if h.lower() not in {a.lower() for a in accepted}:
            raise DataFileError(
                f"line {header_line}: unknown column {h!r}; accepted: {', '.join(accepted)}",
                path=str(path),
            )
    for required in PEAK_COLUMNS_REQUIRED:
        if required.lower() not in lookup:
            raise DataFileError(
                f"line {header_line}: column {required!r} missing; the header must contain "
                f"{', '.join(PEAK_COLUMNS_REQUIRED)}",
                path=str(path),
            )
    decimal_comma = separator != ","
    values = {c: [] for c in PEAK_COLUMNS_REQUIRED + PEAK_COLUMNS_OPTIONAL}
    labels = []
    for number, line in lines[1:]:
        fields = _split(line, separator)
        if len(fields) != len(header):
            raise DataFileError(
                f"row {number}: {len(fields)} fields where the header has {len(header)}",
                path=str(path),
            )
        for column in values:
            if column.lower() not in lookup:
                continue
            text_value = fields[lookup[column.lower()]]
            if not _is_number(text_value, decimal_comma):
                raise DataFileError(
                    f"row {number}, column {column!r}: {text_value!r} is not a number",
                    path=str(path),
                )
            value = _to_float(text_value, decimal_comma)
            if not math.isfinite(value):
                raise DataFileError(
                    f"row {number}, column {column!r}: {text_value!r} is not a finite number",
                    path=str(path),
                )
            if column in ("heating_rate_K_per_min", "energy_J_per_g") and not value > 0:
                raise DataFileError(
                    f"row {number}, column {column!r}: {text_value} must be positive",
                    path=str(path),
                )
            if column.endswith("degC"):
                problem = _temperature_problem(value + ZERO_CELSIUS)
                if problem:
                    raise DataFileError(f"row {number}, column {column!r}: {text_value} "
                                        f"{problem}", path=str(path))
            values[column].append(value)
        text_cols = [fields[lookup[c]] for c in PEAK_COLUMNS_TEXT if c in lookup]
        labels.append(text_cols[0] if text_cols else f"row {number}")
    if len(labels) < 2:
        raise DataFileError(
            f"has {len(labels)} run(s); Kissinger needs at least two heating rates (three "
            "recommended by ASTM E698)",
            path=str(path),
        )
    rates = np.array(values["heating_rate_K_per_min"]) / 60.0
    if np.unique(rates).size < 2:
        raise DataFileError("all runs have the same heating rate; Kissinger needs different rates",
                            path=str(path))
    onsets = (np.array(values["onset_temperature_degC"]) + ZERO_CELSIUS
              if "onset_temperature_degc" in lookup else None)
    energies = np.array(values["energy_J_per_g"]) * 1e3 if "energy_j_per_g" in lookup else None
    return PeakTable(str(path), rates, np.array(values["peak_temperature_degC"]) + ZERO_CELSIUS,
                     onsets, energies, labels)
