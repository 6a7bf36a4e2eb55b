"""Small layout helpers shared by the pages of the PDF: tables, paragraphs, bullets, figures.

reportlab is imported inside the functions, so importing this module is cheap.
"""

from __future__ import annotations

from screen.report.style import FONT, FONT_BOLD, GREY_LIGHT, GREY_PALE, INK, escape

#: Subscripts lowered by 28 % of the font size (reportlab's default of 50 % makes a subscript
#: touch the next line of a tightly set list or table cell).
SUBSCRIPT = '<sub rise="28%">'


def typeset(text: str) -> str:
    """Paragraph markup with the report's subscript setting, drawable by the report fonts
    (right-to-left words ordered, missing glyphs as codes: :mod:`screen.report.text`).

    Parameters
    ----------
    text : str
        Paragraph markup.
    """
    from screen.report.text import drawable

    return drawable(str(text).replace("<sub>", SUBSCRIPT), markup=True)


def paragraph(text, style):
    """A reportlab Paragraph (``text`` is markup: escape engine text first).

    Parameters
    ----------
    text : str
        Paragraph markup (engine text escaped first).
    style : ParagraphStyle
        reportlab paragraph style.
    """
    from reportlab.platypus import Paragraph

    return Paragraph(typeset(text), style)


def bullet(text, style, symbol="■"):
    """A paragraph with a bullet symbol in the left indent.

    Parameters
    ----------
    text : str
        Paragraph markup (engine text escaped first).
    style : ParagraphStyle
        reportlab paragraph style.
    symbol : str
        Bullet symbol.
    """
    from reportlab.platypus import Paragraph

    return Paragraph(typeset(text), style, bulletText=symbol)


def figure_block(drawing, number: int, title: str, caption: str, styles):
    """A figure (a vector drawing) with its numbered caption, kept on one page.

    Parameters
    ----------
    drawing : reportlab.graphics.shapes.Drawing
        The figure.
    number : int
        Figure number.
    title : str
        Title (plain text; escaped here).
    caption : str
        Caption (paragraph markup).
    styles : dict
        Paragraph styles of the report (``caption`` is used).
    """
    from reportlab.platypus import KeepTogether, Paragraph, Spacer

    text = f"<b>Figure {number}. {escape(title)}</b> {caption}"
    return KeepTogether([Spacer(1, 4), drawing, Paragraph(typeset(text), styles["caption"])])


def table(rows, widths, header=True, zebra=True, font_size=8, align_right_from=None,
          bold_rows=(), padding=2, align_right_columns=(), extra_commands=()):
    """A restrained table: thin rules, grey header, optional pale zebra rows.

    Parameters
    ----------
    rows : list of lists
        Cells: strings (set in the table font) or flowables (Paragraphs wrap).
    widths : list of float
        Column widths. [pt]
    header : bool
        The first row is a header (bold, grey, repeated after a page break).
    zebra : bool
        Pale background on every second body row.
    font_size : float
        Font size of the string cells. [pt]
    align_right_from : int, optional
        One column whose body string cells are right-aligned (kept for the older tables).
    bold_rows : iterable of int
        Row indices set in bold.
    padding : float
        Top and bottom cell padding. [pt]
    align_right_columns : iterable of int
        Columns whose string cells (header included) are right-aligned: the number columns.
    extra_commands : iterable
        Further TableStyle commands (SPAN, fonts of single cells).
    """
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    # splitInRow: a row taller than a page (a very long text value) continues on the next page.
    from screen.report.text import drawable

    rows = [[drawable(cell) if isinstance(cell, str) else cell for cell in row] for row in rows]
    result = Table(rows, colWidths=widths, repeatRows=1 if header else 0, splitInRow=1)
    commands = [
        ("FONT", (0, 0), (-1, -1), FONT, font_size),
        ("TEXTCOLOR", (0, 0), (-1, -1), colors.HexColor(INK)),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("TOPPADDING", (0, 0), (-1, -1), padding),
        ("BOTTOMPADDING", (0, 0), (-1, -1), padding),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("LINEBELOW", (0, -1), (-1, -1), 0.6, colors.HexColor(INK)),
    ]
    if header:
        commands += [
            ("FONT", (0, 0), (-1, 0), FONT_BOLD, font_size),
            ("LINEABOVE", (0, 0), (-1, 0), 0.6, colors.HexColor(INK)),
            ("LINEBELOW", (0, 0), (-1, 0), 0.6, colors.HexColor(INK)),
            ("BACKGROUND", (0, 0), (-1, 0), colors.HexColor(GREY_LIGHT)),
        ]
    else:
        commands.append(("LINEABOVE", (0, 0), (-1, 0), 0.6, colors.HexColor(INK)))
    if zebra:
        for index in range(1 if header else 0, len(rows)):
            if (index - (1 if header else 0)) % 2 == 1:
                commands.append(("BACKGROUND", (0, index), (-1, index),
                                 colors.HexColor(GREY_PALE)))
    if align_right_from is not None:
        commands.append(("ALIGN", (align_right_from, 1 if header else 0), (align_right_from, -1),
                         "RIGHT"))
    for column in align_right_columns:
        commands.append(("ALIGN", (column, 0), (column, -1), "RIGHT"))
    for index in bold_rows:
        commands.append(("FONT", (0, index), (-1, index), FONT_BOLD, font_size))
    commands.extend(extra_commands)
    result.setStyle(TableStyle(commands))
    return result


class FigureCounter:
    """Figure numbers 1, 2, ... (``next(counter)``) that a failed block can give back."""

    def __init__(self, start: int = 1):
        self.next_number = start

    def __iter__(self):
        return self

    def __next__(self) -> int:
        number = self.next_number
        self.next_number += 1
        return number

    def mark(self) -> int:
        """The next number, to :meth:`reset` to if the block using it is dropped."""
        return self.next_number

    def reset(self, mark: int) -> None:
        """Set the next figure number back to ``mark`` (when a block is dropped).

        Parameters
        ----------
        mark : int
            Next figure number.
        """
        self.next_number = mark
