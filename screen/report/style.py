"""Visual language and number formats of the PDF screening summary.

One place for the fonts, the grey scale with its single accent colour, the paragraph styles and
the fixed number formats. The formats are part of the report's contract (documented in
``docs/report.md`` and relied on by the tests):

============================  ==========================================================
quantity                      printed as
============================  ==========================================================
temperature                   1 decimal, degC (``85.3 °C``)
temperature difference        1 decimal, K (``+42.0 K`` where a sign matters)
time (TMRad, time constant)   3 significant digits, h; plain digits from 0.001 h to
                              below 100 000 h, otherwise ``1.23e+05``
specific energy               4 significant digits, kJ/kg
ratios, fractions             2 decimals
============================  ==========================================================

reportlab is imported inside the functions that need it, so importing this module is cheap.
"""

from __future__ import annotations

import math
import os

#: Page geometry [pt] (A4 portrait, 18 mm side margins).
MM = 72.0 / 25.4
PAGE_WIDTH = 210.0 * MM
PAGE_HEIGHT = 297.0 * MM
MARGIN_SIDE = 18.0 * MM
MARGIN_TOP = 20.0 * MM
MARGIN_BOTTOM = 20.0 * MM
FRAME_WIDTH = PAGE_WIDTH - 2 * MARGIN_SIDE

#: The grey scale and the one accent colour (readable when printed in black and white: the
#: accent is dark enough to print as a dark grey; meaning never rests on colour alone).
INK = "#1a1a1a"
GREY_DARK = "#4d4d4d"
GREY_MID = "#8c8c8c"
GREY_LIGHT = "#d9d9d9"
GREY_PALE = "#f0f0f0"
ACCENT = "#9c3d10"

FONT = "DejaVuSans"
FONT_BOLD = "DejaVuSans-Bold"
FONT_ITALIC = "DejaVuSans-Oblique"
FONT_MONO = "DejaVuSansMono"

_FONTS_REGISTERED = False


def font_directory() -> str:
    """Directory of the DejaVu fonts for the PDF (no system font and no matplotlib needed).

    The fonts ship with the package (``screen/data``, DejaVu licence in ``LICENSE_DEJAVU``
    there); an installation without them falls back to the copy inside matplotlib, found
    without importing it.
    """
    import importlib.util

    from screen.errors import OutputError

    bundled = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "data")
    if os.path.isfile(os.path.join(bundled, "DejaVuSans.ttf")):
        return bundled
    spec = importlib.util.find_spec("matplotlib")
    if spec is not None and spec.submodule_search_locations:
        directory = os.path.join(list(spec.submodule_search_locations)[0], "mpl-data", "fonts",
                                 "ttf")
        if os.path.isfile(os.path.join(directory, "DejaVuSans.ttf")):
            return directory
    raise OutputError(f"the DejaVu fonts of the PDF are missing from {bundled}; reinstall "
                      f"runaway-screen")


def register_fonts() -> None:
    """Register DejaVu Sans with reportlab so that Δ, °, ≤ and subscripts print (once)."""
    global _FONTS_REGISTERED
    if _FONTS_REGISTERED:
        return
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    directory = font_directory()
    for name, filename in ((FONT, "DejaVuSans.ttf"), (FONT_BOLD, "DejaVuSans-Bold.ttf"),
                           (FONT_ITALIC, "DejaVuSans-Oblique.ttf"),
                           (FONT_MONO, "DejaVuSansMono.ttf")):
        pdfmetrics.registerFont(TTFont(name, os.path.join(directory, filename)))
    addMapping(FONT, 0, 0, FONT)
    addMapping(FONT, 1, 0, FONT_BOLD)
    addMapping(FONT, 0, 1, FONT_ITALIC)
    addMapping(FONT, 1, 1, FONT_BOLD)  # bold italic is not used; bold stands in
    _FONTS_REGISTERED = True


