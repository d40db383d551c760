"""Tests for rigplan.engine.hoisting.

Published check values come from:

* Bourgoyne, Millheim, Chenevert and Young, *Applied Drilling Engineering*,
  SPE Textbook Series vol. 2, 1986 ("ADE"), ch. 1: the block-efficiency
  formula, Table 1.2 and Example 1.2;
* API RP 9B worked example (10 lines, 400,000 lb on the hook), figures as
  quoted in API RP 9B and Bourgoyne et al. (1986), as recalled (from memory).

Path-capacity tests use hand arithmetic written out beside each check; the
deduction rules (dead load off hook components only, overpull reserve,
dynamic allowance) are common practice, no source.
"""

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from rigplan.errors import InputError
from rigplan.engine.hoisting import (
    Component,
    HoistPath,
    LandingString,
    PathCapacity,
    Rig,
    best_path,
    block_efficiency,
    derrick_efficiency_factor,
    derrick_load,
    equivalent_derrick_load,
    fast_line_load,
    path_capacity,
    rig_capacity,
)

#: One pound-force in newtons: 0.45359237 kg x 9.80665 m/s^2 (international
#: pound, 1959, and standard gravity; NIST SP 811, appendix B).
from _units import lbf as LBF  # NIST SP 811


# ---------------------------------------------------------------------------
# block efficiency


# ADE ch. 1, E = (K^n - 1)/(n K^n (K - 1)) with K = 1.04: 0.874, 0.842, 0.811,
# 0.782 for 6, 8, 10, 12 lines (formula values, three decimals).
ADE_FORMULA_EFFICIENCY_K104 = [(6, 0.874), (8, 0.842), (10, 0.811), (12, 0.782)]


@pytest.mark.parametrize("lines, expected", ADE_FORMULA_EFFICIENCY_K104)
def test_block_efficiency_ade_formula_values(lines, expected):
    # Source: ADE ch. 1 formula values, roller bearings K = 1.04; the
    # published figures are rounded to three decimals, hence atol 5e-4.
    assert_allclose(block_efficiency(lines, 1.04), expected, rtol=0, atol=5e-4)


def test_block_efficiency_default_is_roller_bearing_k():
    # ADE ch. 1 / API RP 9B: K = 1.04 for roller-bearing sheaves; 8 lines -> 0.842.
    assert_allclose(block_efficiency(8), 0.842, rtol=0, atol=5e-4)


def test_block_efficiency_vectorised_matches_ade_formula_table():
    # Same ADE ch. 1 formula values, evaluated as one array.
    lines = np.array([n for n, _ in ADE_FORMULA_EFFICIENCY_K104])
    expected = np.array([e for _, e in ADE_FORMULA_EFFICIENCY_K104])
    assert_allclose(block_efficiency(lines), expected, rtol=0, atol=5e-4)


def test_block_efficiency_ade_table_differs_for_many_lines():
    # ADE Table 1.2 lists 0.770 for 12 lines on roller bearings; the formula
    # (which this module follows) gives 0.782.  The table is the lower value by
    # about 0.012: this check pins which source the module follows.
    e12 = block_efficiency(12, 1.04)
    assert_allclose(e12, 0.782, rtol=0, atol=5e-4)
    assert abs(e12 - 0.770) > 0.01


def test_block_efficiency_single_line_and_frictionless_limit():
    # Geometric-series form of the ADE ch. 1 formula: E_n = (1/n) sum K^-i.
    # One line over one sheave: E_1 = 1/K = 1/1.04 = 0.961538...
    assert_allclose(block_efficiency(1, 1.04), 1 / 1.04, rtol=1e-12)
    # Frictionless sheaves: every line carries the fast-line pull, E = 1
    # (limit K -> 1 of the formula); continuity just above K = 1.
    assert block_efficiency(6, 1.0) == 1.0
    assert_allclose(block_efficiency(6, 1.0 + 1e-10), 1.0, rtol=1e-9)


def test_block_efficiency_two_lines_hand_arithmetic():
    # Two lines, K = 1.04: lines carry F/1.04 and F/1.04^2, so
    # E = (1/1.04 + 1/1.0816) / 2 = (0.9615385 + 0.9245562) / 2 = 0.9430473
    # (ADE ch. 1 derivation of the formula).
    assert_allclose(block_efficiency(2, 1.04), 0.9430473, rtol=1e-6)


@pytest.mark.parametrize("bad", [0, -3, 2.5, True, float("nan"), "8"])
def test_block_efficiency_rejects_bad_line_count(bad):
    with pytest.raises(InputError, match="lines"):
        block_efficiency(bad)


