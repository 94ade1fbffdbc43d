"""Property: for any table, read_table returns every data row or one InputError.

Hypothesis writes tables with headers drawn from the recognised vocabulary
(plus unrelated names), cells drawn from numbers and garbage, delimiters
comma/tab/semicolon and encodings UTF-8, UTF-8 with BOM, Windows-1252 and
UTF-16; a second property feeds arbitrary bytes.  Nothing but a Dataset or an
InputError may come out, and a Dataset has exactly one point per data row
written (empty rows after the last data row are not data rows).
"""

from __future__ import annotations

import csv
import io
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from audit.errors import InputError
from audit.ingest import read_table
from audit.model import Dataset

HEADERS = ["T/K", "T (°C)", "t [degC]", "temp_F", "T, K", "T in K", "T", "Temperature [°R]",
           "P/kPa", "p (mmHg)", "Pressure [Torr]", "psat_bar", "P (kPa)", "log10(P/Pa)",
           "ln(p/kPa)", "lg(p/Pa)", "P", "vapor pressure / atm", "P/furlongs", "P/mpa",
           "phase", "source", "u(T)/K", "u(P)/%", "u_P_rel", "u(P)/Pa", "comment", "", "x"]
GARBAGE = ["", " ", "n/a", "<0.1", "12.3*", "1,2,3", "—", "NaN", "inf", "1e999", "−5", "12,5",
           "#", '"', "'", "(1)", "1 000", "=A1", "\t", ";", ",", "ice", "l", "±"]
T_HEADERS = ["T/K", "T (°C)", "t [degC]", "temp_F", "T in K", "Temperature [°R]"]
P_HEADERS = ["P/kPa", "p (mmHg)", "Pressure [Torr]", "psat_bar", "log10(P/Pa)", "ln(p/kPa)",
             "vapor pressure / atm"]
OTHER_HEADERS = ["phase", "source", "u(T)/K", "u(P)/%", "comment", "", "x"]
# Mostly tables that should read (one T, one P, some others, any order), sometimes any mix.
HEADER_LISTS = st.one_of(
    st.tuples(st.sampled_from(T_HEADERS), st.sampled_from(P_HEADERS),
              st.lists(st.sampled_from(OTHER_HEADERS), max_size=3, unique=True))
    .map(lambda t: [t[0], t[1], *t[2]]).flatmap(st.permutations),
    st.lists(st.sampled_from(HEADERS), min_size=2, max_size=5),
)
CELLS = st.one_of(
    st.sampled_from(GARBAGE),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-10**6, 10**6).map(str),
    st.text(alphabet=st.characters(blacklist_categories=("Cs",), blacklist_characters="\r\n\x00"),
            max_size=8),
)
SETTINGS = settings(max_examples=100, deadline=None,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


def _blank(row) -> bool:
    return all(not c.strip() for c in row)


def _read(data: bytes, suffix: str):
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / f"table{suffix}"
        path.write_bytes(data)
        try:
            return read_table(path)
        except InputError as exc:
            assert exc.message  # the CLI prints this
            return exc


@SETTINGS
@given(header=HEADER_LISTS,
       data=st.data(),
       delimiter=st.sampled_from([",", "\t", ";"]),
       encoding=st.sampled_from(["utf-8", "utf-8-sig", "cp1252", "utf-16"]))
def test_any_table_reads_every_row_or_raises_input_error(header, data, delimiter, encoding):
    width = len(header)
    rows = data.draw(st.lists(st.lists(CELLS, min_size=width, max_size=width), max_size=12))
    buf = io.StringIO()
    writer = csv.writer(buf, delimiter=delimiter, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(rows)
    try:
        raw = buf.getvalue().encode(encoding)
    except UnicodeEncodeError:
        raw = buf.getvalue().encode("utf-8")
    n_data = len(rows)
    while n_data and _blank(rows[n_data - 1]):
        n_data -= 1
    out = _read(raw, ".csv")
    assert isinstance(out, (Dataset, InputError)), type(out)
    if isinstance(out, Dataset):
        assert out.n_rows == n_data
        assert [p.row for p in out.points] == list(range(1, n_data + 1))
        assert len(out.cells) == n_data
        for p in out.points:
            assert p.status in ("ok", "unreadable")
            assert (p.reason is None) == (p.status == "ok")


@SETTINGS
@given(content=st.binary(max_size=400), suffix=st.sampled_from([".csv", ".tsv", ".json", ".xlsx", ".txt"]))
def test_any_bytes_give_a_dataset_or_an_input_error(content, suffix):
    out = _read(content, suffix)
    assert isinstance(out, (Dataset, InputError))


@SETTINGS
@given(prefix=st.sampled_from([b"T/K,P/Pa\n", b"T (\xb0C);p (kPa)\n", b'[{"T/K": 1, "P/Pa": ', b"PK\x03\x04"]),
       content=st.binary(max_size=300))
def test_table_like_bytes_give_a_dataset_or_an_input_error(prefix, content):
    out = _read(prefix + content, ".csv")
    assert isinstance(out, (Dataset, InputError))
