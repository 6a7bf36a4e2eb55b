"""Figures of the PDF screening summary, as reportlab vector drawings.

Every function takes plain numbers and arrays (SI unless the name says otherwise) and returns a
``reportlab.graphics.shapes.Drawing`` (a platypus flowable) as wide as the text frame. Meaning
never rests on colour: line styles, markers, hatching and greys carry it; the one accent colour
(:data:`screen.report.style.ACCENT`) marks the cooling-failure path. The drawing primitives are
in :mod:`screen.report.plot`; reportlab is imported inside the functions.
"""

from __future__ import annotations

import math

import numpy as np

from screen.constants import SECONDS_PER_HOUR, ZERO_CELSIUS
from screen.report.plot import Axes, add_text, clip_segment, spread_labels, text_width
from screen.report.style import (
    ACCENT,
    FRAME_WIDTH,
    GREY_DARK,
    GREY_LIGHT,
    GREY_MID,
    GREY_PALE,
    INK,
)
from screen.units import to_celsius as _c

#: Width of every figure [pt]: the text frame.
WIDTH = FRAME_WIDTH

#: Line styles (dash patterns in pt): one per meaning, the same in every figure.
SOLID = None
DASHED = (5, 2.5)
DOTTED = (1, 2)
DASH_DOT = (6, 2, 1, 2)


def _drawing(height):
    from reportlab.graphics.shapes import Drawing

    return Drawing(WIDTH, height)



def _finite(value):
    return value is not None and math.isfinite(float(value))


# --------------------------------------------------------------------------------------------


def draw(data):
    """The reportlab drawing of one figure's data (a :class:`screen.report.figure_data.FigureData`:
    the drawing function named by ``data.drawing`` called with ``data.arguments``).

    Parameters
    ----------
    data : FigureData
        Figure data: drawing name and its keyword arguments.
    """
    if data.drawing not in DRAWINGS:
        raise ValueError(f"no drawing {data.drawing!r}")
    return globals()[data.drawing](**data.arguments)  # looked up now: patchable in tests


