"""Command line: ``rigplan [open|check|report|demo|rigs] ...``.

Exit codes: 0 the string lands within every limit; 1 a limit is exceeded
(or a loaded part is unrated, so landing cannot be confirmed); 2 an input
error (one line on stderr naming the file, the key or row, and what was
expected); 3 an internal error of rigplan (one line; a bug to report, never
read as a verdict).  Textual is imported only by ``open`` and the bare
command.  No command writes onto a file it reads.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from rigplan.errors import InputError

EXIT_LANDS, EXIT_LIMIT, EXIT_INPUT, EXIT_INTERNAL = 0, 1, 2, 3


class _Parser(argparse.ArgumentParser):
    """argparse with its errors on one line (exit 2), like every input error."""

    def error(self, message):
        from rigplan.errors import one_line
        self.exit(EXIT_INPUT, f"{self.prog}: {one_line(message)} (see {self.prog} --help)\n")


def _parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog="rigplan",
        description="Hoisting, running-load, float and fill planning for water-well casing "
                    "and screen strings. With no command, opens the terminal app on the "
                    "bundled demo job.")
    sub = p.add_subparsers(dest="command")

    def job_args(sp, need_rig=True, many_rigs=False):
        sp.add_argument("plan", help="string plan file (strings/*.toml)")
        if many_rigs:
            sp.add_argument("--rig", required=need_rig, action="append",
                            help="rig capacity profile (rigs/*.toml, a bundled rig's name, or "
                                 "a folder of profiles); repeat to weigh several rigs")
        else:
            sp.add_argument("--rig", required=need_rig,
                            help="rig capacity profile (rigs/*.toml, or a bundled rig's name)")
        sp.add_argument("--path", default=None,
                        help="hoisting path to use (default: the one with most capacity)")
        sp.add_argument("--units", choices=("us", "si"), default=None,
                        help="display units: US field or SI (default: the plan file's "
                             "units, and with them the paper: Letter for us, A4 for si)")
        sp.add_argument("--both-units", action="store_true",
                        help="show every quantity in the other unit system too, in parentheses")
        sp.add_argument("--materials", default=None,
                        help="extra materials file (TOML) to add to the library")
        sp.add_argument("--tally", default=None,
                        help="tally CSV whose measured lengths and rejections override the plan")
        sp.add_argument("--as-run", action="store_true",
                        help="apply the site run log beside the plan (joints run, measured "
                             "lengths, rejections): the plan as run so far")

    c = sub.add_parser("check", help="check whether the rig can land the string")
    job_args(c, many_rigs=True)
    c.add_argument("--format", choices=("text", "json"), default="text")
    c.add_argument("--brief", action="store_true",
                   help="text: show only the first and last steps and the summary")
    c.add_argument("--full", action="store_true",
                   help="text: every step and joint of a long string (by default a string of "
                        "more than 60 joints shows the first and last 20 and the most loaded)")
    o = sub.add_parser("open", help="open the terminal app on a job")
    job_args(o)
    r = sub.add_parser("report", help="write the job packet (PDF, HTML, Markdown, CSV or JSON)")
    job_args(r, many_rigs=True)
    r.add_argument("-o", "--output", required=True,
                   help="output file; its suffix picks the format: .pdf, .html, .md, "
                        ".csv (running schedule and tally) or .json")
    r.add_argument("--revision", default=None, help="revision shown on the cover "
                                                    "(default: the plan's [report] revision)")
    r.add_argument("--date", default=None, help="date shown on the cover "
                                                "(default: the plan's [report] date)")
    r.add_argument("--prepared-by", default=None, help="name in the prepared-by block")
    r.add_argument("--reviewed-by", default=None, help="name in the reviewed-by block")
    r.add_argument("--paper", choices=("letter", "a4"), default=None,
                   help="PDF paper size (default: letter for US units, A4 for SI)")
    r.add_argument("--band", type=float, default=None,
                   help="weight band on the crew sheet, percent of the predicted hook load "
                        "(default 10)")
    r.add_argument("--stamp", action="store_true",
                   help="print the time of writing in the page footer (the file then differs "
                        "from run to run)")
    d = sub.add_parser("demo", help="check every bundled demo job and list the verdicts")
    d.add_argument("--units", choices=("us", "si"), default="us")
    sub.add_parser("rigs", help="list the bundled rig profiles and their hoisting paths")
    from rigplan.cli_rack import add_commands
    add_commands(sub, job_args)
    from rigplan.cli_risk import add_commands as add_risk
    add_risk(sub, job_args)
    return p


def _load(args):
    import dataclasses
    from rigplan.files.job import apply_run_state, apply_tally_file, load_job, plan_job, read_run_state
    rig = args.rig[0] if isinstance(args.rig, list) else args.rig
    job = load_job(args.plan, rig, args.path, args.materials)
    plan = job.plan
    if getattr(args, "tally", None):
        plan = apply_tally_file(plan, args.tally)
    state = None
    from rigplan.files.runlog import log_path_for
    if getattr(args, "as_run", False):
        state = read_run_state(job.plan_path)
        if state is None:
            raise InputError(f"{job.plan_path}: --as-run", "no run log beside the plan: the "
                                                           "job has not been run in the app")
    from rigplan.files.job import length_warnings, plan_as_run
    base = plan
    plan = apply_run_state(base, state, str(log_path_for(job.plan_path))
                           if state is not None else "")
    from rigplan.files.job import tally_row_sources
    sources = {}
    for tally in (job.tally_path, getattr(args, "tally", None)):
        if tally:
            sources.update(tally_row_sources(tally))
    extra = [w for w in length_warnings(plan, sources) if w not in job.warnings]
    if plan is not job.plan:
        # a tally or the run log moved joints: where the screens land now
        from rigplan.files.job import screen_depth_warnings
        moved_by = (log_path_for(job.plan_path) if state is not None
                    else getattr(args, "tally", None) or "")
        extra += screen_depth_warnings(job.plan, plan, str(moved_by))
    job = dataclasses.replace(job, plan=plan, warnings=tuple(job.warnings) + tuple(extra))
    # the plan as run: the kind of run and the fill already in the pipe are facts
    landing = plan_as_run(base, job.rig, state, job.path_name)
    return job, landing


def _default_units(args) -> None:
    """``--units`` not given: the plan file's own unit system (``units``,
    ``"si"`` when the file leaves it out); a plan that cannot be read is
    refused later by the command itself, in one line."""
    if not hasattr(args, "units") or args.units is not None:
        return
    args.units = "us"
    plan = getattr(args, "plan", None)
    if not plan:
        return
    try:
        from rigplan.files.formats import read_toml
        found = read_toml(plan).get("units", "si")
    except (InputError, OSError, ValueError):
        return
    if found in ("us", "si"):
        args.units = found


def _system(args) -> str:
    """The unit system for the presentation layer (``us``, ``si``, ``us+si``, ``si+us``)."""
    other = {"us": "si", "si": "us"}[args.units]
    return f"{args.units}+{other}" if getattr(args, "both_units", False) else args.units


def _console(**kw):
    import os
    from rich.console import Console
    width = None if sys.stdout.isatty() or "COLUMNS" in os.environ else 120
    return Console(highlight=False, width=width, **kw)


def _exit_for(landing) -> int:
    return EXIT_LANDS if landing.lands else EXIT_LIMIT


def _many_rigs(args) -> bool:
    rigs = args.rig if isinstance(args.rig, list) else [args.rig]
    return len(rigs) > 1 or any(_is_dir(r) for r in rigs)


def _is_dir(path) -> bool:
    """Whether ``path`` is a folder; a name the system refuses is not one
    (it is then refused as a file, in one line)."""
    try:
        return Path(path).is_dir()
    except (OSError, ValueError):
        return False


def cmd_check(args) -> int:
    from rigplan.present.report import plan_dict, text_renderables
    if _many_rigs(args):
        return cmd_check_rigs(args)
    job, landing = _load(args)
    from rigplan.cli_rack import liner_of
    liner = liner_of(job, landing)
    code = _exit_for(landing)
    if liner is not None and not liner.assessment.fit.fits:
        code = EXIT_LIMIT          # the liner does not pass the old casing
    if args.format == "json":
        doc = plan_dict(landing, job.plan, job.warnings, job.rig.name)
        if liner is not None:
            from rigplan.present.rack import liner_dict
            doc["liner"] = {k: v for k, v in liner_dict(liner, {}).items() if k != "plan"}
        doc["exit_code"] = code
        # compact and in one piece: a long string's JSON is megabytes
        sys.stdout.write(json.dumps(doc, allow_nan=False, separators=(",", ":")) + "\n")
    else:
        console = _console()
        try:
            for r in text_renderables(landing, job.plan, _system(args), job.warnings, job.rig.name,
                                      all_steps=True if args.full else
                                      False if args.brief else None):
                console.print(r)
            if liner is not None:
                from rigplan.present.rack import liner_lines
                console.print("Liner in the old casing (rigplan liner gives the full profile):")
                for line in liner_lines(liner, _system(args)):
                    console.print("  " + line, markup=False)
        except SystemExit:
            # rich ends the process this way when the reader of a pipe (such
            # as `| head`) has gone: the verdict still decides the exit code
            pass
    return code


def _weigh(args, plan_override=None):
    """(job, candidates) for every rig and path named on the command line."""
    from rigplan.present.packet.rigs import expand_rigs, weigh_rigs
    job, landing = _load(_with_first_rig(args))
    plan = plan_override or job.plan
    rigs = expand_rigs(args.rig if isinstance(args.rig, list) else [args.rig], job.plan_path)
    fixed = False
    if getattr(args, "as_run", False):
        from rigplan.files.job import read_run_state
        state = read_run_state(job.plan_path)
        fixed = bool(state is not None and state.run)
    return job, weigh_rigs(plan, rigs, args.path, fixed_closure=fixed)


def _with_first_rig(args):
    import copy
    from rigplan.present.packet.rigs import expand_rigs
    one = copy.copy(args)
    rigs = args.rig if isinstance(args.rig, list) else [args.rig]
    one.rig = str(expand_rigs(rigs[:1], args.plan)[0]) if _is_dir(rigs[0]) else rigs[0]
    return one


def cmd_check_rigs(args) -> int:
    """``check`` with several rigs: one table of every rig path's verdict and margin."""
    from rigplan.present.packet.content import rig_choice_table
    job, cands = _weigh(args)
    choices = [c.choice for c in cands]
    if args.format == "json":
        doc = {"plan": job.plan.name, "rigs": [
            {"rig": c.rig, "path": c.path, "verdict": c.verdict, "lands": c.lands,
             "governing": c.governing, "margin": c.margin if c.margin == c.margin else None,
             "string_limit": c.string_limit if c.string_limit == c.string_limit else None,
             "hook_limit": c.hook_limit if c.hook_limit == c.hook_limit else None,
             "chosen": c.chosen} for c in choices],
            "units": "SI base units: N; margins are fractions"}
        from rigplan.present.wording import CAUTION
        doc["cautions"] = [CAUTION]
        doc["exit_code"] = EXIT_LANDS if any(c.lands for c in choices) else EXIT_LIMIT
        json.dump(doc, sys.stdout, indent=1, allow_nan=False)
        sys.stdout.write("\n")
    else:
        from rich.markup import escape
        from rich.table import Table
        t = rig_choice_table(choices, _system(args), mark="* lands with the largest margin")
        rt = Table(title=escape(f"{job.plan.name}: {t.title.lower()}"),
                   caption=escape(t.note) if t.note else None)
        # escaped: a unit in brackets ("string limit [lbf]") is not rich markup
        for col, a in zip(t.columns, t.align):
            rt.add_column(escape(col), justify="right" if a == "r" else "left")
        for row in t.rows:
            rt.add_row(*(escape(str(c)) for c in row))
        console = _console()
        console.print(rt)
        from rigplan import CAUTION
        console.print(f"CAUTION: {CAUTION}")
    return EXIT_LANDS if any(c.lands for c in choices) else EXIT_LIMIT


