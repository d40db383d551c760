"""Words and JSON for the probability of exceeding each limit.

Presentation layer: turns a :class:`rigplan.engine.risk.RiskResult` into the
``rigplan risk`` outputs.  No physics here.
"""

from __future__ import annotations

import math

from rigplan.present.wording import CAUTION

#: Samples from which ``rigplan risk`` shows a progress bar.
PROGRESS_FROM = 20_000

RISK_NOTE = ("Each sample holds the plan (float equipment and fill levels) and draws each "
             "joint's wall, ellipticity, weld efficiency and weight, the two fluid densities "
             "and the weight indicator's error; ratings on the sampled wall, no design "
             "factor. The scatters are typical figures: use the job's own where known.")


def _num(x):
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def risk_dict(result, plan_name: str = "", verdict: str = "") -> dict:
    """One JSON object: ``limits`` is a list of objects with ``name`` and
    ``probability`` (and where, the standard error and the factors)."""
    sc = result.scatter
    return {
        "plan": plan_name, "verdict": verdict, "samples": result.samples, "seed": result.seed,
        "limits": [{
            "name": lim.name, "probability": lim.probability,
            "standard_error": lim.standard_error,
            "step": lim.step or None, "joint": lim.joint or None,
            "planned_factor": _num(lim.planned_factor),
            "factor_median": _num(lim.factor_median),
            "factor_p001": _num(lim.factor_p001)} for lim in result.limits],
        "scatter": {"wall": sc.wall, "measured_wall_sd": sc.measured_wall_sd,
                    "ellipticity_spread": sc.ellipticity_spread,
                    "weld_efficiency_sd": sc.weld_efficiency_sd, "weight_sd": sc.weight_sd,
                    "hole_density_sd": sc.hole_density_sd,
                    "fill_density_sd": sc.fill_density_sd, "indicator_sd": sc.indicator_sd},
        "note": RISK_NOTE,
        "cautions": [CAUTION],
    }


def _probability(p: float, samples: int) -> str:
    if p == 0:
        return f"none in {samples:,}"
    if p < 0.001:
        return f"{p:.2e}"
    return f"{100 * p:.2f} %"


def _factor(x) -> str:
    x = _num(x)
    return "-" if x is None else f"{x:.2f}"


def _where(lim) -> str:
    if lim.joint:
        return f"joint {lim.joint} (step {lim.step})"
    if lim.step:
        return f"step {lim.step}"
    return "-"


def risk_renderables(result, plan_name: str = "", verdict: str = "") -> list:
    """Rich renderables: the table of limits and the notes."""
    from rich.table import Table
    from rich.text import Text
    t = Table(title=f"Probability of exceeding each limit: {plan_name} "
                    f"({verdict}; {result.samples:,} samples, seed {result.seed})")
    for c in ("limit", "probability", "most likely at", "factor planned", "factor median",
              "factor in 999 of 1,000"):
        t.add_column(c, justify="left" if c in ("limit", "most likely at") else "right")
    for lim in result.limits:
        t.add_row(lim.name, Text(_probability(lim.probability, result.samples),
                                 "red" if lim.probability > 0.001 else ""),
                  _where(lim), _factor(lim.planned_factor), _factor(lim.factor_median),
                  _factor(lim.factor_p001))
    t.caption = ("factor: capacity over load, least over the run (planned: with the plan's "
                 "minimum walls and stated densities)")
    return [t, Text(RISK_NOTE), Text(f"CAUTION: {CAUTION}", "bold yellow")]


def with_progress(run, samples: int, stream):
    """Call ``run(progress)``; with a rich progress bar on ``stream`` for
    long runs on a terminal."""
    if samples < PROGRESS_FROM or not stream.isatty():
        return run(None)
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn
    with Progress(TextColumn("sampling"), BarColumn(), TextColumn("{task.completed:,}/{task.total:,}"),
                  TimeRemainingColumn(), console=Console(file=stream), transient=True) as bar:
        task = bar.add_task("sampling", total=samples)
        return run(lambda done, total: bar.update(task, completed=done))
