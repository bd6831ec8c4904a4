"""Line numbers of TOML keys, found by scanning the text.

Source: the TOML 1.0 specification (toml.io) — tables ``[a.b]``, arrays of tables
``[[a]]`` (each header starts a new element), dotted keys, inline tables, multi-line
arrays and multi-line strings. Expected line numbers are counted by hand in each text.
"""
from __future__ import annotations

from groundshake.scenario._lines import key_lines, line_of, split_dotted

TEXT = '''\
title = "x"                      # 1
[motion]                         # 2
x = { file = "a.mseed", scale = 2.0 }
[[parts]]                        # 4
name = "a"
size = [1.0,
  2.0,
  3.0]                           # 8
[[parts]]                        # 9
name = "b"                       # 10
notes = """
[[parts]]
name = "not a header"
"""                              # 14
[other]                          # 15
tension = 1.0                    # 16
[[equipment]]                    # 17
"mass" = 2.0                     # 18
[equipment.fp]                   # 19
sds = 1.0                        # 20
site.a = 1                       # 21
'''


def test_text_is_valid_toml():
    import tomllib
    data = tomllib.loads(TEXT)  # Python's tomllib as the independent TOML 1.0 parser
    assert [p["name"] for p in data["parts"]] == ["a", "b"]


def test_headers_and_keys():
    lines = key_lines(TEXT)
    # Hand-counted lines (TOML 1.0: each [[parts]] header is a new array element).
    assert lines[("title",)] == 1
    assert lines[("motion",)] == 2
    assert lines[("motion", "x")] == 3
    assert lines[("motion", "x", "file")] == 3  # inline-table key on its line
    assert lines[("motion", "x", "scale")] == 3
    assert lines[("parts", 0)] == 4
    assert lines[("parts", 0, "size")] == 6  # a multi-line array starts where its key is
    assert lines[("parts", 1)] == 9
    assert lines[("parts", 1, "name")] == 10
    assert ("parts", 2) not in lines  # inside a multi-line string: not a header
    assert lines[("other", "tension")] == 16
    assert lines[("equipment", 0, "mass")] == 18  # quoted key
    assert lines[("equipment", 0, "fp", "sds")] == 20  # sub-table of the current element
    assert lines[("equipment", 0, "fp", "site", "a")] == 21  # dotted key


def test_fallback_to_the_table_header():
    lines = key_lines(TEXT)
    # A key that is absent falls back to its table's header line (the loader's documented rule).
    assert line_of(lines, ("parts", 1, "origin")) == 9
    assert line_of(lines, ("motion", "x", "units")) == 3
    assert line_of(lines, ("nothing", "here")) is None
    assert line_of(None, ("title",)) is None


def test_split_dotted_keys():
    # TOML 1.0 keys: bare, basic-quoted and literal-quoted parts joined by dots.
    assert split_dotted('a."b.c".d') == ("a", "b.c", "d")
    assert split_dotted("materials.'high strength'") == ("materials", "high strength")
    assert split_dotted("a . b") == ("a", "b")


def test_comment_with_brackets_does_not_open_an_array():
    text = 'a = 1 # [not an array\n[mesh]\nelement_size = 0.3\n'
    lines = key_lines(text)
    # TOML 1.0: '#' outside strings starts a comment.
    assert lines[("mesh",)] == 2 and lines[("mesh", "element_size")] == 3


def test_string_with_brackets_does_not_open_an_array():
    text = 'a = "[[x" \n[mesh]\nb = \'[\'\n[sensors]\n'
    lines = key_lines(text)
    assert lines[("mesh",)] == 2 and lines[("sensors",)] == 4  # brackets in strings are text
