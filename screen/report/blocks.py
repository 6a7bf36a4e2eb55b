"""Feature blocks of the PDF: cooling-failure simulation, evaporative-cooling barrier,
closed-vessel pressure, deviation scenarios and the uncertainty of the verdict.

Each block is laid out from its member of ``result.results`` (the JSON contract of the module
that computes it) as key-figure tables, short lists and vector figures. The renderers read every
key with ``.get``: a member that lacks a figure shows "n/a" in its place instead of losing the
block. A block that cannot be laid out at all falls back to its ``summary_lines`` (the text of
``check``), and failing that to one sentence pointing to the ``--json`` output; unknown members
with ``summary_lines`` are shown as those lines. Verdict words are printed in capitals (HOLDS,
DOUBTFUL, FAILS, EXCEEDS, ...), so that they stand out in black and white.

The number formats are those of :mod:`screen.report.style`: temperatures 1 decimal in °C,
differences 1 decimal in K, times 3 significant digits in h, probabilities 3 decimals, velocities
3 significant digits, other figures 4 significant digits. reportlab is imported inside the
functions.
"""

from __future__ import annotations

import math
import re

from screen.report import figure_data, figures
from screen.report.layout import bullet, figure_block, paragraph, table
from screen.report.limits import limits_pdf_block
from screen.report.style import (
    FONT_BOLD,
    FRAME_WIDTH,
    MM,
    escape,
    format_celsius,
    format_generic,
    format_hours,
    format_kelvin,
    format_ratio,
    format_significant,
    prose,
)

#: Result members added by optional analyses, in the order shown, with their headings.
OPTIONAL_BLOCKS = (
    ("simulation", "Cooling-failure simulation"),
    ("barrier", "Evaporative cooling as a barrier"),
    ("pressure", "Pressure in a closed vessel"),
    ("scenarios", "Deviation scenarios"),
    ("uncertainty", "Uncertainty of the verdict"),
    ("limits", "Safe operating limits"),
)

#: Barrier grades from best to worst ("not assessed": boiling is not called upon).
BARRIER_ORDER = {"not assessed": -1, "holds": 0, "doubtful": 1, "fails": 2}

_GRADE_SUFFIX = re.compile(r"^(.*?)\s*\((holds|doubtful|fails)\)\s*$", re.DOTALL)


# --------------------------------------------------------------------------------------------
# Small helpers


def verdict_word(text) -> str:
    """A verdict in capitals (``holds`` -> ``HOLDS``); ``n/a`` for None.

    Parameters
    ----------
    text : str or None
        Verdict word.
    """
    if text is None or text == "":
        return "n/a"
    return str(text).upper()


def split_grade(reason: str) -> tuple[str, str | None]:
    """``"condenser: ... (holds)"`` -> (``"condenser: ..."``, ``"holds"``); grade None if absent.

    Parameters
    ----------
    reason : str
        Reason line ending in a grade in parentheses.
    """
    match = _GRADE_SUFFIX.match(str(reason))
    if match is None:
        return str(reason), None
    return match.group(1), match.group(2)


def _reason_markup(reason: str) -> str:
    sentence, grade = split_grade(reason)
    text = prose(sentence)
    return f"{text} — <b>{grade.upper()}</b>" if grade else text


def _number(value, digits=4) -> str:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return "n/a"
    return format_significant(value, digits)


def _pair(first, second, digits=4) -> str:
    return f"{_number(first, digits)} / {_number(second, digits)}"


def _celsius(value) -> str:
    return format_celsius(value) if isinstance(value, (int, float)) else "n/a"


def format_probability(value, samples=None) -> str:
    """A probability with 3 decimals; below 0.001 in ``1.2e-04`` form, so that a small
    remaining risk is never rounded to 0.

    A fraction of exactly 0 or 1 over ``samples`` samples is shown as the one-sided 95 % bound
    of the rule of three, ``< 3/n`` or ``> 1 - 3/n`` (Hanley & Lippman-Hand, JAMA 249 (1983)
    1743), never as a bare 0: no sample in the class does not make it impossible. Without
    ``samples``, ``0`` and ``1``.

    Parameters
    ----------
    value : float or None
        Probability. [-]
    samples : int, optional
        Number of Monte Carlo samples behind it.
    """
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        return "n/a"
    value = float(value)
    count = samples if isinstance(samples, int) and not isinstance(samples, bool) \
        and samples > 0 else None
    if value == 0.0:
        return "0" if count is None else f"< {_round_bound(3.0 / count, 2, up=True):.2g}"
    if value == 1.0:
        return "1" if count is None else f"> {_round_bound(1.0 - 3.0 / count, 4, up=False):.4g}"
    if value < 1e-3:
        return f"{value:.1e}"
    if value > 0.999:
        return f"{value:.6f}".rstrip("0")
    return f"{value:.3f}"


def _round_bound(value: float, digits: int, up: bool) -> float:
    """``value`` rounded to ``digits`` significant digits away from the safe side: an upper
    bound up, a lower bound down, so that the printed bound still holds."""
    if value <= 0.0:
        return value
    scale = 10.0 ** (digits - 1 - math.floor(math.log10(value)))
    scaled = value * scale
    rounded = math.ceil(scaled - 1e-9) if up else math.floor(scaled + 1e-9)
    return rounded / scale


def _hours_after(value, horizon="24 h") -> str:
    """A time after the failure; None means the event did not happen within the horizon."""
    if value is None:
        return f"not within {horizon}"
    if not isinstance(value, (int, float)):
        return "n/a"
    if value * 60.0 < 0.5:
        return "0 (at once)"
    return format_hours(value)


def _yes_no(value) -> str:
    if value is None:
        return "n/a"
    return "YES" if value else "no"


def _head(text, right=False, styles=None):
    return paragraph(text, styles["cell_head_right" if right else "cell_head"])