def temperature_scale(temperatures_k: dict, class_label=None):
    """The criticality picture: T_p, MTSR, MTT, TD24, TD8 and the final temperature in order.

    A final temperature far above the other levels is drawn as an arrow off the top of the
    scale, so that the order of T_p, MTSR, MTT and TD24 stays readable.

    Parameters
    ----------
    temperatures_k : dict
        ``T_p``, ``MTSR``, ``MTT``, ``TD24``, ``TD8``, ``final``. [K]
    class_label : str, optional
        Printed above the scale (e.g. "criticality class 3").
    """
    t = {key: _c(value) for key, value in temperatures_k.items() if _finite(value)}
    core = [t[key] for key in ("T_p", "MTSR", "MTT", "TD24", "TD8") if key in t]
    span = max(core) - min(core)
    bottom = min(core) - max(0.08 * span, 8.0)
    top = max(core) + max(0.30 * span, 20.0)
    final = t.get("final")
    off_scale = final is not None and final > top
    if final is not None and not off_scale:
        top = max(top, final + max(0.08 * span, 8.0))

    from reportlab.graphics.shapes import Line, Rect
    from reportlab.lib import colors

    height = 215.0
    drawing = _drawing(height)
    ax = Axes(drawing, 48.0, 8.0, WIDTH - 52.0, height - 30.0, (0.0, 10.0), (bottom, top))
    lines_end = 0.64
    ax.frame(ylabel="temperature [°C]", xticks=False, grid_x=False, grid_y=False)
    for value, _ in ax._ticks(ax.ylim, False):
        ax.hline(value, color=GREY_LIGHT, width=0.4, x_from=0.0, x_to=lines_end)
    gap = 10.5 * (top - bottom) / ax.height  # one label height in data units

    # Decomposition regions: TMRad between 24 h and 8 h (pale), below 8 h (hatched).
    td24, td8 = t.get("TD24"), t.get("TD8")
    if td24 is not None and td8 is not None:
        ax.band(ax.fx(0.0), ax.ty(td24), ax.fx(lines_end), ax.ty(td8), fill=GREY_PALE)
        ax.band(ax.fx(0.0), ax.ty(td8), ax.fx(lines_end), ax.ty(top), hatch=True,
                hatch_color=GREY_LIGHT, hatch_spacing=6.0)
        # The key to the two regions sits above the plot, where it never hides a level.
        key_x = WIDTH - 4.0 - text_width("TMRad < 8 h", 6.8) - 20.0
        key_x2 = key_x - 18.0 - text_width("TMRad 8–24 h", 6.8) - 20.0
        key_y = height - 10.0
        for x0, label, hatched in ((key_x2, "TMRad 8–24 h", False), (key_x, "TMRad < 8 h", True)):
            ax.foreground.add(Rect(x0, key_y - 4.0, 14.0, 8.0, strokeWidth=0.4,
                                   strokeColor=colors.HexColor(GREY_MID),
                                   fillColor=None if hatched else colors.HexColor(GREY_PALE)))
            if hatched:
                for offset in range(0, 24, 4):
                    clipped = clip_segment(x0 + offset - 8.0, key_y - 4.0, x0 + offset,
                                           key_y + 4.0, x0, key_y - 4.0, x0 + 14.0, key_y + 4.0)
                    if clipped is not None:
                        ax.foreground.add(Line(*clipped, strokeColor=colors.HexColor(GREY_MID),
                                               strokeWidth=0.45))
            add_text(drawing, x0 + 18.0, key_y, label, size=6.8, valign="middle",
                     color=GREY_DARK)

    styles = {
        "T_p": dict(color=GREY_DARK, width=0.9, dash=SOLID),
        "MTSR": dict(color=ACCENT, width=1.5, dash=SOLID),
        "MTT": dict(color=INK, width=1.1, dash=DASH_DOT),
        "TD24": dict(color=INK, width=1.1, dash=DASHED),
        "TD8": dict(color=INK, width=1.2, dash=DOTTED),
        "final": dict(color=ACCENT, width=1.0, dash=DASHED),
    }
    names = {"T_p": "T_{p}", "MTSR": "MTSR", "MTT": "MTT", "TD24": "T_{D24}", "TD8": "T_{D8}",
             "final": "T_{final}"}
    keys = [key for key in ("T_p", "MTSR", "MTT", "TD24", "TD8", "final")
            if key in t and not (key == "final" and off_scale)]
    for key in keys:
        ax.hline(t[key], x_from=0.02, x_to=lines_end, **styles[key])
    high_label = top - gap * (1.6 if off_scale else 0.5)
    placed = spread_labels([t[key] for key in keys], gap, low=bottom + gap / 2, high=high_label)

    for key, y in zip(keys, placed):
        ax.foreground.add(Line(ax.fx(lines_end), ax.ty(t[key]), ax.fx(lines_end) + 10,
                               ax.ty(y), strokeColor=colors.HexColor(GREY_MID),
                               strokeWidth=0.5))
        ax.text(ax.fx(lines_end) + 13, ax.ty(y), f"{names[key]}  {t[key]:.1f} °C", size=7.5,
                valign="middle", bold=key in ("MTSR", "MTT", "TD24"))
    if off_scale:
        ax.text(ax.fx(lines_end) + 13, ax.ty(top) - 2, f"T_{{final}}  {final:.1f} °C ↑",
                size=7.5, valign="top", color=ACCENT, bold=True)

    # The cooling-failure path: synthesis rise, then the decomposition rise.
    x_synthesis, x_decomposition = ax.fx(0.16), ax.fx(0.34)
    if "MTSR" in t and "T_p" in t:
        ax.arrow(x_synthesis, ax.ty(t["T_p"]), x_synthesis, ax.ty(t["MTSR"]), color=ACCENT,
                 width=1.6)
        ax.text(x_synthesis + 5, ax.ty((t["T_p"] + t["MTSR"]) / 2.0),
                f"synthesis +{t['MTSR'] - t['T_p']:.1f} K", size=6.8, valign="middle",
                background="#ffffff")
    if final is not None and "MTSR" in t:
        end = top if off_scale else final
        ax.arrow(x_decomposition, ax.ty(t["MTSR"]), x_decomposition, ax.ty(end), color=ACCENT,
                 width=1.2, dash=(4, 2))
        # Label in the widest free stretch of the arrow, away from the level lines.
        stops = sorted({t["MTSR"], end} | {v for k, v in t.items()
                                           if t["MTSR"] < v < end and k != "final"})
        lower, upper = max(zip(stops[:-1], stops[1:]), key=lambda pair: pair[1] - pair[0])
        middle = ax.ty((lower + upper) / 2.0) + (4.5 if off_scale else 0.0)
        ax.text(x_decomposition + 5, middle, f"decomposition +{final - t['MTSR']:.1f} K",
                size=6.8, valign="middle", background="#ffffff")
        if off_scale:
            ax.text(x_decomposition + 5, middle - 9, f"to T_{{final}} = {final:.1f} °C, above "
                    "the scale", size=6.3, valign="middle", background="#ffffff",
                    color=GREY_DARK)
    if class_label:
        add_text(drawing, 48.0, height - 10.0, str(class_label), size=8.5, bold=True,
                 color=ACCENT, valign="middle")
    return drawing


