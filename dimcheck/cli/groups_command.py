"""``dimcheck groups``: the independent dimensionless groups of a set of variables.

    dimcheck groups NAME=UNIT [NAME=UNIT ...] [options]
    dimcheck groups --function FILE::FUNCTION [options]

The second form reads the declared units of a function's parameters and return value
from the file, statically (the file is parsed, never imported or run). See docs/groups.md.

sympy is imported only when this command runs (through dimcheck.analysis.pi_groups).
"""

from __future__ import annotations

import json
import sys

from .errors import UsageError

EXIT_OK, EXIT_TROUBLE = 0, 2
RETURN_NAME = "return"


def register(commands) -> None:
    """Add the ``groups`` subcommand to the subparsers object of ``build_parser``."""
    groups = commands.add_parser(
        "groups", help="list the independent dimensionless groups of some variables (Buckingham Pi)",
        description="List n - r independent dimensionless groups of n variables whose dimension "
                    "matrix has rank r.")
    groups.add_argument("pairs", nargs="*", metavar="NAME=UNIT",
                        help="a variable and its unit, such as rho=kg/m^3 (quote units with * or spaces)")
    groups.add_argument("--function", metavar="FILE::FUNCTION", dest="function",
                        help="read the variables from the declared parameters and return of a function "
                             "(FUNCTION may be Class.method); the return value is the variable 'return'")
    groups.add_argument("--repeat", metavar="NAMES",
                        help="comma-separated repeating variables (exactly r, dimensionally independent)")
    groups.add_argument("--format", choices=("text", "json"), default="text")
    groups.add_argument("--fractions", action="store_true",
                        help="keep exponent 1 on each group's own variable and show fractional "
                             "exponents on the others, instead of scaling to small integers")
    groups.add_argument("--matrix", action="store_true", help="also print the dimension matrix (text format)")
    groups.add_argument("--skip-undeclared", action="store_true",
                        help="with --function: leave out parameters (and a return) with no declared unit "
                             "instead of stopping")
    groups.add_argument("--config", metavar="FILE",
                        help="a pyproject.toml or TOML file for extra units, base dimensions and stubs")


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


def run(args) -> int:
    from ..analysis.pi_groups import GroupError  # sympy is not imported by this
    from ..units import UnitError
    from .config import ConfigError

    try:
        return _run(args)
    except (UsageError, GroupError, UnitError, ConfigError) as error:
        print(f"dimcheck: error: {_one_line(error)}", file=sys.stderr)
        return EXIT_TROUBLE


