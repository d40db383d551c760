"""rigplan: hoisting, running-load, float and fill planning for water-well strings.

Layers (each may import only the ones listed before it):

1. engine  -- flat modules per physical topic, numpy arrays of SI floats,
   no pint, no textual, no rich, no file I/O (``tubulars``, ``collapse``,
   ``burst``, ``connections``, ``materials``, ``rating``, ``hydrostatics``,
   ``axial``, ``hoisting``, ``floatplan``, ``staging``, ``grouting``,
   ``planner``, ``stringmodel``, ``errors``).
2. files -- ``rigplan.files.units`` (pint) and ``rigplan.files.formats.*`` readers and
   writers, ``rigplan.files.runlog`` (sqlite tally log), ``rigplan.files.job``.
3. present -- ``rigplan.present``: the words and display units of every output.
4. front ends -- ``rigplan.cli`` and ``rigplan.tui``.
"""

__version__ = "0.1.0"


def __getattr__(name):
    # The caution is presentation (rigplan.present.wording); re-exported here
    # lazily so that importing the engine does not import the presentation.
    if name == "CAUTION":
        from rigplan.present.wording import CAUTION
        return CAUTION
    raise AttributeError(f"module 'rigplan' has no attribute {name!r}")