def tmrad_curve(temperature_k, tmrad_s, levels_k: dict, points=(), lowest_measured_k=None):
    """TMRad against start temperature on a log axis, with 8 h and 24 h marked.

    Parameters
    ----------
    temperature_k, tmrad_s : array
        Start temperature [K] and TMRad [s] (NaN where not defined).
    levels_k : dict
        ``TD24`` and ``TD8`` (either may be missing), drawn as vertical lines. [K]
    points : sequence of (str, float, float)
        Marked points: label, start temperature [K], TMRad [h] (the reported values, so that
        the figure and the tables agree).
    lowest_measured_k : float, optional
        Lowest temperature of the kinetic measurements: colder is hatched as extrapolation. [K]
    """
    temperature_c = np.asarray(temperature_k, dtype=float) - ZERO_CELSIUS
    hours = np.asarray(tmrad_s, dtype=float) / SECONDS_PER_HOUR
    valid = np.isfinite(hours) & (hours > 0) & np.isfinite(temperature_c)
    shown = [h for _, _, h in points if _finite(h) and h > 0]
    values = list(hours[valid]) + shown
    low = max(min(values + [1.0]) / 3.0, 1e-3)
    high = min(max(values + [100.0]) * 3.0, 1e9)
    low, high = 10.0 ** math.floor(math.log10(low)), 10.0 ** math.ceil(math.log10(high))

    height = 200.0
    drawing = _drawing(height)
    ax = Axes(drawing, 52.0, 36.0, WIDTH - 52.0 - 26.0, height - 36.0 - 8.0,
              (float(temperature_c[0]), float(temperature_c[-1])), (low, high), ylog=True)
    ax.frame(xlabel="start temperature [°C]", ylabel="TMRad [h]")
    extrapolated = False
    if _finite(lowest_measured_k):
        x = _c(lowest_measured_k)
        if x > temperature_c[0]:
            ax.band(ax.fx(0.0), ax.fy(0.0), ax.tx(min(x, temperature_c[-1])), ax.fy(1.0),
                    hatch=True, hatch_color=GREY_LIGHT, hatch_spacing=5.0, hatch_direction=-1)
            extrapolated = True
    for mark, dash, text in ((24.0, DASHED, "24 h"), (8.0, DOTTED, "8 h")):
        y = ax.hline(mark, color=INK, width=0.9, dash=dash)
        add_text(ax.foreground, ax.fx(1.0) + 3, y, text, size=7, valign="middle")
    for key, label, dash in (("TD24", "T_{D24}", DASHED), ("TD8", "T_{D8}", DOTTED)):
        if _finite(levels_k.get(key)):
            x = _c(levels_k[key])
            px = ax.vline(x, color=GREY_MID, width=0.8, dash=dash)
            # TD24 written left of its line, TD8 right of it: the two lines are often close.
            offset = -2.0 if key == "TD24" else 2.0 + 6.5 * 0.8
            ax.text(px + offset, ax.fy(0.03), f"{label} {x:.1f} °C", size=6.5, angle=90,
                    color=GREY_DARK, valign="baseline", background="#ffffff")
    ax.line(temperature_c[valid], hours[valid], color=INK, width=1.5)
    entries = [("line", dict(color=INK, width=1.5), "TMRad of the decomposition")]
    styles = (("s", INK, INK), ("D", ACCENT, ACCENT), ("o", "#ffffff", INK))
    for (label, temperature, value), (shape, fill, stroke) in zip(points, styles):
        if not (_finite(temperature) and _finite(value) and value > 0):
            continue
        ax.marker(_c(temperature), value, shape=shape, size=5.0, fill=fill, stroke=stroke)
        entries.append(("marker", dict(shape=shape, fill=fill, stroke=stroke, size=5.0),
                        f"{label}: TMRad {value:.3g} h"))
    if extrapolated:
        entries.append(("hatch", {}, "below the lowest measured temperature: extrapolated"))
    ax.legend(entries, corner="upper right")
    return drawing


