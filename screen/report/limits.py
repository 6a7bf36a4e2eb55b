"""Presentation of the safe operating limits (``results.limits``): terminal table, CSV rows, the
PDF block. Reads the JSON dict only; computes nothing."""

from __future__ import annotations

import textwrap

#: Columns of the CSV table, in order (every entry of ``results.limits`` has them).
CSV_COLUMNS = ("key", "vessel", "criterion", "status", "bound", "value", "unit", "current_value",
               "margin", "achievable", "satisfied_now", "range_low", "range_high", "tolerance",
               "text")

#: What each status means, in words a reviewer reads.
STATUS_WORDS = {
    "limit": "",
    "not achievable": "no value in range achieves it",
    "not demonstrated": "not demonstrated in range",
    "holds in range": "no limit in range",
}


def _criterion_heading(entry: dict, current_class) -> str:
    text = entry.get("criterion_text") or entry["criterion"]
    if entry["criterion"].startswith("class"):
        text += f" (today class {current_class if current_class is not None else 'n/c'})"
    if entry.get("vessel"):
        text = f"{entry['vessel']}: {text}"
    return text


def limit_lines(data: dict, width: int = 78) -> list[str]:
    """The limits block as text lines (heading, grouped table, unrestricted inputs).

    Parameters
    ----------
    data : dict
        The JSON result (``results.limits``, ``results.limits_basis``).
    width : int
        Line width. [characters]

    Returns
    -------
    list of str
    """
    r = data["results"]
    entries = r.get("limits") or []
    basis = r.get("limits_basis") or {}
    klass = r.get("criticality_class")
    lines = ["Safe operating limits (each input varied alone, the others as in the case)"]
    lines.extend(textwrap.wrap(
        f"target class {basis.get('target_class', '?')} or better (today "
        f"{klass if klass is not None else 'n/c'}); onset margin TD24 - MTSR at least "
        f"{basis.get('margin_K', 50):g} K ({basis.get('margin_basis', '')}); limits located to "
        f"{basis.get('relative_tolerance', 1e-6):g} of each input's admissible range by "
        f"rerunning the screening ({basis.get('screenings', '?')} screenings)",
        width, initial_indent="  ", subsequent_indent="  "))
    groups: dict[tuple, list[dict]] = {}
    unrestricted: dict[str, list[str]] = {}
    for entry in entries:
        if entry["status"] == "holds in range":
            label = entry.get("criterion_text") or entry["criterion"]
            if entry.get("vessel"):
                label = f"{entry['vessel']}: {label}"
            unrestricted.setdefault(label, []).append(entry["key"])
            continue
        groups.setdefault((entry["criterion"], entry.get("vessel")), []).append(entry)
    if not groups:
        lines.append("  no limit found within the admissible ranges")
    for members in groups.values():
        lines.append("")
        lines.append("  " + _criterion_heading(members[0], klass)
                     + ("" if members[0]["satisfied_now"] else "  -- NOT MET TODAY"))
        notes = []
        for entry in members:
            for k, line in enumerate(textwrap.wrap(entry["text"], width - 6)):
                lines.append(("    - " if k == 0 else "      ") + line)
            if entry.get("note") and entry["note"] not in notes:
                notes.append(entry["note"])
        for note in notes:  # each reason once per criterion
            lines.extend(textwrap.wrap(f"why: {note}", width - 4, initial_indent="    ",
                                       subsequent_indent="      "))
    if unrestricted:
        lines.append("")
        lines.append("  No limit within the admissible range of:")
        for label, keys in unrestricted.items():
            lines.extend(textwrap.wrap(f"{label}: {', '.join(keys)}", width - 4,
                                       initial_indent="    ", subsequent_indent="      "))
    return lines