def paragraph_styles() -> dict:
    """Paragraph styles by name (body, small, caption, h1, h2, title, ...)."""
    from reportlab.lib import colors
    from reportlab.lib.styles import ParagraphStyle

    register_fonts()
    ink = colors.HexColor(INK)
    base = ParagraphStyle("body", fontName=FONT, fontSize=9, leading=12, textColor=ink)
    styles = {
        "body": base,
        "small": ParagraphStyle("small", parent=base, fontSize=7.5, leading=9.5),
        "cell": ParagraphStyle("cell", parent=base, fontSize=8, leading=10),
        "cell_tight": ParagraphStyle("cell_tight", parent=base, fontSize=8, leading=9),
        "cell_bold": ParagraphStyle("cell_bold", parent=base, fontName=FONT_BOLD, fontSize=8,
                                    leading=10),
        "cell_right": ParagraphStyle("cell_right", parent=base, fontSize=8, leading=10,
                                     alignment=2),
        "cell_head": ParagraphStyle("cell_head", parent=base, fontName=FONT_BOLD, fontSize=7.5,
                                    leading=9),
        "cell_head_right": ParagraphStyle("cell_head_right", parent=base, fontName=FONT_BOLD,
                                          fontSize=7.5, leading=9, alignment=2),
        "cell_mono": ParagraphStyle("cell_mono", parent=base, fontName=FONT_MONO, fontSize=7.5,
                                    leading=9.5),
        "caption": ParagraphStyle("caption", parent=base, fontName=FONT_ITALIC, fontSize=8,
                                  leading=10.5, textColor=colors.HexColor(GREY_DARK),
                                  spaceBefore=3, spaceAfter=10),
        "title": ParagraphStyle("title", parent=base, fontName=FONT_BOLD, fontSize=17,
                                leading=21, spaceAfter=2),
        "subtitle": ParagraphStyle("subtitle", parent=base, fontSize=11, leading=14,
                                   spaceAfter=2),
        "meta": ParagraphStyle("meta", parent=base, fontSize=8, leading=10.5,
                               textColor=colors.HexColor(GREY_DARK), spaceAfter=8),
        "h1": ParagraphStyle("h1", parent=base, fontName=FONT_BOLD, fontSize=12.5, leading=16,
                             spaceBefore=6, spaceAfter=6, keepWithNext=1),
        "h2": ParagraphStyle("h2", parent=base, fontName=FONT_BOLD, fontSize=10, leading=13,
                             spaceBefore=8, spaceAfter=4, keepWithNext=1),
        "caution_head": ParagraphStyle("caution_head", parent=base, fontName=FONT_BOLD,
                                       fontSize=10.5, leading=13),
        "caution": ParagraphStyle("caution", parent=base, fontSize=8.5, leading=11,
                                  leftIndent=10, bulletIndent=0),
        "verdict": ParagraphStyle("verdict", parent=base, fontSize=9.5, leading=12.5),
        "class_number": ParagraphStyle("class_number", parent=base, fontName=FONT_BOLD,
                                       fontSize=30, leading=32, alignment=1,
                                       textColor=colors.HexColor(ACCENT)),
        "class_label": ParagraphStyle("class_label", parent=base, fontSize=7.5, leading=9,
                                      alignment=1, textColor=colors.HexColor(GREY_DARK)),
        "mono_block": ParagraphStyle("mono_block", parent=base, fontName=FONT_MONO,
                                     fontSize=7, leading=8.8, spaceBefore=2, spaceAfter=4,
                                     leftIndent=4),
        "bullet": ParagraphStyle("bullet", parent=base, fontSize=8.5, leading=11,
                                 leftIndent=10, bulletIndent=0, spaceAfter=2),
        "block_intro": ParagraphStyle("block_intro", parent=base, spaceAfter=4),
        "note_after": ParagraphStyle("note_after", parent=base, fontSize=7.5, leading=9.5,
                                     spaceBefore=2, spaceAfter=6),
        "bullet_sub": ParagraphStyle("bullet_sub", parent=base, fontSize=8, leading=10.5,
                                     leftIndent=22, bulletIndent=13, spaceAfter=1),
        "bullet_small": ParagraphStyle("bullet_small", parent=base, fontSize=7.5, leading=10,
                                       leftIndent=10, bulletIndent=0, spaceAfter=1.5),
        "h3": ParagraphStyle("h3", parent=base, fontName=FONT_BOLD, fontSize=8.5, leading=11,
                             spaceBefore=5, spaceAfter=2, keepWithNext=1),
    }
    return styles


