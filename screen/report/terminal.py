"""Plain-text presentation of a screening result for the terminal. Reads results only."""

from __future__ import annotations

import textwrap

from screen.cautions import CAUTIONS

WIDTH = 78


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


def _wrap(text, indent="  "):
    return textwrap.fill(text, WIDTH, initial_indent=indent, subsequent_indent=indent)


def format_check(data: dict) -> str:
    """Format the JSON-ready dict of :meth:`ScreeningResult.to_json_dict` for the terminal.

    Parameters
    ----------
    data : dict
        JSON-ready result (temperatures in degC, times in h, as in the JSON).
    """
    r = data["results"]
    case = data["case"]
    lines = []
    title = f"Thermal screening: {case['title']}"
    if case.get("revision"):
        title += f"  (rev. {case['revision']})"
    lines.append(title)
    lines.append("=" * min(WIDTH, len(title)))
    lines.append(f"case file  {case['path']}  sha256 {case['sha256'][:16]}...")
    for text in data.get("overrides", []):
        lines.append(f"what-if    --set {text}")
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
    lines.append("Figures                          degC         K above T_p")
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
    lines.append("")
    if r["criticality_class"] is None:
        lines.append(f"Verdict: CANNOT CONCLUDE (no class granted)   severity {r['severity_4']} "
                     f"({r['severity']})")
    else:
        lines.append(f"Verdict: CLASS {r['criticality_class']}   severity {r['severity_4']} "
                     f"({r['severity']}), probability {r['probability_6']} ({r['probability']})")
    lines.append(_wrap(r["verdict"]))
    vessels = r.get("vessels") or []
    if vessels:
        lines.append("")
        lines.extend(format_vessels(vessels))
    for block in ("simulation", "pressure", "barrier", "scenarios", "uncertainty"):
        if block in r and isinstance(r[block], dict) and r[block].get("summary_lines"):
            lines.append("")
            lines.extend(r[block]["summary_lines"])
    lines.append("")
    if data["warnings"]:
        lines.append(f"Warnings ({len(data['warnings'])})")
        for text in data["warnings"]:
            lines.append(textwrap.fill(text, WIDTH, initial_indent="  - ",
                                       subsequent_indent="    "))
    else:
        lines.append("Warnings: none raised for this case")
    lines.append("")
    lines.append("Cautions")
    for text in data.get("cautions", CAUTIONS):
        lines.append(textwrap.fill(text, WIDTH, initial_indent="  * ", subsequent_indent="    "))
    return "\n".join(lines)


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
