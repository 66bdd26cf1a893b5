"""A run from files to findings: discover, read, infer, check, filter, sort.

This is the one place the pipeline is put together; the command line, the API in
``dimcheck/__init__.py`` and the tests all come through here.
"""

from __future__ import annotations

import gc
import os
import sys
from dataclasses import dataclass, field

from .cache import ResultCache, cache_key, default_folder
from .cli.config import Config, ConfigError
from .declarations.symbols import DeclarationOptions
from .cli.discovery import discover
from .declarations.suppressions import is_suppressed, skips_file
from .inference.engine import Engine
from .inference.evaluator import Located
from .inference.project import Project
from .rules.finding import Finding
from .rules.registry import RULES, SEVERITY_RANK
from .units import load_unit_table


@dataclass
class Report:
    files_checked: int = 0
    findings: list[Finding] = field(default_factory=list)
    errors: list[str] = field(default_factory=list)  # paths that could not be checked at all

    def fails(self, fail_on: str) -> bool:
        threshold = SEVERITY_RANK[fail_on]
        return any(SEVERITY_RANK[f.severity] >= threshold for f in self.findings)


def display_path(path: str) -> str:
    """Paths in reports are relative to the current directory."""
    try:
        relative = os.path.relpath(path)
    except ValueError:
        return path
    return path if relative.startswith("..") and os.path.isabs(path) else relative


def finding_message(located: Located) -> str:
    if not located.chain:
        return located.problem.message
    return f"{located.problem.message} (inside {', via '.join(located.chain)})"


def _finding(located: Located, shown_path: str) -> Finding:
    end_line = max(located.end_line, located.line)
    return Finding(shown_path, located.line, located.column + 1, end_line, located.end_column + 1,
                   located.problem.code, finding_message(located))


class Checker:
    """Checks files against one configuration; reusable across calls (keeps its unit table)."""

    def __init__(self, config: Config | None = None, select: list[str] | None = None,
                 ignore: list[str] | None = None, use_cache: bool = False):
        self.config = config or Config()
        chosen = select if select is not None else self.config.select
        self.codes = set(chosen or RULES)
        self.codes -= set(ignore if ignore is not None else self.config.ignore)
        self.table = load_unit_table(self.config.units, self.config.base_dimensions)
        self.use_cache = use_cache
        self.options = declaration_options(self.config, self.table)

    def _keep(self, code: str, line_text: str) -> bool:
        return code in self.codes and not is_suppressed(code, line_text)

    def _open_cache(self) -> ResultCache | None:
        if not self.use_cache:
            return None
        from . import __version__
        key = cache_key(__version__, self.config, self.table.key, self.config.stubs)
        return ResultCache(default_folder(self.config), key)

    def new_project(self) -> Project:
        return Project(self.config.stubs, self.options)

    def check_files(self, files: list[str]) -> list[Finding]:
        project = self.new_project()
        engine = Engine(project, self.table)
        cache = self._open_cache()
        findings: list[Finding] = []
        computed: list[str] = []
        old_limit = sys.getrecursionlimit()
        sys.setrecursionlimit(max(old_limit, 10000))
        # Syntax trees make millions of objects and no reference cycles worth collecting:
        # with the cyclic collector on, parsing a large tree takes several times longer.
        gc_was_enabled = gc.isenabled()
        gc.disable()
        try:
            for path in files:
                shown = display_path(path)
                raw = cache.lookup(path) if cache is not None else None
                if raw is None:
                    raw = self._file_findings(project, engine, path)
                    if cache is not None:
                        cache.store(path, raw)
                        computed.append(path)
                findings.extend(Finding(shown, *fields) for fields in raw if fields[4] in self.codes)
            if cache is not None:
                cache.record_graph(project.dependencies, computed)
                cache.save()
        finally:
            sys.setrecursionlimit(old_limit)
            if gc_was_enabled:
                gc.enable()
        findings.sort(key=Finding.sort_key)
        return findings

    @staticmethod
    def _file_findings(project: Project, engine: Engine, path: str) -> list[list]:
        """Every finding of one file, suppression comments applied, as plain field lists
        ``[line, column, end_line, end_column, code, message]`` (what the cache stores)."""
        loaded = project.load(path)
        if loaded.text is not None and skips_file(loaded.text):
            return []
        if loaded.symbols is None:
            error = loaded.error
            return [[error.line, error.column, error.line, error.column, "DIM902", error.message, error.cell]]
        module = loaded.symbols
        results = []
        for located in engine.check_module(module):
            if not is_suppressed(located.problem.code, module.line_text(located.line)):
                finding = _finding(located, "")
                line, end_line, cell = finding.line, finding.end_line, None
                if loaded.notebook is not None:  # lines are counted within the finding's cell
                    cell, line = loaded.notebook.locate(finding.line)
                    end_cell, end_in_cell = loaded.notebook.locate(finding.end_line)
                    end_line = end_in_cell if end_cell == cell else line
                results.append([line, finding.column, end_line, finding.end_column,
                                finding.code, finding.message, cell])
        return results


def declaration_options(config: Config, table) -> DeclarationOptions:
    """Docstring and name-pattern sources, as configured; a bad unit in the name table is a
    configuration error (exit 2) rather than a finding on every name it would match."""
    from .declarations.names import NameUnits
    from .units import UnitError, parse_unit

    for pattern, unit in config.name_units.items():
        try:
            parse_unit(unit, table)
        except UnitError as error:
            where = config.source or "configuration"
            raise ConfigError(f"{where}: [tool.dimcheck.name-units] {pattern!r}: {error}") from None
    names = NameUnits(config.name_units, config.suffix_units)

    def is_unit(text: str) -> bool:
        try:
            parse_unit(text, table)
        except UnitError:
            return False
        return True

    return DeclarationOptions(docstring_units=config.docstring_units, is_unit=is_unit,
                              names=names if names.active else None)


def check_paths(paths: list[str], config: Config | None = None, select: list[str] | None = None,
                ignore: list[str] | None = None, use_cache: bool = False) -> Report:
    config = config or Config()
    base = str(config.base_dir) if config.source is not None else None
    files, errors = discover(paths, config.exclude, base)
    checker = Checker(config, select, ignore, use_cache=use_cache)
    return Report(len(files), checker.check_files(files), errors)
