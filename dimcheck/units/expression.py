"""Parse unit expressions such as ``"kg m / s^2"`` into a ``Unit``, without pint or eval.

The grammar follows pint's unit strings:

* names are letters, digits after the first character and underscores (``m``,
  ``degC``, ``inH2O``; ``m2`` is a name and therefore unknown, as in pint), plus
  pint's spellings ``%``, ``‰`` and names containing ``°`` (``°C``);
* ``*``, ``/`` and whitespace (implicit multiplication) share one precedence and
  group to the left, so ``"J/kg/K"`` is J kg^-1 K^-1 and ``"J / kg K"`` is J K / kg;
* ``**`` or ``^`` binds tighter and groups to the right (``m**2**3`` is m^8); an
  exponent may carry signs and be a parenthesised number expression
  (``s^-1``, ``m^(-3)``, ``m**(1/2)``, ``m^0.5``); pint's unary minus binds looser
  than ``**``, so ``m**-1**2`` is m^-1; superscripts (``m²``, ``s⁻¹``) and ``·`` work;
* pint's words ``per``, ``squared``, ``cubed`` and ``square``/``sq``/``cubic`` before a name;
* ``"1"``, ``"1/s"``: the number 1 is allowed; any other number outside an exponent
  is a scaling factor, which pint rejects and so do we;
* ``"[length]/[time]"``: bracketed dimension names give a dimension-only unit
  (scale ``None``); they cannot be mixed with unit names.

Offset units: an expression that is exactly one offset unit (``"degC"``) keeps its
offset; anywhere inside a larger expression (``"degC/s"``, ``"degC**2"``) the unit
stands for its temperature difference (offset 0). This is what pint does when it
replaces such units by their ``delta_`` twins.

Hostile text is refused quickly with a one-line ``UnitError``: the length, the
nesting depth, exponent sizes and every number are bounded before any arithmetic.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction

from .dimension import DIMENSIONLESS, Dimension
from .table import UnitTable
from .errors import UnitError
from .unit import Unit

MAX_LENGTH = 200
MAX_NESTING = 40
MAX_EXPONENT = 64
MAX_EXPONENT_DENOMINATOR = 1000
# Any number inside an exponent stays below this, so exponent arithmetic is always cheap.
_MAX_NUMBER = 10**6

_NUMBER = re.compile(r"(?:\d+\.?\d*|\.\d+)(?:[eE]([+-]?\d+))?")
_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-")
_NAME_EXTRA = "_°"
_SINGLE_CHARACTER_NAMES = "%‰"
_MULTIPLY_SIGNS = "*·⋅×"
_POWER_WORDS_AFTER = {"squared": "2", "cubed": "3"}
_POWER_WORDS_BEFORE = {"square": "2", "sq": "2", "cubic": "3"}


@dataclass(frozen=True, slots=True)
class _Token:
    kind: str  # "name", "number", "dimension", "op", "end"
    text: str
    column: int  # 1-based, for messages
    spaced: bool = False  # whitespace came before it


@dataclass(frozen=True, slots=True)
class _Value:
    """A partial result: a unit product, a dimension-only product, or the number 1."""

    kind: str  # "unit", "dimension" or "one"
    dimension: Dimension = DIMENSIONLESS
    scale: float = 1.0
    sole: Unit | None = None  # set while the value is exactly one named unit (keeps offsets)


_ONE = _Value("one")
_MEMO: dict[tuple[str, str], Unit | str] = {}
_MEMO_LIMIT = 4096


def parse_unit(text: str, table: UnitTable) -> Unit:
    """Parse ``text`` against ``table``; raise ``UnitError`` with a one-line message."""
    memo_key = (table.key, text)
    cached = _MEMO.get(memo_key)
    if cached is None:
        try:
            cached = _Parser(text, table).parse()
        except UnitError as error:
            cached = str(error)
        if len(_MEMO) >= _MEMO_LIMIT:
            _MEMO.clear()
        _MEMO[memo_key] = cached
    if isinstance(cached, str):
        raise UnitError(cached)
    return cached


class _Parser:
    def __init__(self, text: str, table: UnitTable):
        self.text = text
        self.table = table
        self.tokens: list[_Token] = []
        self.position = 0

    # -- entry point ----------------------------------------------------------------
    def parse(self) -> Unit:
        if not self.text.strip():
            raise UnitError("empty unit expression")
        if len(self.text) > MAX_LENGTH:
            raise UnitError(f"unit expression is longer than {MAX_LENGTH} characters")
        self.tokens = _rewrite_words(_tokenize(self.text))
        self._check_nesting()
        value = self._product()
        token = self._peek()
        if token.kind != "end":
            self._fail_at(token, f"unexpected '{token.text}'")
        return self._finish(value)

    def _finish(self, value: _Value) -> Unit:
        if value.kind == "dimension":
            return Unit(self.text, value.dimension, None)
        if value.sole is not None:
            return Unit(self.text, value.sole.dimension, value.sole.scale, value.sole.offset)
        if not (math.isfinite(value.scale) and value.scale > 0.0):
            raise UnitError(f"unit scale out of range in '{self.text}'")
        return Unit(self.text, value.dimension, value.scale)

    # -- unit grammar ------------------------------------------------------------------
    def _product(self) -> _Value:
        """product := power (('*' | '/' | whitespace) power)*, grouping to the left."""
        value = self._power()
        while True:
            token = self._peek()
            if token.kind == "op" and token.text in ("*", "/"):
                self.position += 1
                right = self._power()
                value = self._multiply(value, right) if token.text == "*" else self._divide(value, right)
            elif token.kind in ("name", "number", "dimension") or token.text == "(":
                if not token.spaced and self._previous().kind != "number":
                    self._fail_at(token, f"missing operator before '{token.text}'")
                value = self._multiply(value, self._power())
            else:
                return value

    def _power(self) -> _Value:
        """power := atom ('**' exponent)?"""
        value = self._atom()
        if self._peek().text == "**":
            operator = self._take()
            exponent = self._exponent()
            value = self._raise(value, exponent, operator)
        return value

    def _atom(self) -> _Value:
        token = self._take()
        if token.kind == "name":
            return self._named_unit(token)
        if token.kind == "dimension":
            return self._named_dimension(token)
        if token.kind == "number":
            if self._number(token) != 1:
                self._fail_at(token, f"numeric factor '{token.text}' is not allowed (units carry no scaling factor)")
            return _ONE
        if token.text == "(":
            value = self._product()
            self._expect(")")
            return value
        if token.kind == "end":
            self._fail_at(token, "expected a unit")
        if token.text in ("-", "+"):
            self._fail_at(token, f"a sign '{token.text}' is only allowed in an exponent")
        self._fail_at(token, f"expected a unit, found '{token.text}'")

    def _named_unit(self, token: _Token) -> _Value:
        unit = self.table.lookup(token.text)
        if unit is None and "°" in token.text:
            # pint reads the degree sign as the word "degree" ("°F" is "degreeF").
            unit = self.table.lookup(token.text.replace("°", "degree"))
        if unit is None:
            hints = self.table.suggestions(token.text)
            hint = f" (did you mean: {', '.join(hints)}?)" if hints else ""
            raise UnitError(f"unknown unit '{token.text}' in '{self.text}'{hint}")
        return _Value("unit", unit.dimension, unit.scale, sole=unit)

    def _named_dimension(self, token: _Token) -> _Value:
        dimension = self.table.dimension_named(token.text)
        if dimension is None:
            raise UnitError(f"unknown dimension '[{token.text}]' in '{self.text}'")
        return _Value("dimension", dimension, 1.0)

    def _raise(self, value: _Value, exponent: Fraction, operator: _Token) -> _Value:
        if abs(exponent) > MAX_EXPONENT:
            self._fail_at(operator, f"exponent {exponent} is larger than {MAX_EXPONENT}")
        if exponent.denominator > MAX_EXPONENT_DENOMINATOR:
            self._fail_at(operator, f"exponent {float(exponent):g} is not a simple fraction; write it like (1/3)")
        if exponent == 1 or value.kind == "one":
            return value
        try:
            scale = value.scale ** float(exponent)
        except (OverflowError, ZeroDivisionError):
            raise UnitError(f"unit scale out of range in '{self.text}'") from None
        return _Value(value.kind, value.dimension**exponent, scale)

    # -- exponent grammar: numbers only, exact fractions ----------------------------------
    def _exponent(self) -> Fraction:
        """exponent := ('-' | '+') exponent | number-atom ('**' exponent)?"""
        token = self._peek()
        if token.text in ("-", "+"):
            self.position += 1
            value = self._exponent()
            return -value if token.text == "-" else value
        base = self._exponent_atom()
        if self._peek().text == "**":
            operator = self._take()
            return self._numeric_power(base, self._exponent(), operator)
        return base

    def _exponent_atom(self) -> Fraction:
        token = self._take()
        if token.kind == "number":
            return self._number(token)
        if token.text == "(":
            value = self._numeric_sum()
            self._expect(")")
            return value
        if token.kind == "end":
            self._fail_at(token, "expected an exponent")
        self._fail_at(token, f"exponent must be a number, found '{token.text}'")

    def _numeric_sum(self) -> Fraction:
        value = self._numeric_product()
        while self._peek().text in ("+", "-"):
            sign = self._take()
            right = self._numeric_product()
            value = self._bounded(value + right if sign.text == "+" else value - right, sign)
        return value

    def _numeric_product(self) -> Fraction:
        value = self._exponent()
        while self._peek().text in ("*", "/"):
            operator = self._take()
            right = self._exponent()
            if operator.text == "/" and right == 0:
                self._fail_at(operator, "division by zero in exponent")
            value = self._bounded(value * right if operator.text == "*" else value / right, operator)
        return value

    def _numeric_power(self, base: Fraction, power: Fraction, operator: _Token) -> Fraction:
        if power.denominator != 1:
            self._fail_at(operator, f"fractional power {power} of a number inside an exponent is not supported")
        if abs(power) > MAX_EXPONENT:
            self._fail_at(operator, "number too large in exponent")
        if base == 0 and power < 0:
            self._fail_at(operator, "division by zero in exponent")
        if abs(base) > 1 and abs(power) * math.log10(abs(base)) > 7:
            self._fail_at(operator, "number too large in exponent")
        return self._bounded(base**power, operator)

    def _bounded(self, value: Fraction, token: _Token) -> Fraction:
        if abs(value) > _MAX_NUMBER or value.denominator > _MAX_NUMBER:
            self._fail_at(token, "number too large in exponent")
        return value

    def _number(self, token: _Token) -> Fraction:
        match = _NUMBER.fullmatch(token.text)
        # Check the decimal exponent before Fraction() builds 10**exponent.
        if match is None or (match.group(1) and abs(int(match.group(1))) > 30):
            self._fail_at(token, f"number '{token.text}' is out of range")
        value = Fraction(token.text)
        if value.denominator > MAX_EXPONENT_DENOMINATOR:
            self._fail_at(token, f"exponent {token.text} is not a simple fraction; write it like (1/3)")
        return self._bounded(value, token)

    # -- helpers -----------------------------------------------------------------------------
    def _check_nesting(self) -> None:
        depth = 0
        for token in self.tokens:
            if token.text == "(":
                depth += 1
                if depth > MAX_NESTING:
                    raise UnitError(f"more than {MAX_NESTING} nested parentheses in unit expression")
            elif token.text == ")":
                depth -= 1

    def _peek(self) -> _Token:
        return self.tokens[self.position]

    def _previous(self) -> _Token:
        return self.tokens[self.position - 1]

    def _take(self) -> _Token:
        token = self.tokens[self.position]
        if token.kind != "end":
            self.position += 1
        return token

    def _expect(self, text: str) -> None:
        token = self._take()
        if token.text != text:
            self._fail_at(token, f"expected '{text}'" + (f", found '{token.text}'" if token.kind != "end" else ""))

    def _multiply(self, left: _Value, right: _Value) -> _Value:
        if left.kind == "one":
            return right
        if right.kind == "one":
            return left
        kind = self._combined_kind(left, right)
        return _Value(kind, left.dimension * right.dimension, left.scale * right.scale)

    def _divide(self, left: _Value, right: _Value) -> _Value:
        if right.kind == "one":
            return left
        kind = self._combined_kind(left, right)
        return _Value(kind, left.dimension / right.dimension, left.scale / right.scale)

    def _combined_kind(self, left: _Value, right: _Value) -> str:
        kinds = {left.kind, right.kind} - {"one"}
        if len(kinds) > 1:
            raise UnitError(f"cannot mix dimension names like [length] with unit names in '{self.text}'")
        return kinds.pop() if kinds else "one"

    def _fail_at(self, token: _Token, what: str):
        if token.kind == "end":
            raise UnitError(f"{what} at the end of '{self.text}'")
        raise UnitError(f"{what} at column {token.column} of '{self.text}'")


# -- tokens ------------------------------------------------------------------------------------


def _tokenize(text: str) -> list[_Token]:
    tokens: list[_Token] = []
    index, spaced = 0, False
    while index < len(text):
        char, column = text[index], index + 1
        if char.isspace():
            index, spaced = index + 1, True
            continue
        if char.isalpha() or char in _NAME_EXTRA:
            end = index + 1
            while end < len(text) and (text[end].isalpha() or text[end] in _NAME_EXTRA or "0" <= text[end] <= "9"):
                end += 1
            tokens.append(_Token("name", text[index:end], column, spaced))
        elif char in _SINGLE_CHARACTER_NAMES:
            end = index + 1
            tokens.append(_Token("name", char, column, spaced))
        elif "0" <= char <= "9" or (char == "." and "0" <= text[index + 1 : index + 2] <= "9"):
            match = _NUMBER.match(text, index)
            end = match.end()
            tokens.append(_Token("number", match.group(), column, spaced))
        elif char == "[":
            end = text.find("]", index)
            name = text[index + 1 : end].strip() if end != -1 else ""
            if end == -1 or not name.isidentifier():
                raise UnitError(f"malformed dimension name at column {column} of '{text}' (expected like [length])")
            end += 1
            tokens.append(_Token("dimension", name, column, spaced))
        elif char.translate(_SUPERSCRIPTS) != char:
            end = index
            while end < len(text) and text[end].translate(_SUPERSCRIPTS) != text[end]:
                end += 1
            digits = text[index:end].translate(_SUPERSCRIPTS)
            tokens.append(_Token("op", "**", column, spaced))
            if digits.startswith("-"):
                tokens.append(_Token("op", "-", column))
                digits = digits[1:]
            tokens.append(_Token("number", digits, column))
        elif text.startswith("**", index):
            end = index + 2
            tokens.append(_Token("op", "**", column, spaced))
        elif char == "^":
            end = index + 1
            tokens.append(_Token("op", "**", column, spaced))
        elif char in _MULTIPLY_SIGNS or (char == "." and not spaced and tokens and tokens[-1].kind == "name"
                                         and text[index + 1 : index + 2].isalpha()):
            # a dot between two names multiplies, as pint reads it ("N.m", "Pa.s")
            end = index + 1
            tokens.append(_Token("op", "*", column, spaced))
        elif char in "/()+-":
            end = index + 1
            tokens.append(_Token("op", char, column, spaced))
        else:
            raise UnitError(f"unexpected character '{char}' at column {column} of '{text}'")
        index, spaced = end, False
    tokens.append(_Token("end", "", len(text) + 1, spaced))
    return tokens


def _rewrite_words(tokens: list[_Token]) -> list[_Token]:
    """pint's word forms: ``m per s``, ``m squared``, ``cubic m``."""
    result: list[_Token] = []
    index = 0
    while index < len(tokens):
        token = tokens[index]
        following = tokens[index + 1] if index + 1 < len(tokens) else None
        if token.kind == "name" and token.text == "per":
            result.append(_Token("op", "/", token.column, token.spaced))
        elif token.kind == "name" and token.text in _POWER_WORDS_AFTER and token.spaced:
            result.append(_Token("op", "**", token.column, True))
            result.append(_Token("number", _POWER_WORDS_AFTER[token.text], token.column))
        elif token.kind == "name" and token.text in _POWER_WORDS_BEFORE and following and following.kind == "name":
            result.append(_Token("name", following.text, following.column, token.spaced))
            result.append(_Token("op", "**", following.column))
            result.append(_Token("number", _POWER_WORDS_BEFORE[token.text], following.column))
            index += 1
        else:
            result.append(token)
        index += 1
    return result
