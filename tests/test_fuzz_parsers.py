"""Every edge refuses bad input in one line, and accepts nothing it should not.

At least 10,000 generated inputs per parser (plan, rig, materials, tally,
run log, quantity text, the app's prompt validators): mutations of the
bundled files and values from pools of trouble (``tests/fuzzlib.py``), split
over the machine's two cores, plus Hypothesis strategies for the quantity
text and tally rows.  The judge: an InputError of one line that starts with
the file (or the prompt's field) concerned, or an accepted result whose
every number is finite and inside its range (``rigplan.files.ranges``); any
other exception, a Python warning or a silent accept fails the test, which
prints the seed and the first inputs that failed.

The requirement (one line naming file, key or row; exit 2; never a
traceback) is the project's own: README "Exit codes", DEVELOPERS.md
"Errors and user data".
"""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

import fuzzlib as F
from rigplan.errors import InputError
from rigplan.files import ranges, units

SEED = 20261202


@pytest.mark.parametrize("edge", [k for k in F.CI_COUNTS if k != "command line"])
def test_generated_inputs_never_get_past_the_edge(edge):
    fn, n = F.CI_COUNTS[edge]
    stats = F.run_parallel(fn, n, SEED)
    assert stats.tried >= 10_000, stats.summary()
    assert stats.failures == 0, stats.report()
    # both outcomes were exercised: the generator is neither all-good nor all-bad
    assert stats.refused > 0.1 * stats.tried and stats.accepted > 0.03 * stats.tried, stats.summary()


# -- Hypothesis strategies ---------------------------------------------------

_quantity_text = st.one_of(
    st.text(max_size=30),
    st.builds(lambda n, u: f"{n}{u}", st.floats(allow_nan=True, allow_infinity=True).map(repr),
              st.sampled_from(F.UNITS)),
    st.builds(lambda a, b, u: f"{a}-{b}/{max(b, 1) * 2}{u}", st.integers(0, 10 ** 30),
              st.integers(-5, 10 ** 6), st.sampled_from(F.UNITS)),
    st.builds(lambda a, b: f"{a}' {b}\"", st.integers(-3, 10 ** 20), st.integers(-3, 100)),
)


@settings(max_examples=800, deadline=None, database=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(_quantity_text, st.sampled_from(F.KINDS), st.sampled_from(units.SYSTEMS),
       st.booleans())
def test_quantity_text_is_a_finite_si_value_or_one_line(text, kind, system, bare_default):
    default = units.default_units(system)[kind] if bare_default else None
    try:
        v = units.parse(text, kind, default or None, "field")
    except InputError as err:
        assert str(err).startswith("field: ") and "\n" not in str(err)
        return
    assert isinstance(v, float) and math.isfinite(v)


_cell = st.one_of(st.text(max_size=12), st.sampled_from(F.CSV_CELLS[:36]),
                  st.floats().map(lambda x: f"{x:g}"))


@settings(max_examples=400, deadline=None, database=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(st.sampled_from(["J1", "J2", "J3", "J4", "J5", "", "J1 "]), _cell,
                          _cell, _cell), max_size=6))
def test_tally_rows_from_hypothesis(rows):
    from rigplan.files.formats.tally import parse_tally
    text = "label,measured_length [ft],status,measured_wall [in]\n" + "\n".join(
        ",".join(r) for r in rows)
    try:
        got = parse_tally(text, "t.csv")
    except InputError as err:
        assert str(err).startswith("t.csv") and "\n" not in str(err)
        return
    assert F.tally_problems(got) == []


def test_every_range_is_stated_with_a_reason_and_reads_in_both_unit_systems():
    # The schema itself: each range has bounds in order, a reason, and a
    # message in SI and US units (common practice, no source).
    for name, r in ranges.RANGES.items():
        assert r.name == name and r.lo < r.hi and r.why, name
        text = r.expected("us")
        assert r.what in text and "\n" not in text
        assert not r.contains(math.nan) and not r.contains(math.inf)
        assert not r.contains(r.hi * 2 + 1) and not r.contains(r.lo - abs(r.lo) - 1)
