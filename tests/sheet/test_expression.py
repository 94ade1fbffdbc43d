"""Supplier formulas: parsing, evaluation, derivative and safety of audit.sheet.expression.

Outside references, all through the ``chemicals`` library (PyPI):

* Antoine constants for log10(P/Pa) with T in K from B. E. Poling, J. M.
  Prausnitz and J. P. O'Connell, *The Properties of Gases and Liquids*, 5th
  ed. (McGraw-Hill, 2000), as tabulated in
  ``chemicals.vapor_pressure.Psat_data_AntoinePoling``; the equation itself is
  ``chemicals.vapor_pressure.Antoine`` (returns base**(A - B/(T + C)) [Pa]).
* Wagner 2.5-5 constants from the same book
  (``Psat_data_WagnerPoling``: A, B, C, D, Tc [K], Pc [Pa]) and the equation
  ``chemicals.vapor_pressure.Wagner(T, Tc, Pc, a, b, c, d)`` [Pa].
* DIPPR-101 constants C1..C5 from *Perry's Chemical Engineers' Handbook*, 8th
  ed., table 2-8 (``Psat_data_Perrys2_8``; ln(P/Pa), T in K) and the equation
  ``chemicals.dippr.EQ101(T, A, B, C, D, E)`` = exp(A + B/T + C ln T + D T^E).
"""

from __future__ import annotations

import ast
import builtins
import math
import pickle
import tokenize
import warnings
from pathlib import Path

import numpy as np
import pytest
from chemicals.dippr import EQ101
from chemicals.vapor_pressure import (Antoine, Psat_data_AntoinePoling, Psat_data_Perrys2_8,
                                      Psat_data_WagnerPoling, Wagner)
from hypothesis import given, settings
from hypothesis import strategies as st

import audit.sheet.expression as expression_module
from audit.sheet.expression import (Binary, Call, Expression, ExpressionError, Name, Number, Unary,
                                    parse_expression)

ANTOINE = "A - B/(T + C)"
DIPPR101 = "A + B/T + C*ln(T) + D*T^E"
# Wagner 2.5-5 with tau = 1 - T/Tc written out, as a sheet would print it.
WAGNER = ("ln(Pc) + (Tc/T)*(a*(1 - T/Tc) + b*(1 - T/Tc)^1.5"
          " + c*(1 - T/Tc)^2.5 + d*(1 - T/Tc)^5)")

# Toluene, ethanol and benzene: in all three tables, and of different polarity.
SUBSTANCES = ["108-88-3", "64-17-5", "71-43-2"]


def antoine_case(cas):
    row = Psat_data_AntoinePoling.loc[cas]
    c = {"A": float(row.A), "B": float(row.B), "C": float(row.C)}
    return c, np.linspace(float(row.Tmin), float(row.Tmax), 7)


def dippr_case(cas):
    row = Psat_data_Perrys2_8.loc[cas]
    c = {k: float(row[f"C{i}"]) for i, k in enumerate("ABCDE", start=1)}
    return c, np.linspace(float(row.Tmin), float(row.Tmax), 7)


def wagner_case(cas, top=1.0):
    row = Psat_data_WagnerPoling.loc[cas]
    c = {"a": float(row.A), "b": float(row.B), "c": float(row.C), "d": float(row.D),
         "Tc": float(row.Tc), "Pc": float(row.Pc)}
    return c, np.linspace(float(row.Tmin), top * float(row.Tmax), 7)


# -- published equations -----------------------------------------------------------------

@pytest.mark.parametrize("cas", SUBSTANCES)
def test_antoine_formula_matches_chemicals(cas):
    c, T = antoine_case(cas)
    ours = 10.0 ** parse_expression(ANTOINE).evaluate(T, c)
    theirs = np.array([Antoine(t, c["A"], c["B"], c["C"], base=10.0) for t in T])
    # Same operations in the same order; only pow's last bit may differ.
    np.testing.assert_allclose(ours, theirs, rtol=1e-12, atol=0)


