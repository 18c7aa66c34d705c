"""Interpretations of unit changes (values from UCUM definitions: 1 s = 1000 ms, 1 m3 = 1000 L)."""
from linter.witness.semantic import from_facts, interpret


def test_scale_change_names_the_factor():
    assert "1000 times" in interpret(1500, "ms", "s")
    assert "meant 1.5 m3" in interpret(1500, "L", "m3")


def test_offset_change_gives_no_ratio():
    text = interpret(20, "Cel", "[degF]")
    assert "meant 68 [degF]" in text and "times" not in text  # NIST SP 811: degF = degC x 9/5 + 32


def test_dimension_change_says_so():
    assert "different kind of quantity" in interpret(1500, "L", "kg")


def test_unknown_unit_still_reads():
    assert interpret(1500, "widgets", "gadgets") == "the reader takes 1500 widgets as 1500 gadgets"


def test_semantics_facts_take_precedence():
    text = from_facts(1500, {"old_unit": "ms", "new_unit": "s", "factor": 0.001})
    assert "meant 1.5 s" in text and "1000 times" in text
    assert from_facts(1500, {"old_unit": "ms", "new_unit": "s"}) is None
