"""``dimcheck annotate``: insert the units dimcheck infers into the source.

    dimcheck annotate [PATH ...] [--style comment|annotated] [--write] [--config FILE]

Dry run by default: a unified diff of every change on stdout, exit 1 when there is one
(so CI can see pending annotations), 0 when there is none. ``--write`` replaces each file
atomically and prints one line per written file. Any error (missing path, unreadable
file, bad configuration, a rewrite that was refused) is one line on stderr and makes the
exit code 2; the other files are still processed. See docs/annotate.md.

libcst is imported only when this command runs (through dimcheck.analysis.annotate).
"""

from __future__ import annotations

import os
import sys

EXIT_CLEAN, EXIT_PENDING, EXIT_TROUBLE = 0, 1, 2


def register(commands) -> None:
    """Add the ``annotate`` subcommand to the subparsers object of ``build_parser``."""
    annotate = commands.add_parser(
        "annotate", help="insert the units dimcheck infers into assignments and returns",
        description="Declare the unit of each undeclared assignment (and, with --style annotated, "
                    "each function return) whose unit dimcheck infers with certainty. Shows a diff "
                    "unless --write is given.")
    annotate.add_argument("paths", nargs="*", metavar="PATH")
    annotate.add_argument("--style", choices=("comment", "annotated"), default="comment",
                          help="comment: append '# [unit]' (default); annotated: write "
                               "'x: Annotated[float, \"unit\"] = ...' and '-> Annotated[float, \"unit\"]'")
    annotate.add_argument("--write", action="store_true",
                          help="change the files (atomically) instead of printing a diff")
    annotate.add_argument("--config", metavar="FILE", help="a pyproject.toml or TOML file to read settings from")


def _shown(path: str) -> str:
    from ..rules.finding import display_path

    return display_path(path).replace(os.sep, "/")


def _error(text: str) -> None:
    print(f"dimcheck: error: {' '.join(str(text).split())}", file=sys.stderr)


def run(args) -> int:
    from .config import ConfigError, load_config

    try:
        config = load_config(args.config)
    except ConfigError as error:
        _error(error)
        return EXIT_TROUBLE

    from ..analysis.annotate import AnnotateError, plan, rewrite, source_encoding, unified_diff, write_atomically

    result = plan(args.paths or config.paths or ["."], config)
    trouble = bool(result.errors)
    for error in result.errors:
        _error(error)
    pending_files = pending_units = 0
    for file_plan in result.files:
        shown = _shown(file_plan.path)
        try:
            with open(file_plan.path, "rb") as handle:
                old = handle.read()
        except OSError as error:
            _error(f"{shown}: cannot read: {error.strerror or error}")
            trouble = True
            continue
        try:
            rewritten = rewrite(old, file_plan.insertions, args.style)
        except AnnotateError as error:
            _error(f"{shown}: {error}")
            trouble = True
            continue
        count = len(rewritten.applied)
        if not count:
            continue
        if not args.write:
            sys.stdout.write(unified_diff(old, rewritten.new, shown, source_encoding(old)))
            pending_files += 1
            pending_units += count
            continue
        try:
            write_atomically(file_plan.path, rewritten.new, old)
        except AnnotateError as error:
            _error(f"{shown}: {error}")
            trouble = True
            continue
        except OSError as error:
            _error(f"{shown}: cannot write: {error.strerror or error}")
            trouble = True
            continue
        print(f"annotated {shown} ({count} unit{'s' * (count != 1)})")
    if pending_files:
        print(f"dimcheck: {pending_units} unit{'s' * (pending_units != 1)} to insert in {pending_files} "
              f"file{'s' * (pending_files != 1)} (run with --write to apply)", file=sys.stderr)
    if trouble:
        return EXIT_TROUBLE
    return EXIT_PENDING if pending_files else EXIT_CLEAN