def semenov_diagram(curve: dict):
    """Semenov diagram of one vessel: generation against removal at actual and critical T_c.

    Parameters
    ----------
    curve : dict
        As built by :func:`screen.analyses.vessels._semenov_curve`: ``temperature_K``, ``generation_W``,
        ``removal_actual_W``, ``removal_critical_W``, ``coolant_temperature_K``,
        ``critical_coolant_temperature_K``, ``tangency_temperature_K``,
        ``no_return_temperature_K`` (or None), ``mtsr_K``, ``name``.
    """
    temperature_c = np.asarray(curve["temperature_K"], dtype=float) - ZERO_CELSIUS
    generation = np.asarray(curve["generation_W"], dtype=float) / 1000.0
    removal = np.asarray(curve["removal_actual_W"], dtype=float) / 1000.0
    removal_critical = np.asarray(curve["removal_critical_W"], dtype=float) / 1000.0
    top = 1.15 * float(np.nanmax(np.maximum(removal, removal_critical)))
    if not top > 0:
        top = 1.0
    height = 180.0
    drawing = _drawing(height)
    ax = Axes(drawing, 52.0, 36.0, WIDTH - 52.0 - 10.0, height - 36.0 - 22.0,
              (float(temperature_c[0]), float(temperature_c[-1])), (0.0, top))
    ax.frame(xlabel="temperature of the reaction mass [°C]", ylabel="heat flow [kW]")
    add_text(drawing, 52.0, height - 10.0, str(curve.get("name", "")), size=8.5, bold=True,
             valign="middle")
    t_c = _c(curve["coolant_temperature_K"])
    t_crit = _c(curve["critical_coolant_temperature_K"])
    ax.line(temperature_c, removal, color=GREY_DARK, width=1.1, dash=DASHED)
    ax.line(temperature_c, removal_critical, color=ACCENT, width=1.3, dash=DOTTED)
    ax.line(temperature_c, generation, color=INK, width=1.6)
    mtsr = _c(curve.get("mtsr_K"))
    if mtsr is not None and temperature_c[0] <= mtsr <= temperature_c[-1]:
        px = ax.vline(mtsr, color=ACCENT, width=0.8, dash=DASH_DOT)
        ax.text(px + 2, ax.fy(0.60), f"MTSR {mtsr:.1f} °C", size=6.5, color=ACCENT,
                background="#ffffff")
    t_star = _c(curve.get("tangency_temperature_K"))
    if _finite(t_star):
        y = float(np.interp(t_star, temperature_c, generation))
        ax.marker(t_star, y, shape="o", size=4.0, fill=ACCENT, stroke=ACCENT)
        ax.text(ax.tx(t_star) - 5, ax.ty(y) + 5, f"tangency {t_star:.1f} °C", size=6.5,
                anchor="end", color=ACCENT, background="#ffffff")
    t_nr = _c(curve.get("no_return_temperature_K"))
    if _finite(t_nr):
        y = float(np.interp(t_nr, temperature_c, generation))
        px = ax.vline(t_nr, color=INK, width=0.7)
        ax.marker(t_nr, y, shape="o", size=5.5, fill="#ffffff", stroke=INK)
        label = f"T_{{NR}} {t_nr:.1f} °C"
        if px + 4 + text_width(label, 7.5, True) > ax.fx(1.0):
            ax.text(px - 4, ax.fy(0.95), label, size=7.5, bold=True, anchor="end",
                    valign="top", background="#ffffff")
        else:
            ax.text(px + 4, ax.fy(0.95), label, size=7.5, bold=True, valign="top",
                    background="#ffffff")
    else:
        ax.text(ax.fx(0.5), ax.fy(0.95), "no temperature of no return: the coolant is at or "
                "above its critical temperature", size=7.5, bold=True, anchor="middle",
                valign="top", background="#ffffff")
    ax.legend([("line", dict(color=INK, width=1.6), "heat generation (decomposition)"),
               ("line", dict(color=GREY_DARK, width=1.1, dash=DASHED),
                f"removal at actual T_{{c}} = {t_c:.1f} °C"),
               ("line", dict(color=ACCENT, width=1.3, dash=DOTTED),
                f"removal at critical T_{{c}} = {t_crit:.1f} °C")], corner="upper left")
    return drawing