@pytest.mark.parametrize("bad", [0.99, 0.0, float("nan"), float("inf")])
def test_block_efficiency_rejects_bad_sheave_factor(bad):
    with pytest.raises(InputError, match="sheave factor"):
        block_efficiency(8, bad)


def test_input_error_is_a_value_error():
    with pytest.raises(ValueError):
        block_efficiency(0)


# ---------------------------------------------------------------------------
# fast line, derrick loads


def test_fast_line_api_rp9b_example():
    # API RP 9B worked example: 10 lines, K = 1.04, 400,000 lb on the hook:
    # fast-line factor 1/(n E) = 0.123 and fast-line load about 49,200 lb
    # (= 400,000 x 0.123, the factor rounded to three decimals).
    e10 = block_efficiency(10, 1.04)
    assert_allclose(1.0 / (10 * e10), 0.123, rtol=0, atol=5e-4)
    f = fast_line_load(400_000.0 * LBF, 10, 1.04)
    # the example's rounded factor makes its 49,200 lb about 0.24 % low
    assert_allclose(f / LBF, 49_200.0, rtol=3e-3)


def test_fast_line_ade_example_1_2_with_table_efficiency():
    # ADE Example 1.2: 300,000 lbf hook load, 8 lines, E = 0.841 (Table 1.2)
    # -> fast-line tension 300,000 / (8 x 0.841) = 44,590 lbf.
    f = fast_line_load(300_000.0 * LBF, 8, efficiency=0.841)
    assert_allclose(f / LBF, 44_590.0, rtol=0, atol=1.0)


def test_fast_line_ade_example_1_2_with_formula_efficiency():
    # ADE Example 1.2 loads with the formula E_8 = 0.842 (ADE ch. 1) instead
    # of the table's 0.841: 300,000 / (8 x 0.842) = 44,537 lbf; the two
    # sources agree to 0.1 %.
    f = fast_line_load(300_000.0 * LBF, 8)
    assert_allclose(f / LBF, 44_590.0, rtol=1.5e-3)
    # 0.842 is rounded to 5e-4 of 0.84, i.e. 6e-4 relative
    assert_allclose(f / LBF, 300_000.0 / (8 * 0.842), rtol=6e-4)


def test_fast_line_load_array_is_linear_in_hook_load():
    # F_f = W/(nE) (ADE ch. 1): twice the hook load, twice the fast line.
    f = fast_line_load(np.array([100e3, 200e3]), 6)
    assert_allclose(f[1], 2 * f[0], rtol=1e-12)
    # 100 kN / (6 x 0.874) = 19,069 N with ADE's formula value for 6 lines
    assert_allclose(f[0], 100e3 / (6 * 0.874), rtol=6e-4)


def test_derrick_load_ade_example_1_2():
    # ADE Example 1.2: F_d = W (1 + E + E n) / (E n), W = 300,000 lbf, n = 8,
    # E = 0.841: 300,000 x (1 + 0.841 + 6.728) / 6.728
    #          = 300,000 x 8.569 / 6.728 = 382,090 lbf
    # (382,090 lbf is also the example's printed answer, from memory).
    hand = 300_000.0 * (1 + 0.841 + 0.841 * 8) / (0.841 * 8)
    assert_allclose(hand, 382_090.0, atol=1.0)
    f = derrick_load(300_000.0 * LBF, 8, 0.841)
    assert_allclose(f / LBF, 382_090.0, rtol=0, atol=1.0)


def test_equivalent_derrick_load_ade_example_1_2():
    # ADE Example 1.2: F_de = W (n + 4)/n = 300,000 x 12 / 8 = 450,000 lbf.
    f = equivalent_derrick_load(300_000.0 * LBF, 8)
    assert_allclose(f / LBF, 450_000.0, rtol=1e-12)


def test_derrick_efficiency_factor_ade_example_1_2():
    # ADE Example 1.2: E_d = F_d / F_de = 382,090 / 450,000 = 0.849
    # (the example's printed value, from memory).
    assert_allclose(derrick_efficiency_factor(8, 0.841), 382_090.0 / 450_000.0, rtol=1e-5)
    assert_allclose(derrick_efficiency_factor(8, 0.841), 0.849, atol=5e-4)


@pytest.mark.parametrize("bad", [0.0, 1.2, -0.5, float("nan")])
def test_derrick_load_rejects_bad_efficiency(bad):
    with pytest.raises(InputError, match="efficiency"):
        derrick_load(1e5, 8, bad)