def _pointer(name, styles):
    return paragraph(f"Method, references and assumptions: see <i>Methods and references</i> "
                     f"({escape(name)}).", styles["note_after"])


# --------------------------------------------------------------------------------------------
# Dispatcher


def optional_blocks(result, styles, counter):
    """Blocks of the optional analyses that the result carries, in :data:`OPTIONAL_BLOCKS`
    order, then any other member with ``summary_lines``. Never raises for a block: a block that
    cannot be laid out falls back to its summary lines or to a sentence that says so.

    Parameters
    ----------
    result : dict
        The ``results`` table of the JSON-ready result.
    styles : dict
        Paragraph and table styles of the report.
    counter : FigureCounter
        Numbers the figures of the report.
    """
    from reportlab.platypus import CondPageBreak

    story = []
    results = result.results
    curves = result.curves if isinstance(result.curves, dict) else {}
    known = dict(OPTIONAL_BLOCKS)
    names = [name for name, _ in OPTIONAL_BLOCKS]
    names += [name for name, value in results.items()
              if name not in known and isinstance(value, dict) and value.get("summary_lines")]
    renderers = {
        "simulation": lambda b: simulation_block(b, curves.get("simulation"), styles, counter),
        "barrier": lambda b: barrier_block(b, styles),
        "pressure": lambda b: pressure_block(b, styles),
        "scenarios": lambda b: scenarios_block(b, styles),
        "uncertainty": lambda b: uncertainty_block(b, curves.get("uncertainty"), results,
                                                   styles, counter),
        "limits": lambda b: limits_pdf_block(results, curves.get("limits_window"), styles,
                                             counter, [v.name for v in result.case.vessels]),
    }
    for name in names:
        block = results.get(name)
        if not block:
            continue
        title = known.get(name) or name.replace("_", " ").capitalize()
        mark = counter.mark() if hasattr(counter, "mark") else None
        try:
            body = renderers.get(name, lambda b: generic_block(b, styles))(block)
        except Exception as exc:  # an optional block never stops the report; say so in it
            if mark is not None:
                counter.reset(mark)
            body = _fallback(name, block, exc, styles)
        # A heading never stands alone at the foot of a page.
        story.append(CondPageBreak(110))
        story.append(paragraph(title, styles["h2"]))
        story.extend(body)
    return story


def _fallback(name, block, exc, styles):
    note = paragraph(f"<i>This block could not be laid out as tables "
                     f"({escape(type(exc).__name__)}); it is shown as the text of "
                     f"<font name='DejaVuSansMono'>check</font>. The --json output "
                     f"(results.{escape(name)}) holds all its figures.</i>", styles["small"])
    try:
        body = generic_block(block, styles)
    except Exception:  # noqa: BLE001 - the last resort must not fail
        body = []
    if not body:
        return [paragraph(f"This block could not be laid out ({escape(type(exc).__name__)}); "
                          f"see the --json output (results.{escape(name)}) for its figures.",
                          styles["body"])]
    return [note] + body


# --------------------------------------------------------------------------------------------
# Cooling-failure simulation


#: Rows per feed mode: (label, feed stopped key, feed continuing key, unit, formatter).
SIMULATION_MODE_ROWS = (
    ("Worst failure time (since the start of the run)", "worst_failure_time_h",
     "worst_failure_time_feed_continuing_h", "h", format_hours),
    ("MTSR, highest over the failure times", "mtsr_feed_stopped_degC",
     "mtsr_feed_continuing_degC", "°C", format_celsius),
    ("Highest temperature within 24 h of the failure", "max_temperature_feed_stopped_degC",
     "max_temperature_feed_continuing_degC", "°C", format_celsius),
    ("Time from the failure to the MTT", "time_to_mtt_h", "time_to_mtt_feed_continuing_h", "h",
     _hours_after),
    ("Time from the failure to the maximum rate", "time_to_max_rate_h",
     "time_to_max_rate_feed_continuing_h", "h", _hours_after),
    ("Decomposition triggered within 24 h", "decomposition_triggered_feed_stopped",
     "decomposition_triggered_feed_continuing", "", _yes_no),
)


