"""Layout of the PDF screening summary (reportlab platypus). Reads a ScreeningResult only.

Structure (see ``docs/report.md``):

1. Summary page: title, revision and dates; the caution block; the verdict in words; the key
   figures; the warnings.
2. Figures: the criticality temperature scale, TMRad against start temperature, the temperature
   course after a cooling failure, the Semenov diagram per vessel and the vessel (scale-up)
   table; the feature blocks (simulation, barrier, pressure, scenarios, uncertainty; laid out
   in :mod:`screen.report.blocks`) when the result carries them.
3. Inputs and methods: every input as read, the --set overrides, methods and references,
   assumptions and limits, data-quality notes.
4. Traceability: tool, case file and SHA-256, dates; the changes since an earlier result.

Every page carries a header with the short caution and a footer with the case title and
"page x of y". reportlab and matplotlib are imported inside the functions.
"""

from __future__ import annotations

import os

from screen.constants import ZERO_CELSIUS
from screen.report import blocks, figure_data, figures
from screen.report.layout import FigureCounter
from screen.report.layout import bullet as _bullet
from screen.report.layout import figure_block as _figure_block
from screen.report.layout import paragraph as _p
from screen.report.layout import table as _table
from screen.report.style import (
    ACCENT,
    FONT,
    FONT_BOLD,
    FRAME_WIDTH,
    GREY_DARK,
    GREY_LIGHT,
    GREY_PALE,
    INK,
    MARGIN_BOTTOM,
    MARGIN_SIDE,
    MARGIN_TOP,
    MM,
    PAGE_HEIGHT,
    PAGE_WIDTH,
    escape,
    format_celsius,
    format_energy,
    format_generic,
    format_hours,
    format_kelvin,
    format_ratio,
    format_significant,
    paragraph_styles,
    prose,
    register_fonts,
)

REPORT_TITLE = "Thermal runaway screening summary"

#: Key figures of page 1: (label, symbol markup, results key, unit, formatter, note kind).
#: The labels are unique and printed verbatim; tests read the value that follows each label.
KEY_FIGURES = (
    ("Process temperature", "T<sub>p</sub>", "process_temperature_degC", "°C", format_celsius,
     None),
    ("Maximum temperature of the synthesis reaction", "MTSR", "mtsr_degC", "°C", format_celsius,
     "above_tp"),
    ("Maximum technical temperature", "MTT", "mtt_degC", "°C", format_celsius, "above_tp"),
    ("Temperature at which TMRad is 24 h", "T<sub>D24</sub>", "td24_degC", "°C", format_celsius,
     "above_tp"),
    ("Temperature at which TMRad is 8 h", "T<sub>D8</sub>", "td8_degC", "°C", format_celsius,
     "above_tp"),
    ("Final temperature after the runaway", "T<sub>f</sub>", "final_temperature_degC", "°C",
     format_celsius, "above_tp"),
    ("Adiabatic rise of the synthesis", "ΔT<sub>ad,syn</sub>", "synthesis_adiabatic_rise_K", "K",
     format_kelvin, None),
    ("Adiabatic rise of the decomposition", "ΔT<sub>ad,dec</sub>",
     "decomposition_adiabatic_rise_K", "K", format_kelvin, None),
    ("Adiabatic rise of the runaway", "T<sub>f</sub> − T<sub>p</sub>", "runaway_adiabatic_rise_K",
     "K", format_kelvin, None),
    ("Onset margin", "T<sub>D24</sub> − MTSR", "onset_margin_K", "K",
     lambda v: format_kelvin(v, signed=True), "margin"),
    ("TMRad at the process temperature", "TMR<sub>ad</sub>(T<sub>p</sub>)",
     "tmrad_at_process_temperature_h", "h", format_hours, None),
    ("TMRad at MTSR", "TMR<sub>ad</sub>(MTSR)", "tmrad_at_mtsr_h", "h", format_hours, None),
    ("TMRad at MTSR, zero-order estimate", "Townsend–Tou", "tmrad_at_mtsr_zero_order_h", "h",
     format_hours, "zero_order"),
    ("Heat of the synthesis", "Q'<sub>syn</sub>", "synthesis_energy_kJ_per_kg", "kJ/kg",
     format_energy, None),
    ("Heat of the decomposition", "Q'<sub>dec</sub>", "decomposition_energy_kJ_per_kg", "kJ/kg",
     format_energy, None),
    ("Thermal accumulation", "X<sub>ac</sub>", "accumulation", "–", format_ratio, None),
    ("DSC onset (information only)", "T<sub>onset</sub>", "dsc_onset_degC", "°C",
     format_celsius, "onset"),
)