def _run(args) -> int:
    from ..units import load_unit_table
    from .config import load_config

    if args.function and args.pairs:
        raise UsageError("give either NAME=UNIT pairs or --function, not both")
    if not args.function and not args.pairs:
        raise UsageError("give NAME=UNIT pairs (such as L=m t=s) or --function FILE::FUNCTION")
    if args.skip_undeclared and not args.function:
        raise UsageError("--skip-undeclared applies only with --function")
    repeat = _repeat_names(args.repeat)
    # Check the pairs' shape before loading anything, so that typos fail fast.
    pairs = [_split_pair(text) for text in args.pairs]
    config = load_config(args.config)
    table = load_unit_table(config.units, config.base_dimensions)
    if args.function:
        variables = _function_variables(args.function, config, table, args.skip_undeclared)
    else:
        variables = _pair_variables(pairs, table)

    from ..analysis.pi_groups import find_groups, to_json, to_text

    analysis = find_groups(variables, repeat, integer=not args.fractions)
    if args.format == "json":
        sys.stdout.write(json.dumps(to_json(analysis), indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(to_text(analysis, show_matrix=args.matrix))
    return EXIT_OK


def _repeat_names(text: str | None) -> list[str] | None:
    if text is None:
        return None
    names = [part.strip() for part in text.split(",")]
    if not any(names):
        return []
    if not all(names):
        raise UsageError(f"--repeat: empty name in '{text}' (write names separated by commas)")
    return names


def _split_pair(text: str) -> tuple[str, str]:
    name, equals, unit = text.partition("=")
    name = name.strip()
    if not equals:
        raise UsageError(f"expected NAME=UNIT, got '{text}'")
    if not name.isidentifier():
        raise UsageError(f"bad variable name '{name}' in '{text}' (use a name like rho or c_p)")
    if not unit.strip():
        raise UsageError(f"no unit for '{name}' in '{text}' (write {name}=1 for a dimensionless variable)")
    return name, unit.strip()


def _pair_variables(pairs, table):
    from ..analysis.pi_groups import Variable
    from ..units import UnitError, parse_unit

    variables, seen = [], set()
    for name, unit_text in pairs:
        if name in seen:
            raise UsageError(f"variable '{name}' is given more than once")
        seen.add(name)
        try:
            unit = parse_unit(unit_text, table)
        except UnitError as error:
            raise UsageError(f"DIM901 bad unit for '{name}': {error}") from None
        variables.append(Variable(name, unit_text, unit.dimension))
    return variables


def _split_target(target: str) -> tuple[str, str]:
    path, separator, function = target.rpartition("::")
    if not separator or not path or not function:
        raise UsageError(f"--function: expected FILE::FUNCTION, got '{target}'")
    return path, function.strip()


def _function_variables(target: str, config, table, skip_undeclared: bool):
    """The declared parameters and return of a function, read statically from its file."""
    from ..analysis.pi_groups import Variable
    from ..declarations.annotations import AliasRef, UnitText
    from ..inference.engine import Engine
    from ..inference.project import Project
    from ..inference.values import Quantity, TupleValue
    from ..units import UnitError, parse_unit

    path, qualname = _split_target(target)
    project = Project(config.stubs, project_dir=config.base_dir)
    loaded = project.load(path)
    if loaded.symbols is None:
        error = loaded.error
        where = f"{path}:{error.line}" if error.line > 1 else path
        raise UsageError(f"{where}: {error.message}")
    module = loaded.symbols
    function = _find_function(module, qualname, path)
    engine = Engine(project, table)

    entries = []  # (variable name, spec, what for messages)
    entries.append((RETURN_NAME, function.return_spec, f"the return value of '{qualname}'"))
    params = list(function.params)
    if function.owner is not None and not function.is_static and params and params[0].spec is None:
        params = params[1:]  # self or cls
    for param in params:
        entries.append((param.name, param.spec, f"parameter '{param.name}' of '{qualname}'"))

    variables, skipped = [], []
    for name, spec, what in entries:
        if spec is None:
            if skip_undeclared:
                skipped.append(name)
                continue
            raise UsageError(f"{what} has no declared unit (declare one, or pass --skip-undeclared)")
        value = engine.declared(module, spec)
        if value is None:
            if isinstance(spec, UnitText):
                try:  # the same message a DIM901 finding would carry
                    parse_unit(spec.text.strip(), table)
                except UnitError as error:
                    line = getattr(spec.node, "lineno", function.line)
                    raise UsageError(f"{path}:{line}: DIM901 bad unit for {what}: {error}") from None
                raise UsageError(f"cannot read the unit '{spec.text}' of {what}")
            shown = ".".join(spec.parts) if isinstance(spec, AliasRef) else str(spec)
            if skip_undeclared:
                skipped.append(name)
                continue
            raise UsageError(f"{what} is annotated with '{shown}', which does not resolve to a unit "
                                   f"(declare one, or pass --skip-undeclared)")
        if isinstance(value, TupleValue):  # tuple[Annotated[...], ...]: several values, not one
            if skip_undeclared:
                skipped.append(name)
                continue
            raise UsageError(f"{what} is a tuple of several units; give the variables as NAME=UNIT "
                             f"instead, or pass --skip-undeclared")
        if not isinstance(value, Quantity) or value.dimension is None:
            raise UsageError(f"{what} has a unit that depends on other arguments "
                                   f"('{getattr(value, 'text', '')}'); "
                                   f"give the variables as NAME=UNIT instead")
        unit_text = spec.text if isinstance(spec, UnitText) else (value.label or ".".join(spec.parts))
        variables.append(Variable(name, unit_text.strip() or "1", value.dimension))
    if skipped:
        print(f"dimcheck: note: left out (no declared unit): {', '.join(skipped)}", file=sys.stderr)
    if not variables:
        raise UsageError(f"'{qualname}' declares no units")
    return variables


def _find_function(module, qualname: str, path: str):
    owner_name, dot, name = qualname.rpartition(".")
    if dot:
        cls = module.classes.get(owner_name)
        if cls is None:
            raise UsageError(f"no class '{owner_name}' at the top level of {path}")
        method = cls.methods.get(name)
        if method is None:
            raise UsageError(f"no method '{name}' in class '{owner_name}' of {path}")
        return method
    function = module.functions.get(qualname)
    if function is None:
        available = sorted(module.functions)
        hint = f" (functions: {', '.join(available[:12])}{', ...' if len(available) > 12 else ''})" \
            if available else " (it defines no top-level function)"
        raise UsageError(f"no function '{qualname}' at the top level of {path}{hint}")
    return function
