"""Notebooks read as one module: cell order, cell numbers, IPython escapes, malformed files."""

from __future__ import annotations

import ast
import json
from pathlib import Path

import pytest

from dimcheck import check_source
from dimcheck.declarations import notebooks
from dimcheck.declarations.notebooks import (
    NotebookError,
    NotebookSource,
    NotPythonNotebook,
    blank_ipython_syntax,
    read_notebook,
    read_notebook_file,
)

FIXTURE = Path(__file__).resolve().parents[2] / "fixtures" / "notebooks" / "pump_sizing.ipynb"


def code(source, as_list=True):
    if as_list and isinstance(source, str):
        source = source.splitlines(True)
    return {"cell_type": "code", "execution_count": None, "metadata": {}, "outputs": [], "source": source}


def markdown(source="Some prose.\n"):
    return {"cell_type": "markdown", "metadata": {}, "source": source}


def raw(source="raw text\n"):
    return {"cell_type": "raw", "metadata": {}, "source": source}


def notebook(*cells, language="python") -> bytes:
    document = {
        "cells": list(cells),
        "metadata": {"kernelspec": {"name": "k", "display_name": "K", "language": language}},
        "nbformat": 4,
        "nbformat_minor": 5,
    }
    return json.dumps(document).encode("utf-8")


def text_lines(source: NotebookSource) -> list[str]:
    return source.text.split("\n")[:-1]


# -- order, numbering, line mapping -----------------------------------------------------------

def test_code_cells_are_joined_in_order():
    source = read_notebook(notebook(code("a = 1\n"), code("b = 2\nc = 3\n"), code("d = 4")))
    assert source.text == "a = 1\nb = 2\nc = 3\nd = 4\n"
    assert source.cells == [(1, 1, 1), (2, 2, 2), (3, 4, 1)]


def test_markdown_and_raw_cells_count_in_the_cell_number():
    source = read_notebook(notebook(markdown(), code("a = 1\n"), raw(), markdown(), code("b = a\n")))
    assert source.text == "a = 1\nb = a\n"
    assert source.cells == [(2, 1, 1), (5, 2, 1)]
    assert source.locate(1) == (2, 1)
    assert source.locate(2) == (5, 1)


def test_source_as_a_string_or_a_list():
    as_list = read_notebook(notebook(code("x = 1\ny = 2\n")))
    as_string = read_notebook(notebook(code("x = 1\ny = 2\n", as_list=False)))
    assert as_list.text == as_string.text == "x = 1\ny = 2\n"
    assert as_list.cells == as_string.cells


def test_line_pieces_without_newlines_are_concatenated_as_nbformat_says():
    # nbformat joins the list's strings as they are; "x = " + "1\n" is one line
    source = read_notebook(notebook(code(["x = ", "1\n", "y = 2"])))
    assert source.text == "x = 1\ny = 2\n"


def test_locate_maps_every_line_back_to_its_cell():
    source = read_notebook(notebook(
        markdown(), code("a = 1\nb = 2\nc = 3\n"), markdown(), code("d = 4\n\ne = 5\n"), code("f = 6")))
    expected = [(2, 1), (2, 2), (2, 3), (4, 1), (4, 2), (4, 3), (5, 1)]
    assert [source.locate(line) for line in range(1, 8)] == expected
    lines = text_lines(source)
    assert lines[source.cells[1][1] - 1] == "d = 4"


def test_empty_code_cells_take_no_lines_and_are_never_located():
    source = read_notebook(notebook(code(""), code("a = 1\n"), code([]), code("b = 2\n")))
    assert source.text == "a = 1\nb = 2\n"
    assert source.cells == [(1, 1, 0), (2, 1, 1), (3, 2, 0), (4, 2, 1)]
    assert source.locate(1) == (2, 1)
    assert source.locate(2) == (4, 1)


def test_a_cell_of_blank_lines_keeps_its_lines():
    source = read_notebook(notebook(code("\n\n"), code("a = 1\n")))
    assert source.cells == [(1, 1, 2), (2, 3, 1)]
    assert source.locate(3) == (2, 1)


def test_windows_and_old_mac_line_endings():
    source = read_notebook(notebook(code("a = 1\r\nb = 2\r\n", as_list=False), code("c = 3\rd = 4", as_list=False)))
    assert source.text == "a = 1\nb = 2\nc = 3\nd = 4\n"
    assert source.locate(4) == (2, 2)


def test_locate_past_the_end_stays_in_the_last_cell():
    source = read_notebook(notebook(code("a = 1\n"), code("b = (\n"), markdown()))
    assert source.locate(3) == (2, 2)


