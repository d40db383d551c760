"""The packet's machine-readable outputs: the running schedule and tally as
CSV, and the check's JSON with the packet's own facts."""

from __future__ import annotations

import csv
import io

from rigplan.present.packet.content import (ReportInfo, band_limits, crew_actions,
                                            force_digits)
from rigplan.present import wording as W

#: Version of the packet's JSON "report" object.
REPORT_FORMAT = 1


def render_csv(job, landing, system: str, info: ReportInfo, state=None) -> str:
    """One row per joint of the plan, in running order, set-aside joints
    included: the running schedule (shoe depth, fill level, action, hook
    load and its band, margin) and the tally (planned and measured lengths,
    status, reason).  Units in the header; the caution in a last row that
    starts with ``#``."""
    j = landing.joints
    chk = landing.chosen
    loads = chk.loads
    hook = landing.hook_load
    lo, hi = band_limits(hook, info.band)
    acts = crew_actions(landing, system)
    fd = force_digits(system)

    def n(v, kind, d=None):
        # plain numbers (no thousands separators), as a spreadsheet reads them
        if v is None or v != v:
            return ""
        return W.plain(v, kind, system, d).removesuffix(" " + W.unit(kind, system))

    L, F, V = (W.column_title("", k, system).strip() for k in ("length", "force", "volume"))
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["step", "joint", "kind", "material", f"planned length {L}",
                f"measured length {L}", "status", "reason", f"shoe depth {L}", f"fill level {L}",
                "action", f"hook load {F}", f"band low {F}", f"band high {F}",
                f"hook limit {F}", "margin"])
    run_index = {}
    rejected = {}
    if state is not None:
        run_index = {label: i + 1 for i, (label, _) in enumerate(state.run)}
        rejected = dict(state.rejected)
    step_of = {label: k for k, label in enumerate(j.label)}
    plan_joints = list(job.plan.joints)
    for spec in plan_joints:
        k = step_of.get(spec.label) if not spec.rejected else None
        if spec.label in rejected:
            status, reason = "set aside", rejected[spec.label]
        elif spec.rejected:
            status, reason = "set aside", spec.note
        elif spec.label in run_index:
            status, reason = "run", ("planned length, not measured"
                                     if state.basis.get(spec.label) == "planned" else "")
        else:
            status, reason = "planned", ""
        row = ["" if k is None else str(k + 1), spec.label, spec.kind, spec.material,
               n(spec.length, "length", 2),
               n(spec.measured_length, "length", 2) if spec.measured_length is not None else "",
               status, reason]
        if k is None:
            row += [""] * 8
        else:
            fl = loads.fill_level[k]
            row += [n(loads.shoe_depth[k], "length", 2),
                    "" if chk.closure.is_open or fl != fl else n(fl, "length", 2),
                    acts[k], n(hook[k], "force", fd), n(lo[k], "force", fd),
                    n(hi[k], "force", fd), n(landing.path.hook_limit, "force", fd),
                    f"{100 * chk.capacity_margin[k]:.1f} %"]
        w.writerow(row)
    # the caution, as a last comment row (a "#" row is skipped by rigplan's
    # CSV readers; a spreadsheet shows it under the schedule)
    for line in W.cautions(landing):
        w.writerow([f"# CAUTION: {line}"])
    return buf.getvalue()


def report_meta(info: ReportInfo, system: str, paper: str, rig_name: str, choices=(),
                as_run: bool = False) -> dict:
    """The packet's own facts for the JSON output (no clock unless stamped)."""
    return {
        "format": REPORT_FORMAT,
        "revision": info.revision or None,
        "date": info.date or None,
        "prepared_by": info.prepared_by or None,
        "reviewed_by": info.reviewed_by or None,
        "units": system,
        "paper": paper,
        "weight_band": info.band,
        "as_run": as_run,
        "written": info.stamp or None,
        "rig": rig_name,
        "rigs_considered": [
            {"rig": c.rig, "path": c.path, "verdict": c.verdict, "lands": c.lands,
             "governing": c.governing, "margin": c.margin if c.margin == c.margin else None,
             "string_limit": c.string_limit if c.string_limit == c.string_limit else None,
             "chosen": c.chosen} for c in choices],
    }
