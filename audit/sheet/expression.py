"""Vapor-pressure formulas as printed on supplier sheets.

A supplier sheet may state its vapor-pressure equation as a formula, for
example ``A - B/(T + C)``, ``A + B/T + C*ln(T) + D*T^E`` or
``ln(Pc) + (Tc/T)*(a*(1 - T/Tc) + b*(1 - T/Tc)^1.5)``.  This module reads
such text into a tree of the node types defined here and evaluates it with
numpy.  The text is never executed: it is read one character at a time, and
evaluation walks the tree calling a fixed table of numpy functions, so a
formula cannot reach Python's evaluation machinery, attributes or imports.

Grammar
-------
::

    expr    := term (('+' | '-') term)*
    term    := unary (('*' | '/') unary)*
    unary   := ('+' | '-') unary | power
    power   := atom ('^' unary)?
    atom    := NUMBER | NAME | FUNC '(' expr ')' | '(' expr ')'
    NUMBER  := (DIGIT+ ['.' DIGIT*] | '.' DIGIT+) [('e' | 'E') ['+' | '-'] DIGIT+]
    NAME    := LETTER (LETTER | DIGIT | '_')*
    FUNC    := 'ln' | 'log10' | 'exp' | 'sqrt' | 'abs'
    DIGIT   := '0' ... '9'
    LETTER  := 'a' ... 'z' | 'A' ... 'Z' | a Greek letter ('α' ... 'ω', 'Α' ... 'Ω',
               and the symbol forms 'ϐ' 'ϑ' 'ϕ' 'ϖ' 'ϰ' 'ϱ' 'ϵ')

Other spellings of the same symbols: ``**`` for ``^``; ``−`` (U+2212) for
``-`` (also in an exponent, ``2e−3``); ``×`` and ``·`` for ``*``; ``÷`` for
``/``.  Whitespace between symbols is ignored.

Consequences of the grammar worth stating:

* ``^`` groups to the right and binds tighter than a leading sign:
  ``2^3^2`` is 2^9 = 512, ``-2^2`` is -(2^2) = -4, and ``2^-1`` is 0.5.
* ``*``, ``/``, ``+`` and ``-`` group to the left: ``8/4/2`` is 1 and
  ``1-2-3`` is -4.
* Multiplication is never implied: ``2T`` and ``2(T+1)`` are errors.
* A number uses a decimal point; a comma is an error (it would otherwise be
  ambiguous between a decimal comma and an argument separator).
* ``T`` is the temperature, in whatever unit the sheet states; every other
  name is a coefficient.  Names are case-sensitive (``Tc`` is a coefficient,
  ``T`` the temperature).  The function names are reserved: no coefficient
  can be called ``ln``.

Nesting depth is counted while reading, not left to the interpreter's stack:
each open parenthesis (function calls included), each leading sign and each
``^`` whose right operand is still being read adds one level.  Parsing,
`Expression.evaluate` and `Expression.derivative_T` use explicit stacks, so
no text can make them raise ``RecursionError``.

Example
-------
>>> antoine = parse_expression("A - B/(T + C)")
>>> sorted(antoine.names)
['A', 'B', 'C']
>>> float(antoine.evaluate(373.15, {"A": 10.0, "B": 1700.0, "C": -40.0}))
4.89719345640102
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field
from typing import Union

import numpy as np

__all__ = [
    "TEMPERATURE",
    "FUNCTION_NAMES",
    "ExpressionError",
    "Number",
    "Name",
    "Unary",
    "Binary",
    "Call",
    "Node",
    "Expression",
    "parse_expression",
]

#: The name that stands for the temperature in a formula.
TEMPERATURE = "T"

_FUNCTIONS = {
    "ln": np.log,
    "log10": np.log10,
    "exp": np.exp,
    "sqrt": np.sqrt,
    "abs": np.abs,
}

#: Function names a formula may call; they cannot be used as coefficient names.
FUNCTION_NAMES = frozenset(_FUNCTIONS)

_LN10 = math.log(10.0)


class ExpressionError(ValueError):
    """Text that is not a valid formula, or a formula that cannot be evaluated.

    Parameters
    ----------
    message : str
        What is wrong; for a syntax error it quotes the text near the error
        and says what was expected there.
    position : int or None
        0-based index of the offending character in the formula text;
        ``len(text)`` when the formula ends too early; ``None`` when the error
        is not tied to one place (empty or overlong text, missing
        coefficients).
    """

    def __init__(self, message: str, position: int | None = None):
        super().__init__(message)
        self.position = position

    def __reduce__(self):
        # The default pickling passes only the message back to __init__;
        # errors crossing a process boundary in batch audits keep the position.
        return (type(self), (str(self), self.position))


# -- tree ------------------------------------------------------------------------------

@dataclass(frozen=True)
class Number:
    """A numeric literal.

    Parameters
    ----------
    value : float
        The number as written [unit of the term it appears in].
    """

    value: float


@dataclass(frozen=True)
class Name:
    """A coefficient name, or ``T`` for the temperature.

    Parameters
    ----------
    identifier : str
        The name as written (case-sensitive).
    """

    identifier: str


@dataclass(frozen=True)
class Unary:
    """A leading sign.

    Parameters
    ----------
    operator : {'+', '-'}
        The sign, in its ASCII spelling.
    operand : Node
        What the sign applies to.
    """

    operator: str
    operand: "Node"


@dataclass(frozen=True)
class Binary:
    """Two operands joined by an operator.

    Parameters
    ----------
    operator : {'+', '-', '*', '/', '^'}
        The operator, in its ASCII spelling (``**``, ``×``, ``·``, ``÷`` and
        ``−`` are stored as ``^``, ``*``, ``*``, ``/`` and ``-``).
    left, right : Node
        The operands.
    """

    operator: str
    left: "Node"
    right: "Node"


@dataclass(frozen=True)
class Call:
    """A call of one of the functions in `FUNCTION_NAMES`.

    Parameters
    ----------
    function : str
        The function name.
    argument : Node
        Its single argument.
    """

    function: str
    argument: "Node"


Node = Union[Number, Name, Unary, Binary, Call]


def _children(node: Node) -> tuple[Node, ...]:
    if isinstance(node, (Number, Name)):
        return ()
    if isinstance(node, Unary):
        return (node.operand,)
    if isinstance(node, Call):
        return (node.argument,)
    if isinstance(node, Binary):
        return (node.left, node.right)
    raise TypeError(f"not an expression node: {type(node).__name__}")


def _postorder(root: Node) -> tuple[Node, ...]:
    # Visiting node, right, left with a stack and reversing yields left,
    # right, node: children always come before their parent, which is the
    # order a value stack needs, and no Python recursion is involved.
    order = []
    stack = [root]
    while stack:
        node = stack.pop()
        order.append(node)
        stack.extend(_children(node))
    order.reverse()
    return tuple(order)


# -- evaluation ------------------------------------------------------------------------

@dataclass(frozen=True)
class Expression:
    """A parsed formula.  Build it with `parse_expression`.

    Parameters
    ----------
    text : str
        The formula as given.
    root : Node
        The top node of the tree.
    """

    text: str
    root: Node = field(repr=False)
    _program: tuple[Node, ...] = field(init=False, repr=False, compare=False)
    _names: frozenset[str] = field(init=False, repr=False, compare=False)
    _uses_temperature: bool = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        program = _postorder(self.root)
        used = {node.identifier for node in program if isinstance(node, Name)}
        object.__setattr__(self, "_program", program)
        object.__setattr__(self, "_names", frozenset(used - {TEMPERATURE}))
        object.__setattr__(self, "_uses_temperature", TEMPERATURE in used)

    def __str__(self) -> str:
        return self.text

    @property
    def names(self) -> frozenset[str]:
        """Coefficient names the formula uses (``T`` excluded)."""
        return self._names

    @property
    def uses_temperature(self) -> bool:
        """Whether the formula depends on ``T`` at all."""
        return self._uses_temperature

    def evaluate(self, T, coefficients: Mapping[str, float]) -> np.ndarray:
        """Value of the formula.

        Parameters
        ----------
        T : float or array_like
            Temperature [unit the sheet states for the formula].
        coefficients : mapping of str to float
            A value for every name in `names` [units the sheet states];
            entries the formula does not use are ignored.

        Returns
        -------
        ndarray of float64, shape of `T`
            The formula's value [unit of the formula's left-hand side].  A
            logarithm of a negative number, an overflow or a division by zero
            gives nan or ±inf, without warning.

        Raises
        ------
        ExpressionError
            If `coefficients` lacks a name the formula uses, or gives a value
            that is not a number.
        """
        temperature = np.asarray(T, dtype=np.float64)
        value, _ = self._run(temperature, self._coefficient_values(coefficients), slopes=False)
        return _shaped(value, temperature.shape)

    def derivative_T(self, T, coefficients: Mapping[str, float]) -> np.ndarray:
        """Derivative of the formula with respect to ``T``, from the tree.

        Sum, product, quotient and chain rules; for ``a^b`` the power rule
        ``b·a^(b-1)·a'`` when ``b`` does not involve ``T``, otherwise
        ``a^b·(b'·ln a + b·a'/a)``.  A part of the tree that does not involve
        ``T`` contributes exactly zero, so a constant that evaluates to inf or
        nan cannot spoil the derivative of the rest.  ``abs`` is given slope
        0 at 0.

        Parameters
        ----------
        T : float or array_like
            Temperature [unit the sheet states for the formula].
        coefficients : mapping of str to float
            As for `evaluate`.

        Returns
        -------
        ndarray of float64, shape of `T`
            d(formula)/dT [unit of the formula per unit of T]; zero everywhere
            when the formula does not involve ``T``.

        Raises
        ------
        ExpressionError
            As for `evaluate`.
        """
        temperature = np.asarray(T, dtype=np.float64)
        _, slope = self._run(temperature, self._coefficient_values(coefficients), slopes=True)
        return _shaped(0.0 if slope is None else slope, temperature.shape)

    def _coefficient_values(self, coefficients: Mapping[str, float]) -> dict[str, np.float64]:
        missing = sorted(name for name in self._names if name not in coefficients)
        if missing:
            listed = ", ".join(repr(name) for name in missing)
            plural = "s" if len(missing) > 1 else ""
            raise ExpressionError(f"missing coefficient{plural} {listed} for the formula {self.text!r}")
        values = {}
        for name in self._names:
            value = coefficients[name]
            # A string such as "1,5" straight from a sheet would otherwise be
            # converted (or not) by float()'s own rules; the caller must decide.
            if isinstance(value, (str, bytes)):
                raise ExpressionError(f"coefficient {name!r} is text ({value!r}), not a number")
            try:
                values[name] = np.float64(float(value))
            except (TypeError, ValueError) as exc:
                raise ExpressionError(f"coefficient {name!r} is not a number: {value!r}") from exc
        return values

    def _run(self, temperature: np.ndarray, values: Mapping[str, np.float64], *, slopes: bool):
        """Run the post-order program on a stack of (value, slope) pairs.

        A slope of ``None`` means "does not depend on T": it is exactly zero
        and takes no part in the arithmetic.  With ``slopes=False`` even ``T``
        is given slope ``None``, so the same loop computes values only.
        """
        stack: list[tuple] = []
        with np.errstate(all="ignore"):
            for node in self._program:
                if isinstance(node, Number):
                    stack.append((np.float64(node.value), None))
                elif isinstance(node, Name):
                    if node.identifier == TEMPERATURE:
                        stack.append((temperature, np.float64(1.0) if slopes else None))
                    else:
                        stack.append((values[node.identifier], None))
                elif isinstance(node, Unary):
                    u, du = stack.pop()
                    if node.operator == "-":
                        stack.append((np.negative(u), None if du is None else np.negative(du)))
                    else:
                        stack.append((u, du))
                elif isinstance(node, Call):
                    u, du = stack.pop()
                    stack.append(_call(node.function, u, du))
                else:
                    b, db = stack.pop()
                    a, da = stack.pop()
                    stack.append(_binary(node.operator, a, da, b, db))
        return stack.pop()


def _shaped(value, shape: tuple[int, ...]) -> np.ndarray:
    # np.array copies: the result never aliases the caller's T or a read-only
    # broadcast view.
    return np.array(np.broadcast_to(np.asarray(value, dtype=np.float64), shape), dtype=np.float64)


def _add(first, second):
    if first is None:
        return second
    if second is None:
        return first
    return first + second


def _binary(operator: str, a, da, b, db):
    if operator == "+":
        return a + b, _add(da, db)
    if operator == "-":
        return a - b, _add(da, None if db is None else np.negative(db))
    if operator == "*":
        return a * b, _add(None if da is None else da * b, None if db is None else a * db)
    if operator == "/":
        quotient = a / b
        if db is None:
            return quotient, None if da is None else da / b
        numerator = (np.negative(a * db) if da is None else da * b - a * db)
        return quotient, numerator / (b * b)
    if operator == "^":
        value = np.power(a, b)
        if db is None:
            # Power rule: unlike the general form it stays finite at a = 0 and
            # for a negative base with an integer exponent.
            return value, None if da is None else b * np.power(a, b - 1.0) * da
        slope = value * db * np.log(a)
        if da is not None:
            slope = slope + value * b * da / a
        return value, slope
    raise ValueError(f"unknown operator {operator!r}")


def _call(function: str, u, du):
    value = _FUNCTIONS[function](u)
    if du is None:
        return value, None
    if function == "ln":
        return value, du / u
    if function == "log10":
        return value, du / (u * _LN10)
    if function == "exp":
        return value, value * du
    if function == "sqrt":
        return value, du / (2.0 * value)
    return value, np.sign(u) * du


# -- reading the text ------------------------------------------------------------------

_DIGITS = frozenset("0123456789")
_GREEK_SYMBOL_FORMS = frozenset("ϐϑϕϖϰϱϵ")
_OPERATOR_SPELLINGS = {
    "+": "+",
    "-": "-",
    "\u2212": "-",
    "*": "*",
    "\u00d7": "*",
    "\u00b7": "*",
    "/": "/",
    "\u00f7": "/",
    "^": "^",
}
_CHARACTER_HINTS = {
    ",": "write decimals with a point (2.5, not 2,5); functions take a single argument",
    ".": "a point is only allowed inside a number such as 1.5",
    "_": "names must start with a letter",
    "[": "only round parentheses ( ) group terms",
    "]": "only round parentheses ( ) group terms",
    "{": "only round parentheses ( ) group terms",
    "}": "only round parentheses ( ) group terms",
    "'": "a formula contains no quoted text",
    '"': "a formula contains no quoted text",
    "`": "a formula contains no quoted text",
    "=": "give only the right-hand side of the equation",
    ";": "a formula is one expression",
    ":": "a formula is one expression",
    "\u00b2": "write powers with '^', as in T^2",
    "\u00b3": "write powers with '^', as in T^3",
    "\u00b5": "the micro sign is not a letter here; write the Greek letter \u03bc (U+03BC)",
}
_OPERAND_EXPECTED = "expected a number, a name, a function call such as ln(...) or '('"
_EXCERPT_REACH = 20


def _is_letter(ch: str) -> bool:
    return (
        "a" <= ch <= "z"
        or "A" <= ch <= "Z"
        or ("\u0391" <= ch <= "\u03a9" and ch != "\u03a2")
        or "\u03b1" <= ch <= "\u03c9"
        or ch in _GREEK_SYMBOL_FORMS
    )


def _printable(fragment: str) -> str:
    # Messages end up in one-line logs and reports; a newline or control
    # character from the sheet must show as an escape, not act as one.
    return "".join(ch if ch.isprintable() else ch.encode("unicode_escape").decode("ascii")
                   for ch in fragment)


def _quote(written: str) -> str:
    return "the end of the formula" if written == "" else f"'{_printable(written)}'"


def _error(text: str, position: int, length: int, problem: str, hint: str | None = None) -> ExpressionError:
    """An ExpressionError whose message shows the text around ``text[position:position+length]``."""
    if position >= len(text):
        start = max(0, len(text) - 2 * _EXCERPT_REACH)
        lead = "…" if start > 0 else ""
        where = f'at the end of the formula "{lead}{_printable(text[start:])}"'
    else:
        start = max(0, position - _EXCERPT_REACH)
        stop = min(len(text), position + length + _EXCERPT_REACH)
        lead = "…" if start > 0 else ""
        trail = "…" if stop < len(text) else ""
        where = (f'at position {position}: "{lead}{_printable(text[start:position])}'
                 f'»{_printable(text[position:position + length])}«'
                 f'{_printable(text[position + length:stop])}{trail}"')
    message = f"{problem} {where}"
    if hint:
        message += f" — {hint}"
    return ExpressionError(message, position)


@dataclass(frozen=True)
class _Token:
    kind: str           # 'number', 'name', 'operator', 'open', 'close' or 'end'
    written: str        # the characters as they appear in the text
    position: int
    symbol: str = ""    # operators: the ASCII spelling
    value: float = 0.0  # numbers


def _tokens(text: str) -> Iterator[_Token]:
    # A generator, so that the parser reports whichever error comes first in
    # the text, be it a stray character or a misplaced token.
    n = len(text)
    i = 0
    while i < n:
        ch = text[i]
        if ch.isspace():
            i += 1
        elif ch in _DIGITS or (ch == "." and i + 1 < n and text[i + 1] in _DIGITS):
            token = _read_number(text, i)
            i += len(token.written)
            yield token
        elif _is_letter(ch):
            j = i + 1
            while j < n and (_is_letter(text[j]) or text[j] in _DIGITS or text[j] == "_"):
                j += 1
            yield _Token("name", text[i:j], i)
            i = j
        elif text.startswith("**", i):
            yield _Token("operator", "**", i, symbol="^")
            i += 2
        elif ch in _OPERATOR_SPELLINGS:
            yield _Token("operator", ch, i, symbol=_OPERATOR_SPELLINGS[ch])
            i += 1
        elif ch == "(":
            yield _Token("open", ch, i)
            i += 1
        elif ch == ")":
            yield _Token("close", ch, i)
            i += 1
        else:
            raise _error(text, i, 1, f"unexpected character {_quote(ch)} (U+{ord(ch):04X})",
                         _CHARACTER_HINTS.get(ch))
    yield _Token("end", "", n)


def _read_number(text: str, start: int) -> _Token:
    n = len(text)
    i = start
    while i < n and text[i] in _DIGITS:
        i += 1
    if i < n and text[i] == ".":
        i += 1
        while i < n and text[i] in _DIGITS:
            i += 1
    if i < n and text[i] in "eE":
        j = i + 1
        if j < n and text[j] in "+-\u2212":
            j += 1
        k = j
        while k < n and text[k] in _DIGITS:
            k += 1
        if k == j:
            raise _error(text, start, j - start, f"{_quote(text[start:j])} is not a complete number",
                         "an exponent needs digits, as in 2e-3; multiplication must be written with '*'")
        i = k
    written = text[start:i]
    if i < n and text[i] == ".":
        raise _error(text, i, 1, f"a second decimal point after {_quote(written)}",
                     "a number has at most one decimal point")
    value = float(written.replace("\u2212", "-"))
    if not math.isfinite(value):
        raise _error(text, start, len(written), f"the number {_quote(written)} is too large for a float")
    return _Token("number", written, start, value=value)


@dataclass(frozen=True)
class _Pending:
    kind: str       # 'binary', 'sign' or 'group'
    symbol: str     # operator; function name or '' for a group
    token: _Token


# Binding strength of each operator on the pending stack; a leading sign sits
# between '*' and '^', which is what makes -2^2 = -(2^2) but -2*3 = (-2)*3.
_PRECEDENCE = {"+": 1, "-": 1, "*": 2, "/": 2, "^": 4}
_SIGN_PRECEDENCE = 3

_OPERAND, _OPERATOR, _CALL = "operand", "operator", "call"


class _Parser:
    """Operator-precedence reading of one formula, without recursion.

    Operands wait on one stack and operators (with signs and open
    parentheses) on another; an operator is applied as soon as a weaker one
    arrives.  The state says whether an operand or an operator must come
    next, which is where every "missing ..." message comes from.
    """

    def __init__(self, text: str, max_depth: int):
        self.text = text
        self.max_depth = max_depth
        self.operands: list[Node] = []
        self.pending: list[_Pending] = []
        self.depth = 0

    def parse(self) -> Node:
        state = _OPERAND
        previous: _Token | None = None
        function: _Token | None = None
        for token in _tokens(self.text):
            if state == _CALL:
                if token.kind != "open":
                    raise _error(self.text, function.position, len(function.written),
                                 f"{_quote(function.written)} is a function",
                                 "it must be followed by '(' and cannot be used as a coefficient name")
                self._open(_Pending("group", function.written, token))
                state = _OPERAND
            elif state == _OPERAND:
                if token.kind == "number":
                    self.operands.append(Number(token.value))
                    state = _OPERATOR
                elif token.kind == "name" and token.written in _FUNCTIONS:
                    function = token
                    state = _CALL
                elif token.kind == "name":
                    self.operands.append(Name(token.written))
                    state = _OPERATOR
                elif token.kind == "open":
                    self._open(_Pending("group", "", token))
                elif token.kind == "operator" and token.symbol in "+-":
                    self._open(_Pending("sign", token.symbol, token))
                else:
                    raise self._missing_operand(token, previous)
            elif token.kind == "operator":
                self._apply_stronger_than(token.symbol)
                if token.symbol == "^":
                    self._open(_Pending("binary", "^", token))
                else:
                    self.pending.append(_Pending("binary", token.symbol, token))
                state = _OPERAND
            elif token.kind == "close":
                self._close(token)
            elif token.kind == "end":
                self._apply_stronger_than(None)
                if self.pending:
                    group = self.pending[-1].token
                    raise _error(self.text, group.position, 1, "'(' is never closed",
                                 "add the matching ')'")
            else:
                raise self._missing_operator(previous, token)
            previous = token
        return self.operands[-1]

    def _open(self, entry: _Pending) -> None:
        self.pending.append(entry)
        self.depth += 1
        if self.depth > self.max_depth:
            raise _error(self.text, entry.token.position, len(entry.token.written),
                         f"the formula nests deeper than {self.max_depth} levels",
                         "parentheses, signs and exponents each add a level")

    def _apply(self) -> None:
        entry = self.pending.pop()
        if entry.kind == "sign":
            self.operands.append(Unary(entry.symbol, self.operands.pop()))
            self.depth -= 1
        else:
            right = self.operands.pop()
            left = self.operands.pop()
            self.operands.append(Binary(entry.symbol, left, right))
            if entry.symbol == "^":
                self.depth -= 1

    def _apply_stronger_than(self, operator: str | None) -> None:
        """Apply pending operators that bind at least as tightly as `operator`.

        ``None`` stands for the end of a group or of the text, which every
        operator outranks.  '^' groups to the right, so an arriving '^' leaves
        a pending '^' in place.
        """
        strength = 0 if operator is None else _PRECEDENCE[operator]
        while self.pending and self.pending[-1].kind != "group":
            top = self.pending[-1]
            top_strength = _SIGN_PRECEDENCE if top.kind == "sign" else _PRECEDENCE[top.symbol]
            if top_strength > strength or (top_strength == strength and operator != "^"):
                self._apply()
            else:
                break

    def _close(self, token: _Token) -> None:
        self._apply_stronger_than(None)
        if not self.pending:
            raise _error(self.text, token.position, 1, "')' has no matching '('")
        group = self.pending.pop()
        self.depth -= 1
        if group.symbol:
            self.operands.append(Call(group.symbol, self.operands.pop()))

    def _missing_operand(self, token: _Token, previous: _Token | None) -> ExpressionError:
        if token.kind == "close" and not any(entry.kind == "group" for entry in self.pending):
            return _error(self.text, token.position, 1, "')' has no matching '('")
        if token.kind == "close" and previous is not None and previous.kind == "open":
            return _error(self.text, token.position, 1, "empty parentheses", _OPERAND_EXPECTED)
        if token.kind == "end":
            return _error(self.text, token.position, 0,
                          f"missing operand after {_quote(previous.written)}", _OPERAND_EXPECTED)
        if previous is None:
            return _error(self.text, token.position, len(token.written),
                          f"the formula cannot start with {_quote(token.written)}", _OPERAND_EXPECTED)
        return _error(self.text, token.position, len(token.written),
                      f"missing operand between {_quote(previous.written)} and {_quote(token.written)}",
                      _OPERAND_EXPECTED)

    def _missing_operator(self, previous: _Token, token: _Token) -> ExpressionError:
        if token.kind == "open" and previous.kind == "name":
            known = ", ".join(sorted(_FUNCTIONS))
            return _error(self.text, previous.position, len(previous.written),
                          f"{_quote(previous.written)} is not a known function",
                          f"the functions are {known}; multiplication must be written with '*'")
        if token.kind == "number" and previous.kind == "number":
            problem = f"two numbers in a row, {_quote(previous.written)} and {_quote(token.written)}"
        else:
            problem = f"missing operator between {_quote(previous.written)} and {_quote(token.written)}"
        return _error(self.text, token.position, len(token.written), problem,
                      "expected an operator (+ - * / ^) or ')'; multiplication must be written with '*'")


def parse_expression(text: str, *, max_length: int = 500, max_depth: int = 50) -> Expression:
    """Read a formula into an `Expression`.

    Parameters
    ----------
    text : str
        The formula, in the grammar of this module's docstring.
    max_length : int, optional
        Longest text accepted [characters].
    max_depth : int, optional
        Deepest nesting accepted [levels]: parentheses (function calls
        included), leading signs and exponents each add a level.

    Returns
    -------
    Expression

    Raises
    ------
    ExpressionError
        If the text is empty, longer than `max_length`, nests deeper than
        `max_depth`, or is not a formula of the grammar; the message quotes
        the text near the problem and says what was expected there.
    TypeError
        If `text` is not a ``str``.
    ValueError
        If `max_length` or `max_depth` is not a positive integer.
    """
    if not isinstance(text, str):
        raise TypeError(f"a formula must be a str, not {type(text).__name__}")
    for label, limit in (("max_length", max_length), ("max_depth", max_depth)):
        if isinstance(limit, bool) or not isinstance(limit, int) or limit < 1:
            raise ValueError(f"{label} must be a positive integer, not {limit!r}")
    if len(text) > max_length:
        raise ExpressionError(f"the formula is {len(text)} characters long; at most {max_length} are accepted")
    if not text.strip():
        raise ExpressionError("the formula is empty")
    return Expression(text, _Parser(text, max_depth).parse())