def test_loads_reject_negative_or_nan_hook_load():
    with pytest.raises(InputError, match="hook load"):
        fast_line_load(-1.0, 8)
    with pytest.raises(InputError, match="hook load"):
        equivalent_derrick_load(float("nan"), 8)


# ---------------------------------------------------------------------------
# path capacity (hand arithmetic; deductions are common practice, no source)


def _main_path(**kw):
    # Frictionless sheaves (K = 1, so E = 1 exactly) keep the arithmetic in
    # the comments exact.  Winch 40 kN x 4 lines = 160 kN at the hook; rope
    # 180 kN / 3 = 60 kN x 4 = 240 kN; mast 150 kN; top head unrated.
    args = dict(
        name="main winch, 4 lines", lines=4, sheave_factor=1.0,
        winch_line_pull=40e3, rope_breaking_force=180e3, rope_design_factor=3.0,
        mast_rating=150e3, tools=(("casing elevator", "elevator", 120e3),),
        dead_load=10e3, overpull_reserve=20e3,
    )
    args.update(kw)
    return HoistPath(**args)


def test_path_capacity_handling_tool_governs():
    # Allowed string loads (kN):
    #   winch    160 - 20 - 10 = 130
    #   rope     240 - 20 - 10 = 210
    #   mast     150 - 20 - 10 = 120
    #   elevator 120 - 20      = 100   (holds the string only: no dead load)
    # -> elevator governs, string 100 kN, hook 100 + 10 = 110 kN.
    cap = path_capacity(_main_path())
    assert isinstance(cap, PathCapacity)
    assert cap.path == "main winch, 4 lines"
    assert cap.governing == "casing elevator"
    assert_allclose(cap.string_limit, 100e3, rtol=1e-12)
    assert_allclose(cap.hook_limit, 110e3, rtol=1e-12)
    assert cap.unrated == ("top head pull-up",)
    names = [c[0] for c in cap.components]
    assert names == ["winch line pull", "wire rope", "mast", "casing elevator"]
    ratings = {c[0]: c[2] for c in cap.components}
    allowed = {c[0]: c[3] for c in cap.components}
    assert_allclose([ratings[k] for k in names], [160e3, 240e3, 150e3, 120e3], rtol=1e-12)
    assert_allclose([allowed[k] for k in names], [130e3, 210e3, 120e3, 100e3], rtol=1e-12)


def test_path_capacity_mast_governs_with_stronger_elevator():
    # Elevator 200 kN -> 200 - 20 = 180; mast 120 now the least -> mast,
    # string 120 kN, hook 130 kN.
    cap = path_capacity(_main_path(tools=(("casing elevator", "elevator", 200e3),)))
    assert cap.governing == "mast"
    assert_allclose(cap.string_limit, 120e3, rtol=1e-12)
    assert_allclose(cap.hook_limit, 130e3, rtol=1e-12)


def test_shock_and_overpull_are_separate_load_cases():
    # Hand arithmetic (kN), dynamic factor 1.25, overpull reserve 20, gear 10;
    # shock: R/1.25 - gear, overpull: R - gear - 20 (common practice, no
    # source, for the dynamic factor; API RP 7G margin of overpull, from
    # memory, for the static pull), each part the smaller of the two:
    #   winch    160/1.25 - 10 = 118   160 - 10 - 20 = 130  -> 118 shock
    #   rope     240/1.25 - 10 = 182   240 - 10 - 20 = 210  -> 182 shock
    #   mast     150/1.25 - 10 = 110   150 - 10 - 20 = 120  -> 110 shock
    #   elevator 120/1.25      =  96   120      - 20 = 100  ->  96 shock
    # Not stacked: the old rule (R/1.25 - 20 - gear) would give 76 for the
    # elevator.
    cap = path_capacity(_main_path(dynamic_factor=1.25))
    assert cap.governing == "casing elevator"
    assert cap.governing_case == "shock"
    assert_allclose(cap.string_limit, 96e3, rtol=1e-12)
    assert_allclose(cap.hook_limit, 106e3, rtol=1e-12)
    parts = {p.name: p for p in cap.parts}
    assert_allclose([parts[k].shock_limit for k in ("winch line pull", "wire rope", "mast",
                                                     "casing elevator")],
                    [118e3, 182e3, 110e3, 96e3], rtol=1e-12)
    assert_allclose([parts[k].overpull_limit for k in ("winch line pull", "wire rope", "mast",
                                                        "casing elevator")],
                    [130e3, 210e3, 120e3, 100e3], rtol=1e-12)
    # With a small dynamic factor the overpull case governs instead:
    # elevator 120/1.1 = 109.1 > 120 - 20 = 100 -> overpull, 100 kN.
    cap = path_capacity(_main_path(dynamic_factor=1.1))
    assert cap.governing == "casing elevator" and cap.governing_case == "overpull"
    assert_allclose(cap.string_limit, 100e3, rtol=1e-12)