#: Scale-up table rows: (label, vessel results key, unit, formatter).
VESSEL_ROWS = (
    ("Batch mass", "batch_mass_kg", "kg", lambda v: format_significant(v, 4)),
    ("Fill volume", "fill_volume_m3", "m³", format_significant),
    ("Fill fraction", "fill_fraction", "–", format_ratio),
    ("Heat-transfer area", "heat_transfer_area_m2", "m²", format_significant),
    ("Area per fill volume", "area_to_volume_per_m", "1/m", format_significant),
    ("U", "heat_transfer_coefficient_W_per_m2K", "W/(m² K)", format_significant),
    ("U A", "ua_W_per_K", "W/K", lambda v: format_significant(v, 4)),
    ("Coolant temperature T<sub>c</sub>", "coolant_temperature_degC", "°C", format_celsius),
    ("Cooling at T<sub>p</sub> per kg", "specific_cooling_capacity_W_per_kg", "W/kg",
     format_significant),
    ("Time constant m c'<sub>p</sub>/(U A)", "time_constant_h", "h", format_hours),
    ("Critical coolant temperature", "critical_coolant_temperature_degC", "°C", format_celsius),
    ("Coolant margin T<sub>c,crit</sub> − T<sub>c</sub>", "coolant_margin_K", "K",
     lambda v: format_kelvin(v, signed=True)),
    ("Tangency temperature", "tangency_temperature_degC", "°C", format_celsius),
    ("Temperature of no return T<sub>NR</sub>", "no_return_temperature_degC", "°C",
     format_celsius),
    ("TMRad at T<sub>NR</sub>", "tmrad_at_no_return_h", "h", format_hours),
    ("Semenov number ψ (critical 1/e)", "semenov_number", "–", format_significant),
    ("Synthesis: cooling / peak heat release", "synthesis_cooling_ratio", "–", format_ratio),
    ("Synthesis stability", "synthesis_stability", "", format_generic),
    ("Decomposition stability", "stability", "", format_generic),
)


# --------------------------------------------------------------------------------------------
# Page furniture


def _canvas_class(header_text: str, footer_left: str):
    """A canvas that knows the page count when it draws the header and footer."""
    from reportlab.lib import colors
    from reportlab.pdfgen import canvas

    class NumberedCanvas(canvas.Canvas):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self._page_states = []

        def showPage(self):  # noqa: N802 - reportlab API
            self._page_states.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._page_states)
            for state in self._page_states:
                self.__dict__.update(state)
                self._furniture(total)
                super().showPage()
            super().save()

        def _furniture(self, total):
            self.saveState()
            self.setStrokeColor(colors.HexColor(GREY_LIGHT))
            self.setLineWidth(0.5)
            top = PAGE_HEIGHT - MARGIN_TOP + 6 * MM
            self.line(MARGIN_SIDE, top - 2, PAGE_WIDTH - MARGIN_SIDE, top - 2)
            self.setFillColor(colors.HexColor(GREY_DARK))
            self.setFont(FONT, 7)
            self.drawString(MARGIN_SIDE, top + 1, header_text)
            bottom = MARGIN_BOTTOM - 9 * MM
            self.line(MARGIN_SIDE, bottom + 9, PAGE_WIDTH - MARGIN_SIDE, bottom + 9)
            self.drawString(MARGIN_SIDE, bottom, footer_left)
            self.setFont(FONT_BOLD, 7.5)
            self.drawRightString(PAGE_WIDTH - MARGIN_SIDE, bottom,
                                 f"page {self._pageNumber} of {total}")
            self.restoreState()

    return NumberedCanvas


# --------------------------------------------------------------------------------------------
# Page 1


def _title_block(result, data, styles):
    case = data["case"]
    title = case["title"]
    if len(title) > TITLE_SHOWN_CHARS:  # the whole title: PDF properties and inputs table
        title = (_shorten(title, TITLE_SHOWN_CHARS) + f" (title of {len(title)} characters "
                 f"shortened; in full in the inputs table and the PDF properties)")
    story = [_p(REPORT_TITLE, styles["title"]),
             _p(escape(title), styles["subtitle"])]
    section = result.case.sections["case"]
    meta = [f"Revision <b>{escape(case.get('revision') or 'not given')}</b>"]
    if section.get("date"):
        meta.append(f"data of {escape(section.get('date'))}")
    if case.get("author"):
        meta.append(f"prepared by {escape(case['author'])}")
    meta.append(f"report generated {escape(data.get('generated_at') or 'n/a')}")
    meta.append(f"{escape(data['tool']['name'])} {escape(data['tool']['version'])}")
    meta.append(f"case file {escape(os.path.basename(case['path']))}")
    story.append(_p(" · ".join(meta), styles["meta"]))
    if data.get("overrides"):
        shown = "; ".join(escape(text) for text in data["overrides"])
        story.append(_p(f"<b>What-if run:</b> case values changed on the command line "
                        f"(--set): {shown}", styles["verdict"]))
    return story


def _caution_block(result, styles):
    """The boxed caution block: black frame, pale fill, first thing after the title."""
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    items = [_p("SCREENING AID ONLY — READ BEFORE USING ANY FIGURE IN THIS REPORT",
                styles["caution_head"])]
    for text in result.cautions:
        items.append(_bullet(escape(text), styles["caution"]))
    table = Table([[items]], colWidths=[FRAME_WIDTH])
    table.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 1.8, colors.HexColor(INK)),
        ("BACKGROUND", (0, 0), (-1, -1), colors.HexColor(GREY_PALE)),
        ("LEFTPADDING", (0, 0), (-1, -1), 8),
        ("RIGHTPADDING", (0, 0), (-1, -1), 8),
        ("TOPPADDING", (0, 0), (-1, -1), 6),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 7),
    ]))
    return table


