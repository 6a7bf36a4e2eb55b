"""A small vector plotting layer on reportlab graphics, for the report figures.

Why not matplotlib: importing it and rasterising a handful of figures costs more than the whole
screening run, and vector figures print crisper and use the same fonts as the text. The layer
does only what the report needs: linear and logarithmic axes with readable ticks, polylines
clipped to the plot area (NaN breaks a line), horizontal and vertical lines and bands, hatching,
markers, arrows, text with sub- and superscripts (``T_{D24}``, ``10^{3}``), a legend.

All functions work in drawing coordinates [pt] unless they belong to :class:`Axes`, which maps
data to drawing coordinates. reportlab is imported inside the functions.
"""

from __future__ import annotations

import math
import re

from screen.report.style import FONT, FONT_BOLD, GREY_DARK, GREY_LIGHT, INK

_MARKUP = re.compile(r"([_^])\{([^}]*)\}")


def _color(value):
    from reportlab.lib import colors

    if value is None:
        return None
    return colors.HexColor(value) if isinstance(value, str) else value


def text_runs(text: str):
    """Split ``"T_{D24} at 10^{3}"`` into runs ``(text, kind)`` with kind "", "sub" or "sup".

    Parameters
    ----------
    text : str
        Text with ``_{...}`` (subscript) and ``^{...}`` (superscript) markup.
    """
    runs, position = [], 0
    for match in _MARKUP.finditer(text):
        if match.start() > position:
            runs.append((text[position:match.start()], ""))
        runs.append((match.group(2), "sub" if match.group(1) == "_" else "sup"))
        position = match.end()
    if position < len(text):
        runs.append((text[position:], ""))
    return runs


def text_width(text: str, size: float, bold: bool = False) -> float:
    """Width of a marked-up text [pt].

    Parameters
    ----------
    text : str
        Marked-up text (see :func:`text_runs`).
    size : float
        Font size. [pt]
    bold : bool
        Bold font.
    """
    from reportlab.pdfbase.pdfmetrics import stringWidth

    font = FONT_BOLD if bold else FONT
    return sum(stringWidth(run, font, size * (0.72 if kind else 1.0))
               for run, kind in text_runs(text))


def add_text(group, x, y, text, size=7.0, anchor="start", color=INK, bold=False, angle=0.0,
             valign="baseline", background=None):
    """Draw marked-up text at (x, y); ``anchor`` start/middle/end, ``valign`` baseline/middle/
    top/bottom; ``angle`` in degrees (counter-clockwise); ``background`` a fill colour for a
    box behind the text (so that lines do not run through it).

    Parameters
    ----------
    group : reportlab.graphics.shapes.Group
        Group the text is added to.
    x : float
        Anchor abscissa, drawing coordinates. [pt]
    y : float
        Anchor ordinate, drawing coordinates. [pt]
    text : str
        Marked-up text (see :func:`text_runs`).
    size : float
        Font size. [pt]
    anchor : str
        Horizontal anchor: ``start``, ``middle`` or ``end``.
    color : str or Color
        Text colour (hex string or reportlab colour).
    bold : bool
        Bold font.
    angle : float
        Rotation, counter-clockwise. [deg]
    valign : str
        Vertical anchor: ``baseline``, ``middle``, ``top`` or ``bottom``.
    background : str or None
        Fill colour of a box behind the text; None for none.

    Returns
    -------
    float
        Width of the text. [pt]
    """
    from reportlab.graphics.shapes import Group, Rect, String

    from screen.report.text import drawable

    text = drawable(text)  # right-to-left order, codes for missing glyphs
    width = text_width(text, size, bold)
    dx = {"start": 0.0, "middle": -width / 2.0, "end": -width}[anchor]
    dy = {"baseline": 0.0, "middle": -0.35 * size, "top": -0.78 * size,
          "bottom": 0.22 * size}[valign]
    inner = Group()
    if background:
        inner.add(Rect(dx - 1.5, dy - 0.3 * size, width + 3.0, 1.25 * size,
                       fillColor=_color(background), strokeColor=None, strokeWidth=0))
    cursor = dx
    font = FONT_BOLD if bold else FONT
    for run, kind in text_runs(text):
        run_size = size * (0.72 if kind else 1.0)
        shift = {"": 0.0, "sub": -0.25 * size, "sup": 0.38 * size}[kind]
        inner.add(String(cursor, dy + shift, run, fontName=font, fontSize=run_size,
                         fillColor=_color(color)))
        from reportlab.pdfbase.pdfmetrics import stringWidth

        cursor += stringWidth(run, font, run_size)
    if angle:
        radians = math.radians(angle)
        cos, sin = math.cos(radians), math.sin(radians)
        inner.transform = (cos, sin, -sin, cos, x, y)
    else:
        inner.transform = (1, 0, 0, 1, x, y)
    group.add(inner)
    return width


