"""The report figures as matplotlib figures, for notebooks (``ScreeningResult.figure``).

Each function draws one figure of the PDF from the same figure data
(:mod:`screen.report.figure_data`) that the reportlab figures of the PDF
(:mod:`screen.report.figures`) draw, with the same line styles per meaning; nothing is computed
here. matplotlib is an optional extra (``pip install 'runaway-screen[plot]'``); it is imported
inside the functions, without pyplot state (the figures display in Jupyter and can be saved).
"""

from __future__ import annotations

from screen.constants import ZERO_CELSIUS
from screen.errors import MissingDependencyError

#: The install hint of the optional plotting extra.
PLOT_EXTRA_HINT = "pip install 'runaway-screen[plot]'"


def require_matplotlib(purpose: str = "figures"):
    """Import and return matplotlib, or raise a one-line :class:`MissingDependencyError`.

    Parameters
    ----------
    purpose : str
        What needs it, for the message (e.g. "the kinetics figures (--png-dir)").
    """
    try:
        import matplotlib
    except ImportError:
        raise MissingDependencyError(f"{purpose} need matplotlib, which is not installed; "
                                     f"install it with {PLOT_EXTRA_HINT}") from None
    return matplotlib


def draw(data):
    """The matplotlib figure of one figure's data (a
    :class:`screen.report.figure_data.FigureData`), the same data the PDF draws.

    Parameters
    ----------
    data : FigureData
        Figure data: drawing name and its keyword arguments.

    Returns
    -------
    matplotlib.figure.Figure
        Without pyplot state: it displays in Jupyter and saves with ``savefig``. The short
        caution is printed at its foot.
    """
    from screen.report.figures import DRAWINGS

    if data.drawing not in DRAWINGS:
        raise ValueError(f"no drawing {data.drawing!r}")
    return globals()[data.drawing](**data.arguments)


# --------------------------------------------------------------------------------------------
# Shared pieces: styles of the PDF figures, text markup, the figure frame


def _style():
    from screen.report import figures, style

    return figures, style


def _dash(pattern):
    """A reportlab dash array [pt] as a matplotlib line style."""
    return "-" if not pattern else (0, tuple(pattern))


def _text(text: str) -> str:
    """``"T_{D24} at 10^{3}"`` (the markup of the PDF figures) as matplotlib mathtext."""
    from screen.report.plot import text_runs

    out = []
    for run, kind in text_runs(str(text)):
        if not kind:
            out.append(run.replace("$", r"\$"))
        else:
            mark = "_" if kind == "sub" else "^"
            escaped = run.replace("\\", "").replace("{", "").replace("}", "").replace(" ", r"\ ")
            out.append(f"${mark}{{\\mathrm{{{escaped}}}}}$")
    return "".join(out)


def _figure(height_in: float = 3.2):
    """A matplotlib Figure (no pyplot) with one axes and the short caution at its foot."""
    require_matplotlib("figures in Python (result.figure)")
    from matplotlib.figure import Figure

    from screen.cautions import SHORT_CAUTION

    figure = Figure(figsize=(7.0, height_in), layout="constrained")
    axes = figure.add_subplot()
    figure.text(0.005, 0.003, SHORT_CAUTION, fontsize=5.5, color="#595959", ha="left",
                va="bottom")
    figure.get_layout_engine().set(h_pad=0.12)
    return figure, axes


def _finite(value):
    import math

    return value is not None and math.isfinite(float(value))


def _c(value_k):
    return None if value_k is None else float(value_k) - ZERO_CELSIUS


# --------------------------------------------------------------------------------------------
# The figures (same names and arguments as screen.report.figures)


