"""Plain-text presentation of a screening result for the terminal. Reads results only.

Two views of the same JSON-ready dict (:meth:`ScreeningResult.to_json_dict`):

- the first screen (``format_check(data)``, at most about 60 lines): title, the one-line caution,
  the verdict with its basis, the key figures, one line per verdict with a column per vessel,
  one line per optional analysis, the count of warnings with the most severe ones, and the
  cautions in full at the end;
- everything (``format_check(data, detail=True)``, ``check --detail``): the inputs, all figures,
  the vessel table and verdicts, every block of the optional analyses, every warning.

Messages that repeat (the same text for several vessels) are printed once.
"""

from __future__ import annotations

import functools
import re
import textwrap as _textwrap

from screen.cautions import CAUTIONS, SHORT_CAUTION

WIDTH = 78


class textwrap:  # noqa: N801 - the textwrap functions without breaks at hyphens
    fill = staticmethod(functools.partial(_textwrap.fill, break_on_hyphens=False))
    wrap = staticmethod(functools.partial(_textwrap.wrap, break_on_hyphens=False))

#: Warnings shown on the first screen (the most severe first; all of them with --detail).
FIRST_SCREEN_WARNINGS = 3
#: Length of the first screen the warnings are fitted into [lines].
FIRST_SCREEN_LINES = 60
#: Lines per warning on the first screen (the whole text with --detail).
FIRST_SCREEN_WARNING_LINES = 2

#: Words that mark a warning as severe (a verdict at stake), then as a data gap; the first
#: screen shows the severe ones first. Ordering for display only: every warning is in --detail
#: and in the JSON.
_SEVERE = re.compile(r"measured under other conditions|CANNOT CONCLUDE|NOT conservative|FAILS|"
                     r"\bfails\b|UNSTABLE|insufficient|"
                     r"cannot carry|exceeds|triggered|feed continuing|interlock|not recoverable|"
                     r"worse than the base|class [45]\b|CRUDE|LOWER than", re.IGNORECASE)
_GAP = re.compile(r"missing|not given|cannot assess|not demonstrated|extrapolat|lower bound|"
                  r"above the|outside", re.IGNORECASE)


def _fmt(value, digits=1, unit=""):
    if value is None:
        return "n/a"
    if isinstance(value, float):
        text = f"{value:.{digits}f}"
    else:
        text = str(value)
    return f"{text} {unit}".rstrip()


def format_hours(hours) -> str:
    """TMRad in h with sensible precision; very long times in scientific notation.

    Parameters
    ----------
    hours : float or None
        Time. [h]
    """
    if hours is None:
        return "n/a"
    if hours >= 1e5:
        return f"{hours:.2e} h"
    if hours >= 100:
        return f"{hours:.0f} h"
    if hours >= 1:
        return f"{hours:.1f} h"
    return f"{hours * 60:.1f} min"


def _wrap(text, indent="  ", subsequent=None):
    return textwrap.fill(text, WIDTH, initial_indent=indent,
                         subsequent_indent=indent if subsequent is None else subsequent)


def _number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def caution_lines(cautions=CAUTIONS) -> list[str]:
    """The cautions in full, as the closing lines of every terminal output.

    Parameters
    ----------
    cautions : sequence of str
        The caution sentences (:data:`screen.cautions.CAUTIONS`).
    """
    lines = ["Cautions"]
    for text in cautions:
        lines.append(textwrap.fill(text, WIDTH, initial_indent="  * ", subsequent_indent="    "))
    return lines


def caution_head() -> list[str]:
    """The one-line caution printed under the title of every terminal output."""
    return textwrap.wrap(SHORT_CAUTION, WIDTH)


def unique_messages(messages, names=()) -> list[str]:
    """``messages`` without repeats, in their first order.

    A text that repeats for several vessels (``"NAME: text"`` with a name of ``names``) is
    printed once, with the names joined: ``"Lab, Pilot: text"``.

    Parameters
    ----------
    messages : iterable of str
        Warnings or reasons, in order.
    names : iterable of str
        Vessel names that may prefix a message.
    """
    grouped: dict[str, list[str]] = {}
    order: list[str] = []
    for text in messages:
        text = str(text)
        owner, rest = None, text
        for name in sorted(names, key=len, reverse=True):
            if name and text.startswith(f"{name}: "):
                owner, rest = name, text[len(name) + 2:]
                break
        if rest not in grouped:
            grouped[rest] = []
            order.append(rest)
        if owner is None:
            grouped[rest].append("")
        elif owner not in grouped[rest]:
            grouped[rest].append(owner)
    out = []
    for rest in order:
        owners = [o for o in grouped[rest] if o]
        if owners and len(owners) == len(grouped[rest]):
            out.append(f"{', '.join(owners)}: {rest}")
        else:
            out.append(rest)
    return out