def test_antoine_toluene_at_its_normal_boiling_point():
    # Guards the units the comparison above assumes (log10 of Pa, T in K):
    # toluene boils at about 383.75 K at 101325 Pa (value recalled from memory;
    # tables give 383.7-383.8 K), and 0.1 K moves P by about 0.4 %.
    c, _ = antoine_case("108-88-3")
    p = 10.0 ** parse_expression(ANTOINE).evaluate(383.75, c)
    assert p == pytest.approx(101325.0, rel=0.01)


@pytest.mark.parametrize("cas", SUBSTANCES)
def test_dippr101_formula_matches_chemicals(cas):
    c, T = dippr_case(cas)
    ours = np.exp(parse_expression(DIPPR101).evaluate(T, c))
    theirs = np.array([EQ101(t, c["A"], c["B"], c["C"], c["D"], c["E"]) for t in T])
    # EQ101 multiplies by 1/T where the formula divides: a few ulp of an
    # exponent of order 10 give a relative difference near 1e-14.
    np.testing.assert_allclose(ours, theirs, rtol=1e-12, atol=0)


@pytest.mark.parametrize("cas", SUBSTANCES)
def test_wagner_formula_matches_chemicals(cas):
    c, T = wagner_case(cas)
    ours = np.exp(parse_expression(WAGNER).evaluate(T, c))
    theirs = np.array([Wagner(t, c["Tc"], c["Pc"], c["a"], c["b"], c["c"], c["d"]) for t in T])
    # chemicals factors tau^1.5 and tau^2.5 through sqrt(tau); the formula
    # uses pow directly, hence a looser (still tight) tolerance.
    np.testing.assert_allclose(ours, theirs, rtol=1e-10, atol=0)


# -- precedence and spelling ---------------------------------------------------------------

@pytest.mark.parametrize("text, expected", [
    ("2^3^2", 512.0),
    ("2**3**2", 512.0),
    ("(2^3)^2", 64.0),
    ("-2^2", -4.0),
    ("\u22122^2", -4.0),
    ("(-2)^2", 4.0),
    ("2^-1", 0.5),
    ("2^-3^2", 2.0 ** -9),
    ("2^3*2", 16.0),
    ("2^-1*3", 1.5),
    ("2^-1+1", 1.5),
    ("8/4/2", 1.0),
    ("8/(4/2)", 4.0),
    ("8/2*4", 16.0),
    ("1-2-3", -4.0),
    ("1-(2-3)", 2.0),
    ("2*3+4", 10.0),
    ("2+3*4", 14.0),
    ("(2+3)*4", 20.0),
    ("-2*3", -6.0),
    ("2*-3", -6.0),
    ("1--2", 3.0),
    ("- - 2", 2.0),
    ("+3", 3.0),
    ("5 \u2212 2", 3.0),
    ("2 \u00d7 3", 6.0),
    ("2\u00b73", 6.0),
    ("7 \u00f7 2", 3.5),
    ("2 \u00d7 3 \u2212 4 \u00f7 8", 5.5),
    (" \t2 *\n 3 ", 6.0),
    (".5 + 1.", 1.5),
    ("2e-3*1000", 2.0),
    ("2e\u22123", 0.002),
    ("6.02E23", 6.02e23),
    ("1.5e+2", 150.0),
    ("sqrt(16)", 4.0),
    ("abs(-3)", 3.0),
    ("exp(0)", 1.0),
    ("ln(1)", 0.0),
    ("log10(1000)", 3.0),
    ("-sqrt(4)^2", -4.0),
])
def test_operator_precedence_and_spellings(text, expected):
    assert float(parse_expression(text).evaluate(0.0, {})) == expected