def temperature_scale(temperatures_k: dict, class_label=None):
    """Criticality temperature scale (see :func:`screen.report.figures.temperature_scale`).

    Parameters
    ----------
    temperatures_k : dict
        ``T_p``, ``MTSR``, ``MTT``, ``TD24``, ``TD8``, ``final``. [K]
    class_label : str, optional
        Printed above the scale (e.g. "criticality class 3").
    """
    figures, style = _style()
    figure, ax = _figure(3.4)
    t = {key: _c(value) for key, value in temperatures_k.items() if _finite(value)}
    core = [t[key] for key in ("T_p", "MTSR", "MTT", "TD24", "TD8") if key in t]
    span = max(core) - min(core)
    bottom = min(core) - max(0.08 * span, 8.0)
    top = max(core) + max(0.30 * span, 20.0)
    final = t.get("final")
    off_scale = final is not None and final > top
    if final is not None and not off_scale:
        top = max(top, final + max(0.08 * span, 8.0))
    ax.set_xlim(0.0, 1.0)
    ax.set_ylim(bottom, top)
    ax.set_xticks([])
    ax.set_ylabel("temperature [°C]")
    end = 0.64
    if "TD24" in t and "TD8" in t:
        ax.axhspan(t["TD24"], t["TD8"], xmax=end, color=style.GREY_PALE, label="TMRad 8–24 h")
        ax.axhspan(t["TD8"], top, xmax=end, facecolor="none", edgecolor=style.GREY_LIGHT,
                   hatch="///", linewidth=0.0, label="TMRad < 8 h")
    styles = {
        "T_p": (style.GREY_DARK, 0.9, figures.SOLID), "MTSR": (style.ACCENT, 1.5, figures.SOLID),
        "MTT": (style.INK, 1.1, figures.DASH_DOT), "TD24": (style.INK, 1.1, figures.DASHED),
        "TD8": (style.INK, 1.2, figures.DOTTED), "final": (style.ACCENT, 1.0, figures.DASHED),
    }
    names = {"T_p": "T_{p}", "MTSR": "MTSR", "MTT": "MTT", "TD24": "T_{D24}", "TD8": "T_{D8}",
             "final": "T_{final}"}
    keys = [key for key in styles if key in t and not (key == "final" and off_scale)]
    gap = 0.06 * (top - bottom)
    placed = figures_spread([t[key] for key in keys], gap, bottom + gap / 2, top - gap)
    for key, y in zip(keys, placed):
        color, width, dash = styles[key]
        ax.plot([0.02, end], [t[key], t[key]], color=color, linewidth=width,
                linestyle=_dash(dash))
        ax.annotate(_text(f"{names[key]}  {t[key]:.1f} °C"), xy=(end, t[key]),
                    xytext=(end + 0.03, y), fontsize=8, va="center",
                    fontweight="bold" if key in ("MTSR", "MTT", "TD24") else "normal",
                    arrowprops=dict(arrowstyle="-", color=style.GREY_MID, linewidth=0.5))
    if off_scale:
        ax.text(end + 0.03, top, _text(f"T_{{final}}  {final:.1f} °C ↑"), fontsize=8,
                va="top", color=style.ACCENT, fontweight="bold")
    if "MTSR" in t and "T_p" in t:
        ax.annotate("", xy=(0.16, t["MTSR"]), xytext=(0.16, t["T_p"]),
                    arrowprops=dict(arrowstyle="-|>", color=style.ACCENT, linewidth=1.6))
        ax.text(0.175, (t["T_p"] + t["MTSR"]) / 2.0, f"synthesis +{t['MTSR'] - t['T_p']:.1f} K",
                fontsize=7, va="center", backgroundcolor="white")
    if final is not None and "MTSR" in t:
        end_value = top if off_scale else final
        ax.annotate("", xy=(0.34, end_value), xytext=(0.34, t["MTSR"]),
                    arrowprops=dict(arrowstyle="-|>", color=style.ACCENT, linewidth=1.2,
                                    linestyle="--"))
        ax.text(0.355, (t["MTSR"] + end_value) / 2.0,
                f"decomposition +{final - t['MTSR']:.1f} K", fontsize=7, va="center",
                backgroundcolor="white")
    if class_label:
        ax.set_title(str(class_label), loc="left", fontsize=9, fontweight="bold",
                     color=style.ACCENT)
    if "TD24" in t and "TD8" in t:
        ax.legend(loc="lower right", fontsize=7, frameon=True)
    return figure