def add_box(group, x, y, width, height, fill="#ffffff", stroke=None, stroke_width=0.6):
    """Add a rectangle (filled, optionally outlined) to ``group``.

    Parameters
    ----------
    group : reportlab.graphics.shapes.Group
        Group the box is added to.
    x : float
        Left edge, drawing coordinates. [pt]
    y : float
        Bottom edge, drawing coordinates. [pt]
    width : float
        Width. [pt]
    height : float
        Height. [pt]
    fill : str or None
        Fill colour.
    stroke : str or None
        Outline colour; None for no outline.
    stroke_width : float
        Outline width. [pt]
    """
    from reportlab.graphics.shapes import Rect

    group.add(Rect(x, y, width, height, fillColor=_color(fill), strokeColor=_color(stroke),
                   strokeWidth=stroke_width if stroke else 0))


def clip_segment(x0, y0, x1, y1, left, bottom, right, top):
    """Liang-Barsky clipping of a segment to a rectangle; None when outside.

    Parameters
    ----------
    x0 : float
        Start abscissa.
    y0 : float
        Start ordinate.
    x1 : float
        End abscissa.
    y1 : float
        End ordinate.
    left : float
        Left edge of the rectangle.
    bottom : float
        Bottom edge of the rectangle.
    right : float
        Right edge of the rectangle.
    top : float
        Top edge of the rectangle.

    Returns
    -------
    tuple of float or None
        (x0, y0, x1, y1) of the clipped segment, in the coordinates given.
    """
    dx, dy = x1 - x0, y1 - y0
    low, high = 0.0, 1.0
    for p, q in ((-dx, x0 - left), (dx, right - x0), (-dy, y0 - bottom), (dy, top - y0)):
        if p == 0.0:
            if q < 0.0:
                return None
            continue
        ratio = q / p
        if p < 0.0:
            if ratio > high:
                return None
            low = max(low, ratio)
        else:
            if ratio < low:
                return None
            high = min(high, ratio)
    return (x0 + low * dx, y0 + low * dy, x0 + high * dx, y0 + high * dy)


def nice_linear_ticks(low, high, target=6):
    """Round tick values covering [low, high] (steps of 1, 2, 2.5 or 5 times a power of 10).

    Parameters
    ----------
    low : float
        Lower end of the range (data units).
    high : float
        Upper end of the range (data units).
    target : int
        Wanted number of intervals (about).
    """
    span = high - low
    if not span > 0:
        return [low]
    raw = span / max(target, 1)
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(f * power for f in (1.0, 2.0, 2.5, 5.0, 10.0) if f * power >= raw)
    first = math.ceil(low / step - 1e-9) * step
    ticks = []
    value = first
    while value <= high + 1e-9 * step:
        ticks.append(0.0 if abs(value) < 1e-12 * step else value)
        value += step
    return ticks


def _tick_label(value, step):
    decimals = max(0, -int(math.floor(math.log10(step) + 1e-9))) if step > 0 else 0
    if step * 10 ** decimals != round(step * 10 ** decimals):
        decimals += 1
    return f"{value:.{decimals}f}"