def test_power_groups_right_and_binds_tighter_than_sign():
    assert parse_expression("2^3^2").root == Binary("^", Number(2.0), Binary("^", Number(3.0), Number(2.0)))
    assert parse_expression("-2^2").root == Unary("-", Binary("^", Number(2.0), Number(2.0)))
    assert parse_expression("2^-1").root == Binary("^", Number(2.0), Unary("-", Number(1.0)))


def test_sign_binds_tighter_than_product_but_looser_than_power():
    assert parse_expression("-2*3").root == Binary("*", Unary("-", Number(2.0)), Number(3.0))
    assert parse_expression("2^-1*3").root == Binary(
        "*", Binary("^", Number(2.0), Unary("-", Number(1.0))), Number(3.0))


def test_subtraction_groups_left_and_spellings_are_normalised():
    assert parse_expression("1-2-3").root == Binary("-", Binary("-", Number(1.0), Number(2.0)), Number(3.0))
    assert parse_expression("a \u00d7 b \u00f7 c \u2212 d").root == Binary(
        "-", Binary("/", Binary("*", Name("a"), Name("b")), Name("c")), Name("d"))
    assert parse_expression("ln(T)**2").root == Binary("^", Call("ln", Name("T")), Number(2.0))


# -- names -----------------------------------------------------------------------------------

@pytest.mark.parametrize("text, names, uses_T", [
    (ANTOINE, {"A", "B", "C"}, True),
    (WAGNER, {"a", "b", "c", "d", "Tc", "Pc"}, True),
    ("ln(Pc)", {"Pc"}, False),
    ("t + Tc", {"t", "Tc"}, False),           # names are case-sensitive
    ("\u03c4^2 + \u03b1\u00b7T", {"\u03c4", "\u03b1"}, True),
    ("lnA + expT + T_1", {"lnA", "expT", "T_1"}, False),  # only whole names are reserved
    ("2 + 3", set(), False),
])
def test_names_and_temperature(text, names, uses_T):
    parsed = parse_expression(text)
    assert parsed.names == frozenset(names)
    assert parsed.uses_temperature is uses_T


def test_same_text_gives_equal_hashable_expressions():
    assert parse_expression(ANTOINE) == parse_expression(ANTOINE)
    assert len({parse_expression(ANTOINE), parse_expression(ANTOINE), parse_expression(DIPPR101)}) == 2
    assert str(parse_expression(ANTOINE)) == ANTOINE


# -- evaluation ------------------------------------------------------------------------------

def test_result_has_the_shape_of_T_and_float64():
    parsed = parse_expression("A*T + 1")
    grid = np.arange(6, dtype=np.int64).reshape(2, 3)
    out = parsed.evaluate(grid, {"A": 0.5})
    assert out.shape == (2, 3) and out.dtype == np.float64
    np.testing.assert_array_equal(out, 0.5 * grid + 1.0)
    scalar = parsed.evaluate(4.0, {"A": 0.5})
    assert scalar.shape == () and float(scalar) == 3.0
    assert parsed.evaluate([1.0, 2.0], {"A": 1.0}).tolist() == [2.0, 3.0]


def test_constant_formula_is_broadcast_to_T():
    out = parse_expression("A + 1").evaluate(np.zeros((3, 2)), {"A": 2.0})
    assert out.shape == (3, 2)
    assert np.all(out == 3.0)
    out[0, 0] = -1.0  # the result must be a writeable array of its own
    assert out[1, 1] == 3.0


def test_extra_coefficients_are_ignored():
    parsed = parse_expression(ANTOINE)
    c = {"A": 9.0, "B": 1300.0, "C": -50.0}
    assert parsed.evaluate(350.0, {**c, "D": 1e9, "T": -1.0}) == parsed.evaluate(350.0, c)


def test_missing_coefficients_are_named():
    with pytest.raises(ExpressionError) as excinfo:
        parse_expression(ANTOINE).evaluate(300.0, {"A": 1.0, "Z": 2.0})
    message = str(excinfo.value)
    assert "'B'" in message and "'C'" in message
    assert "'A'" not in message and "'Z'" not in message
    assert isinstance(excinfo.value, ValueError)


