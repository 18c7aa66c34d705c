"""Witnesses of semantic findings: a value that still decodes, and what it means on each side.

A semantic change cannot make a codec fail: that is its danger. Its witness is therefore
an example value written with the OLD schema, run through the format's real codec to the
NEW reader (confirmed: it reads back unchanged, so nothing warns anyone), with the
interpretation each side gives it: 1500 written in ms is read as 1500 s, a thousand times
the value meant. Unit arithmetic uses pint; UCUM codes (The Unified Code for Units of
Measure) that pint spells differently are translated first.
"""
from __future__ import annotations

import random
import re
from functools import lru_cache

from . import Witness, seed_for

EXAMPLE = 1500
# UCUM code -> pint spelling, for the codes where the two differ (UCUM, tables of units).
UCUM = {"Cel": "degC", "[degF]": "degF", "[degR]": "degR", "K": "kelvin", "L": "liter", "l": "liter",
        "h": "hour", "min": "minute", "d": "day", "a": "year", "wk": "week", "mo": "month",
        "[psi]": "psi", "bar": "bar", "[gal_us]": "gallon", "[gal_br]": "imperial_gallon",
        "[ft_i]": "foot", "[in_i]": "inch", "[mi_i]": "mile", "[lb_av]": "pound", "t": "tonne",
        "%": "percent", "[ppm]": "ppm", "[ppb]": "ppb", "1": "dimensionless"}
_POWER = re.compile(r"(?<=[A-Za-z\]])(-?\d+)")


@lru_cache(maxsize=1)
def _registry():
    import pint

    return pint.UnitRegistry()


def _pint_name(code: str) -> str:
    code = code.strip()
    if code in UCUM:
        return UCUM[code]
    parts = re.split(r"([./])", code)
    out = []
    for part in parts:
        if part in (".", "/"):
            out.append("*" if part == "." else "/")
            continue
        base = _POWER.sub(r"**\1", part)
        name = base.split("**")[0]
        out.append(base.replace(name, UCUM.get(name, name), 1))
    return "".join(out)


def interpret(value: float, old_unit: str, new_unit: str) -> str:
    """How ``value`` written in ``old_unit`` reads when taken to be in ``new_unit``."""
    try:
        ureg = _registry()
        meant = ureg.Quantity(value, _pint_name(old_unit))
        taken = ureg.Quantity(value, _pint_name(new_unit))
    except Exception:  # noqa: BLE001 - pint raises many types for a code it does not know
        return f"the reader takes {value} {old_unit} as {value} {new_unit}"
    if meant.dimensionality != taken.dimensionality:
        return (f"the reader takes {value} {old_unit} as {value} {new_unit}: a different kind of quantity "
                f"({meant.dimensionality} written, {taken.dimensionality} read)")
    as_old = taken.to(meant.units).magnitude
    # A ratio means something only between scales without an offset (not Cel -> [degF]).
    scaled = ureg.Quantity(0, taken.units).to(meant.units).magnitude == 0
    ratio = f"; {_num(as_old / value)} times the value meant" if scaled and as_old != value else ""
    return (f"the reader takes {value} {old_unit} as {value} {new_unit}, which is "
            f"{_num(as_old)} {old_unit}{ratio}")


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