def figures_spread(values, gap, low, high):
    """Label positions at least ``gap`` apart (the de-overlap of the PDF figures).

    Parameters
    ----------
    values : sequence of float
        Wanted positions.
    gap : float
        Smallest distance between labels (same unit).
    low : float or None
        Lowest allowed position.
    high : float or None
        Highest allowed position.
    """
    from screen.report.plot import spread_labels

    return spread_labels(values, gap, low=low, high=high)


def tmrad_curve(temperature_k, tmrad_s, levels_k: dict, points=(), lowest_measured_k=None):
    """TMRad against the start temperature (see :func:`screen.report.figures.tmrad_curve`).

    Parameters
    ----------
    temperature_k : array
        Start temperature. [K]
    tmrad_s : array
        TMRad, NaN where not defined. [s]
    levels_k : dict
        ``TD24`` and ``TD8`` (either may be missing). [K]
    points : sequence of (str, float, float)
        Marked points: label, start temperature [K], TMRad [h].
    lowest_measured_k : float, optional
        Lowest temperature of the kinetic measurements. [K]
    """
    import numpy as np

    from screen.constants import SECONDS_PER_HOUR

    figures, style = _style()
    figure, ax = _figure(3.2)
    temperature_c = np.asarray(temperature_k, dtype=float) - ZERO_CELSIUS
    hours = np.asarray(tmrad_s, dtype=float) / SECONDS_PER_HOUR
    valid = np.isfinite(hours) & (hours > 0) & np.isfinite(temperature_c)
    # The axis range of the PDF figure: the curve and the points, whole decades.
    shown = [h for _, _, h in points if _finite(h) and h > 0]
    values = list(hours[valid]) + shown
    low = max(min(values + [1.0]) / 3.0, 1e-3)
    high = min(max(values + [100.0]) * 3.0, 1e9)
    ax.set_yscale("log")
    ax.set_ylim(10.0 ** np.floor(np.log10(low)), 10.0 ** np.ceil(np.log10(high)))
    ax.set_xlim(float(temperature_c[0]), float(temperature_c[-1]))
    ax.set_xlabel("start temperature [°C]")
    ax.set_ylabel("TMRad [h]")
    ax.grid(True, color=style.GREY_LIGHT, linewidth=0.4)
    if _finite(lowest_measured_k) and _c(lowest_measured_k) > temperature_c[0]:
        ax.axvspan(temperature_c[0], min(_c(lowest_measured_k), temperature_c[-1]),
                   facecolor="none", edgecolor=style.GREY_LIGHT, hatch="\\\\\\", linewidth=0.0,
                   label="below the lowest measured temperature: extrapolated")
    ax.plot(temperature_c[valid], hours[valid], color=style.INK, linewidth=1.5,
            label="TMRad of the decomposition")
    for mark, dash, text in ((24.0, figures.DASHED, "24 h"), (8.0, figures.DOTTED, "8 h")):
        ax.axhline(mark, color=style.INK, linewidth=0.9, linestyle=_dash(dash))
        ax.annotate(text, xy=(1.0, mark), xycoords=("axes fraction", "data"), xytext=(3, 0),
                    textcoords="offset points", fontsize=7, va="center")
    for key, label, dash in (("TD24", "T_{D24}", figures.DASHED),
                             ("TD8", "T_{D8}", figures.DOTTED)):
        if _finite(levels_k.get(key)):
            x = _c(levels_k[key])
            ax.axvline(x, color=style.GREY_MID, linewidth=0.8, linestyle=_dash(dash))
            ax.annotate(_text(f"{label} {x:.1f} °C"), xy=(x, 0.03),
                        xycoords=("data", "axes fraction"), rotation=90, fontsize=6.5,
                        color=style.GREY_DARK, ha="right" if key == "TD24" else "left",
                        va="bottom")
    shapes = (("s", style.INK, style.INK), ("D", style.ACCENT, style.ACCENT),
              ("o", "#ffffff", style.INK))
    for (label, temperature, value), (shape, fill, stroke) in zip(points, shapes):
        if _finite(temperature) and _finite(value) and value > 0:
            ax.plot([_c(temperature)], [value], marker=shape, markersize=6, linestyle="none",
                    markerfacecolor=fill, markeredgecolor=stroke,
                    label=_text(f"{label}: TMRad {value:.3g} h"))
    ax.legend(loc="upper right", fontsize=7)
    return figure