def simulation_block(block, curve, styles, counter):
    """Figure of the run (temperature and MTSR(t)), key-figures table, dosing warnings.

    Parameters
    ----------
    block : dict
        ``results.simulation`` (temperatures in degC, times in h).
    curve : dict or None
        ``curves["simulation"]`` of the result, or None.
    styles : dict
        Paragraph and table styles of the report.
    counter : FigureCounter
        Numbers the figures of the report.
    """
    from reportlab.platypus import KeepTogether

    batch = block.get("mode") == "batch"
    scan = block.get("scan_points")
    mode = escape(block.get("mode") or "run")
    intro = (f"Vessel <b>{escape(block.get('vessel') or 'n/a')}</b>, {mode}. The normal run is "
             f"simulated with the cooling working; a cooling failure is then assumed at "
             f"{scan if scan is not None else 'n/a'} moments of the run "
             f"({'' if batch else 'each with the feed stopped and with the feed continuing, '}"
             f"adiabatic for 24 h after the failure), and the worst moment is refined.")
    mtsr_case = block.get("mtsr_case_degC")
    stopped = block.get("mtsr_feed_stopped_degC")
    if isinstance(mtsr_case, (int, float)) and isinstance(stopped, (int, float)):
        relation = ("higher than" if stopped > mtsr_case + 0.05 else
                    "lower than" if stopped < mtsr_case - 0.05 else "equal to")
        intro += (f" The simulated MTSR (feed stopped, {format_celsius(stopped)} °C) is "
                  f"<b>{relation}</b> the MTSR from the stated accumulation "
                  f"({format_celsius(mtsr_case)} °C).")

    rows = []
    spans = []
    numeric = []
    if batch:
        rows.append([_head("Quantity", styles=styles), _head("Value", True, styles),
                     _head("Unit", styles=styles)])
        for label, key, _, unit, formatter in SIMULATION_MODE_ROWS:
            key = "decomposition_triggered" if key.startswith("decomposition_triggered") else key
            rows.append([paragraph(label, styles["cell"]), formatter(block.get(key)), unit])
        widths = [100 * MM, 44 * MM, FRAME_WIDTH - 144 * MM]
        numeric = [1]
    else:
        rows.append([_head("Quantity", styles=styles), _head("Feed stopped", True, styles),
                     _head("Feed continuing", True, styles), _head("Unit", styles=styles)])
        for label, key_stopped, key_continuing, unit, formatter in SIMULATION_MODE_ROWS:
            rows.append([paragraph(label, styles["cell"]), formatter(block.get(key_stopped)),
                         formatter(block.get(key_continuing)), unit])
        widths = [88 * MM, 32 * MM, 32 * MM, FRAME_WIDTH - 152 * MM]
        numeric = [1, 2]

    def run_row(label, text, unit=""):
        rows.append([paragraph(label, styles["cell"]), text] + ([] if batch else [""]) + [unit])
        if not batch:
            spans.append(("SPAN", (1, len(rows) - 1), (2, len(rows) - 1)))

    accumulation = block.get("accumulation_max")
    at_time = block.get("accumulation_max_time_h")
    run_row("Maximum accumulation X<sub>ac</sub> over the run",
            f"{format_ratio(accumulation) if accumulation is not None else 'n/a'} at "
            f"{format_hours(at_time) if at_time is not None else 'n/a'} h", "–")
    if "accumulation_stated" in block:
        stated = block.get("accumulation_stated")
        text = "not given" if stated is None else format_ratio(stated)
        if block.get("accumulation_stated_lower"):
            text += " (LOWER than simulated)"
        run_row("Accumulation stated in [process]", text, "–")
    if block.get("accumulation_limit") is not None:
        run_row("Accumulation limit (dosing warning above)",
                format_ratio(block["accumulation_limit"]), "–")
    run_row("MTSR from the stated accumulation", _celsius(mtsr_case), "°C")
    run_row("MTT", _celsius(block.get("mtt_degC")), "°C")
    normal = block.get("normal_operation") or {}
    if normal:
        run_row("Normal operation: peak temperature", _celsius(normal.get("peak_temperature_degC")),
                "°C")
        end = block.get("end_time_h")
        conversion = normal.get("final_conversion")
        run_row("Normal operation: conversion at the end of the run",
                (f"{conversion:.3f}" if isinstance(conversion, (int, float)) else "n/a")
                + (f" at {format_hours(end)} h" if isinstance(end, (int, float)) else ""), "–")
        if normal.get("damkoehler_number") is not None:
            run_row("Damköhler number of the run", _number(normal["damkoehler_number"], 3), "–")
        other = ("peak_reaction_heat_kW" if batch else "dosing_heat_kW")
        run_row("Cooling capacity at T<sub>p</sub> / " + ("peak reaction heat" if batch else
                                                          "dosing-controlled heat release"),
                _pair(normal.get("cooling_capacity_kW"), normal.get(other)), "kW")
    # The intro comes first, then the figure of the run, then the table of figures.
    story = [paragraph(intro, styles["block_intro"])]
    story.extend(simulation_figure(curve, styles, counter))
    story.append(KeepTogether([
        table(rows, widths, align_right_columns=numeric, extra_commands=spans, padding=1.5),
    ]))

    warnings = block.get("dosing_warnings")
    if isinstance(warnings, list):
        story.append(paragraph("Dosing warnings", styles["h3"]))
        if not warnings:
            story.append(paragraph("None: the accumulation stays below its limit, the cooling "
                                   "can take the dosing-controlled heat release and the reaction "
                                   "keeps pace with the feed.", styles["small"]))
        for item in warnings:
            if isinstance(item, dict):
                code = escape(str(item.get("code", "")).replace("_", " "))
                text = prose(item.get("message", ""))
                story.append(bullet(f"<b>{code}:</b> {text}", styles["bullet"], "–"))
            else:
                story.append(bullet(prose(item), styles["bullet"], "–"))
    story.append(_pointer("simulation", styles))
    return story


def simulation_figure(curve, styles, counter):
    """Normal-operation temperature and MTSR(t) over the run, when the simulation gives them.

    Parameters
    ----------
    curve : dict or None
        ``curves["simulation"]`` of the result, or None.
    styles : dict
        Paragraph and table styles of the report.
    counter : FigureCounter
        Numbers the figures of the report.
    """
    data = figure_data.simulation_from_curve(curve)
    if data is None:
        return []
    drawing = figures.draw(data)
    return [figure_block(
        drawing, next(counter), "Temperature and MTSR over the run.",
        "Simulated temperature of the mass in normal operation (solid) and the MTSR reached if "
        "the cooling failed at that moment with the feed stopped (dashed). Read the worst moment "
        "for a failure (the highest point of the dashed line, marked) and its distance from the "
        "MTT.", styles)]


# --------------------------------------------------------------------------------------------
# Evaporative-cooling barrier


def barrier_verdict_lines(block) -> list[str]:
    """Page-1 lines (markup), one per vessel: the barrier verdict and its governing reason.

    Empty when the barrier was not assessed or the block is not a dict.

    Parameters
    ----------
    block : dict or None
        ``results.barrier`` of the JSON-ready result.
    """
    if not isinstance(block, dict) or not block.get("assessed"):
        return []
    vessels = block.get("vessels") or []
    if not isinstance(vessels, list):
        return [f"<b>Overall: {verdict_word(block.get('verdict'))}</b> — the figures per vessel "
                f"are not available; see the barrier block"]
    vessels = [v for v in vessels if isinstance(v, dict)]
    if not vessels:
        return [f"<b>No vessel: {verdict_word(block.get('verdict') or 'fails')}</b> — the "
                f"condenser and the vapour line cannot be checked"]
    lines = []
    for vessel in vessels:
        reasons = [r for r in vessel.get("reasons") or [] if isinstance(r, str)]
        text = f"<b>{escape(vessel.get('name', ''))}: " \
               f"{verdict_word(vessel.get('barrier_verdict'))}</b>"
        if reasons:
            sentence, grade = split_grade(reasons[0])
            # The page-1 line names the governing finding; what to add stays in the block.
            short = sentence.split(": give ")[0]
            text += f" — {prose(short)}"
            others = sum(1 for r in reasons[1:] if split_grade(r)[1] not in ("holds", None))
            if others:
                text += f" (+{others})"
        lines.append(text)
    return lines


