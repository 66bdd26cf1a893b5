"""Checking documents as an editor holds them: the server's work, without the protocol.

A ``Session`` knows the open documents' text, finds each document's configuration (the
nearest ``pyproject.toml`` with ``[tool.dimcheck]``, as ``dimcheck check`` does), keeps a
``Checker`` (and so the unit table) per configuration, and answers two questions about a
document: its findings, and the unit of the expression at a position. Findings are
filtered exactly as ``dimcheck check`` filters them: selected codes, ``# dimcheck:
ignore[...]`` lines, ``# dimcheck: skip-file``, and the configured excludes.
"""

from __future__ import annotations

import gc
import os
import sys
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

from ..cli.config import Config, load_config
from ..cli.discovery import _excluded
from ..declarations.suppressions import skips_file
from ..inference.engine import Engine
from ..rules.registry import RULES, WARNING
from ..runner import Checker, finding_message
from .hover import hover_text, statement_lines
from .overlay import OverlayProject, SourceStore
from .positions import byte_to_char, char_to_byte, split_lines


@dataclass(frozen=True)
class Issue:
    """A finding placed for an editor: 0-based lines, columns as string indices."""

    line: int
    character: int
    end_line: int
    end_character: int
    code: str
    severity: str  # "error" or "warning"
    message: str


@dataclass(frozen=True)
class Hover:
    markdown: str
    line: int | None = None  # the range of the expression described, as in Issue
    character: int = 0
    end_line: int = 0
    end_character: int = 0


@contextmanager
def _deep_code():
    """As the runner does: room for deep syntax trees, no cyclic GC passes over them."""
    old_limit = sys.getrecursionlimit()
    sys.setrecursionlimit(max(old_limit, 10000))
    gc_was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        sys.setrecursionlimit(old_limit)
        if gc_was_enabled:
            gc.enable()


def _config_signature(folder: Path) -> tuple:
    """Which ``pyproject.toml`` files exist above ``folder``, and their versions: the
    configuration is read again only when this changes."""
    found = []
    for candidate in (folder, *folder.parents):
        try:
            status = os.stat(candidate / "pyproject.toml")
        except OSError:
            continue
        found.append((str(candidate), status.st_mtime_ns, status.st_size))
    return tuple(found)


class Session:
    def __init__(self, config_file: str | None = None):
        self.config_file = config_file  # --config: one file for every document
        self.store = SourceStore()
        self._checkers: dict[str, tuple[tuple, Checker]] = {}

    # -- documents ------------------------------------------------------------------------
    def set_documents(self, texts: dict[str, str]) -> None:
        """The open documents, path -> text; other files are read from disk."""
        self.store.set_documents(texts)

    # -- configuration ------------------------------------------------------------------------
    def checker_for(self, path: str) -> Checker:
        """The checker of the configuration that governs ``path`` (raises ConfigError)."""
        folder = Path(path).parent
        if self.config_file is not None:
            key, signature = "", _config_signature(Path(self.config_file).resolve().parent)
        else:
            key, signature = str(folder), _config_signature(folder)
        cached = self._checkers.get(key)
        if cached is not None and cached[0] == signature:
            return cached[1]
        config = load_config(self.config_file, start=folder)
        checker = Checker(config)
        self._checkers[key] = (signature, checker)
        return checker

    @staticmethod
    def excluded(path: str, config: Config) -> bool:
        if config.source is None or not config.exclude:
            return False
        return _excluded(path, config.exclude, str(config.base_dir))

    # -- findings -------------------------------------------------------------------------------
    def check(self, path: str) -> list[Issue]:
        path = os.path.abspath(path)
        checker = self.checker_for(path)
        if self.excluded(path, checker.config):
            return []
        project = OverlayProject(checker.config.stubs, self.store, checker.options, checker.config.base_dir)
        engine = Engine(project, checker.table)
        with _deep_code():
            loaded = project.load(path)
            if loaded.text is not None and skips_file(loaded.text):
                return []
            if loaded.symbols is None:
                return self._unreadable(checker, loaded)
            module = loaded.symbols
            lines = split_lines(loaded.text)
            issues = []
            for located in engine.check_module(module):
                code = located.problem.code
                if not checker.keep(code, module.line_text(located.line)):
                    continue
                start_line, end_line = located.line - 1, max(located.end_line, located.line) - 1
                start = _char(lines, start_line, located.column)
                end = _char(lines, end_line, located.end_column)
                issues.append(Issue(start_line, start, end_line, end, code, _severity(code),
                                    finding_message(located)))
        issues.sort(key=lambda issue: (issue.line, issue.character, issue.code))
        return issues

    @staticmethod
    def _unreadable(checker: Checker, loaded) -> list[Issue]:
        if "DIM902" not in checker.codes:
            return []
        error = loaded.error
        line = max(error.line, 1) - 1
        lines = split_lines(loaded.text) if loaded.text is not None else []
        text = lines[line] if line < len(lines) else ""
        start = min(max(error.column, 1) - 1, len(text))  # SyntaxError counts characters
        end = len(text) if len(text) > start else start
        return [Issue(line, start, line, end, "DIM902", _severity("DIM902"), error.message)]

    # -- hover -----------------------------------------------------------------------------------
    def hover(self, path: str, line: int, character: int) -> Hover | None:
        """The unit of the innermost expression at a 0-based line and string index."""
        path = os.path.abspath(path)
        checker = self.checker_for(path)
        project = OverlayProject(checker.config.stubs, self.store, checker.options, checker.config.base_dir)
        with _deep_code():
            loaded = project.load(path)
            if loaded.symbols is None:
                return None
            module = loaded.symbols
            lines = split_lines(loaded.text)
            if not 0 <= line < len(lines):
                return None
            point = (line + 1, char_to_byte(lines[line], character))
            first, last = statement_lines(module.tree, point)
            seen: dict[int, object] = {}

            def observe(observed_module, node, value):
                # what the hover may need: the expressions of the statement under the cursor
                if observed_module is module and getattr(node, "lineno", None) is not None \
                        and node.lineno <= last and (node.end_lineno or node.lineno) >= first:
                    seen.setdefault(id(node), value)

            engine = Engine(project, checker.table)
            engine.observer = observe
            engine.check_module(module)
            if not project.can_have_units(module):
                return None
            found = hover_text(engine, module, point, seen)
        if found is None:
            return None
        node = found.node
        if node is None:
            return Hover(found.markdown)
        start_line, end_line = node.lineno - 1, (node.end_lineno or node.lineno) - 1
        return Hover(found.markdown, start_line, _char(lines, start_line, node.col_offset),
                     end_line, _char(lines, end_line, node.end_col_offset or node.col_offset))


def _char(lines: list[str], line: int, byte_column: int) -> int:
    return byte_to_char(lines[line], byte_column) if 0 <= line < len(lines) else byte_column


def _severity(code: str) -> str:
    rule = RULES.get(code)
    return rule.severity if rule is not None else WARNING