def test_dead_load_makes_stronger_hook_part_govern_over_weaker_tool():
    # Elevator 100 kN (string only) vs mast 110 kN carrying 15 kN of gear:
    # mast allows 110 - 15 = 95 kN of string < elevator's 100 kN.
    p = HoistPath("hoist", lines=1, sheave_factor=1.0, mast_rating=110e3,
                  tools=(("elevator", "elevator", 100e3),), dead_load=15e3)
    cap = path_capacity(p)
    assert cap.governing == "mast"
    assert_allclose(cap.string_limit, 95e3, rtol=1e-12)
    assert_allclose(cap.hook_limit, 110e3, rtol=1e-12)
    assert set(cap.unrated) == {"winch line pull", "wire rope", "top head pull-up"}


def test_other_tool_kind_carries_dead_load():
    # A hook rated 100 kN ("other") carries the gear above the string too:
    # 100 - 15 = 85 kN of string.
    p = HoistPath("hoist", mast_rating=500e3, tools=(("hook", "other", 100e3),),
                  dead_load=15e3)
    cap = path_capacity(p)
    assert cap.governing == "hook"
    assert_allclose(cap.string_limit, 85e3, rtol=1e-12)


def test_winch_on_lines_uses_ade_efficiency():
    # 50 kN line pull on 8 lines, K = 1.04: 50 x 8 x 0.842 = 336.8 kN at the
    # hook (ADE ch. 1 formula efficiency for 8 lines, three decimals).
    p = HoistPath("main", lines=8, winch_line_pull=50e3)
    cap = path_capacity(p)
    assert cap.governing == "winch line pull"
    assert_allclose(cap.hook_limit, 50e3 * 8 * 0.842, rtol=6e-4)


def test_rope_design_factor_applies_to_breaking_force():
    # Rope MBF 300 kN, DF 3 -> 100 kN working pull; single line over one
    # sheave E_1 = 1/1.04 (ADE formula, n = 1): 100 / 1.04 = 96.15 kN.
    p = HoistPath("aux", lines=1, rope_breaking_force=300e3, rope_design_factor=3.0)
    cap = path_capacity(p)
    assert cap.governing == "wire rope"
    assert_allclose(cap.string_limit, 100e3 / 1.04, rtol=1e-12)


def test_top_head_pullup_as_given():
    # Top-head pull-up 90 kN, top head (8 kN) rides on the string: 90 - 8 = 82.
    p = HoistPath("top head", top_head_pullup=90e3, dead_load=8e3)
    cap = path_capacity(p)
    assert cap.governing == "top head pull-up"
    assert_allclose(cap.string_limit, 82e3, rtol=1e-12)


def test_nothing_rated_gives_nan_and_lists_all_unrated():
    cap = path_capacity(HoistPath("bare", tools=(("clamp", "clamp", float("nan")),)))
    assert math.isnan(cap.string_limit) and math.isnan(cap.hook_limit)
    assert cap.governing == ""
    assert cap.components == ()
    assert cap.unrated == ("winch line pull", "wire rope", "mast", "top head pull-up", "clamp")


def test_limit_can_go_negative_when_gear_exceeds_rating():
    # Mast 10 kN with 12 kN of gear: 10 - 12 = -2 kN of string: nothing can be hung.
    cap = path_capacity(HoistPath("weak", mast_rating=10e3, dead_load=12e3))
    assert_allclose(cap.string_limit, -2e3, rtol=1e-12)


def test_components_list_and_kinds():
    comps = _main_path().components()
    assert all(isinstance(c, Component) for c in comps)
    kinds = [c.kind for c in comps]
    assert kinds == ["winch", "wire_rope", "mast", "top_head", "elevator"]
    assert [c.carries_dead_load for c in comps] == [True, True, True, True, False]