def barrier_block(block, styles):
    """Table per vessel (heat, vapour, condenser, vapour line, solvent, verdict) and reasons.

    Parameters
    ----------
    block : dict
        ``results.barrier`` of the JSON-ready result.
    styles : dict
        Paragraph and table styles of the report.
    """
    from reportlab.platypus import KeepTogether

    if not block.get("assessed"):
        reason = str(block.get("reason") or "not assessed")
        reason = re.sub(r"^not assessed:\s*", "", reason)
        return [paragraph(f"<b>Not assessed.</b> {prose(reason[:1].upper() + reason[1:])}.",
                          styles["body"])]
    story = []
    intro = [f"<b>Called upon because</b> {prose(block.get('reason') or 'n/a')}."]
    if block.get("solvent"):
        latent = block.get("latent_heat_kJ_per_kg")
        intro.append(
            f"Solvent {escape(block['solvent'])} boiling at "
            f"{_number(block.get('boiling_pressure_bar'))} bar(a), the MTT "
            f"{_celsius(block.get('mtt_degC'))} °C; latent heat {_number(latent)} kJ/kg "
            f"({prose(block.get('latent_heat_source') or 'source not given')}).")
    if block.get("mtsr_basis") not in (None, "case"):
        intro.append(f"MTSR {_celsius(block.get('mtsr_degC'))} °C: "
                     f"{prose(block.get('mtsr_basis_text') or 'from the simulation')}.")
    intro.append(f"Overall (worst vessel): <b>{verdict_word(block.get('verdict'))}</b>.")
    intro_paragraph = paragraph(" ".join(intro), styles["block_intro"])
    raw = block.get("vessels")
    if raw is not None and not isinstance(raw, list):
        raise TypeError("results.barrier.vessels is not a list")  # the fallback shows the text
    vessels = [v for v in raw or [] if isinstance(v, dict)]
    if not vessels:
        return [intro_paragraph,
                paragraph("The case has no [vessel]: the condenser and the vapour line cannot be "
                          "checked, so the barrier counts as <b>FAILS</b>.", styles["body"])]
    if all(v.get("status") == "not assessed" for v in vessels):
        # Nothing was computed for any vessel (no [solvent]): one sentence, no empty table.
        reasons = [r for v in vessels for r in v.get("reasons") or [] if isinstance(r, str)]
        why = split_grade(reasons[0])[0] if reasons else "an input is missing"
        story.append(intro_paragraph)
        story.append(paragraph(
            f"<b>Not assessable:</b> {prose(why)}. The barrier counts as <b>FAILS</b> in every "
            f"vessel (" + ", ".join(escape(v.get("name", "")) for v in vessels) + ").",
            styles["body"]))
        story.append(_pointer("barrier", styles))
        return story

    rows = [[_head("Vessel", styles=styles),
             _head("Heat at<br/>MTT, kW", True, styles),
             _head("Vapour<br/>kg/h", True, styles),
             _head("Condenser kW<br/>need / capacity", True, styles),
             _head("Vapour line m/s<br/>velocity / limit", True, styles),
             _head("Solvent kg<br/>evap. / present", True, styles),
             _head("Verdict", styles=styles)]]
    for vessel in vessels:
        needed = vessel.get("condenser_duty_needed_kW")
        rows.append([
            paragraph(escape(vessel.get("name", "")), styles["cell"]),
            _number(vessel.get("heat_release_rate_at_mtt_kW")),
            _number(vessel.get("vapour_mass_flow_kg_per_h")),
            _pair(needed, vessel.get("condenser_capacity_kW")),
            _pair(vessel.get("vapour_line_velocity_m_per_s"),
                  vessel.get("flooding_velocity_m_per_s"), 3),
            _pair(vessel.get("solvent_evaporated_kg"), vessel.get("solvent_present_kg")),
            paragraph(f"<b>{verdict_word(vessel.get('barrier_verdict'))}</b>", styles["cell"]),
        ])
    widths = [16 * MM, 15 * MM, 26 * MM, 27 * MM, 27 * MM, 17 * MM]
    widths.insert(0, FRAME_WIDTH - sum(widths))
    story.append(KeepTogether([
        intro_paragraph,
        table(rows, widths, align_right_columns=(1, 2, 3, 4, 5), padding=1.5),
        paragraph("Heat: release rate at the MTT. Need: condenser duty needed. Limit: flooding "
                  "velocity of the vapour line. Evap.: solvent evaporated until the accumulated "
                  "heat is spent. n/a: not computed because an input is missing (the reasons "
                  "below say which); a missing input never gives HOLDS. A figure within 20 % of "
                  "its limit counts as DOUBTFUL.",
                  styles["note_after"]),
    ]))
    for number, vessel in enumerate(vessels):
        items = [bullet(f"<b>{escape(vessel.get('name', ''))}: "
                        f"{verdict_word(vessel.get('barrier_verdict'))}</b>", styles["bullet"],
                        "–")]
        for reason in vessel.get("reasons") or []:
            items.append(bullet(_reason_markup(reason), styles["bullet_sub"], "•"))
        basis = vessel.get("heat_release_rate_basis")
        if basis and vessel.get("heat_release_rate_at_mtt_kW") is not None:
            items.append(bullet(f"heat release rate at the MTT: {prose(basis)}",
                                styles["bullet_sub"], "•"))
        if vessel.get("boils_dry"):
            items.append(bullet(f"<b>boils dry</b>: the rest of the heat takes the mass to "
                                f"{_celsius(vessel.get('final_temperature_degC'))} °C",
                                styles["bullet_sub"], "•"))
        dry_out = vessel.get("decomposition_dry_out_time_h")
        if isinstance(dry_out, (int, float)):
            items.append(bullet(f"held at the MTT, the decomposition alone would boil the rest "
                                f"of the solvent away in {format_hours(dry_out)} h",
                                styles["bullet_sub"], "•"))
        if number == 0:  # the heading stays with the first vessel's list
            items.insert(0, paragraph("Reasons per vessel", styles["h3"]))
        story.append(KeepTogether(items))
    story.append(_pointer("barrier", styles))
    return story