def semenov_diagram(curve: dict):
    """Semenov diagram of one vessel (see :func:`screen.report.figures.semenov_diagram`).

    Parameters
    ----------
    curve : dict
        Semenov curve of one vessel (temperatures in K, heat flows in W), as for
        :func:`screen.report.figures.semenov_diagram`.
    """
    import numpy as np

    figures, style = _style()
    figure, ax = _figure(3.2)
    temperature_c = np.asarray(curve["temperature_K"], dtype=float) - ZERO_CELSIUS
    generation = np.asarray(curve["generation_W"], dtype=float) / 1000.0
    removal = np.asarray(curve["removal_actual_W"], dtype=float) / 1000.0
    removal_critical = np.asarray(curve["removal_critical_W"], dtype=float) / 1000.0
    top = 1.15 * float(np.nanmax(np.maximum(removal, removal_critical)))
    ax.set_xlim(float(temperature_c[0]), float(temperature_c[-1]))
    ax.set_ylim(0.0, top if top > 0 else 1.0)
    ax.set_xlabel("temperature of the reaction mass [°C]")
    ax.set_ylabel("heat flow [kW]")
    ax.grid(True, color=style.GREY_LIGHT, linewidth=0.4)
    ax.set_title(str(curve.get("name", "")), loc="left", fontsize=9, fontweight="bold")
    ax.plot(temperature_c, generation, color=style.INK, linewidth=1.6,
            label="heat generation (decomposition)")
    ax.plot(temperature_c, removal, color=style.GREY_DARK, linewidth=1.1,
            linestyle=_dash(figures.DASHED),
            label=_text(f"removal at actual T_{{c}} = {_c(curve['coolant_temperature_K']):.1f} "
                        f"°C"))
    ax.plot(temperature_c, removal_critical, color=style.ACCENT, linewidth=1.3,
            linestyle=_dash(figures.DOTTED),
            label=_text(f"removal at critical T_{{c}} = "
                        f"{_c(curve['critical_coolant_temperature_K']):.1f} °C"))
    mtsr = _c(curve.get("mtsr_K"))
    if mtsr is not None and temperature_c[0] <= mtsr <= temperature_c[-1]:
        ax.axvline(mtsr, color=style.ACCENT, linewidth=0.8, linestyle=_dash(figures.DASH_DOT))
        ax.annotate(f"MTSR {mtsr:.1f} °C", xy=(mtsr, 0.6), xycoords=("data", "axes fraction"),
                    xytext=(2, 0), textcoords="offset points", fontsize=6.5, color=style.ACCENT)
    t_star = _c(curve.get("tangency_temperature_K"))
    if _finite(t_star):
        y = float(np.interp(t_star, temperature_c, generation))
        ax.plot([t_star], [y], marker="o", markersize=4, color=style.ACCENT, linestyle="none")
        ax.annotate(f"tangency {t_star:.1f} °C", xy=(t_star, y), xytext=(-5, 5),
                    textcoords="offset points", ha="right", fontsize=6.5, color=style.ACCENT)
    t_nr = _c(curve.get("no_return_temperature_K"))
    if _finite(t_nr):
        y = float(np.interp(t_nr, temperature_c, generation))
        ax.axvline(t_nr, color=style.INK, linewidth=0.7)
        ax.plot([t_nr], [y], marker="o", markersize=5.5, markerfacecolor="#ffffff",
                markeredgecolor=style.INK, linestyle="none")
        ax.annotate(_text(f"T_{{NR}} {t_nr:.1f} °C"), xy=(t_nr, 0.95),
                    xycoords=("data", "axes fraction"), xytext=(4, 0),
                    textcoords="offset points", fontsize=7.5, fontweight="bold", va="top")
    else:
        ax.text(0.5, 0.95, "no temperature of no return: the coolant is at or above its "
                "critical temperature", transform=ax.transAxes, fontsize=7.5,
                fontweight="bold", ha="center", va="top")
    ax.legend(loc="upper left", fontsize=7)
    return figure