def _input_files(args, job) -> list:
    """(role, path) of every file the command reads (a report may be written
    onto none of them); ``job`` None: those named on the command line,
    before any is read."""
    from rigplan.files.runlog import log_path_for
    rigs = args.rig if isinstance(args.rig, list) else [args.rig]
    if job is None:
        from types import SimpleNamespace
        from rigplan.files.job import resolve_rig
        resolved = []
        for r in rigs:
            try:
                resolved.append(resolve_rig(r, Path(args.plan)))
            except InputError:
                pass
        job = SimpleNamespace(plan_path=Path(args.plan), rig_path=resolved[0] if resolved
                              else None, tally_path=None)
    files = [("string plan", args.plan), ("string plan", job.plan_path),
             ("rig profile", job.rig_path),
             ("tally named in the plan", getattr(job, "tally_path", None)),
             ("tally", getattr(args, "tally", None)),
             ("materials file", getattr(args, "materials", None))]
    files += [("rig profile", r) for r in rigs if r and _exists(r)]
    if job.plan_path is not None:
        try:
            log = log_path_for(job.plan_path)
        except InputError:
            log = None
        if log is not None:
            files += [("run log", log), ("run log", Path(str(log) + "-wal")),
                      ("run log", Path(str(log) + "-shm"))]
    return [(role, Path(f)) for role, f in files if f]


