"""Jupyter notebooks (``.ipynb``) as Python source: the code cells joined into one module.

A notebook is JSON, read here with the stdlib ``json`` module; nothing in it is run. The
layout read is the one documented for nbformat (Jupyter's notebook format documentation,
"The Notebook file format"): version 4 keeps a top-level ``"cells"`` list, version 3 a
``"worksheets"`` list whose items each hold ``"cells"``. A code cell has
``"cell_type": "code"`` and its text in ``"source"`` (``"input"`` in version 3), either one
string or a list of strings that are concatenated as they are (each usually ends in ``\\n``).

Contract, section 6: the code cells are checked as one module, in order, and a finding
is reported by cell (1-based index among ALL cells, markdown and raw included) and by
line and column within that cell. ``NotebookSource.text`` is that module and
``NotebookSource.locate`` maps its line numbers back. Columns need no mapping: a line of
``text`` is the cell's line unchanged, or blank.

IPython syntax is not Python, so these lines are blanked (line numbers stay stable) before
the text is parsed. The escapes are those described in IPython's documentation ("Built-in
magic commands", "IPython reference: system shell access, dynamic object information"):

* line magics and shell escapes at the start of a statement: ``%matplotlib inline``,
  ``%load_ext x``, ``!pip install x``, ``!!ls``, and their assignment forms
  ``files = !ls`` and ``t = %timeit -o f()``;
* help: ``?obj``, ``??obj``, ``obj?``, ``obj.attr??``;
* IPython's auto-call and auto-quote escapes, a statement starting with ``/``, ``,`` or ``;``;
* a cell magic (the cell's first non-blank line starts with ``%%``): the whole cell is
  blanked, since its body is usually another language (``%%bash``, ``%%writefile``) or run
  apart (``%%timeit``). Two cell magics run their body as ordinary notebook code whose
  names stay defined, ``%%time`` and ``%%capture``: only their first line is blanked.

"Start of a statement" is tracked with a small scanner (brackets, strings, backslash
continuations), so a continuation line such as ``    % modulus)`` or a line inside a
triple-quoted string is never taken for a magic. A blanked line that was indented becomes
``pass`` at the same indentation when it is the first line of a block (the line before it
ends with ``:``), so that ``for f in files:`` / ``    !gzip {f}`` still parses; elsewhere a
blank line is always safe.

A cell with a syntax error is kept as it is. If the joined text does not parse, the
caller reports DIM902 for the notebook; ``cell_syntax_errors`` parses each cell on its own
to say which cell is at fault. When every cell parses on its own the joined text parses too
(each cell is then a whole sequence of statements), so the only failures of the join
are cells that fail alone.
"""

from __future__ import annotations

import ast
import bisect
import json
import re
import warnings
from dataclasses import dataclass, field

# Guards. Outputs (images above all) make real notebooks large, so the byte limit is
# generous; the code itself is limited separately.
MAX_NOTEBOOK_BYTES = 64 * 1024 * 1024
MAX_CELLS = 20_000
MAX_CODE_LINES = 200_000
MAX_CODE_CHARACTERS = 10 * 1024 * 1024

_PYTHON_LANGUAGES = frozenset({"python", "python2", "python3", "ipython", "ipython2", "ipython3", "py"})

# Cell magics whose body is notebook code run in the user's namespace (see module docstring).
_PYTHON_BODY_CELL_MAGICS = frozenset({"time", "capture"})