def temperature_course(time_s, temperature_k, levels_k: dict, process_temperature_k=None,
                       time_to_maximum_rate_s=None, jump_at_start=True,
                       label="unmitigated: adiabatic decomposition from MTSR", extra_courses=(),
                       barrier_label=None, zoom=True):
    """Temperature course after a cooling failure (see
    :func:`screen.report.figures.temperature_course`: the same arguments, the barrier at the MTT
    and a lower zoom panel on the range of T_p and the levels where it is needed).

    Parameters
    ----------
    time_s : array
        Time after the failure. [s]
    temperature_k : array
        Temperature of the mass. [K]
    levels_k : dict
        Horizontal reference levels (``MTT``, ``TD24``, ...). [K]
    process_temperature_k : float, optional
        Start of the synthesis rise at t = 0. [K]
    time_to_maximum_rate_s : float, optional
        Marked on the curve. [s]
    jump_at_start : bool
        Draw the synthesis rise T_p -> first temperature at t = 0.
    label : str
        Legend text of the course.
    extra_courses : sequence of (array, array, str)
        Further courses: time [s], temperature [K], legend text.
    barrier_label : str, optional
        Legend of the barrier line: from the moment the course reaches the MTT, a thick dotted
        line holds the temperature there (boiling or relief).
    zoom : bool
        Add a lower panel over the range of T_p and the levels when the full course squeezes
        them into a narrow band.
    """
    import numpy as np

    from screen.constants import SECONDS_PER_HOUR

    figures, style = _style()

    def finite_course(time, temperature):
        hours = np.asarray(time, dtype=float) / SECONDS_PER_HOUR
        celsius = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
        valid = np.isfinite(hours) & np.isfinite(celsius)
        return hours[valid], celsius[valid]

    hours, celsius = finite_course(time_s, temperature_k)
    levels = {key: _c(value) for key, value in levels_k.items() if _finite(value)}
    t_p = _c(process_temperature_k) if _finite(process_temperature_k) else None
    near = list(levels.values()) + ([t_p] if t_p is not None else [])
    near += [float(celsius[0])] if len(celsius) else []
    values = list(celsius) + near
    use_zoom = False
    if zoom and near and values:
        pad = max(0.12 * (max(near) - min(near)), 4.0)
        zoom_limits = (min(near) - pad, max(near) + pad)
        use_zoom = (max(values) - min(values)) > 3.0 * (zoom_limits[1] - zoom_limits[0])
    figure, ax = _figure(5.0 if use_zoom else 3.3)
    panels = [ax]
    if use_zoom:
        ax.set_subplotspec(figure.add_gridspec(2, 1, height_ratios=(3, 2))[0])
        zoom_ax = figure.add_subplot(figure.axes[0].get_subplotspec().get_gridspec()[1],
                                     sharex=ax)
        zoom_ax.set_ylim(*zoom_limits)
        zoom_ax.set_title(_text("zoom on the range of T_{p}, MTSR, the MTT and T_{D24}"),
                          fontsize=7, loc="left")
        panels.append(zoom_ax)
    dashes = {"MTT": figures.DASH_DOT, "TD24": figures.DASHED, "TD8": figures.DOTTED}
    names = {"MTT": "MTT", "TD24": "T_{D24}", "TD8": "T_{D8}"}
    for panel in panels:
        panel.set_ylabel("temperature [°C]")
        panel.grid(True, color=style.GREY_LIGHT, linewidth=0.4)
        for key, value in levels.items():
            panel.axhline(value, color=style.GREY_DARK, linewidth=0.9,
                          linestyle=_dash(dashes.get(key)))
            panel.annotate(_text(f"{names.get(key, key)} {value:.1f} °C"),
                           xy=(1.0, value), xycoords=("axes fraction", "data"), xytext=(3, 0),
                           textcoords="offset points", fontsize=6.8, va="center",
                           annotation_clip=True)
        if jump_at_start and t_p is not None and len(celsius):
            panel.plot([0.0, 0.0], [t_p, celsius[0]], color=style.ACCENT, linewidth=1.8,
                       label=_text("synthesis rise T_{p} → MTSR, taken as instantaneous at "
                                   "t = 0"))
            panel.plot([0.0], [t_p], marker="s", markersize=4, color=style.INK,
                       linestyle="none")
        panel.plot(hours, celsius, color=style.INK, linewidth=1.6, label=label)
        for other_time, other_temperature, text in extra_courses:
            other_hours, other_celsius = finite_course(other_time, other_temperature)
            if len(other_hours) >= 2:
                panel.plot(other_hours, other_celsius, color=style.ACCENT, linewidth=1.4,
                           linestyle=_dash(figures.DASHED), label=text)
        if barrier_label and "MTT" in levels and len(celsius):
            reached = np.nonzero(celsius >= levels["MTT"])[0]
            if len(reached):
                panel.plot([hours[reached[0]], hours[-1]], [levels["MTT"]] * 2,
                           color=style.ACCENT, linewidth=2.4, linestyle=_dash(figures.DOTTED),
                           label=barrier_label)
            else:
                panel.plot([], [], color=style.ACCENT, linewidth=2.4,
                           linestyle=_dash(figures.DOTTED), label=barrier_label)
        if _finite(time_to_maximum_rate_s) and len(hours):
            x = float(time_to_maximum_rate_s) / SECONDS_PER_HOUR
            if hours[0] <= x <= hours[-1] * 1.0001:
                panel.axvline(x, color=style.GREY_MID, linewidth=0.8,
                              linestyle=_dash(figures.DOTTED))
                panel.annotate(f"maximum rate after {x:.3g} h", xy=(x, 0.04),
                               xycoords=("data", "axes fraction"), xytext=(-3, 0),
                               textcoords="offset points", ha="right", fontsize=6.5,
                               color=style.GREY_DARK)
    if use_zoom:
        panels[1].set_ylim(*zoom_limits)
    panels[-1].set_xlabel("time after the cooling failure [h]")
    ax.legend(loc="upper left", fontsize=7)
    return figure


