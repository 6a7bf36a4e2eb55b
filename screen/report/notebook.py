"""Short text and HTML views of a screening result for Python sessions and Jupyter.

Both read the JSON-ready dict (:meth:`ScreeningResult.to_json_dict`) and print the figures and
the verdict words computed by the engine, with the cautions of :mod:`screen.cautions`. Nothing is
computed here.
"""

from __future__ import annotations

from html import escape


def _number(value, digits: str = ".1f") -> str:
    if value is None:
        return "n/a"
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if digits.endswith("g") and abs(value) >= 1e5:
            return f"{value:.2e}"
        return format(value, digits)
    return str(value)


def class_text(results: dict) -> str:
    """"criticality class 3" or "no criticality class (cannot conclude)".

    Parameters
    ----------
    results : dict
        The ``results`` table of a JSON-ready result.
    """
    klass = results.get("criticality_class")
    if klass is None:
        return "no criticality class (cannot conclude)"
    status = results.get("verdict_status", "screened")
    return f"criticality class {klass}" + ("" if status == "screened" else f" ({status})")


def _crude(results: dict) -> str:
    return (" (crude, from the DSC onset)"
            if results.get("decomposition_basis") == "onset-estimate" else "")


def short_text(data: dict) -> str:
    """Title, criticality class, MTSR and TD24 in one line, then the short caution.

    Parameters
    ----------
    data : dict
        JSON-ready result.
    """
    from screen.cautions import SHORT_CAUTION

    results = data["results"]
    line = (f"<screening of {data['case']['title']!r}: {class_text(results)}, "
            f"MTSR {_number(results.get('mtsr_degC'))} degC, "
            f"TD24 {_number(results.get('td24_degC'))} degC{_crude(results)}, "
            f"{len(data.get('warnings') or [])} warnings>")
    return f"{line}\n{SHORT_CAUTION}"


#: Key figures of the HTML view: label, JSON key, unit, format.
KEY_FIGURES = (
    ("Process temperature T<sub>p</sub>", "process_temperature_degC", "°C", ".1f"),
    ("MTSR", "mtsr_degC", "°C", ".1f"),
    ("MTT", "mtt_degC", "°C", ".1f"),
    ("T<sub>D24</sub>", "td24_degC", "°C", ".1f"),
    ("T<sub>D8</sub>", "td8_degC", "°C", ".1f"),
    ("TMRad at MTSR", "tmrad_at_mtsr_h", "h", ".3g"),
    ("Margin T<sub>D24</sub> − MTSR", "onset_margin_K", "K", ".1f"),
    ("Adiabatic rise of the synthesis", "synthesis_adiabatic_rise_K", "K", ".1f"),
    ("Adiabatic rise of the decomposition", "decomposition_adiabatic_rise_K", "K", ".1f"),
    ("Final temperature", "final_temperature_degC", "°C", ".1f"),
    ("Severity", "severity_4", "", ""),
    ("Probability", "probability_6", "", ""),
)

#: Vessel columns of the HTML view: header, JSON keys of the vessel entry (the first present
#: is shown: the verdict words where the engine gives them), format.
VESSEL_COLUMNS = (
    ("Vessel", ("name",), ""),
    ("Decomposition", ("decomposition_stability", "stability"), ""),
    ("Critical T<sub>c</sub> [°C]", ("critical_coolant_temperature_degC",), ".1f"),
    ("T<sub>NR</sub> [°C]", ("no_return_temperature_degC",), ".1f"),
    ("MTSR above T<sub>NR</sub>", ("mtsr_above_no_return",), ""),
    ("Synthesis cooling", ("synthesis_cooling", "synthesis_stability"), ""),
)