def test_locate_refuses_impossible_lines():
    source = read_notebook(notebook(code("a = 1\n")))
    with pytest.raises(ValueError):
        source.locate(0)
    empty = read_notebook(notebook(markdown(), code("")))
    assert empty.text == ""
    with pytest.raises(ValueError):
        empty.locate(1)


def test_columns_are_unchanged():
    source = read_notebook(notebook(code("x = 1\n"), code("    \n  # indented comment\nyy = x + 2\n")))
    line = text_lines(source)[3]
    assert line == "yy = x + 2"
    tree = ast.parse(source.text)
    assert tree.body[-1].value.col_offset == 5
    assert source.locate(tree.body[-1].lineno) == (2, 3)


def test_cell_text():
    source = read_notebook(notebook(markdown(), code("a = 1\nb = 2\n"), code("%pwd\nc = 3\n")))
    assert source.cell_text(2) == "a = 1\nb = 2\n"
    assert source.cell_text(3) == "\nc = 3\n"
    with pytest.raises(KeyError):
        source.cell_text(1)


def test_nbformat_3_worksheets():
    document = {
        "nbformat": 3,
        "metadata": {"name": "old"},
        "worksheets": [
            {"cells": [{"cell_type": "heading", "level": 1, "source": "Title"},
                       {"cell_type": "code", "language": "python", "input": ["a = 1\n"], "outputs": []}]},
            {"cells": [{"cell_type": "markdown", "source": "text"},
                       {"cell_type": "code", "language": "python", "input": "b = a\n", "outputs": []}]},
        ],
    }
    source = read_notebook(json.dumps(document).encode())
    assert source.text == "a = 1\nb = a\n"
    assert source.cells == [(2, 1, 1), (4, 2, 1)]


def test_a_byte_order_mark_is_tolerated():
    source = read_notebook(b"\xef\xbb\xbf" + notebook(code("a = 1\n")))
    assert source.text == "a = 1\n"


def test_non_ascii_source():
    source = read_notebook(notebook(code("débit = 2.5  # [m^3/s] débit d'été\n")))
    assert "débit" in source.text


# -- IPython escapes ---------------------------------------------------------------------------

@pytest.mark.parametrize("line", [
    "%matplotlib inline",
    "%load_ext autoreload",
    "%autoreload 2",
    "!pip install numpy",
    "!!ls -l",
    "?math.sqrt",
    "??math.sqrt",
    "math.sqrt?",
    "math.sqrt??",
    "%timeit?",
    "np.*load*?",
    "files = !ls *.csv",
    "a, b = %who_ls",
    "result = %timeit -o f()",
    "/print a b",
    ",print a b",
    ";print a b",
    "   %time f()",
])
def test_line_escapes_are_blanked(line):
    source = read_notebook(notebook(code(f"a = 1\n{line}\nb = a\n")))
    lines = text_lines(source)
    assert lines[0] == "a = 1" and lines[2] == "b = a"
    assert lines[1].strip() in ("", "pass")
    ast.parse(source.text)


def test_the_fixture_magic_line():
    lines = blank_ipython_syntax(["%matplotlib inline", "import math"])
    assert lines == ["", "import math"]


def test_an_escape_opening_a_block_becomes_pass_so_the_block_still_parses():
    cell = "for name in ['a.csv', 'b.csv']:  # each file\n    !gzip {name}\nafter = 1\n"
    source = read_notebook(notebook(code(cell)))
    assert text_lines(source) == ["for name in ['a.csv', 'b.csv']:  # each file", "    pass", "after = 1"]
    ast.parse(source.text)


def test_an_escape_later_in_a_block_is_blanked():
    cell = "if True:\n    x = 1\n    %pwd\n    y = 2\n"
    source = read_notebook(notebook(code(cell)))
    assert text_lines(source) == ["if True:", "    x = 1", "", "    y = 2"]
    ast.parse(source.text)


def test_an_escape_after_a_dict_or_lambda_colon_is_blanked():
    for cell in ("d = {1:\n 2}\n  %pwd\n", "f = lambda: 1\n  %pwd\n"):
        lines = text_lines(read_notebook(notebook(code(cell))))
        assert lines[-1] == ""


@pytest.mark.parametrize("cell", [
    "y = (a\n     % b)\n",                      # modulo on a continuation line
    "ok = (a\n      != b)\n",                    # != on a continuation line
    "y = a \\\n    % b\n",                      # after a backslash continuation
    'doc = """\n%d items\n!important\nwhat?\n"""\n',  # inside a triple-quoted string
    "doc = '''\n  ?\n'''\n",
    "x = 1  # really?\n",                        # a comment ending in a question mark
    "s = 'why?'\n",
    "z = [\n    1,\n]\n%pwd\n",                   # closed brackets: the magic IS blanked
])
def test_python_that_looks_like_an_escape_is_kept(cell):
    source = read_notebook(notebook(code(cell)))
    original = cell.rstrip("\n").split("\n")
    kept = text_lines(source)
    if "%pwd" in cell:
        assert kept == original[:-1] + [""]
    else:
        assert kept == original
    ast.parse(source.text)


