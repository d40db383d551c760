"""``rigplan risk``: the probability of exceeding each limit of a job's plan.

Registered on the command line by :mod:`rigplan.cli`; the sampling is
:mod:`rigplan.engine.risk`, the words :mod:`rigplan.present.risk`.
"""

from __future__ import annotations

import json
import sys

from rigplan.errors import InputError


def add_commands(sub, job_args) -> None:
    """Register ``risk`` on the CLI's subparsers."""
    k = sub.add_parser("risk", help="probability of exceeding each limit when the plan is run "
                                    "(Monte Carlo over walls, weights, fluids, welds and the "
                                    "weight indicator)")
    job_args(k)
    k.add_argument("--samples", type=int, default=100_000,
                   help="number of samples (default 100,000)")
    k.add_argument("--seed", type=int, default=0, help="random seed (default 0)")
    k.add_argument("--format", choices=("text", "json"), default="text")


def cmd_risk(args, load) -> int:
    """Plan the job, sample it, print the table (or JSON); exit 0."""
    if not 1 <= args.samples <= 10_000_000:
        raise InputError("--samples", f"expected a whole number of samples 1..10,000,000, "
                                      f"got {args.samples}")
    job, landing = load(args)
    from rigplan.engine.risk import exceedance
    from rigplan.present.risk import risk_dict, risk_renderables, with_progress
    specs = job.plan.running_joints()
    try:
        result = with_progress(
            lambda progress: exceedance(landing, specs, samples=args.samples, seed=args.seed,
                                        progress=progress), args.samples, sys.stderr)
    except ValueError as err:
        raise InputError(f"{job.plan_path}", f"cannot sample this plan: {err}") from None
    name, verdict = job.plan.name, str(landing.verdict)
    if args.format == "json":
        sys.stdout.write(json.dumps(risk_dict(result, name, verdict), allow_nan=False) + "\n")
    else:
        from rich.console import Console
        console = Console(highlight=False, width=None if sys.stdout.isatty() else 120)
        for r in risk_renderables(result, name, verdict):
            console.print(r)
    return 0