def run_profile(time_s, series, levels_k=None, marker_time_s=None):
    """Temperature profiles over a run (see :func:`screen.report.figures.run_profile`).

    Parameters
    ----------
    time_s : array
        Time since the start of the run. [s]
    series : sequence of (str, array, str)
        Label, temperature [K] and style (``"ink"`` or ``"accent"``).
    levels_k : dict, optional
        Horizontal reference levels (``MTT``). [K]
    marker_time_s : float, optional
        A moment to mark (the worst failure time). [s]
    """
    import numpy as np

    from screen.constants import SECONDS_PER_HOUR

    figures, style = _style()
    figure, ax = _figure(3.1)
    hours = np.asarray(time_s, dtype=float) / SECONDS_PER_HOUR
    ax.set_xlabel("time since the start of the run [h]")
    ax.set_ylabel("temperature [°C]")
    ax.grid(True, color=style.GREY_LIGHT, linewidth=0.4)
    for key, value in (levels_k or {}).items():
        if _finite(value):
            ax.axhline(_c(value), color=style.GREY_DARK, linewidth=0.9,
                       linestyle=_dash(figures.DASH_DOT))
            ax.annotate(f"{key} {_c(value):.1f} °C", xy=(1.0, _c(value)),
                        xycoords=("axes fraction", "data"), xytext=(3, 0),
                        textcoords="offset points", fontsize=6.8, va="center")
    for label, values, kind in series:
        celsius = np.asarray(values, dtype=float) - ZERO_CELSIUS
        if kind == "accent":
            ax.plot(hours, celsius, color=style.ACCENT, linewidth=1.4,
                    linestyle=_dash(figures.DASHED), label=label)
        else:
            ax.plot(hours, celsius, color=style.INK, linewidth=1.4, label=label)
    if _finite(marker_time_s):
        x = float(marker_time_s) / SECONDS_PER_HOUR
        ax.axvline(x, color=style.GREY_MID, linewidth=0.8, linestyle=_dash(figures.DOTTED))
        ax.annotate(f"worst failure time {x:.3g} h", xy=(x, 0.04),
                    xycoords=("data", "axes fraction"), xytext=(-3, 0),
                    textcoords="offset points", ha="right", fontsize=6.5,
                    color=style.GREY_DARK)
    ax.legend(loc="upper left", fontsize=7)
    return figure


