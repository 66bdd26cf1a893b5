"""Independent dimensionless groups of a set of variables (the Buckingham Pi theorem).

Given n variables with known dimensions, the *dimension matrix* has one row per base
dimension that occurs and one column per variable; entry (i, j) is the exponent of base
dimension i in variable j (an exact ``Fraction``). With r its rank, exactly n - r
independent products of powers of the variables are dimensionless: a basis of the
matrix's (rational) nullspace.

The basis is chosen the way engineers do it by hand, with *repeating variables*: r
dimensionally independent variables, and one group for each other variable, made of that
variable times powers of the repeating ones. The user may name the repeating variables;
otherwise they are picked greedily, in the order given, from every variable but the
first (the first is taken as the dependent quantity, so it appears in exactly one group,
``pi1``); the first is used as a repeating variable only if the others cannot reach rank r.

All arithmetic is exact (sympy rationals). sympy is imported inside the functions that
need it, never at module import, so that nothing on the checking path pays for it.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd, lcm
from typing import Iterable, Sequence

from ..inference.labels import power_text
from ..units.dimension import DIMENSIONLESS, Dimension


class GroupError(ValueError):
    """A problem with the user's input (one line, meant for the user)."""


@dataclass(frozen=True)
class Variable:
    name: str
    unit: str  # the unit text as written, for display
    dimension: Dimension


@dataclass(frozen=True)
class Group:
    name: str  # pi1, pi2, ...
    lead: str  # the non-repeating variable this group was built from
    exponents: tuple[tuple[str, Fraction], ...]  # non-zero exponents, lead first

    def as_dict(self) -> dict[str, Fraction]:
        return dict(self.exponents)

    def format(self) -> str:
        return " * ".join(power_text(name, power) for name, power in self.exponents)


@dataclass(frozen=True)
class GroupAnalysis:
    variables: tuple[Variable, ...]
    base_dimensions: tuple[str, ...]  # the rows of the matrix
    matrix: tuple[tuple[Fraction, ...], ...]  # rows x columns (variables)
    rank: int
    repeating: tuple[str, ...]
    groups: tuple[Group, ...]

    @property
    def n(self) -> int:
        return len(self.variables)

    @property
    def absent(self) -> tuple[str, ...]:
        """Variables that appear in no group (they cannot matter, dimensionally)."""
        used = {name for group in self.groups for name, _ in group.exponents}
        return tuple(v.name for v in self.variables if v.name not in used)


def dimension_matrix(variables: Sequence[Variable]) -> tuple[tuple[str, ...], tuple[tuple[Fraction, ...], ...]]:
    """The base dimensions that occur (in SI order, then others by name) and the matrix."""
    names = {base for v in variables for base, _ in v.dimension.exponents}
    # Dimension sorts its bases in the canonical order; borrow that ordering.
    bases = tuple(base for base, _ in Dimension((base, Fraction(1)) for base in names).exponents)
    rows = tuple(
        tuple(v.dimension.as_dict().get(base, Fraction(0)) for v in variables) for base in bases
    )
    return bases, rows


def group_dimension(exponents: Iterable[tuple[str, Fraction]], variables: Sequence[Variable]) -> Dimension:
    """Multiply out the dimension of a product of powers of the variables."""
    by_name = {v.name: v.dimension for v in variables}
    result = DIMENSIONLESS
    for name, power in exponents:
        result = result * (by_name[name] ** power)
    return result


def _to_fraction(value) -> Fraction:
    import sympy

    value = sympy.nsimplify(value) if not isinstance(value, sympy.Rational) else value
    if not isinstance(value, sympy.Rational):  # cannot happen for a rational matrix
        raise RuntimeError(f"non-rational exponent {value}")
    return Fraction(int(value.p), int(value.q))


def _sympy_matrix(rows: Sequence[Sequence[Fraction]], columns: Sequence[int]):
    import sympy

    return sympy.Matrix([[sympy.Rational(row[j].numerator, row[j].denominator) for j in columns]
                         for row in rows])


def _scaled(vector: list[Fraction], lead: int, integer: bool) -> list[Fraction]:
    """Smallest integers with the same ratios (if ``integer``), positive on the lead variable."""
    if integer:
        factor = lcm(*(x.denominator for x in vector))
        vector = [x * factor for x in vector]
        divisor = 0
        for x in vector:
            divisor = gcd(divisor, x.numerator)
        if divisor > 1:
            vector = [x / divisor for x in vector]
    if vector[lead] < 0:
        vector = [-x for x in vector]
    return vector


