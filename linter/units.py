"""Unit codes (UCUM) read into pint quantities, and how two units relate.

A unit annotation is a UCUM code (The Unified Code for Units of Measure, c/s variant).
This module parses the code itself, without pint: the grammar is small and the atoms
evolint needs are tabled below with their UCUM definitions. pint does the dimensional
arithmetic, and is imported (and its registry built, once) only when two unit texts
differ. Texts that are not UCUM get a second, lenient reading through pint's own
parser (``meter``, ``kWh``, ``degC``); a text neither reading understands is
"unreadable" and compared as text.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

# Prefixes: UCUM specification, Table 1 (prefix symbols, c/s), whose values are the SI
# prefixes of the SI Brochure (BIPM, 9th edition), Table 7, plus the binary prefixes
# UCUM lists. ronna/quetta/ronto/quecto were adopted in 2022 (27th CGPM); their UCUM
# symbols R, Q, r, q are given here from memory.
PREFIXES = {
    "Q": 10**30, "R": 10**27, "Y": 10**24, "Z": 10**21, "E": 10**18, "P": 10**15,
    "T": 10**12, "G": 10**9, "M": 10**6, "k": 10**3, "h": 10**2, "da": 10,
    "d": Fraction(1, 10), "c": Fraction(1, 10**2), "m": Fraction(1, 10**3),
    "u": Fraction(1, 10**6), "n": Fraction(1, 10**9), "p": Fraction(1, 10**12),
    "f": Fraction(1, 10**15), "a": Fraction(1, 10**18), "z": Fraction(1, 10**21),
    "y": Fraction(1, 10**24), "r": Fraction(1, 10**27), "q": Fraction(1, 10**30),
    "Ki": 2**10, "Mi": 2**20, "Gi": 2**30, "Ti": 2**40,
}

# Temperature scales with an offset: UCUM's "special" units. Alone they convert with
# their offset; inside a product or quotient (Cel/min) only a difference makes sense, so
# there they stand for a temperature interval.
OFFSET = {"Cel": ("degree_Celsius", "delta_degree_Celsius"),
          "[degF]": ("degree_Fahrenheit", "delta_degree_Fahrenheit")}

# UCUM atom code -> (definition as a pint expression, metric: may take a prefix).
# Definitions follow the UCUM specification's tables of base units (§28), prefixed
# SI units (§30), other ISO units (§31), customary units (§32-§35) and pressure/heat
# units (§35-§39); section numbers from memory. Atoms not tabled are "unreadable".
ATOMS = {
    # base units (UCUM §28)
    "m": ("meter", True), "s": ("second", True), "g": ("gram", True),
    "rad": ("radian", True), "K": ("kelvin", True), "C": ("coulomb", True),
    "cd": ("candela", True),
    # dimensionless (UCUM §29)
    "10*": ("10", False), "10^": ("10", False), "[pi]": ("pi", False), "%": ("0.01", False),
    "[ppth]": ("1e-3", False), "[ppm]": ("1e-6", False), "[ppb]": ("1e-9", False),
    "[pptr]": ("1e-12", False),
    # SI units (UCUM §30)
    "mol": ("mole", True), "sr": ("steradian", True), "Hz": ("hertz", True),
    "N": ("newton", True), "Pa": ("pascal", True), "J": ("joule", True), "W": ("watt", True),
    "A": ("ampere", True), "V": ("volt", True), "F": ("farad", True), "Ohm": ("ohm", True),
    "S": ("siemens", True), "Wb": ("weber", True), "T": ("tesla", True), "H": ("henry", True),
    "lm": ("lumen", True), "lx": ("lux", True), "Bq": ("becquerel", True), "Gy": ("gray", True),
    "Sv": ("sievert", True), "Cel": ("kelvin", True),
    # other units from ISO 1000 (UCUM §31)
    "gon": ("0.9 * degree", False), "deg": ("degree", False), "'": ("arcminute", False),
    "''": ("arcsecond", False), "l": ("liter", True), "L": ("liter", True),
    "ar": ("100 * meter ** 2", True), "min": ("minute", False), "h": ("hour", False),
    "d": ("day", False), "a_j": ("365.25 * day", False), "a": ("365.25 * day", False),
    "mo_j": ("365.25 / 12 * day", False), "mo": ("365.25 / 12 * day", False),
    "wk": ("7 * day", False), "t": ("1000 * kilogram", True), "bar": ("1e5 * pascal", True),
    "eV": ("electron_volt", True), "eq": ("mole", True), "osm": ("mole", True),
    "kat": ("mole / second", True), "U": ("1e-6 * mole / minute", True),
    # customary units (UCUM §32-§34): international inch 2.54 cm, avoirdupois pound
    # 0.45359237 kg, US gallon 231 cubic inches, British gallon 4.54609 L
    "[in_i]": ("0.0254 * meter", False), "[ft_i]": ("12 * 0.0254 * meter", False),
    "[yd_i]": ("36 * 0.0254 * meter", False), "[mi_i]": ("63360 * 0.0254 * meter", False),
    "[nmi_i]": ("1852 * meter", False), "[kn_i]": ("1852 * meter / hour", False),
    "[sin_i]": ("(0.0254 * meter) ** 2", False), "[sft_i]": ("(12 * 0.0254 * meter) ** 2", False),
    "[cin_i]": ("(0.0254 * meter) ** 3", False), "[cft_i]": ("(12 * 0.0254 * meter) ** 3", False),
    "[cyd_i]": ("(36 * 0.0254 * meter) ** 3", False),
    "[gal_us]": ("231 * (0.0254 * meter) ** 3", False),
    "[qt_us]": ("231 / 4 * (0.0254 * meter) ** 3", False),
    "[pt_us]": ("231 / 8 * (0.0254 * meter) ** 3", False),
    "[foz_us]": ("231 / 128 * (0.0254 * meter) ** 3", False),
    "[bbl_us]": ("42 * 231 * (0.0254 * meter) ** 3", False),
    "[gal_br]": ("4.54609 * liter", False),
    "[lb_av]": ("0.45359237 * kilogram", False), "[oz_av]": ("0.45359237 / 16 * kilogram", False),
    "[ston_av]": ("2000 * 0.45359237 * kilogram", False),
    "[lbf_av]": ("0.45359237 * kilogram * 9.80665 * meter / second ** 2", False),
    "[psi]": ("0.45359237 * kilogram * 9.80665 * meter / second ** 2 / (0.0254 * meter) ** 2", False),
    "[degF]": ("5 / 9 * kelvin", False), "[degR]": ("5 / 9 * kelvin", False),
    # pressure and heat (UCUM §35-§39)
    "atm": ("101325 * pascal", False), "m[Hg]": ("133.3220 * kilopascal", True),
    "m[H2O]": ("9.80665 * kilopascal", True),
    "[in_i'Hg]": ("133.3220 * kilopascal * 0.0254", False),
    "[in_i'H2O]": ("9.80665 * kilopascal * 0.0254", False),
    "[g]": ("9.80665 * meter / second ** 2", False), "gf": ("gram * 9.80665 * meter / second ** 2", True),
    "cal": ("4.184 * joule", True), "cal_th": ("4.184 * joule", True),
    "cal_IT": ("4.1868 * joule", True), "[Cal]": ("4184 * joule", False),
    "[Btu_IT]": ("1055.05585262 * joule", False), "[HP]": ("550 * 12 * 0.0254 * meter * 0.45359237 * kilogram * 9.80665 * meter / second ** 3", False),
    # information (UCUM §41)
    "bit": ("bit", True), "By": ("8 * bit", True), "Bd": ("1 / second", True),
}

_EXPONENT = re.compile(r"[+-]?\d+")
_DIGITS = re.compile(r"\d+")
_TEN = re.compile(r"10[*^]")
_STOP = set("./(){}")
# What the lenient (pint) reading accepts: letters, digits, spaces and arithmetic; pint
# evaluates expressions, so anything else is refused before it gets there.
_LENIENT = re.compile(r"^[A-Za-z_µμ°Ω0-9 .*/^()\-²³]{1,64}$")
# Blanks around an operator change nothing a reader could mean ("m3 / h"); elsewhere
# ("kg m") they are not UCUM and are left to the lenient reading.
_OPERATOR_SPACE = re.compile(r"\s*([./()])\s*")
_STRAY_DOT = re.compile(r"(?<!\d)\.|\.(?!\d)")  # pint reads '.' only inside numbers


class UnitSyntaxError(ValueError):
    """A text that is not a UCUM code; the message says where and why."""


@dataclass(frozen=True)
class Ucum:
    """A parsed UCUM code: ``number`` times the product of ``atoms`` (prefix, atom, exponent)."""

    text: str
    number: Fraction
    atoms: tuple[tuple[str, str, int], ...]
    annotations: tuple[str, ...]

    @property
    def scale_with_offset(self) -> bool:
        """A temperature scale standing alone (Cel, [degF]): converted with its offset."""
        return self.number == 1 and len(self.atoms) == 1 and self.atoms[0][1] in OFFSET


class _Reader:
    def __init__(self, text: str):
        self.text, self.pos = text, 0
        self.number = Fraction(1)
        self.atoms: list[tuple[str, str, int]] = []
        self.annotations: list[str] = []

    def fail(self, why: str):
        raise UnitSyntaxError(f"{why} at character {self.pos + 1} of {self.text!r}")

    def peek(self) -> str:
        return self.text[self.pos] if self.pos < len(self.text) else ""

    def main_term(self):
        if self.peek() == "/":
            self.pos += 1
            self.term(-1)
        else:
            self.term(1)
        if self.pos != len(self.text):
            self.fail("unexpected " + repr(self.peek()))

    def term(self, sign: int):
        # UCUM: '.' and '/' have equal precedence and are read left to right.
        self.component(sign)
        while self.peek() and self.peek() in "./":
            op = self.text[self.pos]
            self.pos += 1
            self.component(sign if op == "." else -sign)

    def component(self, sign: int):
        char = self.peek()
        if char == "(":
            self.pos += 1
            self.term(sign)
            if self.peek() != ")":
                self.fail("missing ')'")
            self.pos += 1
        elif char == "{":
            self.annotation(sign)
        elif char.isdigit() and not _TEN.match(self.text, self.pos):
            digits = _DIGITS.match(self.text, self.pos)
            self.pos = digits.end()
            self.number *= Fraction(int(digits.group())) ** sign
        else:
            self.annotatable(sign)
        if self.peek() == "{":
            self.annotation(sign)

    def annotation(self, sign: int):
        end = self.text.find("}", self.pos)
        if end < 0:
            self.fail("unclosed '{'")
        body = self.text[self.pos + 1:end]
        self.annotations.append(body if sign > 0 else f"/{body}")
        self.pos = end + 1

    def annotatable(self, sign: int):
        start = self.pos
        ten = _TEN.match(self.text, self.pos)
        if ten:
            self.pos = ten.end()
        while self.pos < len(self.text) and not ten:
            char = self.text[self.pos]
            if char == "[":
                close = self.text.find("]", self.pos)
                if close < 0:
                    self.fail("unclosed '['")
                self.pos = close + 1
            elif char in _STOP or char.isdigit() or char in "+-":
                break
            elif char.isspace():
                self.fail("a space (UCUM codes have none)")
            else:
                self.pos += 1
        symbol = self.text[start:self.pos]
        if not symbol:
            self.fail("expected a unit")
        prefix, atom = _split(symbol)
        if atom is None:
            self.pos = start
            self.fail(f"unknown unit {symbol!r}")
        exponent = 1
        found = _EXPONENT.match(self.text, self.pos)
        if found:
            exponent = int(found.group())
            self.pos = found.end()
        elif ten:
            self.fail("'10*' needs an exponent")
        self.atoms.append((prefix, atom, exponent * sign))


def _split(symbol: str) -> tuple[str, str | None]:
    """(prefix, atom) for a symbol; a whole atom wins over prefix + atom (UCUM §3-§4)."""
    if symbol in ATOMS:
        return "", symbol
    for prefix in sorted(PREFIXES, key=len, reverse=True):
        rest = symbol[len(prefix):]
        if symbol.startswith(prefix) and rest in ATOMS and ATOMS[rest][1]:
            return prefix, rest
    return "", None


def parse(text: str) -> Ucum:
    """Parse a UCUM code (c/s); raises UnitSyntaxError. Needs no pint."""
    if not text:
        raise UnitSyntaxError("empty unit")
    reader = _Reader(text)
    reader.main_term()
    code = Ucum(text, reader.number, tuple(reader.atoms), tuple(sorted(reader.annotations)))
    if code.scale_with_offset and code.atoms[0][::2] != ("", 1):
        raise UnitSyntaxError(f"{text!r}: a prefix or exponent on a temperature scale with an offset is ambiguous")
    return code


# --- pint: imported only from here on -------------------------------------------------

@lru_cache(maxsize=1)
def registry():
    """The one pint registry of a run (slow to build: about half a second)."""
    import pint

    return pint.UnitRegistry()


@lru_cache(maxsize=256)
def _atom_quantity(atom: str, in_product: bool):
    ureg = registry()
    if atom in OFFSET:
        alone, interval = OFFSET[atom]
        return ureg.Quantity(1, interval if in_product else alone)
    value = ureg.parse_expression(ATOMS[atom][0])
    return value if hasattr(value, "units") else ureg.Quantity(value)


@dataclass(frozen=True)
class Reading:
    """A unit text as pint understands it: ``magnitude`` x ``units``."""

    text: str
    magnitude: float
    units: object
    annotations: tuple[str, ...]
    how: str  # "ucum" or "lenient"

    @property
    def dimension(self) -> str:
        dims = str(self.units.dimensionality)
        return dims + "".join(" {%s}" % a for a in self.annotations)


def read(text: str) -> Reading:
    """Read a unit text with pint: as UCUM, else leniently; raises UnitSyntaxError."""
    text = text.strip()
    try:
        code = parse(_OPERATOR_SPACE.sub(r"\1", text))
    except UnitSyntaxError as exc:
        return _lenient(text, exc)
    ureg = registry()
    if code.scale_with_offset:
        q = _atom_quantity(code.atoms[0][1], False)
        return Reading(text, 1.0, q.units, code.annotations, "ucum")
    q = ureg.Quantity(float(code.number))
    for prefix, atom, exponent in code.atoms:
        q = q * (float(PREFIXES.get(prefix, 1)) * _atom_quantity(atom, True)) ** exponent
    return Reading(text, float(q.magnitude), q.units, code.annotations, "ucum")


def _lenient(text: str, ucum_error: UnitSyntaxError) -> Reading:
    if not _LENIENT.match(text) or _STRAY_DOT.search(text):
        raise ucum_error
    ureg = registry()
    try:
        value = ureg.parse_expression(text)
    except Exception:  # pint raises many kinds (undefined unit, syntax, tokenizer)
        raise ucum_error from None
    if not hasattr(value, "units"):
        value = ureg.Quantity(value)
    if not isinstance(value.magnitude, (int, float)) or not math.isfinite(value.magnitude) or value.magnitude == 0:
        raise ucum_error
    return Reading(text, float(value.magnitude), value.units, (), "lenient")


@dataclass(frozen=True)
class Relation:
    """How NEW relates to OLD: a value ``x`` in OLD is ``factor * x + offset`` in NEW.

    ``kind`` is ``same`` (spelled differently), ``scale``, ``affine``, ``dimension`` or
    ``unreadable`` (``problem`` says why; the texts were compared as text).
    """

    kind: str
    factor: float | None = None
    offset: float | None = None
    old_dimension: str | None = None
    new_dimension: str | None = None
    problem: str | None = None

    def apply(self, value: float) -> float:
        return self.factor * value + (self.offset or 0.0)


REL_TOL = 1e-9  # float noise in chained definitions (0.0254 ** 3) stays far below this


@lru_cache(maxsize=1024)
def relate(old: str, new: str) -> Relation:
    """Classify a change of unit text from OLD to NEW.

    Cached: a schema that changes one unit on many fields asks the same question each
    time, and pint takes about a millisecond to answer it (benchmarks/scale.py)."""
    if old.strip() == new.strip():
        return Relation("same", 1.0, 0.0)
    try:
        a = read(old)
    except UnitSyntaxError as exc:
        return Relation("unreadable", problem=f"old unit: {exc}")
    try:
        b = read(new)
    except UnitSyntaxError as exc:
        return Relation("unreadable", problem=f"new unit: {exc}")
    if a.units.dimensionality != b.units.dimensionality or a.annotations != b.annotations:
        return Relation("dimension", old_dimension=a.dimension, new_dimension=b.dimension)
    convert = _converter(a, b)
    offset = convert(0.0)
    factor = convert(1.0) - offset
    if math.isclose(offset, 0.0, abs_tol=1e-9 * max(1.0, abs(factor))):
        if math.isclose(factor, 1.0, rel_tol=REL_TOL):
            return Relation("same", 1.0, 0.0)
        return Relation("scale", _tidy(factor), 0.0)
    return Relation("affine", _tidy(factor), _tidy(offset))


def _converter(a: Reading, b: Reading):
    ureg = registry()

    def convert(x: float) -> float:
        return float(ureg.Quantity(x * a.magnitude, a.units).to(b.units).magnitude) / b.magnitude

    return convert


def _tidy(value: float) -> float:
    """Round away float noise (0.0010000000000000002 -> 0.001) at 15 significant digits."""
    if value == 0 or not math.isfinite(value):
        return value
    return float(f"{value:.15g}")


def number(value: float) -> str:
    """A factor or value as people write it: 0.001, 1000, 6.894757293, 1.8."""
    return f"{value:.10g}"
