"""The job packet as Markdown (GitHub tables): every table and fact of the
PDF in the same words; the drawings are named with a pointer to the PDF or
HTML packet, which carry them."""

from __future__ import annotations

from rigplan.present.packet.document import CrewSheet, Facts, Figure, Paragraph, Signoff, Table


def _cell(text) -> str:
    return str(text).replace("|", "\\|").replace("\n", " ")


def _table(columns, rows, align) -> list:
    align = align or "l" * len(columns)
    out = ["| " + " | ".join(_cell(c) if c else " " for c in columns) + " |",
           "|" + "|".join("---:" if a == "r" else "---" for a in align) + "|"]
    for r in rows:
        out.append("| " + " | ".join(_cell(c) for c in r) + " |")
    return out


def render_markdown(packet) -> str:
    lines = []
    for sec in packet.sections:
        lines.append(("# " if sec.key == "cover" else "## ") + sec.title)
        lines.append("")
        for b in sec.blocks:
            if isinstance(b, Facts):
                if b.title:
                    lines += [f"### {b.title}", ""]
                lines += _table(("item", "value"), b.items, "ll")
            elif isinstance(b, Table):
                if b.title:
                    lines += [f"### {b.title}", ""]
                lines += _table(b.columns, b.rows, b.align)
                if b.note:
                    lines += ["", f"_{b.note}_"]
            elif isinstance(b, Paragraph):
                lines.append(f"**{b.text}**" if b.style == "caution" else b.text)
            elif isinstance(b, Figure):
                lines.append(f"_Figure: {b.title or 'well schematic'} (drawn in the PDF and HTML "
                             f"packet). {b.caption}_")
            elif isinstance(b, Signoff):
                lines += ["### Sign-off", ""]
                lines += _table(("", "name", "signature", "date"),
                                [(role, name, "", date) for role, name, date in b.rows], "llll")
            elif isinstance(b, CrewSheet):
                lines += [f"- {x}" for x in b.legend] + [""]
                lines += _table(b.columns, b.rows, b.align)
            lines.append("")
    return "\n".join(lines).rstrip() + "\n"
