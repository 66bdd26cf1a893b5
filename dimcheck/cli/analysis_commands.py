"""``dimcheck explain`` and ``dimcheck coverage``: commands that help users read and grow
their declarations. Each registers its subparser and runs from parsed arguments."""

from __future__ import annotations

import json
import sys

from .config import load_config
from .errors import UsageError

EXIT_OK, EXIT_BELOW, EXIT_TROUBLE = 0, 1, 2


def add_explain(commands) -> None:
    explain = commands.add_parser(
        "explain", help="show how the dimension of each part of a line was found",
        description="Print, as a tree, the unit and dimension of every expression on a line and "
                    "the declarations they came from.")
    explain.add_argument("location", metavar="FILE:LINE[:COL]")
    explain.add_argument("--config", metavar="FILE")


def add_coverage(commands) -> None:
    coverage = commands.add_parser(
        "coverage", help="report how much of the code has known units",
        description="Per file and in total: the share of numeric expressions whose dimension is "
                    "known, and of functions whose signature is fully declared.")
    coverage.add_argument("paths", nargs="*", metavar="PATH")
    coverage.add_argument("--format", choices=("text", "json"), default="text")
    coverage.add_argument("--fail-under", type=float, default=None, metavar="PERCENT",
                          help="exit 1 when the total share of known expressions is below PERCENT")
    coverage.add_argument("--config", metavar="FILE")


def add_declarations(commands) -> None:
    listing = commands.add_parser(
        "declarations", help="list every declared unit and where it came from",
        description="List the units declared in the code (annotations, comments, docstrings, name "
                    "patterns) with their source: the adoption report for docstring and name units.")
    listing.add_argument("paths", nargs="*", metavar="PATH")
    listing.add_argument("--format", choices=("text", "json"), default="text")
    listing.add_argument("--sources", metavar="KINDS",
                         help="only these sources, comma-separated: annotation, comment, docstring, name")
    listing.add_argument("--assume-on", action="store_true",
                         help="read docstrings and the shipped name suffixes even where the configuration "
                              "has them off, to see what turning them on would declare")
    listing.add_argument("--config", metavar="FILE")


def run_explain(args) -> int:
    from ..analysis.explain import ExplainError, explain, parse_target

    try:
        lines = explain(parse_target(args.location), load_config(args.config))
    except ExplainError as error:
        raise UsageError(str(error)) from None
    print("\n".join(lines))
    return EXIT_OK


def run_coverage(args) -> int:
    from ..analysis.coverage import measure

    if args.fail_under is not None and not 0 <= args.fail_under <= 100:
        raise UsageError("--fail-under takes a percentage from 0 to 100")
    config = load_config(args.config)
    report = measure(args.paths or config.paths or ["."], config)
    total = report.total()
    if args.format == "json":
        rows = [{"path": item.path, "expressions": item.expressions, "known": item.known,
                 "expression_share": round(item.expression_share, 1), "functions": item.functions,
                 "declared_functions": item.declared_functions,
                 "function_share": round(item.function_share, 1)} for item in report.files + [total]]
        print(json.dumps({"files": rows[:-1], "total": rows[-1], "unreadable": report.unreadable}, indent=2))
    else:
        width = max([len(item.path) for item in report.files] + [5])
        print(f"{'file':<{width}}  {'known expressions':>22}  {'declared functions':>22}")
        for item in report.files + [total]:
            print(f"{item.path:<{width}}  {item.known:>6}/{item.expressions:<6} {item.expression_share:6.1f}%"
                  f"  {item.declared_functions:>6}/{item.functions:<6} {item.function_share:6.1f}%")
        for path in report.unreadable:
            print(f"{path}: unreadable (see dimcheck check)", file=sys.stderr)
    if args.fail_under is not None and total.expression_share < args.fail_under:
        return EXIT_BELOW
    return EXIT_OK


_SOURCES = {"annotation", "comment", "docstring", "name"}


def run_declarations(args) -> int:
    from ..analysis.declarations_report import collect

    wanted = None
    if args.sources:
        wanted = {part.strip() for part in args.sources.split(",") if part.strip()}
        unknown = wanted - _SOURCES
        if unknown:
            raise UsageError(f"--sources: unknown source {sorted(unknown)[0]!r} "
                               f"(known: {', '.join(sorted(_SOURCES))})")
    config = load_config(args.config)
    found, errors = collect(args.paths or config.paths or ["."], config, args.assume_on)
    if wanted is not None:
        found = [item for item in found if item.source in wanted]
    if args.format == "json":
        print(json.dumps({"declarations": [item.as_dict() for item in found], "errors": errors}, indent=2))
    else:
        for item in found:
            print(f"{item.path}:{item.line}: {item.owner} {item.name} [{item.unit}] "
                  f"({item.dimension}) from {item.source}")
        counts: dict[str, int] = {}
        for item in found:
            counts[item.source] = counts.get(item.source, 0) + 1
        summary = ", ".join(f"{count} from {source}" for source, count in sorted(counts.items()))
        print(f"{len(found)} declarations" + (f": {summary}" if summary else ""))
        for error in errors:
            print(f"dimcheck: {error}", file=sys.stderr)
    return EXIT_TROUBLE if errors else EXIT_OK
