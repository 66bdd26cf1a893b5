"""The set of modules inference can see: the checked files, their neighbours on disk
that they import, and the stubs (shipped and the user's).

Modules are read and parsed lazily and only once. Nothing here imports or runs the
code being checked: a module is found by its file name and read as text.
"""

from __future__ import annotations

import ast
import codecs
import io
import os
import re
import tokenize
from collections import OrderedDict
from functools import lru_cache
from pathlib import Path

from ..declarations.comments import trailing_comment_units
from ..declarations.annotations import AliasRef
from ..declarations.symbols import DeclarationOptions, ImportRef, ModuleSymbols, collect_symbols
from ..files import NotRegularFile, read_regular_file

SHIPPED_STUBS = Path(__file__).resolve().parent.parent / "stubs"

# Text that can make a module's values known (besides comment declarations). A module
# with none, importing nothing that has any, has only unknown values: it cannot produce
# a finding, so the inference pass skips it (parsing it is still needed for DIM902).
# Two patterns, not one alternation: each then starts with text the regex engine can skip
# to, rather than trying both alternatives at every position of the file.
_ANNOTATED_MARKER = re.compile(r"""Annotated\[[^\]\n]*,\s*(?:["']|[\w.]*Unit\()""")
_UNIT_CALL_MARKER = re.compile(r"""\bUnit\(\s*["']""")


# A unit written inside a definition: ``Annotated[float, "m"]`` or ``Unit("m")`` (the
# text is captured, since "1" and the like declare nothing that could start a finding).
_LOCAL_UNITS = re.compile(r"""Annotated\[[^\]\n]*,\s*(?:["']([^"'\n]*)["']|[\w.]*Unit\(\s*["']([^"'\n]*)["'])"""
                          r"""|\bUnit\(\s*["']([^"'\n]*)["']""")
_IDENTIFIER = re.compile(r"[A-Za-z_]\w*")


def _has_marker(source: str) -> bool:
    # the substring tests are many times faster than the patterns, which most files fail
    return ("Annotated[" in source and _ANNOTATED_MARKER.search(source) is not None) or \
        ("Unit(" in source and _UNIT_CALL_MARKER.search(source) is not None)


# Unit texts that cannot start a finding anywhere: every value built from them is
# dimensionless at scale 1 (not "deg", which can still reach a radian parameter). Real code
# is full of "# [1]" after citations, which the contract reads as dimensionless; they must
# not send whole packages through inference.
_PLAIN_DIMENSIONLESS = frozenset({"1", "", "-", "dimensionless"})


def _has_scaled_comment_unit(module: ModuleSymbols) -> bool:
    return any(unit.text not in _PLAIN_DIMENSIONLESS for unit in module.comment_units.values())


class UnreadableFile(Exception):
    """A file that cannot be read, decoded or parsed; becomes DIM902."""

    def __init__(self, message: str, line: int = 1, column: int = 1):
        super().__init__(message)
        self.message = message
        self.line = line
        self.column = column
        self.cell: int | None = None  # in a notebook, the cell the line is counted in


def read_source(path: str) -> str:
    try:
        data = read_regular_file(path)
    except IsADirectoryError:
        raise UnreadableFile("is a directory, not a file") from None
    except NotRegularFile:
        raise UnreadableFile("not a regular file") from None
    except OSError as error:
        raise UnreadableFile(f"cannot read file: {error.strerror or error}") from None
    try:
        text = data.decode(_encoding_of(data))
    except (SyntaxError, LookupError) as error:
        raise UnreadableFile(f"cannot decode file: {error}") from None
    except UnicodeDecodeError as error:
        line = data[: error.start].count(b"\n") + 1
        raise UnreadableFile(f"cannot decode file as {error.encoding}: invalid byte at offset "
                             f"{error.start}", line) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return text


