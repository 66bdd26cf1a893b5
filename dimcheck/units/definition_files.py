"""pint definition files named by the configuration (``units``), loaded into pint's
registry with care: only when the unit table is built, never on a warm run.

A definition file is the user's text, and pint evaluates its numbers with Python's own
arithmetic: ``10**10**10`` never returns, ``0 * m`` divides by zero later, a unit built on
units built on units can make pint walk billions of paths. So the text is scanned first
(bounded exponents, no power of a power, no @import cycle), the file is fed to pint one
definition at a time so that an error names its line, and each new unit's scale is worked
out in floats before pint resolves it. Every problem is one ``UnitError`` line naming the
file, which the command line reports as a configuration error (exit code 2).
"""

from __future__ import annotations

import math
import os
import re
import stat
from pathlib import Path
from typing import Sequence

from .errors import UnitError
from .table_key import MAX_IMPORTS as _MAX_IMPORTS


def load_definition_file(registry, path: Path) -> None:
    """Add one user definition file to ``registry``; any problem is a one-line ``UnitError``
    that names the file (and the line, when it is known)."""
    # pint evaluates the numbers of a definition with Python's own arithmetic and follows
    # @import without limit, so some text must never reach it (10**10**10 never returns).
    _scan_definition_file(path)
    units_before = dict(registry._units)
    prefixes_before = dict(registry._prefixes)
    known = set(registry._units)
    try:
        file_of = _feed_pint(registry, path)
        # Then check what the file defined (or redefined) before pint resolves any of it.
        changed = sorted({definition.name for spelling, definition in registry._units.items()
                          if units_before.get(spelling) is not definition})
        for spelling, prefix in registry._prefixes.items():
            if prefixes_before.get(spelling) is not prefix:
                factor = _as_float(prefix.converter.scale)
                if factor == 0.0 or not math.isfinite(factor):
                    raise _file_error(file_of.get(id(prefix), path), _bad_scale(f"prefix '{spelling}-'", factor),
                                      getattr(prefix, "start_line", None), getattr(prefix, "raw", None))
        _check_unit_graph(registry, changed, path, file_of)
    except UnitError:
        raise
    except Exception as error:  # pint raises many kinds; all mean "bad file"
        raise _located_error(error, path) from None
    # pint resolves definitions lazily; resolve the new ones now so that a unit
    # built on an undefined name is reported against this file.
    for name in sorted(set(registry._units) - known):
        try:
            registry.get_base_units(name)
            exponents = dict(registry.get_dimensionality(name)).values()
        except Exception as error:
            raise _file_error(path, f"unit '{name}': {_reason(error)}") from None
        if not all(math.isfinite(float(exponent)) for exponent in exponents):
            raise _file_error(path, f"unit '{name}' has an exponent that is not a finite number")


# Bounds on a definition file, far beyond what real definitions use (pint's own longest
# line has 133 characters, its largest exponent is 80, its deepest unit 117 paths down).
_MAX_LINE_LENGTH = 1000
_MAX_DEFINITION_EXPONENT = 999
_MAX_UNIT_PATHS = 10_000

_POWER_OPERATORS = ("**", "^")
# Operators, parentheses, numbers (1, 2.5, .5, 1e-3), names (Unicode letters, no digit
# first) and any other single character: enough to find powers and their operands.
_DEFINITION_TOKEN = re.compile(r"\*\*|\^|[()]|(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?|[^\W\d]\w*|\S")


def _scan_definition_file(path: Path, importers: tuple[str, ...] = (), budget: list[int] | None = None) -> None:
    """Reject text that pint cannot evaluate in bounded time, before pint reads it: over-long
    lines, huge exponents, powers of powers, and @import cycles or non-regular files."""
    budget = [_MAX_IMPORTS] if budget is None else budget
    try:
        text = path.read_bytes().decode("utf-8")
    except UnicodeDecodeError as error:
        line = error.object[: error.start].count(b"\n") + 1
        raise _file_error(path, "the file is not UTF-8 text", line) from None
    except OSError as error:
        raise _file_error(path, f"cannot read it: {error.strerror or error}") from None
    here = os.path.realpath(path)
    for number, line in enumerate(text.split("\n"), start=1):
        code = line.split("#", 1)[0]
        problem = _hostile_definition_line(code)
        if problem:
            raise _file_error(path, problem, number, code)
        if code.strip().startswith("@import"):
            target = code.strip()[len("@import"):].strip()
            if target and not Path(target).is_absolute():  # pint itself refuses absolute paths
                _scan_import(path.parent / target, (*importers, here), budget, path, number, code)


def _scan_import(target: Path, importers: tuple[str, ...], budget: list[int], path: Path, number: int, code: str):
    """Check one @import target (a regular file, not already being read) and scan it."""
    budget[0] -= 1
    if budget[0] < 0:
        raise _file_error(path, f"more than {_MAX_IMPORTS} @import statements in all", number, code)
    if os.path.realpath(target) in importers:
        raise _file_error(path, f"importing {target} again makes an @import cycle", number, code)
    try:
        is_regular = stat.S_ISREG(os.stat(target).st_mode)  # stat, never open: a FIFO would block
    except OSError as error:
        raise _file_error(path, f"cannot read imported file {target}: {error.strerror or error}", number, code) from None
    if not is_regular:
        raise _file_error(path, f"imported {target} is not a regular file", number, code)
    _scan_definition_file(target, importers, budget)