def find_groups(variables: Sequence[Variable], repeating: Sequence[str] | None = None,
                integer: bool = True) -> GroupAnalysis:
    """The n - r independent dimensionless groups of ``variables``.

    ``repeating`` names the repeating variables (exactly r of them, dimensionally
    independent); without it they are chosen as the module docstring says. With
    ``integer`` (the default) each group's exponents are scaled to the smallest
    integers; otherwise the group's own variable keeps exponent 1 and the others are
    exact fractions. Raises ``GroupError`` for bad input.
    """
    variables = tuple(variables)
    if not variables:
        raise GroupError("no variables given")
    seen: set[str] = set()
    for v in variables:
        if v.name in seen:
            raise GroupError(f"variable '{v.name}' is given more than once")
        seen.add(v.name)
    bases, rows = dimension_matrix(variables)
    n = len(variables)
    index = {v.name: j for j, v in enumerate(variables)}

    if not bases:  # every variable is dimensionless: each is a group by itself
        rank = 0
        if repeating:
            raise GroupError(f"--repeat names {len(repeating)} variable(s) but every variable is "
                             f"dimensionless (rank 0): name none")
        chosen: tuple[int, ...] = ()
        vectors = [[Fraction(int(k == j)) for k in range(n)] for j in range(n)]
        leads = list(range(n))
    else:
        rank = int(_sympy_matrix(rows, range(n)).rank())
        if repeating is None:
            chosen, leads, vectors = _by_nullspace(rows, n, rank)
        else:
            chosen, leads, vectors = _by_repeating(rows, variables, index, rank, repeating)

    groups = []
    order = sorted(range(len(leads)), key=lambda k: leads[k])
    for number, k in enumerate(order, start=1):
        lead = leads[k]
        vector = _scaled(vectors[k], lead, integer)
        exponents = [(variables[lead].name, vector[lead])]
        exponents += [(variables[j].name, vector[j]) for j in range(n) if j != lead and vector[j]]
        groups.append(Group(f"pi{number}", variables[lead].name, tuple(exponents)))

    analysis = GroupAnalysis(variables, bases, rows, rank,
                             tuple(variables[j].name for j in sorted(chosen)), tuple(groups))
    verify(analysis)
    return analysis


def _by_nullspace(rows, n: int, rank: int):
    """Groups from sympy's exact nullspace, columns ordered so that the pivots (the
    repeating variables) are picked from the second variable on, the first last."""
    columns = list(range(1, n)) + [0]
    matrix = _sympy_matrix(rows, columns)
    _, pivots = matrix.rref()
    chosen = tuple(columns[p] for p in pivots)
    if len(chosen) != rank:
        raise RuntimeError("pivot count differs from the rank")
    leads, vectors = [], []
    for basis in matrix.nullspace():
        values = [_to_fraction(x) for x in basis]
        vector = [Fraction(0)] * n
        for position, column in enumerate(columns):
            vector[column] = values[position]
        # sympy puts 1 on one free (non-pivot) column and 0 on the others
        free = [j for j in range(n) if j not in chosen and vector[j]]
        if len(free) != 1:
            raise RuntimeError("a nullspace vector does not have exactly one free variable")
        leads.append(free[0])
        vectors.append(vector)
    return chosen, leads, vectors