def format_limits(data: dict, width: int = 78) -> str:
    """Terminal text of the ``limits`` command: caution line, title, the limits block, cautions.

    Parameters
    ----------
    data : dict
        The JSON result (``results.limits``, ``results.limits_basis``).
    width : int
        Line width. [characters]

    Returns
    -------
    str
    """
    from screen.cautions import CAUTIONS, SHORT_CAUTION

    title = data.get("case", {}).get("title") or ""
    head = f"Safe operating limits: {title}"
    lines = textwrap.wrap(SHORT_CAUTION, width) + [head, "=" * min(len(head), width)]
    case = data.get("case") or {}
    if case.get("path"):
        lines.append(f"case file  {case['path']}")
    lines.append("")
    lines.extend(limit_lines(data, width))
    lines.append("")
    lines.append("Cautions")
    for caution in CAUTIONS:
        lines.extend(textwrap.wrap(caution, width - 4, initial_indent="  * ",
                                   subsequent_indent="    "))
    return "\n".join(lines)


def csv_rows(data: dict) -> list[dict]:
    """One CSV row per entry of ``results.limits`` (columns :data:`CSV_COLUMNS`).

    Parameters
    ----------
    data : dict
        The JSON result.

    Returns
    -------
    list of dict
        Values in the case file's units (column ``unit``).
    """
    rows = []
    for entry in data["results"].get("limits") or []:
        low, high = entry.get("range") or (None, None)
        row = {name: entry.get(name) for name in CSV_COLUMNS}
        row["range_low"], row["range_high"] = low, high
        rows.append(row)
    return rows


# --------------------------------------------------------------------------------------------
# Operating-window figure (reportlab vector drawing, readable in black and white)

#: Fill of each criticality class: lighter is better (no colour needed to read it).
CLASS_FILLS = {1: "#ffffff", 2: "#f0f0f0", 3: "#d9d9d9", 4: "#b3b3b3", 5: "#8c8c8c"}
#: Line style of each per-vessel criterion's boundary (dash pattern in pt; None solid).
CRITERION_STYLES = {
    "decomposition_stability": dict(dash=None, width=1.6, label="decomposition stability"),
    "synthesis_cooling": dict(dash=(5, 2.5), width=1.3, label="synthesis cooling"),
    "barrier": dict(dash=(1, 2), width=1.3, label="evaporative barrier"),
    "relief_pressure": dict(dash=(6, 2, 1, 2), width=1.1, label="relief pressure"),
}


def _cell_edges(values):
    """Edges of the cells around grid values (half-way between neighbours)."""
    edges = [values[0] - 0.5 * (values[1] - values[0])]
    edges += [0.5 * (a + b) for a, b in zip(values[:-1], values[1:])]
    edges.append(values[-1] + 0.5 * (values[-1] - values[-2]))
    return edges


def _boundary_segments(grid, xe, ye):
    """Cell edges between neighbouring cells whose value differs: [(x0, y0, x1, y1)] in data."""
    segments = []
    rows, cols = len(grid), len(grid[0])
    for j in range(rows):
        for i in range(cols):
            if i + 1 < cols and grid[j][i] != grid[j][i + 1]:
                segments.append((xe[i + 1], ye[j], xe[i + 1], ye[j + 1]))
            if j + 1 < rows and grid[j][i] != grid[j + 1][i]:
                segments.append((xe[i], ye[j + 1], xe[i + 1], ye[j + 1]))
    return segments