def _hostile_definition_line(code: str) -> str | None:
    """Why pint must not evaluate this line, or ``None``. A bounded look at the tokens
    around each power: exponents are small numbers (or a parenthesised fraction of them),
    and a power is never raised again (``10**10**10``, ``(10**999)**999``), so no number
    pint computes from one line can have more than a few million digits."""
    if len(code) > _MAX_LINE_LENGTH:
        return f"the line is longer than {_MAX_LINE_LENGTH} characters"
    tokens = _DEFINITION_TOKEN.findall(code)
    partner = _matching_parentheses(tokens)
    chained = "a power of a power (such as 10**10**10), which pint cannot evaluate in bounded time"
    for index, token in enumerate(tokens):
        if token not in _POWER_OPERATORS:
            continue
        # The base: a group may hold powers of unit names (pint keeps those symbolic),
        # but not of numbers or of other groups.
        if index > 0 and tokens[index - 1] == ")" and index - 1 in partner:
            for inner in range(partner[index - 1] + 1, index - 1):
                if tokens[inner] in _POWER_OPERATORS and (_is_number(tokens[inner - 1]) or tokens[inner - 1] == ")"):
                    return chained
        # The exponent: signs, then a number, a parenthesised group or a name.
        start = index + 1
        while start < len(tokens) and tokens[start] in ("+", "-"):
            start += 1
        if start >= len(tokens):
            continue  # a dangling operator: pint reports it
        if _is_number(tokens[start]):
            if not float(tokens[start]) <= _MAX_DEFINITION_EXPONENT:  # also false for inf and nan
                return f"exponent {tokens[start]} is too large (at most {_MAX_DEFINITION_EXPONENT})"
            end = start + 1
        elif tokens[start] == "(" and start in partner:
            group = tokens[start + 1: partner[start]]
            if any(item in _POWER_OPERATORS for item in group):
                return chained
            # The group's value is at most the product of its numbers (or their inverses).
            bound = 1.0
            for item in group:
                if _is_number(item) and float(item):
                    bound *= max(abs(float(item)), 1 / abs(float(item)))
            if not bound <= _MAX_DEFINITION_EXPONENT:
                return f"exponent ({' '.join(group)}) may be too large (at most {_MAX_DEFINITION_EXPONENT})"
            end = partner[start] + 1
        else:
            end = start + 1
        if end < len(tokens) and tokens[end] in _POWER_OPERATORS:
            return chained
    return None


def _is_number(token: str) -> bool:
    # isdecimal, not isdigit: "²" is a digit to isdigit but not a number to float()
    return token[0].isdecimal() or (token[0] == "." and len(token) > 1)


def _matching_parentheses(tokens: list[str]) -> dict[int, int]:
    """Index of each matched parenthesis to its partner (unmatched ones are left out)."""
    partner: dict[int, int] = {}
    open_at: list[int] = []
    for index, token in enumerate(tokens):
        if token == "(":
            open_at.append(index)
        elif token == ")" and open_at:
            start = open_at.pop()
            partner[start], partner[index] = index, start
    return partner


def _feed_pint(registry, path: Path) -> dict[int, Path]:
    """pint's ``load_definitions``, step by step, so that an error names its file and line.
    Returns the file each definition came from, by ``id`` of the definition."""
    parser = getattr(registry, "_def_parser", None)
    try:
        import flexparser  # pint's own parser library (pint 0.24 and later)
    except ImportError:
        flexparser = None
    if parser is None or flexparser is None or not hasattr(registry, "_helper_dispatch_adder"):
        registry.load_definitions(str(path))  # a pint laid out otherwise: no line numbers
        return {}

    parsed = parser.parse_file(str(path))
    # The first line pint could not parse, with the file it is in (an @import switches it).
    where = path
    file_of: dict[int, Path] = {}
    for statement in parsed.iter_blocks():
        if isinstance(statement, flexparser.BOF):
            where = Path(str(statement.path))
            continue
        file_of[id(statement)] = where
        if isinstance(statement, flexparser.ParsingError):
            raise _located_error(statement, where)
    for definition in parser.iter_parsed_project(parsed):
        try:
            registry._helper_dispatch_adder(definition)
        except Exception as error:  # the line is the definition's, the reason the error's
            raise _file_error(file_of.get(id(definition), path), _reason(error),
                              getattr(definition, "start_line", None), getattr(definition, "raw", None)) from None
    return file_of