def temperature_course(time_s, temperature_k, levels_k: dict, process_temperature_k=None,
                       time_to_maximum_rate_s=None, jump_at_start=True,
                       label="unmitigated adiabatic course from MTSR", extra_courses=(),
                       barrier_label=None, zoom=True):
    """Temperature-time course after a cooling failure.

    Parameters
    ----------
    time_s, temperature_k : array
        Time after the failure [s] and temperature of the mass [K].
    levels_k : dict
        Horizontal reference levels (``MTT``, ``TD24``, ...). [K]
    process_temperature_k : float, optional
        Drawn as the start of an instantaneous synthesis rise at t = 0 when ``jump_at_start``.
    time_to_maximum_rate_s : float, optional
        Marked on the curve. [s]
    jump_at_start : bool
        Draw the synthesis rise T_p -> first temperature at t = 0.
    label : str
        Legend text of the course.
    extra_courses : sequence of (array, array, str)
        Further courses (time after the failure [s], temperature [K], legend text), drawn
        dashed in the accent colour (e.g. the feed continuing after the failure).
    barrier_label : str, optional
        Legend text of what the barrier at the MTT does: from the moment the course reaches the
        MTT a thick dotted line holds the temperature there (boiling or relief).
    zoom : bool
        Add a lower panel over the range of T_p and the levels when the full course would
        squeeze them into a narrow band (the high end of a runaway is far above them).
    """
    def finite_course(time, temperature):
        hours = np.asarray(time, dtype=float) / SECONDS_PER_HOUR
        celsius = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
        valid = np.isfinite(hours) & np.isfinite(celsius)
        return hours[valid], celsius[valid]

    hours, celsius = finite_course(time_s, temperature_k)
    if not len(hours):
        hours, celsius = np.array([0.0, 1.0]), np.array([math.nan, math.nan])
    others = [(*finite_course(t, y), text) for t, y, text in extra_courses]
    others = [(h, c, text) for h, c, text in others if len(h) >= 2]
    end = max([float(hours[-1])] + [float(h[-1]) for h, _, _ in others]) or 1.0
    candidates = [v for v in celsius if math.isfinite(v)]
    candidates += [v for _, c, _ in others for v in c]
    candidates += [_c(v) for v in levels_k.values() if _finite(v)]
    t_p = _c(process_temperature_k) if _finite(process_temperature_k) else None
    if t_p is not None:
        candidates.append(t_p)
    low, high = min(candidates), max(candidates)
    margin = 0.05 * (high - low) or 5.0

    # The zoom window: T_p, the start of the course and the levels, where the decisions lie.
    near = [_c(v) for v in levels_k.values() if _finite(v)] + [t_p]
    near += [float(celsius[0])] if math.isfinite(celsius[0]) else []
    near = [v for v in near if v is not None]
    zoom_low, zoom_high = min(near), max(near)
    zoom_margin = max(0.12 * (zoom_high - zoom_low), 4.0)
    zoom_limits = (zoom_low - zoom_margin, zoom_high + zoom_margin)
    use_zoom = bool(zoom) and (high - low) > 3.0 * (zoom_limits[1] - zoom_limits[0])

    main_height = 205.0 - 36.0 - 8.0
    zoom_height = 105.0 if use_zoom else 0.0
    gap = 30.0 if use_zoom else 0.0
    height = 36.0 + zoom_height + gap + main_height + 8.0
    top = high + margin
    if not jump_at_start or barrier_label or others:
        # The legend (upper left) sits above the highest temperature of a course that rises
        # early and levels off.
        rows = 1 + len(others) + (1 if barrier_label else 0) + (1 if jump_at_start else 0)
        fraction = min((rows * 6.8 * 1.45 + 10.0) / main_height, 0.45)
        top = high + margin + fraction / (1.0 - fraction) * (high + margin - (low - margin))
    drawing = _drawing(height)
    xlim = (-0.015 * end, 1.02 * end)
    ax = Axes(drawing, 52.0, 36.0 + zoom_height + gap, WIDTH - 52.0 - 70.0, main_height, xlim,
              (low - margin, top))
    ax.frame(xlabel=None if use_zoom else "time after the cooling failure [h]",
             ylabel="temperature [°C]")
    entries = _course_panel(ax, hours, celsius, others, levels_k, t_p, jump_at_start,
                            time_to_maximum_rate_s, label, barrier_label)
    ax.legend(entries, corner="upper left")
    if use_zoom:
        zoom_ax = Axes(drawing, 52.0, 36.0, WIDTH - 52.0 - 70.0, zoom_height, xlim, zoom_limits)
        zoom_ax.frame(xlabel="time after the cooling failure [h]", ylabel="temperature [°C]")
        _course_panel(zoom_ax, hours, celsius, others, levels_k, t_p, jump_at_start,
                      time_to_maximum_rate_s, label, barrier_label)
        zoom_ax.text(zoom_ax.fx(0.0), zoom_ax.fy(1.0) + 4, "zoom on the range of T_{p}, MTSR, "
                     "the MTT and T_{D24} (the course leaves it upward)", size=6.8,
                     color=GREY_DARK)
    return drawing


