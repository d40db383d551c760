"""Command line: ``rigplan [open|check|report|demo|rigs] ...``.

Exit codes: 0 the string lands within every limit; 1 a limit is exceeded
(or a loaded part is unrated, so landing cannot be confirmed); 2 an input
error (one line on stderr naming the file, the key or row, and what was
expected).  Textual is imported only by ``open`` and the bare command.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from rigplan.errors import InputError

EXIT_LANDS, EXIT_LIMIT, EXIT_INPUT = 0, 1, 2


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
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
    job_args(c)
    c.add_argument("--format", choices=("text", "json"), default="text")
    c.add_argument("--brief", action="store_true",
                   help="text: show only the first and last steps and the summary")
    c.add_argument("--full", action="store_true",
                   help="text: every step and joint of a long string (by default a string of "
                        "more than 60 joints shows the first and last 20 and the most loaded)")
    o = sub.add_parser("open", help="open the terminal app on a job")
    job_args(o)
    r = sub.add_parser("report", help="write the printable job plan (HTML or text)")
    job_args(r)
    r.add_argument("-o", "--output", required=True,
                   help="output file: .html for a printable page, anything else for text")
    d = sub.add_parser("demo", help="check every bundled demo job and list the verdicts")
    d.add_argument("--units", choices=("us", "si"), default="us")
    sub.add_parser("rigs", help="list the bundled rig profiles and their hoisting paths")
    from rigplan.cli_rack import add_commands
    add_commands(sub, job_args)
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
        state = read_run_state(job.plan_path)
        if state is None:
            raise InputError(f"{job.plan_path}: --as-run", "no run log beside the plan: the "
                                                           "job has not been run in the app")
        plan = apply_run_state(plan, state)
        fixed = bool(state.run)
    from rigplan.files.job import length_warnings
    extra = [w for w in length_warnings(plan) if w not in job.warnings]
    job = dataclasses.replace(job, plan=plan, warnings=tuple(job.warnings) + tuple(extra))
    landing = plan_job(plan, job.rig, job.path_name, fixed_closure=fixed)
    return job, landing


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


def cmd_check(args) -> int:
    from rigplan.present.report import plan_dict, text_renderables
    job, landing = _load(args)
    from rigplan.cli_rack import liner_of
    liner = liner_of(job, landing)
    if args.format == "json":
        doc = plan_dict(landing, job.plan, job.warnings, job.rig.name)
        if liner is not None:
            from rigplan.present.rack import liner_dict
            doc["liner"] = {k: v for k, v in liner_dict(liner, {}).items() if k != "plan"}
        doc["exit_code"] = _exit_for(landing)
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
    if liner is not None and not liner.assessment.fit.fits:
        return EXIT_LIMIT
    return _exit_for(landing)


def cmd_report(args) -> int:
    from rich.console import Console
    from rigplan.files.atomicio import atomic_write_text
    from rigplan.present.report import text_renderables
    job, landing = _load(args)
    out = Path(args.output)
    console = Console(record=True, width=110, file=open("/dev/null", "w") if sys.platform != "win32"
                      else None, highlight=False)
    for r in text_renderables(landing, job.plan, _system(args), job.warnings, job.rig.name):
        console.print(r)
    if out.suffix.lower() in (".html", ".htm"):
        text = console.export_html(inline_styles=True)
        title = (f"<title>rigplan: {job.plan.name} - {landing.verdict.value}</title>\n"
                 "<style>@media print { pre { font-size: 7pt; white-space: pre; } "
                 "body { margin: 1cm; } }</style>")
        text = text.replace("<head>", "<head>\n" + title, 1)
    else:
        text = console.export_text()
    try:
        atomic_write_text(out, text)
    except OSError as err:
        raise InputError(f"{out}", f"cannot write the report ({err.strerror or err}): expected "
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
    from rigplan.files.job import load_job
    job = load_job(args.plan, args.rig, args.path, args.materials)   # fail fast, one line
    from rigplan.tui.app import run_app
    run_app(job.plan_path, job.rig_path, args.path, args.units)
    return EXIT_LANDS


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    try:
        if args.command is None:
            from rigplan.files.job import demo_paths
            plan, rig = demo_paths()
            from rigplan.tui.app import run_app
            run_app(plan, rig, None, "us")
            return EXIT_LANDS
        if args.command in ("place", "liner"):
            from rigplan import cli_rack
            return getattr(cli_rack, f"cmd_{args.command}")(args, _load)
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
