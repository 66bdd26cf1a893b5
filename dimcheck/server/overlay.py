"""Modules as the editor sees them: open documents are read from memory, not from disk.

A language server checks the text being typed, which is not saved yet. ``OverlayProject``
is a ``Project`` whose ``load`` takes an open document's text from a ``SourceStore``; every
other file is read from disk as usual. The store also keeps parsed modules between checks
(keyed by the text for open documents, by size and modification time for files on disk),
so after an edit only the edited document is parsed again, and the stubs are read once.
"""

from __future__ import annotations

import os

from ..declarations.comments import CommentUnit, trailing_comment_units
from ..declarations.symbols import ModuleSymbols, collect_symbols
from ..inference.project import (LoadedModule, Project, UnreadableFile, module_name_for,
                                 parse_source, read_source)


class _Parsed:
    """A module parsed once, with what its text or file looked like at the time."""

    __slots__ = ("signature", "text", "loaded", "root")

    def __init__(self, signature, text, loaded, root):
        self.signature = signature
        self.text = text
        self.loaded = loaded
        self.root = root  # where the module's own absolute imports are searched first


class SourceStore:
    """Open documents' text (by absolute path) and the parsed modules kept between checks.

    Not thread-safe: the server touches it from one worker thread only.
    """

    def __init__(self):
        self.documents: dict[str, str] = {}
        self._parsed: dict[str, _Parsed] = {}
        self._stubs: dict[tuple, dict[str, ModuleSymbols | None]] = {}
        self._chunk_comments: dict[str, dict[int, CommentUnit]] = {}  # statement text -> units
        self.parses = 0  # modules parsed so far (the benchmark and the tests read it)

    def set_documents(self, texts: dict[str, str]) -> None:
        self.documents = {os.path.abspath(path): text for path, text in texts.items()}

    def forget(self, path: str) -> None:
        self._parsed.pop(os.path.abspath(path), None)

    def stub_cache(self, stub_dirs) -> dict[str, ModuleSymbols | None]:
        """Parsed stubs, shared by every check with the same stub folders."""
        return self._stubs.setdefault(tuple(str(folder) for folder in stub_dirs), {})

    def module(self, path: str, options=None) -> _Parsed:
        key = os.path.abspath(path)
        text = self.documents.get(key)
        if text is not None:
            signature = ("open", hash(text), id(options))
        else:
            try:
                status = os.stat(key)
                signature = ("disk", status.st_mtime_ns, status.st_size, id(options))
            except OSError:
                signature = None  # read_source below reports why
        cached = self._parsed.get(key)
        if cached is not None and signature is not None and cached.signature == signature \
                and (text is None or cached.text == text):
            return cached
        parsed = self._parse(key, text, signature, options)
        if signature is not None:
            self._parsed[key] = parsed
        return parsed

    def _parse(self, path: str, text: str | None, signature, options=None) -> _Parsed:
        """What ``Project.load`` does for a file, for text that may come from memory."""
        self.parses += 1
        try:
            if text is None:
                text = read_source(path)
            elif text.startswith("\ufeff"):
                text = text[1:]
            tree = parse_source(text, path)
        except UnreadableFile as error:
            return _Parsed(signature, text, LoadedModule(None, error, text), None)
        name, root, is_package = module_name_for(path)
        comments = self._comment_units(text, tree) if signature and signature[0] == "open" \
            else trailing_comment_units(text)
        symbols = ModuleSymbols(path, name, tree, text, comments, is_package=is_package, options=options)
        return _Parsed(signature, text, LoadedModule(collect_symbols(symbols), None, text), root)


    def _comment_units(self, text: str, tree) -> dict[int, CommentUnit]:
        """``trailing_comment_units`` of an open document, reusing unchanged statements.

        Scanning comments runs the tokenizer over the whole text, which costs more than
        parsing it; between two keystrokes most top-level statements are unchanged. The
        tokenizer is in a clean state between top-level statements of a module that
        parsed (no open bracket or string), so each statement (with the comment lines
        before it) can be scanned alone and the result moved to its line.
        """
        if "\r" in text or len(tree.body) < 2:  # "\r" ends lines for ast, not for the tokenizer
            return trailing_comment_units(text)
        if len(self._chunk_comments) > 20000:
            self._chunk_comments.clear()
        lines = text.split("\n")
        found: dict[int, CommentUnit] = {}
        first = 0  # 0-based first line of the current chunk
        ends = [statement.end_lineno or statement.lineno for statement in tree.body[:-1]]
        ends.append(len(lines))
        for end in ends:
            if end <= first:
                continue  # statements sharing a line ("a = 1; b = 2") share a chunk
            chunk = "\n".join(lines[first:end]) + "\n"
            relative = self._chunk_comments.get(chunk)
            if relative is None:
                relative = self._chunk_comments[chunk] = trailing_comment_units(chunk)
            for line, unit in relative.items():
                found[line + first] = CommentUnit(line + first, unit.column, unit.text)
            first = end
        return found


class OverlayProject(Project):
    """A ``Project`` for one check, reading open documents from the store.

    Built afresh for every check (cheap): what it learns about the import graph belongs to
    one state of the text. The expensive parts, parsed modules and stubs, live in the store.
    """

    def __init__(self, stub_dirs, store: SourceStore, options=None, project_dir=None):
        super().__init__(stub_dirs, options, project_dir)
        self._store = store
        self._shared_stubs = store.stub_cache(stub_dirs)

    def stub_module(self, name: str) -> ModuleSymbols | None:
        if name in self._shared_stubs:
            return self._shared_stubs[name]
        found = super().stub_module(name)
        if self.has_stub(name):
            self._shared_stubs[name] = found
        return found

    def load(self, path: str) -> LoadedModule:
        key = os.path.abspath(path)
        loaded = self._by_path.get(key)
        if loaded is not None:
            return loaded
        parsed = self._store.module(key, self.options)
        self.register(key, parsed.loaded, parsed.root)
        return parsed.loaded
