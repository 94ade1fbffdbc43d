"""Formula neutralisation in annotated.csv (OWASP, "CSV Injection")."""

from audit.report.annotated_csv import neutralise


def test_formula_like_text_is_neutralised():
    for cell in ("=1+1", "+cmd", "-2+3*cmd|' /C calc'!A0", "@SUM(A1)", "\t=1"):
        assert neutralise(cell).startswith("'")


def test_plain_numbers_and_text_are_kept():
    for cell in ("-12.5", "+3", "-1,5", "1.2e-3", "Lab A", "", "0.0002"):
        assert neutralise(cell) == cell


def test_ragged_rows_keep_the_audit_columns_aligned(tmp_path):
    import csv

    from audit.ingest import read_table
    from audit.pipeline import run_audit
    from audit.profiles import load_profile
    from audit.report.annotated_csv import annotated_text

    data = tmp_path / "ragged.csv"
    # IAPWS-95 (iapws package): 300 K -> 3536.8 Pa, 310 K -> 6231.4 Pa, 320 K -> 10546.7 Pa
    data.write_text("T/K,P/Pa\n300,3536.8\n310,6231.4,extra\n320,10546.7\n", encoding="utf-8")
    result = run_audit(read_table(data), load_profile("default"))
    rows = list(csv.reader(annotated_text(result).splitlines()))
    assert len(rows) == 4
    assert len({len(r) for r in rows}) == 1  # every line equally wide
    i = rows[0].index("audit_row")
    assert [r[i] for r in rows[1:]] == ["1", "2", "3"]
    assert rows[2][2] == "extra"