def test_string_continued_by_a_backslash():
    cell = "s = 'first \\\n%not a magic'\n%pwd\n"
    source = read_notebook(notebook(code(cell)))
    assert text_lines(source) == ["s = 'first \\", "%not a magic'", ""]


def test_cell_magics_blank_the_whole_cell():
    cells = [code("a = 1\n"), code("%%timeit\nb = a + 1\n"), code("%%bash\necho hi\nls -l\n"),
             code("\n%%writefile out.py\nprint('x')\n"), code("c = a\n")]
    source = read_notebook(notebook(*cells))
    assert text_lines(source) == ["a = 1"] + [""] * 8 + ["c = a"]
    assert source.cells == [(1, 1, 1), (2, 2, 2), (3, 4, 3), (4, 7, 3), (5, 10, 1)]
    assert source.locate(10) == (5, 1)
    ast.parse(source.text)


@pytest.mark.parametrize("magic", ["%%time", "%%capture output"])
def test_cell_magics_that_run_notebook_code_keep_their_body(magic):
    source = read_notebook(notebook(code(f"{magic}\nb = 2\n%pwd\nc = b\n")))
    assert text_lines(source) == ["", "b = 2", "", "c = b"]


def test_a_percent_sign_inside_a_cell_is_not_a_cell_magic():
    source = read_notebook(notebook(code("a = 1\n%%timeit\n")))
    assert text_lines(source) == ["a = 1", ""]


# -- syntax errors -----------------------------------------------------------------------------

def test_a_broken_cell_is_kept_and_pinpointed():
    source = read_notebook(notebook(code("a = 1\n"), markdown(), code("b = 2\nif b\n    c = 3\n"), code("d = 4\n")))
    assert text_lines(source) == ["a = 1", "b = 2", "if b", "    c = 3", "d = 4"]
    with pytest.raises(SyntaxError):
        ast.parse(source.text)
    errors = source.cell_syntax_errors()
    assert [(cell, line) for cell, line, _ in errors] == [(3, 2)]
    assert errors[0][2]


def test_an_open_bracket_at_the_end_of_a_cell():
    # the join fails further down (the bracket swallows the next cell); the cell is at fault
    source = read_notebook(notebook(code("total = (1 +\n"), code("x = 2\n")))
    with pytest.raises(SyntaxError):
        ast.parse(source.text)
    assert [(cell, line) for cell, line, _ in source.cell_syntax_errors()] == [(1, 1)]


def test_cells_that_parse_alone_parse_together():
    cells = ["import math\n", "def f(x):\n    return x\n", "class A:\n    y = 1", "# only a comment",
             "if True:\n    z = 1\n# trailing comment\n", "@property\ndef g(self):\n    return 2\n",
             "await something()\n", "x = '''\nmulti\n'''"]
    source = read_notebook(notebook(*(code(cell) for cell in cells)))
    assert source.cell_syntax_errors() == []
    ast.parse(source.text)


def test_null_bytes_in_a_cell():
    source = read_notebook(notebook(code("a = 1\n"), code("b = '\x00'\n")))
    assert [(cell, line) for cell, line, _ in source.cell_syntax_errors()] == [(2, 1)]


def test_error_line_is_clamped_inside_the_cell():
    source = read_notebook(notebook(code("x = [1,\n     2,\n")))
    ((cell, line, _),) = source.cell_syntax_errors()
    assert cell == 1 and 1 <= line <= 2


# -- malformed input ---------------------------------------------------------------------------

@pytest.mark.parametrize("data, words", [
    (b"\xff\xfe{}", "not UTF-8"),
    (b"", "not valid JSON"),
    (b"{\"cells\": [", "not valid JSON"),
    (b"print('hello')\n", "not valid JSON"),
    (b"[1, 2]", "not an object"),
    (b"42", "not an object"),
    (b"{\"metadata\": {}}", "no \"cells\""),
    (b"{\"cells\": {}}", "\"cells\" is not a list"),
    (b"{\"worksheets\": 3}", "\"worksheets\" is not a list"),
    (b"{\"worksheets\": [{\"cells\": 1}]}", "worksheet 1"),
    (b"{\"cells\": [1]}", "bad cell 1"),
    (b"{\"cells\": [{\"source\": \"x\"}]}", "bad cell 1: no cell_type"),
    (b"{\"cells\": [{\"cell_type\": \"markdown\", \"source\": \"\"}, {\"cell_type\": \"code\", \"source\": 5}]}",
     "bad cell 2"),
    (b"{\"cells\": [{\"cell_type\": \"code\", \"source\": [\"a\", 1]}]}", "bad cell 1"),
    (b"[" * 200_000 + b"]" * 200_000, "not valid JSON"),
])
def test_malformed_notebooks(data, words):
    with pytest.raises(NotebookError) as caught:
        read_notebook(data)
    message = str(caught.value)
    assert words in message
    assert "\n" not in message


