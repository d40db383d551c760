"""The well schematic beside the overview: a side view that follows the run.

Draws the boxes and marks of :func:`rigplan.present.packet.schematic.well_schematic`
(the same geometry the printed packet draws with matplotlib) in terminal
cells: one row per slice of depth, to scale, the radius stretched across a
few columns so the string, the annulus and the fill inside all show.  It
computes nothing: the session's landing plan and the number of joints in
the hole pick the picture.
"""

from __future__ import annotations

from rich.text import Text
from textual.containers import Horizontal
from textual.widget import Widget

from rigplan.present import wording as W
from rigplan.present.packet.schematic import BOX_KINDS, well_schematic
from rigplan.tui.panes import OverviewPane

#: Cell style of each box kind (background colour; walls drawn solid).
STYLES = {
    "hole": "on #3a3024",
    "annulus fluid": "on #28445e",
    "grout": "on #6e6e6e",
    "empty": "on #101010",
    "inside fluid": "on #28445e",
    "fill fluid": "on #3f7fbf",
    "casing": "#d0d0d0 on #d0d0d0",
    "screen": "#d08030 on #d08030",
    "sump": "#d0d0d0 on #d0d0d0",
}
_WALLS = ("casing", "screen", "sump")

#: Short words for the marks, in depth order on the right.
MARK_WORDS = {"TD": "TD", "shoe": "shoe", "float shoe": "float shoe",
              "float collar": "collar", "fluid level outside": "fluid out",
              "fill level inside": "fill in", "grout top": "grout top"}


def draw(schematic, width: int, height: int, system: str) -> Text:
    """The side view in ``width`` x ``height`` cells as rich Text.

    The first row names the step; the pipe takes ``min(width - 12, 15)``
    columns, the depth labels of the marks the rest.
    """
    s = schematic
    pic_w = max(5, min(width - 12, 15))
    if pic_w % 2 == 0:
        pic_w -= 1
    rows = max(3, height - 1)
    depth = max(s.depth_max, 1e-9)
    rmax = max(s.radius_max, 1e-9) * 1.2     # a margin of rock either side of the hole
    half = pic_w / 2.0
    order = {k: i for i, k in enumerate(BOX_KINDS)}
    boxes = sorted(s.boxes, key=lambda b: order[b.kind])
    grid = [["hole"] * pic_w for _ in range(rows)]
    for r in range(rows):
        d = (r + 0.5) / rows * depth
        for c in range(pic_w):
            x = abs((c + 0.5) - half) / half * rmax
            for b in boxes:
                if b.top <= d <= b.bottom and b.inner <= x <= b.outer:
                    grid[r][c] = b.kind
    # a wall thinner than a cell still shows: paint the column of its outer radius
    for b in boxes:
        if b.kind not in _WALLS:
            continue
        col = int(round(half - b.outer / rmax * half))
        col = min(max(col, 0), pic_w // 2 - 1)
        r0 = int(b.top / depth * rows)
        r1 = max(r0 + 1, int(round(b.bottom / depth * rows)))
        for r in range(r0, min(r1, rows)):
            grid[r][col] = b.kind
            grid[r][pic_w - 1 - col] = b.kind
    unit = W.unit("length", system)
    labels = {}
    for m in s.marks:
        r = min(rows - 1, int(m.depth / depth * rows))
        word = f"{MARK_WORDS.get(m.kind, m.kind)} {W.number(m.depth, 'length', system, 0)}"
        while r in labels and r < rows - 1:
            r += 1
        labels.setdefault(r, word)
    text = Text(no_wrap=True, overflow="crop")
    head = f"joint {s.step}/{s.n} [{unit}]" if s.step else f"no joint in [{unit}]"
    text.append(head[:width] + "\n", style="bold")
    for r in range(rows):
        for c in range(pic_w):
            kind = grid[r][c]
            text.append("█" if kind in _WALLS else " ", style=STYLES.get(kind, ""))
        label = labels.get(r, "")
        text.append((" " + label)[: max(0, width - pic_w)])
        if r < rows - 1:
            text.append("\n")
    return text


class SchematicView(Widget):
    """The side view of the well at the current running step."""

    DEFAULT_CSS = """
    SchematicView {
        width: 28;
        height: 1fr;
        min-height: 8;
        padding: 0 0 0 1;
    }
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.schematic = None
        self.system = "us"

    def show(self, session) -> None:
        lp = session.landing
        self.system = W.primary(session.units)
        self.schematic = None if lp is None else well_schematic(
            lp, min(session.step, lp.joints.n), getattr(session.plan, "grout", None))
        self.refresh()

    def render(self):
        if self.schematic is None:
            return Text("no plan to draw")
        return draw(self.schematic, self.size.width - 1, self.size.height, self.system)


class OverviewWithSchematic(Horizontal):
    """The overview's words on the left, the well on the right; ``show``
    updates both (the app calls it as it calls any pane)."""

    DEFAULT_CSS = """
    OverviewWithSchematic { height: 1fr; }
    OverviewWithSchematic > OverviewPane { width: 1fr; }
    """

    def compose(self):
        yield OverviewPane(id="overview-words")
        yield SchematicView(id="schematic")

    def show(self, session) -> None:
        self.query_one(OverviewPane).show(session)
        self.query_one(SchematicView).show(session)