def _verdict_block(results, styles):
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    klass = results.get("criticality_class")
    status = results.get("verdict_status", "screened")
    if klass is None:
        # Fail closed (engine): no class is granted; say so where the class would stand.
        number, footnote = "–", "NO CLASS: CANNOT CONCLUDE"
    elif status != "screened":
        number, footnote = str(klass), "AT LEAST: CRUDE ESTIMATE from the DSC onset"
    else:
        number, footnote = str(klass), "of 5 (5 most critical)"
    badge = Table([[_p("CRITICALITY CLASS", styles["class_label"])],
                   [_p(number, styles["class_number"])],
                   [_p(footnote, styles["class_label"])]],
                  colWidths=[30 * MM])
    badge.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 1.2, colors.HexColor(ACCENT)),
        ("TOPPADDING", (0, 0), (-1, -1), 1),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 1),
        ("TOPPADDING", (0, 0), (-1, 0), 5),
        ("BOTTOMPADDING", (0, -1), (-1, -1), 6),
    ]))
    lines = []
    governing = _governing_mtsr_line(results)
    if status != "screened" or klass is None:
        # The engine's own verdict sentence says what cannot be concluded and what to do.
        lines.append(_p(f"<b>{prose(results.get('verdict', ''))}</b>", styles["verdict"]))
    if klass is not None:
        qualifier = "" if status == "screened" else " at least: crude estimate"
        lines.append(_p(f"<b>Class {klass}{qualifier}.</b> "
                        f"{prose(results.get('criticality_meaning', ''))}", styles["verdict"]))
    if governing:
        lines.append(_p(governing, styles["verdict"]))
    lines.extend(_verdict_basis(results, styles))
    lines.append(_p(
        f"<b>Severity:</b> {_level(results, 'severity_4', 'severity')}, from the adiabatic rise "
        f"of the runaway, {format_kelvin(results['runaway_adiabatic_rise_K'])} K.",
        styles["verdict"]))
    lines.append(_p(_probability_sentence(results), styles["verdict"]))
    if not results.get("verdict_basis_lines"):
        basis = ("decomposition kinetics from the case" if results.get("decomposition_basis") ==
                 "kinetics" else "CRUDE estimate from the DSC onset only")
        lines.append(_p(f"<b>Basis:</b> {escape(results.get('decomposition_model', ''))} model, "
                        f"{basis}.", styles["verdict"]))
    vessels = results.get("vessels") or []
    if vessels:
        lines.append(_p("<b>Stability per vessel</b> (Semenov heat balance of the "
                        "decomposition):", styles["verdict"]))
        for vessel in vessels:
            lines.append(_bullet(_vessel_summary(vessel, results), styles["bullet"], "–"))
    else:
        lines.append(_p("<b>Stability per vessel:</b> no vessel in the case; the Semenov "
                        "heat balance was not assessed.", styles["verdict"]))
    barrier_lines = blocks.barrier_verdict_lines(results.get("barrier"))
    if barrier_lines:
        lines.append(_p("<b>Evaporative-cooling barrier per vessel</b> (boiling at the MTT; "
                        "see the barrier block):", styles["verdict"]))
        for text in barrier_lines:
            lines.append(_bullet(text, styles["bullet"], "–"))
    confidence = _confidence(results.get("uncertainty"))
    if confidence:
        lines.append(_p(f"<b>Confidence:</b> {prose(confidence)}", styles["verdict"]))
    table = Table([[badge, lines]], colWidths=[34 * MM, FRAME_WIDTH - 34 * MM])
    table.setStyle(TableStyle([
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LEFTPADDING", (0, 0), (0, 0), 0),
        ("LEFTPADDING", (1, 0), (1, 0), 8),
        ("RIGHTPADDING", (1, 0), (1, 0), 0),
    ]))
    return table


def _governing_mtsr_line(results) -> str | None:
    """Page-1 line when an MTSR other than the stated one governs the verdict."""
    governing = results.get("mtsr_governing_degC")
    if not isinstance(governing, (int, float)) or \
            results.get("mtsr_governing_source", "stated") == "stated":
        return None
    basis = results.get("mtsr_governing_basis") or "simulation"
    text = (f"<b>Governing MTSR: {format_celsius(governing)} °C</b>, the {escape(basis)}, "
            f"higher than the {format_celsius(results.get('mtsr_degC'))} °C from the stated "
            f"accumulation")
    stated_class = results.get("criticality_class_stated_mtsr")
    klass = results.get("criticality_class")
    if stated_class is not None and klass is not None and stated_class != klass:
        text += f"; it raises the class from {escape(stated_class)} to {escape(klass)}"
    else:
        text += "; the class and every figure derived from MTSR rest on it"
    return text + "."


def _verdict_basis(results, styles) -> list:
    """'Basis of the verdict': the engine's lines (results.verdict_basis_lines), one bullet each."""
    lines = results.get("verdict_basis_lines") or []
    if not lines:
        return []
    return [_p("<b>Basis of the verdict:</b> " + " ".join(prose(text) for text in lines),
               styles["small"])]


def _confidence(block) -> str | None:
    """The confidence sentence of the uncertainty block (None without one)."""
    if not isinstance(block, dict):
        return None
    text = block.get("confidence")
    if isinstance(text, str) and text.strip():
        return text.strip()
    probabilities = block.get("class_probabilities")
    if isinstance(probabilities, dict) and probabilities:
        shown = ", ".join(f"class {k}: {blocks.format_probability(v, block.get('samples'))}"
                          for k, v in sorted(probabilities.items(), key=lambda kv: str(kv[0])))
        return (f"Monte Carlo ({block.get('samples', 'n/a')} samples, seed "
                f"{block.get('seed', 'n/a')}): {shown}.")
    return None