def _by_repeating(rows, variables, index, rank: int, repeating: Sequence[str]):
    """One group per non-repeating variable: solve R x = -a_j exactly for the powers x of
    the repeating variables (R: their columns, a_j: the variable's column)."""
    names = [name.strip() for name in repeating]
    unknown = [name for name in names if name not in index]
    if unknown:
        known = ", ".join(v.name for v in variables)
        raise GroupError(f"--repeat: no variable named {', '.join(repr(u) for u in unknown)} "
                         f"(variables: {known})")
    if len(set(names)) != len(names):
        raise GroupError("--repeat names a variable more than once")
    if len(names) != rank:
        raise GroupError(f"--repeat names {len(names)} variable(s) but the dimension matrix has "
                         f"rank {rank}: name exactly {rank} dimensionally independent variables")
    chosen = tuple(index[name] for name in names)
    repeat_matrix = _sympy_matrix(rows, chosen)
    if repeat_matrix.rank() != rank:
        raise GroupError(f"--repeat: {', '.join(names)} are not dimensionally independent "
                         f"(their rank is {repeat_matrix.rank()}, need {rank}); "
                         f"a dimensionless variable can never repeat")
    n = len(variables)
    leads, vectors = [], []
    for j in range(n):
        if j in chosen:
            continue
        target = -_sympy_matrix(rows, [j])
        solution, free = repeat_matrix.gauss_jordan_solve(target)
        if free.shape[0]:  # cannot happen: R has full column rank
            raise RuntimeError("repeating variables do not give a unique solution")
        vector = [Fraction(0)] * n
        vector[j] = Fraction(1)
        for position, column in enumerate(chosen):
            vector[column] = _to_fraction(solution[position])
        leads.append(j)
        vectors.append(vector)
    return chosen, leads, vectors


def verify(analysis: GroupAnalysis) -> None:
    """Check before anything is printed: each group is dimensionless, there are n - r of
    them, and they are independent. A failure is a bug of ours (RuntimeError)."""
    for group in analysis.groups:
        left = group_dimension(group.exponents, analysis.variables)
        if not left.is_dimensionless:
            raise RuntimeError(f"{group.name} = {group.format()} has dimension {left.format()}")
    expected = analysis.n - analysis.rank
    if len(analysis.groups) != expected:
        raise RuntimeError(f"{len(analysis.groups)} groups found, n - r = {expected}")
    if analysis.groups:
        import sympy

        names = [v.name for v in analysis.variables]
        exponent_rows = [[sympy.Rational(g.as_dict().get(name, Fraction(0)).numerator,
                                         g.as_dict().get(name, Fraction(0)).denominator)
                          for name in names] for g in analysis.groups]
        if sympy.Matrix(exponent_rows).rank() != expected:
            raise RuntimeError("the groups found are not independent")


def exponent_json(power: Fraction) -> int | str:
    return power.numerator if power.denominator == 1 else f"{power.numerator}/{power.denominator}"


def to_json(analysis: GroupAnalysis) -> dict:
    return {
        "variables": [v.name for v in analysis.variables],
        "units": {v.name: v.unit for v in analysis.variables},
        "dimensions": {v.name: v.dimension.format() for v in analysis.variables},
        "base_dimensions": list(analysis.base_dimensions),
        "matrix": [[exponent_json(x) for x in row] for row in analysis.matrix],
        "n": analysis.n,
        "rank": analysis.rank,
        "repeating": list(analysis.repeating),
        "groups": [{"name": g.name, "exponents": {name: exponent_json(p) for name, p in g.exponents}}
                   for g in analysis.groups],
    }


def to_text(analysis: GroupAnalysis, show_matrix: bool = False) -> str:
    lines = []
    if show_matrix:
        lines.extend(_matrix_lines(analysis))
    if analysis.repeating:
        lines.append(f"repeating: {', '.join(analysis.repeating)}")
    for group in analysis.groups:
        lines.append(f"{group.name} = {group.format()}")
    if not analysis.groups:
        lines.append("no dimensionless group: the variables are dimensionally independent")
    absent = analysis.absent
    if absent and analysis.groups:
        lines.append(f"in no group: {', '.join(absent)}")
    lines.append(f"n = {analysis.n}, r = {analysis.rank}, groups = {len(analysis.groups)}")
    return "\n".join(lines) + "\n"


def _matrix_lines(analysis: GroupAnalysis) -> list[str]:
    symbols = {base: Dimension.base(base).format() for base in analysis.base_dimensions}
    header = [""] + [v.name for v in analysis.variables]
    body = [[symbols[base]] + [_cell(x) for x in row]
            for base, row in zip(analysis.base_dimensions, analysis.matrix)]
    table = [header] + body
    widths = [max(len(row[k]) for row in table) for k in range(len(header))]
    lines = []
    for row in table:
        cells = [row[0].ljust(widths[0])] + [cell.rjust(widths[k]) for k, cell in enumerate(row) if k]
        lines.append("  ".join(cells).rstrip())
    return lines


def _cell(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"