@pytest.mark.parametrize("field, bad, match", [
    ("lines", 0, "lines"),
    ("lines", 2.5, "whole number"),
    ("lines", True, "whole number"),
    ("sheave_factor", 0.98, "sheave factor"),
    ("rope_design_factor", 0.0, "design factor"),
    ("rope_design_factor", -1.0, "design factor"),
    ("dynamic_factor", 0.9, "dynamic factor"),
    ("winch_line_pull", -5.0, "winch line pull"),
    ("winch_line_pull", 0.0, "> 0 N"),
    ("mast_rating", float("inf"), "finite"),
    ("dead_load", -1.0, "dead load"),
    ("dead_load", float("nan"), "dead load"),
    ("overpull_reserve", -1.0, "overpull"),
    ("tools", (("e", "elevator", -1.0),), "tool rating"),
    ("tools", (("e", "hammer", 1.0),), "kind"),
    ("tools", (("e", "winch", 1.0),), "kind"),
    ("tools", (("e", "elevator"),), "name, kind, rating"),
    ("tools", (("mast", "clamp", 1.0),), "used twice"),
    ("tools", (("a", "clamp", 1.0), ("a", "spider", 2.0)), "used twice"),
])
def test_hoist_path_validation(field, bad, match):
    with pytest.raises(InputError, match=match) as err:
        HoistPath("p1", **{field: bad})
    # the message names the path and the key
    assert "p1" in str(err.value)
    assert field in str(err.value)


def test_hoist_path_accepts_whole_float_lines_and_stores_int():
    p = HoistPath("p", lines=4.0)
    assert p.lines == 4 and isinstance(p.lines, int)


def test_component_validation():
    with pytest.raises(InputError, match="kind"):
        Component("x", "crane", 1e3, True)
    with pytest.raises(InputError, match="rating"):
        Component("x", "mast", -1e3, True)


# ---------------------------------------------------------------------------
# rig


def _rig():
    return Rig(
        name="demo rig",
        paths=(
            _main_path(),                                     # 100 kN (see above)
            HoistPath("top head", top_head_pullup=90e3, dead_load=8e3),  # 82 kN
            HoistPath("unrated aux"),                         # nan
        ),
        landing_string=LandingString("demo landing pipe", weight_per_length=150.0,
                                     tensile_rating=400e3),
    )


def test_rig_capacity_in_order_and_best_path():
    caps = rig_capacity(_rig())
    assert [c.path for c in caps] == ["main winch, 4 lines", "top head", "unrated aux"]
    best = best_path(_rig())
    # 100 kN (main, hand arithmetic above) > 82 kN (top head); nan skipped
    assert best.path == "main winch, 4 lines"
    assert_allclose(best.string_limit, 100e3, rtol=1e-12)


def test_best_path_with_nothing_rated_raises():
    rig = Rig("r", paths=(HoistPath("a"), HoistPath("b")), source="rigs/r.toml")
    with pytest.raises(InputError, match="rated") as err:
        best_path(rig)
    assert "rigs/r.toml" in str(err.value)


def test_rig_rejects_duplicate_path_names_and_non_paths():
    with pytest.raises(InputError, match="used twice"):
        Rig("r", paths=(HoistPath("a"), HoistPath("a")))
    with pytest.raises(InputError, match="HoistPath"):
        Rig("r", paths=("a",))


def test_rig_paths_become_tuple():
    rig = Rig("r", paths=[HoistPath("a")])
    assert isinstance(rig.paths, tuple)


def test_landing_string_validation():
    LandingString("ok", 150.0, float("nan"))  # unrated is allowed
    with pytest.raises(InputError, match="weight per length"):
        LandingString("x", 0.0, 1e5)
    with pytest.raises(InputError, match="tensile rating"):
        LandingString("x", 150.0, -1e5)
    with pytest.raises(InputError, match="bore"):
        LandingString("x", 150.0, 1e5, od=0.1, bore=0.12)
    with pytest.raises(InputError, match="density"):
        LandingString("x", 150.0, 1e5, density=0.0)


def test_frozen_dataclasses():
    p = HoistPath("p")
    with pytest.raises(AttributeError):
        p.lines = 3


def test_engine_module_imports_no_units_or_ui_library():
    # Project layering rule: engine modules use numpy only, no pint/textual/rich.
    import os
    import subprocess
    import sys
    from pathlib import Path

    root = Path(__file__).resolve().parents[1]
    env = dict(os.environ, PYTHONPATH=str(root))
    code = ("import sys, rigplan.engine.hoisting; "
            "bad = [m for m in ('pint', 'textual', 'rich') if m in sys.modules]; "
            "print(bad); sys.exit(1 if bad else 0)")
    r = subprocess.run([sys.executable, "-c", code], env=env, cwd=str(root),
                       capture_output=True, text=True)
    assert r.returncode == 0, r.stdout + r.stderr


