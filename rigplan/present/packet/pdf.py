"""The job packet as PDF, typeset with reportlab's platypus.

Tables repeat their header row on every page they run over and are never
split inside a row; a titled block (a figure with its caption, a short
table with its title) is kept on one page.  Every page carries the job's
running head and "page X of Y".  Letter or A4.  The file is byte-identical
for the same input: reportlab's invariant mode fixes the creation date and
the document id, and no clock is read.
"""

from __future__ import annotations

import io
import math
from xml.sax.saxutils import escape

from reportlab import rl_config
from reportlab.lib import colors
from reportlab.lib.enums import TA_LEFT
from reportlab.lib.pagesizes import A4, LETTER
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import inch
from reportlab.pdfgen import canvas as rl_canvas
from reportlab.platypus import (BaseDocTemplate, CondPageBreak, Flowable, Frame, KeepTogether,
                                PageBreak, PageTemplate, Paragraph, Spacer, Table, TableStyle)

from rigplan.present.packet import charts
from rigplan.present.packet.document import (CrewSheet, Facts, Figure, Paragraph as Para,
                                             Signoff, Table as Tab)
from rigplan.present.packet.mplflow import FigureFlowable, register_fonts

PAPER = {"letter": LETTER, "a4": A4}
MARGIN = 0.6 * inch
GRID = colors.HexColor("#b0b0b0")
HEAD_BG = colors.HexColor("#e4e9f0")
STRIPE = colors.HexColor("#f6f6f6")


def _styles():
    font, bold = register_fonts()
    base = dict(fontName=font, alignment=TA_LEFT)
    return {
        "title": ParagraphStyle("title", fontName=bold, fontSize=17, leading=21, spaceAfter=8),
        "h1": ParagraphStyle("h1", fontName=bold, fontSize=13, leading=16, spaceAfter=6,
                             keepWithNext=1),
        "h2": ParagraphStyle("h2", fontName=bold, fontSize=9.5, leading=12, spaceBefore=8,
                             spaceAfter=3, keepWithNext=1),
        "body": ParagraphStyle("body", fontSize=9, leading=11.5, spaceAfter=4, **base),
        "small": ParagraphStyle("small", fontSize=7.5, leading=9.5, spaceAfter=3,
                                textColor=colors.HexColor("#303030"), **base),
        "caution": ParagraphStyle("caution", fontName=bold, fontSize=8.5, leading=11,
                                  spaceBefore=6, spaceAfter=4, borderColor=colors.HexColor("#b45f06"),
                                  borderWidth=0.8, borderPadding=4,
                                  backColor=colors.HexColor("#fff4e5")),
        "cell": ParagraphStyle("cell", fontSize=7, leading=8.4, **base),
        "cellb": ParagraphStyle("cellb", fontName=bold, fontSize=7, leading=8.4),
        "cellr": ParagraphStyle("cellr", fontSize=7, leading=8.4, fontName=font, alignment=2),
        "cellrb": ParagraphStyle("cellrb", fontSize=7, leading=8.4, fontName=bold, alignment=2),
        "fact": ParagraphStyle("fact", fontSize=9, leading=11.2, **base),
        "factb": ParagraphStyle("factb", fontName=bold, fontSize=9, leading=11.2),
        "verdict": ParagraphStyle("verdict", fontName=bold, fontSize=11, leading=13.5),
    }


def _numbered_canvas(running_head: str, footer: str, font: str):
    """A canvas class that writes "page X of Y" once the page count is known."""

    class NumberedCanvas(rl_canvas.Canvas):
        def __init__(self, *args, **kwargs):
            kwargs.setdefault("invariant", 1)
            super().__init__(*args, **kwargs)
            self._pages = []

        def showPage(self):
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._pages)
            for state in self._pages:
                self.__dict__.update(state)
                self._decorate(total)
                super().showPage()
            super().save()

        def _decorate(self, total):
            w, h = self._pagesize
            self.saveState()
            self.setFont(font, 7)
            self.setFillColor(colors.HexColor("#505050"))
            self.drawString(MARGIN, h - MARGIN + 14, running_head)
            self.drawRightString(w - MARGIN, MARGIN - 18,
                                 f"page {self._pageNumber} of {total}")
            self.drawString(MARGIN, MARGIN - 18, footer)
            self.setStrokeColor(GRID)
            self.setLineWidth(0.4)
            self.line(MARGIN, h - MARGIN + 10, w - MARGIN, h - MARGIN + 10)
            self.line(MARGIN, MARGIN - 8, w - MARGIN, MARGIN - 8)
            self.restoreState()

    return NumberedCanvas


