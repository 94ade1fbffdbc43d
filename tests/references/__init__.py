"""Reference values for the tests, one module per published source.

Each constant carries its citation beside it.  Values marked "computed" were
evaluated from the cited formulation with the named package and version;
``test_reference_values.py`` re-evaluates them, so a typo here fails a test.
"""