def test_unrated_parts_in_use_on_a_path():
    # Project rule (an unknown rating is never assumed) and common practice,
    # no source: a listed tool always carries the string; a winch path also
    # carries it through its rope and mast; a top-head path does not use them.
    from rigplan.engine.hoisting import HoistPath, path_capacity
    winch = HoistPath("w", lines=4, winch_line_pull=100e3, mast_rating=float("nan"),
                      tools=(("spider", "spider", float("nan")),), dead_load=1e3)
    cap = path_capacity(winch)
    assert set(cap.unrated_on_path) == {"spider", "wire rope", "mast"}
    head = HoistPath("t", top_head_pullup=200e3, dead_load=1e3)
    assert path_capacity(head).unrated_on_path == ()


# ---------------------------------------------------------------------------
# the hoisting chain on a constructed rig, read from a rig file

CONSTRUCTED_RIG = """
units = "si"
name = "constructed rig"

[[path]]
name = "main line"
lines = 4
sheave_factor = 1.04
winch_line_pull = "50 kN"
rope_breaking_force = "240 kN"
rope_design_factor = 3
mast_rating = "200 kN"
dead_load = "15 kN"
overpull_reserve = "30 kN"
dynamic_factor = 1.2

[[path.tool]]
name = "elevator"
kind = "elevator"
rating = "150 kN"

[[path]]
name = "top head"
top_head_pullup = "120 kN"
top_head_pullup_basis = "net"
top_head_pullup_net_of = "10 kN"
dead_load = "12 kN"
overpull_reserve = "20 kN"
dynamic_factor = 1.1

[[path.tool]]
name = "clamp"
kind = "clamp"
rating = "130 kN"
"""


def _constructed_chains():
    from rigplan.files.formats.rigfile import parse_rig
    return rig_capacity(parse_rig(CONSTRUCTED_RIG, "rigs/constructed.toml"))


def test_chain_main_line_by_hand():
    # Block efficiency, 4 lines, K = 1.04 (API RP 9B form, ADE ch. 1):
    # E = (1.04^4 - 1) / (4 x 1.04^4 x 0.04) = 0.16985856 / 0.18717737 = 0.907473
    # n E = 3.629893.  Rated at hook (kN):
    #   winch    50 x 3.629893        = 181.495
    #   rope     240 / 3 x 3.629893   = 290.391
    #   mast     200 (gross), elevator 150 (net: holds the string only)
    # Gear counted: 15 for winch, rope and mast; 0 for the elevator.
    # Shock, dynamic factor 1.2 (common practice, no source): R/1.2 - gear
    #   winch 136.246, rope 226.993, mast 151.667, elevator 125.000
    # Overpull, 30 kN (API RP 7G margin of overpull, from memory): R - gear - 30
    #   winch 136.495, rope 245.391, mast 155.000, elevator 120.000
    # -> elevator in overpull governs: string limit 120, hook limit 135.
    main = _constructed_chains()[0]
    kn = 1e3
    e4 = 0.16985856 / 0.18717737
    assert_allclose(main.block_efficiency, e4, rtol=1e-6)
    parts = {p.name: p for p in main.parts}
    assert [p.name for p in main.parts] == ["winch line pull", "wire rope", "mast", "elevator"]
    assert_allclose([parts[k].rated_at_hook / kn for k in parts],
                    [50 * 4 * e4, 80 * 4 * e4, 200, 150], rtol=1e-6)
    assert_allclose([parts[k].rating / kn for k in parts], [50, 240, 200, 150], rtol=1e-12)
    assert_allclose([parts[k].gear_counted / kn for k in parts], [15, 15, 15, 0], rtol=1e-12)
    assert_allclose([parts[k].shock_limit / kn for k in parts],
                    [50 * 4 * e4 / 1.2 - 15, 80 * 4 * e4 / 1.2 - 15, 200 / 1.2 - 15, 125],
                    rtol=1e-6)
    assert_allclose([parts[k].overpull_limit / kn for k in parts],
                    [50 * 4 * e4 - 45, 80 * 4 * e4 - 45, 155, 120], rtol=1e-6)
    assert_allclose(parts["winch line pull"].shock_limit / kn, 136.246, atol=5e-3)
    assert main.governing == "elevator" and main.governing_case == "overpull"
    assert_allclose(main.string_limit / kn, 120, rtol=1e-12)
    assert_allclose(main.hook_limit / kn, 135, rtol=1e-12)
    assert_allclose(main.dead_load / kn, 15, rtol=1e-12)
    shock, overpull = main.cases
    assert (shock.code, shock.factor, shock.source) == ("shock", 1.2, "common practice, no source")
    assert overpull.code == "overpull" and "API RP 7G" in overpull.source
    assert_allclose(overpull.allowance / kn, 30, rtol=1e-12)