def _course_panel(ax, hours, celsius, others, levels_k, t_p, jump_at_start, time_max, label,
                  barrier_label):
    """Levels, courses, the barrier at the MTT and the moment of maximum rate in one panel;
    returns the legend entries."""
    dashes = {"MTT": DASH_DOT, "TD24": DASHED, "TD8": DOTTED}
    names = {"MTT": "MTT", "TD24": "T_{D24}", "TD8": "T_{D8}"}
    labelled = [(key, _c(value)) for key, value in levels_k.items() if _finite(value)
                and ax.ylim[0] <= _c(value) <= ax.ylim[1]]
    placed = spread_labels([v for _, v in labelled], 9.5 * (ax.ylim[1] - ax.ylim[0]) / ax.height)
    for (key, value), y in zip(labelled, placed):
        ax.hline(value, color=GREY_DARK, width=0.9, dash=dashes.get(key))
        ax.text(ax.fx(1.0) + 3, ax.ty(y), f"{names.get(key, key)} {value:.1f} °C", size=6.8,
                valign="middle")
    entries = []
    if jump_at_start and t_p is not None and math.isfinite(celsius[0]):
        ax.line([0.0, 0.0], [t_p, celsius[0]], color=ACCENT, width=1.8)
        ax.marker(0.0, t_p, shape="s", size=4.0)
        entries.append(("line", dict(color=ACCENT, width=1.8),
                        "synthesis rise T_{p} → MTSR, taken as instantaneous at t = 0"))
    ax.line(hours, celsius, color=INK, width=1.6)
    entries.append(("line", dict(color=INK, width=1.6), label))
    for other_hours, other_celsius, text in others:
        ax.line(other_hours, other_celsius, color=ACCENT, width=1.4, dash=DASHED)
        entries.append(("line", dict(color=ACCENT, width=1.4, dash=DASHED), text))
    mtt = levels_k.get("MTT")
    if barrier_label and _finite(mtt):
        mtt_c = _c(mtt)
        reached = np.nonzero(celsius >= mtt_c)[0]
        if len(reached):
            start = float(hours[reached[0]])
            ax.line([start, float(hours[-1])], [mtt_c, mtt_c], color=ACCENT, width=2.4,
                    dash=DOTTED)
            ax.marker(start, mtt_c, shape="o", size=3.5, fill="#ffffff", stroke=ACCENT)
        entries.append(("line", dict(color=ACCENT, width=2.4, dash=DOTTED), barrier_label))
    if _finite(time_max):
        x = float(time_max) / SECONDS_PER_HOUR
        if hours[0] <= x <= hours[-1] * 1.0001:
            px = ax.vline(x, color=GREY_MID, width=0.8, dash=DOTTED)
            ax.text(px - 3, ax.fy(0.04), f"maximum rate after {x:.3g} h", size=6.5,
                    anchor="end", color=GREY_DARK, background="#ffffff")
    return entries