_NEWLINE = re.compile(r"\r\n|\r|\n")
# First character of a statement that makes it an IPython escape (never valid Python there).
_ESCAPE_STARTS = ("%", "!", "?", "/", ",", ";")
# "name = !cmd", "a, b = %magic ..."
_ASSIGNED_ESCAPE = re.compile(r"[A-Za-z_][\w.]*(\s*,\s*[A-Za-z_][\w.]*)*\s*=\s*[!%]")
# "obj?", "obj.attr??", "%magic?", "np.*load*?"
_HELP_END = re.compile(r"%{0,2}[A-Za-z_*][\w*]*(\.[\w*]+)*\?\??\s*")
# A quick test over a whole cell: can any line be one of the escapes above?
_MAYBE_ESCAPE = re.compile(r"^[ \t]*[%!?/,;]|\?[ \t]*$|=[ \t]*[!%]", re.MULTILINE)
# Characters the statement scanner must look at, outside strings and inside each kind of string.
_SPECIAL = re.compile(r"[\"'#()\[\]{}\\]")
_QUOTE_STOPS = {quote: re.compile(r"\\|" + re.escape(quote)) for quote in ('"', "'", '"""', "'''")}


class NotebookError(Exception):
    """A notebook that cannot be read: the message is one line, for DIM902."""


class NotPythonNotebook(NotebookError):
    """A well-formed notebook whose kernel language is not Python (the caller may skip it)."""

    def __init__(self, message: str, language: str):
        super().__init__(message)
        self.language = language


@dataclass(frozen=True)
class NotebookSource:
    text: str  # the code cells joined in order into one module's source
    # (cell index, 1-based among ALL cells; first line of the cell in ``text``; line count)
    cells: list[tuple[int, int, int]]
    language: str = field(default="python", compare=False)

    def locate(self, line: int) -> tuple[int, int]:
        """Map a 1-based line of ``text`` to (cell number, 1-based line within that cell).

        A line past the end (a syntax error reported at end of input) is placed after the
        last line of the last non-empty code cell. Raises ``ValueError`` for a line below 1
        or when the notebook has no code lines at all (nothing can then be reported by cell).
        """
        if line < 1:
            raise ValueError(f"line {line} is not a line of the notebook")
        filled = [cell for cell in self.cells if cell[2] > 0]
        if not filled:
            raise ValueError("the notebook has no code lines")
        starts = [cell[1] for cell in filled]
        position = bisect.bisect_right(starts, line) - 1
        if position < 0:  # cannot happen: the first filled cell starts on line 1
            position = 0
        index, first, _count = filled[position]
        return index, line - first + 1

    def cell_text(self, cell: int) -> str:
        """The (magic-blanked) text of one code cell, by its notebook cell number."""
        for index, first, count in self.cells:
            if index == cell:
                lines = self.text.split("\n")[first - 1 : first - 1 + count]
                return "".join(line + "\n" for line in lines)
        raise KeyError(cell)

    def cell_syntax_errors(self) -> list[tuple[int, int, str]]:
        """Each code cell parsed on its own: (cell number, line within cell, message) per failure.

        Use it after the joined ``text`` failed to parse, to report DIM902 at the cell at
        fault (the first item) rather than at the notebook. The message is the parser's
        (``"invalid syntax"``, ``"unexpected indent"``, ...); a cell too deep for the parser
        or holding a NUL character gives a message of its own at line 1.
        """
        lines = self.text.split("\n")
        problems: list[tuple[int, int, str]] = []
        for index, first, count in self.cells:
            if count == 0:
                continue
            source = "".join(line + "\n" for line in lines[first - 1 : first - 1 + count])
            try:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore")  # SyntaxWarning: not our report
                    ast.parse(source)
            except SyntaxError as error:
                line = min(max(error.lineno or 1, 1), count)
                problems.append((index, line, error.msg or "invalid syntax"))
            except ValueError:
                problems.append((index, 1, "source contains a null byte"))
            except (RecursionError, MemoryError):
                problems.append((index, 1, "nesting too deep for the Python parser"))
        return problems


def read_notebook_file(path: str) -> NotebookSource:
    """``read_notebook`` on a file's bytes; an unreadable file is a ``NotebookError`` too."""
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_NOTEBOOK_BYTES + 1)
    except IsADirectoryError:
        raise NotebookError("is a directory, not a file") from None
    except OSError as error:
        raise NotebookError(f"cannot read file: {error.strerror or error}") from None
    return read_notebook(data)