def _encoding_of(data: bytes) -> str:
    """The source encoding (PEP 263). Most files declare none and start with no BOM: for
    them it is UTF-8 without asking the tokenizer, which costs more than the decoding."""
    second_line_end = data.find(b"\n", data.find(b"\n") + 1)
    head = data if second_line_end < 0 else data[:second_line_end]
    if b"coding" not in head and not data.startswith(codecs.BOM_UTF8):
        return "utf-8"
    encoding, _ = tokenize.detect_encoding(io.BytesIO(data).readline)
    return encoding


def parse_source(text: str, path: str) -> ast.Module:
    try:
        return ast.parse(text, filename=path)
    except SyntaxError as error:
        message = error.msg or "invalid syntax"
        raise UnreadableFile(f"syntax error: {message}", error.lineno or 1, error.offset or 1) from None
    except ValueError as error:  # null bytes on older Pythons
        raise UnreadableFile(f"cannot parse file: {error}") from None
    except (RecursionError, MemoryError):
        raise UnreadableFile("cannot parse file: nesting too deep for the Python parser") from None


def read_notebook_source(path: str):
    """A notebook's code cells as one module (never run); a bad notebook is DIM902."""
    from ..declarations.notebooks import NotebookError, read_notebook_file

    try:
        return read_notebook_file(path)
    except NotebookError as error:
        raise UnreadableFile(f"cannot read notebook: {error}") from None


def parse_notebook(notebook, path: str) -> ast.Module:
    try:
        return parse_source(notebook.text, path)
    except UnreadableFile as error:
        cells = notebook.cell_syntax_errors()
        if cells:
            cell, line, message = cells[0]
            located = UnreadableFile(f"syntax error in cell {cell}: {message}", line, 1)
            located.cell = cell
            raise located from None
        raise error


def module_name_for(path: str) -> tuple[str, Path, bool]:
    """The dotted module name of a file, the folder imports are relative to, and is-package."""
    folder, filename = os.path.split(_resolved(str(path)))
    stem = os.path.splitext(filename)[0]
    if stem == "__init__":
        package, root = _package_of(os.path.dirname(folder))
        return ".".join([*package, os.path.basename(folder)]), root, True
    package, root = _package_of(folder)
    return ".".join([*package, stem]), root, False


def _resolved(path: str) -> str:
    """``os.path.realpath(path)``, with each folder resolved once: every file of a folder
    asks (strings, not Path objects: this runs for every file of a large check)."""
    if os.path.islink(path):
        return os.path.realpath(path)
    folder, filename = os.path.split(os.path.abspath(path))
    return os.path.join(_real_folder(folder), filename)


@lru_cache(maxsize=100_000)
def _real_folder(folder: str) -> str:
    return os.path.realpath(folder)


@lru_cache(maxsize=100_000)
def _package_of(folder: str) -> tuple[tuple[str, ...], Path]:
    """The package names leading to a folder (empty outside a package) and the folder
    above the outermost package; remembered per folder, since every file asks."""
    parent = os.path.dirname(folder)
    if parent != folder and os.path.exists(os.path.join(folder, "__init__.py")):
        outer, root = _package_of(parent)
        return (*outer, os.path.basename(folder)), root
    return (), Path(folder)


class LoadedModule:
    __slots__ = ("symbols", "error", "notebook", "_text")

    def __init__(self, symbols: ModuleSymbols | None, error: UnreadableFile | None = None,
                 text: str | None = None, notebook: object = None):
        self.symbols = symbols
        self.error = error
        self.notebook = notebook  # for a .ipynb file, its NotebookSource (maps lines to cells)
        self._text = None if symbols is not None else text

    @property
    def text(self) -> str | None:
        """The decoded source, when it could be read (the module's own, which a release of
        its tree may drop and read again)."""
        return self.symbols.source if self.symbols is not None else self._text


# Folders that hold installed third-party packages: a module found there is read only by
# modules of its own top-level package, so checking scipy's files never parses numpy.
_INSTALLED_FOLDERS = frozenset({"site-packages", "dist-packages"})