# --------------------------------------------------------------------------------------------
# Fixed number formats (see the module docstring).


def escape(text) -> str:
    """Escape text for a reportlab Paragraph (which reads a small XML subset).

    Parameters
    ----------
    text : object
        Text (converted with ``str``).
    """
    return (str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;"))


def prose(text) -> str:
    """Escape engine text for a Paragraph and typeset it: ``degC`` as °C, `` -> `` as an arrow,
    ``>=`` and ``<=`` as ≥ and ≤,
    ``T_NR`` as T with a subscript. Figures and words are left as they are.

    Parameters
    ----------
    text : object
        Engine text (converted with ``str``).
    """
    import re

    text = (escape(text).replace(" degC", " °C").replace(" -&gt; ", " → ")
            .replace(" &gt;= ", " ≥ ").replace(" &lt;= ", " ≤ "))
    return re.sub(r"(?<![A-Za-z0-9_.])T_([A-Za-z0-9]+)", r"T<sub>\1</sub>", text)


def format_celsius(value) -> str:
    """Temperature in degC with 1 decimal, without unit (``85.3``); ``n/a`` for None.

    Parameters
    ----------
    value : float or None
        Temperature. [degC]
    """
    if value is None:
        return "n/a"
    return f"{float(value):.1f}"


def format_kelvin(value, signed: bool = False) -> str:
    """Temperature difference in K with 1 decimal, without unit; ``n/a`` for None.

    Parameters
    ----------
    value : float or None
        Temperature difference. [K]
    signed : bool
        Always show the sign.
    """
    if value is None:
        return "n/a"
    return f"{float(value):+.1f}" if signed else f"{float(value):.1f}"


def format_significant(value, digits: int = 3) -> str:
    """A positive or negative number to ``digits`` significant digits, in plain notation from
    0.001 to below 100 000 and in ``1.23e+05`` notation outside; ``n/a`` for None or non-finite.

    Parameters
    ----------
    value : float or None
        Number.
    digits : int
        Significant digits.
    """
    if value is None:
        return "n/a"
    value = float(value)
    if not math.isfinite(value):
        return "n/a"
    if value == 0.0:
        return "0"
    magnitude = abs(value)
    if magnitude >= 1e5 or magnitude < 1e-3:
        return f"{value:.{digits - 1}e}"
    exponent = math.floor(math.log10(magnitude))
    decimals = digits - 1 - exponent
    rounded = round(value, decimals)
    # Rounding can carry into the next decade (99.96 -> 100.0): recompute the decimals.
    if rounded != 0.0 and math.floor(math.log10(abs(rounded))) != exponent:
        exponent += 1
        decimals = digits - 1 - exponent
        rounded = round(value, decimals)
    return f"{rounded:.{max(decimals, 0)}f}"


def format_hours(value) -> str:
    """A time in hours to 3 significant digits (see :func:`format_significant`).

    Parameters
    ----------
    value : float or None
        Time. [h]
    """
    return format_significant(value, 3)


def format_energy(value) -> str:
    """A specific energy in kJ/kg to 4 significant digits.

    Parameters
    ----------
    value : float or None
        Specific energy. [kJ/kg]
    """
    return format_significant(value, 4)


def format_ratio(value) -> str:
    """A ratio or fraction with 2 decimals.

    Parameters
    ----------
    value : float or None
        Ratio or fraction. [-]
    """
    if value is None:
        return "n/a"
    return f"{float(value):.2f}"


def format_generic(value) -> str:
    """Any JSON value for a table cell (numbers to 4 significant digits).

    Parameters
    ----------
    value : object
        JSON value (number, text, bool, list or None).
    """
    if value is None:
        return "n/a"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        return format_significant(value, 4)
    if isinstance(value, (list, tuple)):
        return ", ".join(format_generic(v) for v in value)
    if isinstance(value, dict):
        return "; ".join(f"{k}: {format_generic(v)}" for k, v in value.items())
    return str(value)