def test_derivative_also_reports_missing_coefficients():
    with pytest.raises(ExpressionError, match="'Pc'"):
        parse_expression("ln(Pc) + T").derivative_T(300.0, {})


@pytest.mark.parametrize("value", ["1.5", None, [1.0, 2.0]])
def test_a_coefficient_that_is_not_a_number_is_refused(value):
    with pytest.raises(ExpressionError, match="'A'"):
        parse_expression("A*T").evaluate(1.0, {"A": value})


@pytest.mark.parametrize("text, T, check", [
    ("ln(T)", -1.0, math.isnan),
    ("sqrt(T)", -4.0, math.isnan),
    ("T^(1/3)", -8.0, math.isnan),
    ("1/T", 0.0, lambda v: v == math.inf),
    ("T^-1", 0.0, lambda v: v == math.inf),
    ("exp(T)", 1000.0, lambda v: v == math.inf),
    ("10^T", 400.0, lambda v: v == math.inf),
    ("ln(T)", 0.0, lambda v: v == -math.inf),
    ("0*exp(T)", 1000.0, math.isnan),
])
def test_numeric_trouble_gives_nan_or_inf_without_warning(text, T, check):
    before = np.geterr()
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        value = float(parse_expression(text).evaluate(T, {}))
        parse_expression(text).derivative_T(T, {})
    assert check(value), value
    assert np.geterr() == before


# -- derivative --------------------------------------------------------------------------------

def central_difference(parsed, T, c, h):
    return (parsed.evaluate(T + h, c) - parsed.evaluate(T - h, c)) / (2.0 * h)


# h = 0.01 K: the truncation error, about (h/(T + C))^2 or (h/(Tc - T))^2
# relative, stays below 1e-7 on these ranges, and the rounding error,
# eps*|y|/(h*|y'|), below 1e-10.
@pytest.mark.parametrize("cas", SUBSTANCES)
@pytest.mark.parametrize("text, case", [
    (ANTOINE, antoine_case),
    (DIPPR101, dippr_case),
    (WAGNER, lambda cas: wagner_case(cas, top=0.95)),
])
def test_derivative_matches_central_difference(text, case, cas):
    c, T = case(cas)
    parsed = parse_expression(text)
    np.testing.assert_allclose(parsed.derivative_T(T, c), central_difference(parsed, T, c, 0.01),
                               rtol=1e-6, atol=0)


def test_antoine_derivative_is_b_over_t_plus_c_squared():
    c, T = antoine_case("108-88-3")
    np.testing.assert_allclose(parse_expression(ANTOINE).derivative_T(T, c),
                               c["B"] / (T + c["C"]) ** 2, rtol=1e-14)


def test_polynomial_derivative_is_exact():
    T = np.array([-2.0, -0.5, 0.0, 1.0, 3.0, 10.0])
    parsed = parse_expression("1 + 2*T + 3*T^2 - 0.5*T^3 + T^4/4")
    np.testing.assert_array_equal(parsed.derivative_T(T, {}), 2.0 + 6.0 * T - 1.5 * T ** 2 + T ** 3)


@pytest.mark.parametrize("text, slope", [
    ("T^T", lambda T: T ** T * (np.log(T) + 1.0)),
    ("2^T", lambda T: 2.0 ** T * np.log(2.0)),
    ("T^(2*T)", lambda T: T ** (2 * T) * (2.0 * np.log(T) + 2.0)),
    ("ln(T^2)", lambda T: 2.0 / T),
    ("log10(T)", lambda T: 1.0 / (T * np.log(10.0))),
    ("exp(2*T)", lambda T: 2.0 * np.exp(2.0 * T)),
    ("sqrt(T)", lambda T: 0.5 / np.sqrt(T)),
    ("abs(T - 2)", lambda T: np.sign(T - 2.0)),
    ("1/T", lambda T: -1.0 / T ** 2),
    ("T/(1 + T)", lambda T: 1.0 / (1.0 + T) ** 2),
    ("-T", lambda T: -np.ones_like(T)),
    ("(T - 3)^2", lambda T: 2.0 * (T - 3.0)),
])
def test_derivative_rules(text, slope):
    T = np.array([0.5, 1.0, 1.7, 2.5, 4.0])
    np.testing.assert_allclose(parse_expression(text).derivative_T(T, {}), slope(T), rtol=1e-13, atol=1e-15)