# --------------------------------------------------------------------------------------------
# Closed-vessel pressure


PRESSURE_VERDICTS = {"no set pressure": "NO SET PRESSURE", "not assessed": "NOT ASSESSED"}


def pressure_block(block, styles):
    """Vapour pressures at the key temperatures and the closed-vessel pressure per vessel.

    Parameters
    ----------
    block : dict
        ``results.pressure`` of the JSON-ready result.
    styles : dict
        Paragraph and table styles of the report.
    """
    from reportlab.platypus import KeepTogether, Spacer

    story = []
    name = block.get("solvent")
    cas = f" (CAS {escape(block['cas'])})" if block.get("cas") else ""
    parts = [f"Solvent <b>{escape(name) if name else 'not named'}</b>{cas}, operating pressure "
             f"{_number(block.get('operating_pressure_bar'))} bar(a) "
             f"({escape(block.get('operating_pressure_basis') or 'basis not given')})"]
    if isinstance(block.get("boiling_temperature_degC"), (int, float)):
        parts[0] += f": boiling point {format_celsius(block['boiling_temperature_degC'])} °C"
    parts[0] += "."
    parts.append(f"Closed-vessel pressure at the final temperature "
                 f"{_celsius(block.get('final_temperature_degC'))} °C "
                 f"({escape(block.get('final_temperature_basis') or 'basis not given')}).")
    gas = block.get("gas_yield_mol_per_kg")
    parts.append("Decomposition gas yield " + (f"{_number(gas)} mol/kg." if gas is not None else
                                               "<b>not given</b>: the gas is not counted, the "
                                               "pressure is a lower bound."))
    story.append(paragraph(" ".join(parts), styles["block_intro"]))

    points = [p for p in block.get("vapour_pressures") or [] if isinstance(p, dict)]
    if points:
        rows = [[_head("Vapour pressure of the solvent at", styles=styles),
                 _head("Temperature<br/>°C", True, styles),
                 _head("p<sub>sat</sub><br/>bar", True, styles),
                 _head("Note", styles=styles)]]
        for point in points:
            status = point.get("range")
            note = {"above range": "<b>LOWER bound</b>: ", "below range": "upper bound: "}.get(
                status, "")
            if point.get("note"):
                note += prose(point["note"].replace("LOWER bound", "lower bound")
                              if status == "above range" else point["note"])
            rows.append([paragraph(escape(point.get("point", "")), styles["cell"]),
                         _celsius(point.get("temperature_degC")),
                         _number(point.get("vapour_pressure_bar"), 3),
                         paragraph(note or "in the range of the correlation", styles["cell"])])
        widths = [52 * MM, 22 * MM, 18 * MM]
        widths.append(FRAME_WIDTH - sum(widths))
        story.append(table(rows, widths, align_right_columns=(1, 2), padding=1.5))
        story.append(Spacer(1, 8))

    vessels = [v for v in block.get("vessels") or [] if isinstance(v, dict)]
    if not vessels:
        story.append(paragraph("Closed-vessel pressure: no vessel with a headspace is given.",
                               styles["body"]))
    else:
        rows = [[_head("Closed vessel", styles=styles),
                 _head("Headspace<br/>m³", True, styles),
                 _head("Vapour<br/>bar", True, styles),
                 _head("Pad gas<br/>bar", True, styles),
                 _head("Decomp.<br/>gas, bar", True, styles),
                 _head("Total<br/>bar(a)", True, styles),
                 _head("Relief set<br/>bar(a)", True, styles),
                 _head("Verdict", styles=styles)]]
        for vessel in vessels:
            total = _number(vessel.get("total_bar"), 4)
            if vessel.get("is_lower_bound") and total != "n/a":
                total = "≥ " + total
            verdict = vessel.get("verdict")
            rows.append([
                paragraph(escape(vessel.get("vessel", "")), styles["cell"]),
                _number(vessel.get("headspace_m3"), 3),
                _number(vessel.get("vapour_bar"), 3),
                _number(vessel.get("pad_gas_bar"), 3),
                _number(vessel.get("decomposition_gas_bar"), 3),
                total,
                _number(vessel.get("relief_set_pressure_bar"), 4)
                if vessel.get("relief_set_pressure_bar") is not None else "not given",
                paragraph(f"<b>{PRESSURE_VERDICTS.get(verdict, verdict_word(verdict))}</b>",
                          styles["cell"]),
            ])
        widths = [35 * MM, 19 * MM, 15 * MM, 15 * MM, 16 * MM, 19 * MM, 17 * MM]
        widths.append(FRAME_WIDTH - sum(widths))
        story.append(KeepTogether([
            table(rows, widths, align_right_columns=range(1, 7), padding=1.5),
            paragraph("Total = vapour + pad gas (closed at T<sub>p</sub>, heated with the mass) + "
                      "decomposition gas, ideal gases in a constant headspace, no relief and no "
                      "leak; ≥ marks a lower bound.", styles["note_after"]),
        ]))
        items = []
        for vessel in vessels:
            basis = vessel.get("headspace_basis")
            text = (f"<b>{escape(vessel.get('vessel', ''))}:</b> "
                    f"{prose(vessel.get('reason') or 'n/a')}")
            if basis:
                text += f"; headspace: {escape(basis)}"
            items.append(bullet(text + ".", styles["bullet"], "–"))
        story.extend(items)
    story.append(_pointer("pressure", styles))
    return story


