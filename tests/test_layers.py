"""The import rule, checked in a fresh interpreter: imports only go downward.

engine <- files <- present <- tui / cli.  The engine imports no pint, rich
or textual and nothing from files, present, tui or the CLI; files import
nothing from present, tui or the CLI; present imports no textual and nothing
from tui or the CLI.
"""

import json
import subprocess
import sys

import pytest

_PROBE = r"""
import importlib, json, pkgutil, sys
import rigplan.{layer} as pkg
names = [pkg.__name__] + [m.name for m in pkgutil.walk_packages(pkg.__path__, pkg.__name__ + ".")]
for name in names:
    importlib.import_module(name)
print(json.dumps({{"modules": names, "loaded": sorted(sys.modules)}}))
"""

FORBIDDEN = {
    "engine": ("pint", "rich", "textual", "rigplan.files", "rigplan.present", "rigplan.tui",
               "rigplan.cli"),
    "files": ("rich", "textual", "rigplan.present", "rigplan.tui", "rigplan.cli"),
    "present": ("textual", "rigplan.tui", "rigplan.cli"),
}


@pytest.mark.parametrize("layer", sorted(FORBIDDEN))
def test_layer_imports_only_downward(layer):
    out = subprocess.run([sys.executable, "-c", _PROBE.format(layer=layer)],
                         capture_output=True, text=True, check=True)
    got = json.loads(out.stdout)
    assert len(got["modules"]) > 1                  # the walk found the layer's modules
    bad = [m for m in got["loaded"]
           if any(m == f or m.startswith(f + ".") for f in FORBIDDEN[layer])]
    assert bad == []