def read_notebook(data: bytes) -> NotebookSource:
    """The code cells of a notebook's JSON, joined in order, IPython escapes blanked.

    Raises ``NotebookError`` (one-line message) for bytes that are not UTF-8 JSON, JSON that
    is not a notebook, a malformed cell, or a notebook over the size limits; and
    ``NotPythonNotebook`` (a ``NotebookError``) when the notebook declares another language.
    """
    if len(data) > MAX_NOTEBOOK_BYTES:
        raise NotebookError(f"notebook too large: over {MAX_NOTEBOOK_BYTES // (1024 * 1024)} MiB")
    try:
        raw = data.decode("utf-8-sig")  # the JSON standard's encoding; a BOM is tolerated
    except UnicodeDecodeError as error:
        raise NotebookError(f"notebook is not UTF-8: invalid byte at offset {error.start}") from None
    try:
        document = json.loads(raw)
    except json.JSONDecodeError as error:
        raise NotebookError(f"notebook is not valid JSON: {error.msg} at line {error.lineno} "
                            f"column {error.colno}") from None
    except (ValueError, RecursionError, MemoryError) as error:
        kind = "nested too deeply" if isinstance(error, RecursionError) else "unreadable"
        raise NotebookError(f"notebook is not valid JSON: {kind}") from None
    cells = _all_cells(document)
    language = _language(document)
    if language not in _PYTHON_LANGUAGES:
        raise NotPythonNotebook(f"notebook language is {language!r}, not Python", language)
    return _join(cells, language)


def _all_cells(document) -> list:
    if not isinstance(document, dict):
        raise NotebookError("not a notebook: the JSON is not an object")
    if "cells" in document:
        cells = document["cells"]
        if not isinstance(cells, list):
            raise NotebookError("not a notebook: \"cells\" is not a list")
    elif "worksheets" in document:  # nbformat 3
        worksheets = document["worksheets"]
        if not isinstance(worksheets, list):
            raise NotebookError("not a notebook: \"worksheets\" is not a list")
        cells = []
        for number, sheet in enumerate(worksheets, 1):
            if not isinstance(sheet, dict) or not isinstance(sheet.get("cells", []), list):
                raise NotebookError(f"not a notebook: worksheet {number} has no list of cells")
            cells.extend(sheet.get("cells", []))
    else:
        raise NotebookError("not a notebook: no \"cells\" in the JSON object")
    if len(cells) > MAX_CELLS:
        raise NotebookError(f"notebook too large: over {MAX_CELLS} cells")
    return cells


def _language(document: dict) -> str:
    metadata = document.get("metadata")
    if isinstance(metadata, dict):
        for key, inner in (("kernelspec", "language"), ("language_info", "name")):
            section = metadata.get(key)
            if isinstance(section, dict) and isinstance(section.get(inner), str) and section[inner]:
                return section[inner].strip().lower()
        if isinstance(metadata.get("language"), str) and metadata["language"]:
            return metadata["language"].strip().lower()
    return "python"


def _cell_source(cell, number: int) -> str | None:
    """A code cell's text, or None for any other cell."""
    if not isinstance(cell, dict):
        raise NotebookError(f"bad cell {number}: not a JSON object")
    kind = cell.get("cell_type")
    if not isinstance(kind, str):
        raise NotebookError(f"bad cell {number}: no cell_type")
    if kind != "code":
        return None
    key = "source" if "source" in cell else "input"  # "input" in nbformat 3
    source = cell.get(key, "")
    if isinstance(source, str):
        return source
    if isinstance(source, list) and all(isinstance(piece, str) for piece in source):
        return "".join(source)
    raise NotebookError(f"bad cell {number}: source is neither a string nor a list of strings")


