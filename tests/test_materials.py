"""Material library (rigplan.engine.materials)."""

import dataclasses
import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import ksi, lb_per_in3, psi
from rigplan.engine import materials as mt
from rigplan.engine.materials import LIBRARY, Material, get_material, register_material


@pytest.fixture
def restore_library():
    saved = dict(LIBRARY)
    yield
    LIBRARY.clear()
    LIBRARY.update(saved)


# Specified minimum yield strengths [ksi]; each row names its standard.
YIELDS = [
    ("a53b", 35),    # ASTM A53/A53M Table 2, Grade B: 35,000 psi (from memory)
    ("hsla", 50),    # ASTM A1011/A1011M HSLAS Grade 50: 50,000 psi (from memory)
    ("ss304", 30),   # ASTM A312/A312M, TP304: 30,000 psi [205 MPa] (from memory)
    ("ss304l", 25),  # ASTM A312/A312M, TP304L: 25,000 psi [170 MPa] (from memory)
    ("ss316", 30),   # ASTM A312/A312M, TP316: 30,000 psi (from memory)
    ("ss316l", 25),  # ASTM A312/A312M, TP316L: 25,000 psi (from memory)
    ("h40", 40),     # API 5CT H40: 40,000 psi minimum yield (from memory)
    ("j55", 55),     # API 5CT J55 (from memory)
    ("k55", 55),     # API 5CT K55 (from memory)
    ("n80", 80),     # API 5CT N80 (from memory)
    ("l80", 80),     # API 5CT L80 (from memory)
    ("p110", 110),   # API 5CT P110 (from memory)
]


@pytest.mark.parametrize("key, yield_ksi", YIELDS)
def test_specified_minimum_yield(key, yield_ksi):
    assert_allclose(get_material(key).yield_strength, yield_ksi * ksi, rtol=1e-12)


def test_carbon_steel_density_matches_a53_weight_constant():
    # ASTM A53/A53M and API 5L: w = 10.69 (D - t) t lb/ft, k = 12 pi rho [lb/in^3].
    for key in ("a53b", "hsla", "h40", "j55", "p110"):
        rho = get_material(key).density / lb_per_in3
        assert_allclose(12 * np.pi * rho, 10.69, rtol=2e-4)


def test_stainless_density_near_trade_constant():
    # common practice, no source: austenitic stainless weighs about
    # 10.93 (D - t) t lb/ft; the library's 8,000 kg/m^3 is within 0.5 %.
    for key in ("ss304", "ss304l", "ss316", "ss316l"):
        rho = get_material(key).density / lb_per_in3
        assert_allclose(12 * np.pi * rho, 10.93, rtol=5e-3)


def test_steel_modulus_and_tolerance():
    # common practice, no source: E = 30e6 psi, nu = 0.3 for carbon steel;
    # ASTM A53/A53M, A312/A312M, API 5CT: 12.5 % wall under-tolerance.
    for key in ("a53b", "j55"):
        m = get_material(key)
        assert_allclose(m.youngs_modulus, 30e6 * psi, rtol=1e-12)
        assert m.poisson == 0.3
    for key in ("a53b", "hsla", "ss304", "ss316l", "h40", "p110"):
        assert get_material(key).wall_under_tolerance == 0.125


def test_pvc_12454():
    # ASTM D1784 cell class 12454: modulus class 5 >= 400,000 psi, tensile class 4
    # >= 7,000 psi (from memory); ASTM F480 collapse uses nu = 0.38 (from memory);
    # density about 1,400 kg/m^3 (from memory).
    m = get_material("pvc")
    assert_allclose(m.youngs_modulus, 400000 * psi, rtol=1e-12)
    assert_allclose(m.yield_strength, 7000 * psi, rtol=1e-12)
    assert m.poisson == 0.38
    assert_allclose(m.density, 1400.0, rtol=0.02)
    assert m.collapse_method == "thermoplastic"


def test_collapse_methods_by_family():
    # string mechanics (ADE 1986): Timoshenko for water-well steel, API TR 5C3 for
    # API grades, F480 SDR formula for thermoplastic, entered for user-rated.
    expected = {"steel": "timoshenko", "hsla": "timoshenko", "stainless": "timoshenko",
                "api": "api_5c3", "pvc": "thermoplastic", "fiberglass": "entered"}
    for m in LIBRARY.values():
        assert m.collapse_method == expected[m.family], m.key


def test_fiberglass_user_is_unrated():
    # rigplan rule: an unknown rating is unrated (nan), never assumed.
    m = get_material("fiberglass_user")
    assert math.isnan(m.yield_strength)
    assert math.isnan(m.density)
    assert m.collapse_method == "entered"