def _vessel_summary(vessel, results) -> str:
    """One line per vessel on page 1: short when stable, the full verdict when not."""
    stability = vessel.get("stability", "n/a")
    name = escape(vessel.get("name", ""))
    t_nr = vessel.get("no_return_temperature_degC")
    if stability == "stable" and t_nr is not None:
        margin = t_nr - results["mtsr_degC"]
        tmr = results.get("tmrad_at_mtsr_h")
        if vessel.get("synthesis_stability") == "unstable":
            return (f"<b>{name}: SYNTHESIS COOLING UNSTABLE</b>; T<sub>NR</sub> "
                    f"{format_kelvin(margin)} K above MTSR")
        text = (f"<b>{name}: RECOVERABLE</b> — T<sub>NR</sub> {format_kelvin(margin)} K above "
                f"MTSR")
        if tmr is not None and tmr < 24.0:
            text += f", if cooled within {tmr:.2g} h"
        return text
    return (f"<b>{name}: {escape(str(stability).upper())}</b> — "
            f"{prose(_strip_prefix(vessel.get('verdict', '')))}")


def _probability_sentence(results) -> str:
    """The probability line of page 1: the level and the TMRad it comes from, or why there is
    no level (one statement, never a level 'not assessed' next to a TMRad)."""
    tmr = results.get("tmrad_at_mtsr_h")
    tmr_text = f"{format_hours(tmr)} h" if isinstance(tmr, (int, float)) else "n/a"
    if results.get("probability_6") is None:
        return (f"<b>Probability:</b> no level is granted: without decomposition kinetics the "
                f"TMRad at MTSR ({tmr_text}) is only a crude estimate from the DSC onset.")
    return (f"<b>Probability:</b> {_level(results, 'probability_6', 'probability')}, from "
            f"TMRad at MTSR, {tmr_text}.")


def _level(results, detailed_key, coarse_key) -> str:
    detailed, coarse = results.get(detailed_key), results.get(coarse_key)
    if detailed is None:
        return "not assessed (no decomposition kinetics)"
    return f"{escape(detailed)} (three-level: {escape(coarse)})"


def _strip_prefix(verdict: str) -> str:
    """The vessel verdict without its leading 'stable: ' (the keyword is printed already)."""
    return verdict[len("stable: "):] if verdict.startswith("stable: ") else verdict


def _key_figure_note(kind, value, results):
    if kind == "above_tp" and value is not None:
        return f"{value - results['process_temperature_degC']:+.1f} K from T<sub>p</sub>"
    if kind == "margin":
        return "TD24 below MTSR" if value is not None and value < 0 else "TD24 above MTSR"
    if kind == "zero_order":
        return "for comparison" if results.get("decomposition_model") != "zero-order" else \
            "same model"
    if kind == "onset":
        return "not used for the verdict"
    return ""


def key_figure_rows(results):
    """Rows (label, symbol, value text, unit, note) of the key-figures table.

    Parameters
    ----------
    results : dict
        The ``results`` table of the JSON-ready result.
    """
    rows = []
    for label, symbol, key, unit, formatter, note in KEY_FIGURES:
        if key not in results:
            continue
        value = results[key]
        rows.append((label, symbol, formatter(value), unit, _key_figure_note(note, value, results)))
    return rows


def _key_figures_table(results, styles):
    rows = [["Quantity", "Symbol", "Value", "Unit", "Note"]]
    for label, symbol, text, unit, note in key_figure_rows(results):
        rows.append([label, _p(symbol, styles["cell_tight"]), text, unit,
                     _p(note, styles["cell_tight"])])
    widths = [76 * MM, 30 * MM, 18 * MM, 13 * MM, FRAME_WIDTH - 137 * MM]
    return _table(rows, widths, align_right_from=2, padding=1.2)


def _warnings_block(result, styles):
    story = [_p(f"Warnings raised for this case ({len(result.warnings)})", styles["h2"])]
    if not result.warnings:
        story.append(_p("No warning was raised for this case. The cautions above still apply.",
                        styles["body"]))
    for number, text in enumerate(result.warnings, start=1):
        story.append(_bullet(prose(text), styles["bullet"], f"{number}."))
    return story


# --------------------------------------------------------------------------------------------
# Figures section


def _figures_section(result, styles, counter):
    from reportlab.platypus import Spacer

    results = result.results
    story = [_p("Figures", styles["h1"])]

    story.append(_figure_block(
        figures.draw(figure_data.criticality(result)), next(counter), "Criticality temperature scale.",
        "The temperatures of the key-figures table on one scale. Read the order of the levels: "
        "the solid arrow is the synthesis runaway after a cooling failure (T<sub>p</sub> to "
        "MTSR), the dashed arrow the decomposition that may follow (MTSR to the final "
        "temperature). Where MTSR lies against the MTT (dash-dot, boiling or relief) and "
        "T<sub>D24</sub> (dashed) sets the class; the pale band is TMRad between 24 h and 8 h, "
        "the hatched region TMRad below 8 h.", styles))

    data = figure_data.tmrad(result)
    basis = (" <b>The curve is a crude estimate from the DSC onset alone.</b>"
             if data.notes["crude"] else "")
    extrapolated = (" The hatched region lies below the lowest temperature at which the "
                    "kinetics were measured: there the curve is extrapolated."
                    if data.notes["extrapolated"] else "")
    story.append(_figure_block(
        figures.draw(data), next(counter), "Time to maximum rate under adiabatic conditions.",
        "TMRad of the decomposition against the temperature at which the mass starts to heat "
        "up adiabatically (logarithmic axis). Read T<sub>D24</sub> and T<sub>D8</sub> where the "
        "curve crosses the 24 h (dashed) and 8 h (dotted) lines, and the time available at "
        "T<sub>p</sub> (square) and at MTSR (diamond) to act after a cooling failure."
        + extrapolated + basis, styles))

    from screen.errors import ScreenError

    try:
        data = figure_data.course(result)
    except ScreenError as exc:
        # Say so in place of the figure rather than lose the whole report.
        story.append(_p(f"<b>Figure {next(counter)}. Temperature course after a cooling "
                        f"failure: not available.</b> The adiabatic course could not be "
                        f"computed ({prose(exc.one_line())}); the key figures above do not "
                        f"depend on it.", styles["caption"]))
    else:
        if data.notes["source"] == "simulation":
            story.extend(_simulated_course_figure(data, styles, counter))
        else:
            story.extend(_course_figure(data, styles, counter))
    story.extend(_semenov_figures(result, styles, counter))

    vessels = results.get("vessels") or []
    if vessels:
        story.append(Spacer(1, 4))
        story.extend(_vessel_section(vessels, styles))
    story.extend(blocks.optional_blocks(result, styles, counter))
    return story