class _Bookmark(Flowable):
    """Zero-size flowable that adds a PDF outline entry at its place."""

    def __init__(self, key: str, title: str):
        super().__init__()
        self.key, self.title = key, title

    def wrap(self, aw, ah):
        return 0, 0

    def draw(self):
        self.canv.bookmarkPage(self.key)
        self.canv.addOutlineEntry(self.title, self.key, level=0)


def _p(text: str, style) -> Paragraph:
    return Paragraph(escape(str(text)), style)


def _facts(block: Facts, st, width) -> list:
    out = []
    if block.title:
        out.append(_p(block.title, st["h2"]))
    rows = []
    for label, value in block.items:
        vs = st["verdict"] if label == "Verdict" else st["fact"]
        rows.append([_p(label, st["factb"]), _p(value, vs)])
    t = Table(rows, colWidths=[width * 0.3, width * 0.7], hAlign="LEFT")
    t.setStyle(TableStyle([
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, -1), 0.3, GRID),
        ("TOPPADDING", (0, 0), (-1, -1), 2), ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
    ]))
    out.append(t)
    return [KeepTogether(out)] if len(rows) < 30 else out


def _table(block, st, width, pad_v: float = 1.5):
    """A platypus table: header repeated on each page, rows never split.
    Cells that fit their column on one line are plain strings (fast); longer
    ones are paragraphs that wrap."""
    from reportlab.pdfbase.pdfmetrics import stringWidth
    n = len(block.columns)
    rel = block.widths or (1,) * n
    tot = float(sum(rel))
    col_w = [width * r / tot for r in rel]
    align = block.align or "l" * n
    emph = set(block.emphasis)
    font, bold = st["cell"].fontName, st["cellb"].fontName
    size, leading = st["cell"].fontSize, st["cell"].leading
    pad = 5.0
    head = [_p(c, st["cellb"] if align[i] == "l" else st["cellrb"])
            for i, c in enumerate(block.columns)]
    data = [head]
    for r, row in enumerate(block.rows):
        f = bold if r in emph else font
        cells = []
        for i, cell in enumerate(row):
            text = str(cell)
            if stringWidth(text, f, size) <= col_w[i] - pad:
                cells.append(text)
            else:
                key = ("cellr" if align[i] == "r" else "cell") + ("b" if r in emph else "")
                cells.append(_p(text, st[key]))
        data.append(cells)
    t = Table(data, colWidths=col_w, repeatRows=1, hAlign="LEFT")
    style = [
        ("FONT", (0, 1), (-1, -1), font, size, leading),
        ("BACKGROUND", (0, 0), (-1, 0), HEAD_BG),
        ("LINEBELOW", (0, 0), (-1, 0), 0.6, colors.HexColor("#606060")),
        ("GRID", (0, 0), (-1, -1), 0.25, GRID),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("TOPPADDING", (0, 0), (-1, -1), pad_v), ("BOTTOMPADDING", (0, 0), (-1, -1), pad_v),
        ("LEFTPADDING", (0, 0), (-1, -1), 2.5), ("RIGHTPADDING", (0, 0), (-1, -1), 2.5),
    ]
    for i, a in enumerate(align):
        if a == "r":
            style.append(("ALIGN", (i, 1), (i, -1), "RIGHT"))
    for r in range(2, len(data), 2):
        style.append(("BACKGROUND", (0, r), (-1, r), STRIPE))
    for r in emph:
        style.append(("BACKGROUND", (0, r + 1), (-1, r + 1), colors.HexColor("#fde9c8")))
        style.append(("FONT", (0, r + 1), (-1, r + 1), bold, size, leading))
    t.setStyle(TableStyle(style))
    return t


