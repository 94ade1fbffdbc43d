"""vpaudit: audit vapor-pressure data for thermodynamic consistency.

The audit of one dataset is a pure function of (dataset, profile)::

    from audit.ingest import read_table
    from audit.profiles import load_profile
    from audit.pipeline import run_audit

    result = run_audit(read_table("data.csv"), load_profile("default"))
    result.to_findings()      # the findings.json contract

Importing :mod:`audit` is cheap: plotting and PDF libraries load only when a
report is written.
"""

__version__ = "0.1.0"
