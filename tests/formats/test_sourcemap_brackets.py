"""The bracket scan of linter/sourcemap.py finds exactly the brackets outside strings."""
import json

from hypothesis import given
from hypothesis import strategies as st

from linter.sourcemap import _BRACKETS, _TOKENS, SourceMap

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