def _tab(block: Tab, st, width) -> list:
    title = [_p(block.title, st["h2"])] if block.title else []
    t = _table(block, st, width)
    note = [_p(block.note, st["small"])] if block.note else []
    if len(block.rows) <= 25:
        return [KeepTogether(title + [t] + note)]
    return title + [t] + note


def _figure(block: Figure, packet_ctx, st, width) -> list:
    lp, plan, system = packet_ctx
    fig = charts.make(block.key, lp, plan, system)
    if fig is None:
        return []
    parts = []
    if block.title:
        parts.append(_p(block.title, st["h2"]))
    parts.append(FigureFlowable(fig))
    if block.caption:
        parts.append(_p(block.caption, st["small"]))
    return [KeepTogether(parts)]


def _signoff(block: Signoff, st, width) -> list:
    rows = [[_p("", st["cellb"]), _p("name", st["cellb"]), _p("signature", st["cellb"]),
             _p("date", st["cellb"])]]
    for role, name, date in block.rows:
        rows.append([_p(role, st["factb"]), _p(name, st["fact"]), "", _p(date, st["fact"])])
    t = Table(rows, colWidths=[width * 0.18, width * 0.32, width * 0.32, width * 0.18],
              rowHeights=[14] + [30] * len(block.rows), hAlign="LEFT")
    t.setStyle(TableStyle([("GRID", (0, 0), (-1, -1), 0.5, GRID),
                           ("BACKGROUND", (0, 0), (-1, 0), HEAD_BG),
                           ("VALIGN", (0, 0), (-1, -1), "MIDDLE")]))
    return [KeepTogether([_p("Sign-off", st["h2"]), t])]


def _crew(block: CrewSheet, st, width, height) -> list:
    """The crew sheet on one page: as many side-by-side blocks of rows as
    the page needs, in the largest type that fits (down to 5.5 pt)."""
    legend = [_p(x, st["body"]) for x in block.legend]
    legend_h = sum(p.wrap(width, height)[1] + 4 for p in legend) + 40
    from reportlab.pdfbase.pdfmetrics import stringWidth
    n = len(block.rows)
    gap = 6
    room = height - legend_h
    emph = set(block.emphasis)
    wide = 3                       # the action column takes what is left

    def widths(size, inner_w):
        """Each column as wide as its widest cell (bold), the action column
        the rest; None when the action column would be too narrow."""
        font = st["cellb"].fontName
        w = [max([stringWidth(str(r[i]), font, size) for r in block.rows]
                 + [stringWidth(word, font, size) for word in str(block.columns[i]).split()]
                 + [size * 2.2]) + 6.0
             for i in range(len(block.columns))]
        rest = inner_w - (sum(w) - w[wide])
        if rest < size * 6:
            return None
        w[wide] = rest
        return tuple(w)

    def pad_v(size):
        return 1.5 if size >= 7 else 0.6

    def build(size, nblocks, per):
        cs = {k: ParagraphStyle(k, parent=st[k], fontSize=size, leading=size * 1.2)
              for k in ("cell", "cellb", "cellr", "cellrb")}
        inner_w = (width - gap * (nblocks - 1)) / nblocks
        rel = widths(size, inner_w)
        if rel is None:
            return None, math.inf, inner_w
        tables = []
        for b in range(-(-n // per)):
            chunk = block.rows[b * per:(b + 1) * per]
            sub = Tab("", block.columns, tuple(chunk), block.align, rel,
                      emphasis=tuple(i - b * per for i in emph if b * per <= i < (b + 1) * per))
            tables.append(_table(sub, cs, inner_w, pad_v(size)))
        tallest = max(t.wrap(inner_w, room)[1] for t in tables)
        return tables, tallest, inner_w

    chosen = None
    for size in (8.0, 7.5, 7.0, 6.5, 6.0, 5.5):     # the largest type first
        for nblocks in (1, 2, 3):
            if nblocks == 3 and size > 7.0:
                continue
            per = -(-n // nblocks)
            if (per + 1) * (size * 1.2 + 2 * pad_v(size)) > room:   # even one line a row
                continue
            tables, tallest, inner_w = build(size, nblocks, per)
            if tallest <= room:
                chosen = (tables, nblocks, inner_w)
                break
        if chosen:
            break
    if chosen is None:
        # more joints than one page holds: the most rows a block takes at
        # 5.5 pt, three blocks a page, page after page
        nb = next((k for k in (3, 2, 1) if build(5.5, k, 1)[0] is not None), 1)
        lo, hi = 1, n
        while lo < hi:
            mid = (lo + hi + 1) // 2
            if build(5.5, nb, mid)[1] <= room:
                lo = mid
            else:
                hi = mid - 1
        tables, _, inner_w = build(5.5, nb, lo)
        chosen = (tables, nb, inner_w)
    tables, nblocks, inner_w = chosen
    out = [_p(block.title, st["h1"])] + legend
    for i in range(0, len(tables), nblocks):
        row = tables[i:i + nblocks]
        row += [""] * (nblocks - len(row))
        grid = Table([row], colWidths=[inner_w + (gap if j < nblocks - 1 else 0)
                                       for j in range(nblocks)], hAlign="LEFT")
        grid.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP"),
                                  ("LEFTPADDING", (0, 0), (-1, -1), 0),
                                  ("RIGHTPADDING", (0, 0), (-1, -1), gap)]))
        out.append(grid)
    return out


