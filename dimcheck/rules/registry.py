"""The one registry of rule codes.

Selection, suppression, the rules command, the docs and the SARIF rule list are all
generated from this table, so they cannot disagree.
"""

from __future__ import annotations

from collections import namedtuple

ERROR = "error"
WARNING = "warning"
SEVERITY_RANK = {WARNING: 1, ERROR: 2}


# Records here and in finding.py, config.py and runner.py are named tuples and plain
# classes, not dataclasses or typing.NamedTuple: a run answered from the cache would
# spend a fifth of its time importing the dataclasses and typing modules.
class Rule(namedtuple("Rule", "code name severity summary")):
    """A rule code, its name, its severity (ERROR or WARNING) and a one-line summary."""

    __slots__ = ()


_RULES = (
    Rule("DIM101", "mixed-sum", ERROR,
         "a sum, difference, comparison, min/max/sum or branch choice combines different dimensions"),
    Rule("DIM102", "transcendental-arg", ERROR,
         "the argument of exp, log, trig, hyperbolic or a similar function is not dimensionless"),
    Rule("DIM103", "declared-mismatch", ERROR,
         "a value's dimension differs from the declared unit of the name, attribute or return it is bound to"),
    Rule("DIM104", "argument-mismatch", ERROR,
         "a call argument's dimension differs from the declared unit of its parameter"),
    Rule("DIM105", "dimensional-exponent", ERROR,
         "an exponent has a dimension, or a dimensional base is raised to a power that is not a constant"),
    Rule("DIM106", "impossible-conversion", ERROR,
         "a pint quantity is converted (.to, .ito, .m_as) to a unit of another dimension"),
    Rule("DIM107", "offset-calculus", ERROR,
         "arithmetic on a pint offset temperature (degC, degF) that pint refuses at run time"),
    Rule("DIM201", "scale-mismatch", WARNING,
         "the same dimension at a different scale (mm and m, kPa and Pa) is combined or bound with no conversion"),
    Rule("DIM202", "angle-scale", WARNING,
         "a value declared in degrees reaches a function that expects radians"),
    Rule("DIM203", "bare-number-in-sum", WARNING,
         "a non-zero bare number is added to or compared with a dimensional value"),
    Rule("DIM204", "offset-temperature", WARNING,
         "an absolute temperature on an offset scale (degC, degF) is added to another, used in a "
         "product, quotient or power, or bound to a kelvin declaration without conversion"),
    Rule("DIM205", "power-law-coefficient", WARNING,
         "a dimensional value is raised to an empirical non-integer power, so the law's "
         "coefficient carries hidden units"),
    Rule("DIM206", "docstring-mismatch", WARNING,
         "a unit written in a docstring contradicts the explicit declaration of the same parameter or return"),
    Rule("DIM901", "bad-unit", ERROR,
         "a declared unit expression cannot be parsed or is unknown"),
    Rule("DIM902", "unreadable-file", ERROR,
         "a file cannot be read or parsed"),
)

RULES: dict[str, Rule] = {rule.code: rule for rule in _RULES}


def matching_codes(selector: str) -> list[str]:
    """Codes named by a selector: a full code (``DIM101``) or a prefix (``DIM1``, ``DIM``)."""
    selector = selector.strip().upper()
    return [code for code in RULES if code.startswith(selector)]