# --------------------------------------------------------------------------------------------
# Deviation scenarios


def scenario_cells(row) -> list[str]:
    """The printed cells of one scenario row (as plain text, in table order).

    Name, MTSR [°C], change [K], TMRad at MTSR [h], TMRad ratio, class, class change, barrier
    verdict, barrier change. Used by the table and by the tests.

    Parameters
    ----------
    row : dict
        One scenario of ``results.scenarios``.
    """
    base = row.get("key") == "base"
    klass = row.get("criticality_class")
    class_text = "n/c" if klass is None else str(klass)
    change = row.get("class_change")
    if base:
        class_change = "–"
    elif change is None:
        class_change = "n/c"
    else:
        class_change = f"{change:+d}" if change else "0"
    ratio = row.get("tmrad_ratio")
    barrier_change = row.get("barrier_change")
    if base or barrier_change in (None, "unchanged"):
        barrier_change_text = "–" if base else "unchanged"
    else:
        before, _, after = str(barrier_change).partition(" to ")
        barrier_change_text = f"{verdict_word(before)} → {verdict_word(after)}"
    mtsr_change = row.get("mtsr_change_K")
    return [
        str(row.get("name", "")),
        _celsius(row.get("mtsr_degC")),
        "–" if base else (format_kelvin(mtsr_change, signed=True)
                          if isinstance(mtsr_change, (int, float)) else "n/a"),
        format_hours(row["tmrad_at_mtsr_h"]) if isinstance(row.get("tmrad_at_mtsr_h"),
                                                           (int, float)) else "n/a",
        "–" if base else (f"×{format_significant(ratio, 3)}" if isinstance(ratio, (int, float))
                          else "n/a"),
        class_text,
        class_change,
        verdict_word(row.get("barrier_verdict")),
        barrier_change_text,
    ]


def _scenario_is_worse(row, base) -> bool:
    if row.get("error"):
        return True
    change = row.get("class_change")
    if isinstance(change, int) and change > 0:
        return True
    if row.get("criticality_class") is None and base.get("criticality_class") is not None:
        return True
    now = BARRIER_ORDER.get(row.get("barrier_verdict"), 2)
    before = BARRIER_ORDER.get(base.get("barrier_verdict"), 2)
    return now > before and row.get("barrier_verdict") != "holds"


def scenario_footnote(rows) -> str:
    """The note under the scenario table: it explains only the words the table shows, so that
    it never contradicts a row (NOT ASSESSED is explained only where a row says it).

    Parameters
    ----------
    rows : list of dict
        ``results.scenarios.rows``.
    """
    text = ("Ratio: TMRad at MTSR over the base value. Barrier: verdict of evaporative cooling "
            "at the MTT in that scenario.")
    words = {str(r.get("barrier_verdict")) for r in rows if isinstance(r, dict)}
    classes = [r.get("criticality_class") for r in rows if isinstance(r, dict)
               and not r.get("error")]
    if any(c is None for c in classes):
        text += " n/c: the class cannot be concluded without decomposition kinetics."
    if "not assessed" in words:
        text += (" NOT ASSESSED: in that scenario MTSR stays below the MTT, so boiling is not "
                 "called upon.")
    if "not demonstrated" in words:
        text += " NOT DEMONSTRATED: no criterion fails, but data are missing."
    return text


def scenarios_block(block, styles):
    """Base case against each deviation: MTSR, TMRad at MTSR, class, barrier, and the changes.

    Parameters
    ----------
    block : dict
        ``results.scenarios`` of the JSON-ready result.
    styles : dict
        Paragraph and table styles of the report.
    """
    from reportlab.platypus import KeepTogether

    if block.get("run") is False:
        reason = block.get("reason") or "not run"
        return [paragraph(f"<b>Not run.</b> {prose(reason[:1].upper() + reason[1:])}.",
                          styles["body"])]
    rows_in = [r for r in block.get("rows") or [] if isinstance(r, dict)]
    if not rows_in:
        return [paragraph("No deviation scenario was selected.", styles["body"])]
    base = next((r for r in rows_in if r.get("key") == "base"), rows_in[0])
    heads = [("Scenario", False), ("MTSR<br/>°C", True), ("Change<br/>K", True),
             ("TMRad at<br/>MTSR, h", True), ("TMRad<br/>ratio", True), ("Class", True),
             ("Class<br/>change", True), ("Barrier", False), ("Barrier change", False)]
    rows = [[_head(text, right, styles) for text, right in heads]]
    bold, spans = [], []
    for row in rows_in:
        if row.get("error"):
            rows.append([str(row.get("name", "")), "SCREENING FAILED: consequence unknown "
                         "(see below)"] + [""] * 7)
            spans.append(("SPAN", (1, len(rows) - 1), (-1, len(rows) - 1)))
            spans.append(("ALIGN", (1, len(rows) - 1), (1, len(rows) - 1), "LEFT"))
            bold.append(len(rows) - 1)
            continue
        rows.append(scenario_cells(row))
        if row is not base and _scenario_is_worse(row, base):
            bold.append(len(rows) - 1)
    widths = [28 * MM, 15 * MM, 15 * MM, 18 * MM, 16 * MM, 11 * MM, 14 * MM, 25 * MM]
    widths.append(FRAME_WIDTH - sum(widths))
    worst = block.get("worst_scenario")
    summary = ("Each deviation is screened in full from a variant of the case; changes are "
               "against the base case. Rows in <b>bold</b> are worse than the base case (higher "
               "class, a barrier that no longer holds, or a failed screening).")
    if worst:
        worst_class = block.get("worst_class")
        summary += (f" Worst deviation: <b>{escape(worst)}</b> (class "
                    f"{'n/c' if worst_class is None else worst_class}).")
    story = [KeepTogether([
        paragraph(summary, styles["block_intro"]),
        table(rows, widths, align_right_columns=range(1, 7), bold_rows=bold, padding=1.5,
              extra_commands=spans),
        paragraph(scenario_footnote(rows_in), styles["note_after"]),
    ])]
    notes = [paragraph("How each deviation was derived", styles["h3"])]
    for row in rows_in:
        if row is base:
            continue
        name = escape(row.get("name", ""))
        if row.get("error"):
            text = (f"<b>{name}: SCREENING FAILED</b>, consequence unknown: "
                    f"{prose(row['error'])}")
        else:
            text = f"<b>{name}:</b> {prose(row.get('basis') or 'n/a')}"
            if row.get("mtsr_basis") not in (None, "case"):
                from screen.runs.scenarios import MTSR_BASIS_WORDS

                words = MTSR_BASIS_WORDS.get(row["mtsr_basis"], row["mtsr_basis"])
                text += f" (MTSR: {prose(words)})"
        notes.append(bullet(text, styles["bullet_small"], "–"))
    # The heading stays with the first note; the rest may flow on.
    story.append(KeepTogether(notes[:2]))
    story.extend(notes[2:])
    story.append(_pointer("scenarios", styles))
    return story