def test_derivative_of_a_formula_without_T_is_zero_of_the_shape_of_T():
    out = parse_expression("A^2 + ln(B)").derivative_T(np.ones((2, 2)), {"A": 3.0, "B": 2.0})
    assert out.shape == (2, 2)
    assert np.all(out == 0.0)


def test_a_non_finite_constant_part_does_not_spoil_the_slope():
    # 1/0 is inf, but it does not depend on T: its slope is exactly zero, not 0*inf.
    parsed = parse_expression("1/0 + 3*T + 0^-1*2")
    assert float(parsed.evaluate(2.0, {})) == math.inf
    assert float(parsed.derivative_T(2.0, {})) == 3.0


# -- safety ---------------------------------------------------------------------------------------

HOSTILE = [
    # (text, position of the error, a fragment the message must contain)
    ("__import__('os').system('echo hi')", 0, "'_'"),
    ("T.__class__", 1, "'.'"),
    ("open('x')", 0, "'open' is not a known function"),
    ("lambda: 1", 6, "':'"),
    ("[1,2]", 0, "'['"),
    ("A; B", 1, "';'"),
    ("A=1", 1, "'='"),
    ('"str"', 0, "'\"'"),
    ("'str'", 0, "quoted"),
    ("sin(T)", 0, "'sin' is not a known function"),
    ("eval(T)", 0, "'eval' is not a known function"),
    ("exp(T", 3, "never closed"),
    (")", 0, "no matching '('"),
    ("T))", 1, "no matching '('"),
    ("1 2", 2, "two numbers in a row"),
    ("2,5", 1, "2.5"),
    ("max(T, 2)", 0, "'max' is not a known function"),
    ("ln", 0, "'ln' is a function"),
    ("ln*2", 0, "'ln' is a function"),
    ("2T", 1, "'*'"),
    ("T(2)", 0, "'T' is not a known function"),
    ("1 +", 3, "missing operand after '+'"),
    ("*2", 0, "cannot start with '*'"),
    ("()", 1, "empty parentheses"),
    ("2^^3", 2, "missing operand"),
    ("2e", 0, "not a complete number"),
    ("1.2.3", 3, "decimal point"),
    ("1e999", 0, "too large"),
    ("T\u00b2", 1, "'^'"),
    ("{T}", 0, "'{'"),
    ("T if T else 0", 2, "missing operator"),
    ("T @ T", 2, "'@'"),
    ("\x00", 0, "'\\x00'"),
]


@pytest.mark.parametrize("text, position, fragment", HOSTILE)
def test_hostile_text_is_refused_with_a_useful_message(text, position, fragment):
    with pytest.raises(ExpressionError) as excinfo:
        parse_expression(text)
    assert excinfo.value.position == position
    assert fragment in str(excinfo.value)
    # The message quotes the text around the error.
    assert "»" in str(excinfo.value) or "end of the formula" in str(excinfo.value)


@pytest.mark.parametrize("text, fragment", [
    ("", "empty"),
    ("   \t\n", "empty"),
    ("T+" * 300 + "T", "601 characters"),
    ("(" * 10_000 + "T" + ")" * 10_000, "20001 characters"),
])
def test_empty_or_overlong_text_is_refused(text, fragment):
    with pytest.raises(ExpressionError, match=fragment) as excinfo:
        parse_expression(text)
    assert excinfo.value.position is None


