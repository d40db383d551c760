"""Plan file temperature keys: [hole] temperature and [grout] temperature_rise."""

import pytest
from numpy.testing import assert_allclose

from rigplan.errors import InputError
from rigplan.files.formats.planfile import parse_plan, plan_text

BASE = """units = "{units}"
[hole]
fluid_density = "9 ppg"
{hole}
[[section]]
kind = "blank"
material = "pvc"
od = "8.625 in"
wall = "0.411 in"
joint_length = "20 ft"
count = 3
connection = "spline"
[grout]
density = "14 ppg"
height = "40 ft"
{grout}
"""


def plan(hole="", grout="", units="us"):
    return parse_plan(BASE.format(units=units, hole=hole, grout=grout))


@pytest.mark.parametrize("units, hole, grout, t, rise", [
    # degrees F to C: (F - 32) / 1.8; a difference in F: / 1.8 (NIST SP 811)
    ("us", 'temperature = "55 F"', 'temperature_rise = "30 F"', 23 / 1.8, 30 / 1.8),
    ("us", "temperature = 55", "temperature_rise = 30", 23 / 1.8, 30 / 1.8),
    ("si", "temperature = 13", "temperature_rise = 17", 13.0, 17.0),
    ("si", 'temperature = "13 degC"', 'temperature_rise = "17 K"', 13.0, 17.0),
    ("us", "", 'temperature_rise = "0 F"', 23.0, 0.0),
])
def test_temperatures_read_in_their_units(units, hole, grout, t, rise):
    read = plan(hole, grout, units)
    assert_allclose([read.plan.hole.temperature, read.plan.grout.temperature_rise], [t, rise],
                    atol=1e-4)
    again = parse_plan(plan_text(read.plan, units)).plan
    assert_allclose([again.hole.temperature, again.grout.temperature_rise], [t, rise], atol=1e-9)
    assert_allclose([read.plan.hole.temperature, read.plan.grout.temperature_rise], [t, rise],
                    atol=1e-12)


@pytest.mark.parametrize("hole, grout, where", [
    ('temperature = "250 F"', "", "<plan>: hole.temperature"),
    ('temperature = "warm"', "", "<plan>: hole.temperature"),
    ("temperature = true", "", "<plan>: hole.temperature"),
    ("", 'temperature_rise = "-5 F"', "<plan>: grout.temperature_rise"),
    ("", 'temperature_rise = "80 C"', "<plan>: grout.temperature_rise"),
])
def test_bad_temperatures_name_the_key_and_the_range(hole, grout, where):
    with pytest.raises(InputError) as info:
        plan(hole, grout)
    assert info.value.where == where
    assert " to " in info.value.message and "\n" not in str(info.value)


def test_pvc_grout_without_a_rise_is_warned():
    # Heat of hydration is a known cause of PVC collapse while grouting (ASTM
    # F480, from memory): a plan that leaves the rise out says so.
    assert any("temperature_rise" in w for w in plan().warnings)
    assert not any("temperature_rise" in w for w in plan(grout='temperature_rise = "20 F"').warnings)