def test_every_number_carries_a_source():
    for m in LIBRARY.values():
        for name in ("density", "yield_strength", "youngs_modulus", "poisson",
                     "wall_under_tolerance"):
            assert m.sources.get(name), f"{m.key}.{name} has no source"


def test_get_material_unknown_key_lists_known():
    with pytest.raises(KeyError) as info:
        get_material("x42")
    text = str(info.value)
    assert "x42" in text and "a53b" in text and "p110" in text


def test_get_material_ignores_case_and_blanks():
    assert get_material(" SS316L ").key == "ss316l"


def test_register_material(restore_library):
    user = dataclasses.replace(
        get_material("fiberglass_user"), yield_strength=60e6,
        sources={**get_material("fiberglass_user").sources,
                 "yield_strength": "user file materials.toml"},
    )
    with pytest.raises(ValueError, match="already in the library"):
        register_material(user)
    register_material(user, replace=True)
    assert get_material("fiberglass_user").yield_strength == 60e6
    new = dataclasses.replace(get_material("a53b"), key="a53b_measured", yield_strength=40 * ksi)
    register_material(new)
    assert "a53b_measured" in mt.known_keys()
    with pytest.raises(TypeError):
        register_material({"key": "x"})


@pytest.mark.parametrize("changes, match", [
    ({"collapse_method": "guess"}, "collapse_method"),
    ({"family": "titanium"}, "family"),
    ({"density": -1.0}, "density"),
    ({"poisson": 0.6}, "poisson"),
    ({"wall_under_tolerance": 1.0}, "wall_under_tolerance"),
    ({"sources": {}}, "no source"),
    ({"key": ""}, "key"),
])
def test_material_validation(changes, match):
    with pytest.raises(ValueError, match=match):
        dataclasses.replace(get_material("a53b"), **changes)


def test_material_is_frozen_and_hashable():
    m = get_material("a53b")
    with pytest.raises(dataclasses.FrozenInstanceError):
        m.density = 1.0
    assert hash(m) == hash(get_material("a53b"))


# PVC temperature derating factors for pressure ratings (Uni-Bell Handbook of
# PVC Pipe, reprinted in PVC pipe makers' manuals; from memory).
PVC_DERATING_F = [(73.4, 1.00), (80, 0.88), (90, 0.75), (100, 0.62), (110, 0.50), (120, 0.40),
                  (130, 0.30), (140, 0.22)]


@pytest.mark.parametrize("deg_f, factor", PVC_DERATING_F)
def test_pvc_temperature_factors(deg_f, factor):
    from rigplan.engine.materials import temperature_factor
    assert_allclose(temperature_factor("pvc", (deg_f - 32) / 1.8), factor, atol=1e-12)


def test_temperature_factor_between_and_beyond_the_table():
    # Linear between the entries (common practice, no source), 1 below 73 F
    # (nothing gained in the cold), unrated (nan) above 140 F, 1 without a table.
    from rigplan.engine.materials import temperature_factor
    assert_allclose(temperature_factor("pvc", (95 - 32) / 1.8), (0.75 + 0.62) / 2, atol=1e-12)
    assert temperature_factor("pvc", 5.0) == 1.0
    assert math.isnan(temperature_factor("pvc", (141 - 32) / 1.8))
    assert temperature_factor("", 90.0) == 1.0


def test_pvc_design_stress():
    # PVC 1120 hydrostatic design stress 2,000 psi at 73.4 F (ASTM D2241 /
    # D1785: HDB 4,000 psi x 0.5, from memory).
    m = get_material("pvc")
    assert_allclose(m.design_stress, 2000 * psi, rtol=1e-12)
    assert m.temperature_derating == "pvc"
    assert math.isnan(get_material("a53b").design_stress)
    assert get_material("a53b").temperature_derating == ""


def test_user_thermoplastic_with_design_stress_and_derating():
    # A user file may give a thermoplastic its design stress and derating table;
    # without a design stress its pressure rating is unrated, never assumed.
    from rigplan.files.formats.materialfile import parse_materials
    text = """units = "us"
[[material]]
key = "pvc_user"
name = "PVC from a data sheet"
family = "pvc"
density = "1400 kg/m3"
yield_strength = "7000 psi"
youngs_modulus = "400000 psi"
poisson = 0.38
wall_under_tolerance = 0
collapse_method = "thermoplastic"
design_stress = "2000 psi"
temperature_derating = "pvc"
source = "data sheet"
"""
    m = parse_materials(text)[0]
    assert_allclose(m.design_stress, 2000 * psi, rtol=1e-12)
    assert m.temperature_derating == "pvc"
    bare = parse_materials(text.replace('design_stress = "2000 psi"\n', ""))[0]
    assert math.isnan(bare.design_stress)