def html(data: dict) -> str:
    """An HTML block: verdict, key figures, vessel table, warnings count and the cautions.

    Parameters
    ----------
    data : dict
        JSON-ready result.
    """
    from screen.cautions import CAUTIONS

    results = data["results"]
    parts = ['<div class="runaway-screen-result">',
             f"<p><b>{escape(str(data['case']['title']))}</b> — "
             f"{escape(class_text(results))}</p>",
             f"<p>{escape(str(results.get('verdict', '')))}</p>",
             "<table><thead><tr><th>Key figure</th><th>Value</th><th>Unit</th></tr></thead>"
             "<tbody>"]
    for label, key, unit, digits in KEY_FIGURES:
        if key in results:
            value = results[key]
            shown = _number(value, digits) if digits else ("n/a" if value is None else value)
            if key in ("td24_degC", "td8_degC", "tmrad_at_mtsr_h") and _crude(results):
                shown = f"{shown}{_crude(results)}"
            parts.append(f"<tr><td>{label}</td><td style='text-align:right'>"
                         f"{escape(str(shown))}</td><td>{unit}</td></tr>")
    parts.append("</tbody></table>")
    vessels = results.get("vessels") or []
    if vessels:
        parts.append("<table><thead><tr>" + "".join(f"<th>{head}</th>" for head, _, _ in
                                                     VESSEL_COLUMNS) + "</tr></thead><tbody>")
        for vessel in vessels:
            cells = []
            for _, keys, digits in VESSEL_COLUMNS:
                value = next((vessel[key] for key in keys if key in vessel), None)
                if isinstance(value, bool):
                    value = "yes" if value else "no"
                shown = _number(value, digits) if digits else ("n/a" if value is None else value)
                cells.append(f"<td>{escape(str(shown))}</td>")
            parts.append("<tr>" + "".join(cells) + "</tr>")
        parts.append("</tbody></table>")
    warnings = data.get("warnings") or []
    if warnings:
        parts.append(f"<details><summary>{len(warnings)} warnings</summary><ul>"
                     + "".join(f"<li>{escape(w)}</li>" for w in warnings) + "</ul></details>")
    parts.append("<p style='font-size:smaller'><b>Cautions.</b> "
                 + " ".join(escape(c) for c in CAUTIONS) + "</p></div>")
    return "\n".join(parts)


def uncertainty_text(block: dict, title: str) -> str:
    """Short text of a Monte Carlo result: samples, seed, class probabilities, caution.

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of a Monte Carlo run.
    title : str
        Case title.
    """
    from screen.cautions import SHORT_CAUTION

    probabilities = ", ".join(f"{k}: {v:.3g}" for k, v in block["class_probabilities"].items())
    return (f"<uncertainty of {title!r}: {block['samples']} samples, seed {block['seed']}; "
            f"class probabilities {probabilities}; P(class >= 4) = "
            f"{block['probability_class_4_or_5']:.3g}>\n{SHORT_CAUTION}")


def uncertainty_html(block: dict, title: str, percentiles_html: str) -> str:
    """HTML of a Monte Carlo result: the confidence sentence, class probabilities, percentiles
    and the cautions.

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of a Monte Carlo run.
    title : str
        Case title.
    percentiles_html : str
        HTML table of the percentiles.
    """
    from screen.cautions import CAUTIONS

    rows = "".join(f"<tr><td>{escape(k)}</td><td style='text-align:right'>{v:.4g}</td></tr>"
                   for k, v in block["class_probabilities"].items())
    return "\n".join([
        '<div class="runaway-screen-uncertainty">',
        f"<p><b>{escape(title)}</b> — Monte Carlo, {block['samples']} samples, seed "
        f"{block['seed']}</p>",
        f"<p>{escape(str(block.get('confidence', '')))}</p>",
        "<table><thead><tr><th>Class</th><th>Probability</th></tr></thead><tbody>" + rows
        + "</tbody></table>",
        percentiles_html,
        "<p style='font-size:smaller'><b>Cautions.</b> " + " ".join(escape(c) for c in CAUTIONS)
        + "</p></div>"])