#: Legend of the simulated course after the worst failure (the wording is relied on by tests).
SIMULATED_COURSE_LABEL = figure_data.SIMULATED_COURSE_LABEL
SIMULATED_CONTINUING_LABEL = figure_data.SIMULATED_CONTINUING_LABEL


def _course_figure(data, styles, counter):
    """Figure 3 without a simulation: T_p -> MTSR at once, then the adiabatic decomposition."""
    caption = ("<b>Unmitigated</b> temperature of the mass after a cooling failure at the worst "
               "moment: no cooling, no boiling, no relief. The synthesis rise from "
               "T<sub>p</sub> to MTSR is <b>assumed instantaneous at t = 0</b> (the accumulated "
               "reactant reacts at once, the conservative screening assumption); from MTSR the "
               "decomposition heats the mass adiabatically (no heat losses, φ = 1). The thick "
               "dotted line shows what the barrier at the MTT must do: hold the mass at the MTT "
               "by boiling (or relief), with its verdict from the barrier analysis. Read the "
               "time left before the runaway accelerates and the temperature it ends at; the "
               "lower panel, where drawn, enlarges the range of T<sub>p</sub>, MTSR, the MTT and "
               "T<sub>D24</sub>.")
    return [_figure_block(figures.draw(data), next(counter),
                          "Unmitigated temperature course after a cooling failure.", caption,
                          styles)]


def _simulated_course_figure(data, styles, counter):
    """Figure 3 from the simulation: feed stopped (solid), feed continuing (dashed)."""
    failure = data.notes["failure_time_s"]
    continuing = data.notes["failure_time_feed_continuing_s"]

    def moment(seconds):
        if not isinstance(seconds, (int, float)):
            return "the worst moment"
        if seconds < 30.0:
            return "at the start of the run"
        return f"{format_hours(seconds / 3600.0)} h into the run"

    caption = (f"<b>Unmitigated</b> temperature of the mass after a cooling failure (no "
               f"cooling, no boiling, no relief), from the dynamic simulation of "
               f"the run (see the simulation block): the failure at the worst time "
               f"({moment(failure)}) with the feed stopped (solid)")
    if data.notes["feed_continuing"]:
        caption += (f", and at the worst time for a feed that keeps running "
                    f"({moment(continuing)}; dashed)")
    caption += (". The accumulated reactant reacts at the simulated rate, adiabatically from "
                "the failure on (no heat losses, no evaporation, φ = 1). Read how long the mass "
                "takes to reach the MTT and T<sub>D24</sub>, and how much worse a feed that is "
                "not stopped makes it. The thick dotted line shows what the barrier at the MTT "
                "must do (hold the mass there by boiling or relief), with its verdict from the "
                "barrier analysis.")
    return [_figure_block(figures.draw(data), next(counter),
                          "Unmitigated temperature course after a cooling failure.", caption,
                          styles)]


def _semenov_figures(result, styles, counter):
    story = []

    first_semenov = None
    for data in figure_data.semenov(result):
        curve = data.arguments["curve"]
        drawing = figures.draw(data)
        number = next(counter)
        if first_semenov is not None:
            story.append(_figure_block(
                drawing, number, f"Semenov diagram, {curve.get('name', '')}.",
                f"Lines and symbols as in Figure {first_semenov}: generation (solid), removal at "
                f"the actual (dashed) and the critical (dotted) coolant temperature; "
                f"T<sub>NR</sub> marked by the open circle.", styles))
            continue
        first_semenov = number
        story.append(_figure_block(
            drawing, number, f"Semenov diagram, {curve.get('name', '')}.",
            "Heat generated by the decomposition (solid; zero order at the fresh-mass rate, the "
            "screening convention; for an autocatalytic decomposition at the rate of maximum "
            "f(a)) against the heat the jacket removes at the actual coolant "
            "temperature (dashed) and at the critical coolant temperature (dotted, touching the "
            "generation curve). Read T<sub>NR</sub>, the temperature of no return (open circle): "
            "above it generation exceeds removal and restored cooling cannot bring the mass "
            "back; MTSR must lie well below it.", styles))
    return story