def render_pdf(packet, landing, plan, title: str = "", stamp: str = "") -> bytes:
    """The packet as PDF bytes."""
    rl_config.invariant = 1
    st = _styles()
    font, _ = register_fonts()
    size = PAPER.get(packet.paper, LETTER)
    buf = io.BytesIO()
    doc = BaseDocTemplate(buf, pagesize=size, leftMargin=MARGIN, rightMargin=MARGIN,
                          topMargin=MARGIN, bottomMargin=MARGIN, title=title or packet.title,
                          author="", subject="job plan", creator="rigplan", invariant=1)
    frame = Frame(MARGIN, MARGIN, size[0] - 2 * MARGIN, size[1] - 2 * MARGIN, id="body",
                  leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
    doc.addPageTemplates([PageTemplate("page", [frame])])
    width, height = frame._aW, frame._aH
    ctx = (landing, plan, packet.system)
    story = []
    for i, sec in enumerate(packet.sections):
        if i and sec.new_page:
            story.append(PageBreak())
        elif i:
            story.append(CondPageBreak(3 * inch))   # no heading alone at a page's foot
        story.append(_Bookmark(sec.key, sec.title))
        if sec.key == "cover":
            story.append(_p(sec.title, st["title"]))
        elif sec.key != "crew":
            story.append(_p(sec.title, st["h1"]))
        for block in sec.blocks:
            if isinstance(block, Facts):
                story += _facts(block, st, width)
            elif isinstance(block, Tab):
                story += _tab(block, st, width)
            elif isinstance(block, Para):
                story.append(_p(block.text, st.get(block.style, st["body"])))
            elif isinstance(block, Figure):
                story.append(CondPageBreak(2 * inch))
                story += _figure(block, ctx, st, width)
            elif isinstance(block, Signoff):
                story += _signoff(block, st, width)
            elif isinstance(block, CrewSheet):
                story += _crew(block, st, width, height - 60)
            story.append(Spacer(1, 4))
    footer = "Planning aid: verify against the rig maker's load chart and the pipe makers' ratings."
    if stamp:
        footer += f"  Written {stamp}."
    doc.build(story, canvasmaker=_numbered_canvas(packet.running_head, footer, font))
    return buf.getvalue()
