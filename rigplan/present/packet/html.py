"""The job packet as one self-contained HTML page that prints cleanly.

Charts and the well schematic are inline SVG written by matplotlib; the
style sheet keeps table rows whole across printed pages, repeats table
headers, and starts each major section on a new printed page.  No script,
no external file, no clock.
"""

from __future__ import annotations

from html import escape

from rigplan.present.packet import charts
from rigplan.present.packet.document import CrewSheet, Facts, Figure, Paragraph, Signoff, Table

CSS = """
body { font-family: "DejaVu Sans", Verdana, sans-serif; font-size: 10pt; color: #111;
       max-width: 60rem; margin: 1rem auto; padding: 0 1rem; line-height: 1.35; }
h1 { font-size: 17pt; margin: 0.2rem 0 0.6rem; }
h2 { font-size: 13pt; margin: 1.4rem 0 0.5rem; border-bottom: 1px solid #999; }
h3 { font-size: 10pt; margin: 0.9rem 0 0.3rem; }
table { border-collapse: collapse; width: 100%; margin: 0.2rem 0 0.4rem; font-size: 8pt; }
th, td { border: 1px solid #b0b0b0; padding: 1px 4px; vertical-align: top; }
th { background: #e4e9f0; text-align: left; }
td.r, th.r { text-align: right; }
tr.em td { font-weight: bold; background: #fde9c8; }
tbody tr:nth-child(even) td { background: #f6f6f6; }
tbody tr.em:nth-child(even) td { background: #fde9c8; }
table.facts td:first-child { font-weight: bold; width: 30%; }
table.facts td { border: none; border-bottom: 1px solid #ddd; font-size: 9pt; }
.verdict { font-size: 12pt; font-weight: bold; }
.note, .small { font-size: 8pt; color: #333; }
.caution { font-weight: bold; border: 1px solid #b45f06; background: #fff4e5; padding: 4px; }
figure { margin: 0.5rem 0; }
figure svg { width: 100%; height: auto; }
figcaption { font-size: 8pt; color: #333; }
.crew { columns: 2; column-gap: 1rem; }
.sign td { height: 2.2rem; }
.wrap { overflow-x: auto; }
@media print {
  @page { size: PAPER; margin: 1.5cm; }
  body { max-width: none; margin: 0; padding: 0; font-size: 9pt; }
  section.page { break-before: page; }
  thead { display: table-header-group; }
  tr, figure, .keep { break-inside: avoid; }
  h2, h3 { break-after: avoid; }
  .wrap { overflow: visible; }
}
"""


def _table(columns, rows, align, emphasis=(), cls="") -> str:
    align = align or "l" * len(columns)
    em = set(emphasis)
    out = [f'<div class="wrap"><table{f" class={chr(34)}{cls}{chr(34)}" if cls else ""}><thead><tr>']
    out += [f'<th class="{"r" if a == "r" else "l"}">{escape(str(c))}</th>'
            for c, a in zip(columns, align)]
    out.append("</tr></thead><tbody>")
    for i, r in enumerate(rows):
        out.append('<tr class="em">' if i in em else "<tr>")
        out += [f'<td class="{"r" if a == "r" else "l"}">{escape(str(c))}</td>'
                for c, a in zip(r, align)]
        out.append("</tr>")
    out.append("</tbody></table></div>")
    return "".join(out)


def render_html(packet, landing, plan) -> str:
    parts = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
             f"<title>{escape(packet.title)}</title>",
             '<meta name="viewport" content="width=device-width, initial-scale=1">',
             "<style>" + CSS.replace("PAPER", "A4" if packet.paper == "a4" else "letter")
             + "</style></head><body>",
             f'<p class="small">{escape(packet.running_head)}</p>']
    for i, sec in enumerate(packet.sections):
        cls = "page" if i and sec.new_page else ""
        parts.append(f'<section id="{sec.key}" class="{cls}">')
        parts.append(f"<h1>{escape(sec.title)}</h1>" if sec.key == "cover"
                     else f"<h2>{escape(sec.title)}</h2>")
        for b in sec.blocks:
            if isinstance(b, Facts):
                if b.title:
                    parts.append(f"<h3>{escape(b.title)}</h3>")
                rows = "".join(
                    f"<tr><td>{escape(k)}</td><td{' class=verdict' if k == 'Verdict' else ''}>"
                    f"{escape(v)}</td></tr>" for k, v in b.items)
                parts.append(f'<table class="facts keep"><tbody>{rows}</tbody></table>')
            elif isinstance(b, Table):
                parts.append('<div class="keep">' if len(b.rows) <= 25 else "<div>")
                if b.title:
                    parts.append(f"<h3>{escape(b.title)}</h3>")
                parts.append(_table(b.columns, b.rows, b.align, b.emphasis))
                if b.note:
                    parts.append(f'<p class="note">{escape(b.note)}</p>')
                parts.append("</div>")
            elif isinstance(b, Paragraph):
                parts.append(f'<p class="{b.style}">{escape(b.text)}</p>')
            elif isinstance(b, Figure):
                fig = charts.make(b.key, landing, plan, packet.system)
                if fig is None:
                    continue
                parts.append(f'<figure id="fig-{b.key}" data-figure="{b.key}">')
                if b.title:
                    parts.append(f"<h3>{escape(b.title)}</h3>")
                parts.append(charts.svg(fig))
                if b.caption:
                    parts.append(f"<figcaption>{escape(b.caption)}</figcaption>")
                parts.append("</figure>")
            elif isinstance(b, Signoff):
                parts.append('<div class="keep"><h3>Sign-off</h3>')
                parts.append(_table(("", "name", "signature", "date"),
                                    [(r, n, "", d) for r, n, d in b.rows], "llll",
                                    cls="sign"))
                parts.append("</div>")
            elif isinstance(b, CrewSheet):
                parts += [f"<p>{escape(x)}</p>" for x in b.legend]
                parts.append(_table(b.columns, b.rows, b.align, b.emphasis))
        parts.append("</section>")
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"