def sensitivity_bars(names, values, value_label="sensitivity [-]", second_values=None,
                     series_labels=None):
    """Sensitivity ranking (see :func:`screen.report.figures.sensitivity_bars`).

    Parameters
    ----------
    names : sequence of str
        The inputs.
    values : sequence of float
        First measure per input (e.g. a rank correlation). [-]
    value_label : str
        Axis label.
    second_values : sequence of float, optional
        Second measure per input. [-]
    series_labels : (str, str), optional
        Legend texts of the two measures.
    """
    import numpy as np

    figures, style = _style()
    both = second_values is not None and len(second_values) == len(values)
    values = [float(v) for v in values]
    second = [float(v) for v in second_values] if both else [0.0] * len(values)
    magnitude = [max(abs(a), abs(b)) for a, b in zip(values, second)]
    order = sorted(range(len(values)), key=lambda i: magnitude[i])
    figure, ax = _figure(1.2 + 0.32 * max(len(values), 1) * (1.6 if both else 1.0))
    rows = np.arange(len(order), dtype=float)
    height = 0.36 if both else 0.6
    first = [values[i] for i in order]
    labels = series_labels or ("first measure", "second measure")
    ax.barh(rows + (height / 2 if both else 0.0), first, height=height, color=style.GREY_MID,
            edgecolor=style.INK, linewidth=0.6, label=_text(labels[0]) if both else None)
    if both:
        ax.barh(rows - height / 2, [second[i] for i in order], height=height, color="none",
                edgecolor=style.INK, hatch="////", linewidth=0.6, label=_text(labels[1]))
        ax.legend(loc="lower right", fontsize=7)
    ax.set_yticks(rows, [str(names[i]) for i in order], fontsize=7)
    largest = max(magnitude) if magnitude else 0.0
    limit = 1.0 if largest <= 1.0 else largest
    negative = largest <= 1.0 or any(v < 0 for v in values + second)
    ax.set_xlim(-limit * 1.18 if negative else 0.0, limit * 1.18)
    ax.axvline(0.0, color=style.INK, linewidth=0.6)
    ax.set_xlabel(_text(value_label))
    ax.grid(True, axis="x", color=style.GREY_LIGHT, linewidth=0.4)
    return figure