def test_chain_top_head_net_of_its_own_weight_is_not_reduced_again():
    # Pull-up 120 kN net of the head's own 10 kN; the path's dead load 12 kN
    # (head 10 + sub and clamp 2): the rating still carries 2 kN of gear.
    #   shock 120/1.1 - 2 = 107.091, overpull 120 - 2 - 20 = 98   -> 98
    #   clamp (holds the string only): 130/1.1 = 118.18, 130 - 20 = 110
    # string limit 98 kN (head, overpull), hook limit 98 + 12 = 110 kN.
    # Counting the head's weight again and stacking the cases, as a rating
    # read as gross would, gives 120/1.1 - 20 - 12 = 77.09 kN.
    head = _constructed_chains()[1]
    kn = 1e3
    parts = {p.name: p for p in head.parts}
    hp = parts["top head pull-up"]
    assert hp.basis == "net"
    assert_allclose(hp.gear_counted / kn, 2, rtol=1e-12)
    assert_allclose(hp.shock_limit / kn, 120 / 1.1 - 2, rtol=1e-12)
    assert_allclose(hp.overpull_limit / kn, 98, rtol=1e-12)
    assert_allclose(parts["clamp"].string_limit / kn, 110, rtol=1e-12)
    assert head.governing == "top head pull-up" and head.governing_case == "overpull"
    assert_allclose(head.string_limit / kn, 98, rtol=1e-12)
    assert_allclose(head.hook_limit / kn, 110, rtol=1e-12)


def test_net_rating_of_all_the_gear_takes_no_dead_load():
    # Mast 100 kN net of all the gear (no net_of given), 15 kN dead load,
    # no shock or overpull: the string may use all 100 kN; gross, 85 kN.
    net = path_capacity(HoistPath("p", mast_rating=100e3, mast_basis="net", dead_load=15e3))
    gross = path_capacity(HoistPath("p", mast_rating=100e3, dead_load=15e3))
    assert_allclose(net.string_limit, 100e3, rtol=1e-12)
    assert_allclose(net.hook_limit, 115e3, rtol=1e-12)
    assert_allclose(gross.string_limit, 85e3, rtol=1e-12)


def test_other_tool_can_be_declared_net():
    # a hook ("other", gross by default) rated net of the 5 kN block above it
    p = HoistPath("p", tools=(("hook", "other", 100e3, "net", 5e3),), dead_load=8e3)
    cap = path_capacity(p)
    assert_allclose(cap.parts[0].gear_counted, 3e3, rtol=1e-12)
    assert_allclose(cap.string_limit, 97e3, rtol=1e-12)


@pytest.mark.parametrize("change, key, fragment", [
    (("lines = 4", "lines = 25"), "path[1].lines", "between 1 and 24"),
    (("lines = 4", "lines = 100000"), "path[1].lines", "between 1 and 24"),
    (("lines = 4", "lines = 0"), "path[1].lines", ">= 1"),
    (("sheave_factor = 1.04", "sheave_factor = 1.5"), "path[1].sheave_factor", "between 1 and 1.2"),
    (("sheave_factor = 1.04", "sheave_factor = 0.9"), "path[1].sheave_factor", "between 1 and 1.2"),
    (("sheave_factor = 1.04", 'sheave_factor = "nan"'), "path[1].sheave_factor", ""),
    (("rope_design_factor = 3", "rope_design_factor = 0.5"), "path[1].rope_design_factor",
     "between 1 and 20"),
    (("dynamic_factor = 1.2", "dynamic_factor = 12"), "path[1].dynamic_factor", "between 1 and 3"),
    (('top_head_pullup_basis = "net"', 'top_head_pullup_basis = "nett"'),
     "path[2].top_head_pullup_basis", "gross, net"),
    (('top_head_pullup_basis = "net"', 'top_head_pullup_basis = "gross"'),
     "path[2].top_head_pullup_net_of", "gross rating"),
    (('top_head_pullup_net_of = "10 kN"', 'top_head_pullup_net_of = "13 kN"'),
     "path[2].top_head_pullup_net_of", "dead_load"),
    (('rating = "130 kN"', 'rating = "130 kN"\nbasis = "heavy"'), "path[2].tool[1].basis",
     "gross, net"),
])
def test_bad_chain_keys_are_one_line_input_errors(change, key, fragment):
    from rigplan.files.formats.rigfile import parse_rig
    text = CONSTRUCTED_RIG.replace(*change, 1)
    assert text != CONSTRUCTED_RIG
    with pytest.raises(InputError) as err:
        parse_rig(text, "rigs/constructed.toml")
    msg = str(err.value)
    assert msg.startswith(f"rigs/constructed.toml: {key}:"), msg
    assert fragment in msg and "\n" not in msg


