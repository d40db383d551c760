"""Benchmarks (``run.py``) and the per-joint, per-step reference
(``reference.py``), importable as ``benchmarks.reference`` from the tests."""