def _exists(path) -> bool:
    try:
        return Path(path).exists()
    except (OSError, ValueError):
        return False


def _same_file(a: Path, b: Path) -> bool:
    import os
    try:
        if os.path.realpath(a) == os.path.realpath(b):
            return True
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except (OSError, ValueError):
        return False


def refuse_input_overwrite(out: Path, inputs, option: str = "-o") -> None:
    """An output path that is one of the ``(role, path)`` inputs is refused
    (exit 2), naming both: no command writes onto a file it reads."""
    for role, path in inputs:
        if _same_file(Path(out), Path(path)):
            raise InputError(f"{option} {out}", f"this is the {role} {str(path)!r}, an input "
                                                "of this command, and inputs are never written "
                                                "over: choose another output file")


def cmd_report(args) -> int:
    import dataclasses
    from rigplan.files.atomicio import atomic_write_bytes
    from rigplan.files.job import apply_run_state, read_run_state
    from rigplan.present.packet import FORMATS, format_for, render
    from rigplan.present.packet.content import AsRun, DEFAULT_BAND, ReportInfo
    out = Path(args.output)
    refuse_input_overwrite(out, _input_files(args, None))      # before any work
    fmt = format_for(out)
    if fmt is None:
        raise InputError(f"{out}", "unknown report format: expected a file name ending in "
                         + ", ".join(sorted(FORMATS)))
    # the plan as planned (a tally CSV applied), planned on the chosen rig
    import copy
    plain = copy.copy(args)
    plain.as_run = False
    if _many_rigs(args):
        job, cands = _weigh(plain)
        best = next(c for c in cands if c.choice.chosen)
        choices = [c.choice for c in cands]
        job = dataclasses.replace(best.job, plan_path=job.plan_path, warnings=job.warnings)
        landing = best.landing
        path_name = best.job.path_name
    else:
        job, landing = _load(plain)
        choices, path_name = [], args.path
    refuse_input_overwrite(out, _input_files(args, job))
    meta = dict(job.plan.report)
    band = DEFAULT_BAND if args.band is None else args.band / 100.0
    if not 0 < band < 1:
        raise InputError("--band", f"expected a percent between 0 and 100, got {args.band}")
    stamp = ""
    if args.stamp:
        from datetime import datetime, timezone
        stamp = datetime.now(timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    info = ReportInfo(revision=args.revision if args.revision is not None else meta.get("revision", ""),
                      date=args.date if args.date is not None else meta.get("date", ""),
                      prepared_by=args.prepared_by if args.prepared_by is not None
                      else meta.get("prepared_by", ""),
                      reviewed_by=args.reviewed_by if args.reviewed_by is not None
                      else meta.get("reviewed_by", ""),
                      paper=args.paper or "", band=band, stamp=stamp)
    as_run = None
    if args.as_run:
        from rigplan.files.job import plan_job
        state = read_run_state(job.plan_path)
        if state is None:
            raise InputError(f"{job.plan_path}: --as-run", "no run log beside the plan: the "
                                                           "job has not been run in the app")
        from rigplan.files.runlog import log_path_for
        run_plan = apply_run_state(job.plan, state, str(log_path_for(job.plan_path)))
        run_landing = plan_job(run_plan, job.rig, path_name, fixed_closure=bool(state.run))
        as_run = AsRun(job.plan, landing, state, run_plan, run_landing)
    data = render(fmt, job, landing, _system(args), info, choices, as_run, job.rig.name)
    try:
        atomic_write_bytes(out, data)
    except (OSError, ValueError) as err:
        reason = getattr(err, "strerror", None) or err
        raise InputError(f"{out}", f"cannot write the report ({reason}): expected "
                                   "a writable file path") from None
    print(f"wrote {out} ({landing.verdict.value})")
    return _exit_for(landing)


def cmd_demo(args) -> int:
    """Check every demo job; exit 1 when a verdict is not the one promised."""
    from rigplan.files.job import DEMO_JOBS, demo_jobs, load_job, plan_job
    from rigplan.present.wording import limit_place, percent
    promised = {plan: verdict for plan, _rig, verdict in DEMO_JOBS}
    worst = EXIT_LANDS
    for plan, rig in demo_jobs():
        job = load_job(plan, rig)
        landing = plan_job(job.plan, job.rig)
        g = landing.governing
        want = promised[plan.name]
        line = f"{plan.name:28s} on {rig.name:24s} {landing.verdict.value:24s}"
        if g is not None:
            line += f" {g.name} at {limit_place(g)}, margin {percent(g.margin)}"
        if landing.verdict != want:
            line += f"  <- the README promises: {want}"
            worst = EXIT_LIMIT
        print(line)
    return worst


def cmd_rigs(args) -> int:
    from rigplan.engine.findings import Kind
    from rigplan.files.formats.rigfile import read_rig
    from rigplan.engine.hoisting import path_capacity
    from rigplan.files.job import demo_dir
    from rigplan.present.wording import fmt
    for f in sorted(demo_dir("rigs").glob("*.toml")):
        rig = read_rig(f)
        print(f"{f.name}: {rig.name}")
        for p in rig.paths:
            c = path_capacity(p)
            print(f"  path {p.name!r}: string limit {fmt(c.string_limit, Kind.FORCE, 'us+si', 0)}"
                  f", hook limit {fmt(c.hook_limit, Kind.FORCE, 'us+si', 0)}, governed by "
                  f"{c.governing}" + (f" ({c.governing_case})" if c.governing_case else ""))
    return EXIT_LANDS


def cmd_open(args) -> int:
    from rigplan.files.job import apply_tally_file, load_job, read_run_state
    job = load_job(args.plan, args.rig, args.path, args.materials)   # fail fast, one line
    options = {}
    if args.tally:
        apply_tally_file(job.plan, args.tally)     # a bad tally: one line, before the app
        options["tally"] = args.tally
    if args.as_run:
        # the app always applies the run log beside the plan; --as-run asks
        # that there is one (a damaged one is offered to be set aside)
        from rigplan.files.runlog import RunLogDamaged, log_path_for
        try:
            state = read_run_state(job.plan_path)
        except RunLogDamaged:
            state = True
        if state is None:
            raise InputError(f"{log_path_for(job.plan_path)}: --as-run",
                             "no run log beside the plan: the job has not been run in the app "
                             "(leave --as-run out to start running it)")
    from rigplan.tui.app import run_app
    run_app(job.plan_path, job.rig_path, args.path, args.units, **options)
    return EXIT_LANDS


def main(argv=None) -> int:
    try:
        args = _parser().parse_args(argv)
    except SystemExit as exc:       # --help (0) or a usage error (2, one line)
        return exc.code if isinstance(exc.code, int) else EXIT_INPUT
    try:
        return _run(args)
    except (KeyboardInterrupt, SystemExit):
        raise
    except Exception as exc:      # a bug of ours: one line, never read as a verdict
        import os
        import traceback
        from rigplan.errors import one_line
        frame = traceback.extract_tb(exc.__traceback__)[-1] if exc.__traceback__ else None
        at = f" at {Path(frame.filename).name}:{frame.lineno}" if frame else ""
        print(f"rigplan: internal error{at}: {type(exc).__name__}: {one_line(exc)[:300]} "
              "(a bug in rigplan, not in your files: please report it with the files used; "
              "set RIGPLAN_DEBUG=1 for the traceback)", file=sys.stderr)
        if os.environ.get("RIGPLAN_DEBUG"):
            traceback.print_exc()
        return EXIT_INTERNAL


def _run(args) -> int:
    try:
        _default_units(args)
        if args.command is None:
            from rigplan.files.job import demo_paths
            plan, rig = demo_paths()
            from rigplan.tui.app import run_app
            run_app(plan, rig, None, "us")
            return EXIT_LANDS
        if args.command in ("place", "liner"):
            from rigplan import cli_rack
            return getattr(cli_rack, f"cmd_{args.command}")(args, _load)
        if args.command == "risk":
            from rigplan.cli_risk import cmd_risk
            return cmd_risk(args, _load)
        return {"check": cmd_check, "open": cmd_open, "report": cmd_report,
                "demo": cmd_demo, "rigs": cmd_rigs}[args.command](args)
    except InputError as err:
        print(f"rigplan: {err}", file=sys.stderr)
        if getattr(args, "format", None) == "json":
            json.dump({"error": str(err), "exit_code": EXIT_INPUT}, sys.stdout)
            sys.stdout.write("\n")
        return EXIT_INPUT
    except BrokenPipeError:
        # the reader (e.g. `| head`) went away: not an error of ours
        import os
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_LANDS


def entry() -> None:
    sys.exit(main())


if __name__ == "__main__":
    entry()
