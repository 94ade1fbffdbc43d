"""Formula neutralisation in annotated.csv (OWASP, "CSV Injection")."""

from audit.report.annotated_csv import neutralise


def test_formula_like_text_is_neutralised():
    for cell in ("=1+1", "+cmd", "-2+3*cmd|' /C calc'!A0", "@SUM(A1)", "\t=1"):
        assert neutralise(cell).startswith("'")


def test_plain_numbers_and_text_are_kept():
    for cell in ("-12.5", "+3", "-1,5", "1.2e-3", "Lab A", "", "0.0002"):
        assert neutralise(cell) == cell