def warning_rank(text: str) -> int:
    """Display order of a warning: 0 a verdict at stake, 1 a data gap, 2 other.

    Parameters
    ----------
    text : str
        The warning.
    """
    if _SEVERE.search(text):
        return 0
    if _GAP.search(text):
        return 1
    return 2


def _vessel_names(r) -> list[str]:
    return [v.get("name", "") for v in r.get("vessels") or [] if isinstance(v, dict)]


# --------------------------------------------------------------------------------------------
# Verdict


def verdict_headline(r) -> str:
    """The verdict line: class (or no class), severity, probability.

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    """
    severity = f"severity {r.get('severity_4')} ({r.get('severity')})"
    klass = r.get("criticality_class")
    if klass is None:
        return f"VERDICT: CANNOT CONCLUDE (no class granted)   {severity}"
    probability = (f"probability {r['probability_6']} ({r.get('probability')})"
                   if r.get("probability_6") else "probability not assessed")
    if r.get("verdict_status", "screened") != "screened":
        return (f"VERDICT: CLASS {klass} AT LEAST: crude estimate from the DSC onset   "
                f"{severity}")
    return f"VERDICT: CLASS {klass}   {severity}, {probability}"


def _governing_line(r) -> str | None:
    governing = r.get("mtsr_governing_degC")
    if r.get("verdict_basis_lines") or not _number(governing):
        return None  # the basis of the verdict names the governing MTSR
    if _number(r.get("mtsr_degC")) and governing <= r["mtsr_degC"] + 0.05:
        return None
    text = (f"Governing MTSR {governing:.1f} degC from the "
            f"{r.get('mtsr_governing_basis') or 'simulation'}, higher than the "
            f"{_fmt(r.get('mtsr_degC'))} degC from the stated accumulation")
    if r.get("criticality_class_stated_mtsr") is not None:
        text += (f"; it raises the class from {r['criticality_class_stated_mtsr']} to "
                 f"{r.get('criticality_class')}")
    return text + "."


def basis_lines(r, detail: bool = False) -> list[str]:
    """The basis of the verdict: on the first screen the lines the analyses chose
    (``results.verdict_basis_lines``), with ``detail`` every stated assumption
    (``results.assumptions``); without them the basis that the figures themselves carry.

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    detail : bool
        Each assumption in full (else at most two lines each).
    """
    lines = ["Basis of the verdict"]
    assumptions = [a for a in r.get("assumptions") or [] if isinstance(a, dict)]
    short = [str(text) for text in r.get("verdict_basis_lines") or []]
    if short and not detail:
        # The few lines the analyses chose for the first screen (at most two lines each).
        for text in short:
            wrapped = textwrap.wrap(text, WIDTH - 4, max_lines=2, placeholder=" [...]")
            lines.extend(("  - " if n == 0 else "    ") + line for n, line in enumerate(wrapped))
        return lines
    if assumptions:
        for item in assumptions:
            text = item.get("text") or f"{item.get('key')}: {item.get('value')}"
            basis = item.get("basis")
            text = f"{text}" + (f" [{basis}]" if basis else "")
            wrapped = textwrap.wrap(text, WIDTH - 4, max_lines=None if detail else 2,
                                    placeholder=" [...]")
            lines.extend(("  - " if n == 0 else "    ") + line for n, line in enumerate(wrapped))
        return lines
    mode = r.get("mode", "")
    accumulation = r.get("accumulation")
    text = f"{mode} at T_p = {_fmt(r.get('process_temperature_degC'))} degC"
    if _number(accumulation):
        text += f", accumulation X_ac = {accumulation:.2f}"
    lines.append(_wrap(text, "  - ", "    "))
    if r.get("mtsr_feed_mode"):
        lines.append(_wrap(f"MTSR with the feed {r['mtsr_feed_mode']}", "  - ", "    "))
    basis = r.get("decomposition_basis")
    lines.append(_wrap(f"decomposition: {r.get('decomposition_model')} model, "
                       + ("kinetics from the case" if basis == "kinetics" else
                          "CRUDE estimate from the DSC onset only"), "  - ", "    "))
    return lines


# --------------------------------------------------------------------------------------------
# Figures


