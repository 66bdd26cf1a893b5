"""A run from files to findings: discover, read, infer, check, filter, sort.

This is the one place the pipeline is put together; the command line, the API in
``dimcheck/__init__.py`` and the tests all come through here.
"""

from __future__ import annotations

import gc
import os
import sys
from contextlib import contextmanager

from .cache import ResultCache, cache_key, default_folder
from .cli.config import Config, ConfigError
from .cli.discovery import discover
from .declarations.suppressions import is_suppressed, skips_file
from .rules.finding import Finding, display_path
from .rules.registry import RULES, SEVERITY_RANK
from .units import UnitError, unit_table_key

TYPE_CHECKING = False  # (typing.TYPE_CHECKING, without importing typing on the cache's path)
if TYPE_CHECKING:  # imported where they are used, so a run answered from the cache skips them
    from .declarations.symbols import DeclarationOptions
    from .inference.engine import Engine
    from .inference.evaluator import Located
    from .inference.project import Project


class Report:
    def __init__(self, files_checked: int = 0, findings: list[Finding] | None = None,
                 errors: list[str] | None = None):
        self.files_checked = files_checked
        self.findings: list[Finding] = findings if findings is not None else []
        self.errors: list[str] = errors if errors is not None else []  # paths not checked at all

    def __repr__(self) -> str:
        return f"Report({self.files_checked} files, {len(self.findings)} findings, {len(self.errors)} errors)"

    def fails(self, fail_on: str) -> bool:
        threshold = SEVERITY_RANK[fail_on]
        return any(SEVERITY_RANK[f.severity] >= threshold for f in self.findings)


def finding_message(located: Located) -> str:
    if not located.chain:
        return located.problem.message
    return f"{located.problem.message} (inside {', via '.join(located.chain)})"


def _finding_fields(located: Located, module, notebook) -> list:
    """``[line, column, end_line, end_column, code, message, cell]``: a finding as the cache
    stores it, with 1-based character columns and, in a notebook, lines counted in the cell."""
    end_line = max(located.end_line, located.line)
    column = _character_column(module.line_text(located.line), located.column + 1)
    end_column = _character_column(module.line_text(end_line), located.end_column + 1)
    line, cell = located.line, None
    if notebook is not None:
        cell, line = notebook.locate(located.line)
        end_cell, end_in_cell = notebook.locate(end_line)
        end_line = end_in_cell if end_cell == cell else line
    return [line, column, end_line, end_column, located.problem.code, finding_message(located), cell]


class Checker:
    """Checks files against one configuration; reusable across calls (keeps its unit table)."""

    def __init__(self, config: Config | None = None, select: list[str] | None = None,
                 ignore: list[str] | None = None, use_cache: bool = False):
        self.config = config or Config()
        chosen = select if select is not None else self.config.select
        self.codes = set(chosen or RULES)
        self.codes -= set(ignore if ignore is not None else self.config.ignore)
        self._table = None
        with self._units_problem_as_config_error():
            # the key is enough for a run answered from the cache; the table comes on first use
            self.table_key = unit_table_key(self.config.units, self.config.base_dimensions)
        self.use_cache = use_cache
        if self.config.name_units:
            validate_name_units(self.config, self.table)
        self._options = None

    @property
    def table(self):
        """The unit table, loaded on first use (from its cache, or built from pint)."""
        return self._table if self._table is not None else self._load_table()

    def _load_table(self):
        from .units import load_unit_table

        with self._units_problem_as_config_error():
            self._table = load_unit_table(self.config.units, self.config.base_dimensions)
        return self._table

    @contextmanager
    def _units_problem_as_config_error(self):
        try:
            yield
        except UnitError as error:  # a definition file missing, or one pint cannot read
            setting = error.setting  # units or base-dimensions
            where = f"{self.config.source}: [tool.dimcheck] {setting}" if self.config.source else setting
            raise ConfigError(f"{where}: {error}") from None

    @property
    def options(self):
        """Where declarations come from (DeclarationOptions); built on first use, so that a
        run answered entirely from the cache never imports the inference modules."""
        if self._options is None:
            self._options = declaration_options(self.config, self.table)
        return self._options

    def keep(self, code: str, line_text: str) -> bool:
        """Whether a finding is reported: its code selected and no suppression on its line."""
        return code in self.codes and not is_suppressed(code, line_text)

    def _open_cache(self) -> ResultCache | None:
        if not self.use_cache:
            return None
        from . import __version__
        key = cache_key(__version__, self.config, self.table_key, self.config.stubs)
        return ResultCache(default_folder(self.config), key)

    def new_project(self) -> Project:
        from .inference.project import Project

        return Project(self.config.stubs, self.options, project_dir=self.config.base_dir)

    def check_files(self, files: list[str], jobs: int = 1) -> list[Finding]:
        """Findings of the files, sorted. Files whose cached result still holds are not read;
        the rest are checked here or, with ``jobs`` > 1 and enough of them, in worker
        processes (each with its own view of the project), with the same result."""
        cache = self._open_cache()
        raw_by_path: dict[str, list] = {}
        pending = []
        for path in files:
            cached = cache.lookup(path) if cache is not None else None
            if cached is None:
                pending.append(path)
            else:
                raw_by_path[path] = cached
        dependencies: dict[str, set[str]] = {}
        if pending and self._table is None:
            self._load_table()  # a bad unit definition file stops the run here, before any worker
        for path, raw in self._compute(pending, jobs, dependencies):
            raw_by_path[path] = raw
        if cache is not None and pending:
            for path in pending:
                cache.store(path, raw_by_path[path])
            cache.record_graph(dependencies, pending)
            cache.save()
        findings = [Finding(display_path(path), *fields)
                    for path in files for fields in raw_by_path[path] if fields[4] in self.codes]
        findings.sort(key=Finding.sort_key)
        return findings

    def _compute(self, paths: list[str], jobs: int, dependencies: dict) -> list[tuple[str, list]]:
        chunks = split_work(paths, jobs)
        if not chunks:
            return []  # everything came from the cache: the inference modules stay unloaded
        if len(chunks) <= 1:
            return self.compute_chunk(paths, dependencies)
        import multiprocessing

        context = multiprocessing.get_context("fork" if "fork" in multiprocessing.get_all_start_methods()
                                              else "spawn")
        with context.Pool(len(chunks), initializer=_worker_start, initargs=(self.config,)) as pool:
            results = []
            for chunk_results, chunk_dependencies in pool.imap(_worker_check, chunks):
                results.extend(chunk_results)
                for module, used in chunk_dependencies.items():
                    dependencies.setdefault(module, set()).update(used)
        return results

    def compute_chunk(self, paths: list[str], dependencies: dict) -> list[tuple[str, list]]:
        from .inference.engine import Engine

        old_limit = sys.getrecursionlimit()
        sys.setrecursionlimit(max(old_limit, 10000))
        project = self.new_project()
        project.max_resident_trees = RESIDENT_TREES
        engine = Engine(project, self.table)  # sizes its nesting budget from the limit above
        # Syntax trees make millions of objects and no reference cycles worth collecting:
        # with the cyclic collector on, parsing a large tree takes several times longer.
        gc_was_enabled = gc.isenabled()
        gc.disable()
        try:
            results = [(path, self._file_findings(project, engine, path)) for path in paths]
        finally:
            sys.setrecursionlimit(old_limit)
            # The collector's first pass after a run scans every object the run made (a
            # second or more on a large tree); a process that keeps them all until it exits
            # (KEEP_ALIVE) has nothing for it to find.
            if gc_was_enabled and KEEP_ALIVE is None:
                gc.enable()
        for module, used in project.dependencies.items():
            dependencies.setdefault(module, set()).update(used)
        if KEEP_ALIVE is not None:
            KEEP_ALIVE.append((project, engine))  # freeing millions of nodes costs seconds
        return results

    @staticmethod
    def _file_findings(project: Project, engine: Engine, path: str) -> list[list]:
        """Every finding of one file, suppression comments applied, as field lists (what
        the cache stores; see ``_finding_fields``)."""
        loaded = project.load(path)
        if loaded.text is not None and skips_file(loaded.text):
            return []
        if loaded.symbols is None:
            error = loaded.error
            return [[error.line, error.column, error.line, error.column, "DIM902", error.message, error.cell]]
        module = loaded.symbols
        return [_finding_fields(located, module, loaded.notebook) for located in engine.check_module(module)
                if not is_suppressed(located.problem.code, module.line_text(located.line))]


