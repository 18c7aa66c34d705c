"""Witnesses of semantic findings: a value that still decodes, and what it means on each side.

A semantic change cannot make a codec fail: that is its danger. Its witness is therefore
an example value written with the OLD schema, run through the format's real codec to the
NEW reader (confirmed: it reads back unchanged, so nothing warns anyone), with the
interpretation each side gives it: 1500 written in ms is read as 1500 s, a thousand times
the value meant. Unit arithmetic is the semantics module's (linter/units.py: UCUM codes read, pint converts).
"""
from __future__ import annotations

import random

from . import Witness, seed_for

EXAMPLE = 1500


def interpret(value: float, old_unit: str, new_unit: str) -> str:
    """How ``value`` written in ``old_unit`` reads when taken to be in ``new_unit``."""
    from ..units import relate  # the semantics module's UCUM reading, one for the whole tool

    rel = relate(old_unit, new_unit)
    facts = {"old_unit": old_unit, "new_unit": new_unit, "factor": rel.factor, "offset": rel.offset,
             "old_dimension": rel.old_dimension, "new_dimension": rel.new_dimension}
    return from_facts(value, facts) or f"the reader takes {value} {old_unit} as {value} {new_unit}"


def from_facts(value: float, facts) -> str | None:
    """The interpretation from the semantics module's facts (new = factor x old + offset), if given."""
    a, b = facts["old_unit"], facts["new_unit"]
    if facts.get("old_dimension") and facts.get("new_dimension"):
        return (f"the reader takes {value} {a} as {value} {b}: a different kind of quantity "
                f"({facts['old_dimension']} written, {facts['new_dimension']} read)")
    factor = facts.get("factor")
    if not isinstance(factor, (int, float)) or not factor:
        return None
    offset = facts.get("offset") or 0
    meant = factor * value + offset
    text = f"the reader takes {value} {a} as {value} {b}; the writer meant {_num(meant)} {b}"
    if not offset and meant:
        text += f", so the reader is {_num(value / meant)} times off"
    return text


def _num(x: float) -> str:
    return f"{x:.6g}"


def witness(finding, module, pair) -> Witness | None:
    facts = finding.facts
    writer, reader = pair.sides("backward") if pair is not None else (None, None)
    where = finding.path or finding.schema
    if facts.get("old_unit") and facts.get("new_unit"):
        claim = from_facts(EXAMPLE, facts) or interpret(EXAMPLE, str(facts["old_unit"]), str(facts["new_unit"]))
    elif facts.get("old_meaning") is not None and facts.get("new_meaning") is not None:
        claim = (f"the writer meant '{facts['old_meaning']}'; the reader takes it as "
                 f"'{facts['new_meaning']}'")
    else:
        return _reinterpreted(finding, module, writer, reader)
    if module is None or writer is None or not hasattr(module, "with_value"):
        return Witness("backward", {where: EXAMPLE}, _display(writer, "old"), _display(reader, "new"),
                       f"{claim} (no codec run for this format)", False)
    rng = random.Random(seed_for(finding, "semantic"))
    datum = module.with_value(writer, finding.schema, finding.path, EXAMPLE, rng)
    # Read with only this change applied, so that another change in the file cannot mask it.
    alone = module.isolate(finding, writer, reader) if hasattr(module, "isolate") else None
    trial = module.run(writer, alone or reader, finding.schema, datum) if datum is not None else None
    if trial is None:
        return Witness("backward", {where: EXAMPLE}, writer.display, reader.display,
                       f"{claim} (no datum with that value could be written)", False)
    if trial.failed:
        return Witness("backward", trial.datum, writer.display, reader.display,
                       f"{claim}; but the codec does not read it back silently: {trial.outcome}", False)
    return Witness("backward", trial.datum, writer.display, reader.display,
                   f"read back unchanged, so nothing fails: {claim}", True)


def _reinterpreted(finding, module, writer, reader) -> Witness | None:
    """A semantic change the format's codec shows by reading the same bytes with the other schema."""
    if module is None or writer is None or not hasattr(module, "reinterpret"):
        return None
    trial = module.reinterpret(finding, writer, reader, random.Random(seed_for(finding, "semantic")))
    if trial is None:
        return Witness("backward", None, writer.display, reader.display,
                       "no datum found whose value the other schema reads differently", False)
    return Witness("backward", trial.datum, writer.display, reader.display, trial.outcome, trial.failed)


def _display(side, fallback: str) -> str:
    return side.display if side is not None else fallback