class Project:
    def __init__(self, stub_dirs: list[Path] | tuple = (), options: DeclarationOptions | None = None,
                 project_dir: str | Path | None = None):
        self.options = options
        # a new view of the disk: packages and links may have changed since
        _package_of.cache_clear()
        _real_folder.cache_clear()
        self._by_path: dict[str, LoadedModule] = {}
        # Where an absolute import is searched: the importing file's own root (the folder
        # above its outermost package), then the project's folder (the configuration's,
        # else the current one) and its src/ (for a module of an installed package, only
        # its own root). This depends on the importing file alone, never on which other
        # files a run names, so a cached result stays true.
        base = os.path.abspath(project_dir if project_dir is not None else os.getcwd())
        self._project_roots = tuple(dict.fromkeys([base, os.path.join(base, "src")]))
        self._root_of: dict[str, str] = {}  # module path -> its root
        self._import_roots: dict[str, tuple[str, ...]] = {}  # root -> the search order from there
        self._found: dict[tuple[tuple[str, ...], str], str | None] = {}  # (search order, name) -> file
        self._found_from: dict[tuple[str, str], ModuleSymbols | None] = {}  # (requester path, name) -> module
        self._stub_paths: dict[str, Path] = {}
        # user stubs are listed after the shipped ones so that they override them
        for folder in [SHIPPED_STUBS, *stub_dirs]:
            self._index_stubs(Path(folder))
        self._stub_modules: dict[str, ModuleSymbols | None] = {}
        self._tainted: dict[str, bool] = {}
        self._marks: dict[str, bool] = {}
        self._coarse: dict[str, bool] = {}
        self._candidates: dict[tuple[tuple[str, ...], str], list[str]] = {}
        self._absolute_paths: dict[str, str] = {}
        self._bodies: dict[tuple[str, str], tuple[bool, frozenset[str]]] = {}  # see _body_summary
        # module path -> paths of the modules it was seen to use: what its result depends on
        self.dependencies: dict[str, set[str]] = {}
        # Syntax trees are most of a run's memory. With a limit set, only that many modules
        # keep theirs (the most recently used); the others release it and parse again if
        # a node is needed. Modules being evaluated are pinned and never released.
        self.max_resident_trees: int | None = None
        self._resident: OrderedDict[str, ModuleSymbols] = OrderedDict()
        self._pins: dict[str, int] = {}

    # -- stubs ------------------------------------------------------------------------
    def _index_stubs(self, folder: Path) -> None:
        if not folder.is_dir():
            return
        for stub in sorted(folder.rglob("*.pyi")):
            relative = stub.relative_to(folder).with_suffix("")
            parts = list(relative.parts)
            if parts[-1] == "__init__":
                parts.pop()
            if parts:
                self._stub_paths[".".join(parts)] = stub

    def stub_module(self, name: str) -> ModuleSymbols | None:
        if name not in self._stub_paths:
            return None
        if name not in self._stub_modules:
            path = self._stub_paths[name]
            try:
                text = read_source(str(path))
                tree = parse_source(text, str(path))
                symbols = ModuleSymbols(str(path), name, tree, text, trailing_comment_units(text),
                                        is_package=path.stem == "__init__", is_stub=True)
                self._stub_modules[name] = collect_symbols(symbols)
                if self.max_resident_trees is not None:
                    symbols.release_tree()  # stub bodies are never analysed; declarations suffice
            except UnreadableFile:
                self._stub_modules[name] = None
        return self._stub_modules[name]

    def has_stub(self, name: str) -> bool:
        return name in self._stub_paths

    # -- modules of the checked tree ---------------------------------------------------------
    def load(self, path: str) -> LoadedModule:
        key = os.path.abspath(path)
        loaded = self._by_path.get(key)
        if loaded is not None:
            return loaded
        text = notebook = None
        try:
            if path.endswith(".ipynb"):
                notebook = read_notebook_source(path)
                text = notebook.text
            else:
                text = read_source(path)
            tree = parse_notebook(notebook, path) if notebook is not None else parse_source(text, path)
        except UnreadableFile as error:
            loaded = LoadedModule(None, error, text, notebook)
            self._by_path[key] = loaded
            return loaded
        name, root, is_package = module_name_for(path)
        symbols = ModuleSymbols(path, name, tree, text, trailing_comment_units(text), is_package=is_package,
                                options=self.options)
        loaded = LoadedModule(collect_symbols(symbols), None, text, notebook)
        self.register(key, loaded, root)
        if self.max_resident_trees is not None:
            symbols.on_restore = self._admit
            if notebook is None:
                symbols.read_again = _read_again
            self._admit(symbols)
        return loaded

    def register(self, key: str, loaded: LoadedModule, root) -> None:
        """Remember a module read from ``key`` (an absolute path), and the root its own
        absolute imports are searched from first."""
        self._by_path[key] = loaded
        if loaded.symbols is not None:
            self._root_of[loaded.symbols.path] = str(root)

    # -- how many syntax trees stay in memory ---------------------------------------------
    def _admit(self, module: ModuleSymbols) -> None:
        self._resident[module.path] = module
        self._resident.move_to_end(module.path)
        excess = len(self._resident) - self.max_resident_trees
        if excess <= 0:
            return
        for path in list(self._resident):
            if excess <= 0:
                break
            if not self._pins.get(path) and path != module.path:  # never the one coming in
                released = self._resident.pop(path)
                self._marked(released)  # read from the source, which the release drops
                released.release_tree()
                excess -= 1

    def pinned(self, module: ModuleSymbols) -> "_Pin":
        """``with project.pinned(module):`` keeps its tree while nodes of it are in use."""
        return _Pin(self._pins, module.path)

    def find_module(self, name: str, requester: ModuleSymbols | None = None) -> ModuleSymbols | None:
        """A module by dotted name, as ``requester`` imports it: a stub, else the first file
        of that name along the requester's import roots (see ``import_roots``)."""
        if not name:
            return None
        stub = self.stub_module(name)
        if stub is not None:
            return stub
        path = self._file_of(name, requester)
        if path is None:
            return None
        symbols = self.load(path).symbols  # (read once: load remembers it by path)
        if symbols is not None and symbols.path in self._resident:
            self._resident.move_to_end(symbols.path)
        return symbols

    def import_roots(self, requester: ModuleSymbols | None) -> tuple[str, ...]:
        """The folders an absolute import of ``requester`` is searched in, in order."""
        own = self._root_of.get(requester.path) if requester is not None else None
        if own is None:
            return self._project_roots
        roots = self._import_roots.get(own)
        if roots is None:
            # an installed package imports from where it is installed, never from the project
            installed = not _INSTALLED_FOLDERS.isdisjoint(own.split(os.sep))
            roots = self._import_roots[own] = (own,) if installed else tuple(dict.fromkeys([own, *self._project_roots]))
        return roots

    def _file_of(self, name: str, requester: ModuleSymbols | None) -> str | None:
        """The file ``requester`` would import as ``name``, if dimcheck may read it. As
        Python does, the first file found decides, even when it may not be read."""
        roots = self.import_roots(requester)
        key = (roots, name)
        if key in self._found:
            found = self._found[key]
        else:
            found = self._found[key] = next(
                (path for path in self.candidate_paths(name, roots) if os.path.isfile(path)), None)
        if found is None or not self._may_read(requester, found):
            return None
        return found

    def _may_read(self, requester: ModuleSymbols | None, path: str) -> bool:
        """Installed third-party packages stay unread (unknown), except a package's own
        modules: checking one package does not parse everything it imports."""
        if _INSTALLED_FOLDERS.isdisjoint(path.split(os.sep)):
            return True
        own = self._root_of.get(requester.path) if requester is not None else None
        if own is None:
            return False
        top = os.path.join(own, requester.name.split(".")[0])
        return path.startswith(top + os.sep) or path == top + ".py"

    def find_from(self, requester: ModuleSymbols | None, name: str) -> ModuleSymbols | None:
        """``find_module`` on behalf of a module, remembering that it depends on the result:
        the file found, and every place searched before it (a file appearing there would be
        imported instead)."""
        key = (requester.path if requester is not None else "", name)
        if key in self._found_from:  # asked before: the same answer, its dependencies recorded
            target = self._found_from[key]
            if target is not None and target.path in self._resident:
                self._resident.move_to_end(target.path)
            return target
        target = self._found_from[key] = self.find_module(name, requester)
        if requester is not None:
            user = self._absolute(requester.path)
            used = self.dependencies.get(user)
            if used is None:
                used = self.dependencies[user] = set()
            if target is not None:
                used.add(self._absolute(target.path))
            if not self.has_stub(name):
                roots = self.import_roots(requester)
                found = self._found.get((roots, name))
                for path in self.candidate_paths(name, roots):
                    if path == found:
                        if self._may_read(requester, path):  # (another installed package never is)
                            used.add(path)
                        break
                    used.add(path)
        return target

    def _absolute(self, path: str) -> str:
        found = self._absolute_paths.get(path)
        if found is None:
            found = self._absolute_paths[path] = os.path.abspath(path)
        return found

    def candidate_paths(self, name: str, roots: tuple[str, ...]) -> list[str]:
        """The files a module name may be, in the order Python looks: root by root, a
        package before a module of the same name."""
        key = (roots, name)
        found = self._candidates.get(key)
        if found is None:
            relative = os.path.join(*name.split("."))
            found = self._candidates[key] = [
                path for root in roots
                for path in (os.path.join(root, relative, "__init__.py"), os.path.join(root, relative + ".py"))]
        return found


    @staticmethod
    def resolve_import(module: ModuleSymbols, ref: ImportRef) -> str:
        """The absolute dotted name an import refers to (for ``from x import y``: x)."""
        if ref.level == 0:
            return ref.module
        return _relative_import_target(module.name, module.is_package, ref.module, ref.level)

    # -- the fast path --------------------------------------------------------------------
    # A module whose values can all be unknown cannot give a finding, so inference skips
    # it. Its values can be known when it declares units itself, or when it imports a name
    # that may carry units; that is followed name by name through re-exports, so a
    # package's ``__init__`` that re-exports one unit-bearing helper does not pull every
    # importer of the package into the analysis.
    def can_have_units(self, module: ModuleSymbols) -> bool:
        return self._reaches_marked(("module", module))

    def _marked(self, module: ModuleSymbols) -> bool:
        found = self._marks.get(module.path)
        if found is None:
            if module.is_stub:  # pint's objects carry units at run time (inference/pint_support.py)
                found = stub_has_units(module) or _is_pint(module)
            else:
                found = (module.declares_from_text or _has_scaled_comment_unit(module)
                         or _has_marker(module.source))
            self._marks[module.path] = found
        return found

    def _reaches_marked(self, start: tuple) -> bool:
        """Search the import graph from ``start`` for a module that declares units.

        When a search finds nothing, nothing it visited can reach one either, so all of
        it is remembered as unit-free; the graph may have cycles and is never walked twice.
        """
        memo = self._tainted
        start_key = _node_key(start)
        if start_key in memo:
            return memo[start_key]
        seen = {start_key}
        stack = [start]
        while stack:
            node = stack.pop()
            key = _node_key(node)
            known = memo.get(key)
            if known is False:
                continue
            if known or node is _UNIT_BEARING or (node[0] == "module" and self._marked(node[1])):
                memo[start_key] = True
                return True
            for successor in self._successors(node):
                successor_key = _node_key(successor)
                if successor_key not in seen:
                    seen.add(successor_key)
                    stack.append(successor)
        for key in seen:
            memo[key] = False
        return False

    def _successors(self, node: tuple):
        if node[0] == "module":
            module = node[1]
            if not module.is_stub:
                for ref in module.imports.values():
                    yield from self._import_targets(module, ref)
            return
        _, module, name = node
        if module.is_stub:
            spec = module.globals_declared.get(name)
            if (spec is not None and not _plain_dimensionless_spec(spec[0])) or _is_pint(module):
                yield _UNIT_BEARING
            return
        defined_here = name in module.functions or name in module.classes or name in module.globals_declared
        if name in module.imports and not defined_here:
            yield from self._import_targets(module, module.imports[name])
        elif name in module.globals_declared or name in module.aliases:
            # `X: Final = ...`, `Array: TypeAlias = Any`: only a real unit, or an alias of one
            spec = module.globals_declared[name][0] if name in module.globals_declared else module.aliases[name]
            yield from self._spec_successors(module, spec, exclude=name)
        elif name in module.functions or name in module.classes:
            yield from self._definition_successors(module, name)
        else:
            yield ("module", module)  # a plain module-level value: whatever the module holds

    def _module_may_reach_units(self, start: ModuleSymbols) -> bool:
        """The coarse question, module by module (any import of a module counts): a cheap
        filter before the name-by-name search, which reads function bodies."""
        memo = self._coarse
        if start.path in memo:
            return memo[start.path]
        seen = {start.path}
        stack = [start]
        while stack:
            module = stack.pop()
            known = memo.get(module.path)
            if known is False:
                continue
            if known or self._marked(module):
                memo[start.path] = True
                return True
            if module.is_stub:
                continue
            for ref in module.imports.values():
                for successor in self._import_targets(module, ref):
                    if successor is _UNIT_BEARING:
                        memo[start.path] = True
                        return True
                    target = successor[1]
                    if target.path not in seen:
                        seen.add(target.path)
                        stack.append(target)
        for path in seen:
            memo[path] = False
        return False

    @staticmethod
    def _spec_successors(module: ModuleSymbols, spec, exclude: str):
        """A declaration can carry a unit if it is one, or names an alias that may be one."""
        if isinstance(spec, AliasRef):
            first = spec.parts[0]  # `x: Length` may be a unit alias; `x: int` is not
            if first != exclude and (first in module.aliases or first in module.imports):
                yield ("name", module, first)
        elif spec is not None and not _plain_dimensionless_spec(spec):
            yield _UNIT_BEARING

    def _definition_successors(self, module: ModuleSymbols, name: str):
        """A function or class can hand out units only through its own declarations or the
        module-level names its body uses: follow those instead of the whole module, so one
        documented function does not make every importer of its module worth analysing."""
        if not self._module_may_reach_units(module):
            return  # nothing the whole module can reach declares a unit: no need to look closer
        specs = []
        if name in module.functions:
            functions = [module.functions[name]]
        else:
            info = module.classes[name]
            functions = list(info.methods.values())
            specs = [spec for spec, _ in info.attributes.values()]
        for function in functions:
            specs += [function.return_spec, *(param.spec for param in function.params)]
        used: set[str] = set()
        for spec in specs:
            for successor in self._spec_successors(module, spec, exclude=name):
                if successor is _UNIT_BEARING:
                    yield _UNIT_BEARING
                    return
                used.add(successor[2])
        declares_inside, names_used = self._body_summary(module, name)
        if declares_inside:
            yield _UNIT_BEARING  # a local declaration in its body
            return
        for other in sorted(used | names_used):
            yield ("name", module, other)

    def _body_summary(self, module: ModuleSymbols, name: str) -> tuple[bool, frozenset[str]]:
        """Whether a definition's lines declare a unit, and the module-level names they
        mention. Read from the text, not the tree, which the module may have released: a
        name seen only in a string or comment counts too, which only widens the analysis."""
        key = (module.path, name)
        found = self._bodies.get(key)
        if found is not None:
            return found
        info = module.functions[name] if name in module.functions else module.classes[name]
        first, last = info.lines
        declares = any(first <= line <= last and unit.text not in _PLAIN_DIMENSIONLESS
                       for line, unit in module.comment_units.items())
        text = "\n".join(module.line_text(line) for line in range(first, last + 1))
        declares = declares or any(
            next(filter(None, match.groups()), "").strip() not in _PLAIN_DIMENSIONLESS
            for match in _LOCAL_UNITS.finditer(text))
        top_level = module.functions.keys() | module.classes.keys() | module.globals_declared.keys() \
            | module.imports.keys() | module.aliases.keys()
        used = frozenset(word for word in set(_IDENTIFIER.findall(text)) if word in top_level and word != name)
        found = self._bodies[key] = (declares, used)
        return found

    def _import_targets(self, module: ModuleSymbols, ref: ImportRef):
        base = self.resolve_import(module, ref)
        if ref.attr is None:
            target = self.find_from(module, base)
            if target is not None:
                yield ("module", target)
            elif self._unitful_stub_below(base):
                yield _UNIT_BEARING
            return
        submodule = self.find_from(module, f"{base}.{ref.attr}")
        if submodule is not None:
            yield ("module", submodule)
            return
        target = self.find_from(module, base)
        if target is not None:
            yield ("name", target, ref.attr)

    def _unitful_stub_below(self, package: str) -> bool:
        """``import scipy`` then ``scipy.constants.g``: a unit-bearing stub under the name."""
        prefix = package + "."
        return any(name.startswith(prefix) and stub_has_units(self.stub_module(name))
                   for name in self._stub_paths if self.stub_module(name) is not None)