def figure_lines(r) -> list[str]:
    """The key figures in three lines: temperatures (K above T_p), TMRad, the onset margin.

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    """
    t_p = r["process_temperature_degC"]

    def temperature(label, key):
        value = r.get(key)
        if not _number(value):
            return f"{label} n/a"
        return f"{label} {value:.1f}" + ("" if key == "process_temperature_degC"
                                         else f" ({value - t_p:+.1f})")

    first = [temperature("T_p", "process_temperature_degC"), temperature("MTSR", "mtsr_degC"),
             temperature("MTT", "mtt_degC"), temperature("TD24", "td24_degC")]
    return ["Key figures (degC; in brackets K above T_p; final: after the runaway)",
            "  " + "   ".join(first),
            f"  final {temperature('', 'final_temperature_degC').strip()}   "
            f"TMRad at MTSR {format_hours(r.get('tmrad_at_mtsr_h'))}   "
            f"TD24 - MTSR {_fmt(r.get('onset_margin_K'))} K"]


def _detail_figure_lines(r) -> list[str]:
    t_p = r["process_temperature_degC"]
    lines = ["Figures                          degC         K above T_p"]
    rows = [
        ("T_p  process temperature", r["process_temperature_degC"]),
        ("MTSR max. temp. synthesis", r["mtsr_degC"]),
        ("MTT  max. technical temp.", r["mtt_degC"]),
        ("TD24 TMRad = 24 h", r["td24_degC"]),
        ("TD8  TMRad = 8 h", r["td8_degC"]),
        ("final temperature", r["final_temperature_degC"]),
    ]
    for label, value in rows:
        lines.append(f"  {label:<29}{value:8.1f}   {value - t_p:+10.1f}")
    lines.append(f"  adiabatic rise, synthesis      {r['synthesis_adiabatic_rise_K']:8.1f} K")
    lines.append(f"  adiabatic rise, decomposition  {r['decomposition_adiabatic_rise_K']:8.1f} K")
    lines.append(f"  onset margin TD24 - MTSR       {r['onset_margin_K']:8.1f} K")
    lines.append(f"  TMRad at T_p                   {format_hours(r['tmrad_at_process_temperature_h'])}")
    lines.append(f"  TMRad at MTSR                  {format_hours(r['tmrad_at_mtsr_h'])}"
                 f"   (zero-order estimate {format_hours(r['tmrad_at_mtsr_zero_order_h'])})")
    if r.get("tmrad_governing"):
        lines.append(f"  Townsend-Tou (zero order)      {format_hours(r['tmrad_at_mtsr_townsend_tou_h'])}"
                     f" at MTSR, TD24 {r['td24_townsend_tou_degC']:.1f} degC")
        lines.append(_wrap(f"governs: {r['tmrad_governing']}", "    "))
    if "dsc_onset_degC" in r:
        lines.append(f"  DSC onset (info only)          {r['dsc_onset_degC']:8.1f} degC, "
                     f"{r['dsc_onset_minus_mtsr_K']:+.0f} K from MTSR")
    return lines


# --------------------------------------------------------------------------------------------
# Verdicts per vessel


def _by_name(block, list_key, name_key):
    if not isinstance(block, dict):
        return {}
    return {item.get(name_key): item for item in block.get(list_key) or []
            if isinstance(item, dict)}


def vessel_verdicts(r) -> list[tuple[str, list[str]]]:
    """(verdict label, one word per vessel) for the vessel table of the first screen.

    The words are those of the result: ``decomposition_stability``, ``synthesis_cooling`` and
    the barrier's ``barrier_verdict`` where the analyses give them (the older ``stability`` and
    ``synthesis_stability`` otherwise), the closed-vessel ``verdict`` of the pressure check.

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    """
    vessels = [v for v in r.get("vessels") or [] if isinstance(v, dict)]
    barrier = r.get("barrier") if isinstance(r.get("barrier"), dict) else None
    barrier_by_name = _by_name(barrier, "vessels", "name")
    pressure_by_name = _by_name(r.get("pressure"), "vessels", "vessel")
    rows = [
        ("decomposition", [v.get("decomposition_stability") or v.get("stability") or "n/a"
                           for v in vessels]),
        ("synthesis cooling", [v.get("synthesis_cooling") or v.get("synthesis_stability")
                               or "n/a" for v in vessels]),
    ]
    if barrier is not None:
        if barrier.get("assessed"):
            words = [(barrier_by_name.get(v.get("name")) or {}).get("barrier_verdict")
                     or "n/a" for v in vessels]
        else:
            words = ["not assessed"] * len(vessels)
        rows.append(("barrier at the MTT", words))
    if pressure_by_name:
        rows.append(("closed vessel", [(pressure_by_name.get(v.get("name")) or {}).get("verdict")
                                       or "n/a" for v in vessels]))
    return rows