def window_figure(window: dict, vessels_numbered=None, caution: str | None = None):
    """Operating window over two inputs: regions by class (greys, lighter is better), regions
    where a vessel's decomposition is not recoverable (hatched /) or its synthesis cooling is
    not adequate (hatched \\), per-vessel verdict boundaries (one line style per criterion,
    labelled V1, V2, ...), the target-class edge (heavy line) and today's point.

    Parameters
    ----------
    window : dict
        As built by :func:`screen.runs.limits.operating_window`. [case file units]
    vessels_numbered : list of str, optional
        Vessel names in file order (for the V1, V2 labels). [-]
    caution : str, optional
        Cautions printed under the plot, wrapped (standalone figure files). [-]

    Returns
    -------
    reportlab.graphics.shapes.Drawing
        As wide as the text frame. [pt]
    """
    from reportlab.graphics.shapes import Drawing, Line, Rect

    from screen.report.figures import WIDTH
    from screen.report.plot import Axes, add_text
    from screen.report.style import GREY_DARK, INK

    import textwrap

    xs, ys = window["x"], window["y"]
    xe, ye = _cell_edges(xs), _cell_edges(ys)
    caution_lines = textwrap.wrap(caution, 150) if caution else []
    height = 285.0 + 8.0 * len(caution_lines)
    bottom = 48.0 + 8.0 * len(caution_lines)
    drawing = Drawing(WIDTH, height)
    ax = Axes(drawing, 58.0, bottom, WIDTH - 58.0 - 122.0, height - bottom - 16.0,
              (xe[0], xe[-1]), (ye[0], ye[-1]))
    kx, ky = window["keys"]
    ux, uy = window["unit_x"], window["unit_y"]
    ax.frame(xlabel=f"{kx}" + (f" [{ux}]" if ux else ""),
             ylabel=f"{ky}" + (f" [{uy}]" if uy else ""), grid_x=False, grid_y=False)
    classes = window["classes"]
    verdicts = window.get("verdicts", {})
    failing_decomposition = _any_failing(verdicts.get("decomposition_stability", {}))
    failing_synthesis = _any_failing(verdicts.get("synthesis_cooling", {}))
    for j in range(len(ys)):
        for i in range(len(xs)):
            x0, x1, y0, y1 = ax.tx(xe[i]), ax.tx(xe[i + 1]), ax.ty(ye[j]), ax.ty(ye[j + 1])
            klass = classes[j][i]
            ax.band(x0, y0, x1, y1, fill=CLASS_FILLS.get(klass, "#ffffff"))
            if klass is None:
                ax.band(x0, y0, x1, y1, hatch=True, hatch_color=GREY_DARK, hatch_spacing=2.5)
            if failing_decomposition and failing_decomposition[j][i]:
                ax.band(x0, y0, x1, y1, hatch=True, hatch_color=INK, hatch_spacing=4.0,
                        hatch_direction=1)
            if failing_synthesis and failing_synthesis[j][i]:
                ax.band(x0, y0, x1, y1, hatch=True, hatch_color=GREY_DARK, hatch_spacing=6.0,
                        hatch_direction=-1)
    # Class numbers at the cell nearest each region's centre.
    for klass in sorted({c for row in classes for c in row if c is not None}):
        cells = [(i, j) for j, row in enumerate(classes) for i, c in enumerate(row) if c == klass]
        ci = sum(i for i, _ in cells) / len(cells)
        cj = sum(j for _, j in cells) / len(cells)
        i, j = min(cells, key=lambda c: (c[0] - ci) ** 2 + (c[1] - cj) ** 2)
        ax.text(ax.tx(xs[i]), ax.ty(ys[j]), f"{klass}", size=9.5, bold=True, anchor="middle",
                valign="middle", background="#ffffff")
    # Per-vessel verdict boundaries, one line style per criterion, labelled V1, V2 ...
    names = list(vessels_numbered or [])
    for criterion, per_vessel in verdicts.items():
        style = CRITERION_STYLES.get(criterion)
        if style is None:
            continue
        for vessel, grid in per_vessel.items():
            segments = _boundary_segments(grid, xe, ye)
            for x0, y0, x1, y1 in segments:
                ax.group.add(Line(ax.tx(x0), ax.ty(y0), ax.tx(x1), ax.ty(y1),
                                  **ax._stroke_kwargs(INK, style["width"], style["dash"])))
            if segments:
                number = names.index(vessel) + 1 if vessel in names else "?"
                # Label on the segment farthest from today's point (no clash with its label).
                px, py = ax.tx(window["today"][0]), ax.ty(window["today"][1])
                x0, y0, x1, y1 = max(segments, key=lambda s: (
                    ax.tx(0.5 * (s[0] + s[2])) - px) ** 2 + (ax.ty(0.5 * (s[1] + s[3])) - py) ** 2)
                ax.text(ax.tx(0.5 * (x0 + x1)) + 2, ax.ty(0.5 * (y0 + y1)) + 2, f"V{number}",
                        size=6.5, background="#ffffff")
    # The edge of the target class: heavy line.
    target = window.get("target_class", 2)
    acceptable = [[c is not None and c <= target for c in row] for row in classes]
    for x0, y0, x1, y1 in _boundary_segments(acceptable, xe, ye):
        ax.foreground.add(Line(ax.tx(x0), ax.ty(y0), ax.tx(x1), ax.ty(y1),
                               **ax._stroke_kwargs(INK, 2.6, None)))
    tx, ty = window["today"]
    ax.marker(tx, ty, shape="D", size=6.5, fill="#ffffff", stroke=INK)
    ax.text(ax.tx(tx) + 6, ax.ty(ty) + 4, "today", size=7.5, bold=True, background="#ffffff")
    # Key at the right: class greys, hatching, line styles.
    left = ax.x + ax.width + 10.0
    y = ax.y + ax.height - 6.0
    add_text(drawing, left, y, "class", size=7.0, bold=True)
    for klass in range(1, 6):
        y -= 11.0
        drawing.add(Rect(left, y - 3.0, 12.0, 8.0, fillColor=_hex(CLASS_FILLS[klass]),
                         strokeColor=_hex(GREY_DARK), strokeWidth=0.4))
        add_text(drawing, left + 16.0, y, f"{klass}" + (" (target)" if klass == target else ""),
                 size=6.8)
    y -= 13.0
    drawing.add(Line(left, y + 1.5, left + 12.0, y + 1.5, strokeColor=_hex(INK), strokeWidth=2.6))
    add_text(drawing, left + 16.0, y, f"edge of class <= {target}", size=6.8)
    entries = [("not recoverable (any vessel)", 1), ("cooling insufficient", -1)]
    for label, direction in entries:
        y -= 12.0
        _hatch_sample(drawing, left, y - 3.0, direction)
        add_text(drawing, left + 16.0, y, label, size=6.3)
    for criterion, style in CRITERION_STYLES.items():
        y -= 11.0
        drawing.add(Line(left, y + 1.5, left + 12.0, y + 1.5, strokeColor=_hex(INK),
                         strokeWidth=style["width"], strokeDashArray=list(style["dash"])
                         if style["dash"] else None))
        add_text(drawing, left + 16.0, y, style["label"], size=6.3)
    y -= 11.0
    add_text(drawing, left, y, "Vn: vessel n in file order", size=6.3)
    y -= 11.0
    drawing.add(_diamond(left + 6.0, y + 2.0))
    add_text(drawing, left + 16.0, y, "today's values", size=6.3)
    for k, line in enumerate(caution_lines):  # the full cautions, never cut
        add_text(drawing, 4.0, 4.0 + 8.0 * (len(caution_lines) - 1 - k), line, size=5.8)
    return drawing