# --------------------------------------------------------------------------------------------
# Uncertainty of the verdict


#: Percentile rows: (label, block key, nominal results key, unit, formatter).
UNCERTAINTY_ROWS = (
    ("MTSR", "mtsr_degC", "mtsr_degC", "°C", format_celsius),
    ("T<sub>D24</sub>", "td24_degC", "td24_degC", "°C", format_celsius),
    ("TMRad at MTSR", "tmrad_at_mtsr_h", "tmrad_at_mtsr_h", "h", format_hours),
    ("Onset margin T<sub>D24</sub> − MTSR", "onset_margin_K", "onset_margin_K", "K",
     lambda v: format_kelvin(v, signed=True)),
)


def _percentile(spread, key, formatter):
    if not isinstance(spread, dict):
        return "n/a"
    value = spread.get(key)
    if value is None:
        # Undefined samples rank as the most critical end (see the uncertainty module).
        return "undefined" if key in spread else "n/a"
    return formatter(value)


def uncertainty_block(block, curve, results, styles, counter):
    """Percentiles, class probabilities, the uncertain inputs and the sensitivity bar chart.

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of the JSON-ready result.
    curve : dict or None
        ``curves["uncertainty"]``, or None.
    results : dict
        The ``results`` table (nominal figures).
    styles : dict
        Paragraph and table styles of the report.
    counter : FigureCounter
        Numbers the figures of the report.
    """
    from reportlab.platypus import KeepTogether

    story = []
    samples, seed = block.get("samples"), block.get("seed")
    intro = (f"Monte Carlo propagation with <b>{escape(samples if samples is not None else 'n/a')}"
             f"</b> samples, seed <b>{escape(seed if seed is not None else 'n/a')}</b> (the same "
             f"seed gives the same numbers). Each uncertain input varies as written in the case, "
             f"the others are held at their case values.")
    if block.get("confidence"):
        intro += f" <b>Confidence:</b> {prose(block['confidence'])}"
    story.append(paragraph(intro, styles["block_intro"]))

    rows = [[_head("Figure", styles=styles), _head("Nominal", True, styles),
             _head("p5", True, styles), _head("p50", True, styles), _head("p95", True, styles),
             _head("Unit", styles=styles)]]
    for label, key, nominal_key, unit, formatter in UNCERTAINTY_ROWS:
        spread = block.get(key)
        if not isinstance(spread, dict):
            continue
        nominal = results.get(nominal_key) if isinstance(results, dict) else None
        rows.append([paragraph(label, styles["cell"]),
                     formatter(nominal) if isinstance(nominal, (int, float)) else "n/a",
                     _percentile(spread, "p5", formatter), _percentile(spread, "p50", formatter),
                     _percentile(spread, "p95", formatter), unit])
    for vessel in block.get("vessels") or []:
        if not isinstance(vessel, dict):
            continue
        spread = vessel.get("critical_coolant_temperature_degC")
        if isinstance(spread, dict):
            nominal = None
            for entry in (results.get("vessels") or []) if isinstance(results, dict) else []:
                if entry.get("name") == vessel.get("name"):
                    nominal = entry.get("critical_coolant_temperature_degC")
            rows.append([paragraph(f"Critical coolant temperature, "
                                   f"{escape(vessel.get('name', ''))}", styles["cell"]),
                         _celsius(nominal), _percentile(spread, "p5", format_celsius),
                         _percentile(spread, "p50", format_celsius),
                         _percentile(spread, "p95", format_celsius), "°C"])
    parts = []
    if len(rows) > 1:
        widths = [74 * MM, 20 * MM, 20 * MM, 20 * MM, 20 * MM]
        widths.append(FRAME_WIDTH - sum(widths))
        parts.append(paragraph("Percentiles", styles["h3"]))
        parts.append(table(rows, widths, align_right_columns=(1, 2, 3, 4), padding=1.5))
        parts.append(paragraph("p5, p50, p95: 5th, 50th and 95th percentile over the samples; "
                               "undefined: more than that share of the samples has no value "
                               "(counted as the critical end).", styles["note_after"]))
    story.append(KeepTogether(parts))

    probabilities = block.get("class_probabilities")
    if isinstance(probabilities, dict) and probabilities:
        # Keys as strings ("1".."5", the JSON form) whatever the producer used.
        probabilities = {str(k): v for k, v in probabilities.items()}
        nominal_class = block.get("nominal_class")
        classes = [str(k) for k in range(1, 6)]
        header = [_head("Criticality class", styles=styles)] + [
            _head(k, True, styles) for k in classes]
        values = ["Probability"] + [format_probability(probabilities.get(k, 0.0), samples)
                                    for k in classes]
        commands = []
        if nominal_class is not None and str(nominal_class) in classes:
            column = classes.index(str(nominal_class)) + 1
            commands.append(("FONT", (column, 1), (column, 1), FONT_BOLD, 8))
        widths = [FRAME_WIDTH - 5 * 24 * MM] + [24 * MM] * 5
        extra = []
        for label, key in (("P(class ≥ 4)", "probability_class_4_or_5"),
                           ("P(MTSR ≥ T<sub>D24</sub>)", "probability_mtsr_at_or_above_td24"),
                           ("P(MTSR ≥ MTT)", "probability_mtsr_at_or_above_mtt")):
            if isinstance(block.get(key), (int, float)):
                shown = format_probability(block[key], samples)
                joiner = " " if shown[:1] in "<>" else " = "
                extra.append(f"{label}{joiner}<b>{escape(shown)}</b>")
        error = block.get("probability_standard_error_max")
        note = "; ".join(extra)
        if isinstance(error, (int, float)):
            note += (("; " if note else "") + f"standard error of a probability at most "
                     f"{format_significant(error, 2)}")
        if nominal_class is not None:
            note += (". " if note else "") + f"The nominal class ({escape(nominal_class)}) is " \
                                             f"in bold"
        shown_values = values[1:] + extra
        if any("&lt;" in text or "&gt;" in text or text[:1] in "<>" for text in shown_values):
            note += (". " if note else "") + ("&lt; or &gt;: no sample, or every sample, fell "
                                              "there; the one-sided 95 % bound (rule of three) "
                                              "is shown instead of 0 or 1")
        note += "."
        story.append(KeepTogether([
            paragraph("Probability of each criticality class", styles["h3"]),
            table([header, values], widths, align_right_columns=range(1, 6), padding=1.5,
                  extra_commands=commands),
            paragraph(note, styles["note_after"]),
        ]))

    inputs = [item for item in block.get("inputs") or [] if isinstance(item, dict)]
    if inputs:
        rows = [[_head("Uncertain input", styles=styles), _head("As written", styles=styles),
                 _head("Distribution", styles=styles)]]
        for item in inputs:
            rows.append([paragraph(escape(item.get("key", "")), styles["cell_mono"]),
                         paragraph(escape(item.get("as_written") or ""), styles["cell"]),
                         paragraph(prose(item.get("distribution") or "n/a"), styles["cell"])])
        widths = [62 * MM, 46 * MM]
        widths.append(FRAME_WIDTH - sum(widths))
        story.append(KeepTogether([paragraph("Uncertain inputs", styles["h3"]),
                                   table(rows, widths, padding=1.5)]))
    if block.get("not_propagated"):
        story.append(paragraph("Given with an uncertainty but not propagated (they do not enter "
                               "the figures of the Monte Carlo): "
                               + ", ".join(escape(k) for k in block["not_propagated"]) + ".",
                               styles["small"]))
    story.extend(sensitivity_figure(curve, styles, counter))
    story.append(_pointer("uncertainty", styles))
    return story


