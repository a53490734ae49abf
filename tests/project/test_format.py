"""The canonical form: same data, same comments, idempotent, whatever the input's layout."""

from __future__ import annotations

import tomllib

import pytest

from workbench.project.document import ProjectError, format_text

ODD = {
    "tables out of order": '[lines.A]\nx = 1\n[junctions.J]\ny = 2\n[lines.B]\nz = 3\n',
    "dotted keys": 'schema = 1\nproject.title = "x"\n[lines.L1]\nvalve.k_open = 0.2\n',
    "array of tables": '[[extra]]\na = 1\n[[extra]]\na = 2\n',
    "quoted keys": '[lines."L 1"]\n"odd key" = \'single\'\n',
    "comments in a list": 'p = [\n  1,  # one\n  2,\n]\n',
    "multi-line string": 'd = """\nline one   \n\n\nline two"""\n',
    "literal string with backslash": "path = 'C:\\plant\\tk'\n",
    "crlf line ends": 'a = 1\r\n\r\n\r\n[t]\r\nb = "x"  \r\n',
    "long list": "p = [" + ", ".join(f'{{ distance = "{i} m", elevation = "{i} m" }}' for i in range(8)) + "]\n",
    "unicode": 'title = "Fellgate — Kühlwasser µ"\n',
    "dates": "when = 2026-12-02\n",
    "special floats": "a = inf\nb = -inf\nc = nan\nd = 1e-05\ne = 3.0\n",
}


@pytest.mark.parametrize("text", ODD.values(), ids=ODD.keys())
def test_formatting_keeps_the_data_and_is_idempotent(text):
    once = format_text(text)
    data, again = tomllib.loads(text), tomllib.loads(once)
    # nan != nan: compare their text forms
    assert repr(again) == repr(data)
    assert format_text(once) == once


def test_formatting_keeps_every_comment():
    text = "# head\nschema = 1  # version\n[project]   # the project\ntitle='x'   # t\n# tail\n"
    once = format_text(text)
    for comment in ("# head", "# version", "# the project", "# t", "# tail"):
        assert comment in once
    assert once == ('# head\nschema = 1  # version\n\n[project]  # the project\n'
                    'title = "x"  # t\n# tail\n')


def test_a_long_list_is_written_one_entry_per_line():
    once = format_text(ODD["long list"])
    assert once.count("\n    {") == 8


def test_formatting_text_that_is_not_toml_is_a_project_error_with_the_position():
    with pytest.raises(ProjectError) as info:
        format_text("a = 1\nb = \n")
    assert info.value.problems[0].line == 2
