"""Joint placement: the bottleneck assignment and the running order of a gauged rack.

Sources: the bottleneck assignment problem (Gross, RAND P-1630, 1959; Burkard,
Dell'Amico and Martello, *Assignment Problems*, SIAM 2009, section 6.2): the
optimum is the smallest, over all permutations, of the largest pair cost;
checked here against brute force over every permutation.
"""

from __future__ import annotations

import dataclasses
import itertools
import json
from pathlib import Path

import numpy as np
import pytest

from rigplan.cli import main
from rigplan.engine import placement as pl
from rigplan.errors import InputError

ROOT = Path(__file__).resolve().parents[1]


def _brute(sc, st, jc, jt):
    u = pl.pair_utilization(sc, st, jc, jt)
    n = len(sc)
    return min(max(u[s, p[s]] for s in range(n)) for p in itertools.permutations(range(n)))


@pytest.mark.parametrize("seed", range(40))
def test_bottleneck_assignment_equals_brute_force(seed):
    # Definition of the bottleneck assignment (Burkard et al. 2009, 6.2):
    # min over permutations of the max cost, enumerated exhaustively.
    rng = np.random.default_rng(seed)
    n = int(rng.integers(2, 8))
    sc = rng.uniform(0, 100, n) * (rng.random(n) < 0.85)
    st = rng.uniform(0, 100, n)
    jc = rng.uniform(40, 300, n)
    jt = rng.uniform(40, 300, n)
    if seed % 5 == 0:                     # ties, as when joints are gauged alike
        jc = np.round(jc, -2) + 1.0
        sc = np.round(sc, -1)
    best = _brute(sc, st, jc, jt)
    got = pl.bottleneck_assignment(sc, st, jc, jt)
    assert sorted(got.order.tolist()) == list(range(n))
    assert got.max_utilization == pytest.approx(best, rel=1e-12)


@pytest.mark.parametrize("seed", range(10))
def test_large_rack_threshold_bisection_agrees(seed, monkeypatch):
    # The bisection used for very large racks reaches the same optimum as
    # the exact candidate search (brute force on small racks above).
    rng = np.random.default_rng(100 + seed)
    n = 7
    args = [rng.uniform(1, 100, n), rng.uniform(1, 100, n),
            rng.uniform(40, 300, n), rng.uniform(40, 300, n)]
    exact = pl.bottleneck_assignment(*args).max_utilization
    monkeypatch.setattr(pl, "EXACT_CANDIDATES_MAX", 0)
    assert pl.bottleneck_assignment(*args).max_utilization == pytest.approx(exact, rel=1e-9)


def test_unrated_joint_cannot_take_a_loaded_slot():
    # An unrated joint (nan) never carries a load: it goes where the load is
    # zero, or the slot is reported as impossible (common practice, no source:
    # a rating is never assumed).
    a = pl.bottleneck_assignment([0.0, 50.0], [0.0, 10.0], [np.nan, 100.0], [np.nan, 100.0])
    assert a.order.tolist() == [0, 1] and a.max_utilization == pytest.approx(0.5)
    b = pl.bottleneck_assignment([50.0, 50.0], [1.0, 1.0], [np.nan, 100.0], [100.0, 100.0])
    assert np.isinf(b.max_utilization)


def test_strongest_in_collapse_goes_deepest():
    # Sorting argument for one criterion: with tension equal, the optimal
    # order pairs the largest collapse load with the largest rating.
    sc = np.array([300.0, 200.0, 100.0, 50.0])
    rc = np.array([500.0, 900.0, 700.0, 400.0])
    a = pl.bottleneck_assignment(sc, np.ones(4), rc, np.full(4, 1e9))
    assert a.max_utilization == pytest.approx(np.max(sc / np.sort(rc)[::-1]))
    assert rc[a.order][0] == 900.0


def _rack_plan(tmp_path):
    """A plan of 12 blank A53B joints above a shoe, and a tally with a thin, oval joint on top."""
    plan = (ROOT / "strings" / "cv3-8in-a53b.toml").read_text()
    plan = plan.replace('tally = "cv3-8in-a53b.tally.csv"\n', "")
    p = tmp_path / "rack.toml"
    p.write_text(plan)
    rows = ["label,measured_length [ft],kind,status,note,measured_wall [in]"]
    walls = {"J1": 0.25, "J2": 0.25, "J3": 0.25}
    for i in range(4, 23):
        walls[f"J{i}"] = 0.25 - 0.002 * ((i * 7) % 11)
    walls["J22"] = 0.035                    # a badly corroded joint tallied at the top
    for label, w in walls.items():
        rows.append(f"{label},20.0,,run,,{w}")
    t = tmp_path / "rack.tally.csv"
    t.write_text("\n".join(rows) + "\n")
    return p, t