def test_malformed_cells_in_markdown_do_not_matter():
    # only code cells' sources are read; a markdown cell's odd source is ignored
    data = json.dumps({"cells": [{"cell_type": "markdown", "source": 7}, code("a = 1\n")]}).encode()
    assert read_notebook(data).text == "a = 1\n"


def test_a_code_cell_without_source_is_empty():
    data = json.dumps({"cells": [{"cell_type": "code"}, code("a = 1\n")]}).encode()
    assert read_notebook(data).cells == [(1, 1, 0), (2, 1, 1)]


def test_size_limits(monkeypatch):
    big = notebook(*(code(f"v{n} = {n}\n") for n in range(50)))
    assert read_notebook(big).cells[-1] == (50, 50, 1)
    for name, value, words in [("MAX_NOTEBOOK_BYTES", 100, "MiB"), ("MAX_CELLS", 10, "cells"),
                               ("MAX_CODE_LINES", 20, "lines of code"),
                               ("MAX_CODE_CHARACTERS", 100, "characters of code")]:
        with monkeypatch.context() as patch:
            patch.setattr(notebooks, name, value)
            with pytest.raises(NotebookError, match="notebook too large") as caught:
                read_notebook(big)
            assert words in str(caught.value)


def test_other_languages_are_refused_with_their_own_error():
    with pytest.raises(NotPythonNotebook) as caught:
        read_notebook(notebook(code("x <- 1\n"), language="R"))
    assert caught.value.language == "r"
    assert isinstance(caught.value, NotebookError)
    info = {"cells": [code("x = 1\n")], "metadata": {"language_info": {"name": "julia"}}}
    with pytest.raises(NotPythonNotebook):
        read_notebook(json.dumps(info).encode())


def test_missing_or_odd_metadata_means_python():
    for metadata in (None, {}, {"kernelspec": 3}, {"kernelspec": {"language": ""}}, []):
        data = json.dumps({"cells": [code("x = 1\n")], "metadata": metadata}).encode()
        assert read_notebook(data).language == "python"
    data = json.dumps({"cells": [code("x = 1\n")],
                       "metadata": {"kernelspec": {"language": "Python"}}}).encode()
    assert read_notebook(data).text == "x = 1\n"


def test_read_notebook_file(tmp_path):
    path = tmp_path / "n.ipynb"
    path.write_bytes(notebook(code("a = 1\n")))
    assert read_notebook_file(str(path)).text == "a = 1\n"
    with pytest.raises(NotebookError, match="cannot read file"):
        read_notebook_file(str(tmp_path / "missing.ipynb"))
    with pytest.raises(NotebookError, match="directory"):
        read_notebook_file(str(tmp_path))


def test_outputs_are_never_read():
    cell = code("a = 1\n")
    cell["outputs"] = [{"output_type": "stream", "name": "stdout", "text": ["%%bash\n", "oops(\n"]}]
    assert read_notebook(notebook(cell)).text == "a = 1\n"


# -- the fixture -------------------------------------------------------------------------------

def test_fixture_layout():
    source = read_notebook(FIXTURE.read_bytes())
    assert [cell for cell, _, _ in source.cells] == [2, 3, 4, 6, 8]
    assert text_lines(source)[0] == ""  # %matplotlib inline
    ast.parse(source.text)
    assert source.cell_syntax_errors() == []
    document = json.loads(FIXTURE.read_text(encoding="utf-8"))
    kinds = [cell["cell_type"] for cell in document["cells"]]
    assert kinds == ["markdown", "code", "code", "code", "markdown", "code", "raw", "code"]


def test_fixture_bug_is_in_cell_4_line_3():
    source = read_notebook(FIXTURE.read_bytes())
    found = [(f.line, f.column, f.code) for f in check_source(source.text, "pump_sizing.py")]
    assert len(found) == 1
    line, column, rule = found[0]
    assert rule == "DIM101"
    assert source.locate(line) == (4, 3)
    assert column == 34
    assert source.cell_text(4).split("\n")[2][column - 1:].startswith("static_head + line_loss")
