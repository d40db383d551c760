"""rigplan: hoisting, running-load, float and fill planning for water-well strings.

Layers (each may import only the ones listed before it):

1. engine  -- flat modules per physical topic, numpy arrays of SI floats,
   no pint, no textual, no rich, no file I/O (``tubulars``, ``collapse``,
   ``burst``, ``connections``, ``materials``, ``rating``, ``hydrostatics``,
   ``axial``, ``hoisting``, ``floatplan``, ``staging``, ``grouting``,
   ``planner``, ``stringmodel``, ``errors``).
2. formats -- ``rigplan.files.units`` (pint) and ``rigplan.files.formats.*`` readers and
   writers, ``rigplan.files.runlog`` (sqlite tally log).
3. front ends -- ``rigplan.cli`` and ``rigplan.tui``.
"""

__version__ = "0.1.0"

CAUTION = (
    "Planning aid only: verify every figure against the rig maker's load chart "
    "and the pipe and screen makers' ratings; local well codes and licensed "
    "practice govern."
)
