"""A matplotlib figure as a reportlab flowable, drawn as vector graphics.

matplotlib lays the figure out (Agg canvas, DejaVu Sans metrics); this
renderer then replays its drawing calls -- paths, markers, collections and
text -- onto the reportlab canvas of the PDF page, so lines stay lines and
text stays text (searchable, sharp at any zoom) and the PDF needs no image
or extra library.  The fonts are the DejaVu Sans files matplotlib ships,
embedded by reportlab, so the text measures the same in both.

Imported only when a PDF is written (matplotlib and reportlab are heavy).
"""

from __future__ import annotations

from pathlib import Path

import matplotlib

matplotlib.use("Agg")

from matplotlib.backend_bases import GraphicsContextBase, RendererBase  # noqa: E402
from matplotlib.path import Path as MPath  # noqa: E402
from reportlab.pdfbase import pdfmetrics  # noqa: E402
from reportlab.pdfbase.ttfonts import TTFont  # noqa: E402
from reportlab.platypus import Flowable  # noqa: E402

FONT = "DejaVuSans"
FONT_BOLD = "DejaVuSans-Bold"


def register_fonts() -> tuple[str, str]:
    """Register matplotlib's DejaVu Sans with reportlab (once)."""
    if FONT not in pdfmetrics.getRegisteredFontNames():
        base = Path(matplotlib.get_data_path()) / "fonts" / "ttf"
        pdfmetrics.registerFont(TTFont(FONT, str(base / "DejaVuSans.ttf")))
        pdfmetrics.registerFont(TTFont(FONT_BOLD, str(base / "DejaVuSans-Bold.ttf")))
        from reportlab.lib.fonts import addMapping
        addMapping(FONT, 0, 0, FONT)
        addMapping(FONT, 1, 0, FONT_BOLD)
        addMapping(FONT, 0, 1, FONT)
        addMapping(FONT, 1, 1, FONT_BOLD)
    return FONT, FONT_BOLD


_CAP = {"butt": 0, "round": 1, "projecting": 2}
_JOIN = {"miter": 0, "round": 1, "bevel": 2}


class _Renderer(RendererBase):
    """matplotlib renderer that draws on a reportlab canvas, 1 unit = 1 pt."""

    def __init__(self, canv, width, height):
        super().__init__()
        self.canv = canv
        self.width = width
        self.height = height

    # -- sizes ---------------------------------------------------------------
    def flipy(self):
        return False

    def get_canvas_width_height(self):
        return self.width, self.height

    def points_to_pixels(self, points):
        return points

    def new_gc(self):
        return GraphicsContextBase()

    def option_image_nocomposite(self):
        return True

    @staticmethod
    def _font(prop):
        w = prop.get_weight()
        bold = w in ("bold", "heavy", "extra bold", "black", "semibold", "demibold") or (
            isinstance(w, (int, float)) and w >= 600)
        return FONT_BOLD if bold else FONT

    def get_text_width_height_descent(self, s, prop, ismath):
        font = self._font(prop)
        size = prop.get_size_in_points()
        face = pdfmetrics.getFont(font).face
        width = pdfmetrics.stringWidth(s, font, size)
        descent = -face.descent * size / 1000.0
        height = face.ascent * size / 1000.0 + descent
        return width, height, descent

    # -- state ---------------------------------------------------------------
    def _apply_gc(self, gc, fill_rgb):
        c = self.canv
        rgba = gc.get_rgb()
        alpha = gc.get_alpha() if gc.get_forced_alpha() else rgba[3]
        c.setStrokeColorRGB(*rgba[:3], alpha=alpha)
        lw = gc.get_linewidth()
        c.setLineWidth(lw)
        c.setLineCap(_CAP.get(gc.get_capstyle(), 0))
        c.setLineJoin(_JOIN.get(gc.get_joinstyle(), 0))
        offset, dashes = gc.get_dashes()
        if dashes:
            c.setDash(list(dashes), offset or 0)
        else:
            c.setDash([], 0)
        if fill_rgb is not None:
            fa = gc.get_alpha() if gc.get_forced_alpha() or len(fill_rgb) < 4 else fill_rgb[3]
            c.setFillColorRGB(*fill_rgb[:3], alpha=fa)
        return lw > 0 and alpha > 0

    def _clip(self, gc):
        c = self.canv
        rect = gc.get_clip_rectangle()
        if rect is not None:
            p = c.beginPath()
            x0, y0, w, h = rect.bounds
            p.rect(x0, y0, w, h)
            c.clipPath(p, stroke=0, fill=0)
        cp, tr = gc.get_clip_path()
        if cp is not None:
            p = self._rl_path(cp, tr)
            c.clipPath(p, stroke=0, fill=0)

    def _rl_path(self, path, transform):
        p = self.canv.beginPath()
        last = (0.0, 0.0)
        for verts, code in path.iter_segments(transform, simplify=False, curves=True):
            if code == MPath.MOVETO:
                p.moveTo(*verts[-2:])
            elif code == MPath.LINETO:
                p.lineTo(*verts[-2:])
            elif code == MPath.CURVE3:
                (qx, qy), (x, y) = verts[:2], verts[2:4]
                x0, y0 = last
                p.curveTo(x0 + 2 / 3 * (qx - x0), y0 + 2 / 3 * (qy - y0),
                          x + 2 / 3 * (qx - x), y + 2 / 3 * (qy - y), x, y)
            elif code == MPath.CURVE4:
                p.curveTo(*verts[:6])
            elif code == MPath.CLOSEPOLY:
                p.close()
                continue
            last = tuple(verts[-2:])
        return p

    # -- drawing -------------------------------------------------------------
    def draw_path(self, gc, path, transform, rgbFace=None):
        c = self.canv
        c.saveState()
        self._clip(gc)
        stroke = self._apply_gc(gc, rgbFace)
        p = self._rl_path(path, transform)
        c.drawPath(p, stroke=1 if stroke else 0, fill=1 if rgbFace is not None else 0)
        c.restoreState()

    def draw_text(self, gc, x, y, s, prop, angle, ismath=False, mtext=None):
        c = self.canv
        c.saveState()
        self._clip(gc)
        rgba = gc.get_rgb()
        c.setFillColorRGB(*rgba[:3], alpha=gc.get_alpha() if gc.get_forced_alpha() else rgba[3])
        c.translate(x, y)
        if angle:
            c.rotate(angle)
        c.setFont(self._font(prop), prop.get_size_in_points())
        c.drawString(0, 0, s)
        c.restoreState()

    def draw_image(self, gc, x, y, im):
        raise NotImplementedError("the packet's figures are vector only")


class FigureFlowable(Flowable):
    """A matplotlib figure placed in the story at its own size [pt].

    The figure's size in inches x 72 gives the flowable's size; the figure is
    laid out by matplotlib, then drawn on the page by :class:`_Renderer`.
    """

    def __init__(self, figure, hAlign="CENTER"):
        super().__init__()
        register_fonts()
        self.figure = figure
        figure.set_dpi(72)
        w, h = figure.get_size_inches()
        self.width, self.height = w * 72.0, h * 72.0
        self.hAlign = hAlign
        figure.draw_without_rendering()      # layout with Agg metrics, once

    def wrap(self, availWidth, availHeight):
        return self.width, self.height

    def draw(self):
        renderer = _Renderer(self.canv, self.width, self.height)
        self.canv.saveState()
        self.figure.draw(renderer)
        self.canv.restoreState()
