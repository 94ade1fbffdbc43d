"""Fuzzing of the whole audit: generated tables (``tables``), run end to end.

Every table generated here is SYNTHETIC: invented curves, sources and faults.
"""
