"""The job packet: the printed plan a reviewing engineer files and a crew follows.

``rigplan report PLAN --rig RIG -o FILE`` writes it; the suffix of FILE
picks the format (:data:`FORMATS`).  The content is built once
(:mod:`.content`) and laid out by each format's module; the drawings come
from matplotlib (:mod:`.charts`) and the PDF from reportlab (:mod:`.pdf`),
both imported only here, when a packet is written, never at start-up.
:mod:`.schematic` (the side view's geometry) is light and shared with the app.
"""

from __future__ import annotations

#: Output suffix -> format name.
FORMATS = {".pdf": "pdf", ".html": "html", ".htm": "html", ".md": "md", ".csv": "csv",
           ".json": "json"}


def format_for(path) -> str | None:
    """The packet format of an output path, by its suffix (None: not one of ours)."""
    from pathlib import Path
    return FORMATS.get(Path(path).suffix.lower())


def render(fmt: str, job, landing, system: str = "us", info=None, choices=(), as_run=None,
           rig_name: str = "") -> bytes:
    """The packet in ``fmt`` ("pdf", "html", "md", "csv", "json") as bytes.

    ``job`` is the :class:`rigplan.files.job.Job` whose plan was planned into
    ``landing``; ``choices`` the :class:`.content.RigChoice` rows when several
    rigs were weighed; ``as_run`` a :class:`.content.AsRun` for the record.
    """
    from rigplan.present.packet.content import ReportInfo, build_packet
    info = info or ReportInfo()
    rig_name = rig_name or getattr(job.rig, "name", "")
    if fmt == "csv":
        from rigplan.present.packet.tables import render_csv
        rec = as_run
        if rec is not None:
            import dataclasses
            return render_csv(dataclasses.replace(job, plan=rec.state_plan), rec.landing, system,
                              info, rec.state).encode()
        return render_csv(job, landing, system, info).encode()
    if fmt == "json":
        import json
        from rigplan.present.packet.tables import report_meta
        from rigplan.present.report import plan_dict
        from rigplan.present.packet.content import PAPER_FOR_SYSTEM
        src = as_run.landing if as_run is not None else landing
        plan = as_run.state_plan if as_run is not None else job.plan
        doc = plan_dict(src, plan, job.warnings, rig_name)
        doc["report"] = report_meta(info, system, info.paper or PAPER_FOR_SYSTEM[system.split("+")[0]],
                                    rig_name, choices, as_run is not None)
        return (json.dumps(doc, indent=1, allow_nan=False) + "\n").encode()
    packet = build_packet(job, landing, system, info, choices, as_run, rig_name)
    if fmt == "md":
        from rigplan.present.packet.markdown import render_markdown
        return render_markdown(packet).encode()
    if fmt == "html":
        from rigplan.present.packet.html import render_html
        return render_html(packet, landing, job.plan).encode()
    if fmt == "pdf":
        from rigplan.present.packet.pdf import render_pdf
        return render_pdf(packet, landing, job.plan, stamp=info.stamp)
    raise ValueError(f"unknown packet format {fmt!r}; known: {', '.join(sorted(set(FORMATS.values())))}")