def _read_again(path: str) -> str:
    """A released module's source, read again; a file gone since reads as empty."""
    try:
        return read_source(path)
    except UnreadableFile:
        return ""


@lru_cache(maxsize=100_000)  # a module resolves the same relative import for each name it takes
def _relative_import_target(importer: str, is_package: bool, name: str, level: int) -> str:
    package = importer.split(".") if is_package else importer.split(".")[:-1]
    if level > 1:
        package = package[: len(package) - (level - 1)] if len(package) >= level - 1 else []
    return ".".join(part for part in [*package, name] if part)


class _Pin:
    __slots__ = ("pins", "path")

    def __init__(self, pins: dict[str, int], path: str):
        self.pins, self.path = pins, path

    def __enter__(self) -> None:
        self.pins[self.path] = self.pins.get(self.path, 0) + 1

    def __exit__(self, *exc) -> None:
        self.pins[self.path] -= 1


_UNIT_BEARING = ("unit-bearing",)


def _node_key(node: tuple) -> tuple:
    if node is _UNIT_BEARING:
        return node
    if node[0] == "module":
        return ("module", node[1].path)
    return ("name", node[1].path, node[2])


def _is_pint(module: ModuleSymbols) -> bool:
    """pint's objects carry units at run time, so anything imported from pint may."""
    return module.name.split(".")[0] == "pint"


def _plain_dimensionless_spec(spec) -> bool:
    text = getattr(spec, "text", None)
    return text is not None and text.strip() in _PLAIN_DIMENSIONLESS


def stub_has_units(module: ModuleSymbols) -> bool:
    """A stub can hand out a known unit from nothing only through a constant that is more
    than a plain dimensionless number (stub functions give unknown results for unknown
    arguments); a degree constant counts, since degrees can reach a radian parameter. Read
    from the text alone; a false yes only costs a fuller analysis."""
    return any(not _plain_dimensionless_spec(spec) for spec, _ in module.globals_declared.values())
