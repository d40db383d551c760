"""``rigplan place`` and ``rigplan liner``: the rack's best running order, and a liner in an old well."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from rigplan.errors import InputError


def add_commands(sub, job_args) -> None:
    """Register the two subcommands on the CLI's subparsers."""
    pl = sub.add_parser("place", help="the running order of the rack's joints with the "
                                      "largest least margin")
    job_args(pl)
    pl.add_argument("-o", "--output", default=None,
                    help="write the proposed order as a tally CSV (run_order column)")
    pl.add_argument("--format", choices=("text", "json"), default="text")
    pl.add_argument("--force", action="store_true",
                    help="replace the -o file if it exists (never an input of the command)")
    ln = sub.add_parser("liner", help="check a liner against an old casing's caliper log "
                                      "(LAS 2.0) and plan its running")
    job_args(ln)
    ln.add_argument("--caliper", default=None,
                    help="caliper log of the old casing (LAS 2.0); default: the plan's "
                         "existing_casing.caliper_log")
    ln.add_argument("--x", default=None, help="mnemonic of the X caliper curve (default: found)")
    ln.add_argument("--y", default=None, help="mnemonic of the Y caliper curve (default: found)")
    ln.add_argument("--format", choices=("text", "json"), default="text")
    ln.add_argument("--every", default=None,
                    help="spacing of the profile rows, e.g. '10 ft' (default: about 40 rows)")


def _system(args) -> str:
    from rigplan.cli import _system as system
    return system(args)


def _inputs(args, job) -> list:
    paths = [job.plan_path, job.rig_path]
    for name in ("tally", "caliper", "materials"):
        if getattr(args, name, None):
            paths.append(Path(getattr(args, name)))
    paths.append(Path(str(job.plan_path)).with_suffix(".rigrun.sqlite"))
    return paths


def _refuse_input(out: Path, args, job) -> None:
    for p in _inputs(args, job):
        try:
            same = out.resolve() == Path(p).resolve()
        except OSError:
            same = False
        if same:
            raise InputError(f"{out}", f"is an input of this command ({p}): choose another "
                                       "output file; nothing was written")


def cmd_place(args, load) -> int:
    """Best running order of the tallied rack (see ``rigplan.engine.placement``)."""
    from rigplan.files.formats.tally import write_tally
    from rigplan.files.linerjob import placed_tally_rows, running_order_for
    from rigplan.present.rack import placement_dict, placement_lines
    from rigplan.present.wording import CAUTION
    if not args.tally and not _plan_names_tally(args.plan):
        raise InputError(f"{args.plan}: --tally", "placement needs the rack's tally (measured "
                                                  "walls and roundness): give --tally FILE")
    job, landing = load(args)
    plan = job.plan
    result = running_order_for(plan, job.rig, job.path_name)
    tallied = [s.label for s in plan.running_joints()]
    if args.output:
        out = Path(args.output)
        _refuse_input(out, args, job)
        if out.exists() and not args.force:
            raise InputError(f"{out}", "exists: choose another name, or add --force to replace "
                                       "it (a tally someone edited would be lost); nothing was "
                                       "written")
        rows = placed_tally_rows(plan, result)
        try:
            write_tally(rows, out, args.units,
                        comment=f"Running order proposed by rigplan place for {plan.name}: "
                                "joint 1 (bottom) first.\nrun_order gives each joint's position."
                                f"\nCAUTION: {CAUTION}")
        except OSError as err:
            raise InputError(f"{out}", f"cannot write the tally ({err.strerror or err})") from None
    if args.format == "json":
        doc = placement_dict(result, tallied)
        doc["cautions"] = [CAUTION]
        if args.output:
            doc["tally_written"] = str(args.output)
        json.dump(doc, sys.stdout, allow_nan=False)
        sys.stdout.write("\n")
    else:
        for line in placement_lines(result, tallied, _system(args)):
            print(line)
        if args.output:
            print(f"wrote {args.output} (use it with --tally, or t in the app)")
        print(f"CAUTION: {CAUTION}")
    return 0 if result.least_margin_proposed >= 0 else 1


def _plan_names_tally(plan_path) -> bool:
    try:
        from rigplan.files.formats import read_toml
        return "tally" in read_toml(plan_path)
    except InputError:
        return False


def cmd_liner(args, load) -> int:
    """Liner fit, weak zones and old-casing collapse from the caliper log, and the plan."""
    from rigplan.files import units as U
    from rigplan.files.linerjob import liner_job
    from rigplan.present.rack import CAUTION_OLD_CASING, liner_dict, liner_lines, liner_profile_rows
    from rigplan.present.report import plan_dict
    job, landing = load(args)
    lj = liner_job(job.plan_path, job.plan, landing, args.caliper, args.x, args.y)
    ok = lj.assessment.fit.fits and landing.lands and lj.assessment.old_collapse.least_margin >= 0
    if args.format == "json":
        doc = liner_dict(lj, plan_dict(landing, job.plan, job.warnings, job.rig.name))
        doc["exit_code"] = 0 if ok else 1
        json.dump(doc, sys.stdout, allow_nan=False)
        sys.stdout.write("\n")
        return doc["exit_code"]
    every = None
    if args.every:
        every = U.parse(args.every, "length", "ft" if args.units == "us" else "m", "--every")
        if not every > 0:
            raise InputError("--every", f"expected a length greater than zero, got {args.every!r}")
    for line in liner_lines(lj, _system(args)):
        print(line)
    from rich.console import Console
    from rich.table import Table
    t = Table(title="Old casing along the log")
    for col in ("depth", "mean ID", "smallest ID", "ellipticity", "collapse rating", "clearance"):
        t.add_column(col, justify="right")
    for row in liner_profile_rows(lj, _system(args), every):
        t.add_row(*row)
    console = Console(highlight=False, width=None if sys.stdout.isatty() else 110)
    console.print(t)
    from rigplan.present.wording import percent
    print(f"Liner running plan: {landing.verdict.value}"
          + (f"; governing {landing.governing.name}, margin {percent(landing.governing.margin)}"
             if landing.governing is not None else ""))
    print("(rigplan check on the same plan gives the running plan in full)")
    print(f"Caution: {CAUTION_OLD_CASING}")
    from rigplan import CAUTION
    print(f"Caution: {CAUTION}")
    return 0 if ok else 1


def liner_of(job, landing):
    """The liner checks of a plan that names its old casing and caliper log (else None)."""
    from rigplan.files.formats.linerfile import read_existing_casing
    from rigplan.files.linerjob import liner_job
    spec = read_existing_casing(job.plan_path)
    if spec is None or spec.caliper_log is None:
        return None
    return liner_job(job.plan_path, job.plan, landing)
