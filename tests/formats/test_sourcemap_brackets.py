"""The bracket scan of linter/sourcemap.py finds exactly the brackets outside strings."""
import json
from unittest import mock

from hypothesis import given
from hypothesis import strategies as st

from linter import sourcemap
from linter.sourcemap import _BRACKETS, _TOKENS, SourceMap

# Brackets are counted per stretch of text (sourcemap._STRETCH); stretches of a few
# characters put stretch boundaries beside, before and after brackets in small documents.
stretches = st.sampled_from([1, 2, 3, 7, 64, sourcemap._STRETCH])

text = st.text(alphabet='ab"\\[]{}\n\u00e9', max_size=10)
docs = st.recursive(text | st.integers(), lambda kids: st.lists(kids, max_size=4)
                    | st.dictionaries(text, kids, max_size=4), max_leaves=20)


@given(docs, st.booleans(), st.integers(0, 3))
def test_brackets_are_the_bracket_tokens(doc, ascii_only, indent):
    dumped = json.dumps(doc, ensure_ascii=ascii_only, indent=indent or None)
    tokens = [m.start() for m in _TOKENS.finditer(dumped) if m.group() in "{["]
    assert [m.start(1) for m in _BRACKETS.finditer(dumped) if m.start(1) >= 0] == tokens


@given(docs, st.integers(0, 3))
def test_lines_and_columns_count_from_the_text(doc, indent):
    dumped = json.dumps({"first": doc}, indent=indent or None)
    tree = json.loads(dumped)
    where = SourceMap(dumped, tree).locate(tree)
    offset = dumped.index('"first"')
    assert where == (dumped.count("\n", 0, offset) + 1, offset - (dumped.rfind("\n", 0, offset) + 1) + 1)


def _mapped(doc, indent):
    """The text of ``doc``, its built source map, and every container of its parse."""
    dumped = json.dumps(doc, indent=indent or None)
    tree = json.loads(dumped)
    smap = SourceMap(dumped, tree)
    smap._check()
    containers, stack = [], [tree]
    while stack:
        node = stack.pop()
        containers.append(node)
        stack.extend(c for c in (node.values() if isinstance(node, dict) else node) if isinstance(c, (dict, list)))
    return dumped, smap, containers


plain_text = st.text(alphabet='ab"\\\n\u00e9:,', max_size=10)
plain_docs = st.recursive(plain_text | st.integers(), lambda kids: st.lists(kids, max_size=4)
                          | st.dictionaries(plain_text, kids, max_size=4), max_leaves=20)


@given(st.one_of(docs, plain_docs), st.integers(0, 3), stretches)
def test_every_container_decodes_from_its_position(doc, indent, stretch):
    # Checked against the standard library's decoder: the text at each container's
    # offset decodes to that container. Strings without brackets take the counting
    # path of SourceMap._check, the others the string-skipping pattern.
    with mock.patch.object(sourcemap, "_STRETCH", stretch):
        dumped, smap, containers = _mapped({"first": doc}, indent)
        decoder = json.JSONDecoder()
        for node in containers:
            assert decoder.raw_decode(dumped, smap.offset_of(node))[0] == node


@given(st.one_of(docs, plain_docs), st.integers(0, 3), st.randoms(use_true_random=False), stretches)
def test_lines_and_columns_of_every_container_in_any_order(doc, indent, rnd, stretch):
    # Line numbers are counted from marks left by earlier lookups, and brackets found
    # stretch by stretch as lookups need them: asking in any order gives what counting
    # from the start of the text gives.
    with mock.patch.object(sourcemap, "_STRETCH", stretch):
        dumped, smap, containers = _mapped({"first": doc, "second": [doc]}, indent)
        rnd.shuffle(containers)
        check_lines(dumped, smap, containers)


def check_lines(dumped, smap, containers):
    for node in containers:
        line, column = smap.locate(node)
        offset = smap.offset_of(node)
        inner = len(dumped[offset + 1:]) - len(dumped[offset + 1:].lstrip())
        if dumped[offset + 1 + inner] not in "}]":
            offset += 1 + inner
        assert line == dumped.count("\n", 0, offset) + 1
        assert column == offset - (dumped.rfind("\n", 0, offset) + 1) + 1


@given(st.one_of(docs, plain_docs), st.integers(0, 3), st.randoms(use_true_random=False), stretches)
def test_many_lines_at_once_are_the_lines_of_each(doc, indent, rnd, stretch):
    # SourceMap.lines_of searches the preorder once for all the nodes it is asked for;
    # each answer must be what a lookup of that node alone gives, duplicates and
    # objects outside the tree (None) included, in the order asked.
    with mock.patch.object(sourcemap, "_STRETCH", stretch):
        dumped, alone, containers = _mapped({"first": doc, "second": [doc]}, indent)
        asked = containers + containers[:2] + [{"not": "in the tree"}, "text", None]
        rnd.shuffle(asked)
        expected = [alone.line_of(node) for node in asked]
        assert None in expected
        together = SourceMap(dumped, alone._tree)
        together.known_preorder(sourcemap.preorder(alone._tree))
        assert together.lines_of(asked) == expected
        assert SourceMap(dumped, alone._tree).lines_of(asked) == expected
