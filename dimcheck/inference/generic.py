"""Unit-generic declarations: ``Annotated[float, "$X"]`` and ``"$X^(1/2)"``, ``"$Y/$X"``.

A ``$`` name is a unit variable, bound by the first argument that carries it and
checked against every later one. The shipped stubs use this to say that ``sqrt``
halves the exponents of its argument or that ``interp(x, xp, fp)`` returns fp's unit;
users may write it too. The notation is dimcheck's own (``$`` never occurs in a unit).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Callable

from .values import Quantity, quantity_product, power_scales

_TOKEN = re.compile(r"\s*(?:(\$[A-Za-z_]\w*)|([A-Za-z_][\w]*)|(\d+(?:\.\d+)?)|(\*\*|[*/^()\-]))")


@dataclass(frozen=True, slots=True)
class GenericUnit:
    text: str
    variables: tuple[str, ...]
    evaluate: Callable[[dict, Callable[[str], Quantity | None]], Quantity | None]
    single_variable: str | None  # ``X`` when the whole template is ``$X``: an argument there binds X


def _single_variable(text: str) -> str | None:
    stripped = text.strip()
    return stripped[1:] if stripped.startswith("$") and stripped[1:].isidentifier() else None


class GenericSyntaxError(ValueError):
    pass


def parse_generic(text: str) -> GenericUnit:
    tokens = []
    position = 0
    while position < len(text):
        match = _TOKEN.match(text, position)
        if not match or match.end() == position:
            if text[position:].strip() == "":
                break
            raise GenericSyntaxError(f"cannot read unit template {text!r} at {position + 1}")
        tokens.append(match.groups())
        position = match.end()
    parser = _Parser(tokens, text)
    node = parser.product()
    if parser.index != len(tokens):
        raise GenericSyntaxError(f"unexpected text in unit template {text!r}")
    variables = tuple(sorted({t[0][1:] for t in tokens if t[0]}))
    return GenericUnit(text, variables, node, _single_variable(text))


class _Parser:
    """product := power (('*'|'/') power)* ; power := atom (('^'|'**') exponent)? """

    def __init__(self, tokens, text):
        self.tokens, self.index, self.text = tokens, 0, text

    def _peek(self):
        return self.tokens[self.index] if self.index < len(self.tokens) else (None, None, None, None)

    def product(self):
        node = self.power()
        while self._peek()[3] in ("*", "/"):
            operator = self._peek()[3]
            self.index += 1
            right = self.power()
            node = _combine(node, right, operator == "/")
        return node

    def power(self):
        node = self.atom()
        if self._peek()[3] in ("^", "**"):
            self.index += 1
            node = _raise(node, self.exponent())
        return node

    def exponent(self) -> Fraction:
        variable, name, number, symbol = self._peek()
        sign = 1
        if symbol == "-":
            sign, self.index = -1, self.index + 1
            variable, name, number, symbol = self._peek()
        if number:
            self.index += 1
            return sign * Fraction(number)
        if symbol == "(":
            self.index += 1
            numerator = self.exponent()
            value = numerator
            if self._peek()[3] == "/":
                self.index += 1
                value = numerator / self.exponent()
            self._expect(")")
            return sign * value
        raise GenericSyntaxError(f"bad exponent in unit template {self.text!r}")

    def atom(self):
        variable, name, number, symbol = self._peek()
        self.index += 1
        if variable:
            key = variable[1:]
            return lambda bindings, lookup: bindings.get(key)
        if name:
            return lambda bindings, lookup: lookup(name)
        if number == "1":
            return lambda bindings, lookup: lookup("1")
        if symbol == "(":
            node = self.product()
            self._expect(")")
            return node
        raise GenericSyntaxError(f"unexpected token in unit template {self.text!r}")

    def _expect(self, symbol):
        if self._peek()[3] != symbol:
            raise GenericSyntaxError(f"expected {symbol!r} in unit template {self.text!r}")
        self.index += 1


def _combine(left, right, divide):
    def evaluate(bindings, lookup):
        a, b = left(bindings, lookup), right(bindings, lookup)
        if a is None or b is None:
            return None
        return quantity_product(a, b, divide)
    return evaluate


def _raise(base, exponent: Fraction):
    def evaluate(bindings, lookup):
        value = base(bindings, lookup)
        if value is None:
            return None
        return raise_quantity(value, exponent)
    return evaluate


def raise_quantity(value: Quantity, exponent: Fraction) -> Quantity:
    return Quantity(value.dimension ** exponent, power_scales(value.scales, float(exponent)),
                    (value, exponent), derived=True,  # the label is composed when shown
                    tolerance=value.tolerance * abs(float(exponent)), pint=value.pint)