def run_profile(time_s, series, levels_k=None, marker_time_s=None):
    """Temperature profiles over a run (e.g. normal operation and MTSR(t)).

    Parameters
    ----------
    time_s : array
        Time since the start of the run. [s]
    series : sequence of (str, array, str)
        Label, temperature [K] and style (``"ink"`` solid, ``"accent"`` dashed accent).
    levels_k : dict, optional
        Horizontal reference levels (``MTT``). [K]
    marker_time_s : float, optional
        A moment to mark (the worst failure time). [s]
    """
    hours = np.asarray(time_s, dtype=float) / SECONDS_PER_HOUR
    curves = [(label, np.asarray(values, dtype=float) - ZERO_CELSIUS, style)
              for label, values, style in series]
    levels = {key: _c(value) for key, value in (levels_k or {}).items() if _finite(value)}
    values = [v for _, c, _ in curves for v in c if math.isfinite(v)] + list(levels.values())
    low, high = min(values), max(values)
    margin = 0.06 * (high - low) or 5.0
    end = float(np.nanmax(hours)) or 1.0
    height = 190.0
    drawing = _drawing(height)
    ax = Axes(drawing, 52.0, 36.0, WIDTH - 52.0 - 70.0, height - 36.0 - 8.0, (0.0, end * 1.01),
              (low - margin, high + margin))
    ax.frame(xlabel="time since the start of the run [h]", ylabel="temperature [°C]")
    for key, value in levels.items():
        y = ax.hline(value, color=GREY_DARK, width=0.9, dash=DASH_DOT)
        ax.text(ax.fx(1.0) + 3, y, f"{key} {value:.1f} °C", size=6.8, valign="middle")
    entries = []
    for label, values, style in curves:
        if style == "accent":
            ax.line(hours, values, color=ACCENT, width=1.4, dash=DASHED)
            entries.append(("line", dict(color=ACCENT, width=1.4, dash=DASHED), label))
        else:
            ax.line(hours, values, color=INK, width=1.4)
            entries.append(("line", dict(color=INK, width=1.4), label))
    if _finite(marker_time_s):
        x = float(marker_time_s) / SECONDS_PER_HOUR
        px = ax.vline(x, color=GREY_MID, width=0.8, dash=DOTTED)
        ax.text(px - 3, ax.fy(0.04), f"worst failure time {x:.3g} h", size=6.5, anchor="end",
                color=GREY_DARK, background="#ffffff")
    ax.legend(entries, corner="upper left")
    return drawing


