"""The server's work without the protocol: columns, the suppression edit, and checking
text held in memory with the configuration and filters of ``dimcheck check``."""

from __future__ import annotations


from dimcheck.runner import Checker
from dimcheck.server.actions import suppression_edit
from dimcheck.server.positions import UTF8, UTF16, UTF32, byte_to_char, from_client, to_client
from dimcheck.server.session import Session

BUGGY = '''\
from typing import Annotated


def level(p: Annotated[float, "Pa"], z: Annotated[float, "m"]) -> Annotated[float, "m"]:
    return z + p
'''


def test_columns_convert_between_bytes_code_points_and_utf16():
    line = 'label = "Δp 😀"; x = p + z'
    at = line.index("p + z")
    byte_column = len(line[:at].encode("utf-8"))
    assert byte_to_char(line, byte_column) == at
    assert to_client(line, at, UTF16) == at + 1  # the emoji is two UTF-16 units
    assert to_client(line, at, UTF8) == byte_column
    assert to_client(line, at, UTF32) == at
    for encoding in (UTF8, UTF16, UTF32):
        assert from_client(line, to_client(line, at, encoding), encoding) == at


def test_suppression_edit_appends_or_extends_the_comment():
    assert suppression_edit("    return z + p", "DIM101").text == " # dimcheck: ignore[DIM101]"
    edit = suppression_edit("x = a + b  # dimcheck: ignore[DIM203]", "DIM101")
    line = "x = a + b  # dimcheck: ignore[DIM203]"
    assert line[:edit.start] + edit.text + line[edit.end:] == "x = a + b  # dimcheck: ignore[DIM203, DIM101]"
    assert suppression_edit(line, "DIM203") is None       # already there
    assert suppression_edit("x = a + b  # dimcheck: ignore", "DIM101") is None
    assert suppression_edit("x = a + \\", "DIM101") is None  # no comment after a continuation


def test_suppression_edit_never_touches_a_string_literal():
    def applied(line: str, code: str):
        edit = suppression_edit(line, code)
        return None if edit is None else line[:edit.start] + edit.text + line[edit.end:]

    # the ignore text inside a string is data: a real comment is added after it
    line = "s = '# dimcheck: ignore[DIM201]'; bad = depth + t"
    assert applied(line, "DIM101") == line + " # dimcheck: ignore[DIM101]"
    line = "s = '# dimcheck: ignore'; bad = depth + t"
    assert applied(line, "DIM101") == line + " # dimcheck: ignore[DIM101]"
    # a line that ends inside a triple-quoted string: a comment there would be text
    assert suppression_edit('msg = f"""{depth + t}', "DIM101") is None
    # a real comment after a string is extended as before
    line = 'label = "#1"; bad = depth + t  # dimcheck: ignore[DIM203]'
    assert applied(line, "DIM101") == 'label = "#1"; bad = depth + t  # dimcheck: ignore[DIM203, DIM101]'


def test_the_document_text_is_checked_not_the_file(tmp_path):
    path = tmp_path / "level.py"
    path.write_text(BUGGY.replace("z + p", "z"), encoding="utf-8")
    session = Session()
    assert session.check(str(path)) == []
    session.set_documents({str(path): BUGGY})
    [issue] = session.check(str(path))
    assert (issue.line, issue.character, issue.end_line, issue.end_character) == (4, 11, 4, 16)
    assert (issue.code, issue.severity) == ("DIM101", "error")


def test_findings_are_filtered_as_dimcheck_check_filters_them(tmp_path):
    path = tmp_path / "level.py"
    path.write_text(BUGGY, encoding="utf-8")
    session = Session()
    expected = [(f.line - 1, f.code) for f in Checker().check_files([str(path)])]
    assert [(i.line, i.code) for i in session.check(str(path))] == expected == [(4, "DIM101")]
    session.set_documents({str(path): BUGGY.replace("z + p\n", "z + p  # dimcheck: ignore[DIM101]\n")})
    assert session.check(str(path)) == []
    session.set_documents({str(path): "# dimcheck: skip-file\n" + BUGGY})
    assert session.check(str(path)) == []
    session.set_documents({str(path): BUGGY + "def broken(:\n"})
    [issue] = session.check(str(path))
    assert issue.code == "DIM902" and issue.line == 5


def test_configuration_select_and_exclude_apply(tmp_path):
    (tmp_path / "pyproject.toml").write_text(
        '[tool.dimcheck]\nselect = ["DIM2"]\nexclude = ["generated"]\n', encoding="utf-8")
    path = tmp_path / "level.py"
    path.write_text(BUGGY, encoding="utf-8")
    session = Session()
    assert session.check(str(path)) == []  # DIM101 is not selected
    scaled = BUGGY.replace('"Pa"', '"m"').replace('"m"]) ->', '"mm"]) ->')
    path.write_text(scaled, encoding="utf-8")
    assert [i.code for i in session.check(str(path))] == ["DIM201"]
    excluded = tmp_path / "generated" / "level.py"
    excluded.parent.mkdir()
    excluded.write_text(scaled, encoding="utf-8")
    assert session.check(str(excluded)) == []


def test_unchanged_modules_are_not_parsed_again(tmp_path):
    helper = tmp_path / "site_data.py"
    helper.write_text("depth = 3.0  # [m]\n", encoding="utf-8")
    path = tmp_path / "use.py"
    text = "from site_data import depth\n\nlevel = depth + 1.0  # [m]\n"
    path.write_text(text, encoding="utf-8")
    session = Session()
    session.set_documents({str(path): text})
    assert [i.code for i in session.check(str(path))] == ["DIM203"]
    parsed = session.store.parses
    session.set_documents({str(path): text.replace("1.0", "0.0")})
    assert session.check(str(path)) == []
    assert session.store.parses == parsed + 1  # the edited document only


def test_hover_describes_expressions_bindings_and_parameters(tmp_path):
    path = tmp_path / "level.py"
    path.write_text(BUGGY, encoding="utf-8")
    session = Session()
    lines = BUGGY.splitlines()
    hover = session.hover(str(path), 4, lines[4].index("p"))
    assert "Pa [M L^-1 T^-2]" in hover.markdown and "declared by annotation at level.py:4" in hover.markdown
    parameter = session.hover(str(path), 3, lines[3].index("z:"))
    assert parameter.markdown.startswith("`z`: m [L] length")
    signature = session.hover(str(path), 3, 5)
    assert "level(p: Pa, z: m) -> m" in signature.markdown
    assert session.hover(str(path), 0, 2) is None  # an import: nothing about units


def test_hover_inside_f_strings_after_literal_text(tmp_path):
    # a kiln log line: the fields come after text, which (before Python 3.12) claims the
    # whole string's span in the syntax tree
    text = ('from typing import Annotated\n\n\n'
            'def log(depth: Annotated[float, "m"]):\n'
            '    return f"depth {depth:.1f} m, twice {2 * depth}"\n')
    path = tmp_path / "kiln.py"
    path.write_text(text, encoding="utf-8")
    line = text.splitlines()[4]
    session = Session()
    first = session.hover(str(path), 4, line.index("depth:"))
    assert first is not None and first.markdown.startswith("`depth`: m [L] length")
    second = session.hover(str(path), 4, line.index("* depth"))
    assert second is not None and second.markdown.startswith("`2 * depth`: m [L]")