def _diamond(x, y, half=4.0):
    from reportlab.graphics.shapes import Polygon

    return Polygon([x, y - half, x + half, y, x, y + half, x - half, y],
                   fillColor=_hex("#ffffff"), strokeColor=_hex("#1a1a1a"), strokeWidth=0.8)


def _hex(value):
    from reportlab.lib import colors

    return colors.HexColor(value)


def _hatch_sample(drawing, x, y, direction):
    from reportlab.graphics.shapes import Line, Rect

    drawing.add(Rect(x, y, 12.0, 8.0, fillColor=None, strokeColor=_hex("#4d4d4d"),
                     strokeWidth=0.4))
    for offset in (0.0, 4.0, 8.0, 12.0, 16.0):
        if direction > 0:
            x0, y0, x1, y1 = x + offset - 8.0, y, x + offset, y + 8.0
        else:
            x0, y0, x1, y1 = x + offset, y, x + offset - 8.0, y + 8.0
        from screen.report.plot import clip_segment

        clipped = clip_segment(x0, y0, x1, y1, x, y, x + 12.0, y + 8.0)
        if clipped is not None:
            drawing.add(Line(*clipped, strokeColor=_hex("#1a1a1a"), strokeWidth=0.45))


def _any_failing(per_vessel: dict):
    grids = list(per_vessel.values())
    if not grids:
        return None
    return [[any(g[j][i] is False for g in grids) for i in range(len(grids[0][0]))]
            for j in range(len(grids[0]))]


