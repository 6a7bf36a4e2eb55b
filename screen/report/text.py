"""Text the PDF can draw: right-to-left words shaped and ordered, codes for missing glyphs.

The PDF uses the bundled DejaVu fonts (Latin, Greek, Cyrillic, Arabic, Hebrew and many symbols).
Case text (titles, vessel names, notes) may hold any Unicode; before it is drawn:

1. Arabic letters are joined into their contextual forms with the pure-Python package
   ``arabic-reshaper`` (a dependency; without it the report says the letters are unjoined).
2. Right-to-left runs (Hebrew, Arabic) are put into visual order with a simplified form of the
   Unicode Bidirectional Algorithm (Unicode Standard Annex #9, rules W1-W7, N1-N2, I1-I2, L2,
   applied to one line at a time, without explicit embeddings): a run of right-to-left letters,
   with the spaces and punctuation between them, is reversed; digits inside it keep their
   left-to-right order; brackets inside it are mirrored. A right-to-left paragraph that wraps
   onto several lines is ordered as one line (a known limit).
3. A character without a glyph in the fonts (Chinese, Japanese, Korean, emoji ...) is never
   drawn as an empty box: it is written as its code point, ``[U+4E2D]``, and the report gets a
   note listing what could not be drawn (the PDF metadata keep the original title).

:func:`drawable` is applied where text enters the PDF: paragraph markup
(:func:`screen.report.layout.typeset`), plain table cells, figure labels and the page
header and footer. The notes of the report being built are collected here (:func:`notes`).
"""

from __future__ import annotations

import re
import unicodedata

__all__ = ["drawable", "notes", "reset_notes"]

_MARKUP = re.compile(r"(<[^>]*>|&#?\w+;)")
_MIRROR = str.maketrans("()[]{}<>«»‹›", ")(][}{><»«›‹")
_RTL = ("R", "AL")
_NUMBER = ("EN", "AN")

_covered: frozenset | None = None
_missing: dict[str, None] = {}
_unjoined: list[bool] = [False]


def reset_notes() -> None:
    """Forget the characters recorded for the previous report."""
    _missing.clear()
    _unjoined[0] = False


def notes() -> list[str]:
    """Notes for the report on text that could not be drawn as written (empty if none)."""
    result = []
    if _missing:
        shown = ", ".join(f"[U+{ord(char):04X}]" for char in list(_missing)[:12])
        more = f" and {len(_missing) - 12} more" if len(_missing) > 12 else ""
        result.append(
            f"{len(_missing)} different characters of the case have no glyph in the report's "
            f"fonts and are printed as their Unicode code points ({shown}{more}); the PDF "
            f"properties and the JSON output keep the original text.")
    if _unjoined[0]:
        result.append("Arabic letters are printed unjoined: install the package "
                      "arabic-reshaper for joined letter forms.")
    return result


def _coverage() -> frozenset:
    """Code points drawn by both the regular and the bold report font."""
    global _covered
    if _covered is None:
        from reportlab.pdfbase import pdfmetrics

        from screen.report.style import FONT, FONT_BOLD, register_fonts

        register_fonts()
        regular = pdfmetrics.getFont(FONT).face.charToGlyph
        bold = pdfmetrics.getFont(FONT_BOLD).face.charToGlyph
        _covered = frozenset(regular) & frozenset(bold)
    return _covered


def _shape_arabic(text: str) -> str:
    if not any(unicodedata.bidirectional(c) == "AL" for c in text):
        return text
    try:
        import arabic_reshaper
    except ImportError:
        _unjoined[0] = True
        return text
    return arabic_reshaper.reshape(text)


