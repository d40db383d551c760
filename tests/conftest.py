"""Shared test set-up: import paths, unit constants and fixtures.

* ``tests/`` and the repository root are on ``sys.path``, so a test module
  imports the unit constants with ``from _units import ft, psi`` (the one
  place they are defined, NIST SP 811) and the benchmark reference with
  ``from benchmarks import reference``.
* Fixtures: ``repo_root``, ``strings_dir``, ``rigs_dir`` (the bundled demo
  files; never written to: a test that saves copies them to ``tmp_path``).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

TESTS = Path(__file__).resolve().parent
ROOT = TESTS.parent
for _p in (str(TESTS), str(ROOT)):
    if _p not in sys.path:
        sys.path.insert(0, _p)

from _units import (ft, g_n, gal, inch, ksi, lb, lb_per_ft, lb_per_in3, lbf,  # noqa: E402,F401
                    mm, ppg, psi, psi_per_ft)

# Property tests draw the same examples on every run (a failure is found
# again by anyone who runs the suite, and CI never fails by chance).  Set
# RIGPLAN_HYPOTHESIS_RANDOM=1 to explore new examples while developing.
import os  # noqa: E402

from hypothesis import settings as _hypothesis_settings  # noqa: E402

_hypothesis_settings.register_profile(
    "rigplan", derandomize=not os.environ.get("RIGPLAN_HYPOTHESIS_RANDOM"), database=None)
_hypothesis_settings.load_profile("rigplan")


@pytest.fixture(scope="session")
def repo_root() -> Path:
    return ROOT


@pytest.fixture(scope="session")
def strings_dir() -> Path:
    return ROOT / "strings"


@pytest.fixture(scope="session")
def rigs_dir() -> Path:
    return ROOT / "rigs"