def sensitivity_bars(names, values, value_label="sensitivity [-]", second_values=None,
                     series_labels=None):
    """Horizontal bar chart of a sensitivity ranking (largest magnitude on top).

    Parameters
    ----------
    names : sequence of str
        The inputs.
    values : sequence of float
        First measure per input (e.g. a rank correlation). [-]
    value_label : str
        Axis label.
    second_values : sequence of float, optional
        Second measure per input, drawn as a hatched bar below the first. [-]
    series_labels : (str, str), optional
        Legend texts of the two measures (used with ``second_values``).

    Values within [-1, 1] (correlations) are drawn on a symmetric axis from -1 to 1, so that
    the bar lengths compare between cases and the side shows the sign; other values on an axis
    fitted to them. The value is written at the end of each bar.
    """
    from reportlab.graphics.shapes import Rect
    from reportlab.lib import colors

    both = second_values is not None and len(second_values) == len(values)
    values = [float(v) for v in values]
    second = [float(v) for v in second_values] if both else [0.0] * len(values)
    magnitude = [max(abs(a), abs(b)) for a, b in zip(values, second)]
    order = sorted(range(len(values)), key=lambda i: magnitude[i])
    names = [str(names[i]) for i in order]
    values = [values[i] for i in order]
    second = [second[i] for i in order]
    row = 19.0 if both else 13.0
    legend_height = 14.0 if both else 0.0
    height = 48.0 + legend_height + row * max(len(values), 1)
    drawing = _drawing(height)
    label_width = min(max(text_width(n, 7.0) for n in names) + 10.0, 0.4 * WIDTH)
    largest = max(magnitude) if magnitude else 0.0
    correlation = largest <= 1.0
    limit = 1.0 if correlation else (largest or 1.0)
    negative = correlation or any(v < 0 for v in values + second)
    # Room beyond the bars for the value labels.
    xlim = ((-limit * 1.18 if negative else 0.0), limit * 1.18)
    ax = Axes(drawing, label_width, 34.0, WIDTH - label_width - 12.0,
              height - 42.0 - legend_height, xlim, (0.0, float(len(values))))
    ax.frame(xlabel=value_label, yticks=False, grid_y=False)
    zero = ax.vline(0.0, color=INK, width=0.6)

    def bar(value, bottom, top, hatched):
        x1 = ax.tx(value)
        left, width = min(zero, x1), abs(x1 - zero)
        ax.group.add(Rect(left, bottom, width, top - bottom,
                          fillColor=None if hatched else colors.HexColor(GREY_MID),
                          strokeColor=colors.HexColor(INK), strokeWidth=0.6))
        if hatched and width > 0:
            ax.band(left, bottom, left + width, top, hatch=True, hatch_color=INK,
                    hatch_spacing=3.0)
        text = "0.00" if abs(value) < 0.005 else f"{value:+.2f}"
        if value >= 0:
            ax.text(x1 + 2.5, (bottom + top) / 2.0, text, size=6.3, valign="middle",
                    color=GREY_DARK)
        else:
            ax.text(x1 - 2.5, (bottom + top) / 2.0, text, size=6.3, valign="middle",
                    anchor="end", color=GREY_DARK)

    for index, name in enumerate(names):
        if both:
            bar(values[index], ax.ty(index + 0.52), ax.ty(index + 0.88), False)
            bar(second[index], ax.ty(index + 0.12), ax.ty(index + 0.48), True)
        else:
            bar(values[index], ax.ty(index + 0.2), ax.ty(index + 0.8), False)
        add_text(ax.foreground, ax.x - 4, ax.ty(index + 0.5), name, size=7.0, anchor="end",
                 valign="middle")
    if both:
        labels = series_labels or ("first measure", "second measure")
        x = label_width
        y = height - 9.0
        for text, hatched in zip(labels, (False, True)):
            drawing.add(Rect(x, y - 4.0, 14.0, 8.0, strokeWidth=0.6,
                             strokeColor=colors.HexColor(INK),
                             fillColor=None if hatched else colors.HexColor(GREY_MID)))
            if hatched:
                for offset in range(0, 24, 3):
                    clipped = clip_segment(x + offset - 8.0, y - 4.0, x + offset, y + 4.0, x,
                                           y - 4.0, x + 14.0, y + 4.0)
                    if clipped is not None:
                        from reportlab.graphics.shapes import Line

                        drawing.add(Line(*clipped, strokeColor=colors.HexColor(INK),
                                         strokeWidth=0.45))
            width = add_text(drawing, x + 18.0, y, text, size=7.0, valign="middle")
            x += 18.0 + width + 18.0
    return drawing


#: Names of the drawing functions (:attr:`screen.report.figure_data.FigureData.drawing`).
DRAWINGS = ("temperature_scale", "tmrad_curve", "semenov_diagram", "temperature_course",
            "run_profile", "sensitivity_bars")