def _levels(text: str) -> list[int]:
    """Embedding level of each character (UAX #9, simplified: no explicit embeddings).

    Left-to-right paragraph: left-to-right text 0, right-to-left text 1, numbers inside
    right-to-left text 2. Right-to-left paragraph (first strong letter right-to-left): 1 for
    right-to-left text, 2 for left-to-right text and numbers.
    """
    kinds = []
    for char in text:
        kind = unicodedata.bidirectional(char) or "ON"
        if kind == "NSM":  # W1: a combining mark takes the type of its base
            kind = kinds[-1] if kinds else "ON"
        kinds.append(kind)
    strong = [k for k in kinds if k in ("L", "R", "AL")]
    base = "R" if strong and strong[0] in _RTL else "L"
    classes = []  # "L", "R", "NUM" (a number inside right-to-left text) or None (neutral)
    context = base
    for kind in kinds:
        if kind in _RTL:
            context = "R"
            classes.append("R")
        elif kind == "L":
            context = "L"
            classes.append("L")
        elif kind == "AN" or (kind == "EN" and context == "R"):
            classes.append("NUM")  # W2, W7: a European number after left-to-right text is L
        elif kind == "EN":
            classes.append("L")
        else:
            classes.append(None)
    direction = ["R" if c == "NUM" else c for c in classes]  # N1: numbers count as R
    index = 0
    while index < len(direction):
        if direction[index] is not None:
            index += 1
            continue
        end = index
        while end < len(direction) and direction[end] is None:
            end += 1
        before = direction[index - 1] if index > 0 else base
        after = direction[end] if end < len(direction) else base
        value = before if before == after else base  # N1, else N2 (the paragraph direction)
        direction[index:end] = [value] * (end - index)
        index = end
    levels = []
    for cls, value in zip(classes, direction, strict=True):
        if cls == "NUM":
            levels.append(2)  # I1, I2
        elif base == "L":
            levels.append(1 if value == "R" else 0)
        else:
            levels.append(1 if value == "R" else 2)
    return levels


def _visual_order(text: str) -> str:
    """Reorder one line of text from logical to visual order (UAX #9 rule L2, simplified)."""
    if not any(unicodedata.bidirectional(c) in _RTL for c in text):
        return text
    levels = _levels(text)
    chars = [char.translate(_MIRROR) if level % 2 else char
             for char, level in zip(text, levels, strict=True)]
    for level in range(max(levels), 0, -1):
        index = 0
        while index < len(chars):
            if levels[index] >= level:
                end = index
                while end < len(chars) and levels[end] >= level:
                    end += 1
                chars[index:end] = chars[index:end][::-1]
                levels[index:end] = levels[index:end][::-1]
                index = end
            else:
                index += 1
    return "".join(chars)


def _escape_missing(text: str, markup: bool) -> str:
    covered = _coverage()
    out = []
    for char in text:
        code = ord(char)
        if code < 0x80 or code in covered or unicodedata.category(char) in ("Cc", "Cf", "Zl",
                                                                               "Zp"):
            out.append(char)
            continue
        _missing.setdefault(char, None)
        out.append(f"[U+{code:04X}]")
    return "".join(out)


def _rtl_font(text: str) -> str:
    """Right-to-left letters in the regular face (the oblique and mono faces lack them)."""
    from screen.report.style import FONT

    def wrap(match):
        return f'<font face="{FONT}">{match.group(0)}</font>'

    return re.sub(r"[\u0590-\u08FF\uFB1D-\uFDFF\uFE70-\uFEFF]+", wrap, text)


def drawable(text, markup: bool = False) -> str:
    """``text`` as the PDF fonts can draw it (see the module documentation).

    Parameters
    ----------
    text : str
        Plain text, or paragraph markup with ``markup=True`` (tags and entities are kept).
    markup : bool
        The text is reportlab paragraph markup.

    Returns
    -------
    str
        Shaped, visually ordered text in which every character has a glyph.
    """
    text = str(text)
    if text.isascii():
        return text
    if not markup:
        return _escape_missing(_visual_order(_shape_arabic(text)), markup)
    pieces = _MARKUP.split(text)
    for index in range(0, len(pieces), 2):  # text between tags and entities
        if not pieces[index].isascii():
            piece = _escape_missing(_visual_order(_shape_arabic(pieces[index])), markup)
            pieces[index] = _rtl_font(piece)
    return "".join(pieces)
