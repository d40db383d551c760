"""Liner in an existing well: caliper log (LAS 2.0) -> shape, collapse by depth, fit.

Sources: Timoshenko and Gere, *Theory of Elastic Stability*, 2nd ed. (1961),
ch. 7, the first-yield collapse of a ring with initial ellipticity (the
quadratic written out again here, independently of the engine); the LAS 2.0
format of the Canadian Well Logging Society, written with lasio (a general
reference library) in the test itself.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from rigplan.cli import main
from rigplan.engine import liner as ln
from rigplan.errors import InputError
from rigplan.files.formats.linerfile import read_caliper_las

lasio = pytest.importorskip("lasio")
ROOT = Path(__file__).resolve().parents[1]
from _units import ft as FT, inch as IN, psi as PSI  # noqa: E402  (NIST SP 811)


def _write_las(path, depth_ft, curves, depth_unit="FT"):
    las = lasio.LASFile()
    las.append_curve("DEPT", depth_ft, unit=depth_unit)
    for name, (unit, data) in curves.items():
        las.append_curve(name, data, unit=unit)
    with open(path, "w") as f:
        las.write(f, version=2.0)
    return path


def _timoshenko_psi(d, t, sy, e, E=30e6, nu=0.3):
    """Timoshenko and Gere (1961) ch. 7, smaller root of
    p^2 - [2 Sy/r + (1 + 3 e r) p_cr] p + 2 Sy p_cr / r = 0, r = D/t - 1."""
    r = d / t - 1
    pcr = 2 * E / (1 - nu ** 2) / r ** 3
    py = 2 * sy / r
    b = py + (1 + 3 * e * r) * pcr
    return (b - math.sqrt(b * b - 4 * py * pcr)) / 2


def test_known_ellipticity_profile_read_back(tmp_path):
    depth = np.arange(0.0, 100.5, 0.5)
    e_true = np.where((depth > 40) & (depth < 60), 0.02, 0.0)
    d0 = 12.25
    x = d0 * (1 + e_true)
    y = d0 * (1 - e_true)
    p = _write_las(tmp_path / "log.las", depth, {"CALX": ("IN", x), "CALY": ("IN", y)})
    log = read_caliper_las(p)
    shape = ln.shape_from_diameters(log.depth, log.diameters)
    # (Dmax - Dmin)/(Dmax + Dmin) of d0(1 +- e) is e exactly
    assert np.allclose(shape.ellipticity, e_true, atol=1e-12)
    assert np.allclose(log.depth, depth * FT)
    assert shape.min_id.min() == pytest.approx(d0 * 0.98 * IN)
    casing = ln.OldCasing(od=12.75 * IN, wall=0.25 * IN, rating_wall=0.21875 * IN,
                          yield_strength=35000 * PSI, youngs_modulus=30e6 * PSI, poisson=0.3,
                          top=0.0, bottom=100 * FT)
    rating = ln.collapse_rating_along(casing, shape.ellipticity)
    i = int(np.flatnonzero(e_true > 0)[0])
    assert rating[i] / PSI == pytest.approx(_timoshenko_psi(12.75, 0.21875, 35000, 0.02), rel=1e-9)
    assert rating[0] / PSI == pytest.approx(_timoshenko_psi(12.75, 0.21875, 35000, 0.0), rel=1e-9)
    zones = ln.weak_zones(shape, rating, 0.01, (12.75 - 0.5) * IN)
    assert len(zones) == 1
    assert zones[0].top == pytest.approx(40.5 * FT) and zones[0].bottom == pytest.approx(59.5 * FT)
    assert zones[0].max_ellipticity == pytest.approx(0.02)


def test_metres_and_millimetres(tmp_path):
    depth = np.arange(0.0, 30.1, 0.1)
    x = np.full_like(depth, 250.0)
    y = np.full_like(depth, 246.0)
    p = _write_las(tmp_path / "si.las", depth, {"CALX": ("MM", x), "CALY": ("MM", y)},
                   depth_unit="M")
    log = read_caliper_las(p)
    assert log.depth[-1] == pytest.approx(30.0)
    assert log.diameters[0].tolist() == pytest.approx([0.250, 0.246])


def test_multi_arm_radii(tmp_path):
    depth = np.arange(0.0, 10.0, 1.0)
    arms = {f"R{k:02d}": ("IN", np.full_like(depth, 6.0 + (0.1 if k in (1, 5) else 0.0)))
            for k in range(1, 9)}
    log = read_caliper_las(_write_las(tmp_path / "arms.las", depth, arms))
    shape = ln.shape_from_diameters(log.depth, log.diameters)
    assert log.tool.startswith("multi-arm (8")
    assert shape.max_id[0] == pytest.approx(12.2 * IN) and shape.min_id[0] == pytest.approx(12.0 * IN)


def test_bad_logs_are_one_line_errors(tmp_path):
    p = tmp_path / "junk.las"
    p.write_bytes(b"\x00\xff not a log")
    with pytest.raises(InputError) as err:
        read_caliper_las(p)
    assert "junk.las" in str(err.value)
    q = _write_las(tmp_path / "nocal.las", np.arange(5.0), {"GR": ("API", np.ones(5))})
    with pytest.raises(InputError, match="no caliper curves"):
        read_caliper_las(q)
    r = _write_las(tmp_path / "feet-as-in.las", np.arange(5.0),
                   {"CALX": ("FT", np.full(5, 12.0)), "CALY": ("FT", np.full(5, 12.0))})
    with pytest.raises(InputError, match="outside 0.02 to 2 m"):
        read_caliper_las(r)


def test_passing_od_is_the_largest_od_below():
    # Every joint that lands below a depth has passed it on the way down
    # (common practice, no source: the geometry of running pipe).
    bottoms = np.array([30.0, 20.0, 10.0])
    ods = np.array([0.20, 0.25, 0.22])
    got = ln.liner_passing_od([5.0, 15.0, 25.0, 35.0], bottoms, ods)
    assert got.tolist() == [0.25, 0.25, 0.20, 0.0]


def test_liner_that_does_not_fit_is_refused_at_the_right_depth():
    z = np.arange(0.0, 100.0, 1.0)
    d = np.full((z.size, 2), 0.300)
    d[62:65, 1] = 0.270          # a dent at 62-64 m
    shape = ln.shape_from_diameters(z, d)
    bottom = np.array([90.0, 80.0, 70.0, 60.0, 50.0])
    od = np.array([0.265, 0.25, 0.25, 0.25, 0.25])   # the shoe joint is the widest
    fit = ln.liner_fit(shape, bottom, od, required_clearance=0.010)
    assert not fit.fits
    assert fit.refused_depth == 62.0              # the shoe joint meets the dent first
    assert fit.tightest_clearance == pytest.approx(0.005)
    ok = ln.liner_fit(shape, bottom, np.full(5, 0.25), required_clearance=0.010)
    assert ok.fits and math.isnan(ok.refused_depth) and ok.tightest_clearance == pytest.approx(0.02)


def test_old_casing_collapse_hydrostatics():
    # Outside: water from 10 m; inside: water from 30 m (drawn down).
    # Load at 50 m = rho g (40 - 20) (fluid statics).
    z = np.array([0.0, 20.0, 50.0])
    shape = ln.shape_from_diameters(z, np.full((3, 2), 0.3))
    rating = np.full(3, 1.0e6)
    r = ln.old_casing_collapse(shape, rating, 1000.0, 10.0, 1000.0, 30.0, 1.0)
    assert r.load[2] == pytest.approx(1000.0 * 9.80665 * 20.0)
    assert r.worst_depth == 20.0 or r.worst_depth == 50.0
    assert r.least_margin == pytest.approx(1 - 1000.0 * 9.80665 * 20.0 / 1e6)


def test_demo_liner_json_interface(capsys):
    code = main(["liner", str(ROOT / "strings" / "cv2-liner.toml"), "--rig", "th30",
                 "--caliper", str(ROOT / "strings" / "cv2-old-casing.las"), "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 0 and doc["fits"] is True
    assert set(doc["tightest"]) == {"depth", "min_id", "clearance"}
    assert 180 * FT < doc["tightest"]["depth"] < 230 * FT       # in the oval zone
    assert len(doc["zones"]) == 2
    for z in doc["zones"]:
        assert {"top", "bottom", "max_ellipticity", "min_collapse_rating"} <= set(z)
    assert "verdict" in doc["plan"]


def test_demo_log_is_reproducible(tmp_path):
    import importlib.util
    spec = importlib.util.spec_from_file_location("make_cv2", ROOT / "strings" / "make_cv2_caliper.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    out = tmp_path / "again.las"
    mod.write_demo(out)
    assert out.read_text() == (ROOT / "strings" / "cv2-old-casing.las").read_text()