class Axes:
    """A plot area inside a Drawing: data limits, scales, clipped drawing primitives."""

    def __init__(self, drawing, x, y, width, height, xlim, ylim, xlog=False, ylog=False):
        from reportlab.graphics.shapes import Group

        self.drawing = drawing
        self.x, self.y, self.width, self.height = x, y, width, height
        self.xlim, self.ylim = (float(xlim[0]), float(xlim[1])), (float(ylim[0]), float(ylim[1]))
        self.xlog, self.ylog = xlog, ylog
        self.background = Group()
        self.group = Group()
        self.foreground = Group()
        drawing.add(self.background)
        drawing.add(self.group)
        drawing.add(self.foreground)

    # coordinates ---------------------------------------------------------------------------

    @staticmethod
    def _scale(value, limits, log):
        low, high = limits
        if log:
            if value is None or not value > 0:
                return math.nan
            value, low, high = math.log10(value), math.log10(low), math.log10(high)
        return (value - low) / (high - low)

    def tx(self, value):
        """Drawing abscissa [pt] of a data x value (NaN when it cannot be shown on a log axis).

        Parameters
        ----------
        value : float
            Data x value.
        """
        return self.x + self.width * self._scale(float(value), self.xlim, self.xlog)

    def ty(self, value):
        """Drawing ordinate [pt] of a data y value (NaN when it cannot be shown on a log axis).

        Parameters
        ----------
        value : float
            Data y value.
        """
        return self.y + self.height * self._scale(float(value), self.ylim, self.ylog)

    def fx(self, fraction):
        """Drawing abscissa [pt] of a fraction of the axes width.

        Parameters
        ----------
        fraction : float
            0 at the left edge, 1 at the right edge. [-]
        """
        return self.x + self.width * fraction

    def fy(self, fraction):
        """Drawing ordinate [pt] of a fraction of the axes height.

        Parameters
        ----------
        fraction : float
            0 at the bottom edge, 1 at the top edge. [-]
        """
        return self.y + self.height * fraction

    # primitives ----------------------------------------------------------------------------

    def _stroke_kwargs(self, color, width, dash):
        kwargs = dict(strokeColor=_color(color), strokeWidth=width)
        if dash:
            kwargs["strokeDashArray"] = list(dash)
        return kwargs

    def polyline_points(self, xs, ys, left=None, bottom=None, right=None, top=None):
        """Drawing-coordinate runs of a data polyline clipped to the plot area.

        Parameters
        ----------
        xs : sequence of float
            Data x values.
        ys : sequence of float
            Data y values.
        left : float, optional
            Clip rectangle, left edge; default the axes. [pt]
        bottom : float, optional
            Clip rectangle, bottom edge; default the axes. [pt]
        right : float, optional
            Clip rectangle, right edge; default the axes. [pt]
        top : float, optional
            Clip rectangle, top edge; default the axes. [pt]
        """
        left = self.x if left is None else left
        bottom = self.y if bottom is None else bottom
        right = self.x + self.width if right is None else right
        top = self.y + self.height if top is None else top
        runs, current = [], []
        previous = None

        def same(p, q):
            return abs(p[0] - q[0]) < 1e-6 and abs(p[1] - q[1]) < 1e-6

        for xv, yv in zip(xs, ys):
            px, py = self.tx(xv), self.ty(yv)
            if not (math.isfinite(px) and math.isfinite(py)):
                if current:
                    runs.append(current)
                current, previous = [], None
                continue
            if previous is not None:
                clipped = clip_segment(previous[0], previous[1], px, py, left, bottom, right,
                                       top)
                if clipped is None:
                    if current:
                        runs.append(current)
                    current = []
                else:
                    start, end = clipped[:2], clipped[2:]
                    if not current or not same(current[-1], start):
                        if current:
                            runs.append(current)
                        current = [start]
                    current.append(end)
                    if not same(end, (px, py)):
                        runs.append(current)
                        current = []
            previous = (px, py)
        if current:
            runs.append(current)
        return [run for run in runs if len(run) >= 2]

    def line(self, xs, ys, color=INK, width=1.0, dash=None, layer=None):
        """Draw a data polyline clipped to the axes.

        Parameters
        ----------
        xs : sequence of float
            Data x values.
        ys : sequence of float
            Data y values.
        color : str
            Line colour.
        width : float
            Line width. [pt]
        dash : sequence of float or None
            Dash pattern; None for a solid line. [pt]
        layer : Group or None
            Group to draw into; None for the main layer.
        """
        from reportlab.graphics.shapes import PolyLine

        target = layer if layer is not None else self.group
        for run in self.polyline_points(xs, ys):
            flat = [coordinate for point in run for coordinate in point]
            target.add(PolyLine(flat, **self._stroke_kwargs(color, width, dash)))

    def hline(self, y, color=INK, width=0.8, dash=None, x_from=0.0, x_to=1.0):
        """Horizontal line at data y across the axes fractions x_from..x_to.

        Parameters
        ----------
        y : float
            Data y value.
        color : str
            Line colour.
        width : float
            Line width. [pt]
        dash : sequence of float or None
            Dash pattern; None for a solid line. [pt]
        x_from : float
            Start as a fraction of the axes width. [-]
        x_to : float
            End as a fraction of the axes width. [-]
        """
        from reportlab.graphics.shapes import Line

        py = self.ty(y)
        if math.isfinite(py) and self.y - 1e-6 <= py <= self.y + self.height + 1e-6:
            self.group.add(Line(self.fx(x_from), py, self.fx(x_to), py,
                                **self._stroke_kwargs(color, width, dash)))
        return py

    def vline(self, x, color=INK, width=0.8, dash=None, y_from=0.0, y_to=1.0):
        """Vertical line at data x across the axes fractions y_from..y_to; returns its x [pt].

        Parameters
        ----------
        x : float
            Data x value.
        color : str
            Line colour.
        width : float
            Line width. [pt]
        dash : sequence of float or None
            Dash pattern; None for a solid line. [pt]
        y_from : float
            Start as a fraction of the axes height. [-]
        y_to : float
            End as a fraction of the axes height. [-]
        """
        from reportlab.graphics.shapes import Line

        px = self.tx(x)
        if math.isfinite(px) and self.x - 1e-6 <= px <= self.x + self.width + 1e-6:
            self.group.add(Line(px, self.fy(y_from), px, self.fy(y_to),
                                **self._stroke_kwargs(color, width, dash)))
        return px

    def band(self, x0, y0, x1, y1, fill=None, hatch=None, hatch_color=GREY_LIGHT,
             hatch_spacing=5.0, hatch_direction=1):
        """A rectangle in drawing coordinates clipped to the axes, filled and/or hatched.

        Parameters
        ----------
        x0 : float
            One corner, abscissa. [pt]
        y0 : float
            One corner, ordinate. [pt]
        x1 : float
            Opposite corner, abscissa. [pt]
        y1 : float
            Opposite corner, ordinate. [pt]
        fill : str or None
            Fill colour; None for no fill.
        hatch : bool or None
            Draw diagonal hatching.
        hatch_color : str
            Colour of the hatching.
        hatch_spacing : float
            Distance between hatch lines. [pt]
        hatch_direction : int
            +1 rising, -1 falling hatch lines.
        """
        from reportlab.graphics.shapes import Line, Rect

        left, right = max(min(x0, x1), self.x), min(max(x0, x1), self.x + self.width)
        bottom, top = max(min(y0, y1), self.y), min(max(y0, y1), self.y + self.height)
        if right <= left or top <= bottom:
            return
        if fill:
            self.background.add(Rect(left, bottom, right - left, top - bottom,
                                     fillColor=_color(fill), strokeColor=None, strokeWidth=0))
        if hatch:
            span = (right - left) + (top - bottom)
            offset = 0.0
            while offset <= span:
                if hatch_direction > 0:
                    segment = (left + offset - (top - bottom), bottom, left + offset, top)
                else:
                    segment = (left + offset, bottom, left + offset - (top - bottom), top)
                clipped = clip_segment(*segment, left, bottom, right, top)
                if clipped is not None:
                    self.background.add(Line(*clipped, strokeColor=_color(hatch_color),
                                             strokeWidth=0.45))
                offset += hatch_spacing

    def marker(self, x, y, shape="o", size=4.5, fill=INK, stroke=INK):
        """Marker at a data point (skipped when not drawable).

        Parameters
        ----------
        x : float
            Data x value.
        y : float
            Data y value.
        shape : str
            ``o`` circle, ``s`` square or ``D`` diamond.
        size : float
            Marker size. [pt]
        fill : str
            Fill colour.
        stroke : str
            Outline colour.
        """
        from reportlab.graphics.shapes import Circle, Polygon, Rect

        px, py = self.tx(x), self.ty(y)
        if not (math.isfinite(px) and math.isfinite(py)):
            return
        half = size / 2.0
        if shape == "s":
            shape_object = Rect(px - half, py - half, size, size)
        elif shape == "D":
            shape_object = Polygon([px, py - half * 1.25, px + half * 1.25, py, px,
                                    py + half * 1.25, px - half * 1.25, py])
        else:
            shape_object = Circle(px, py, half)
        shape_object.fillColor = _color(fill)
        shape_object.strokeColor = _color(stroke)
        shape_object.strokeWidth = 0.8
        self.foreground.add(shape_object)

    def arrow(self, x0, y0, x1, y1, color=INK, width=1.2, dash=None, head=5.0):
        """Arrow in drawing coordinates from (x0, y0) to (x1, y1).

        Parameters
        ----------
        x0 : float
            Tail abscissa. [pt]
        y0 : float
            Tail ordinate. [pt]
        x1 : float
            Tip abscissa. [pt]
        y1 : float
            Tip ordinate. [pt]
        color : str
            Colour.
        width : float
            Line width. [pt]
        dash : sequence of float or None
            Dash pattern of the shaft. [pt]
        head : float
            Length of the head. [pt]
        """
        from reportlab.graphics.shapes import Line, Polygon

        length = math.hypot(x1 - x0, y1 - y0)
        if length <= 0:
            return
        ux, uy = (x1 - x0) / length, (y1 - y0) / length
        base_x, base_y = x1 - head * ux, y1 - head * uy
        self.foreground.add(Line(x0, y0, base_x, base_y,
                                 **self._stroke_kwargs(color, width, dash)))
        self.foreground.add(Polygon([x1, y1, base_x - 0.45 * head * uy, base_y + 0.45 * head * ux,
                                     base_x + 0.45 * head * uy, base_y - 0.45 * head * ux],
                                    fillColor=_color(color), strokeColor=_color(color),
                                    strokeWidth=0.5))

    def text(self, x, y, text, **kwargs):
        """Text at drawing coordinates (in the foreground layer).

        Parameters
        ----------
        x : float
            Anchor abscissa. [pt]
        y : float
            Anchor ordinate. [pt]
        text : str
            Marked-up text.
        **kwargs
            Keyword arguments of :func:`add_text`.
        """
        return add_text(self.foreground, x, y, text, **kwargs)

    # frame ---------------------------------------------------------------------------------

    def frame(self, xlabel=None, ylabel=None, xticks=True, yticks=True, grid_x=True,
              grid_y=True, size=7.0):
        """Left and bottom axis lines, ticks, tick labels, grid and axis labels.

        Parameters
        ----------
        xlabel : str or None
            Label of the x axis.
        ylabel : str or None
            Label of the y axis.
        xticks : bool
            Draw x ticks and tick labels.
        yticks : bool
            Draw y ticks and tick labels.
        grid_x : bool
            Draw vertical grid lines.
        grid_y : bool
            Draw horizontal grid lines.
        size : float
            Font size of the labels. [pt]
        """
        from reportlab.graphics.shapes import Line

        ink, grid = _color(INK), _color(GREY_LIGHT)
        if xticks:
            for value, label in self._ticks(self.xlim, self.xlog):
                px = self.tx(value)
                if grid_x:
                    self.background.add(Line(px, self.y, px, self.y + self.height,
                                             strokeColor=grid, strokeWidth=0.4))
                self.group.add(Line(px, self.y, px, self.y - 3, strokeColor=ink,
                                    strokeWidth=0.6))
                add_text(self.foreground, px, self.y - 4, label, size=size, anchor="middle",
                         valign="top")
            self.foreground.add(Line(self.x, self.y, self.x + self.width, self.y,
                                     strokeColor=ink, strokeWidth=0.7))
        if yticks:
            for value, label in self._ticks(self.ylim, self.ylog):
                py = self.ty(value)
                if grid_y:
                    self.background.add(Line(self.x, py, self.x + self.width, py,
                                             strokeColor=grid, strokeWidth=0.4))
                self.group.add(Line(self.x, py, self.x - 3, py, strokeColor=ink,
                                    strokeWidth=0.6))
                add_text(self.foreground, self.x - 4, py, label, size=size, anchor="end",
                         valign="middle")
        self.foreground.add(Line(self.x, self.y, self.x, self.y + self.height, strokeColor=ink,
                                 strokeWidth=0.7))
        if xlabel:
            add_text(self.foreground, self.x + self.width / 2.0, self.y - 17, xlabel,
                     size=size + 0.5, anchor="middle", valign="top")
        if ylabel:
            add_text(self.foreground, self.x - 30, self.y + self.height / 2.0, ylabel,
                     size=size + 0.5, anchor="middle", valign="bottom", angle=90)

    def _ticks(self, limits, log):
        low, high = limits
        if log:
            first, last = math.ceil(math.log10(low) - 1e-9), math.floor(math.log10(high) + 1e-9)
            every = 1 if last - first <= 7 else 2 if last - first <= 14 else 3
            ticks = []
            for exponent in range(first, last + 1):
                if (exponent - first) % every:
                    continue
                if -1 <= exponent <= 3:
                    label = f"{10.0 ** exponent:g}"
                else:
                    label = f"10^{{{exponent}}}"
                ticks.append((10.0 ** exponent, label))
            return ticks
        values = nice_linear_ticks(low, high)
        step = values[1] - values[0] if len(values) > 1 else 1.0
        return [(value, _tick_label(value, step)) for value in values]

    def legend(self, entries, corner="upper left", size=6.8, pad=4.0):
        """Legend box; entries are (kind, style dict, label) with kind line/marker/hatch.

        Parameters
        ----------
        entries : sequence of (str, dict, str)
            (kind, style, label); kind ``line``, ``marker`` or ``hatch``.
        corner : str
            ``upper left``, ``upper right``, ``lower left`` or ``lower right``.
        size : float
            Font size. [pt]
        pad : float
            Padding inside the box. [pt]
        """
        from reportlab.graphics.shapes import Line, Rect

        if not entries:
            return
        row = size * 1.45
        sample = 16.0
        width = sample + 5 + max(text_width(label, size) for _, _, label in entries) + 2 * pad
        height = row * len(entries) + pad
        left = self.x + pad if "left" in corner else self.x + self.width - width - pad
        top = self.y + self.height - pad if "upper" in corner else self.y + pad + height
        add_box(self.foreground, left, top - height, width, height, fill="#ffffff")
        for index, (kind, style, label) in enumerate(entries):
            y = top - pad / 2.0 - row * (index + 0.5)
            x = left + pad
            if kind == "line":
                self.foreground.add(Line(x, y, x + sample, y, **self._stroke_kwargs(
                    style.get("color", INK), style.get("width", 1.0), style.get("dash"))))
            elif kind == "marker":
                self._legend_marker(x + sample / 2.0, y, style)
            elif kind == "hatch":
                self.foreground.add(Rect(x, y - 3.5, sample, 7, fillColor=None,
                                         strokeColor=_color(GREY_DARK), strokeWidth=0.4))
                for offset in range(0, 24, 4):
                    clipped = clip_segment(x + offset - 7, y - 3.5, x + offset, y + 3.5, x,
                                           y - 3.5, x + sample, y + 3.5)
                    if clipped is not None:
                        self.foreground.add(Line(*clipped, strokeColor=_color(GREY_DARK),
                                                 strokeWidth=0.4))
            add_text(self.foreground, x + sample + 5, y, label, size=size, valign="middle")

    def _legend_marker(self, x, y, style):
        from reportlab.graphics.shapes import Circle, Polygon, Rect

        half = style.get("size", 4.5) / 2.0
        shape = style.get("shape", "o")
        if shape == "s":
            item = Rect(x - half, y - half, 2 * half, 2 * half)
        elif shape == "D":
            item = Polygon([x, y - half * 1.25, x + half * 1.25, y, x, y + half * 1.25,
                            x - half * 1.25, y])
        else:
            item = Circle(x, y, half)
        item.fillColor = _color(style.get("fill", INK))
        item.strokeColor = _color(style.get("stroke", INK))
        item.strokeWidth = 0.8
        self.foreground.add(item)


def spread_labels(values, gap, low=None, high=None):
    """Label positions near ``values`` but at least ``gap`` apart (same order as ``values``).

    A one-dimensional de-overlap: sort, push each label up to keep the gap, then shift the
    block down if it passes ``high`` (never below ``low``).

    Parameters
    ----------
    values : sequence of float
        Wanted positions.
    gap : float
        Smallest distance between labels (same unit).
    low : float, optional
        Lowest allowed position.
    high : float, optional
        Highest allowed position.
    """
    order = sorted(range(len(values)), key=lambda i: values[i])
    placed = [0.0] * len(values)
    previous = -math.inf
    for i in order:
        position = max(values[i], previous + gap)
        placed[i] = position
        previous = position
    if high is not None and order:
        excess = placed[order[-1]] - high
        if excess > 0:
            floor = -math.inf if low is None else low
            following = math.inf
            for i in reversed(order):
                position = min(placed[i] - excess, following - gap)
                placed[i] = max(position, floor)
                following = placed[i]
    return placed