def vessel_table_lines(r) -> list[str]:
    """Verdicts per vessel: one line per verdict, one column per vessel (three per block).

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    """
    vessels = [v for v in r.get("vessels") or [] if isinstance(v, dict)]
    if not vessels:
        return ["Vessels: none given; the vessel heat balance is not checked."]
    rows = vessel_verdicts(r)
    t_nr = [v.get("no_return_temperature_degC") for v in vessels]
    ratio = [v.get("synthesis_cooling_ratio") for v in vessels]
    rows.append(("no return T_NR degC", [_fmt(x) if _number(x) else "n/a" for x in t_nr]))
    rows.append(("cooling/peak synth.", [f"{x:.2f}" if _number(x) else "n/a" for x in ratio]))
    label_width = 22
    lines = ["Verdicts per vessel"]
    for start in range(0, len(vessels), 3):
        chunk = vessels[start:start + 3]
        width = max(19, min(36, (WIDTH - label_width) // len(chunk)))
        names = [textwrap.wrap(v.get("name", ""), width - 1)[:2] or [""] for v in chunk]
        for row in range(max(len(n) for n in names)):
            lines.append((" " * label_width + "".join(
                (n[row] if row < len(n) else "").ljust(width) for n in names)).rstrip())
        for label, words in rows:
            cells = words[start:start + 3]
            lines.append((f"  {label:<{label_width - 2}}"
                          + "".join(str(w).ljust(width) for w in cells)).rstrip())
    return lines


def _cut(text: str, width: int) -> str:
    return text if len(text) <= width else text[:width - 1] + "~"


# --------------------------------------------------------------------------------------------
# Optional analyses, one line each on the first screen


def analysis_lines(r) -> list[str]:
    """One short entry per optional analysis the result carries.

    Parameters
    ----------
    r : dict
        ``results`` of the JSON-ready result (temperatures in degC, times in h).
    """
    out = []
    sim = r.get("simulation")
    if isinstance(sim, dict) and sim.get("summary_lines"):
        text = f"Cooling-failure simulation ({sim.get('vessel') or 'vessel'}): MTSR "
        text += f"{_fmt(sim.get('mtsr_feed_stopped_degC'))} degC with the feed stopped"
        if _number(sim.get("mtsr_feed_continuing_degC")):
            text += f", {_fmt(sim['mtsr_feed_continuing_degC'])} degC with the feed continuing"
        if _number(sim.get("shortest_time_to_mtt_h")):
            text += f"; MTT reached after {format_hours(sim['shortest_time_to_mtt_h'])}"
        out.append(_wrap(text + ".", "- ", "  "))
    barrier = r.get("barrier")
    if isinstance(barrier, dict) and not barrier.get("assessed"):
        reason = str(barrier.get("reason") or "not assessed")
        reason = re.sub(r"^not assessed:\s*", "", reason).split("; set ")[0]
        out.append(_wrap(f"Evaporative-cooling barrier: not assessed: {reason}.", "- ", "  "))
    pressure = r.get("pressure")
    if isinstance(pressure, dict) and pressure.get("summary_lines") and not r.get("vessels"):
        totals = [v.get("total_bar") for v in pressure.get("vessels") or []
                  if isinstance(v, dict) and _number(v.get("total_bar"))]
        text = (f"Closed-vessel pressure ({pressure.get('solvent') or 'no solvent'}) at "
                f"{_fmt(pressure.get('final_temperature_degC'))} degC")
        if totals:
            lower = any(v.get("is_lower_bound") for v in pressure.get("vessels") or []
                        if isinstance(v, dict))
            text += f": up to {max(totals):.3g} bar(a)" + (" (lower bound)" if lower else "")
        out.append(_wrap(text + ".", "- ", "  "))
    scenarios = r.get("scenarios")
    if isinstance(scenarios, dict):
        if scenarios.get("run") is False:
            out.append(_wrap(f"Deviation scenarios: not run ({scenarios.get('reason')}).",
                             "- ", "  "))
        elif scenarios.get("rows"):
            worst = scenarios.get("worst_scenario")
            text = f"Deviation scenarios: {scenarios.get('deviations', '')} screened"
            if worst:
                klass = scenarios.get("worst_class")
                text += f"; worst: {worst} (class {'n/c' if klass is None else klass})"
            out.append(_wrap(text + ".", "- ", "  "))
    uncertainty = r.get("uncertainty")
    if isinstance(uncertainty, dict) and uncertainty.get("confidence"):
        out.append(_wrap(str(uncertainty["confidence"]), "- ", "  "))
    if out:
        out.insert(0, "Further analyses (tables with --detail)")
    return out


# --------------------------------------------------------------------------------------------
# Warnings


def warning_lines(data, limit=None) -> list[str]:
    """Warnings printed once each; with ``limit`` only the most severe, and their count.

    Parameters
    ----------
    data : dict
        The JSON-ready result (``warnings`` and ``results.vessels``).
    limit : int, optional
        Number of warnings shown (the most severe first, each at most two lines); None: all.
    """
    messages = unique_messages(data.get("warnings") or [], _vessel_names(data["results"]))
    if not messages:
        return ["Warnings: none raised for this case"]
    total = len(messages)
    if limit is None or total <= limit:
        shown = messages
        lines = [f"Warnings ({total})"]
    else:
        ranked = sorted(range(total), key=lambda i: (warning_rank(messages[i]), i))
        shown = [messages[i] for i in ranked[:limit]]
        lines = [f"Warnings ({total}; the {limit} most severe shown, all with --detail)"]
    for text in shown:
        wrapped = textwrap.wrap(text, WIDTH - 4)
        if limit is not None and len(wrapped) > FIRST_SCREEN_WARNING_LINES:
            wrapped = textwrap.wrap(text, WIDTH - 4, max_lines=FIRST_SCREEN_WARNING_LINES,
                                    placeholder=" [...]")
        lines.extend(("  - " if number == 0 else "    ") + line
                     for number, line in enumerate(wrapped))
    return lines


# --------------------------------------------------------------------------------------------
# The two views


def _title_lines(data) -> list[str]:
    case = data["case"]
    title = f"Thermal screening: {case['title']}"
    lines = textwrap.wrap(title, WIDTH) or [title]
    lines.append("=" * min(WIDTH, max(len(line) for line in lines)))
    lines.extend(caution_head())
    revision = f"rev. {case['revision']}  " if case.get("revision") else ""
    lines.append(f"case file  {case['path']}  {revision}sha256 {case['sha256'][:16]}...")
    for text in data.get("overrides", []):
        lines.append(f"what-if    --set {text}")
    return lines


def format_check(data: dict, detail: bool = False, extra_lines=()) -> str:
    """Format the JSON-ready dict of :meth:`ScreeningResult.to_json_dict` for the terminal.

    Parameters
    ----------
    data : dict
        The JSON-ready result.
    detail : bool
        Everything (``check --detail``) instead of the first screen of about 60 lines.
    extra_lines : sequence of str
        Further lines (another command's block, e.g. the limits), printed before the warnings
        so that the cautions stay last.
    """
    if detail:
        return _format_detail(data, extra_lines)
    r = data["results"]
    lines = _title_lines(data)
    lines.append("")
    lines.append(verdict_headline(r))
    lines.append(_wrap(r["verdict"]))
    governing = _governing_line(r)
    if governing:
        lines.append(_wrap(governing))
    lines.append("")
    lines.extend(basis_lines(r))
    lines.append("")
    lines.extend(figure_lines(r))
    lines.append("")
    lines.extend(vessel_table_lines(r))
    extra = analysis_lines(r)
    if extra:
        lines.append("")
        lines.extend(extra)
    if extra_lines:
        lines += [""] + list(extra_lines)
    closing = [""] + caution_lines(data.get("cautions", CAUTIONS))
    # The warnings take what is left of the first screen: the most severe first, at least one.
    shown = FIRST_SCREEN_WARNINGS
    while True:
        warnings = warning_lines(data, shown)
        if shown <= 1 or len(lines) + 1 + len(warnings) + len(closing) <= FIRST_SCREEN_LINES:
            break
        shown -= 1
    lines.append("")
    lines.extend(warnings)
    lines.extend(closing)
    return "\n".join(lines)


def _format_detail(data: dict, extra_lines=()) -> str:
    r = data["results"]
    lines = _title_lines(data)
    lines.append("")
    lines.append("Inputs")
    t_p = r["process_temperature_degC"]
    lines.append(f"  process             {r['mode']} at T_p = {t_p:.1f} degC, "
                 f"accumulation X_ac = {r['accumulation']:.2f}"
                 + (f", mass ratio {r['accumulation_mass_ratio']:.2f}"
                    if r["mode"] == "semi-batch" else ""))
    lines.append(f"  synthesis           Q = {r['synthesis_energy_kJ_per_kg']:.4g} kJ/kg")
    lines.append(f"  decomposition       Q = {r['decomposition_energy_kJ_per_kg']:.4g} kJ/kg, "
                 f"model {r['decomposition_model']} ({r['decomposition_basis']})")
    lines.append("")
    lines.extend(_detail_figure_lines(r))
    lines.append("")
    lines.append(verdict_headline(r))
    lines.append(_wrap(r["verdict"]))
    governing = _governing_line(r)
    if governing:
        lines.append(_wrap(governing))
    lines.append("")
    lines.extend(basis_lines(r, detail=True))
    vessels = r.get("vessels") or []
    if vessels:
        lines.append("")
        lines.extend(format_vessels(vessels))
        lines.append("")
        lines.extend(vessel_table_lines(r))
    for block in ("simulation", "pressure", "barrier", "scenarios", "uncertainty"):
        if block in r and isinstance(r[block], dict) and r[block].get("summary_lines"):
            lines.append("")
            lines.extend(_once(r[block]["summary_lines"]))
    if extra_lines:
        lines += [""] + list(extra_lines)
    lines.append("")
    lines.extend(warning_lines(data))
    lines.append("")
    lines.extend(caution_lines(data.get("cautions", CAUTIONS)))
    return "\n".join(lines)


def _once(lines) -> list[str]:
    """Summary lines without a line that only repeats the one before it (after the grade
    suffix and the indentation are set aside)."""
    out: list[str] = []
    previous = None
    for line in lines:
        key = re.sub(r"\s*\((holds|doubtful|fails)\)\s*$", "", str(line)).strip()
        key = re.sub(r"^heat at the MTT:\s*", "", key)
        if key and key == previous:
            continue
        out.append(line)
        previous = key
    return out


def format_vessels(vessels) -> list[str]:
    """Scale-up table, one row per vessel, then the verdict per vessel.

    Parameters
    ----------
    vessels : list of dict
        The ``results.vessels`` entries of the JSON-ready result.
    """

    def num(value, fmt):
        if value is None:
            width = fmt.split(".")[0]
            return f"{'n/a':>{int(width)}}" if width.isdigit() else " n/a"
        return format(value, fmt)

    lines = ["Vessels (Semenov heat balance of the decomposition; synthesis cooling check)"]
    header = (f"  {'vessel':<24}{'fill m3':>8}{'A m2':>7}{'A/V':>6}{'UA W/K':>9}{'W/kg':>7}"
              f"{'tau h':>7}{'Tc,crit':>8}{'T_NR':>7}{'ratio':>7}")
    lines.append(header)
    for v in vessels:
        lines.append(
            f"  {v['name'][:23]:<24}{num(v.get('fill_volume_m3'), '8.3g')}"
            f"{num(v.get('heat_transfer_area_m2'), '7.3g')}"
            f"{num(v.get('area_to_volume_per_m'), '6.3g')}"
            f"{num(v.get('ua_W_per_K'), '9.4g')}"
            f"{num(v.get('specific_cooling_capacity_W_per_kg'), '7.3g')}"
            f"{num(v.get('time_constant_h'), '7.3g')}"
            f"{num(v.get('critical_coolant_temperature_degC'), '8.1f')}"
            f"{num(v.get('no_return_temperature_degC'), '7.1f')}"
            f"{num(v.get('synthesis_cooling_ratio'), '7.2f')}")
    lines.append("  (Tc,crit and T_NR in degC; ratio = cooling capacity at T_p / peak heat release)")
    for v in vessels:
        own = ""
        if "criticality_class_computed" in v:
            klass = v.get("criticality_class")
            mtt = v.get("mtt_degC")
            mtt_text = (f"{mtt:.1f} degC" if mtt is not None
                        else f"above {v['mtt_lower_bound_degC']:.1f} degC"
                        if v.get("mtt_lower_bound_degC") is not None else "no technical limit")
            own = (f"class {klass if klass is not None else 'not granted'}, MTT {mtt_text}"
                   + (" (closed)" if v.get("closed") else "") + "; ")
        lines.append(textwrap.fill(f"{v['name']}: {own}{v.get('verdict', '')}", WIDTH,
                                   initial_indent="  - ", subsequent_indent="    "))
    return lines