def test_place_improves_the_least_margin_and_writes_a_usable_tally(tmp_path, capsys):
    plan, tally = _rack_plan(tmp_path)
    out = tmp_path / "proposed.tally.csv"
    code = main(["place", str(plan), "--rig", "th30", "--tally", str(tally),
                 "-o", str(out), "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 0
    assert doc["least_margin_proposed"] >= doc["least_margin_tallied"]
    assert doc["least_margin_proposed"] > doc["least_margin_tallied"] + 1e-6
    assert len(doc["order"]) == 22 and doc["order"][0] == "J1"      # the sump stays
    assert doc["order"][1:3] == ["J2", "J3"]                        # screens stay
    # The written tally, read back, runs the joints in the proposed order and
    # gives the proposed least margin (the plan's own margin, recomputed).
    code = main(["place", str(plan), "--rig", "th30", "--tally", str(out), "--format", "json"])
    again = json.loads(capsys.readouterr().out)
    assert again["tallied_order"] == doc["order"]
    assert again["least_margin_tallied"] == pytest.approx(doc["least_margin_proposed"], rel=1e-12)


def test_place_refuses_to_write_onto_an_input(tmp_path, capsys):
    plan, tally = _rack_plan(tmp_path)
    before = tally.read_text()
    code = main(["place", str(plan), "--rig", "th30", "--tally", str(tally), "-o", str(tally)])
    assert code == 2
    assert "input" in capsys.readouterr().err
    assert tally.read_text() == before


def test_run_order_may_not_move_a_screen(tmp_path):
    from rigplan.files.formats.planfile import read_plan
    from rigplan.files.job import apply_tally_file
    plan, _ = _rack_plan(tmp_path)
    read = read_plan(plan)
    labels = [j.label for j in read.plan.joints]
    labels[1], labels[5] = labels[5], labels[1]        # a blank where a screen belongs
    t = tmp_path / "bad.tally.csv"
    t.write_text("label,run_order\n" + "\n".join(f"{lab},{i}" for i, lab in
                                                  enumerate(labels, start=1)) + "\n")
    with pytest.raises(InputError) as err:
        apply_tally_file(read.plan, t)
    assert "run_order" in str(err.value) and "bad.tally.csv" in str(err.value)


def test_nominal_key_ignores_what_is_measured_per_joint():
    from rigplan.engine.stringmodel import JointSpec
    a = JointSpec("J1", "blank", "a53b", 0.2, 0.006, 6.0)
    b = dataclasses.replace(a, label="J9", measured_wall=0.0055, measured_length=6.1)
    c = dataclasses.replace(a, wall=0.007)
    assert pl.nominal_key(a) == pl.nominal_key(b) != pl.nominal_key(c)


def test_demo_rack_tally_is_reproducible_and_placement_never_worse(tmp_path, capsys):
    import importlib.util
    spec = importlib.util.spec_from_file_location("make_cv7", ROOT / "strings" / "make_cv7_rack_tally.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    out = tmp_path / "rack.csv"
    mod.write_demo(out)
    committed = ROOT / "strings" / "cv7-16in-floated.rack.tally.csv"
    assert out.read_text() == committed.read_text()
    code = main(["place", str(ROOT / "strings" / "cv7-16in-floated.toml"), "--rig", "mw80",
                 "--tally", str(committed), "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 0 and doc["least_margin_proposed"] >= doc["least_margin_tallied"]


@pytest.mark.parametrize("seed", range(20))
def test_fewest_moves_keeps_the_threshold(seed):
    # Whatever it keeps, the order it returns never exceeds the threshold
    # (checked against the pair utilizations by definition), and it is a
    # permutation.
    rng = np.random.default_rng(200 + seed)
    n = int(rng.integers(2, 9))
    args = [rng.uniform(0, 100, n), rng.uniform(0, 100, n),
            rng.uniform(40, 300, n), rng.uniform(40, 300, n)]
    best = pl.bottleneck_assignment(*args).max_utilization
    order = pl.fewest_moves(*args, best * 1.05)
    u = pl.pair_utilization(*args)
    assert sorted(order.tolist()) == list(range(n))
    assert max(u[s, order[s]] for s in range(n)) <= best * 1.05 * (1 + 1e-12)


def test_one_weak_joint_swaps_with_one_other():
    # Four slots, the tallied order fine but for one joint too weak in the
    # deepest slot: a single swap fixes it, and nothing else moves
    # (common practice, no source: a crew re-racks as few joints as it can).
    sc = np.array([400.0, 300.0, 200.0, 100.0])
    st = np.ones(4)
    rc = np.array([350.0, 1000.0, 1000.0, 1000.0])
    rt = np.full(4, 1e9)
    order = pl.fewest_moves(sc, st, rc, rt, threshold=0.5)
    assert int(np.count_nonzero(order != np.arange(4))) == 2
    assert pl.fewest_moves(sc, st, np.full(4, 1000.0), rt, threshold=0.5).tolist() == [0, 1, 2, 3]


def test_place_never_replaces_an_existing_file_unasked(tmp_path, capsys):
    # Nothing the user wrote is overwritten without being asked (rule of the project).
    plan, tally = _rack_plan(tmp_path)
    out = tmp_path / "mine.tally.csv"
    out.write_text("my notes, keep me\n")
    code = main(["place", str(plan), "--rig", "th30", "--tally", str(tally), "-o", str(out)])
    assert code == 2 and "--force" in capsys.readouterr().err
    assert out.read_text() == "my notes, keep me\n"
    assert main(["place", str(plan), "--rig", "th30", "--tally", str(tally), "-o", str(out),
                 "--force"]) == 0
    assert "run_order" in out.read_text()