def _join(cells: list, language: str) -> NotebookSource:
    lines: list[str] = []
    spans: list[tuple[int, int, int]] = []
    characters = 0
    for number, cell in enumerate(cells, 1):
        source = _cell_source(cell, number)
        if source is None:
            continue
        characters += len(source)
        if characters > MAX_CODE_CHARACTERS:
            raise NotebookError(f"notebook too large: over {MAX_CODE_CHARACTERS} characters of code")
        cell_lines = _NEWLINE.split(source)
        if cell_lines[-1] == "":
            cell_lines.pop()
        if len(lines) + len(cell_lines) > MAX_CODE_LINES:
            raise NotebookError(f"notebook too large: over {MAX_CODE_LINES} lines of code")
        spans.append((number, len(lines) + 1, len(cell_lines)))
        lines.extend(blank_ipython_syntax(cell_lines))
    text = "".join(line + "\n" for line in lines)
    return NotebookSource(text, spans, language)


# -- IPython escapes -----------------------------------------------------------------------

def blank_ipython_syntax(lines: list[str]) -> list[str]:
    """One cell's lines with IPython-only lines blanked (same number of lines)."""
    first = next((line for line in lines if line.strip()), "")
    if first.lstrip().startswith("%%"):
        name = first.lstrip()[2:].split(None, 1)[0] if first.lstrip()[2:].strip() else ""
        if name not in _PYTHON_BODY_CELL_MAGICS:
            return ["" for _ in lines]
        magic_at = lines.index(first)
        lines = [*lines[:magic_at], "", *lines[magic_at + 1 :]]
    if not _MAYBE_ESCAPE.search("\n".join(lines)):
        return list(lines)  # the common case: no line can be an escape, nothing to scan
    result = []
    state = _ScanState()
    for line in lines:
        if state.at_statement_start() and _is_escape(line):
            indent = line[: len(line) - len(line.lstrip())]
            result.append(indent + "pass" if indent and state.opens_block else "")
            state.opens_block = False
            continue
        result.append(line)
        state.scan(line)
    return result


def _is_escape(line: str) -> bool:
    stripped = line.strip()
    if not stripped:
        return False
    if stripped.startswith(_ESCAPE_STARTS):
        return True
    if _ASSIGNED_ESCAPE.match(stripped):
        return True
    return _HELP_END.fullmatch(stripped) is not None


class _ScanState:
    """Enough of Python's tokenizer to know whether a line starts a new statement."""

    def __init__(self) -> None:
        self.depth = 0  # open brackets
        self.quote: str | None = None  # an open triple-quoted (or backslash-continued) string
        self.continued = False  # the previous line ended with a backslash
        self.opens_block = False  # the last statement line ended with ":" (a block follows)

    def at_statement_start(self) -> bool:
        return self.depth == 0 and self.quote is None and not self.continued

    def scan(self, line: str) -> None:
        self.continued = False
        quote = self.quote
        last = ""  # the last character outside comments (a string counts as its quote)
        index, end = 0, len(line)
        while index < end:
            if quote is not None:
                found = _QUOTE_STOPS[quote].search(line, index)
                if found is None:
                    break
                if found.group() == "\\":
                    if found.start() == end - 1:
                        self.continued = len(quote) == 1
                    index = found.start() + 2
                    continue
                index = found.end()
                last = quote[0]
                quote = None
                continue
            found = _SPECIAL.search(line, index)
            stop = end if found is None else found.start()
            segment = line[index:stop].rstrip()
            if segment:
                last = segment[-1]
            if found is None:
                break
            char = found.group()
            if char == "#":
                break
            last = char
            if char in "([{":
                self.depth += 1
            elif char in ")]}":
                self.depth = max(0, self.depth - 1)
            elif char in "\"'":
                quote = char * 3 if line.startswith(char * 3, stop) else char
                index = stop + len(quote)
                continue
            elif char == "\\" and stop == end - 1:
                self.continued = True
            index = stop + 1
        if quote is not None and len(quote) == 1 and not self.continued:
            quote = None  # an unterminated one-line string: a syntax error, not our concern
        self.quote = quote
        if last:
            self.opens_block = last == ":" and self.at_statement_start()