def test_deep_nesting_is_refused_without_recursion_error():
    text = "(" * 10_000 + "T" + ")" * 10_000
    with pytest.raises(ExpressionError, match="deeper than 50") as excinfo:
        parse_expression(text, max_length=100_000)
    assert excinfo.value.position == 50
    with pytest.raises(ExpressionError, match="deeper than 50"):
        parse_expression("-" * 51 + "T")
    with pytest.raises(ExpressionError, match="deeper than 50"):
        parse_expression("^".join(["T"] * 52))
    assert float(parse_expression("-" * 50 + "T").evaluate(2.0, {})) == 2.0


@pytest.mark.parametrize("text", [
    "*".join(["-T"] * 60),
    "+".join(["(T)"] * 60),
    "+".join(["ln(T)"] * 60),
    "*".join(["T^2"] * 60),
])
def test_depth_counts_nesting_not_length(text):
    # Sixty groups, signs or exponents side by side never nest more than two deep.
    assert parse_expression(text).uses_temperature


def test_a_depth_limit_of_one_allows_one_level():
    assert float(parse_expression("(T)", max_depth=1).evaluate(2.0, {})) == 2.0
    with pytest.raises(ExpressionError, match="deeper than 1"):
        parse_expression("((T))", max_depth=1)


def test_very_deep_and_very_long_formulas_evaluate_without_recursion():
    # With the limits lifted the tree is 10 000 levels deep: evaluation and
    # differentiation must not rely on the interpreter's stack.
    deep = parse_expression("(" * 10_000 + "-T" + ")" * 10_000, max_length=100_000, max_depth=20_000)
    assert float(deep.evaluate(2.0, {})) == -2.0
    assert float(deep.derivative_T(2.0, {})) == -1.0
    long_sum = parse_expression("+".join(["T"] * 20_000), max_length=100_000)
    assert float(long_sum.evaluate(0.5, {})) == 10_000.0
    assert float(long_sum.derivative_T(0.5, {})) == 20_000.0


def test_eval_exec_and_compile_are_never_called(monkeypatch):
    # Anything numpy loads lazily is loaded first, so that the traps below
    # only see what parsing and evaluating do.
    parse_expression(WAGNER).derivative_T(300.0, wagner_case("108-88-3")[0])
    calls = []

    def trap(name):
        def forbidden(*args, **kwargs):
            calls.append(name)
            raise AssertionError(f"{name} was called")
        return forbidden

    for name in ("eval", "exec", "compile"):
        monkeypatch.setattr(builtins, name, trap(name))
    monkeypatch.setattr(ast, "literal_eval", trap("literal_eval"))

    for text, case in ((ANTOINE, antoine_case), (DIPPR101, dippr_case), (WAGNER, wagner_case)):
        c, T = case("108-88-3")
        parsed = parse_expression(text)
        assert np.all(np.isfinite(parsed.evaluate(T, c)))
        parsed.derivative_T(T, c)
    for text, _, _ in HOSTILE:
        with pytest.raises(ExpressionError):
            parse_expression(text)
    assert calls == []


