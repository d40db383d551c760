"""The job packet as a plain document: sections of facts, tables, text and figures.

:func:`rigplan.present.packet.content.build_packet` fills a :class:`Packet`
with words and numbers already in display units; each output format (PDF,
HTML, Markdown) only lays these blocks out, so every format says the same
thing in the same words.  Figures are named here and drawn by
:mod:`rigplan.present.packet.charts` from the landing plan.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Facts:
    """Label and value pairs, shown as a two-column table."""

    title: str
    items: tuple


@dataclass(frozen=True)
class Table:
    """A table: ``columns`` heads, ``rows`` of text cells; ``align`` has one
    letter per column, ``l`` or ``r``; ``widths`` relative column widths
    (None: even); ``note`` a line under the table; ``emphasis`` row indices
    to show in bold (the governing step, for instance)."""

    title: str
    columns: tuple
    rows: tuple
    align: str = ""
    widths: tuple | None = None
    note: str = ""
    emphasis: tuple = ()
    key: str = ""


@dataclass(frozen=True)
class Paragraph:
    """Running text; ``style`` is ``body``, ``caution`` or ``small``."""

    text: str
    style: str = "body"


@dataclass(frozen=True)
class Figure:
    """A drawing named by ``key`` (see :data:`rigplan.present.packet.charts.FIGURES`)."""

    key: str
    title: str
    caption: str = ""


@dataclass(frozen=True)
class CrewSheet:
    """The one-page sheet for the rig floor: a legend and the joint rows
    (``columns`` and ``rows`` as in :class:`Table`), laid out in as many
    side-by-side blocks as one page needs."""

    title: str
    legend: tuple
    columns: tuple
    rows: tuple
    align: str
    emphasis: tuple = ()


@dataclass(frozen=True)
class Signoff:
    """The prepared-by and reviewed-by block: ``(role, name, date)`` rows
    with room to sign."""

    rows: tuple


@dataclass
class Section:
    """A titled part of the packet; ``new_page`` starts it on a fresh page."""

    key: str
    title: str
    blocks: list = field(default_factory=list)
    new_page: bool = True


@dataclass
class Packet:
    """The whole packet: a title, the header line of every page, sections."""

    title: str
    running_head: str
    sections: list
    system: str
    paper: str

    def section(self, key: str) -> Section | None:
        for s in self.sections:
            if s.key == key:
                return s
        return None