def _vessel_section(vessels, styles):
    """Vessel table (the scale-up table when there are several), then the verdicts."""
    from reportlab.platypus import KeepTogether

    title = ("Scale-up comparison of the vessels" if len(vessels) > 1 else
             "Vessel heat balance")
    story = []
    heading = _p(title, styles["h2"])
    per_table = 4
    for start in range(0, len(vessels), per_table):
        chunk = vessels[start:start + per_table]
        rows = [["Quantity", "Unit"] + [_p(f"<b>{escape(v['name'])}</b>", styles["cell"])
                                        for v in chunk]]
        for label, key, unit, formatter in VESSEL_ROWS:
            if all(v.get(key) is None for v in chunk) and key not in ("stability",):
                continue
            rows.append([_p(label, styles["cell"]), unit]
                        + [formatter(v.get(key)) for v in chunk])
        label_width, unit_width = 58 * MM, 16 * MM
        column = (FRAME_WIDTH - label_width - unit_width) / len(chunk)
        table = _table(rows, [label_width, unit_width] + [column] * len(chunk))
        story.append(KeepTogether([heading, table] if start == 0 else [table]))
    story.append(_p("Verdict per vessel", styles["h2"]))
    for vessel in vessels:
        story.append(_bullet(f"<b>{escape(vessel['name'])}.</b> Decomposition: "
                             f"{prose(vessel.get('verdict', 'n/a'))} Synthesis in normal "
                             f"operation: {prose(vessel.get('synthesis_verdict') or 'n/a')}.",
                             styles["bullet"], "–"))
    return story


# --------------------------------------------------------------------------------------------
# Inputs, methods, assumptions, data quality


def _override_keys(overrides):
    keys = []
    for text in overrides:
        keys.append(text.split("=", 1)[0].strip())
    return keys


def _is_overridden(record_key, override_keys):
    for key in override_keys:
        if record_key == key:
            return True
        parts = key.split(".")
        if parts[0] == "vessel" and len(parts) == 2:
            record_parts = record_key.split(".")
            if record_parts[0] == "vessel" and record_parts[-1] == parts[1]:
                return True
    return False


def _inputs_section(result, data, styles):
    story = [_p("Inputs and methods", styles["h1"]), _p("Inputs as read", styles["h2"]),
             _p("Every value of the case file as written, and its SI value as used by the "
                "calculation. Rows marked <b>--set</b> were changed on the command line.",
                styles["small"])]
    override_keys = _override_keys(data.get("overrides", []))
    rows = [["Key", "As read", "SI value", "SI unit", ""]]
    bold = []
    for record in result.case.inputs:
        if isinstance(record.value, float):
            si_value = f"{record.value:.6g}"
        elif isinstance(record.value, (int, bool)) and not isinstance(record.value, str):
            si_value = format_generic(record.value)
        else:
            si_value = "–"
        marked = _is_overridden(record.key, override_keys)
        rows.append([_p(escape(record.key), styles["cell_mono"]),
                     _p(escape(record.text), styles["cell"]), si_value,
                     _p(escape(record.unit), styles["cell"]), "--set" if marked else ""])
        if marked:
            bold.append(len(rows) - 1)
    widths = [66 * MM, 54 * MM, 20 * MM, 22 * MM, FRAME_WIDTH - 162 * MM]
    story.append(_table(rows, widths, font_size=7.5, align_right_from=2, bold_rows=bold))
    if data.get("overrides"):
        story.append(_p("<b>Overrides (--set):</b> " + "; ".join(escape(t) for t in
                                                                 data["overrides"]),
                        styles["small"]))
    else:
        story.append(_p("No --set overrides: all values are as written in the case file.",
                        styles["small"]))

    story.append(_p("Methods and references", styles["h2"]))
    rows = [["Figure", "Method and reference"]]
    for key, text in result.methods.items():
        rows.append([_p(escape(key.replace("_", " ")), styles["cell_bold"]),
                     _p(prose(text), styles["cell"])])
    for key, text in _figure_methods(result).items():
        rows.append([_p(escape(key), styles["cell_bold"]), _p(text, styles["cell"])])
    story.append(_table(rows, [42 * MM, FRAME_WIDTH - 42 * MM], font_size=7.5))

    story.append(_p("Assumptions and limits", styles["h2"]))
    for text in _assumptions(result):
        story.append(_bullet(text, styles["bullet"], "–"))

    story.append(_p("Data-quality notes", styles["h2"]))
    notes = _data_quality_notes(result)
    if not notes:
        notes = ["The case gives no note on how the data were obtained (decomposition.source, "
                 "decomposition.onset_method, process.mtt_basis): add them before the review."]
    for text in notes:
        story.append(_bullet(text, styles["bullet"], "–"))
    return story


def _figure_methods(result) -> dict[str, str]:
    methods = {
        "figure: TMRad curve": "The TMRad method above, evaluated on a grid of start "
                               "temperatures; 8 h and 24 h lines give T<sub>D8</sub> and "
                               "T<sub>D24</sub>.",
    }
    if figure_data.simulated_courses(result) is not None:
        methods["figure: temperature course"] = (
            "Continuation of the cooling-failure simulation from its state at the worst failure "
            "time: synthesis and decomposition kinetics integrated together, adiabatic "
            "(φ = 1), with the feed stopped and with the feed continuing (see the simulation "
            "method above).")
    else:
        methods["figure: temperature course"] = (
            "Adiabatic integration of the decomposition kinetics from MTSR with constant "
            "c'<sub>p</sub>, φ = 1: c'<sub>p</sub> dT/dt = q(T, α); the synthesis rise "
            "T<sub>p</sub> → MTSR taken as instantaneous.")
    if result.results.get("vessels"):
        methods["figure: Semenov diagram"] = (
            "Generation m q(T), zero order at the fresh-mass rate, against removal "
            "U A (T − T<sub>c</sub>); critical coolant temperature from the tangency "
            "E (T* − T<sub>c,crit</sub>) = R T*² (derived); T<sub>NR</sub> the upper "
            "intersection at the actual T<sub>c</sub> (Semenov, Z. Phys. 48 (1928) 571; "
            "Townsend, IChemE Symp. Ser. 68 (1981)).")
    return methods