def _check_unit_graph(registry, names: Sequence[str], path: Path, file_of: dict[int, Path]) -> None:
    """Check the units a file defined before pint resolves them: each scale a finite non-zero
    number, no unit defined through itself, and no unit reached by so many paths through
    others that pint's unmemoised walk (and its exact integer powers) would never end.

    Scales are followed in floats, which overflow at once where pint's integers grow
    without limit (``a = 10**300 * m``, ``b = a**999``, ``c = b**999``)."""
    memo: dict[str, tuple[float, int]] = {}
    active: set[str] = set()

    def error_at(key: str, detail: str) -> UnitError:
        """The error, at the file and line that define ``key`` when pint recorded them."""
        definition = registry._units.get(key)
        return _file_error(file_of.get(id(definition), path), detail,
                           getattr(definition, "start_line", None), getattr(definition, "raw", None))

    def visit(key: str) -> tuple[float, int]:
        if key in memo:
            return memo[key]
        if key in active:
            raise error_at(key, f"unit '{key}' is defined in terms of itself")
        active.add(key)
        scale, paths, references = 1.0, 1, {}
        if key.startswith("["):
            definition = registry._dimensions.get(key)
            if definition is not None and not definition.is_base:
                references = dict(definition.reference or {})
        else:
            definition = registry._units[key]
            scale = _as_float(getattr(definition.converter, "scale", 1))
            offset = _as_float(getattr(definition.converter, "offset", 0))
            if not math.isfinite(offset):
                raise error_at(key, f"unit '{key}' has an offset that is not a finite number")
            if not definition.is_base:
                references = dict(definition.reference or {})
        for reference, exponent in references.items():
            if not reference.startswith("["):
                try:
                    reference = registry.get_name(reference)
                except Exception:
                    raise error_at(key, f"unit '{key}' is built on '{reference}', which is not a unit") from None
            reference_scale, reference_paths = visit(reference)
            scale *= _power(reference_scale, exponent)
            paths += reference_paths
            if paths > _MAX_UNIT_PATHS:
                raise error_at(key, f"unit '{key}' is built on other units more than "
                                    f"{_MAX_UNIT_PATHS} ways deep, which pint cannot resolve in bounded time")
        active.discard(key)
        memo[key] = (scale, paths)
        return memo[key]

    try:
        for name in names:
            scale = visit(name)[0]
            if scale == 0.0 or not math.isfinite(scale):
                raise error_at(name, _bad_scale(f"unit '{name}'", scale))
    except RecursionError:
        raise _file_error(path, "unit definitions nest too deeply") from None


def _as_float(number) -> float:
    """A pint scale as a float; an integer too large for one is infinite."""
    try:
        return float(number)
    except OverflowError:
        return math.inf


def _power(base: float, exponent) -> float:
    try:
        result = base ** float(exponent)
    except OverflowError:
        return math.inf
    except ZeroDivisionError:  # zero to a negative power
        return math.inf
    return result if isinstance(result, float) else math.nan  # complex: a negative base


def _bad_scale(what: str, scale: float) -> str:
    """Why a scale is refused: a zero, infinite or NaN scale makes every conversion through
    the unit meaningless (or a division by zero later). Negative scales stay allowed:
    pint's own constants have them (electron_g_factor)."""
    described = "zero" if scale == 0 else "infinite" if math.isinf(scale) else "NaN"
    return f"{what} has a scale that is {described}; a scale must be a finite non-zero number"


def _file_error(path, detail: str, line: int | None = None, text: str | None = None) -> UnitError:
    where = f"{path}, line {line}" if line else f"{path}"
    shown = " ".join((text or "").split())
    if shown:
        where += f" ({shown[:60] + '...' if len(shown) > 60 else shown})"
    return UnitError(f"cannot load unit definitions from {where}: {detail}")


def _located_error(error: Exception, path: Path) -> UnitError:
    """A pint error as a one-line ``UnitError``, with the file and line pint gives, if any."""
    location = getattr(error, "location", None)
    line = getattr(error, "start_line", None) if hasattr(error, "raw") else None
    return _file_error(Path(location) if location else path, _reason(error), line, getattr(error, "raw", None))


def _reason(error: Exception) -> str:
    """What went wrong, in words a user can act on; pint's internal errors become a plain
    "not a definition pint can use"."""
    kind = type(error).__name__
    if isinstance(error, RecursionError):
        return "definitions nest too deeply for pint to resolve"
    if kind == "UnhandledParsingError":  # pint failed inside the line (1/0, m/, ...)
        inner = getattr(error, "exception", None)
        if isinstance(inner, (ArithmeticError, ValueError)) and str(inner):
            return f"not a valid definition ({_one_line(inner)})"
        return "not a valid definition"
    if kind == "UnknownStatement":
        return "not a valid definition"
    message = getattr(error, "msg", None)
    if isinstance(message, str):  # pint's DefinitionSyntaxError: its str adds position lines
        if message.startswith("UnexpectedEOS"):
            return "a block (@group, @context, @system, @defaults) is not closed with @end"
        return " ".join(message.split())[:200]
    if type(error).__module__.startswith("pint") or isinstance(error, (ValueError, ArithmeticError, OSError)):
        return _one_line(error)
    return "not a definition pint can use"


def _one_line(error: Exception) -> str:
    text = " ".join(str(error).split())
    return text[:200] or type(error).__name__