def test_module_source_names_no_code_execution_and_imports_only_light_modules():
    source = Path(expression_module.__file__)
    with source.open("rb") as handle:
        names = {tok.string for tok in tokenize.tokenize(handle.readline) if tok.type == tokenize.NAME}
    forbidden = {"eval", "exec", "compile", "literal_eval", "sympify", "__import__", "importlib",
                 "getattr", "globals", "locals", "__builtins__", "builtins", "subprocess"}
    assert names & forbidden == set()
    # `import audit.sheet.expression` must stay cheap: numpy and the standard library only.
    imported = set()
    for node in ast.walk(ast.parse(source.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            imported |= {alias.name.split(".")[0] for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            imported.add(node.module.split(".")[0])
    assert imported <= {"__future__", "math", "collections", "dataclasses", "typing", "numpy"}


def test_arguments_that_are_not_text_or_limits():
    with pytest.raises(TypeError):
        parse_expression(b"A - B/T")
    for bad in ({"max_length": 0}, {"max_depth": -1}, {"max_depth": 2.5}):
        with pytest.raises(ValueError) as excinfo:
            parse_expression("T", **bad)
        assert not isinstance(excinfo.value, ExpressionError)


def test_error_keeps_its_position_through_pickle():
    with pytest.raises(ExpressionError) as excinfo:
        parse_expression("A; B")
    copy = pickle.loads(pickle.dumps(excinfo.value))
    assert (type(copy), copy.position, str(copy)) == (ExpressionError, 1, str(excinfo.value))


# -- properties ------------------------------------------------------------------------------------

GRAMMAR_CHARACTERS = "0123456789.eE+-\u2212*\u00d7\u00b7/\u00f7^() TABCt\u03c4_,;[]'=\n" + "lnexpsqrtabslog"


def check_outcome(text):
    try:
        parsed = parse_expression(text)
    except ExpressionError as error:
        assert error.position is None or 0 <= error.position <= len(text)
        assert str(error)
        return
    c = dict.fromkeys(parsed.names, 1.5)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        value = parsed.evaluate(np.array([250.0, 300.0]), c)
        slope = parsed.derivative_T(np.array([250.0, 300.0]), c)
    assert value.shape == slope.shape == (2,)
    assert value.dtype == slope.dtype == np.float64


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=80))
def test_any_text_either_parses_or_raises_expression_error(text):
    check_outcome(text)


@settings(max_examples=500, deadline=None)
@given(st.text(alphabet=GRAMMAR_CHARACTERS, max_size=60))
def test_grammar_like_text_either_parses_or_raises_expression_error(text):
    check_outcome(text)


SPACES = st.sampled_from(["", " ", "\t", "  "])
BINARY_SPELLINGS = [("+", "+"), ("-", "-"), ("-", "\u2212"), ("*", "*"), ("*", "\u00d7"), ("*", "\u00b7"),
                    ("/", "/"), ("/", "\u00f7"), ("^", "^"), ("^", "**")]
LEAVES = st.one_of(
    st.floats(min_value=0.0, max_value=1e12, allow_nan=False, allow_infinity=False)
      .map(abs).map(lambda x: (Number(x), repr(x))),
    st.sampled_from(["T", "A", "B", "Tc", "\u03c4", "x_1"]).map(lambda n: (Name(n), n)),
)


def extend(children):
    binary = st.tuples(children, st.sampled_from(BINARY_SPELLINGS), children, SPACES).map(
        lambda t: (Binary(t[1][0], t[0][0], t[2][0]), f"({t[0][1]}{t[3]}{t[1][1]}{t[3]}{t[2][1]})"))
    unary = st.tuples(st.sampled_from([("-", "-"), ("-", "\u2212"), ("+", "+")]), children).map(
        lambda t: (Unary(t[0][0], t[1][0]), f"({t[0][1]}{t[1][1]})"))
    call = st.tuples(st.sampled_from(sorted(expression_module.FUNCTION_NAMES)), children).map(
        lambda t: (Call(t[0], t[1][0]), f"{t[0]}({t[1][1]})"))
    return st.one_of(binary, unary, call)


FORMULAS = st.recursive(LEAVES, extend, max_leaves=25)


@settings(max_examples=300, deadline=None)
@given(FORMULAS)
def test_generated_formulas_parse_to_their_tree_and_evaluate(formula):
    tree, text = formula
    parsed = parse_expression(text, max_length=100_000, max_depth=1_000)
    assert parsed.root == tree
    assert isinstance(parsed, Expression)
    c = {name: 0.75 for name in ("A", "B", "Tc", "\u03c4", "x_1")}
    T = np.array([[0.0, 1.0], [250.0, -3.5]])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        value = parsed.evaluate(T, c)
        slope = parsed.derivative_T(T, c)
    assert value.shape == slope.shape == (2, 2)
    assert value.dtype == slope.dtype == np.float64
