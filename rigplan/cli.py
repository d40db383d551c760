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

    def job_args(sp, need_rig=True):
        sp.add_argument("plan", help="string plan file (strings/*.toml)")
        sp.add_argument("--rig", required=need_rig,
                        help="rig capacity profile (rigs/*.toml, or a bundled rig's name)")
        sp.add_argument("--path", default=None,
                        help="hoisting path to use (default: the one with most capacity)")
        sp.add_argument("--units", choices=("us", "si"), default="us",
                        help="display units: US field or SI (default us)")
        sp.add_argument("--materials", default=None,
                        help="extra materials file (TOML) to add to the library")
        sp.add_argument("--tally", default=None,
                        help="tally CSV whose measured lengths and rejections override the plan")
        sp.add_argument("--as-run", action="store_true",
                        help="apply the site run log beside the plan (joints run, measured "
                             "lengths, rejections): the plan as run so far")

    c = sub.add_parser("check", help="check whether the rig can land the string")
    job_args(c)
    c.add_argument("--format", choices=("text", "json"), default="text")
    c.add_argument("--brief", action="store_true",
                   help="text: show only the first and last steps and the summary")
    o = sub.add_parser("open", help="open the terminal app on a job")
    job_args(o)
    r = sub.add_parser("report", help="write the printable job plan (HTML or text)")
    job_args(r)
    r.add_argument("-o", "--output", required=True,
                   help="output file: .html for a printable page, anything else for text")
    d = sub.add_parser("demo", help="check every bundled demo job and list the verdicts")
    d.add_argument("--units", choices=("us", "si"), default="us")
    sub.add_parser("rigs", help="list the bundled rig profiles and their hoisting paths")
    return p


def _load(args):
    import dataclasses
    from rigplan.files.job import apply_run_state, apply_tally_file, load_job, plan_job, read_run_state
    job = load_job(args.plan, args.rig, args.path, args.materials)
    plan = job.plan
    if getattr(args, "tally", None):
        plan = apply_tally_file(plan, args.tally)
    fixed = False
    if getattr(args, "as_run", False):
        from rigplan.files.runlog import log_path_for
        state = read_run_state(job.plan_path)
        if state is None:
            raise InputError(f"{job.plan_path}: --as-run", "no run log beside the plan: the "
                                                           "job has not been run in the app")
        plan = apply_run_state(plan, state, str(log_path_for(job.plan_path)))
        fixed = bool(state.run)
    from rigplan.files.job import length_warnings
    extra = [w for w in length_warnings(plan) if w not in job.warnings]
    job = dataclasses.replace(job, plan=plan, warnings=tuple(job.warnings) + tuple(extra))
    landing = plan_job(plan, job.rig, job.path_name, fixed_closure=fixed)
    return job, landing


def _exit_for(landing) -> int:
    return EXIT_LANDS if landing.lands else EXIT_LIMIT


def cmd_check(args) -> int:
    from rigplan.present.report import plan_dict, text_renderables
    job, landing = _load(args)
    if args.format == "json":
        doc = plan_dict(landing, job.plan, job.warnings, job.rig.name)
        doc["exit_code"] = _exit_for(landing)
        json.dump(doc, sys.stdout, indent=1, allow_nan=False)
        sys.stdout.write("\n")
    else:
        from rich.console import Console
        console = Console(highlight=False, width=None if sys.stdout.isatty() else 120)
        try:
            for r in text_renderables(landing, job.plan, args.units, job.warnings, job.rig.name,
                                      all_steps=not args.brief):
                console.print(r)
        except SystemExit:
            # rich ends the process this way when the reader of a pipe (such
            # as `| head`) has gone: the verdict still decides the exit code
            pass
    return _exit_for(landing)