# The command line sets this to a list: what a run built is then kept until the process
# exits (without tearing it down), since freeing every syntax tree one by one takes seconds.
KEEP_ALIVE: list | None = None

# Syntax trees kept in memory during a batch run (the most recently used modules); the
# others are parsed again when needed. Enough for a module and what it imports directly.
RESIDENT_TREES = 4

MIN_FILES_PER_JOB = 25  # below this, starting workers costs more than it saves


def _character_column(line_text: str, byte_column: int) -> int:
    """The syntax tree counts columns in UTF-8 bytes; reports count characters (1-based)."""
    if line_text.isascii():
        return byte_column
    return len(line_text.encode("utf-8")[: byte_column - 1].decode("utf-8", errors="ignore")) + 1


def split_work(paths: list[str], jobs: int) -> list[list[str]]:
    """Contiguous runs of the (sorted) file list with about equal bytes each: files of one
    package stay together, so each worker reads the modules they share only once."""
    jobs = min(max(jobs, 1), max(len(paths) // MIN_FILES_PER_JOB, 1))
    if jobs <= 1:
        return [paths] if paths else []
    sizes = []
    for path in paths:
        try:
            sizes.append(max(os.path.getsize(path), 1))
        except OSError:
            sizes.append(1)
    share = sum(sizes) / jobs
    chunks, current, filled = [], [], 0.0
    for path, size in zip(paths, sizes):
        current.append(path)
        filled += size
        if filled >= share and len(chunks) < jobs - 1:
            chunks.append(current)
            current, filled = [], 0.0
    if current:
        chunks.append(current)
    return chunks


_WORKER: "Checker | None" = None


def _worker_start(config: Config) -> None:
    global _WORKER
    _WORKER = Checker(config)


def _worker_check(paths: list[str]):
    dependencies: dict[str, set[str]] = {}
    return _WORKER.compute_chunk(paths, dependencies), dependencies


def validate_name_units(config: Config, table) -> None:
    """A bad unit in the name table is a configuration error (exit 2) rather than a
    finding on every name it would match."""
    from .units import parse_unit

    for pattern, unit in config.name_units.items():
        try:
            parse_unit(unit, table)
        except UnitError as error:
            where = config.source or "configuration"
            raise ConfigError(f"{where}: [tool.dimcheck.name-units] {pattern!r}: {error}") from None


def declaration_options(config: Config, table) -> "DeclarationOptions":
    """Docstring and name-pattern sources, as configured."""
    from .declarations.names import NameUnits
    from .declarations.symbols import DeclarationOptions
    from .units import parse_unit

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
                ignore: list[str] | None = None, use_cache: bool = False, jobs: int = 1) -> Report:
    config = config or Config()
    files, errors = discover(paths, config.exclude, config.exclude_base)
    checker = Checker(config, select, ignore, use_cache=use_cache)
    return Report(len(files), checker.check_files(files, jobs), errors)
