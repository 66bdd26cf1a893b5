"""The command line: ``dimcheck check [PATH ...]`` and friends.

Exit codes: 0 no finding at or above the fail level, 1 at least one, 2 when dimcheck
itself could not do its job (bad option, bad configuration, unreadable path, internal
error). Every such error is one line on stderr, never a traceback.
"""

from __future__ import annotations

import argparse
import os
import sys

from .. import __version__
from ..rules.registry import RULES
from .config import ConfigError, load_config, parse_codes
from .errors import UsageError
from . import analysis_commands, annotate_command, groups_command
from . import serve_command

EXIT_CLEAN, EXIT_FINDINGS, EXIT_TROUBLE = 0, 1, 2


class _HelpFormatter(argparse.HelpFormatter):
    """argparse's formatter, given the terminal's width: left to find it, argparse imports
    shutil (and the compression modules with it) on every run, help shown or not."""

    def __init__(self, prog: str, indent_increment: int = 2, max_help_position: int = 24,
                 width: int | None = None):
        super().__init__(prog, indent_increment, max_help_position,
                         width if width is not None else _terminal_columns() - 2)


def _terminal_columns() -> int:
    """What ``shutil.get_terminal_size().columns`` gives: $COLUMNS, else the width of the
    terminal on standard output, else 80."""
    try:
        columns = int(os.environ.get("COLUMNS", 0))
    except ValueError:
        columns = 0
    if columns <= 0:
        try:
            columns = os.get_terminal_size(sys.__stdout__.fileno()).columns
        except (AttributeError, ValueError, OSError):
            columns = 0
    return columns if columns > 0 else 80


class _Parser(argparse.ArgumentParser):
    def __init__(self, *args, **kwargs):
        kwargs.setdefault("formatter_class", _HelpFormatter)
        super().__init__(*args, **kwargs)

    def error(self, message: str):  # one line, exit 2, instead of argparse's usage block
        raise UsageError(message)