def _assumptions(result) -> list[str]:
    results = result.results
    case = result.case
    dec = case.sections.get("decomposition")
    items = [
        "<b>Adiabatic.</b> After the cooling failure no heat leaves the mass (no jacket, no "
        "losses) and the vessel wall takes up no heat (thermal inertia φ = 1): conservative "
        "for the times, realistic only for large, well-insulated vessels.",
        "<b>Well mixed.</b> One temperature for the whole mass; no hot spots, layers or "
        "unstirred solids. An unstirred mass or a stored solid needs a heat-conduction "
        "(Frank-Kamenetskii) assessment that this screening does not make.",
        f"<b>Synthesis.</b> {escape(results.get('mode', ''))}; the accumulated heat "
        f"(X<sub>ac</sub> = {format_ratio(results.get('accumulation'))}, mass ratio "
        f"{format_ratio(results.get('accumulation_mass_ratio'))}) is released at once at the "
        f"failure (MTSR)" + ("; the cooling-failure simulation computes the course at the "
                             "simulated rate instead (see its block)." if
                             isinstance(results.get("simulation"), dict) else "."),
        f"<b>Kinetics model.</b> Decomposition as a single "
        f"{escape(results.get('decomposition_model', ''))} reaction with one activation energy "
        f"over the whole temperature range; impurities, induction periods or other reactions "
        f"not in the model are not covered.",
    ]
    lowest = None
    if dec is not None:
        lowest = dec.get("lowest_measured_temperature") or dec.get("reference_temperature")
    td24 = results.get("td24_degC")
    if results.get("decomposition_basis") != "kinetics":
        items.append("<b>Extrapolation.</b> No kinetics were measured: TMRad and T<sub>D24</sub> "
                     "are extrapolated from a single DSC onset with assumed parameters; treat "
                     "them as an order of magnitude at best.")
    elif lowest is not None and td24 is not None:
        lowest_c = float(lowest) - ZERO_CELSIUS
        gap = lowest_c - td24
        where = (f"{gap:.1f} K below" if gap > 0 else f"{-gap:.1f} K above")
        items.append(f"<b>Extrapolation.</b> The kinetics were measured down to "
                     f"{lowest_c:.1f} °C; T<sub>D24</sub> ({td24:.1f} °C) lies {where} that "
                     f"temperature. Figures below the measured range are extrapolations of the "
                     f"model.")
    else:
        items.append("<b>Extrapolation.</b> The case does not state the measured temperature "
                     "range of the kinetics: the extent of extrapolation cannot be judged.")
    items.append(_not_covered(results))
    items.append("<b>Levels.</b> Severity and probability bands as published in the methods "
                  "above (verify the band limits against the source); the '100 K below the DSC onset' "
                  "rule of thumb is "
                  "shown for information and never used for the verdict.")
    return items


def _not_covered(results) -> str:
    """What this report does not assess, given the optional blocks it carries."""
    missing = []
    if not isinstance(results.get("pressure"), dict):
        missing.append("gas production and pressure build-up in a closed vessel")
    missing.append("the sizing of a relief system")
    barrier = results.get("barrier")
    if not (isinstance(barrier, dict) and barrier.get("assessed")):
        missing.append("the capacity of evaporative cooling (condenser, vapour line)")
    scenarios = results.get("scenarios")
    if isinstance(scenarios, dict) and scenarios.get("run", True) and scenarios.get("rows"):
        missing.append("deviations other than loss of cooling and those in the scenario table")
    else:
        missing.append("any scenario other than loss of cooling")
    if not isinstance(results.get("uncertainty"), dict):
        missing.append("the uncertainty of the input data (no Monte Carlo run)")
    return "<b>Not covered.</b> " + "; ".join(missing).capitalize() + "."


def _data_quality_notes(result) -> list[str]:
    case = result.case
    notes = []
    wanted = (("decomposition", "source", "Source of the kinetics"),
              ("decomposition", "onset_method", "How the DSC onset was obtained"),
              ("process", "mtt_basis", "Basis of the MTT"),
              ("process", "accumulation_basis", "Basis of the accumulation"),
              ("case", "notes", "Case notes"))
    for section_name, key, label in wanted:
        section = case.sections.get(section_name)
        if section is not None and section.get(key):
            notes.append(f"<b>{label}:</b> {escape(section.get(key))}")
    if result.results.get("decomposition_basis") != "kinetics":
        notes.append("<b>Decomposition basis:</b> onset only; the class is a crude estimate and "
                     "cannot be relied on for a low class.")
    if result.results.get("dsc_onset_note"):
        notes.append(f"<b>DSC onset:</b> {prose(result.results['dsc_onset_note'])}")
    uncertain = getattr(case, "uncertainties", None) or {}
    if uncertain:
        notes.append("<b>Inputs given with an uncertainty:</b> "
                     + ", ".join(escape(k) for k in uncertain) + ".")
    return notes


# --------------------------------------------------------------------------------------------
# Traceability and changes


def _traceability_section(result, data, styles, since):
    import platform

    story = [_p("Traceability", styles["h1"])]
    case = data["case"]
    section = result.case.sections["case"]
    rows = [
        ["Tool", f"{data['tool']['name']} {data['tool']['version']} (Python "
                 f"{platform.python_version()})"],
        ["Case file", os.path.basename(case["path"])],
        ["Case path as given", _p(escape(case["path"]), styles["cell_mono"])],
        ["Case file SHA-256", _p(case["sha256"] or "n/a", styles["cell_mono"])],
        ["Case revision", case.get("revision") or "not given"],
        ["Case date", section.get("date") or "not given"],
        ["Prepared by", case.get("author") or "not given"],
        ["Report generated", data.get("generated_at") or "n/a"],
        ["Overrides (--set)", _p(escape("; ".join(data.get("overrides", [])) or "none"),
                                 styles["cell"])],
    ]
    story.append(_table(rows, [42 * MM, FRAME_WIDTH - 42 * MM], header=False, zebra=False))
    story.append(_p("Check the SHA-256 against the case file under review (for example with "
                    "<font name='DejaVuSansMono'>sha256sum</font>): a different digest means the "
                    "report describes another version of the case.", styles["small"]))
    if since is not None:
        story.extend(_changes_section(since, data, styles))
    return story