def test_engine_rejects_lines_and_sheave_factor_that_would_give_nan():
    # K^n overflows for huge n or K: E_n = inf/inf = nan; refused instead.
    with pytest.raises(InputError, match="lines"):
        HoistPath("p", lines=100000, winch_line_pull=1e3)
    with pytest.raises(InputError, match="sheave factor"):
        HoistPath("p", lines=4, sheave_factor=1e300)
    with pytest.raises(InputError, match="lines"):
        block_efficiency(np.array([4, 20000]))


def test_chain_figure_names_are_defined_once():
    from rigplan.engine.hoisting import ChainFigure
    # each figure of ChainPart / HoistChain is named by one member
    assert ChainFigure.RATED_AT_HOOK.key == "rated_at_hook"
    assert str(ChainFigure.HOOK_LIMIT) == "hook limit"
    fields = {"rating", "to_hook", "rated_at_hook", "gear_counted", "shock_limit",
              "overpull_limit", "string_limit"}
    import dataclasses as dc
    from rigplan.engine.hoisting import ChainPart
    assert fields <= {f.name for f in dc.fields(ChainPart)}
    assert fields <= {f.key for f in ChainFigure}


def test_check_json_and_text_show_the_chain(tmp_path, capsys):
    # The constructed rig's chain (hand arithmetic in test_chain_main_line_by_hand)
    # reaches `rigplan check` JSON under the ChainFigure keys, and the text
    # table names the same figures.
    import json
    from pathlib import Path
    from rigplan.cli import main
    rig = tmp_path / "constructed.toml"
    rig.write_text(CONSTRUCTED_RIG, encoding="utf-8")
    plan = Path(__file__).resolve().parents[1] / "strings" / "cv3-8in-a53b.toml"
    main(["check", str(plan), "--rig", str(rig), "--path", "main line", "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    r = doc["rig"]
    assert r["path"] == "main line" and r["governing_component"] == "elevator"
    assert r["governing_case"] == "overpull"
    assert_allclose([r["string_limit"], r["hook_limit"], r["dead_load"]],
                    [120e3, 135e3, 15e3], rtol=1e-9)
    elev = [c for c in r["components"] if c["name"] == "elevator"][0]
    assert elev["basis"] == "net"
    assert_allclose([elev["rating"], elev["rated_at_hook"], elev["gear_counted"],
                     elev["shock_limit"], elev["overpull_limit"], elev["string_limit"]],
                    [150e3, 150e3, 0.0, 125e3, 120e3, 120e3], rtol=1e-9)
    assert [c["case"] for c in r["cases"]] == ["shock", "overpull"]
    assert r["cases"][0]["source"] == "common practice, no source"
    assert all(s["hook_limit"] == r["hook_limit"] for s in doc["steps"])
    main(["check", str(plan), "--rig", str(rig), "--path", "main line", "--units", "si"])
    text = capsys.readouterr().out
    for label in ("rated at hook", "gear counted", "shock limit", "overpull limit",
                  "string limit", "hook limit", "API RP 7G"):
        assert label in text, label


async def test_app_rig_screen_shows_the_chain(tmp_path):
    # The app's rig screen shows each path's chain with the same figure names
    # (values: the constructed rig, worked by hand above).
    from pathlib import Path
    from rigplan.tui.app import build_app
    rig = tmp_path / "constructed.toml"
    rig.write_text(CONSTRUCTED_RIG, encoding="utf-8")
    import shutil
    strings = Path(__file__).resolve().parents[1] / "strings"
    for name in ("cv3-8in-a53b.toml", "cv3-8in-a53b.tally.csv"):   # the run log goes beside
        shutil.copy(strings / name, tmp_path / name)
    plan = tmp_path / "cv3-8in-a53b.toml"
    app = build_app(plan, rig, units="si")
    app.animation_level = "none"
    async with app.run_test(size=(160, 60)) as pilot:
        await pilot.press("5")
        await pilot.pause()
        from rich.console import Console
        import io
        console = Console(width=160, record=True, file=io.StringIO())
        console.print(app.query_one("#rig-view").content)
        text = console.export_text()
    for label in ("rated at hook", "gear counted", "shock limit", "overpull limit",
                  "string limit", "hook limit", "governs (overpull)", "string limit 120 kN",
                  "hook limit 135 kN", "hook limit 110 kN"):
        assert label in text, label