def _codes_option(text: str) -> list[str]:
    return [part for part in text.split(",") if part.strip()]


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The command line's parser; with ``only``, the parser of that one command alone
    (what running it needs: building every command's parser costs as much as a whole
    check answered from the cache)."""
    parser = _Parser(prog="dimcheck", description="Static unit and dimension checks for Python code.")
    parser.add_argument("--version", action="version", version=f"dimcheck {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, (add_parser, _) in COMMANDS.items():
        if only is None or name == only:
            add_parser(commands)
    return parser


def _add_check(commands) -> None:
    check = commands.add_parser("check", help="check files and folders for unit mistakes")
    check.add_argument("paths", nargs="*", metavar="PATH")
    check.add_argument("--format", choices=("text", "json", "sarif"), default="text")
    check.add_argument("--select", type=_codes_option, metavar="CODES",
                       help="comma-separated codes or prefixes to report (default: all)")
    check.add_argument("--ignore", type=_codes_option, metavar="CODES",
                       help="comma-separated codes or prefixes not to report")
    check.add_argument("--config", metavar="FILE", help="a pyproject.toml or TOML file to read settings from")
    check.add_argument("--jobs", type=int, default=0, metavar="N",
                       help="worker processes (default: the number of cores)")
    check.add_argument("--no-cache", action="store_true", help="neither read nor write the result cache")
    check.add_argument("--fail-on", choices=("error", "warning"), default=None,
                       help="lowest severity that makes the exit code 1 (default: error)")
    recorded = check.add_mutually_exclusive_group()
    recorded.add_argument("--baseline", metavar="FILE",
                          help="report only findings not recorded in FILE (see --write-baseline)")
    recorded.add_argument("--write-baseline", metavar="FILE",
                          help="record the current findings in FILE and exit 0")


def _add_rules(commands) -> None:
    commands.add_parser("rules", help="list the rule codes")


def _run_check(args) -> int:
    from .. import runner  # imported here so `dimcheck --version` stays instant
    from ..reports import FORMATS

    check_paths = runner.check_paths
    runner.KEEP_ALIVE = []  # freed by the exit in main(), not object by object
    config = load_config(args.config)
    select = parse_codes(args.select, "--select") if args.select is not None else None
    ignore = parse_codes(args.ignore, "--ignore") if args.ignore is not None else None
    if args.jobs < 0:
        raise UsageError("--jobs must be 0 (all cores) or a positive number")
    known = None
    if args.baseline is not None or args.write_baseline is not None:
        from .. import baseline
    if args.baseline is not None:
        try:  # read before the run, so a wrong file name fails at once
            known = baseline.read(args.baseline)
        except baseline.BaselineError as error:
            raise UsageError(str(error)) from None
    paths = args.paths or config.paths or ["."]
    jobs = args.jobs or os.cpu_count() or 1
    report = check_paths(paths, config, select, ignore, use_cache=not args.no_cache, jobs=jobs)
    for error in report.errors:
        print(f"dimcheck: error: {error}", file=sys.stderr)
    if report.files_checked == 0 and not report.errors:
        # a clean exit that checked nothing is most often a wrong path or exclude: say so,
        # on stderr, so the report on stdout stays what scripts expect (empty, or valid JSON)
        print("dimcheck: no Python files found under the given paths", file=sys.stderr)
    if args.write_baseline is not None:
        if report.errors:  # a record of a partial run would hide nothing it should
            return EXIT_TROUBLE
        try:
            count = baseline.write(report.findings, args.write_baseline)
        except OSError as error:
            raise UsageError(f"cannot write baseline file {args.write_baseline}: "
                             f"{error.strerror or error}") from None
        print(f"dimcheck: recorded {count} finding{'s' * (count != 1)} in {args.write_baseline}",
              file=sys.stderr)
        return EXIT_CLEAN
    if known is not None:
        shown = len(report.findings)
        report = baseline.filter_report(report, known, args.baseline)
        hidden = shown - len(report.findings)
        if hidden and args.format == "text":
            print(f"dimcheck: {hidden} finding{'s' * (hidden != 1)} recorded in {args.baseline} "
                  f"not shown", file=sys.stderr)
    sys.stdout.write(FORMATS[args.format](report))
    if report.errors:
        return EXIT_TROUBLE
    return EXIT_FINDINGS if report.fails(args.fail_on or config.fail_on) else EXIT_CLEAN


def _run_rules() -> int:
    for rule in RULES.values():
        print(f"{rule.code}  {rule.name:<22} {rule.severity:<8} {rule.summary}")
    return EXIT_CLEAN


# Each command: how its parser is added, and what runs it (in the order --help lists them).
COMMANDS = {
    "check": (_add_check, _run_check),
    "rules": (_add_rules, lambda _: _run_rules()),
    "groups": (groups_command.register, groups_command.run),
    "explain": (analysis_commands.add_explain, analysis_commands.run_explain),
    "coverage": (analysis_commands.add_coverage, analysis_commands.run_coverage),
    "declarations": (analysis_commands.add_declarations, analysis_commands.run_declarations),
    "annotate": (annotate_command.register, annotate_command.run),
    "serve": (serve_command.register, serve_command.run),
}


def main(argv: list[str] | None = None) -> int:
    if hasattr(sys.stdout, "reconfigure"):
        sys.stdout.reconfigure(errors="backslashreplace")
    argv = sys.argv[1:] if argv is None else argv
    parser = build_parser(only=argv[0] if argv and argv[0] in COMMANDS else None)
    try:
        args = parser.parse_args(argv)
        if args.command in COMMANDS:
            return COMMANDS[args.command][1](args)
        parser.print_help()
        return EXIT_TROUBLE
    except (UsageError, ConfigError) as error:
        print(f"dimcheck: error: {error}", file=sys.stderr)
        return EXIT_TROUBLE
    except KeyboardInterrupt:
        print("dimcheck: interrupted", file=sys.stderr)
        return EXIT_TROUBLE
    except BrokenPipeError:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return EXIT_TROUBLE
    except Exception as error:  # a bug of ours: still one line and exit 2, never a traceback
        if os.environ.get("DIMCHECK_DEBUG"):
            raise
        print(f"dimcheck: internal error: {type(error).__name__}: {error} "
              f"(set DIMCHECK_DEBUG=1 for details)", file=sys.stderr)
        return EXIT_TROUBLE


def run_and_exit(argv: list[str] | None = None) -> None:
    """The console entry point: run, flush, and leave without tearing down the heap of
    syntax trees one object at a time (the operating system reclaims it at once)."""
    code = main(argv)
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError):  # the reader went away (an editor closed its pipe)
            pass
    os._exit(code)


if __name__ == "__main__":
    run_and_exit()