def _changes_section(since, data, styles):
    from screen.runs.compare import diff_results

    input_changes, result_changes = diff_results(since, data)
    old_case = since.get("case", {}) if isinstance(since, dict) else {}
    story = [_p("Changes since the earlier result", styles["h2"]),
             _p(f"Earlier result: case {escape(old_case.get('title', 'n/a'))}, revision "
                f"{escape(old_case.get('revision') or 'n/a')}, generated "
                f"{escape(since.get('generated_at') or 'n/a')}, SHA-256 "
                f"<font name='DejaVuSansMono'>{escape(old_case.get('sha256') or 'n/a')}</font>. "
                f"Changes of verdict are listed first in bold.", styles["small"])]
    if not input_changes and not result_changes:
        story.append(_p("No change in the inputs or the results.", styles["body"]))
        return story
    rows = [["Item", "Before", "Now", "Change"]]
    bold = []
    for kind, changes in (("input", input_changes), ("result", result_changes)):
        for change in changes:
            delta = change.delta
            if delta is not None:
                shown = f"{format_significant(delta, 4)}" if delta < 0 else \
                    f"+{format_significant(delta, 4)}"
            else:
                shown = change.direction
            rows.append([_p(escape(f"{kind}: {change.key}"), styles["cell"]),
                         _p(escape(format_generic(change.old)), styles["cell"]),
                         _p(escape(format_generic(change.new)), styles["cell"]), shown])
            if change.is_verdict:
                bold.append(len(rows) - 1)
    widths = [70 * MM, 40 * MM, 40 * MM, FRAME_WIDTH - 150 * MM]
    story.append(_table(rows, widths, font_size=7.5, bold_rows=bold))
    return story


# --------------------------------------------------------------------------------------------


def build_pdf(result, data: dict, stream, since=None) -> int:
    """Lay out the report of ``result`` into ``stream`` (a binary file object).

    Parameters
    ----------
    result : screen.analyses.engine.ScreeningResult
        Result of the engine.
    data : dict
        ``result.to_json_dict(generated_at)`` (computed once by the caller).
    stream : binary file object
        Binary stream the PDF is written to.
    since : dict, optional
        An earlier JSON result for the changes-since table.

    Returns
    -------
    int
        The number of pages.
    """
    from reportlab.lib.pagesizes import A4
    from reportlab.platypus import CondPageBreak, SimpleDocTemplate, Spacer

    from screen.report.text import drawable, notes, reset_notes

    register_fonts()
    reset_notes()
    styles = paragraph_styles()
    results = result.results
    case = data["case"]
    revision = f" · rev. {case['revision']}" if case.get("revision") else ""
    header = (f"{data['tool']['name']} {data['tool']['version']} · {REPORT_TITLE} · "
              f"SCREENING AID ONLY: a qualified process-safety review decides")
    footer = _shorten(drawable(f"{case['title']}{revision}"), 95)
    document = SimpleDocTemplate(
        stream, pagesize=A4, leftMargin=MARGIN_SIDE, rightMargin=MARGIN_SIDE,
        topMargin=MARGIN_TOP, bottomMargin=MARGIN_BOTTOM, title=f"{REPORT_TITLE}: {case['title']}",
        author=case.get("author") or "", subject="Thermal runaway screening (screening aid only)",
        creator=f"{data['tool']['name']} {data['tool']['version']}", invariant=True)
    counter = FigureCounter()
    story = []
    story.extend(_title_block(result, data, styles))
    title_end = len(story)
    story.append(_caution_block(result, styles))
    story.append(Spacer(1, 8))
    story.append(_p("Verdict", styles["h1"]))
    story.append(_verdict_block(results, styles))
    story.append(_p("Key figures", styles["h2"]))
    story.append(_key_figures_table(results, styles))
    story.append(_p("Temperatures with 1 decimal in °C, differences with 1 decimal in K, times "
                    "with 3 significant digits in h.", styles["small"]))
    story.extend(_warnings_block(result, styles))
    # The figures start on a new page unless the warnings spilled over onto one and left room
    # for the heading and the first figure or two.
    story.append(CondPageBreak(0.6 * document.height))
    story.extend(_figures_section(result, styles, counter))
    story.append(CondPageBreak(0.5 * document.height))
    story.extend(_inputs_section(result, data, styles))
    story.append(Spacer(1, 6))
    story.extend(_traceability_section(result, data, styles, since))
    for position, text in enumerate(notes()):  # never silent boxes: say what was replaced
        story.insert(title_end + position, _p(f"<b>Text note:</b> {escape(text)}",
                                              styles["small"]))
    canvas_class = _canvas_class(header, footer)
    document.build(story, canvasmaker=canvas_class)
    return document.page


#: Longest case title printed under the report title [characters] (design: three lines).
TITLE_SHOWN_CHARS = 240


def _shorten(text: str, length: int) -> str:
    return text if len(text) <= length else text[:length - 1] + "…"