def sensitivity_figure(curve, styles, counter):
    """Bar chart of the sensitivity ranking from ``curves["uncertainty"]``: ``names`` with
    ``values`` (and optionally ``values_tmrad``), or ``{"sensitivity": {input: value}}``.

    Parameters
    ----------
    curve : dict or None
        ``curves["uncertainty"]``, or None.
    styles : dict
        Paragraph and table styles of the report.
    counter : FigureCounter
        Numbers the figures of the report.
    """
    data = figure_data.sensitivity_from_curve(curve)
    if data is None:
        return []
    second = data.notes["two_measures"]
    drawing = figures.draw(data)
    if second:
        caption = ("Spearman rank correlation of each uncertain input with the onset margin "
                   "T<sub>D24</sub> − MTSR (grey bars) and with TMRad at MTSR (hatched bars), "
                   "largest on top. A bar to the left means that a larger value of the input "
                   "lowers the figure, toward the critical side. Improve the data of the top "
                   "inputs first.")
    else:
        caption = ("Which uncertain input moves the result most (bar length, largest on top); "
                   "a bar to the left acts in the opposite direction. Improve the data of the top "
                   "inputs first.")
    return [figure_block(drawing, next(counter), "Sensitivity ranking of the inputs.", caption,
                         styles)]


# --------------------------------------------------------------------------------------------
# Fallback for unknown members


def generic_block(block, styles):
    """A result member without a dedicated layout: its summary lines (as printed by ``check``)
    and its method or reason; all scalar figures only when it has no summary lines.

    Parameters
    ----------
    block : dict
        A member of ``results`` without a dedicated layout.
    styles : dict
        Paragraph and table styles of the report.
    """
    from reportlab.platypus import XPreformatted

    story = []
    if isinstance(block, dict):
        summary = block.get("summary_lines") or []
        if summary:
            text = "\n".join(escape(str(line)).replace(" degC", " °C") for line in summary)
            story.append(XPreformatted(text, styles["mono_block"]))
        for key in ("method", "methods", "reason"):
            if isinstance(block.get(key), str) and block[key]:
                story.append(paragraph(f"<b>{escape(key.capitalize())}:</b> "
                                       f"{prose(block[key])}", styles["small"]))
        if not summary:
            scalars = [(key, value) for key, value in block.items()
                       if key not in ("method", "methods", "reason")
                       and not isinstance(value, (dict, list, tuple))]
            if scalars:
                rows = [["Figure (as in --json)", "Value"]] + [
                    [paragraph(escape(k), styles["cell"]),
                     paragraph(escape(format_generic(v)), styles["cell"])] for k, v in scalars]
                story.append(table(rows, [80 * MM, FRAME_WIDTH - 80 * MM]))
    elif isinstance(block, (list, tuple)):
        for item in block:
            story.append(bullet(escape(format_generic(item)), styles["bullet"], "–"))
    return story