def save_window_figure(result, path, force: bool = False) -> None:
    """Write the operating-window figure alone (``.svg`` or ``.pdf``) through the atomic
    writer, with the full cautions under the plot.

    Parameters
    ----------
    result : screen.analyses.engine.ScreeningResult
        With ``curves["limits_window"]``.
    path : str
        File to write (.svg or .pdf).
    force : bool
        Overwrite an existing file.
    """
    import os

    from screen.cautions import caution_text
    from screen.errors import OutputError
    from screen.io.fileio import write_atomic

    window = result.curves.get("limits_window")
    if window is None:
        raise OutputError("no operating window computed (give --window KEY1 KEY2)",
                          key="--figure", path=str(path))
    extension = os.path.splitext(str(path))[1].lower()
    if extension not in (".svg", ".pdf"):
        raise OutputError(f"figure format {extension or '(none)'} not supported; use .svg or "
                          f".pdf", key="--figure", path=str(path))
    from screen.report.style import register_fonts

    register_fonts()
    drawing = window_figure(window, [v.name for v in result.case.vessels], caution_text())
    if extension == ".svg":
        from reportlab.graphics import renderSVG

        data = renderSVG.drawToString(drawing).encode("utf-8")
    else:
        from reportlab.graphics import renderPDF

        data = renderPDF.drawToString(drawing, title="Operating window (screening aid)")
    write_atomic(path, data, force=force)


def limits_pdf_block(results: dict, window, styles, counter, vessels_numbered=None) -> list:
    """The "limits" block of the PDF: the limits as text lines and, when computed, the
    operating-window figure.

    Parameters
    ----------
    results : dict
        ``results`` of the screening with ``limits``.
    window : dict or None
        ``curves["limits_window"]``.
    styles : dict
        Paragraph styles of the report.
    counter : iterator
        Figure numbers.
    vessels_numbered : list of str, optional
        Vessel names in file order.

    Returns
    -------
    list
        Flowables.
    """
    from xml.sax.saxutils import escape

    from reportlab.platypus import XPreformatted

    from screen.report.layout import figure_block

    story = []
    lines = limit_lines({"results": results}, width=92)[1:]
    text = "\n".join(escape(line).replace(" degC", " °C") for line in lines)
    story.append(XPreformatted(text, styles["mono_block"]))
    if window:
        number = next(counter)
        kx, ky = window["keys"]
        story.append(figure_block(
            window_figure(window, vessels_numbered), number,
            f"Operating window over {kx} and {ky}.",
            f"Each of {len(window['x'])} x {len(window['y'])} points is a screening with both "
            f"inputs changed and the others as in the case. Greys: criticality class (lighter "
            f"is better); heavy line: edge of class {window.get('target_class', 2)} or better; "
            f"hatching: a vessel's decomposition not recoverable (/) or its synthesis cooling "
            f"insufficient (\\), not where it cannot be concluded; lines: per-vessel verdict "
            f"boundaries (Vn = vessel n), one "
            f"line style per criterion; diamond: today's values. Boundaries are resolved to "
            f"the grid spacing only; the limits above are exact to 1e-6 of each range.",
            styles))
    return story