def _input_files(args, job) -> list:
    """(role, path) of every file a job command reads (``job`` None: those
    named on the command line, before any is read)."""
    from rigplan.files.runlog import log_path_for
    if job is None:
        from types import SimpleNamespace
        from rigplan.files.job import resolve_rig
        try:
            rig = resolve_rig(args.rig, Path(args.plan))
        except InputError:
            rig = None
        job = SimpleNamespace(plan_path=Path(args.plan), rig_path=rig, tally_path=None)
    files = [("string plan", job.plan_path), ("rig profile", job.rig_path)]
    if getattr(job, "tally_path", None) is not None:
        files.append(("tally named in the plan", job.tally_path))
    if getattr(args, "tally", None):
        files.append(("tally", Path(args.tally)))
    if getattr(args, "materials", None):
        files.append(("materials file", Path(args.materials)))
    log = log_path_for(job.plan_path)
    files += [("run log", log), ("run log", Path(str(log) + "-wal")),
              ("run log", Path(str(log) + "-shm"))]
    return [(role, Path(p)) for role, p in files if p is not None]


def _same_file(a: Path, b: Path) -> bool:
    import os
    try:
        if os.path.realpath(a) == os.path.realpath(b):
            return True
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except (OSError, ValueError):
        return False


def refuse_overwrite(out: Path, inputs, option: str = "-o") -> None:
    """InputError when ``out`` is one of the ``(role, path)`` inputs: no
    command writes onto a file it reads."""
    for role, path in inputs:
        if _same_file(Path(out), Path(path)):
            raise InputError(f"{option} {out}", f"this is the {role} {str(path)!r}, which the "
                                                "command reads: it is never written over; "
                                                "choose another output file")


def cmd_report(args) -> int:
    from rich.console import Console
    from rigplan.files.atomicio import atomic_write_text
    from rigplan.present.report import text_renderables
    out = Path(args.output)
    refuse_overwrite(out, _input_files(args, None))      # before any work
    job, landing = _load(args)
    refuse_overwrite(out, _input_files(args, job))       # the plan's own tally too
    import io
    console = Console(record=True, width=110, file=io.StringIO(), highlight=False)
    for r in text_renderables(landing, job.plan, args.units, job.warnings, job.rig.name):
        console.print(r)
    if out.suffix.lower() in (".html", ".htm"):
        text = console.export_html(inline_styles=True)
        title = (f"<title>rigplan: {job.plan.name} - {landing.verdict}</title>\n"
                 "<style>@media print { pre { font-size: 7pt; white-space: pre; } "
                 "body { margin: 1cm; } }</style>")
        text = text.replace("<head>", "<head>\n" + title, 1)
    else:
        text = console.export_text()
    try:
        atomic_write_text(out, text)
    except (OSError, ValueError) as err:
        reason = getattr(err, "strerror", None) or err
        raise InputError(f"{out}", f"cannot write the report ({reason}): expected "
                                   "a writable file path") from None
    print(f"wrote {out} ({landing.verdict})")
    return _exit_for(landing)


def cmd_demo(args) -> int:
    from rigplan.files.job import demo_jobs, load_job, plan_job
    worst = EXIT_LANDS
    for plan, rig in demo_jobs():
        job = load_job(plan, rig)
        landing = plan_job(job.plan, job.rig)
        g = landing.governing
        print(f"{plan.name:28s} on {rig.name:24s} {landing.verdict:24s}"
              f" {g.name if g else ''} margin {100 * g.margin:.1f} %" if g else "")
        worst = max(worst, _exit_for(landing))
    return EXIT_LANDS


def cmd_rigs(args) -> int:
    from rigplan.files.formats.rigfile import read_rig
    from rigplan.engine.hoisting import path_capacity
    from rigplan.files.job import demo_dir
    from rigplan.files import units as U
    for f in sorted(demo_dir("rigs").glob("*.toml")):
        rig = read_rig(f)
        print(f"{f.name}: {rig.name}")
        for p in rig.paths:
            c = path_capacity(p)
            print(f"  path {p.name!r}: string limit {U.format(c.string_limit, 'force', 'us', 0)}"
                  f" ({U.format(c.string_limit, 'force', 'si', 1)}), governed by {c.governing}")
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
        if args.command is None:
            from rigplan.files.job import demo_paths
            plan, rig = demo_paths()
            from rigplan.tui.app import run_app
            run_app(plan, rig, None, "us")
            return EXIT_LANDS
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
